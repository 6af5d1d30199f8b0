//! The explorer's state and its one place of change: `App` holds what the
//! person sees and is doing (selection, focus, edit buffer, mode, messages),
//! `handle_key` (in `keys`) turns a key into a `Message`, and `update` applies it,
//! recomputing the `Analysis` and the driving-force optimisation whenever
//! the scenario changed. Drawing lives in `view`; nothing here touches a
//! terminal.

pub use super::optimum::{LIVE_MDF_MAX_STEPS, LiveMdf};
use crate::analysis::mca::{self, RangeJob};
use crate::analysis::mdf::Mdf;
use crate::analysis::{self, Analysis, Direction, Prepared, StepResult};
use crate::model::samples::Sample;
use crate::model::{self, Pathway, units};
use crate::present::EnergyUnit;
use crate::scenario::save::{self, DiskStamp};
use crate::scenario::{Scenario, State};
use std::path::PathBuf;

/// One press of `+` / `-` multiplies or divides by 10^0.1.
pub const FINE_STEP: f64 = 1.258_925_411_794_167_2;

/// How the explorer draws.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Options {
    /// Draw with ASCII characters only.
    pub ascii: bool,
    /// Use colour (off on NO_COLOR).
    pub color: bool,
    /// Energy unit shown.
    pub unit: EnergyUnit,
}

/// Where the pathway came from.
#[derive(Debug, Clone)]
pub struct Source {
    /// The file on disk; None for the bundled demo.
    pub path: Option<PathBuf>,
    /// Name shown in the status line.
    pub name: String,
    /// The file text as last read or written.
    pub text: String,
}

impl Source {
    /// The bundled demo (no file on disk).
    pub fn demo() -> Self {
        Source {
            path: None,
            name: crate::DEMO_NAME.to_string(),
            text: crate::DEMO.to_string(),
        }
    }
}

/// Which pane has the keyboard.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Pane {
    /// Step list.
    Steps,
    /// Concentration pane.
    Compounds,
    /// Energy ladder.
    Ladder,
    /// Step detail.
    Detail,
}

impl Pane {
    const ORDER: [Pane; 4] = [Pane::Steps, Pane::Compounds, Pane::Ladder, Pane::Detail];
    fn shift(self, by: isize) -> Pane {
        let i = Self::ORDER.iter().position(|&p| p == self).unwrap_or(0) as isize;
        Self::ORDER[(i + by).rem_euclid(4) as usize]
    }
}

/// What an edit line changes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Target {
    /// A compound's concentration (index into compounds).
    Conc(usize),
    /// Temperature.
    Temperature,
    /// pH.
    Ph,
    /// Ionic strength.
    IonicStrength,
}

/// What the keyboard is doing right now.
#[derive(Debug, Clone, PartialEq)]
pub enum Mode {
    /// Browsing.
    Normal,
    /// Typing a value; `error` is the inline message for a bad value.
    Edit {
        /// What the value is for.
        target: Target,
        /// Text typed so far.
        buffer: String,
        /// Why the last Enter was refused.
        error: Option<String>,
    },
    /// Typing a name to find.
    Find {
        /// Text typed so far.
        buffer: String,
    },
    /// The key overlay.
    Help,
    /// Unsaved edits: a second `q` quits.
    ConfirmQuit,
    /// The file changed on disk since it was read: `y` overwrites.
    ConfirmOverwrite,
}

/// Tone of a status message.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Tone {
    /// Plain information.
    Info,
    /// Something went wrong or needs attention.
    Warn,
}

/// Everything that can happen to the explorer.
#[derive(Debug, Clone, PartialEq)]
pub enum Message {
    /// `q`: quit, or ask when there are unsaved edits.
    Quit,
    /// Ctrl-C: quit now.
    ForceQuit,
    /// `?`.
    ToggleHelp,
    /// Tab / Shift-Tab.
    Focus(isize),
    /// Up / Down in the focused pane.
    Move(isize),
    /// Start typing a value.
    StartEdit(Target),
    /// A character typed into the edit or find line.
    Type(char),
    /// Backspace in the edit or find line.
    Erase,
    /// Enter in the edit or find line.
    Apply,
    /// Esc.
    Cancel,
    /// Multiply the selected concentration.
    Scale(f64),
    /// `/`.
    StartFind,
    /// `r`.
    ToggleReverse,
    /// `w`: start or advance the walk along the route.
    Walk,
    /// `o`: load the optimal concentrations of the driving-force optimisation.
    LoadOptimum,
    /// `[` / `]`: the previous / next sample of the samples table.
    Sample(isize),
    /// `u`.
    Undo,
    /// Ctrl-r.
    Redo,
    /// `s`.
    Save,
    /// Answer to the overwrite question.
    Overwrite(bool),
    /// The file on disk changed: its new text (or why it could not be read).
    Reloaded(Result<String, String>),
    /// F12 in a build with the `test-panic` feature.
    #[cfg(feature = "test-panic")]
    Panic,
}

/// The explorer's whole state.
#[derive(Debug, Clone)]
pub struct App {
    /// The checked pathway with its routes.
    pub prep: Prepared,
    /// What the person changes, with undo/redo.
    pub scenario: Scenario,
    /// Results for the current scenario.
    pub analysis: Analysis,
    /// The driving-force optimisation for the current scenario.
    pub mdf: LiveMdf,
    /// Samples read from a samples table (empty without one).
    pub samples: Vec<Sample>,
    /// The sample last chosen (index into `samples`).
    pub sample_at: usize,
    /// True when the concentrations differ from the chosen sample's.
    pub sample_edited: bool,
    /// Where the pathway came from.
    pub source: Source,
    /// Stamp of the file as last read or written.
    pub stamp: Option<DiskStamp>,
    /// Stamp of a file version that failed to load (not retried until it changes).
    pub bad_stamp: Option<DiskStamp>,
    /// Drawing options.
    pub opts: Options,
    /// Focused pane.
    pub focus: Pane,
    /// Selected row of the step list (route steps, then side steps).
    pub step_sel: usize,
    /// Selected compound.
    pub comp_sel: usize,
    /// Scroll of the detail pane.
    pub detail_scroll: u16,
    /// Keyboard mode.
    pub mode: Mode,
    /// Walk position along the route, when walking.
    pub walk: Option<usize>,
    /// Message for the status line.
    pub status: Option<(String, Tone)>,
    /// Set when the explorer should end.
    pub quit: bool,
    /// Focus and selections before a find, restored when it is cancelled.
    pub(super) find_from: (Pane, usize, usize),
    /// Saturation draws behind the flux control range.
    pub draws: usize,
    /// The flux control range being computed between keys.
    pub(super) range_job: Option<RangeJob>,
}

/// Saturation draws computed in one go between keys (about 1.5 ms on the demo).
pub const IDLE_DRAWS: usize = 500;

impl App {
    /// Opens the explorer on a prepared pathway and a starting state.
    pub fn new(
        prep: Prepared,
        state: State,
        source: Source,
        opts: Options,
    ) -> Result<App, model::Problem> {
        let analysis = analysis::analyze(&prep, &state)?;
        let mdf = LiveMdf::solve(&prep, &state, analysis.steps.len());
        let stamp = source
            .path
            .as_ref()
            .map(|p| DiskStamp::read(p).unwrap_or_else(|_| DiskStamp::of_text(&source.text, None)));
        let comp_sel = prep
            .pathway
            .compounds
            .iter()
            .position(|c| !c.is_solvent())
            .unwrap_or(0);
        Ok(App {
            prep,
            scenario: Scenario::new(state),
            analysis,
            mdf,
            samples: Vec::new(),
            sample_at: 0,
            sample_edited: false,
            source,
            stamp,
            bad_stamp: None,
            opts,
            focus: Pane::Steps,
            step_sel: 0,
            comp_sel,
            detail_scroll: 0,
            mode: Mode::Normal,
            walk: None,
            status: None,
            quit: false,
            find_from: (Pane::Steps, 0, comp_sel),
            draws: mca::DEFAULT_DRAWS,
            range_job: None,
        })
    }

    /// Sets the number of saturation draws behind the flux control range.
    pub fn with_draws(mut self, draws: usize) -> App {
        self.draws = draws.max(1);
        self
    }

    /// True while the flux control range of the current analysis is still to be computed.
    pub fn busy(&self) -> bool {
        self.range_job.is_some() || self.analysis.control_estimate.range_pending()
    }

    /// Computes a part of the flux control range (off the keystroke path:
    /// the event loop calls it when no key is waiting); true when the screen
    /// should be drawn again.
    pub fn idle_work(&mut self) -> bool {
        if self.analysis.control_estimate.range_pending() {
            self.range_job = mca::start_ranges(&mut self.analysis, self.draws);
            if self.range_job.is_none() {
                return true;
            }
        }
        let Some(job) = self.range_job.as_mut() else {
            return false;
        };
        let Some(model) = self.analysis.control_estimate.model.as_ref() else {
            self.range_job = None;
            return false;
        };
        if job.run(model, IDLE_DRAWS) {
            if let Some(job) = self.range_job.take() {
                mca::finish_ranges(&mut self.analysis, job);
            }
            return true;
        }
        false
    }

    /// Runs `idle_work` until nothing is left (for screenshots and tests).
    pub fn finish_idle_work(&mut self) {
        while self.busy() {
            self.idle_work();
        }
    }

    /// Adds the samples of a samples table; the explorer starts on the first
    /// one (its concentrations are the starting state, as `--set` values are).
    pub fn with_samples(mut self, samples: Vec<Sample>) -> Result<App, model::Problem> {
        if let Some(first) = samples.first() {
            let mut state = self.state().clone();
            state.conc = first.conc.clone();
            self.analysis = analysis::analyze(&self.prep, &state)?;
            self.mdf = LiveMdf::solve(&self.prep, &state, self.analysis.steps.len());
            self.scenario = Scenario::new(state);
        }
        self.samples = samples;
        self.sample_at = 0;
        self.sample_edited = false;
        Ok(self)
    }

    /// The solved optimisation, if any.
    pub fn optimum(&self) -> Option<&Mdf> {
        match &self.mdf {
            LiveMdf::Solved(m) => Some(m),
            _ => None,
        }
    }

    /// Shadow price and driving force at the optimum (J/mol) of route position `k`.
    pub fn price_at(&self, k: usize) -> Option<(f64, f64)> {
        let m = self.optimum()?;
        let s = self.analysis.steps.get(k)?;
        if m.direction != self.analysis.direction || m.steps.get(k) != Some(&s.step) {
            return None;
        }
        Some((*m.prices.get(k)?, *m.driving_forces.get(k)?))
    }

    /// True when route position `k` is a bottleneck of the optimisation (positive shadow price).
    pub fn is_bottleneck(&self, k: usize) -> bool {
        self.price_at(k).is_some_and(|(p, _)| p > 0.0)
    }

    /// The chosen sample's name, when a samples table was given.
    pub fn sample_name(&self) -> Option<&str> {
        self.samples.get(self.sample_at).map(|s| s.name.as_str())
    }

    /// The pathway.
    pub fn pathway(&self) -> &Pathway {
        &self.prep.pathway
    }

    /// The current scenario state.
    pub fn state(&self) -> &State {
        self.scenario.state()
    }

    /// True when the state differs from the file.
    pub fn dirty(&self) -> bool {
        save::is_dirty(self.pathway(), self.state())
    }

    /// True when compound `i` has an unsaved value.
    pub fn edited(&self, i: usize) -> bool {
        let c = &self.pathway().compounds[i];
        !c.is_solvent() && c.conc != Some(self.state().conc[i])
    }

    /// Number of rows in the step list (route steps, then side steps).
    pub fn step_rows(&self) -> usize {
        self.analysis.steps.len() + self.analysis.side.len()
    }

    /// The result shown in step-list row `k`.
    pub fn step_row(&self, k: usize) -> Option<&StepResult> {
        let n = self.analysis.steps.len();
        if k < n {
            self.analysis.steps.get(k)
        } else {
            self.analysis.side.get(k - n)
        }
    }

    /// The selected step's result.
    pub fn selected_step(&self) -> Option<&StepResult> {
        self.step_row(self.step_sel)
    }

    /// True when step row `k` uses compound `c`.
    pub fn step_uses(&self, k: usize, c: usize) -> bool {
        self.step_row(k)
            .is_some_and(|s| self.pathway().steps[s.step].stoich.iter().any(|x| x.0 == c))
    }

    pub(super) fn say(&mut self, text: impl Into<String>, tone: Tone) {
        self.status = Some((text.into(), tone));
    }

    /// Applies a message.
    pub fn update(&mut self, msg: Message) {
        // A pending quit question is answered by the very next key.
        let confirming = self.mode == Mode::ConfirmQuit;
        if confirming {
            self.mode = Mode::Normal;
            if msg == Message::Quit {
                self.quit = true;
                return;
            }
            self.status = None;
        }
        match msg {
            Message::Quit => {
                if self.mode == Mode::Help {
                    self.mode = Mode::Normal;
                }
                if self.dirty() {
                    self.mode = Mode::ConfirmQuit;
                    self.say(
                        "unsaved edits: press q again to quit without saving, s to save",
                        Tone::Warn,
                    );
                } else {
                    self.quit = true;
                }
            }
            Message::ForceQuit => self.quit = true,
            Message::ToggleHelp => {
                self.mode = if self.mode == Mode::Help {
                    Mode::Normal
                } else {
                    Mode::Help
                }
            }
            Message::Focus(by) => {
                self.focus = self.focus.shift(by);
                self.walk = None;
            }
            Message::Move(by) => self.move_by(by),
            Message::StartEdit(target) => {
                if let Target::Conc(i) = target
                    && self.pathway().compounds[i].is_solvent()
                {
                    let id = self.pathway().compounds[i].id.clone();
                    self.say(
                        format!("{id} is a solvent (activity 1): it has no concentration to edit"),
                        Tone::Warn,
                    );
                    return;
                }
                self.status = None;
                self.mode = Mode::Edit {
                    target,
                    buffer: String::new(),
                    error: None,
                };
            }
            Message::Type(c) => match &mut self.mode {
                Mode::Edit { buffer, error, .. } => {
                    buffer.push(c);
                    *error = None;
                }
                Mode::Find { buffer } => {
                    buffer.push(c);
                    let q = buffer.clone();
                    self.find(&q, false);
                }
                _ => {}
            },
            Message::Erase => match &mut self.mode {
                Mode::Edit { buffer, error, .. } => {
                    buffer.pop();
                    *error = None;
                }
                Mode::Find { buffer } => {
                    buffer.pop();
                }
                _ => {}
            },
            Message::Apply => self.apply(),
            Message::Cancel => {
                if let Mode::Find { .. } = self.mode {
                    (self.focus, self.step_sel, self.comp_sel) = self.find_from;
                    self.say("find cancelled", Tone::Info);
                } else if let Mode::Edit { .. } = self.mode {
                    self.say("cancelled; nothing changed", Tone::Info);
                } else if self.walk.is_some() {
                    self.say("walk ended", Tone::Info);
                } else {
                    self.status = None;
                }
                self.mode = Mode::Normal;
                self.walk = None;
            }
            Message::Scale(f) => {
                let i = self.comp_sel;
                if self.pathway().compounds[i].is_solvent() {
                    let id = self.pathway().compounds[i].id.clone();
                    self.say(format!("{id} is a solvent (activity 1)"), Tone::Warn);
                    return;
                }
                let v = self.state().conc[i] * f;
                self.set_conc(i, v);
            }
            Message::StartFind => {
                self.status = None;
                self.find_from = (self.focus, self.step_sel, self.comp_sel);
                self.mode = Mode::Find {
                    buffer: String::new(),
                }
            }
            Message::ToggleReverse => {
                let next = self.state().direction.flipped();
                if let (Direction::Reverse, Err(e)) = (next, &self.prep.reverse) {
                    let m = format!("the route cannot run in reverse: {}", e.message);
                    self.say(m, Tone::Warn);
                    return;
                }
                let keep = self.selected_step().map(|s| s.step);
                if self.commit(|s| s.direction = next) {
                    self.reselect(keep);
                    self.say(format!("route runs {}", next.as_str()), Tone::Info);
                }
            }
            Message::Walk => self.walk_next(),
            Message::LoadOptimum => self.load_optimum(),
            Message::Sample(by) => self.step_sample(by),
            Message::Undo => {
                if self.scenario.undo() {
                    self.recompute();
                    self.say("undone", Tone::Info);
                } else {
                    self.say("nothing to undo", Tone::Info);
                }
            }
            Message::Redo => {
                if self.scenario.redo() {
                    self.recompute();
                    self.say("redone", Tone::Info);
                } else {
                    self.say("nothing to redo", Tone::Info);
                }
            }
            Message::Save => self.save(false),
            Message::Overwrite(yes) => {
                self.mode = Mode::Normal;
                if yes {
                    self.save(true);
                } else {
                    self.say("not saved; the file on disk is unchanged", Tone::Info);
                }
            }
            Message::Reloaded(r) => self.reload(r),
            #[cfg(feature = "test-panic")]
            Message::Panic => panic!("test-panic: F12 pressed"),
        }
    }

    pub(super) fn set_conc(&mut self, i: usize, v: f64) {
        if let Err(e) = crate::model::check::concentration_si(v) {
            self.say(e, Tone::Warn);
            return;
        }
        if !self.commit(|s| s.conc[i] = v) {
            return;
        }
        let c = &self.prep.pathway.compounds[i];
        let m = format!("{} = {}", c.id, units::format_conc(v, self.opts.ascii));
        self.say(m, Tone::Info);
    }

    /// Applies an undoable edit and recomputes. The edited state is analysed
    /// first: an edit the analysis refuses never enters the history (so the
    /// redo history survives it) and the status line says why.
    /// Returns false when the edit was refused.
    pub(super) fn commit(&mut self, f: impl FnOnce(&mut State)) -> bool {
        let mut next = self.scenario.state().clone();
        f(&mut next);
        if &next == self.scenario.state() {
            return true;
        }
        match analysis::analyze(&self.prep, &next) {
            Ok(a) => {
                self.scenario.edit(|s| *s = next);
                self.install(a);
                true
            }
            Err(e) => {
                self.say(format!("cannot apply: {}", e.message), Tone::Warn);
                false
            }
        }
    }

    /// Recomputes the analysis for the current state (after undo, redo, a
    /// save or a reload). A state in the history was analysed when it was
    /// made, so a failure here is unexpected; it steps back one edit.
    pub(super) fn recompute(&mut self) {
        match analysis::analyze(&self.prep, self.scenario.state()) {
            Ok(a) => self.install(a),
            Err(e) => {
                self.scenario.undo();
                self.say(format!("cannot apply: {}", e.message), Tone::Warn);
            }
        }
    }

    /// Makes `a` the current analysis and brings what depends on it up to date.
    fn install(&mut self, a: Analysis) {
        self.analysis = a;
        self.mdf = LiveMdf::solve(&self.prep, self.scenario.state(), self.analysis.steps.len());
        self.track_sample();
        self.step_sel = self.step_sel.min(self.step_rows().saturating_sub(1));
        if let Some(w) = self.walk {
            self.walk = Some(w.min(self.analysis.steps.len().saturating_sub(1)));
        }
    }

    /// Selects the row of pathway step `step`, if it is still shown.
    pub(super) fn reselect(&mut self, step: Option<usize>) {
        if let Some(st) = step
            && let Some(k) = (0..self.step_rows()).find(|&k| {
                self.step_row(k)
                    .is_some_and(|s| s.step == st || s.replaces == Some(st))
            })
        {
            self.step_sel = k;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fine_step_is_a_tenth_of_a_decade() {
        assert!((FINE_STEP.log10() - 0.1).abs() < 1e-15);
    }
}
