//! The numbers that bound the estimate (draws, seed, sizes, percentiles)
//! and the small types its parts share.

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
pub(super) type Terms = Vec<(usize, f64)>;

/// Independent rows of the stoichiometry and the scaled link matrix.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Link {
    /// For each variable: its index among the independent ones, if independent.
    pub(super) indep: Vec<Option<usize>>,
    /// Number of independent variables.
    pub(super) m0: usize,
    /// Scaled link matrix rows: for each variable, (independent index, L_ik·S_k/S_i).
    pub(super) rows: Vec<Vec<(usize, f64)>>,
}

/// Why a set of coefficients could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Failure {
    /// The intermediates' balance has no unique steady state with these elasticities.
    Singular,
    /// A long route whose steps link intermediates far apart in route order (too wide a band to solve quickly).
    TooWide,
}
