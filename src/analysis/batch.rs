//! Many samples through one pathway: each sample's concentrations are
//! analysed in parallel (rayon) in chunks, and the results are folded into a
//! summary across samples — per step the median and 10–90 % range of dG', the
//! share of samples in each class, how often the step is the largest drop and
//! how often it is the prime control step, and which samples have a prime
//! step other than the usual one. Samples stream through: only one chunk of
//! analyses is alive at a time; the summary keeps one f64 per step and sample
//! (10,000 samples × 12 steps is under 1 MB) so that quantiles are exact.

use super::{Analysis, Class, Prepared, VerdictKind, analyze};
use crate::model::Problem;
use crate::model::samples::{Sample, SampleError};
use crate::scenario::State;
use rayon::prelude::*;

/// Samples analysed together before their results are handed on.
pub const CHUNK: usize = 1024;

/// Why a batch run stopped.
#[derive(Debug, thiserror::Error)]
pub enum BatchError {
    /// A row of the samples table is wrong.
    #[error(transparent)]
    Samples(#[from] SampleError),
    /// The route or a sample cannot be analysed (e.g. no reverse route).
    #[error("{0}")]
    Analysis(Problem),
    /// Writing a sample's output failed.
    #[error("writing output: {0}")]
    Write(#[from] std::io::Error),
}

/// Counts of samples per class, in the order far, moderate, near, uphill.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct ClassCounts {
    /// Far from equilibrium.
    pub far: usize,
    /// Between near and far.
    pub moderate: usize,
    /// Near equilibrium.
    pub near: usize,
    /// Uphill.
    pub uphill: usize,
}

impl ClassCounts {
    fn add(&mut self, c: Class) {
        match c {
            Class::Far => self.far += 1,
            Class::Moderate => self.moderate += 1,
            Class::Near => self.near += 1,
            Class::Uphill => self.uphill += 1,
        }
    }
    /// The count for one class.
    pub fn of(&self, c: Class) -> usize {
        match c {
            Class::Far => self.far,
            Class::Moderate => self.moderate,
            Class::Near => self.near,
            Class::Uphill => self.uphill,
        }
    }
}

/// One route step across all samples.
#[derive(Debug, Clone, PartialEq)]
pub struct StepSpread {
    /// Index into `Pathway::steps`.
    pub step: usize,
    /// dG'° at the scenario's conditions, J/mol (the same in every sample).
    pub dg0: f64,
    /// Median dG', J/mol.
    pub median: f64,
    /// 10th percentile of dG', J/mol.
    pub p10: f64,
    /// 90th percentile of dG', J/mol.
    pub p90: f64,
    /// Smallest dG', J/mol.
    pub min: f64,
    /// Largest dG', J/mol.
    pub max: f64,
    /// Samples in each class.
    pub classes: ClassCounts,
    /// Samples in which this step is the largest drop.
    pub largest: usize,
    /// Samples in which this step is the prime control step.
    pub prime: usize,
    /// Median flux control estimate over the samples that have one (science.md §7).
    pub control_median: Option<f64>,
    /// Samples with a flux control estimate (every route step runs forward).
    pub control_samples: usize,
    /// Samples in which this step runs backward (dG' > 0).
    pub against: usize,
    /// Their names, in table order.
    pub against_samples: Vec<String>,
}

/// The picture across all samples.
#[derive(Debug, Clone, PartialEq)]
pub struct Summary {
    /// Number of samples.
    pub samples: usize,
    /// Route steps in order.
    pub steps: Vec<StepSpread>,
    /// Position (in `steps`) of the most common prime step; None when most samples have none.
    pub usual_prime: Option<usize>,
    /// Samples whose prime step (position, or None) differs from the usual one, in table order.
    pub prime_differs: Vec<(String, Option<usize>)>,
    /// Steps whose class is not the same in every sample, in route order.
    pub class_differs: Vec<ClassDiffers>,
    /// Samples in which no route step runs backward.
    pub runs_forward: usize,
}

/// A step whose class varies across samples.
#[derive(Debug, Clone, PartialEq)]
pub struct ClassDiffers {
    /// Position in `Summary::steps`.
    pub position: usize,
    /// The most common class (ties: far, moderate, near, uphill).
    pub usual: Class,
    /// The samples in another class, in table order.
    pub samples: Vec<(String, Class)>,
}

/// The value at fraction `p` of sorted data (linear between order statistics; R's type 7).
pub fn quantile(sorted: &[f64], p: f64) -> f64 {
    match sorted.len() {
        0 => f64::NAN,
        1 => sorted[0],
        n => {
            let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
            let lo = h.floor() as usize;
            let hi = (lo + 1).min(n - 1);
            sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
        }
    }
}

/// Folds per-sample analyses into a `Summary`.
#[derive(Debug, Clone)]
pub struct Accumulator {
    dg: Vec<Vec<f64>>,
    dg0: Vec<f64>,
    step: Vec<usize>,
    classes: Vec<ClassCounts>,
    largest: Vec<usize>,
    prime: Vec<usize>,
    against: Vec<Vec<String>>,
    runs_forward: usize,
    primes: Vec<(String, Option<usize>)>,
    class_of: Vec<Vec<Class>>,
    control: Vec<Vec<f64>>,
}

impl Accumulator {
    /// An empty accumulator for a route of `steps` positions.
    pub fn new(steps: usize) -> Self {
        Accumulator {
            dg: vec![Vec::new(); steps],
            dg0: vec![0.0; steps],
            step: vec![0; steps],
            classes: vec![ClassCounts::default(); steps],
            largest: vec![0; steps],
            prime: vec![0; steps],
            against: vec![Vec::new(); steps],
            runs_forward: 0,
            primes: Vec::new(),
            class_of: vec![Vec::new(); steps],
            control: vec![Vec::new(); steps],
        }
    }

    /// Adds one sample's analysis.
    pub fn add(&mut self, name: &str, a: &Analysis) {
        for (k, s) in a.steps.iter().enumerate().take(self.dg.len()) {
            self.dg[k].push(s.dg);
            self.dg0[k] = s.dg0;
            self.step[k] = s.step;
            self.classes[k].add(s.class);
            self.class_of[k].push(s.class);
            if let Some(c) = a.control_estimate.coefficient(k) {
                self.control[k].push(c);
            }
            if s.against {
                self.against[k].push(name.to_string());
            }
        }
        self.runs_forward += usize::from(a.runs_forward);
        if let Some(k) = a.largest_drop {
            self.largest[k] += 1;
        }
        let prime = prime_of(a);
        if let Some(k) = prime {
            self.prime[k] += 1;
        }
        self.primes.push((name.to_string(), prime));
    }

    /// The summary of everything added.
    pub fn finish(mut self) -> Summary {
        let n = self.primes.len();
        let mut steps = Vec::with_capacity(self.dg.len());
        for (k, v) in self.dg.iter_mut().enumerate() {
            v.sort_by(f64::total_cmp);
            let cc = &mut self.control[k];
            cc.sort_by(f64::total_cmp);
            steps.push(StepSpread {
                step: self.step[k],
                dg0: self.dg0[k],
                median: quantile(v, 0.5),
                p10: quantile(v, 0.1),
                p90: quantile(v, 0.9),
                min: v.first().copied().unwrap_or(f64::NAN),
                max: v.last().copied().unwrap_or(f64::NAN),
                classes: self.classes[k],
                largest: self.largest[k],
                prime: self.prime[k],
                control_median: (!cc.is_empty()).then(|| quantile(cc, 0.5)),
                control_samples: cc.len(),
                against: self.against[k].len(),
                against_samples: std::mem::take(&mut self.against[k]),
            });
        }
        // The most common prime step; "none" counts as a value; ties go to a step, the earlier one.
        let none = n - self.prime.iter().sum::<usize>();
        let mut usual: Option<usize> = None;
        let mut best = none;
        for (k, &c) in self.prime.iter().enumerate() {
            if c > best || (c == best && c > 0 && usual.is_none()) {
                best = c;
                usual = Some(k);
            }
        }
        let mut class_differs = Vec::new();
        for (k, st) in steps.iter().enumerate() {
            let mut usual_class = Class::Far;
            for c in [Class::Moderate, Class::Near, Class::Uphill] {
                if st.classes.of(c) > st.classes.of(usual_class) {
                    usual_class = c;
                }
            }
            if st.classes.of(usual_class) < n {
                let samples = self.class_of[k]
                    .iter()
                    .zip(&self.primes)
                    .filter(|(c, _)| **c != usual_class)
                    .map(|(c, (name, _))| (name.clone(), *c))
                    .collect();
                class_differs.push(ClassDiffers {
                    position: k,
                    usual: usual_class,
                    samples,
                });
            }
        }
        let prime_differs = self
            .primes
            .into_iter()
            .filter(|(_, p)| *p != usual)
            .collect();
        Summary {
            samples: n,
            steps,
            usual_prime: usual,
            prime_differs,
            class_differs,
            runs_forward: self.runs_forward,
        }
    }
}

/// Position of the prime step of one analysis.
pub fn prime_of(a: &Analysis) -> Option<usize> {
    a.control
        .iter()
        .find(|v| v.kind == VerdictKind::Prime)
        .map(|v| v.position)
}

/// Analyses every sample (in parallel, `CHUNK` at a time) and returns the summary.
///
/// `render` turns one sample's analysis into text (called in parallel); `write`
/// receives those texts in table order. Pass `|_, _| String::new()` and a no-op
/// writer when only the summary is wanted.
pub fn run<I, R, W>(
    prep: &Prepared,
    base: &State,
    samples: I,
    render: R,
    mut write: W,
) -> Result<Summary, BatchError>
where
    I: IntoIterator<Item = Result<Sample, SampleError>>,
    R: Fn(&str, &Analysis) -> String + Sync,
    W: FnMut(&str) -> std::io::Result<()>,
{
    let route = prep
        .route(base.direction)
        .map_err(|e| BatchError::Analysis(e.clone()))?;
    let mut acc = Accumulator::new(route.steps.len());
    let mut it = samples.into_iter();
    let mut chunk: Vec<Sample> = Vec::with_capacity(CHUNK);
    loop {
        chunk.clear();
        for r in it.by_ref() {
            chunk.push(r?);
            if chunk.len() == CHUNK {
                break;
            }
        }
        if chunk.is_empty() {
            break;
        }
        let results: Vec<Result<(String, Analysis, String), Problem>> = chunk
            .par_drain(..)
            .map(|s| {
                let state = State {
                    conditions: base.conditions,
                    conc: s.conc,
                    direction: base.direction,
                };
                let a = analyze(prep, &state)?;
                let text = render(&s.name, &a);
                Ok((s.name, a, text))
            })
            .collect();
        for r in results {
            let (name, a, text) = r.map_err(BatchError::Analysis)?;
            acc.add(&name, &a);
            if !text.is_empty() {
                write(&text)?;
            }
        }
    }
    Ok(acc.finish())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::samples;
    use crate::{model, thermo};

    const PW: &str = r#"
format = 1
[pathway]
name = "two steps"
[conditions]
temperature = "25 C"
ph = 7.0
[analysis]
far = "-10 kJ/mol"
near_factor = 10
[compounds]
a = { conc = "1 mM" }
b = { conc = "1 mM" }
c = { conc = "1 mM" }
[[steps]]
id = "s1"
reaction = "a -> b"
dg0 = "-8 kJ/mol"
[[steps]]
id = "s2"
reaction = "b -> c"
dg0 = "-8 kJ/mol"
"#;

    // Only b changes: s1 has dG' = -8 kJ/mol + RT ln(b / 1 mM), s2 has -8 kJ/mol - RT ln(b / 1 mM).
    const TABLE: &str = "sample,b [mM]\nt1,1\nt2,0.1\nt3,0.01\nt4,10\nt5,100\n";

    fn summary() -> (Summary, Vec<String>) {
        let p = model::load_str(PW, "two.toml").unwrap();
        let prep = crate::analysis::prepare(p).unwrap();
        let base = State::from_pathway(&prep.pathway);
        let rows = samples::read_str(TABLE, "t.csv", &prep.pathway, &base.conc).unwrap();
        let mut out = Vec::new();
        let s = run(
            &prep,
            &base,
            rows.into_iter().map(Ok),
            |n, a| format!("{n}:{}", a.steps.len()),
            |t| {
                out.push(t.to_string());
                Ok(())
            },
        )
        .unwrap();
        (s, out)
    }

    #[test]
    fn summary_counts_on_a_hand_checked_table() {
        let (s, out) = summary();
        assert_eq!(
            out,
            ["t1:2", "t2:2", "t3:2", "t4:2", "t5:2"],
            "render output arrives in table order"
        );
        assert_eq!(s.samples, 5);
        // L = RT ln 10 = 5.708 kJ/mol at 25 C is also the near threshold.
        // s1 per sample: -8, -8-L, -8-2L, -8+L, -8+2L  ->  moderate, far, far, near, near.
        // s2 mirrors it:                                     moderate, near, near, far, far.
        let s1 = &s.steps[0];
        assert_eq!(
            s1.classes,
            ClassCounts {
                far: 2,
                moderate: 1,
                near: 2,
                uphill: 0
            }
        );
        assert_eq!(
            s.steps[1].classes,
            ClassCounts {
                far: 2,
                moderate: 1,
                near: 2,
                uphill: 0
            }
        );
        // Largest drop: t1 is a tie (the first step wins), t2 and t3 s1, t4 and t5 s2.
        assert_eq!((s1.largest, s.steps[1].largest), (3, 2));
        // s1 is prime whenever far; s2 is the last step, so never prime: t1, t4, t5 have no prime step.
        assert_eq!((s1.prime, s.steps[1].prime), (2, 0));
        assert_eq!(s.usual_prime, None);
        assert_eq!(
            s.prime_differs,
            vec![("t2".to_string(), Some(0)), ("t3".to_string(), Some(0))]
        );
        let l = thermo::rt(298.15) * 10f64.ln();
        assert!((s1.median - -8000.0).abs() < 1e-6, "{}", s1.median);
        // Type-7 quantiles of five sorted values: p10 at 0.4 of the way from the first to the second.
        assert!((s1.p10 - (-8000.0 - 1.6 * l)).abs() < 1e-6, "{}", s1.p10);
        assert!((s1.p90 - (-8000.0 + 1.6 * l)).abs() < 1e-6, "{}", s1.p90);
        assert!(
            (s1.min - (-8000.0 - 2.0 * l)).abs() < 1e-6
                && (s1.max - (-8000.0 + 2.0 * l)).abs() < 1e-6
        );
        assert_eq!(s1.dg0, -8000.0);
        // Flux control (science.md §7 closed form for two steps [C]):
        // t3 and t5 have a step at dG' = −8 + 2L > 0: no estimate. Over t1,
        // t2, t4, C1 = ε2,S / (ε2,S − ε1,P) falls as b rises, so its median is
        // t1's, where both steps have dG' = −8 kJ/mol.
        let rho = (-8000.0 / thermo::rt(298.15)).exp();
        let c1 = (1.0 / (1.0 - rho)) / (1.0 / (1.0 - rho) + rho / (1.0 - rho));
        assert_eq!((s1.control_samples, s.steps[1].control_samples), (3, 3));
        assert!((s1.control_median.unwrap() - c1).abs() < 1e-12);
        assert!((s.steps[1].control_median.unwrap() - (1.0 - c1)).abs() < 1e-12);
        // Far and near tie for s1 (2 each); far comes first. The others are listed.
        let cd = &s.class_differs;
        assert_eq!(cd.len(), 2);
        assert_eq!((cd[0].position, cd[0].usual), (0, Class::Far));
        let names: Vec<(&str, Class)> = cd[0]
            .samples
            .iter()
            .map(|(n, c)| (n.as_str(), *c))
            .collect();
        assert_eq!(
            names,
            [
                ("t1", Class::Moderate),
                ("t4", Class::Near),
                ("t5", Class::Near)
            ]
        );
        assert_eq!((cd[1].position, cd[1].usual), (1, Class::Far));
        assert_eq!(cd[1].samples.len(), 3);
        // -8 + 2L = +3.4 kJ/mol > 0: s1 runs backward in t5, s2 in t3; the other three run forward.
        assert_eq!((s1.against, s.steps[1].against), (1, 1));
        assert_eq!(
            (&s1.against_samples[..], &s.steps[1].against_samples[..]),
            (&["t5".to_string()][..], &["t3".to_string()][..])
        );
        assert_eq!(s.runs_forward, 3);
    }

    #[test]
    fn quantiles_interpolate() {
        assert_eq!(quantile(&[1.0, 2.0, 3.0, 4.0], 0.5), 2.5);
        assert_eq!(quantile(&[5.0], 0.9), 5.0);
        assert!((quantile(&[0.0, 10.0], 0.1) - 1.0).abs() < 1e-12);
        assert!(quantile(&[], 0.5).is_nan());
    }

    #[test]
    fn a_bad_row_stops_the_run() {
        let p = model::load_str(PW, "two.toml").unwrap();
        let prep = crate::analysis::prepare(p).unwrap();
        let base = State::from_pathway(&prep.pathway);
        let rows = samples::SampleReader::new(
            "sample,b [mM]\nt1,1\nt2,x\n".as_bytes(),
            "t.csv",
            &prep.pathway,
            &base.conc,
        )
        .unwrap();
        let e = run(&prep, &base, rows, |_, _| String::new(), |_| Ok(()))
            .unwrap_err()
            .to_string();
        assert!(e.contains("t.csv:3, column 'b [mM]'"), "{e}");
    }
}
