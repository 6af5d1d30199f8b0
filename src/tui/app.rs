//! The explorer's state and its one place of change: `App` holds what the
//! person sees and is doing (selection, focus, edit buffer, mode, messages),
//! `handle_key` turns a key into a `Message`, and `update` applies it,
//! recomputing the `Analysis` and the driving-force optimisation whenever
//! the scenario changed. Drawing lives in `view`; nothing here touches a
//! terminal.

use crate::analysis::mdf::{self, Mdf, Part};
use crate::analysis::{self, Analysis, Direction, Prepared, StepResult};
use crate::model::{self, Pathway, units};
use crate::report::EnergyUnit;
use crate::samples::Sample;
use crate::scenario::save::{self, DiskStamp};
use crate::scenario::{Scenario, State};
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyEventKind, KeyModifiers};
use std::path::PathBuf;

/// One press of `+` / `-` multiplies or divides by 10^0.1.
pub const FINE_STEP: f64 = 1.258_925_411_794_167_2;

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
    find_from: (Pane, usize, usize),
}

/// Why a value typed into an edit line was refused.
fn parse_target(p: &Pathway, target: Target, text: &str) -> Result<f64, String> {
    let t = text.trim();
    if t.is_empty() {
        return Err("type a value, or Esc to cancel".into());
    }
    match target {
        Target::Conc(i) => {
            let v = units::parse(t, units::Kind::Concentration)?;
            if v <= 0.0 {
                return Err(format!(
                    "a concentration must be above zero; write e.g. 80 uM for {}",
                    p.compounds[i].id
                ));
            }
            if v > 100.0 {
                return Err(format!(
                    "{} M is not a concentration a cell holds; write e.g. 2.5 mM",
                    units::sig3(v)
                ));
            }
            Ok(v)
        }
        Target::Temperature => {
            // A bare number is read as °C here (the file always carries a unit).
            let with_unit = if t.ends_with(|c: char| c.is_ascii_digit() || c == '.') {
                format!("{t} C")
            } else {
                t.to_string()
            };
            let k = units::parse(&with_unit, units::Kind::Temperature)?;
            if !(273.15..=373.15).contains(&k) {
                return Err("a temperature between 0 and 100 °C, e.g. 37 C".into());
            }
            Ok(k)
        }
        Target::Ph => {
            let v: f64 = t
                .parse()
                .map_err(|_| format!("'{t}' is not a pH; write e.g. 7.2"))?;
            if !(0.0..=14.0).contains(&v) {
                return Err(format!("{v} is outside 0–14; write e.g. 7.2"));
            }
            Ok(v)
        }
        Target::IonicStrength => {
            let v = units::parse(t, units::Kind::IonicStrength)?;
            if !(0.0..=2.0).contains(&v) {
                return Err("an ionic strength between 0 and 2 M, e.g. 0.15 M".into());
            }
            Ok(v)
        }
    }
}

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
        })
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

    /// Maps a key press to a message for the current mode.
    pub fn message_for(&self, key: KeyEvent) -> Option<Message> {
        if key.kind != KeyEventKind::Press {
            return None;
        }
        let ctrl = key.modifiers.contains(KeyModifiers::CONTROL);
        if ctrl && key.code == KeyCode::Char('c') {
            return Some(Message::ForceQuit);
        }
        match &self.mode {
            Mode::Edit { .. } | Mode::Find { .. } => match key.code {
                KeyCode::Enter => Some(Message::Apply),
                KeyCode::Esc => Some(Message::Cancel),
                KeyCode::Backspace => Some(Message::Erase),
                KeyCode::Char(c) if !ctrl => Some(Message::Type(c)),
                _ => None,
            },
            Mode::Help => match key.code {
                KeyCode::Char('q') => Some(Message::Quit),
                _ => Some(Message::ToggleHelp),
            },
            Mode::ConfirmOverwrite => match key.code {
                KeyCode::Char('y') | KeyCode::Char('Y') => Some(Message::Overwrite(true)),
                // A space (as between words of a key script) answers nothing.
                KeyCode::Char(' ') => None,
                _ => Some(Message::Overwrite(false)),
            },
            Mode::Normal | Mode::ConfirmQuit => self.normal_message(key, ctrl),
        }
    }

    fn normal_message(&self, key: KeyEvent, ctrl: bool) -> Option<Message> {
        Some(match key.code {
            KeyCode::Char('r') if ctrl => Message::Redo,
            _ if ctrl => return None,
            KeyCode::Char('q') => Message::Quit,
            KeyCode::Char('?') => Message::ToggleHelp,
            KeyCode::Tab => Message::Focus(1),
            KeyCode::BackTab => Message::Focus(-1),
            KeyCode::Up | KeyCode::Char('k') => Message::Move(-1),
            KeyCode::Down | KeyCode::Char('j') => Message::Move(1),
            KeyCode::PageUp => Message::Move(-10),
            KeyCode::PageDown => Message::Move(10),
            KeyCode::Enter => Message::StartEdit(Target::Conc(self.comp_sel)),
            KeyCode::Char('+') | KeyCode::Char('=') => Message::Scale(FINE_STEP),
            KeyCode::Char('-') => Message::Scale(1.0 / FINE_STEP),
            KeyCode::Char('>') => Message::Scale(10.0),
            KeyCode::Char('<') => Message::Scale(0.1),
            KeyCode::Char('/') => Message::StartFind,
            KeyCode::Char('t') => Message::StartEdit(Target::Temperature),
            KeyCode::Char('p') => Message::StartEdit(Target::Ph),
            KeyCode::Char('i') => Message::StartEdit(Target::IonicStrength),
            KeyCode::Char('r') => Message::ToggleReverse,
            KeyCode::Char('w') => Message::Walk,
            KeyCode::Char('o') => Message::LoadOptimum,
            KeyCode::Char('[') => Message::Sample(-1),
            KeyCode::Char(']') => Message::Sample(1),
            KeyCode::Char('u') => Message::Undo,
            KeyCode::Char('s') => Message::Save,
            KeyCode::Esc => Message::Cancel,
            #[cfg(feature = "test-panic")]
            KeyCode::F(12) => Message::Panic,
            _ => return None,
        })
    }

    /// Handles one key; returns true when the screen must be redrawn.
    pub fn handle_key(&mut self, key: KeyEvent) -> bool {
        match self.message_for(key) {
            Some(m) => {
                self.update(m);
                true
            }
            None => false,
        }
    }

    fn say(&mut self, text: impl Into<String>, tone: Tone) {
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
                self.commit(|s| s.direction = next);
                self.reselect(keep);
                self.say(format!("route runs {}", next.as_str()), Tone::Info);
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

    fn move_by(&mut self, by: isize) {
        let step = |cur: usize, n: usize| -> usize {
            if n == 0 {
                return 0;
            }
            (cur as isize + by).clamp(0, n as isize - 1) as usize
        };
        match self.focus {
            Pane::Steps | Pane::Ladder => {
                self.step_sel = step(self.step_sel, self.step_rows());
                self.detail_scroll = 0;
                if self.walk.is_some() {
                    self.walk = Some(
                        self.step_sel
                            .min(self.analysis.steps.len().saturating_sub(1)),
                    );
                }
            }
            Pane::Compounds => {
                self.comp_sel = step(self.comp_sel, self.pathway().compounds.len());
            }
            Pane::Detail => {
                self.detail_scroll = (self.detail_scroll as isize + by).clamp(0, 200) as u16;
            }
        }
    }

    fn load_optimum(&mut self) {
        let m = match &self.mdf {
            LiveMdf::Solved(m) => m.clone(),
            LiveMdf::Failed(e) => {
                self.say(format!("no optimum to load: {e}"), Tone::Warn);
                return;
            }
            LiveMdf::Skipped(n) => {
                self.say(
                    format!(
                        "no optimum to load: routes over {LIVE_MDF_MAX_STEPS} steps ({n} here) are not optimised live; run `dgpath mdf FILE`"
                    ),
                    Tone::Warn,
                );
                return;
            }
        };
        let values: Vec<(usize, f64)> = (0..m.conc.len())
            .filter(|&i| m.parts[i] == Part::Free)
            .map(|i| {
                let (lo, hi) = m.bounds[i];
                (i, round_conc_sig3(m.conc[i], lo, hi))
            })
            .collect();
        let changed = values
            .iter()
            .filter(|&&(i, v)| self.state().conc[i] != v)
            .count();
        let u = self.opts.unit;
        if changed == 0 {
            self.say(
                format!(
                    "already at the optimum (MDF {:.2} {})",
                    u.of(m.value),
                    u.label()
                ),
                Tone::Info,
            );
            return;
        }
        self.commit(|s| {
            for &(i, v) in &values {
                s.conc[i] = v;
            }
        });
        self.say(
            format!(
                "loaded the optimal concentrations of {changed} compound{} (rounded to 3 significant figures; MDF {:.2} {}); u undoes",
                if changed == 1 { "" } else { "s" },
                u.of(m.value),
                u.label()
            ),
            Tone::Info,
        );
    }

    fn step_sample(&mut self, by: isize) {
        let n = self.samples.len();
        if n == 0 {
            self.say(
                "no samples: start with `dgpath explore FILE --samples TABLE.csv`",
                Tone::Warn,
            );
            return;
        }
        let next = self.sample_at as isize + by;
        if next < 0 || next >= n as isize {
            let which = if next < 0 { "first" } else { "last" };
            // Already on the end sample: load it again when it was edited.
            if !self.sample_edited {
                self.say(
                    format!(
                        "{} is the {which} sample ({}/{n})",
                        self.samples[self.sample_at].name,
                        self.sample_at + 1
                    ),
                    Tone::Info,
                );
                return;
            }
        }
        let k = next.clamp(0, n as isize - 1) as usize;
        let conc = self.samples[k].conc.clone();
        let (was, was_edited) = (self.sample_at, self.sample_edited);
        self.sample_at = k;
        self.commit(|s| s.conc = conc);
        if self.state().conc != self.samples[k].conc {
            // The sample could not be analysed; `recompute` said why and undid it.
            (self.sample_at, self.sample_edited) = (was, was_edited);
            return;
        }
        self.sample_edited = false;
        self.say(
            format!(
                "sample {} ({}/{n}): its concentrations loaded; u undoes",
                self.samples[k].name,
                k + 1
            ),
            Tone::Info,
        );
    }

    /// After any change of state: which sample the concentrations are (the
    /// chosen one or a neighbour, as after an undo), or that they were edited.
    fn track_sample(&mut self) {
        if self.samples.is_empty() {
            return;
        }
        let conc = &self.scenario.state().conc;
        let at = self.sample_at;
        let found = [at, at.wrapping_sub(1), at + 1]
            .into_iter()
            .find(|&k| self.samples.get(k).is_some_and(|s| &s.conc == conc));
        match found {
            Some(k) => {
                self.sample_at = k;
                self.sample_edited = false;
            }
            None => self.sample_edited = true,
        }
    }

    fn walk_next(&mut self) {
        let n = self.analysis.steps.len();
        match self.walk {
            None => {
                self.walk = Some(0);
                self.step_sel = 0;
                self.focus = Pane::Ladder;
                self.say(
                    "walk: w for the next step, Up/Down to move, Esc to end",
                    Tone::Info,
                );
            }
            Some(k) if k + 1 < n => {
                self.walk = Some(k + 1);
                self.step_sel = k + 1;
            }
            Some(_) => {
                self.walk = None;
                self.say("walk ended at the last step", Tone::Info);
            }
        }
        self.detail_scroll = 0;
    }

    /// Finds a step (id or enzyme) or compound (id or name) containing the text.
    fn find(&mut self, query: &str, report: bool) -> bool {
        let q = query.trim().to_lowercase();
        if q.is_empty() {
            return false;
        }
        let p = &self.prep.pathway;
        let step_hit = |exact: bool| {
            (0..self.step_rows()).find(|&k| {
                let st = &p.steps[self.step_row(k).map_or(0, |s| s.step)];
                let id = st.id.to_lowercase();
                let enz = st.enzyme.as_deref().unwrap_or("").to_lowercase();
                if exact {
                    id == q
                } else {
                    id.contains(&q) || enz.contains(&q)
                }
            })
        };
        let comp_hit = |exact: bool| {
            p.compounds.iter().position(|c| {
                let id = c.id.to_lowercase();
                if exact {
                    id == q
                } else {
                    id.contains(&q) || c.name.to_lowercase().contains(&q)
                }
            })
        };
        let hit = match (step_hit(true), comp_hit(true)) {
            (Some(k), _) => Some((true, k)),
            (None, Some(c)) => Some((false, c)),
            _ => step_hit(false)
                .map(|k| (true, k))
                .or_else(|| comp_hit(false).map(|c| (false, c))),
        };
        match hit {
            Some((true, k)) => {
                self.step_sel = k;
                self.focus = Pane::Steps;
                true
            }
            Some((false, c)) => {
                self.comp_sel = c;
                self.focus = Pane::Compounds;
                true
            }
            None => {
                if report {
                    self.say(
                        format!("no step or compound matches '{}'", query.trim()),
                        Tone::Warn,
                    );
                }
                false
            }
        }
    }

    fn apply(&mut self) {
        match std::mem::replace(&mut self.mode, Mode::Normal) {
            Mode::Find { buffer } => {
                if self.find(&buffer, true) {
                    self.status = None;
                }
            }
            Mode::Edit { target, buffer, .. } => {
                match parse_target(self.pathway(), target, &buffer) {
                    Err(e) => {
                        self.mode = Mode::Edit {
                            target,
                            buffer,
                            error: Some(e),
                        }
                    }
                    Ok(v) => match target {
                        Target::Conc(i) => self.set_conc(i, v),
                        Target::Temperature => {
                            self.commit(|s| s.conditions.temperature = v);
                            self.say(format!("temperature {:.2} °C", v - 273.15), Tone::Info);
                        }
                        Target::Ph => {
                            self.commit(|s| s.conditions.ph = v);
                            self.say(format!("pH {v}"), Tone::Info);
                        }
                        Target::IonicStrength => {
                            self.commit(|s| s.conditions.ionic_strength = v);
                            self.say(format!("ionic strength {v} M"), Tone::Info);
                        }
                    },
                }
            }
            other => self.mode = other,
        }
    }

    fn set_conc(&mut self, i: usize, v: f64) {
        if !(v > 0.0 && v <= 100.0) {
            self.say("that would leave the range a cell can hold", Tone::Warn);
            return;
        }
        self.commit(|s| s.conc[i] = v);
        let c = &self.prep.pathway.compounds[i];
        let m = format!("{} = {}", c.id, units::format_conc(v, self.opts.ascii));
        self.say(m, Tone::Info);
    }

    /// Applies an undoable edit and recomputes.
    fn commit(&mut self, f: impl FnOnce(&mut State)) {
        if self.scenario.edit(f) {
            self.recompute();
        }
    }

    /// Recomputes the analysis for the current state.
    fn recompute(&mut self) {
        match analysis::analyze(&self.prep, self.scenario.state()) {
            Ok(a) => {
                self.analysis = a;
                self.mdf =
                    LiveMdf::solve(&self.prep, self.scenario.state(), self.analysis.steps.len());
                self.track_sample();
                self.step_sel = self.step_sel.min(self.step_rows().saturating_sub(1));
                if let Some(w) = self.walk {
                    self.walk = Some(w.min(self.analysis.steps.len().saturating_sub(1)));
                }
            }
            Err(e) => {
                self.scenario.undo();
                self.say(format!("cannot apply: {}", e.message), Tone::Warn);
            }
        }
    }

    /// Selects the row of pathway step `step`, if it is still shown.
    fn reselect(&mut self, step: Option<usize>) {
        if let Some(st) = step
            && let Some(k) = (0..self.step_rows()).find(|&k| {
                self.step_row(k)
                    .is_some_and(|s| s.step == st || s.replaces == Some(st))
            })
        {
            self.step_sel = k;
        }
    }

    fn save(&mut self, force: bool) {
        let Some(path) = self.source.path.clone() else {
            self.say(
                "the bundled demo has no file to save into: run `dgpath new FILE`, then `dgpath explore FILE`",
                Tone::Warn,
            );
            return;
        };
        if !force && let Some(st) = &self.stamp {
            let changed = match DiskStamp::read(&path) {
                Ok(now) => now.content_differs(st),
                Err(_) => false,
            };
            if changed {
                self.mode = Mode::ConfirmOverwrite;
                self.say(
                    "the file changed on disk since it was read: y overwrites it, any other key cancels",
                    Tone::Warn,
                );
                return;
            }
        }
        let state = self.state().clone();
        match save::save(&path, &self.source.text, self.pathway(), &state) {
            Err(e) => self.say(e.to_string(), Tone::Warn),
            Ok(text) => {
                // The file now says what the state says; read it back as the new base.
                match model::load_str(&text, &self.source.name).and_then(analysis::prepare) {
                    Ok(prep) => {
                        self.prep = prep;
                        self.source.text = text;
                        self.stamp = DiskStamp::read(&path).ok();
                        self.bad_stamp = None;
                        self.recompute();
                        let what = match self.sample_name() {
                            Some(name) if self.sample_edited => {
                                format!(" (sample {name}'s concentrations with later edits)")
                            }
                            Some(name) => format!(" (the concentrations of sample {name})"),
                            None => String::new(),
                        };
                        self.say(format!("saved {}{what}", self.source.name), Tone::Info);
                    }
                    Err(e) => self.say(
                        format!("saved, but the file does not read back: {e}"),
                        Tone::Warn,
                    ),
                }
            }
        }
    }

    /// Checks the file on disk; reloads it when its contents changed. True when something happened.
    pub fn poll_disk(&mut self) -> bool {
        let Some(path) = self.source.path.clone() else {
            return false;
        };
        let Some(st) = self.stamp else { return false };
        let known = self.bad_stamp.unwrap_or(st);
        if !known.maybe_changed(&path) {
            return false;
        }
        let now = match DiskStamp::read(&path) {
            Ok(n) => n,
            Err(e) => {
                // Gone for a moment (an editor replacing it) or unreadable: keep the last good state.
                let msg = format!(
                    "{}: cannot read the file ({e}); showing the last good state",
                    self.source.name
                );
                if self.status.as_ref().map(|s| &s.0) != Some(&msg) {
                    self.say(msg, Tone::Warn);
                    return true;
                }
                return false;
            }
        };
        if !now.content_differs(&known) {
            // Only the time changed: remember it so the cheap check stays quiet.
            if self.bad_stamp.is_some() {
                self.bad_stamp = Some(now);
            } else {
                self.stamp = Some(now);
            }
            return false;
        }
        let text = std::fs::read_to_string(&path).map_err(|e| e.to_string());
        if text.is_err() {
            self.bad_stamp = Some(now);
        }
        self.update(Message::Reloaded(text));
        if let Mode::ConfirmOverwrite = self.mode {
            return true;
        }
        true
    }

    fn reload(&mut self, r: Result<String, String>) {
        let path = self.source.path.clone();
        let text = match r {
            Ok(t) => t,
            Err(e) => {
                self.say(
                    format!("{}: cannot read: {e}", self.source.name),
                    Tone::Warn,
                );
                return;
            }
        };
        let stamp_now = path.as_ref().and_then(|p| DiskStamp::read(p).ok());
        match model::load_str(&text, &self.source.name).and_then(analysis::prepare) {
            Err(e) => {
                self.bad_stamp = stamp_now.or(Some(DiskStamp::of_text(&text, None)));
                let first = e
                    .problems
                    .first()
                    .map(|p| p.to_string())
                    .unwrap_or_default();
                self.say(
                    format!(
                        "file changed but does not load: {first} — showing the last good state"
                    ),
                    Tone::Warn,
                );
            }
            Ok(prep) => {
                let old_p = self.prep.pathway.clone();
                let mut next = save::carry_edits(&old_p, self.state(), &prep.pathway);
                if next.direction == Direction::Reverse && prep.reverse.is_err() {
                    next.direction = Direction::Forward;
                }
                let keep_step = self.selected_step().map(|s| old_p.steps[s.step].id.clone());
                let keep_comp = old_p.compounds.get(self.comp_sel).map(|c| c.id.clone());
                let kept = prep
                    .pathway
                    .compounds
                    .iter()
                    .enumerate()
                    .filter(|(j, c)| !c.is_solvent() && c.conc != Some(next.conc[*j]))
                    .count();
                match analysis::analyze(&prep, &next) {
                    Err(e) => {
                        self.bad_stamp = stamp_now;
                        self.say(
                            format!("file changed but cannot be analysed: {e}"),
                            Tone::Warn,
                        );
                    }
                    Ok(a) => {
                        self.prep = prep;
                        self.mdf = LiveMdf::solve(&self.prep, &next, a.steps.len());
                        self.analysis = a;
                        self.scenario = Scenario::new(next);
                        self.track_sample();
                        self.source.text = text;
                        self.stamp = stamp_now;
                        self.bad_stamp = None;
                        self.comp_sel = keep_comp
                            .and_then(|id| self.prep.pathway.compound(&id))
                            .unwrap_or(0)
                            .min(self.prep.pathway.compounds.len().saturating_sub(1));
                        let st = keep_step.and_then(|id| self.prep.pathway.step(&id));
                        self.step_sel = self.step_sel.min(self.step_rows().saturating_sub(1));
                        self.reselect(st);
                        self.walk = None;
                        let extra = if kept > 0 {
                            format!(
                                "; kept {kept} unsaved edit{}",
                                if kept == 1 { "" } else { "s" }
                            )
                        } else {
                            String::new()
                        };
                        self.say(
                            format!("reloaded {} from disk{extra}", self.source.name),
                            Tone::Info,
                        );
                    }
                }
            }
        }
    }
}

/// Parses a key script for screenshots and tests: names such as `Tab`,
/// `S-Tab`, `Up`, `Down`, `Enter`, `Esc`, `Backspace`, `Space`, `C-r`, `F5`;
/// any other word is typed character by character, with a space between
/// consecutive words (so `Enter 2.5 mM Enter` types "2.5 mM").
pub fn parse_keys(script: &str) -> Result<Vec<KeyEvent>, String> {
    let mut out = Vec::new();
    let mut last_was_text = false;
    for word in script.split_whitespace() {
        let named = match word {
            "Tab" => Some(KeyCode::Tab),
            "S-Tab" | "BackTab" => Some(KeyCode::BackTab),
            "Up" => Some(KeyCode::Up),
            "Down" => Some(KeyCode::Down),
            "Left" => Some(KeyCode::Left),
            "Right" => Some(KeyCode::Right),
            "Enter" => Some(KeyCode::Enter),
            "Esc" => Some(KeyCode::Esc),
            "Backspace" | "BS" => Some(KeyCode::Backspace),
            "Space" => Some(KeyCode::Char(' ')),
            "PageUp" => Some(KeyCode::PageUp),
            "PageDown" => Some(KeyCode::PageDown),
            w if w.len() >= 2
                && w.starts_with('F')
                && w[1..].chars().all(|c| c.is_ascii_digit()) =>
            {
                w[1..].parse().ok().map(KeyCode::F)
            }
            _ => None,
        };
        if let Some(code) = named {
            out.push(KeyEvent::new(code, KeyModifiers::NONE));
            last_was_text = false;
            continue;
        }
        if let Some(rest) = word.strip_prefix("C-") {
            let mut cs = rest.chars();
            match (cs.next(), cs.next()) {
                (Some(c), None) => {
                    out.push(KeyEvent::new(KeyCode::Char(c), KeyModifiers::CONTROL));
                    last_was_text = false;
                    continue;
                }
                _ => return Err(format!("'{word}': write C- and one letter, e.g. C-r")),
            }
        }
        if last_was_text {
            out.push(KeyEvent::new(KeyCode::Char(' '), KeyModifiers::NONE));
        }
        for c in word.chars() {
            out.push(KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE));
        }
        last_was_text = true;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_script_types_words_with_spaces_between() {
        let keys = parse_keys("Tab Enter 2.5 mM Enter C-r").unwrap();
        let text: String = keys
            .iter()
            .filter_map(|k| match k.code {
                KeyCode::Char(c) if k.modifiers.is_empty() => Some(c),
                _ => None,
            })
            .collect();
        assert_eq!(text, "2.5 mM");
        assert_eq!(keys[0].code, KeyCode::Tab);
        assert_eq!(keys.last().unwrap().modifiers, KeyModifiers::CONTROL);
        assert!(parse_keys("C-rr").is_err());
    }

    #[test]
    fn optimal_values_round_to_three_figures_inside_their_bounds() {
        let mm = |t: &str| units::parse(t, units::Kind::Concentration).unwrap();
        assert_eq!(round_conc_sig3(2.2345e-3, 1e-6, 0.02), mm("2.23 mM"));
        assert_eq!(round_conc_sig3(6.7349e-5, 1e-6, 0.02), mm("67.3 uM"));
        // At an upper bound that has more figures: one step down, not above it.
        assert_eq!(round_conc_sig3(1.2399e-3, 1e-6, 1.2399e-3), mm("1.23 mM"));
        assert_eq!(round_conc_sig3(1.0051e-6, 1.0051e-6, 0.02), mm("1.01 uM"));
    }

    #[test]
    fn fine_step_is_a_tenth_of_a_decade() {
        assert!((FINE_STEP.log10() - 0.1).abs() < 1e-15);
    }
}
