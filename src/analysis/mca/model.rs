//! The linearised route: per-step elasticities from dG' (and saturation),
//! the link matrix of conserved totals, and the control coefficients of one
//! draw by the closed form, the dense or the banded matrix method.

use super::limits::*;
use super::solve::{band_solve, is_chain, link, solve};

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
    pub(super) fn matrix_coefficients_by(
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
        let (system, u) = self.reduced_system(link, sat, dense);
        let z = match system {
            System::Dense(a) => solve(a, m0, u),
            System::Band(rows) => band_solve(rows, u)?,
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

    /// The matrix (N_R T ε L̃)ᵀ, dense or as (column, value) rows for the
    /// banded solver, and u = (ε L̃)ᵀ e_r; each step's row of ε L̃ is
    /// accumulated in a scratch row.
    fn reduced_system(
        &self,
        link: &Link,
        sat: Option<&[(f64, f64)]>,
        dense: bool,
    ) -> (System, Vec<f64>) {
        let m0 = link.m0;
        let s = |k: usize| sat.map_or((0.0, 0.0), |v| v[k]);
        let mut system = if dense {
            System::Dense(vec![0.0; m0 * m0])
        } else {
            System::Band(vec![Vec::new(); m0])
        };
        let mut u = vec![0.0; m0];
        let mut scratch = vec![0.0; m0];
        let mut mark = vec![false; m0];
        let mut touched: Vec<usize> = Vec::new();
        for j in 0..self.terms.len() {
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
                        match &mut system {
                            System::Dense(a) => a[l * m0 + k] += nu * t * scratch[l],
                            System::Band(rows) => rows[l].push((k, nu * t * scratch[l])),
                        }
                    }
                }
            }
            for &l in &touched {
                scratch[l] = 0.0;
                mark[l] = false;
            }
        }
        (system, u)
    }
}

/// The reduced system of the matrix method: dense (row-major, m0 × m0) or
/// rows of (column, value) pairs for the banded solver.
enum System {
    Dense(Vec<f64>),
    Band(Vec<Vec<(usize, f64)>>),
}
