//! Linear algebra for the estimate: recognising a simple chain, the link
//! matrix, and dense and banded LU solves with partial pivoting.

use super::limits::*;

/// A simple chain: step 0 makes variable v0 only, step k uses v_{k−1} and
/// makes v_k, the last step uses v_{n−2} only, and there are n − 1 variables.
pub(super) fn is_chain(terms: &[Terms], nvars: usize) -> bool {
    let n = terms.len();
    if nvars + 1 != n {
        return false;
    }
    let mut prev: Option<usize> = None;
    let mut seen = vec![false; nvars];
    for (k, t) in terms.iter().enumerate() {
        let subs: Vec<usize> = t.iter().filter(|x| x.1 < 0.0).map(|x| x.0).collect();
        let prods: Vec<usize> = t.iter().filter(|x| x.1 > 0.0).map(|x| x.0).collect();
        if subs.as_slice() != prev.as_slice() {
            return false;
        }
        if k + 1 == n {
            return prods.is_empty();
        }
        match prods.as_slice() {
            [p] if !seen[*p] => {
                seen[*p] = true;
                prev = Some(*p);
            }
            _ => return false,
        }
    }
    true
}

/// Finds independent rows of the intermediates' stoichiometry (in variable
/// order) and expresses the others through them, scaled by concentrations:
/// d ln S_i = Σ_k L_ik (S_k / S_i) d ln S_k.
pub(super) fn link(terms: &[Terms], conc: &[f64], nvars: usize) -> Link {
    let n = terms.len();
    let mut rows = vec![vec![0.0; n]; nvars];
    for (j, t) in terms.iter().enumerate() {
        for &(v, nu) in t {
            rows[v][j] += nu;
        }
    }
    // Basis: reduced row (pivot entry 1), pivot column, and the row as a
    // combination of the independent originals.
    let mut basis: Vec<(Vec<f64>, usize, Vec<f64>)> = Vec::new();
    let mut indep: Vec<Option<usize>> = vec![None; nvars];
    let mut indep_vars: Vec<usize> = Vec::new();
    let mut deps: Vec<(usize, Vec<f64>)> = Vec::new();
    for (i, row) in rows.iter().enumerate() {
        let scale = row.iter().fold(0.0f64, |m, x| m.max(x.abs())).max(1.0);
        let mut r = row.clone();
        let mut acc = vec![0.0; indep_vars.len()];
        for (brow, pc, combo) in &basis {
            let f = r[*pc];
            if f != 0.0 {
                for (x, y) in r.iter_mut().zip(brow) {
                    *x -= f * y;
                }
                for (x, y) in acc.iter_mut().zip(combo) {
                    *x += f * y;
                }
            }
        }
        let (pc, pv) =
            r.iter().enumerate().fold(
                (0, 0.0f64),
                |b, (j, &x)| if x.abs() > b.1.abs() { (j, x) } else { b },
            );
        if pv.abs() <= 1e-9 * scale {
            deps.push((i, acc));
        } else {
            let k = indep_vars.len();
            indep[i] = Some(k);
            indep_vars.push(i);
            let mut combo: Vec<f64> = acc.iter().map(|x| -x / pv).collect();
            combo.push(1.0 / pv);
            for (_, _, c) in basis.iter_mut() {
                c.push(0.0);
            }
            for x in r.iter_mut() {
                *x /= pv;
            }
            basis.push((r, pc, combo));
        }
    }
    let m0 = indep_vars.len();
    let mut lrows: Vec<Vec<(usize, f64)>> = (0..nvars)
        .map(|i| indep[i].map(|k| vec![(k, 1.0)]).unwrap_or_default())
        .collect();
    for (i, acc) in deps {
        lrows[i] = acc
            .iter()
            .enumerate()
            .filter(|(_, x)| x.abs() > 1e-12)
            .map(|(k, &x)| (k, x * conc[indep_vars[k]] / conc[i]))
            .collect();
    }
    Link {
        indep,
        m0,
        rows: lrows,
    }
}

/// Solves A x = b for dense row-major A (n × n) by LU with partial
/// pivoting; None when singular or so nearly singular that the answer
/// cannot be trusted: ‖x‖·‖A‖ / ‖b‖ (a lower bound of the condition number)
/// above 1e13. The summation theorem holds for any solution, so it cannot
/// serve as the check.
pub(super) fn solve(a: Vec<f64>, n: usize, b: Vec<f64>) -> Option<Vec<f64>> {
    let an = a.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let bn = b.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let x = lu_solve(a, n, b)?;
    let xn = x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    (xn * an <= 1e13 * bn || bn == 0.0).then_some(x)
}

/// Most work (rows × lower bandwidth × window) the banded solve takes on.
pub const BAND_WORK_MAX: usize = 200_000_000;

/// Solves A x = b for a sparse A (rows of (column, value), repeats summed)
/// whose entries lie near the diagonal: LU with partial pivoting that keeps
/// each row as a dense window, in time rows × lower bandwidth × window.
/// Err(TooWide) above `BAND_WORK_MAX`; Ok(None) when singular or nearly so
/// (the bound of `solve`).
pub(super) fn band_solve(
    rows: Vec<Vec<(usize, f64)>>,
    mut b: Vec<f64>,
) -> Result<Option<Vec<f64>>, Failure> {
    let n = rows.len();
    let (mut win, p, q) = windows(&rows);
    if n.saturating_mul(p + 1).saturating_mul(2 * p + q + 1) > BAND_WORK_MAX {
        return Err(Failure::TooWide);
    }
    let an = win
        .iter()
        .flat_map(|w| w.1.iter())
        .fold(0.0f64, |m, x| m.max(x.abs()));
    let bn = b.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    if !an.is_finite() || an == 0.0 {
        return Ok(None);
    }
    let has = |w: &(usize, Vec<f64>), k: usize| w.0 <= k && k < w.0 + w.1.len();
    for k in 0..n {
        // Rows that can hold column k lie within k..=k+p (see DEVELOPERS.md).
        let end = (k + p + 1).min(n);
        let (mut best, mut bv) = (k, 0.0f64);
        for (i, w) in win.iter().enumerate().take(end).skip(k) {
            if has(w, k) {
                let x = w.1[k - w.0].abs();
                if x > bv {
                    best = i;
                    bv = x;
                }
            }
        }
        if bv <= an * 1e-15 {
            return Ok(None);
        }
        win.swap(k, best);
        b.swap(k, best);
        let (plo, prow) = (win[k].0, win[k].1.clone());
        let phi = plo + prow.len();
        let d = prow[k - plo];
        for i in k + 1..end {
            if !has(&win[i], k) {
                continue;
            }
            let (lo, v) = &win[i];
            let f = v[k - lo] / d;
            let hi = lo + v.len();
            let mut nv = vec![0.0; hi.max(phi) - (k + 1)];
            for j in k + 1..hi {
                nv[j - (k + 1)] = v[j - lo];
            }
            if f != 0.0 {
                for j in k + 1..phi {
                    nv[j - (k + 1)] -= f * prow[j - plo];
                }
                b[i] -= f * b[k];
            }
            win[i] = (k + 1, nv);
        }
    }
    let mut x = vec![0.0; n];
    for k in (0..n).rev() {
        let (lo, v) = &win[k];
        let mut s = b[k];
        for j in k + 1..lo + v.len() {
            s -= v[j - lo] * x[j];
        }
        x[k] = s / v[k - lo];
    }
    let xn = x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    Ok((x.iter().all(|v| v.is_finite()) && (xn * an <= 1e13 * bn || bn == 0.0)).then_some(x))
}

/// Each row as a dense window (first column, values) spanning its entries
/// and the diagonal, with the lower and upper bandwidths.
fn windows(rows: &[Vec<(usize, f64)>]) -> (Vec<(usize, Vec<f64>)>, usize, usize) {
    let (mut p, mut q) = (0usize, 0usize);
    let mut win: Vec<(usize, Vec<f64>)> = Vec::with_capacity(rows.len());
    for (i, r) in rows.iter().enumerate() {
        let lo = r.iter().map(|e| e.0).min().unwrap_or(i).min(i);
        let hi = r.iter().map(|e| e.0).max().unwrap_or(i).max(i) + 1;
        p = p.max(i - lo);
        q = q.max(hi - 1 - i);
        let mut v = vec![0.0; hi - lo];
        for &(k, x) in r {
            v[k - lo] += x;
        }
        win.push((lo, v));
    }
    (win, p, q)
}

/// LU with partial pivoting and the two triangular solves.
pub(super) fn lu_solve(mut a: Vec<f64>, n: usize, mut b: Vec<f64>) -> Option<Vec<f64>> {
    let scale = a.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    if !scale.is_finite() || scale == 0.0 {
        return None;
    }
    for k in 0..n {
        let (mut p, mut pv) = (k, a[k * n + k].abs());
        for i in k + 1..n {
            let v = a[i * n + k].abs();
            if v > pv {
                p = i;
                pv = v;
            }
        }
        if pv <= scale * 1e-15 {
            return None;
        }
        if p != k {
            for j in 0..n {
                a.swap(k * n + j, p * n + j);
            }
            b.swap(k, p);
        }
        let d = a[k * n + k];
        for i in k + 1..n {
            let f = a[i * n + k] / d;
            if f != 0.0 {
                for j in k + 1..n {
                    a[i * n + j] -= f * a[k * n + j];
                }
                b[i] -= f * b[k];
            }
        }
    }
    for k in (0..n).rev() {
        let mut s = b[k];
        for j in k + 1..n {
            s -= a[k * n + j] * b[j];
        }
        b[k] = s / a[k * n + k];
    }
    b.iter().all(|x| x.is_finite()).then_some(b)
}
