//! Which way each route step runs. A route is a chain: each step should use
//! something the step before it makes. Every pair of neighbours scores each
//! of its four orientations by the compounds the first makes and the second
//! uses (H+, water and carriers left out); the orientation of the whole route with the highest total wins.
//! A step that runs either way in equally good solutions is ambiguous and
//! the person decides (`--flip` / `--keep`).

use super::error::ImportError;
use super::roles::Kind;
use super::sbml::Model;

/// Compounds that `a` (as run) makes and `b` (as run) uses.
fn link(
    model: &Model,
    a: usize,
    fa: bool,
    b: usize,
    fb: bool,
    use_kind: &dyn Fn(usize) -> bool,
) -> usize {
    let sa = if fa { -1.0 } else { 1.0 };
    let sb = if fb { -1.0 } else { 1.0 };
    model.reactions[a]
        .stoich
        .iter()
        .filter(|&&(s, v)| use_kind(s) && v * sa > 0.0)
        .filter(|&&(s, _)| {
            model.reactions[b]
                .stoich
                .iter()
                .any(|&(t, w)| t == s && w * sb < 0.0)
        })
        .count()
}

/// For each route step (in route order), true when it runs against the model's written direction.
pub fn orient(
    model: &Model,
    file: &str,
    route: &[usize],
    kinds: &[Kind],
    flip: &[usize],
    keep: &[usize],
) -> Result<Vec<bool>, ImportError> {
    let n = route.len();
    let allowed = |i: usize, s: usize| {
        let r = route[i];
        !(flip.contains(&r) && s == 0 || keep.contains(&r) && s == 1)
    };
    if n == 1 {
        return Ok(vec![flip.contains(&route[0])]);
    }
    // Scores of each link for the four orientations [a][b] (0 = as written, 1 = flipped).
    let core = |s: usize| kinds[s] == Kind::Other;
    let mut links = Vec::with_capacity(n - 1);
    for i in 0..n - 1 {
        let (a, b) = (route[i], route[i + 1]);
        let mut score = [[0usize; 2]; 2];
        for (fa, row) in score.iter_mut().enumerate() {
            for (fb, cell) in row.iter_mut().enumerate() {
                *cell = link(model, a, fa == 1, b, fb == 1, &core);
            }
        }
        if score.iter().flatten().all(|&s| s == 0) {
            let (ra, rb) = (&model.reactions[a], &model.reactions[b]);
            return Err(ImportError::new(
                file,
                None,
                format!(
                    "the route's steps do not connect: '{}' ({}) and '{}' ({}) share no compound other than carriers, water and H+; list the reactions in the order the route runs (dgpath import MODEL --list shows them)",
                    ra.id,
                    model.equation(ra),
                    rb.id,
                    model.equation(rb)
                ),
            ));
        }
        links.push(score);
    }
    // Best totals up to and from each step in each orientation.
    const NONE: i64 = i64::MIN / 4;
    let mut fwd = vec![[NONE; 2]; n];
    let mut bwd = vec![[NONE; 2]; n];
    for s in 0..2 {
        if allowed(0, s) {
            fwd[0][s] = 0;
        }
        if allowed(n - 1, s) {
            bwd[n - 1][s] = 0;
        }
    }
    for i in 1..n {
        for b in 0..2 {
            if !allowed(i, b) {
                continue;
            }
            fwd[i][b] = (0..2)
                .map(|a| fwd[i - 1][a] + links[i - 1][a][b] as i64)
                .max()
                .unwrap_or(NONE);
        }
    }
    for i in (0..n - 1).rev() {
        for a in 0..2 {
            if !allowed(i, a) {
                continue;
            }
            bwd[i][a] = (0..2)
                .map(|b| bwd[i + 1][b] + links[i][a][b] as i64)
                .max()
                .unwrap_or(NONE);
        }
    }
    let best = (0..2).map(|s| fwd[0][s] + bwd[0][s]).max().unwrap_or(NONE);
    let mut flipped = vec![false; n];
    let mut ambiguous = Vec::new();
    for i in 0..n {
        let ok: Vec<usize> = (0..2).filter(|&s| fwd[i][s] + bwd[i][s] == best).collect();
        if ok.len() > 1 {
            ambiguous.push(i);
        }
        flipped[i] = ok.first() == Some(&1);
    }
    // Every neighbour pair must share a compound the first makes and the second uses.
    for i in 0..n - 1 {
        let (a, b) = (flipped[i] as usize, flipped[i + 1] as usize);
        if links[i][a][b] == 0 {
            let ra = &model.reactions[route[i]];
            let rb = &model.reactions[route[i + 1]];
            let side = |r: &super::sbml::Reaction, f: bool, sign: f64| {
                let s = if f { -sign } else { sign };
                r.stoich
                    .iter()
                    .filter(|&&(sp, v)| v * s > 0.0 && kinds[sp] != Kind::Proton)
                    .map(|&(sp, _)| model.species[sp].id.as_str())
                    .collect::<Vec<_>>()
                    .join(" + ")
            };
            return Err(ImportError::new(
                file,
                None,
                format!(
                    "the route's steps do not connect: '{}' makes {} but '{}' uses {}; list the reactions in the order the route runs (dgpath import MODEL --list shows them), or --flip/--keep a step to run it the way the route needs",
                    ra.id,
                    side(ra, flipped[i], 1.0),
                    rb.id,
                    side(rb, flipped[i + 1], -1.0)
                ),
            ));
        }
    }
    if !ambiguous.is_empty() {
        let lines: Vec<String> = ambiguous
            .iter()
            .map(|&i| {
                let r = &model.reactions[route[i]];
                format!(
                    "step '{}' ({}) could run either way along this route; add --flip {} to run it right to left, or --keep {} to run it as written",
                    r.id,
                    model.equation(r),
                    r.id,
                    r.id
                )
            })
            .collect();
        return Err(ImportError::new(file, None, lines.join("\n  ")));
    }
    Ok(flipped)
}
