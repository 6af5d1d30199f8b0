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

/// Link scores of a neighbour pair for its four orientations [a][b]
/// (0 = as written, 1 = flipped).
type Scores = [[usize; 2]; 2];

/// No orientation allowed (a step held by `--flip`/`--keep`).
const NONE: i64 = i64::MIN / 4;

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
    if n == 1 {
        return Ok(vec![flip.contains(&route[0])]);
    }
    let links = link_scores(model, file, route, kinds)?;
    let allowed = |i: usize, s: usize| {
        let r = route[i];
        !(flip.contains(&r) && s == 0 || keep.contains(&r) && s == 1)
    };
    let (flipped, ambiguous) = best_orientation(&links, &allowed);
    check_connected(model, file, route, kinds, &links, &flipped)?;
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

/// The scores of every neighbour pair; an error for a pair that shares no
/// compound in any orientation.
fn link_scores(
    model: &Model,
    file: &str,
    route: &[usize],
    kinds: &[Kind],
) -> Result<Vec<Scores>, ImportError> {
    let core = |s: usize| kinds[s] == Kind::Other;
    let mut links = Vec::with_capacity(route.len() - 1);
    for w in route.windows(2) {
        let (a, b) = (w[0], w[1]);
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
    Ok(links)
}

/// The orientation of the whole route with the highest total score (the
/// first on ties, as written before flipped), and the steps that run
/// either way in equally good solutions. Best totals up to and from each
/// step in each orientation, by dynamic programming.
fn best_orientation(
    links: &[Scores],
    allowed: &dyn Fn(usize, usize) -> bool,
) -> (Vec<bool>, Vec<usize>) {
    let n = links.len() + 1;
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
    (flipped, ambiguous)
}

/// Every neighbour pair must share a compound the first makes and the
/// second uses, as oriented.
fn check_connected(
    model: &Model,
    file: &str,
    route: &[usize],
    kinds: &[Kind],
    links: &[Scores],
    flipped: &[bool],
) -> Result<(), ImportError> {
    for i in 0..route.len() - 1 {
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
    Ok(())
}
