//! The live driving-force optimisation of a session and the rounding of
//! its optimal concentrations.

use crate::analysis::Prepared;
use crate::analysis::mdf::{self, Mdf};
use crate::model::units;
use crate::scenario::State;
use std::sync::Arc;
use std::sync::Mutex;
use std::sync::mpsc::{self, Receiver, Sender};

/// Routes up to this long are optimised in the keystroke itself (a few
/// milliseconds); longer ones in the background, so that a key never waits
/// for the solver. The screen marks an optimum that belongs to an earlier
/// state as out of date until the new one arrives.
pub const LIVE_MDF_SYNC_STEPS: usize = 200;

/// The driving-force optimisation for the current scenario.
#[derive(Debug, Clone, PartialEq)]
pub enum LiveMdf {
    /// Solved.
    Solved(Box<Mdf>),
    /// Could not be run; the message says why.
    Failed(String),
    /// Being solved in the background; no earlier result to show.
    Pending,
}

impl LiveMdf {
    /// Solves for the scenario now.
    pub fn solve(prep: &Prepared, state: &State) -> LiveMdf {
        match mdf::solve(prep, state) {
            Ok(m) => LiveMdf::Solved(Box::new(m)),
            Err(e) => LiveMdf::Failed(e.to_string()),
        }
    }
}

/// Where one free concentration lets the whole route run, or why not known.
pub type FeasibleRange = Result<Option<(f64, f64)>, mdf::MdfError>;

/// Work for the background solver, tagged with the state's generation.
enum Job {
    Solve {
        id: u64,
        prep: Arc<Prepared>,
        state: State,
    },
    Range {
        id: u64,
        prep: Arc<Prepared>,
        state: State,
        mdf: Box<Mdf>,
        compound: usize,
    },
}

impl Job {
    fn id(&self) -> u64 {
        match self {
            Job::Solve { id, .. } | Job::Range { id, .. } => *id,
        }
    }
}

/// What the background solver sends back.
#[derive(Debug)]
pub enum Answer {
    /// The optimum for generation `id`.
    Solved {
        /// Generation of the state it was solved for.
        id: u64,
        /// The result.
        mdf: LiveMdf,
    },
    /// The feasible range of one compound for generation `id`.
    Range {
        /// Generation of the state it was solved for.
        id: u64,
        /// The compound.
        compound: usize,
        /// The range.
        range: FeasibleRange,
    },
}

/// A thread that solves optimisations one at a time, newest first: jobs
/// queued behind a newer one of the same kind are dropped unsolved, so a
/// burst of keys costs one solve, not one per key. It ends when the
/// `Background` is dropped.
#[derive(Debug)]
pub struct Background {
    jobs: Sender<Job>,
    /// Behind a lock only so that a session can be shared between threads
    /// (a receiver is not `Sync`); one thread reads it at a time anyway.
    answers: Mutex<Receiver<Answer>>,
}

impl std::fmt::Debug for Job {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "Job({})", self.id())
    }
}

impl Background {
    /// Starts the solver thread; None when the system refuses a thread (the
    /// caller then solves in the foreground).
    pub fn start() -> Option<Background> {
        let (jobs, job_rx) = mpsc::channel::<Job>();
        let (answer_tx, answers) = mpsc::channel::<Answer>();
        std::thread::Builder::new()
            .name("optimum".into())
            .spawn(move || serve(&job_rx, &answer_tx))
            .ok()?;
        Some(Background {
            jobs,
            answers: Mutex::new(answers),
        })
    }

    /// Asks for the optimum of `state` (generation `id`).
    pub fn solve(&self, id: u64, prep: Arc<Prepared>, state: State) {
        let _ = self.jobs.send(Job::Solve { id, prep, state });
    }

    /// Asks for the feasible range of `compound` at the optimum `mdf` of `state`.
    pub fn range(
        &self,
        id: u64,
        prep: Arc<Prepared>,
        state: State,
        mdf: Box<Mdf>,
        compound: usize,
    ) {
        let _ = self.jobs.send(Job::Range {
            id,
            prep,
            state,
            mdf,
            compound,
        });
    }

    /// The answers that have arrived, oldest first, without waiting.
    pub fn arrived(&self) -> Vec<Answer> {
        match self.answers.lock() {
            Ok(rx) => rx.try_iter().collect(),
            Err(_) => Vec::new(),
        }
    }

    /// Waits for the next answer; None when the solver has stopped.
    pub fn wait(&self) -> Option<Answer> {
        self.answers.lock().ok()?.recv().ok()
    }
}

/// The solver thread: take every waiting job, keep the newest optimisation
/// and the newest range (dropping a range for an older state than the
/// newest optimisation), solve, answer.
fn serve(jobs: &Receiver<Job>, answers: &Sender<Answer>) {
    while let Ok(first) = jobs.recv() {
        let (mut solve, mut range) = (None, None);
        for job in std::iter::once(first).chain(jobs.try_iter()) {
            match job {
                Job::Solve { .. } => solve = Some(job),
                Job::Range { .. } => range = Some(job),
            }
        }
        if let (Some(s), Some(r)) = (&solve, &range)
            && r.id() < s.id()
        {
            range = None;
        }
        for job in solve.into_iter().chain(range) {
            let answer = match job {
                Job::Solve { id, prep, state } => Answer::Solved {
                    id,
                    mdf: LiveMdf::solve(&prep, &state),
                },
                Job::Range {
                    id,
                    prep,
                    state,
                    mdf,
                    compound,
                } => Answer::Range {
                    id,
                    compound,
                    range: mdf::feasible_range(&prep, &state, &mdf, compound),
                },
            };
            if answers.send(answer).is_err() {
                return;
            }
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
