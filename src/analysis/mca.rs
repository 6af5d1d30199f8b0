//! Flux control estimated from the thermodynamics (science.md §7): scaled
//! flux control coefficients of the route steps over the route's flux, from
//! reversible mass-action elasticities fixed by each step's dG' (the matrix
//! method of metabolic control analysis), and the 5–95 % range of each
//! coefficient over sampled enzyme saturation with a fixed seed.
//!
//! Route intermediates are the variables; every other compound is held.
//! Route step j carries times_j·J at the steady state. A simple chain (each
//! intermediate made by one step and used by the next) uses the closed form,
//! in O(n); any other route uses the matrix method: a dense LU with
//! conserved moieties among the intermediates removed through the link
//! matrix (N = L·N_R) up to `DENSE_MAX` intermediates, a banded LU above.

use super::{Analysis, Role, VerdictKind};
use crate::model::Pathway;
use rand_chacha::ChaCha8Rng;
use rand_chacha::rand_core::{RngCore, SeedableRng};

/// Saturation draws behind `control_coefficient_range` unless asked otherwise.
pub const DEFAULT_DRAWS: usize = 50_000;
/// Seed of the saturation draws (ChaCha8, `seed_from_u64`), fixed so the same file gives the same range.
pub const SEED: u64 = 0x6467_7061_7468_4d43;
/// Most intermediates of a route that is not a simple chain solved densely
/// (with conserved totals found through the link matrix); longer routes are
/// solved as banded systems.
pub const DENSE_MAX: usize = 300;
/// Most intermediates of a route that is not a simple chain for which the range is computed.
pub const RANGE_DENSE_MAX: usize = 80;
/// Most values (route steps × draws) computed and stored for a range (8
/// bytes each; about 0.3 s in a release build); a longer route gets fewer
/// draws, down to `RANGE_MIN_DRAWS`, so `report` stays near-linear in time.
pub const RANGE_MAX_VALUES: usize = 2_000_000;
/// Fewest draws a range is computed from when a long route needs fewer than asked.
pub const RANGE_MIN_DRAWS: usize = 1_000;
/// Lower and upper percentile of the range.
pub const RANGE_PERCENTILES: (f64, f64) = (0.05, 0.95);

/// One route step's reactants among the intermediates: (variable, signed coefficient as run).
type Terms = Vec<(usize, f64)>;

/// The thermodynamic control model of one route at one scenario.
#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    /// Compound index of each variable (route intermediate), in order of first use.
    pub vars: Vec<usize>,
    /// Per route step: its intermediates with signed coefficients as run.
    terms: Vec<Terms>,
    /// Per route step: 1/(1 − e^{dG'/RT}).
    a: Vec<f64>,
    /// Per route step: e^{dG'/RT}/(1 − e^{dG'/RT}).
    b: Vec<f64>,
    /// Turns per pass.
    times: Vec<f64>,
    /// The route is a simple chain (closed form).
    chain: bool,
    /// Link data for the matrix method (None for chains and long routes: identity).
    link: Option<Link>,
}

/// Independent rows of the stoichiometry and the scaled link matrix.
#[derive(Debug, Clone, PartialEq)]
struct Link {
    /// For each variable: its index among the independent ones, if independent.
    indep: Vec<Option<usize>>,
    /// Number of independent variables.
    m0: usize,
    /// Scaled link matrix rows: for each variable, (independent index, L_ik·S_k/S_i).
    rows: Vec<Vec<(usize, f64)>>,
}

/// Why a set of coefficients could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Failure {
    /// The intermediates' balance has no unique steady state with these elasticities.
    Singular,
    /// A long route whose steps link intermediates far apart in route order (too wide a band to solve quickly).
    TooWide,
}

impl Model {
    /// Builds the model from raw parts: per route step its intermediates
    /// (variable index, signed coefficient as run), turns and dG'/RT (< 0),
    /// and each variable's concentration (for conserved moieties). None when
    /// a step has dG'/RT ≥ 0 or is not finite.
    pub fn from_parts(
        vars: Vec<usize>,
        conc: &[f64],
        terms: Vec<Vec<(usize, f64)>>,
        times: Vec<f64>,
        g: &[f64],
    ) -> Option<Model> {
        if g.iter().any(|&x| x.is_nan() || x >= 0.0) || times.len() != terms.len() {
            return None;
        }
        // 1 − e^g computed without cancellation; a = 1/(1 − e^g), b = e^g/(1 − e^g) = 1/(e^{−g} − 1).
        let a: Vec<f64> = g.iter().map(|&x| 1.0 / -x.exp_m1()).collect();
        let b: Vec<f64> = g.iter().map(|&x| 1.0 / (-x).exp_m1()).collect();
        let chain = is_chain(&terms, vars.len());
        // Conserved totals are found for routes up to DENSE_MAX intermediates;
        // a longer route is solved as it is, and a conserved total shows up
        // as a singular system.
        let link = if chain || vars.len() > DENSE_MAX {
            None
        } else {
            Some(link(&terms, conc, vars.len()))
        };
        Some(Model {
            vars,
            terms,
            a,
            b,
            times,
            chain,
            link,
        })
    }

    /// Number of route steps.
    pub fn len(&self) -> usize {
        self.terms.len()
    }

    /// True when the route has no steps.
    pub fn is_empty(&self) -> bool {
        self.terms.is_empty()
    }

    /// True when the route is a simple chain (closed form, O(n)).
    pub fn is_chain(&self) -> bool {
        self.chain
    }

    /// Number of independent intermediates (the size of the matrix method's system).
    pub fn independent(&self) -> usize {
        self.link.as_ref().map_or(self.vars.len(), |l| l.m0)
    }

    /// Scaled elasticity of route step `k` to each of its intermediates
    /// (compound index, value) under saturation (θ_S, θ_P); (0, 0) is mass action.
    pub fn elasticities(&self, k: usize, sat: (f64, f64)) -> Vec<(usize, f64)> {
        self.terms[k]
            .iter()
            .map(|&(v, nu)| (self.vars[v], self.elasticity(k, nu, sat)))
            .collect()
    }

    fn elasticity(&self, k: usize, nu: f64, (ts, tp): (f64, f64)) -> f64 {
        if nu < 0.0 {
            -nu * (self.a[k] - ts)
        } else {
            -nu * (self.b[k] + tp)
        }
    }

    /// Scaled flux control coefficients of the route steps over the route's
    /// flux, at mass action (`sat` None) or with saturation (θ_S, θ_P) per step.
    pub fn coefficients(&self, sat: Option<&[(f64, f64)]>) -> Result<Vec<f64>, Failure> {
        let c = if self.chain {
            self.chain_coefficients(sat)
        } else {
            self.matrix_coefficients(sat)?
        };
        // A step within a rounding error of equilibrium makes an elasticity
        // overflow: no number can be given for it.
        if c.iter().all(|x| x.is_finite()) {
            Ok(c)
        } else {
            Err(Failure::Singular)
        }
    }

    /// The matrix method whatever the route's shape (for checking the closed
    /// form; dense up to `DENSE_MAX` intermediates, banded above).
    pub fn matrix_method(&self, sat: Option<&[(f64, f64)]>) -> Result<Vec<f64>, Failure> {
        self.matrix_coefficients(sat)
    }

    fn matrix_coefficients(&self, sat: Option<&[(f64, f64)]>) -> Result<Vec<f64>, Failure> {
        let m0 = self.link.as_ref().map_or(self.vars.len(), |l| l.m0);
        self.matrix_coefficients_by(sat, m0 <= DENSE_MAX)
    }

    /// Chain: C_k ∝ Π_{j<k} (−ε_{j,product}) · Π_{j>k} ε_{j,substrate}, in logs.
    fn chain_coefficients(&self, sat: Option<&[(f64, f64)]>) -> Vec<f64> {
        let n = self.terms.len();
        let s = |k: usize| sat.map_or((0.0, 0.0), |v| v[k]);
        // ln(−ε of step j to its product) for j < n−1; ln(ε of step j to its substrate) for j ≥ 1.
        let mut log_n = vec![0.0; n];
        let mut acc = 0.0;
        for (k, slot) in log_n.iter_mut().enumerate() {
            *slot = acc;
            if k + 1 < n {
                let nu = self.terms[k]
                    .iter()
                    .find(|t| t.1 > 0.0)
                    .map_or(0.0, |t| t.1);
                acc += (-self.elasticity(k, nu, s(k))).ln();
            }
        }
        let mut acc = 0.0;
        for k in (0..n).rev() {
            log_n[k] += acc;
            if k > 0 {
                let nu = self.terms[k]
                    .iter()
                    .find(|t| t.1 < 0.0)
                    .map_or(0.0, |t| t.1);
                acc += self.elasticity(k, nu, s(k)).ln();
            }
        }
        let max = log_n.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let mut c: Vec<f64> = log_n.iter().map(|&l| (l - max).exp()).collect();
        let sum: f64 = c.iter().sum();
        for x in &mut c {
            *x /= sum;
        }
        c
    }

    /// Reder's matrix method, row of the route's first step:
    /// c = e_r − T N_Rᵀ z with (N_R T ε L̃)ᵀ z = (ε L̃)ᵀ e_r.
    fn matrix_coefficients_by(
        &self,
        sat: Option<&[(f64, f64)]>,
        dense: bool,
    ) -> Result<Vec<f64>, Failure> {
        let n = self.terms.len();
        let identity;
        let link = match &self.link {
            Some(l) => l,
            None => {
                identity = Link {
                    indep: (0..self.vars.len()).map(Some).collect(),
                    m0: self.vars.len(),
                    rows: (0..self.vars.len()).map(|i| vec![(i, 1.0)]).collect(),
                };
                &identity
            }
        };
        let m0 = link.m0;
        let mut out = vec![0.0; n];
        if n == 0 {
            return Ok(out);
        }
        out[0] = 1.0;
        if m0 == 0 {
            return Ok(out);
        }
        let s = |k: usize| sat.map_or((0.0, 0.0), |v| v[k]);
        // Rows of (N_R T ε L̃)ᵀ as (column, value) lists, and u = (ε L̃)ᵀ e_r;
        // each step's row of ε L̃ is accumulated in a scratch row.
        let mut at: Vec<Vec<(usize, f64)>> = if dense {
            Vec::new()
        } else {
            vec![Vec::new(); m0]
        };
        let mut dense_at = if dense {
            vec![0.0; m0 * m0]
        } else {
            Vec::new()
        };
        let mut u = vec![0.0; m0];
        let mut scratch = vec![0.0; m0];
        let mut mark = vec![false; m0];
        let mut touched: Vec<usize> = Vec::new();
        for j in 0..n {
            touched.clear();
            for &(v, nu) in &self.terms[j] {
                let e = self.elasticity(j, nu, s(j));
                for &(l, w) in &link.rows[v] {
                    if !mark[l] {
                        mark[l] = true;
                        touched.push(l);
                    }
                    scratch[l] += e * w;
                }
            }
            if j == 0 {
                for &l in &touched {
                    u[l] = scratch[l];
                }
            }
            let t = self.times[j];
            for &(v, nu) in &self.terms[j] {
                if let Some(k) = link.indep[v] {
                    for &l in &touched {
                        if dense {
                            dense_at[l * m0 + k] += nu * t * scratch[l];
                        } else {
                            at[l].push((k, nu * t * scratch[l]));
                        }
                    }
                }
            }
            for &l in &touched {
                scratch[l] = 0.0;
                mark[l] = false;
            }
        }
        let z = if dense {
            solve(dense_at, m0, u)
        } else {
            band_solve(at, u)?
        }
        .ok_or(Failure::Singular)?;
        for (i, c) in out.iter_mut().enumerate() {
            let mut acc = 0.0;
            for &(v, nu) in &self.terms[i] {
                if let Some(k) = link.indep[v] {
                    acc += z[k] * nu;
                }
            }
            *c -= self.times[i] * acc;
        }
        let sum: f64 = out.iter().sum();
        if out.iter().all(|x| x.is_finite()) && (sum - 1.0).abs() < 1e-6 {
            Ok(out)
        } else {
            Err(Failure::Singular)
        }
    }

    /// The 5th and 95th percentiles of each coefficient over `draws`
    /// saturation draws (θ_S, θ_P uniform on θ_S + θ_P < 1 per step, ChaCha8
    /// seeded with `seed`). Draws whose system is singular are left out; None
    /// when none is left.
    pub fn ranges(&self, draws: usize, seed: u64) -> Option<Vec<(f64, f64)>> {
        let mut job = RangeJob::new(self.len(), draws, seed);
        job.run(self, draws);
        job.result()
    }
}

/// A range computation that can run in parts (the explorer runs it between
/// keys); the result is the same however it is split.
#[derive(Debug, Clone)]
pub struct RangeJob {
    rng: ChaCha8Rng,
    sat: Vec<(f64, f64)>,
    values: Vec<Vec<f64>>,
    done: usize,
    total: usize,
}

impl RangeJob {
    /// A job of `draws` draws for a route of `steps` steps.
    pub fn new(steps: usize, draws: usize, seed: u64) -> Self {
        RangeJob {
            rng: ChaCha8Rng::seed_from_u64(seed),
            sat: vec![(0.0, 0.0); steps],
            values: (0..steps).map(|_| Vec::with_capacity(draws)).collect(),
            done: 0,
            total: draws,
        }
    }

    /// Runs up to `budget` more draws; true when all are done.
    pub fn run(&mut self, model: &Model, budget: usize) -> bool {
        let end = self.total.min(self.done.saturating_add(budget));
        while self.done < end {
            for s in self.sat.iter_mut() {
                let (x, y) = (unit(&mut self.rng), unit(&mut self.rng));
                *s = if x + y < 1.0 {
                    (x, y)
                } else {
                    (1.0 - x, 1.0 - y)
                };
            }
            if let Ok(c) = model.coefficients(Some(&self.sat)) {
                for (v, x) in self.values.iter_mut().zip(c) {
                    v.push(x);
                }
            }
            self.done += 1;
        }
        self.finished()
    }

    /// True when every draw is done.
    pub fn finished(&self) -> bool {
        self.done >= self.total
    }

    /// The percentiles, once finished; None before, or when every draw was singular.
    pub fn result(&mut self) -> Option<Vec<(f64, f64)>> {
        if !self.finished() || self.values.first().is_none_or(|v| v.is_empty()) {
            return None;
        }
        let (lo, hi) = RANGE_PERCENTILES;
        Some(
            self.values
                .iter_mut()
                .map(|v| {
                    v.sort_by(f64::total_cmp);
                    (quantile(v, lo), quantile(v, hi))
                })
                .collect(),
        )
    }
}

/// A uniform number in [0, 1) from the top 53 bits of one 64-bit output.
fn unit(rng: &mut ChaCha8Rng) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

/// Quantile of sorted values by linear interpolation between order statistics (h = (n − 1)p).
fn quantile(sorted: &[f64], p: f64) -> f64 {
    let h = (sorted.len() - 1) as f64 * p;
    let i = h.floor() as usize;
    let f = h - i as f64;
    match sorted.get(i + 1) {
        Some(&next) => sorted[i] + f * (next - sorted[i]),
        None => sorted[i],
    }
}

/// A simple chain: step 0 makes variable v0 only, step k uses v_{k−1} and
/// makes v_k, the last step uses v_{n−2} only, and there are n − 1 variables.
fn is_chain(terms: &[Terms], nvars: usize) -> bool {
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
fn link(terms: &[Terms], conc: &[f64], nvars: usize) -> Link {
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
fn solve(a: Vec<f64>, n: usize, b: Vec<f64>) -> Option<Vec<f64>> {
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
fn band_solve(rows: Vec<Vec<(usize, f64)>>, mut b: Vec<f64>) -> Result<Option<Vec<f64>>, Failure> {
    let n = rows.len();
    let (mut p, mut q) = (0usize, 0usize);
    let mut win: Vec<(usize, Vec<f64>)> = Vec::with_capacity(n);
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

/// LU with partial pivoting and the two triangular solves.
fn lu_solve(mut a: Vec<f64>, n: usize, mut b: Vec<f64>) -> Option<Vec<f64>> {
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

/// The flux control estimate of one analysis.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Estimate {
    /// Per route step, its scaled flux control coefficient over the route's flux at mass action; None when there is no estimate.
    pub coefficients: Option<Vec<f64>>,
    /// Per route step, the 5–95 % range over sampled saturation; None until computed or when none can be given.
    pub ranges: Option<Vec<(f64, f64)>>,
    /// Saturation draws asked for `ranges` (0 while not asked).
    pub draws: usize,
    /// Why no range is given although it was asked for.
    pub range_note: Option<String>,
    /// Why there is no estimate or no range, and where the estimate and the verdicts disagree.
    pub notes: Vec<String>,
    /// The model, kept for the range and the elasticities.
    pub model: Option<Model>,
}

impl Estimate {
    /// The coefficient of the route step at `position`.
    pub fn coefficient(&self, position: usize) -> Option<f64> {
        self.coefficients
            .as_ref()
            .and_then(|c| c.get(position).copied())
    }
    /// The 5–95 % range of the route step at `position`.
    pub fn range(&self, position: usize) -> Option<(f64, f64)> {
        self.ranges.as_ref().and_then(|c| c.get(position).copied())
    }
    /// True when an estimate exists and its range has not been asked for yet.
    pub fn range_pending(&self) -> bool {
        self.coefficients.is_some() && self.draws == 0
    }
    /// True when the range has been asked for and is not there yet.
    pub fn range_computing(&self) -> bool {
        self.coefficients.is_some()
            && self.draws > 0
            && self.ranges.is_none()
            && self.range_note.is_none()
    }
    /// Mass-action elasticities of the route step at `position` to its intermediates (compound, value).
    pub fn elasticities(&self, position: usize) -> Vec<(usize, f64)> {
        match (&self.model, &self.coefficients) {
            (Some(m), Some(_)) if position < m.len() => m.elasticities(position, (0.0, 0.0)),
            _ => Vec::new(),
        }
    }
    /// Position of the route step with the largest coefficient.
    pub fn top(&self) -> Option<usize> {
        let c = self.coefficients.as_ref()?;
        (0..c.len()).max_by(|&i, &j| c[i].total_cmp(&c[j]))
    }
}

/// The estimate for an analysed route at these concentrations (mol/L,
/// indexed like the compounds): coefficients and notes; the range is added
/// by `add_ranges`.
pub fn estimate(p: &Pathway, a: &Analysis, conc: &[f64]) -> Estimate {
    let mut est = Estimate::default();
    let up: Vec<&str> = a
        .steps
        .iter()
        .filter(|s| s.dg.is_nan() || s.dg >= 0.0)
        .map(|s| p.steps[s.step].id.as_str())
        .collect();
    if !up.is_empty() {
        let has = if up.len() == 1 { "has" } else { "have" };
        est.notes.push(format!(
            "no flux control estimate: {} {has} dG' ≥ 0 as run, so the route has no forward steady state at these concentrations to estimate control in.",
            id_list(&up)
        ));
        return est;
    }
    let mut var_of: Vec<Option<usize>> = vec![None; p.compounds.len()];
    let mut vars: Vec<usize> = Vec::new();
    let mut terms: Vec<Terms> = Vec::with_capacity(a.steps.len());
    for s in &a.steps {
        let mut t: Terms = Vec::new();
        for &(c, nu) in &p.steps[s.step].stoich {
            if a.roles[c] != Role::Intermediate || nu == 0.0 {
                continue;
            }
            let v = *var_of[c].get_or_insert_with(|| {
                vars.push(c);
                vars.len() - 1
            });
            match t.iter_mut().find(|x| x.0 == v) {
                Some(x) => x.1 += nu * s.sign,
                None => t.push((v, nu * s.sign)),
            }
        }
        t.retain(|x| x.1 != 0.0);
        terms.push(t);
    }
    let var_conc: Vec<f64> = vars.iter().map(|&c| conc[c]).collect();
    let times: Vec<f64> = a.steps.iter().map(|s| s.times).collect();
    let g: Vec<f64> = a.steps.iter().map(|s| s.dg / a.rt).collect();
    let Some(model) = Model::from_parts(vars, &var_conc, terms, times, &g) else {
        return est;
    };
    match model.coefficients(None) {
        Ok(c) => est.coefficients = Some(c),
        Err(Failure::Singular) => {
            est.notes.push("no flux control estimate: the balance of the intermediates has no unique steady state with these elasticities (a conserved total the route cannot change, or a part of the route cut off from the rest).".into());
            return est;
        }
        Err(Failure::TooWide) => {
            est.notes.push(format!(
                "no flux control estimate: the route has {} intermediates and its steps link intermediates far apart in route order, too many to solve on every change; list the steps so that each one's intermediates are near each other in the route.",
                model.vars.len()
            ));
            return est;
        }
    }
    est.model = Some(model);
    if let Some(s) = disagreement(p, a, &est) {
        est.notes.push(s);
    }
    est
}

/// Ids joined by commas, at most six and then how many more.
fn id_list(ids: &[&str]) -> String {
    if ids.len() > 6 {
        format!("{} and {} more", ids[..6].join(", "), ids.len() - 6)
    } else {
        ids.join(", ")
    }
}

/// One sentence when the verdicts and the estimate disagree: the control
/// point carries less than half of the largest coefficient, or a step with
/// no verdict carries the most.
fn disagreement(p: &Pathway, a: &Analysis, est: &Estimate) -> Option<String> {
    let top = est.top()?;
    let ct = est.coefficient(top)?;
    let id = |k: usize| p.steps[a.steps[k].step].id.as_str();
    let point = a
        .control
        .iter()
        .find(|v| v.kind == VerdictKind::Prime)
        .map(|v| v.position);
    let top_has_verdict = a.control.iter().any(|v| v.position == top);
    match point {
        Some(pp) if pp == top => None,
        Some(pp) => {
            let cp = est.coefficient(pp)?;
            if cp < ct / 2.0 {
                Some(format!(
                    "The verdict and the estimate disagree: the control point {} carries {:.3} of the flux control by the thermodynamic estimate, while {}{} carries the most ({:.3}).",
                    id(pp),
                    cp,
                    id(top),
                    if top_has_verdict {
                        ""
                    } else {
                        ", a step without a verdict,"
                    },
                    ct
                ))
            } else if !top_has_verdict {
                Some(format!(
                    "The verdict and the estimate differ: {}, a step without a verdict, carries the most flux control by the thermodynamic estimate ({:.3}; the control point {} carries {:.3}).",
                    id(top),
                    ct,
                    id(pp),
                    cp
                ))
            } else {
                None
            }
        }
        None if !top_has_verdict => Some(format!(
            "No step is the control point, and {}, a step without a verdict, carries the most flux control by the thermodynamic estimate ({:.3}).",
            id(top),
            ct
        )),
        None => None,
    }
}

/// Computes the 5–95 % range of each coefficient over `draws` saturation
/// draws (fixed seed) into the analysis' estimate; a note says when the
/// route is too large for it.
pub fn add_ranges(a: &mut Analysis, draws: usize) {
    if let Some(mut job) = start_ranges(a, draws) {
        let total = job.total;
        if let Some(m) = &a.control_estimate.model {
            job.run(m, total);
        }
        finish_ranges(a, job);
    }
}

/// Starts the range of the analysis' estimate as a job that can run in
/// parts; None when there is nothing to compute (no estimate, the range is
/// already there, or the route is too large for it: then a note says so).
pub fn start_ranges(a: &mut Analysis, draws: usize) -> Option<RangeJob> {
    let draws = draws.max(1);
    let est = &mut a.control_estimate;
    if est.coefficients.is_none() || est.draws == draws {
        return None;
    }
    let model = est.model.as_ref()?;
    est.ranges = None;
    let cap = RANGE_MAX_VALUES / model.len().max(1);
    let used = draws.min(cap);
    est.draws = used.max(1);
    let note = if !model.is_chain() && model.independent() > RANGE_DENSE_MAX {
        Some(format!(
            "no range for the flux control estimate: the route is not a simple chain and has {} independent intermediates; the range is computed for chains and for other routes up to {RANGE_DENSE_MAX}.",
            model.independent()
        ))
    } else if used < draws.min(RANGE_MIN_DRAWS) {
        Some(format!(
            "no range for the flux control estimate: the route has {} steps, and even {} draws would be more than {RANGE_MAX_VALUES} stored values.",
            model.len(),
            draws.min(RANGE_MIN_DRAWS)
        ))
    } else {
        if used < draws {
            a.notes.push(format!(
                "the range of the flux control estimate comes from {used} draws, not {draws}: {} route steps × {draws} draws would be more than {RANGE_MAX_VALUES} stored values, and with fewer draws its ends move more between seeds.",
                model.len()
            ));
        }
        None
    };
    let est = &mut a.control_estimate;
    match note {
        Some(n) => {
            est.range_note = Some(n.clone());
            a.notes.push(n);
            None
        }
        None => est
            .model
            .as_ref()
            .map(|m| RangeJob::new(m.len(), used, SEED)),
    }
}

/// Stores a finished job's range in the analysis' estimate.
pub fn finish_ranges(a: &mut Analysis, mut job: RangeJob) {
    let est = &mut a.control_estimate;
    est.ranges = job.result();
    if est.ranges.is_none() {
        let n = "no range for the flux control estimate: every saturation draw left the intermediates without a unique steady state.".to_string();
        est.range_note = Some(n.clone());
        a.notes.push(n);
    }
}

/// Lines for a step's detail: the estimate and its range, the step's
/// mass-action elasticities, and (on a chain) how its share compares with
/// the next step's, which is what the elasticities decide.
pub fn explain(p: &Pathway, a: &Analysis, position: usize) -> Vec<String> {
    let est = &a.control_estimate;
    let Some(c) = est.coefficient(position) else {
        return vec!["flux control (estimate): none (some dG' ≥ 0)".into()];
    };
    let range = match est.range(position) {
        Some((lo, hi)) => format!(", 5–95 % {lo:.3}–{hi:.3}"),
        None if est.range_pending() || est.range_computing() => ", range: computing…".into(),
        None => String::new(),
    };
    let mut out = vec![format!("flux control (estimate): {c:.3}{range}")];
    let id = |c: usize| p.compounds[c].id.as_str();
    let el = est.elasticities(position);
    if !el.is_empty() {
        let parts: Vec<String> = el
            .iter()
            .map(|&(c, e)| format!("{} {e:+.3}", id(c)))
            .collect();
        out.push(format!("elasticities (mass action): {}", parts.join(", ")));
    }
    if let Some(m) = &est.model
        && m.is_chain()
        && position + 1 < a.steps.len()
        && let (Some(&(prod, ep)), Some(&(_, es))) = (
            el.iter().find(|x| x.1 <= 0.0),
            est.elasticities(position + 1).iter().find(|x| x.1 > 0.0),
        )
        && let Some(next) = est.coefficient(position + 1)
    {
        let nid = &p.steps[a.steps[position + 1].step].id;
        let ratio = if next > 0.0 { c / next } else { f64::INFINITY };
        out.push(format!(
            "against {nid} after it: {:.3} / {:.3} = {} times its share ({nid}'s elasticity to {} over this step's, negated); a step that hardly feels its product keeps control from the steps after it",
            es,
            -ep,
            if ratio.is_finite() { format!("{ratio:.3}") } else { "infinitely many".into() },
            id(prod)
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The worked case of science.md §7 [C]: X0 -> S1 -> S2 -> X3 with
    /// Γ/K' = 13/28, 11/26, 7/22 gives C^J = (4/7, 2/7, 1/7).
    fn worked() -> Model {
        let g = [
            (13.0f64 / 28.0).ln(),
            (11.0f64 / 26.0).ln(),
            (7.0f64 / 22.0).ln(),
        ];
        let terms = vec![vec![(0, 1.0)], vec![(0, -1.0), (1, 1.0)], vec![(1, -1.0)]];
        Model::from_parts(
            vec![10, 11],
            &[13.0 / 14.0, 11.0 / 14.0],
            terms,
            vec![1.0; 3],
            &g,
        )
        .unwrap()
    }

    #[test]
    fn worked_case_by_both_methods() {
        let m = worked();
        assert!(m.is_chain());
        for c in [
            m.coefficients(None).unwrap(),
            m.matrix_method(None).unwrap(),
        ] {
            for (x, want) in c.iter().zip([4.0 / 7.0, 2.0 / 7.0, 1.0 / 7.0]) {
                assert!((x - want).abs() < 1e-12, "{c:?}");
            }
        }
    }

    #[test]
    fn a_conserved_pair_uses_the_link_matrix() {
        // s1: X + c -> A + d, s2: A + d -> Y + c, with c and d on the route
        // only: A + c and c + d are conserved, one independent variable.
        let terms = vec![
            vec![(0, 1.0), (1, -1.0), (2, 1.0)],
            vec![(0, -1.0), (1, 1.0), (2, -1.0)],
        ];
        let m = Model::from_parts(
            vec![0, 1, 2],
            &[1e-3, 2e-3, 5e-4],
            terms,
            vec![1.0, 1.0],
            &[-1.0, -2.0],
        )
        .unwrap();
        assert!(!m.is_chain());
        assert_eq!(m.independent(), 1);
        let c = m.coefficients(None).unwrap();
        assert!((c[0] + c[1] - 1.0).abs() < 1e-12);
        assert!(c.iter().all(|x| (0.0..=1.0).contains(x)), "{c:?}");
    }

    #[test]
    fn solve_refuses_singular_and_nearly_singular_systems() {
        // x + 2y = 5, 3x + 4y = 6 -> x = -4, y = 4.5 (by hand).
        let x = solve(vec![1.0, 2.0, 3.0, 4.0], 2, vec![5.0, 6.0]).unwrap();
        assert!((x[0] + 4.0).abs() < 1e-12 && (x[1] - 4.5).abs() < 1e-12);
        assert!(solve(vec![1.0, 1.0, 1.0, 1.0], 2, vec![1.0, 1.0]).is_none());
        assert!(solve(vec![1.0, 1.0, 1.0, 1.0 + 1e-15], 2, vec![1.0, 0.0]).is_none());
        assert_eq!(solve(vec![2.0], 1, vec![0.0]), Some(vec![0.0]));
    }

    /// k blocks of a split in the manner of an aldolase and an isomerase:
    /// c_i -> e_i + f_i, e_i -> f_i, 2 f_i -> c_{i+1} (no conserved total);
    /// invented dG'/RT between −0.1 and −6.
    fn split_chain(k: usize) -> Model {
        let mut terms: Vec<Vec<(usize, f64)>> = Vec::new();
        // Variables: c_i = 3i − 1 (i ≥ 1), e_i = 3i, f_i = 3i + 1.
        let (c, e, f) = (|i: usize| 3 * i - 1, |i: usize| 3 * i, |i: usize| 3 * i + 1);
        for i in 0..k {
            let mut split = vec![(e(i), 1.0), (f(i), 1.0)];
            if i > 0 {
                split.push((c(i), -1.0));
            }
            terms.push(split);
            terms.push(vec![(e(i), -1.0), (f(i), 1.0)]);
            let mut join = vec![(f(i), -2.0)];
            if i + 1 < k {
                join.push((c(i + 1), 1.0));
            }
            terms.push(join);
        }
        let nv = 3 * k - 1;
        let n = terms.len();
        let g: Vec<f64> = (0..n).map(|j| -0.1 - (j * 37 % 60) as f64 / 10.0).collect();
        Model::from_parts((0..nv).collect(), &vec![1e-3; nv], terms, vec![1.0; n], &g).unwrap()
    }

    #[test]
    fn the_banded_solve_agrees_with_the_dense_one_and_the_closed_form() {
        // A long route with splits, past DENSE_MAX: banded by default.
        let m = split_chain(120);
        assert!(!m.is_chain() && m.vars.len() > DENSE_MAX);
        let sat: Vec<(f64, f64)> = (0..m.len())
            .map(|j| ((j % 7) as f64 / 10.0, (j % 3) as f64 / 10.0))
            .collect();
        for s in [None, Some(sat.as_slice())] {
            let band = m.coefficients(s).unwrap();
            let dense = m.matrix_coefficients_by(s, true).unwrap();
            assert!((band.iter().sum::<f64>() - 1.0).abs() < 1e-9);
            for (x, y) in band.iter().zip(&dense) {
                assert!((x - y).abs() < 1e-10, "{x} {y}");
            }
        }
        // A long chain: the banded matrix method against the closed form.
        let n = 1500;
        let terms: Vec<Vec<(usize, f64)>> = (0..n)
            .map(|k| {
                let mut t = Vec::new();
                if k > 0 {
                    t.push((k - 1, -1.0));
                }
                if k + 1 < n {
                    t.push((k, if k % 250 == 0 { 2.0 } else { 1.0 }));
                }
                t
            })
            .collect();
        let g: Vec<f64> = (0..n).map(|j| -0.2 - (j * 13 % 40) as f64 / 10.0).collect();
        // Turns double after each step that makes two.
        let times: Vec<f64> = (0..n)
            .map(|k| 2f64.powi((0..k).filter(|j| j % 250 == 0).count() as i32))
            .collect();
        let m =
            Model::from_parts((0..n - 1).collect(), &vec![1e-3; n - 1], terms, times, &g).unwrap();
        let closed = m.coefficients(None).unwrap();
        let band = m.matrix_method(None).unwrap();
        for (x, y) in closed.iter().zip(&band) {
            assert!((x - y).abs() < 1e-10, "{x} {y}");
        }
    }

    #[test]
    fn quantile_interpolates_between_order_statistics() {
        let v: Vec<f64> = (0..=100).map(f64::from).collect();
        assert_eq!(quantile(&v, 0.05), 5.0);
        assert_eq!(quantile(&v, 0.95), 95.0);
        assert_eq!(quantile(&[1.0, 2.0], 0.5), 1.5);
        assert_eq!(quantile(&[3.0], 0.95), 3.0);
    }

    #[test]
    fn ranges_are_reproducible_and_hold_the_coefficients_between_zero_and_one() {
        let m = worked();
        let r1 = m.ranges(500, SEED).unwrap();
        let r2 = m.ranges(500, SEED).unwrap();
        assert_eq!(r1, r2);
        for &(lo, hi) in &r1 {
            assert!(0.0 <= lo && lo <= hi && hi <= 1.0, "{r1:?}");
        }
        // Another seed gives other numbers (the seed is used).
        assert_ne!(m.ranges(500, SEED + 1).unwrap(), r1);
    }

    #[test]
    fn a_step_a_rounding_error_from_equilibrium_gives_no_numbers() {
        // dG'/RT = −1e-320 makes 1/(1 − e^{dG'/RT}) overflow.
        let terms = vec![vec![(0, 1.0)], vec![(0, -1.0)]];
        let m = Model::from_parts(vec![0], &[1e-3], terms, vec![1.0; 2], &[-1e-320, -1.0]).unwrap();
        assert_eq!(m.coefficients(None), Err(Failure::Singular));
    }

    #[test]
    fn a_step_at_or_above_equilibrium_has_no_model() {
        let terms = vec![vec![(0, 1.0)], vec![(0, -1.0)]];
        assert!(
            Model::from_parts(vec![0], &[1e-3], terms.clone(), vec![1.0; 2], &[-1.0, 0.0])
                .is_none()
        );
        assert!(Model::from_parts(vec![0], &[1e-3], terms, vec![1.0; 2], &[-1.0, 0.5]).is_none());
    }
}
