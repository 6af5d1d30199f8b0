//! The explorer's state and its one place of change: `App` holds what the
//! person sees and is doing (selection, focus, edit buffer, mode, messages),
//! `handle_key` (in `keys`) turns a key into a `Message`, and `update` applies it,
//! recomputing the `Analysis` and the driving-force optimisation whenever
//! the scenario changed. Drawing lives in `view`; nothing here touches a
//! terminal.

pub use super::message::{Message, Mode, Options, Pane, Target, Tone};
use crate::analysis::mca::{self, RangeJob};
use crate::analysis::mdf::Mdf;
use crate::analysis::{Direction, Prepared, StepResult};
use crate::model::samples::Sample;
use crate::model::{self, units};
use crate::scenario::State;
pub use crate::scenario::optimum::{LIVE_MDF_SYNC_STEPS, LiveMdf};
use crate::scenario::save;
use crate::scenario::session::Session;
pub use crate::scenario::session::Source;
use std::path::PathBuf;

/// One press of `+` / `-` multiplies or divides by 10^0.1.
pub const FINE_STEP: f64 = 1.258_925_411_794_167_2;

/// The explorer's whole state: a `Session` (the document: pathway,
/// history, analysis, optimisation, file) plus what the screen shows.
/// `App` derefs to its session, so `app.analysis` reads the session's.
#[derive(Debug, Clone)]
pub struct App {
    /// The document being explored.
    pub session: Session,
    /// Samples read from a samples table (empty without one).
    pub samples: Vec<Sample>,
    /// The sample last chosen (index into `samples`).
    pub sample_at: usize,
    /// True when the concentrations differ from the chosen sample's.
    pub sample_edited: bool,
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
    /// The compounds an edit line opened from a step cycles through (Up/Down).
    pub edit_choices: Vec<usize>,
    /// The save waiting for the overwrite answer writes the sample's values too.
    pub(super) save_shown: bool,
    /// The new file the built-in demo is to be written to, waiting for the overwrite answer.
    pub(super) save_as: Option<PathBuf>,
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
        let session = Session::new(prep, state, source)?;
        let comp_sel = session
            .pathway()
            .compounds
            .iter()
            .position(|c| !c.is_solvent())
            .unwrap_or(0);
        Ok(App {
            session,
            samples: Vec::new(),
            sample_at: 0,
            sample_edited: false,
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
            edit_choices: Vec::new(),
            save_shown: false,
            save_as: None,
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

    /// Takes what the background solver has sent (long routes) and asks
    /// for the selected compound's feasible range when it is shown; true
    /// when the screen should be drawn again. The event loop calls it
    /// between keys.
    pub fn receive(&mut self) -> bool {
        let changed = self.session.receive();
        self.ask_shown_range();
        changed
    }

    /// Asks the background solver for the range the compound detail shows.
    pub(super) fn ask_shown_range(&mut self) {
        if self.focus == Pane::Compounds {
            let i = self.comp_sel;
            self.session.ask_range(i);
        }
    }

    /// Computes a part of the flux control range (off the keystroke path:
    /// the event loop calls it when no key is waiting); true when the screen
    /// should be drawn again.
    pub fn idle_work(&mut self) -> bool {
        if self.analysis.control_estimate.range_pending() {
            self.range_job = mca::start_ranges(&mut self.session.analysis, self.draws);
            if self.range_job.is_none() {
                return true;
            }
        }
        let Some(job) = self.range_job.as_mut() else {
            return false;
        };
        let Some(model) = self.session.analysis.control_estimate.model.as_ref() else {
            self.range_job = None;
            return false;
        };
        if job.run(model, IDLE_DRAWS) {
            if let Some(job) = self.range_job.take() {
                mca::finish_ranges(&mut self.session.analysis, job);
            }
            return true;
        }
        false
    }

    /// Runs `idle_work` until nothing is left, and waits for the background
    /// solver's answers (for key scripts, screenshots and tests).
    pub fn finish_idle_work(&mut self) {
        self.ask_shown_range();
        self.session.settle();
        self.ask_shown_range();
        self.session.settle();
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
            self.session.reset(state)?;
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

    /// True when the state holds edits the file lacks (a sample's values
    /// are a view, not an edit).
    pub fn dirty(&self) -> bool {
        save::is_dirty(self.pathway(), &self.edits_only())
    }

    /// True when compound `i` has an unsaved value of the person's own (not
    /// the shown sample's).
    pub fn edited(&self, i: usize) -> bool {
        let c = &self.pathway().compounds[i];
        let v = self.state().conc[i];
        let shown_sample = self.samples.get(self.sample_at).and_then(|s| s.conc.get(i));
        !c.is_solvent() && c.conc != Some(v) && shown_sample != Some(&v)
    }

    /// The state with every concentration that is the shown sample's put
    /// back to the file's value: what `s` writes.
    pub fn edits_only(&self) -> State {
        let mut s = self.state().clone();
        if let Some(sample) = self.samples.get(self.sample_at) {
            let file = self.pathway().file_concentrations();
            for (i, v) in s.conc.iter_mut().enumerate() {
                if sample.conc.get(i) == Some(v) {
                    *v = file[i];
                }
            }
        }
        s
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

    /// The selected step's compounds with a concentration, substrates first
    /// (as the step runs).
    pub fn step_compounds(&self) -> Vec<usize> {
        let Some(s) = self.selected_step() else {
            return Vec::new();
        };
        let solvent = |c: usize| self.pathway().compounds[c].is_solvent();
        let side = |sub: bool| {
            s.contributions
                .iter()
                .filter(move |c| (c.nu < 0.0) == sub && !solvent(c.compound))
                .map(|c| c.compound)
        };
        side(true).chain(side(false)).collect()
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
            Message::Quit => self.ask_quit(),
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
            Message::StartEdit(target) => self.start_edit(target),
            Message::Cycle(by) => self.cycle_edit(by),
            Message::Type(c) => self.type_char(c),
            Message::Erase => self.erase(),
            Message::Apply => self.apply(),
            Message::Cancel => self.cancel(),
            Message::Scale(f) => self.scale(f),
            Message::StartFind => self.start_find(),
            Message::ToggleReverse => self.toggle_reverse(),
            Message::Walk => self.walk_next(),
            Message::LoadOptimum => self.load_optimum(),
            Message::Sample(by) => self.step_sample(by),
            Message::Undo => self.undo_redo(true),
            Message::Redo => self.undo_redo(false),
            Message::Save => self.save(false, false),
            Message::SaveShown => self.save(false, true),
            Message::Overwrite(yes) => self.answer_overwrite(yes),
            Message::Reloaded(r) => self.reload(r),
            #[cfg(feature = "test-panic")]
            Message::Panic => panic!("test-panic: F12 pressed"),
        }
    }

    /// Multiplies the concentration pane's compound by `f`, rounded to three figures.
    pub(super) fn scale(&mut self, f: f64) {
        let i = self.comp_sel;
        if self.pathway().compounds[i].is_solvent() {
            let id = self.pathway().compounds[i].id.clone();
            self.say(format!("{id} is a solvent (activity 1)"), Tone::Warn);
            return;
        }
        // Rounded to three figures in the unit it is saved in, so the
        // screen, the analysis and the file agree.
        let v =
            crate::scenario::optimum::round_conc_sig3(self.state().conc[i] * f, 0.0, f64::INFINITY);
        self.set_conc(i, v);
        if self.focus != Pane::Compounds
            && let Some((text, tone)) = self.status.take()
        {
            let m = format!("{text} (the compound selected in the concentration pane)");
            self.say(m, tone);
        }
    }

    /// Turns the route round, keeping the selected step.
    pub(super) fn toggle_reverse(&mut self) {
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

    /// `q`: quits, or asks first when there are unsaved edits.
    pub(super) fn ask_quit(&mut self) {
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

    /// Undo (`back`) or redo one edit.
    fn undo_redo(&mut self, back: bool) {
        let done = if back {
            self.session.scenario.undo()
        } else {
            self.session.scenario.redo()
        };
        match (done, back) {
            (true, _) => {
                self.recompute();
                self.say(if back { "undone" } else { "redone" }, Tone::Info);
            }
            (false, true) => self.say("nothing to undo", Tone::Info),
            (false, false) => self.say("nothing to redo", Tone::Info),
        }
    }

    pub(super) fn set_conc(&mut self, i: usize, v: f64) {
        if let Err(e) = crate::model::check::concentration_si(v) {
            self.say(e.to_string(), Tone::Warn);
            return;
        }
        if !self.commit(|s| s.conc[i] = v) {
            return;
        }
        let c = &self.pathway().compounds[i];
        let m = format!("{} = {}", c.id, units::format_conc(v, self.opts.ascii));
        self.say(m, Tone::Info);
    }

    /// Applies an undoable edit and recomputes (`Session::edit`: an edit the
    /// analysis refuses never enters the history and the status line says
    /// why). Returns false when the edit was refused.
    pub(super) fn commit(&mut self, f: impl FnOnce(&mut State)) -> bool {
        match self.session.edit(f) {
            Ok(changed) => {
                if changed {
                    self.after_change();
                }
                true
            }
            Err(e) => {
                self.say(format!("cannot apply: {e}"), Tone::Warn);
                false
            }
        }
    }

    /// Recomputes the analysis for the current state (after undo, redo or a
    /// save); an unexpected failure steps back one edit and says why.
    pub(super) fn recompute(&mut self) {
        if let Err(e) = self.session.recompute() {
            self.say(format!("cannot apply: {e}"), Tone::Warn);
        }
        self.after_change();
    }

    /// Brings the screen state up to date with a changed session.
    pub(super) fn after_change(&mut self) {
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

impl std::ops::Deref for App {
    type Target = Session;
    fn deref(&self) -> &Session {
        &self.session
    }
}

impl std::ops::DerefMut for App {
    fn deref_mut(&mut self) -> &mut Session {
        &mut self.session
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
