//! What an analysis returns: per-step results, classes, groups, verdicts
//! and their reasons, and notes that carry energies. Types only; the
//! computations live in the files beside this one.

use super::mca;
use super::route::{Direction, Role};

/// How far a step sits from equilibrium.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Class {
    /// dG' at or below the `far` threshold.
    Far,
    /// Q within `near_factor` of K'.
    Near,
    /// dG' above RT ln near_factor: cannot carry forward flux alone.
    Uphill,
    /// Between near and far.
    Moderate,
}

impl Class {
    /// Name used in JSON and tables.
    pub fn as_str(self) -> &'static str {
        match self {
            Class::Far => "far",
            Class::Near => "near",
            Class::Uphill => "uphill",
            Class::Moderate => "moderate",
        }
    }
    /// Classifies a dG' (J/mol) with the file's thresholds at RT (J/mol).
    pub fn of(dg: f64, far: f64, near_factor: f64, rt: f64) -> Class {
        let near = rt * near_factor.ln();
        if dg <= far {
            Class::Far
        } else if dg.abs() <= near {
            Class::Near
        } else if dg > near {
            Class::Uphill
        } else {
            Class::Moderate
        }
    }
}

/// One compound's part in a step's RT ln Q.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Contribution {
    /// Compound index.
    pub compound: usize,
    /// Signed coefficient as the step runs.
    pub nu: f64,
    /// ν RT ln(c / 1 M), J/mol.
    pub energy: f64,
}

/// Results for one step as it runs on the route (or a side step as written).
#[derive(Debug, Clone, PartialEq)]
pub struct StepResult {
    /// Index into `Pathway::steps`.
    pub step: usize,
    /// +1 as written, −1 reversed.
    pub sign: f64,
    /// Turns per pass (1 for side steps).
    pub times: f64,
    /// For a bypass: the forward step it replaces.
    pub replaces: Option<usize>,
    /// dG'° at the scenario's conditions, as run, J/mol.
    pub dg0: f64,
    /// dG' per turn, J/mol.
    pub dg: f64,
    /// Standard deviation of dG', J/mol, when any uncertainty is given.
    pub dg_sd: Option<f64>,
    /// The largest part of the variance: None for dg0, Some(compound) for a concentration.
    pub sd_main: Option<Option<usize>>,
    /// ln Q.
    pub ln_q: f64,
    /// ln K' at the conditions.
    pub ln_k: f64,
    /// Class.
    pub class: Class,
    /// The class holds across the 95 % interval of dG'.
    pub class_sure: bool,
    /// Classes at the two ends of the 95 % interval (low dG', high dG').
    pub class_range: (Class, Class),
    /// Cumulative weighted dG' after this step (route steps), J/mol.
    pub cumulative: f64,
    /// Cumulative weighted dG'° after this step, J/mol.
    pub cumulative_dg0: f64,
    /// Part of the route's total drop (0 for steps that go up).
    pub share: f64,
    /// Each compound's part of RT ln Q.
    pub contributions: Vec<Contribution>,
    /// The standard energy was kept at the reference temperature (no dh0).
    pub kept_reference_dg0: bool,
    /// pH and ionic strength were applied through the reactant model (every
    /// reactant has charge and hydrogens); otherwise `protons` only.
    pub species: bool,
    /// A route step that, as run, has dG' > 0: it runs backward at these
    /// concentrations (always false for side steps).
    pub against: bool,
    /// Index into `Analysis::control` when this step has a verdict.
    pub verdict: Option<usize>,
}

impl StepResult {
    /// Q (mass-action ratio).
    pub fn q(&self) -> f64 {
        self.ln_q.exp()
    }
    /// K' at the conditions.
    pub fn keq(&self) -> f64 {
        self.ln_k.exp()
    }
    /// J+/J− = exp(−dG'/RT).
    pub fn flux_ratio(&self, rt: f64) -> f64 {
        (-self.dg / rt).exp()
    }
    /// Share of forward flux undone by the reverse flux, e^{dG'/RT}; None
    /// unless dG' < 0 (with dG' ≥ 0 there is no net forward flux to undo).
    pub fn reverse_share(&self, rt: f64) -> Option<f64> {
        (self.dg < 0.0).then(|| (self.dg / rt).exp())
    }
    /// Enzyme needed relative to an irreversible step, 1/(1 − e^{dG'/RT}); None unless dG' < 0.
    pub fn enzyme_factor(&self, rt: f64) -> Option<f64> {
        (self.dg < 0.0).then(|| 1.0 / (1.0 - (self.dg / rt).exp()))
    }
    /// times × dG'.
    pub fn weighted(&self) -> f64 {
        self.times * self.dg
    }
}

/// A chain of coupled steps read together.
#[derive(Debug, Clone, PartialEq)]
pub struct Group {
    /// Positions in `Analysis::steps`.
    pub members: Vec<usize>,
    /// Sum of the members' per-turn dG', J/mol.
    pub dg: f64,
    /// Its standard deviation, when known.
    pub dg_sd: Option<f64>,
}

/// A reversed step that is uphill in reverse and has no bypass.
#[derive(Debug, Clone, PartialEq)]
pub struct NeedsBypass {
    /// Position in `Analysis::steps`.
    pub position: usize,
    /// The energy it lacks (its dG' per turn, > 0), J/mol.
    pub lacks: f64,
}

/// Everything derived from one pathway and one scenario.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// Direction analysed.
    pub direction: Direction,
    /// RT at the scenario temperature, J/mol.
    pub rt: f64,
    /// Route steps in order.
    pub steps: Vec<StepResult>,
    /// Side steps (as written).
    pub side: Vec<StepResult>,
    /// Coupled groups.
    pub groups: Vec<Group>,
    /// Σ times × dG'° (J/mol).
    pub total_dg0: f64,
    /// Σ times × dG' (J/mol).
    pub total_dg: f64,
    /// sd of the total, when known.
    pub total_sd: Option<f64>,
    /// Route steps that give no dg0_sd (the total's sd leaves their dG'° out).
    pub steps_without_dg0_sd: usize,
    /// No route step runs backward (no step is `against`).
    pub runs_forward: bool,
    /// Net change per pass of inputs, outputs and currencies: (compound, amount).
    pub net: Vec<(usize, f64)>,
    /// Position in `steps` of the largest weighted drop.
    pub largest_drop: Option<usize>,
    /// Verdicts for far route steps, in route order.
    pub control: Vec<Verdict>,
    /// Role of each compound on this route.
    pub roles: Vec<Role>,
    /// Branch-point flag of each compound.
    pub branch: Vec<bool>,
    /// Reverse route: reversed steps that are uphill with no bypass.
    pub needs_bypass: Vec<NeedsBypass>,
    /// Reverse route: the bypass standing in for the forward prime step.
    pub counterpart: Option<usize>,
    /// Notes and warnings for the reader, one line each.
    pub notes: Vec<String>,
    /// Notes that carry energies (J/mol), worded by `present::energy_note_text`
    /// in the unit asked for; shown after `notes`.
    pub energy_notes: Vec<EnergyNote>,
    /// Flux control estimated from the thermodynamics (science.md §7).
    pub control_estimate: mca::Estimate,
}

/// z for a two-sided 95 % interval.
pub const Z95: f64 = 1.959964;

/// The verdict on one far step.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum VerdictKind {
    /// The committed step: the first far step no rule argues against.
    Prime,
    /// Far, no rule against it, but not the first.
    Candidate,
    /// A rule argues against controlling here.
    NotHere,
}

impl VerdictKind {
    /// Name used in JSON and tables.
    pub fn as_str(self) -> &'static str {
        match self {
            VerdictKind::Prime => "control_point",
            VerdictKind::Candidate => "candidate",
            VerdictKind::NotHere => "not_here",
        }
    }
}

/// Why a verdict was given: the rule that decided and what else is worth
/// knowing, with energies in J/mol; worded by `present::reason_text` in the
/// unit a person asked for.
#[derive(Debug, Clone, PartialEq)]
pub enum Reason {
    /// Rule 1: the last step of the route.
    LastStep {
        /// dG' of the step, J/mol.
        dg: f64,
    },
    /// Rule 2: a product is a branch point.
    BranchProduct {
        /// dG' of the step, J/mol.
        dg: f64,
        /// The branch-point compounds it makes.
        compounds: Vec<String>,
    },
    /// Rule 3: the first far step the other rules leave.
    FirstFar {
        /// dG' of the step, J/mol.
        dg: f64,
    },
    /// Rule 4: a later far step.
    AfterControlPoint {
        /// dG' of the step, J/mol.
        dg: f64,
        /// The control point's id.
        control_point: String,
    },
    /// Branch points between the control point and this candidate.
    BranchBetween {
        /// The branch-point compounds.
        compounds: Vec<String>,
        /// The control point's id.
        control_point: String,
    },
    /// The class is not sure within the 95 % interval.
    Unsure {
        /// Half-width of the 95 % interval of dG', J/mol.
        half_width: f64,
        /// The other class it could have.
        other: Class,
    },
    /// The step is coupled with others.
    Coupled {
        /// The group's step ids.
        steps: Vec<String>,
        /// The group's dG', J/mol.
        group_dg: f64,
    },
}

/// A verdict with its reasons.
#[derive(Debug, Clone, PartialEq)]
pub struct Verdict {
    /// Position in `Analysis::steps`.
    pub position: usize,
    /// The verdict.
    pub kind: VerdictKind,
    /// The reasons; the first says which rule decided.
    pub reasons: Vec<Reason>,
}

/// A note that carries energies (J/mol).
#[derive(Debug, Clone, PartialEq)]
pub enum EnergyNote {
    /// An uphill route step.
    Uphill {
        /// Step id.
        step: String,
        /// Its dG', J/mol.
        dg: f64,
        /// The dG' of its coupled group when that runs downhill, J/mol.
        group_dg: Option<f64>,
    },
    /// A class that is not sure within the 95 % interval of dG'.
    Unsure {
        /// Step id.
        step: String,
        /// Its class.
        class: Class,
        /// The 95 % interval of dG', J/mol.
        interval: (f64, f64),
        /// The other classes within it.
        others: Vec<Class>,
    },
}
