//! The live driving-force optimisation of the explorer and the rounding of
//! its optimal concentrations.

use crate::analysis::Prepared;
use crate::analysis::mdf::{self, Mdf};
use crate::model::units;
use crate::scenario::State;
/// Routes longer than this are not optimised on every edit (the optimisation
/// would no longer fit in a keystroke's time budget); the screen says so.
pub const LIVE_MDF_MAX_STEPS: usize = 200;

/// The driving-force optimisation for the current scenario.
#[derive(Debug, Clone, PartialEq)]
pub enum LiveMdf {
    /// Solved.
    Solved(Box<Mdf>),
    /// Could not be run; the message says why.
    Failed(String),
    /// Not run on every edit: the route has this many steps.
    Skipped(usize),
}

impl LiveMdf {
    /// Solves for the scenario unless the route is too long to do so live.
    pub fn solve(prep: &Prepared, state: &State, route_steps: usize) -> LiveMdf {
        if route_steps > LIVE_MDF_MAX_STEPS {
            return LiveMdf::Skipped(route_steps);
        }
        match mdf::solve(prep, state) {
            Ok(m) => LiveMdf::Solved(Box::new(m)),
            Err(e) => LiveMdf::Failed(e.to_string()),
        }
    }
}

/// Rounds a concentration (mol/L) to three significant figures in the unit
/// it is shown and saved in (M, mM, uM, nM, pM), read back through the
/// units parser so that saving writes exactly those three figures. Kept
/// inside [lo, hi] by moving one step in the last figure towards the inside
/// when rounding to nearest would leave it; unchanged when that fails too.
pub fn round_conc_sig3(x: f64, lo: f64, hi: f64) -> f64 {
    if !(x.is_finite() && x > 0.0) {
        return x;
    }
    let text = units::format_conc(x, true);
    let read = |t: &str| units::parse(t, units::Kind::Concentration).ok();
    let inside = |v: f64| v >= lo && v <= hi;
    let Some(v) = read(&text) else { return x };
    if inside(v) {
        return v;
    }
    let Some((num, unit)) = text.split_once(' ') else {
        return x;
    };
    let Ok(n) = num.parse::<f64>() else { return x };
    let step = 10f64.powi(n.abs().log10().floor() as i32 - 2);
    let n2 = if v > hi { n - step } else { n + step };
    match read(&format!("{} {unit}", units::sig3(n2))) {
        Some(v2) if inside(v2) => v2,
        _ => x,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn optimal_values_round_to_three_figures_inside_their_bounds() {
        let mm = |t: &str| units::parse(t, units::Kind::Concentration).unwrap();
        assert_eq!(round_conc_sig3(2.2345e-3, 1e-6, 0.02), mm("2.23 mM"));
        assert_eq!(round_conc_sig3(6.7349e-5, 1e-6, 0.02), mm("67.3 uM"));
        // At an upper bound that has more figures: one step down, not above it.
        assert_eq!(round_conc_sig3(1.2399e-3, 1e-6, 1.2399e-3), mm("1.23 mM"));
        assert_eq!(round_conc_sig3(1.0051e-6, 1.0051e-6, 0.02), mm("1.01 uM"));
    }
}
