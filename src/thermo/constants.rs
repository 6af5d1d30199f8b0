//! Physical constants, RT, K' <-> dG'°, the temperature correction and the
//! Debye–Hückel coefficient: the plain relations every other part uses.

/// Gas constant, J/(mol K); exact in the 2019 SI (CODATA 2018).
pub const R: f64 = 8.314462618;
/// Faraday constant, C/mol; exact in the 2019 SI (CODATA 2018).
pub const F: f64 = 96485.33212;
/// B in the extended Debye–Hückel term, kg^1/2 mol^-1/2 (Alberty 2003).
pub const DEBYE_B: f64 = 1.6;

/// RT in J/mol at temperature `t` (K).
pub fn rt(t: f64) -> f64 {
    R * t
}

/// dG'° (J/mol) from an apparent equilibrium constant at temperature `t`.
pub fn dg0_from_keq(keq: f64, t: f64) -> f64 {
    -rt(t) * keq.ln()
}

/// K' from dG'° (J/mol) at temperature `t`.
pub fn keq_from_dg0(dg0: f64, t: f64) -> f64 {
    (-dg0 / rt(t)).exp()
}

/// dG'° for a redox pair: −n F ΔE'° (J/mol), ΔE'° = E'°(acceptor) − E'°(donor) in V.
pub fn dg0_from_potentials(n: f64, e_acceptor: f64, e_donor: f64) -> f64 {
    -n * F * (e_acceptor - e_donor)
}

/// Gibbs–Helmholtz with constant dH'°: dG'° moved from `t1` to `t2`.
pub fn gibbs_helmholtz(dg0_t1: f64, dh0: f64, t1: f64, t2: f64) -> f64 {
    dg0_t1 * t2 / t1 + dh0 * (1.0 - t2 / t1)
}

/// Debye–Hückel α(T) from the quadratic fit of science.md §4 (T in K).
pub fn alpha(t: f64) -> f64 {
    1.10708 - 1.54508e-3 * t + 5.95584e-6 * t * t
}

/// RTα in J/mol at temperature `t`.
pub fn rt_alpha(t: f64) -> f64 {
    rt(t) * alpha(t)
}
