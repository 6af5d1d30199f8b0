//! The checked pathway and its parts (compounds, steps, conditions,
//! settings), and the problems reading can find, with their wording helpers.

use std::fmt;

/// One mistake in an input, with where it is and how to fix it.
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    /// File name as the user gave it.
    pub file: String,
    /// 1-based line, where known.
    pub line: Option<usize>,
    /// 1-based column, where known.
    pub column: Option<usize>,
    /// What is wrong (and, usually, what to write instead).
    pub message: String,
}

impl std::error::Error for Problem {}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.line, self.column) {
            (Some(l), Some(c)) => write!(f, "{}:{l}:{c}: {}", self.file, self.message),
            (Some(l), None) => write!(f, "{}:{l}: {}", self.file, self.message),
            _ => write!(f, "{}: {}", self.file, self.message),
        }
    }
}

/// Every problem found in one file.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub struct LoadError {
    /// The problems, in file order.
    pub problems: Vec<Problem>,
}

impl fmt::Display for LoadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, p) in self.problems.iter().enumerate() {
            if i > 0 {
                writeln!(f)?;
            }
            write!(f, "{p}")?;
        }
        Ok(())
    }
}

/// A role stated in the file (the others are inferred from the route).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StatedRole {
    /// Carrier such as ATP or NADH: not mass-balanced, net change reported.
    Currency,
    /// Activity 1, left out of Q (water).
    Solvent,
}

/// A compound as declared under `[compounds]`.
#[derive(Debug, Clone, PartialEq)]
pub struct Compound {
    /// Id used in reactions.
    pub id: String,
    /// Human name (the id when none was given).
    pub name: String,
    /// Concentration in mol/L (None only for solvents).
    pub conc: Option<f64>,
    /// Role stated in the file.
    pub role: Option<StatedRole>,
    /// Marked `branch = true`.
    pub branch: bool,
    /// Optimisation bounds in mol/L, when given for this compound.
    pub bounds: Option<(f64, f64)>,
    /// `fixed` as stated: Some(true) holds it at `conc` in the optimisation,
    /// Some(false) frees it (also a currency compound); None: the default.
    pub fixed: Option<bool>,
    /// Coefficient of variation of the measured concentration.
    pub cv: Option<f64>,
    /// Charge of the most deprotonated species considered.
    pub charge: Option<f64>,
    /// Hydrogen atoms of the most deprotonated species considered.
    pub hydrogens: Option<f64>,
    /// Acid dissociation constants at 25 °C and I = 0, highest first (empty: one species).
    pub pka: Vec<f64>,
    /// Line of the declaration.
    pub line: usize,
}

impl Compound {
    /// True for solvents (activity 1, left out of Q).
    pub fn is_solvent(&self) -> bool {
        self.role == Some(StatedRole::Solvent)
    }
    /// True for currency compounds.
    pub fn is_currency(&self) -> bool {
        self.role == Some(StatedRole::Currency)
    }
    /// Charge and hydrogens of the base species for the pH and ionic-strength
    /// transform: as stated, or water's (z 0, nH 2) for a solvent that states
    /// neither; None when the compound lacks them.
    pub fn base_species(&self) -> Option<(f64, f64)> {
        match (self.charge, self.hydrogens) {
            (Some(z), Some(h)) => Some((z, h)),
            (None, None) if self.is_solvent() => Some((0.0, 2.0)),
            _ => None,
        }
    }
}

/// How a step's standard energy was given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Standard {
    /// `dg0`, J/mol.
    Dg0(f64),
    /// `keq`, dimensionless (1 M standard state).
    Keq(f64),
}

/// A step as declared under `[[steps]]`.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// Unique id.
    pub id: String,
    /// Enzyme label, if any.
    pub enzyme: Option<String>,
    /// The reaction as written.
    pub reaction: String,
    /// Signed stoichiometry in the written direction: (compound index, ν), ν > 0 for products.
    pub stoich: Vec<(usize, f64)>,
    /// Standard energy at the reference conditions, as given.
    pub standard: Standard,
    /// Standard uncertainty of dg0, J/mol.
    pub dg0_sd: Option<f64>,
    /// Standard enthalpy, J/mol, for the temperature correction.
    pub dh0: Option<f64>,
    /// Net H+ released as written.
    pub protons: f64,
    /// Standard state (mol/L) at which dg0/keq is stated: 1 (1 M) unless `standard` says otherwise.
    pub standard_state: f64,
    /// Turns per pass, when stated.
    pub times: Option<f64>,
    /// A branch step, not on the main route.
    pub side: bool,
    /// Index of the following step this one is read together with.
    pub couple: Option<usize>,
    /// Index of the forward step this one replaces in the reverse route.
    pub bypass_of: Option<usize>,
    /// Line of the `[[steps]]` header.
    pub line: usize,
}

impl Step {
    /// H+ released as written counted from the base species (−Σ ν nH, water
    /// included); None when some reactant lacks charge and hydrogens.
    pub fn base_protons(&self, compounds: &[Compound]) -> Option<f64> {
        let mut sum = 0.0;
        for &(c, nu) in &self.stoich {
            let (_, h) = compounds[c].base_species()?;
            sum -= nu * h;
        }
        Some(sum)
    }
}

/// Temperature, pH and ionic strength (K, pH units, mol/L).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Conditions {
    /// Temperature in K.
    pub temperature: f64,
    /// pH.
    pub ph: f64,
    /// Ionic strength in mol/L.
    pub ionic_strength: f64,
}

/// Thresholds and defaults from `[analysis]`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// dG' at or below this (J/mol) is far from equilibrium.
    pub far: f64,
    /// Q within this factor of K' is near equilibrium.
    pub near_factor: f64,
    /// Default optimisation bounds, mol/L.
    pub bounds: (f64, f64),
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            far: -10_000.0,
            near_factor: 10.0,
            bounds: (1e-6, 1e-2),
        }
    }
}

/// A checked pathway: everything the file says, ids resolved to indices.
#[derive(Debug, Clone, PartialEq)]
pub struct Pathway {
    /// File name as the user gave it (for messages).
    pub file: String,
    /// `[pathway].name`.
    pub name: String,
    /// `[pathway].description`.
    pub description: Option<String>,
    /// Compounds in file order.
    pub compounds: Vec<Compound>,
    /// Steps in file order.
    pub steps: Vec<Step>,
    /// Main route, as step indices in order.
    pub route: Vec<usize>,
    /// Conditions stated in the file.
    pub conditions: Conditions,
    /// Conditions at which the dg0 values hold.
    pub reference: Conditions,
    /// `[analysis]` settings.
    pub settings: Settings,
}

impl Pathway {
    /// Index of a compound by id.
    pub fn compound(&self, id: &str) -> Option<usize> {
        self.compounds.iter().position(|c| c.id == id)
    }
    /// Index of a step by id.
    pub fn step(&self, id: &str) -> Option<usize> {
        self.steps.iter().position(|s| s.id == id)
    }
    /// The concentrations stated in the file (solvents 1 M).
    pub fn file_concentrations(&self) -> Vec<f64> {
        self.compounds
            .iter()
            .map(|c| c.conc.unwrap_or(1.0))
            .collect()
    }
    /// Optimisation bounds of a compound (its own, else the default).
    pub fn bounds_of(&self, i: usize) -> (f64, f64) {
        self.compounds[i].bounds.unwrap_or(self.settings.bounds)
    }
}

/// The text as quoted in a message: long inputs are cut after 40 characters.
pub(crate) fn shorten(t: &str) -> String {
    match t.char_indices().nth(40) {
        Some((i, _)) => format!("{}…", &t[..i]),
        None => t.to_string(),
    }
}

/// The closest of `candidates` to `word`, if it is close enough to suggest.
pub fn suggest<'a>(word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    // Similarity costs the product of the lengths; ids this long are not typos.
    const LONGEST: usize = 64;
    if word.len() > LONGEST {
        return None;
    }
    let mut best: Option<(f64, &str)> = None;
    for c in candidates.into_iter().filter(|c| c.len() <= LONGEST) {
        let s = strsim::jaro_winkler(&word.to_lowercase(), &c.to_lowercase());
        if s > 0.7 && best.is_none_or(|(b, _)| s > b) {
            best = Some((s, c));
        }
    }
    best.map(|(_, c)| c)
}
