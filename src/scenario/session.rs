//! The document core, apart from any screen: the routed pathway, the history
//! of edits, the current analysis and optimisation, and the file on disk
//! (stamps, save, reload, poll). The explorer's `App` is a `Session` plus
//! screen state; nothing here knows about keys, panes or messages.

use super::optimum::{Answer, Background, FeasibleRange, LIVE_MDF_SYNC_STEPS, LiveMdf};
use super::save::{self, DiskStamp, SaveError};
use super::{Direction, Scenario, State};
use crate::analysis::{self, Analysis, Prepared};
use crate::model::{self, LoadError, Pathway, Problem};
use std::path::PathBuf;
use std::sync::Arc;

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

/// A pathway being explored: its document and what is computed from it.
#[derive(Debug, Clone)]
pub struct Session {
    /// The checked pathway with its routes (shared with the background solver).
    pub prep: Arc<Prepared>,
    /// What the person changes, with undo/redo.
    pub scenario: Scenario,
    /// Results for the current state.
    pub analysis: Analysis,
    /// The driving-force optimisation: for the current state, or on long
    /// routes possibly for an earlier one (`optimum_current` tells).
    pub mdf: LiveMdf,
    /// Counts the analyses installed: the current state's generation.
    generation: u64,
    /// The generation `mdf` was solved for.
    mdf_generation: u64,
    /// One compound's feasible range at the current optimum, from the
    /// background solver: (compound, generation, range).
    range: Option<(usize, u64, FeasibleRange)>,
    /// The range last asked of the background solver.
    range_asked: Option<(usize, u64)>,
    /// The solver thread for routes over `LIVE_MDF_SYNC_STEPS` steps,
    /// started on the first such route. Shared by clones of the session.
    background: Option<Arc<Background>>,
    /// Where the pathway came from.
    pub source: Source,
    /// Stamp of the file as last read or written.
    pub stamp: Option<DiskStamp>,
    /// Stamp of a file version that failed to load (not retried until it changes).
    pub bad_stamp: Option<DiskStamp>,
}

/// Why the session refused an edit, a write or a reload; each message is
/// worded here once, for the explorer's status line.
#[derive(Debug, thiserror::Error)]
pub enum SessionError {
    /// The analysis refused the state (its message without the file name).
    #[error("{}", .0.message)]
    Refused(Problem),
    /// `write` on the built-in demo.
    #[error("the built-in demo has no file")]
    NoFile,
    /// Writing into the session's own file failed.
    #[error(transparent)]
    Save(#[from] SaveError),
    /// Writing to a new file failed.
    #[error("{}: {source}", path.display())]
    SaveTo {
        /// The file that was to be written.
        path: PathBuf,
        /// Why it was not.
        #[source]
        source: SaveError,
    },
    /// The file was written but does not load again.
    #[error("written, but the file does not read back: {0}")]
    ReadBack(#[source] LoadError),
    /// The file changed on disk and its new text does not load.
    #[error(
        "file changed but does not load: {} — showing the last good state",
        first_problem(.0)
    )]
    ReloadLoad(LoadError),
    /// The file changed on disk and loads, but the state cannot be analysed.
    #[error("file changed but cannot be analysed: {0}")]
    ReloadAnalyse(Problem),
}

/// The first problem of a load error as text (empty when there is none).
fn first_problem(e: &LoadError) -> String {
    e.problems
        .first()
        .map(|p| p.to_string())
        .unwrap_or_default()
}

/// A file that could not be read; shared, so a poll's answer can be passed
/// around as a message.
#[derive(Debug, Clone, thiserror::Error)]
#[error("{0}")]
pub struct ReadError(#[source] pub Arc<std::io::Error>);

impl From<std::io::Error> for ReadError {
    fn from(e: std::io::Error) -> Self {
        ReadError(Arc::new(e))
    }
}

impl PartialEq for ReadError {
    fn eq(&self, other: &Self) -> bool {
        self.0.kind() == other.0.kind() && self.0.to_string() == other.0.to_string()
    }
}

/// What a look at the file on disk found.
#[derive(Debug, Clone, PartialEq)]
pub enum Poll {
    /// Nothing new.
    Unchanged,
    /// The file cannot be read just now, and why.
    Unreadable(ReadError),
    /// The contents changed: the new text, or why it could not be read.
    Changed(Result<String, ReadError>),
}

/// A reload that took: how many unsaved edits were kept, and the pathway before it.
#[derive(Debug, Clone)]
pub struct Reloaded {
    /// Unsaved edits carried over.
    pub kept: usize,
    /// The pathway as it was before the reload (to find selections again by id).
    pub old: Pathway,
}

impl Session {
    /// Opens a session on a prepared pathway and a starting state.
    pub fn new(prep: Prepared, state: State, source: Source) -> Result<Session, model::Problem> {
        let analysis = analysis::analyze(&prep, &state)?;
        let stamp = source
            .path
            .as_ref()
            .map(|p| DiskStamp::read(p).unwrap_or_else(|_| DiskStamp::of_text(&source.text, None)));
        let mut s = Session {
            prep: Arc::new(prep),
            scenario: Scenario::new(state),
            analysis,
            mdf: LiveMdf::Pending,
            generation: 0,
            mdf_generation: 0,
            range: None,
            range_asked: None,
            background: None,
            source,
            stamp,
            bad_stamp: None,
        };
        s.optimise();
        Ok(s)
    }

    /// The pathway.
    pub fn pathway(&self) -> &Pathway {
        &self.prep.pathway
    }

    /// The current state.
    pub fn state(&self) -> &State {
        self.scenario.state()
    }

    /// Starts over at `state` with an empty history.
    pub fn reset(&mut self, state: State) -> Result<(), model::Problem> {
        let a = analysis::analyze(&self.prep, &state)?;
        self.scenario = Scenario::new(state);
        self.install(a);
        Ok(())
    }

    /// Applies an undoable edit. The edited state is analysed first: an edit
    /// the analysis refuses never enters the history (so the redo history
    /// survives it). Ok(false) when nothing changed; Err says why it was refused.
    pub fn edit(&mut self, f: impl FnOnce(&mut State)) -> Result<bool, SessionError> {
        let mut next = self.state().clone();
        f(&mut next);
        if &next == self.state() {
            return Ok(false);
        }
        let a = analysis::analyze(&self.prep, &next).map_err(SessionError::Refused)?;
        self.scenario.edit(|s| *s = next);
        self.install(a);
        Ok(true)
    }

    /// Recomputes for the current state (after undo, redo or a save). A state
    /// in the history was analysed when it was made, so a failure here is
    /// unexpected; it steps back one edit and says why.
    pub fn recompute(&mut self) -> Result<(), SessionError> {
        match analysis::analyze(&self.prep, self.state()) {
            Ok(a) => {
                self.install(a);
                Ok(())
            }
            Err(e) => {
                self.scenario.undo();
                Err(SessionError::Refused(e))
            }
        }
    }

    fn install(&mut self, a: Analysis) {
        self.analysis = a;
        self.generation += 1;
        // An answer for an earlier state is not waited for.
        self.range_asked = None;
        self.optimise();
    }

    /// Solves the optimisation for the current state: at once on short
    /// routes, in the background on long ones (the last optimum stays shown,
    /// marked out of date, until the new one arrives).
    fn optimise(&mut self) {
        if self.analysis.steps.len() > LIVE_MDF_SYNC_STEPS && self.background.is_none() {
            self.background = Background::start().map(Arc::new);
        }
        match &self.background {
            Some(bg) if self.analysis.steps.len() > LIVE_MDF_SYNC_STEPS => {
                bg.solve(self.generation, self.prep.clone(), self.state().clone());
            }
            _ => {
                self.mdf = LiveMdf::solve(&self.prep, self.state());
                self.mdf_generation = self.generation;
            }
        }
    }

    /// True when `mdf` belongs to the current state.
    pub fn optimum_current(&self) -> bool {
        self.mdf_generation == self.generation && self.mdf != LiveMdf::Pending
    }

    /// True while an answer of the background solver is awaited.
    pub fn optimum_waiting(&self) -> bool {
        !self.optimum_current() || self.range_asked.is_some()
    }

    /// Takes the background solver's answers that have arrived; true when
    /// the screen should be drawn again.
    pub fn receive(&mut self) -> bool {
        let Some(bg) = self.background.clone() else {
            return false;
        };
        let answers = bg.arrived();
        let changed = !answers.is_empty();
        for a in answers {
            self.take(a);
        }
        changed
    }

    /// Waits until the optimum (and any range asked for) of the current
    /// state has arrived: for key scripts, screenshots and tests.
    pub fn settle(&mut self) {
        while self.optimum_waiting() {
            match self.background.as_ref().and_then(|bg| bg.wait()) {
                Some(a) => self.take(a),
                None => break,
            }
        }
    }

    fn take(&mut self, a: Answer) {
        match a {
            Answer::Solved { id, mdf } if id >= self.mdf_generation => {
                self.mdf = mdf;
                self.mdf_generation = id;
            }
            Answer::Range {
                id,
                compound,
                range,
            } => {
                if self.range_asked == Some((compound, id)) {
                    self.range_asked = None;
                }
                if id == self.generation {
                    self.range = Some((compound, id, range));
                }
            }
            Answer::Solved { .. } => {}
        }
    }

    /// Where free compound `i` lets the whole route run at the current
    /// optimum `m`: solved here on short routes; on long ones the
    /// background solver's answer, or None while it is still being solved
    /// (ask for it with `ask_range`).
    pub fn feasible_range(&self, m: &crate::analysis::mdf::Mdf, i: usize) -> Option<FeasibleRange> {
        if self.background.is_none() || self.analysis.steps.len() <= LIVE_MDF_SYNC_STEPS {
            return Some(crate::analysis::mdf::feasible_range(
                &self.prep,
                self.state(),
                m,
                i,
            ));
        }
        match &self.range {
            Some((c, g, r)) if *c == i && *g == self.generation && self.optimum_current() => {
                Some(r.clone())
            }
            _ => None,
        }
    }

    /// Asks the background solver for compound `i`'s feasible range at the
    /// current optimum, unless it is known, already asked for, or not needed.
    pub fn ask_range(&mut self, i: usize) {
        let (Some(bg), LiveMdf::Solved(m)) = (&self.background, &self.mdf) else {
            return;
        };
        let wanted = self.analysis.steps.len() > LIVE_MDF_SYNC_STEPS
            && self.optimum_current()
            && m.feasible_ranges.is_none()
            && m.value >= 0.0
            && m.parts.get(i) == Some(&crate::analysis::mdf::Part::Free)
            && !matches!(&self.range, Some((c, g, _)) if *c == i && *g == self.generation)
            && self.range_asked != Some((i, self.generation));
        if wanted {
            bg.range(
                self.generation,
                self.prep.clone(),
                self.state().clone(),
                m.clone(),
                i,
            );
            self.range_asked = Some((i, self.generation));
        }
    }

    /// True when the file changed on disk since it was last read or written.
    pub fn changed_on_disk(&self) -> bool {
        match (&self.source.path, &self.stamp) {
            (Some(path), Some(st)) => {
                DiskStamp::read(path).is_ok_and(|now| now.content_differs(st))
            }
            _ => false,
        }
    }

    /// Writes `state` into the session's file and makes the written text the
    /// new base. Err when there is no file or the write failed.
    pub fn write(&mut self, state: &State) -> Result<(), SessionError> {
        let Some(path) = self.source.path.clone() else {
            return Err(SessionError::NoFile);
        };
        let text = save::save(&path, &self.source.text, self.pathway(), state)?;
        self.take_written(path, self.source.name.clone(), text)
    }

    /// Writes the pathway with `state` to a new file and goes on with that file.
    pub fn write_to(&mut self, path: PathBuf, state: &State) -> Result<(), SessionError> {
        let text = match save::save(&path, &self.source.text, self.pathway(), state) {
            Ok(t) => t,
            Err(source) => return Err(SessionError::SaveTo { path, source }),
        };
        let name = path.display().to_string();
        self.take_written(path, name, text)
    }

    /// The file now says what was written: read it back as the new base.
    fn take_written(
        &mut self,
        path: PathBuf,
        name: String,
        text: String,
    ) -> Result<(), SessionError> {
        let prep = model::load_str(&text, &name)
            .and_then(analysis::prepare)
            .map_err(SessionError::ReadBack)?;
        self.prep = Arc::new(prep);
        self.source = Source {
            path: Some(path.clone()),
            name,
            text,
        };
        self.stamp = DiskStamp::read(&path).ok();
        self.bad_stamp = None;
        self.recompute()
    }

    /// Looks at the file on disk (cheaply unless it seems to have changed).
    pub fn poll(&mut self) -> Poll {
        let (Some(path), Some(st)) = (self.source.path.clone(), self.stamp) else {
            return Poll::Unchanged;
        };
        let known = self.bad_stamp.unwrap_or(st);
        if !known.maybe_changed(&path) {
            return Poll::Unchanged;
        }
        let now = match DiskStamp::read(&path) {
            Ok(n) => n,
            // Gone for a moment (an editor replacing it) or unreadable.
            Err(e) => return Poll::Unreadable(e.into()),
        };
        if !now.content_differs(&known) {
            // Only the time changed: remember it so the cheap check stays quiet.
            if self.bad_stamp.is_some() {
                self.bad_stamp = Some(now);
            } else {
                self.stamp = Some(now);
            }
            return Poll::Unchanged;
        }
        let text = std::fs::read_to_string(&path).map_err(ReadError::from);
        if text.is_err() {
            self.bad_stamp = Some(now);
        }
        Poll::Changed(text)
    }

    /// Takes the file's new text: unsaved edits are kept where the compounds
    /// remain, in the current state and throughout the history. Err (with
    /// the first problem) leaves the session as it was.
    pub fn reload(&mut self, text: String) -> Result<Reloaded, SessionError> {
        let stamp_now = self
            .source
            .path
            .as_ref()
            .and_then(|p| DiskStamp::read(p).ok());
        let prep = match model::load_str(&text, &self.source.name).and_then(analysis::prepare) {
            Ok(p) => p,
            Err(e) => {
                self.bad_stamp = stamp_now.or(Some(DiskStamp::of_text(&text, None)));
                return Err(SessionError::ReloadLoad(e));
            }
        };
        let old = self.prep.pathway.clone();
        let can_reverse = prep.reverse.is_ok();
        let carry = |s: &State| {
            let mut m = save::carry_edits(&old, s, &prep.pathway);
            if !can_reverse {
                m.direction = Direction::Forward;
            }
            m
        };
        let next = carry(self.state());
        let a = match analysis::analyze(&prep, &next) {
            Ok(a) => a,
            Err(e) => {
                self.bad_stamp = stamp_now;
                return Err(SessionError::ReloadAnalyse(e));
            }
        };
        let kept = prep
            .pathway
            .compounds
            .iter()
            .enumerate()
            .filter(|(j, c)| !c.is_solvent() && c.conc != Some(next.conc[*j]))
            .count();
        self.scenario.remap(carry);
        self.prep = Arc::new(prep);
        self.install(a);
        self.source.text = text;
        self.stamp = stamp_now;
        self.bad_stamp = None;
        Ok(Reloaded { kept, old })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn on_disk() -> (tempfile::TempDir, PathBuf, Session) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("demo.toml");
        std::fs::write(&path, crate::DEMO).unwrap();
        let prep = analysis::prepare(model::load_str(crate::DEMO, "demo.toml").unwrap()).unwrap();
        let state = State::from_pathway(&prep.pathway);
        let source = Source {
            path: Some(path.clone()),
            name: "demo.toml".into(),
            text: crate::DEMO.into(),
        };
        (dir, path, Session::new(prep, state, source).unwrap())
    }

    #[test]
    fn a_session_can_be_shared_between_threads() {
        // Checked when compiling: the fuzz targets keep an explorer in a
        // static, which needs Sync, and the solver thread must not break it.
        fn shareable<T: Send + Sync>() {}
        shareable::<Session>();
    }

    /// A session on a generated route long enough to be optimised in the background.
    fn long_session(steps: usize) -> Session {
        assert!(steps > LIVE_MDF_SYNC_STEPS);
        let text = crate::synthetic::route(steps);
        let prep = analysis::prepare(model::load_str(&text, "long.toml").unwrap()).unwrap();
        let state = State::from_pathway(&prep.pathway);
        let source = Source {
            path: None,
            name: "long.toml".into(),
            text,
        };
        Session::new(prep, state, source).unwrap()
    }

    #[test]
    fn a_long_route_is_optimised_in_the_background_and_ends_at_the_newest_state() {
        let mut s = long_session(LIVE_MDF_SYNC_STEPS + 50);
        // Nothing is shown until the first answer is taken.
        assert_eq!(s.mdf, LiveMdf::Pending);
        assert!(!s.optimum_current());
        s.settle();
        assert!(s.optimum_current());
        let first = s.mdf.clone();
        assert!(matches!(first, LiveMdf::Solved(_)));
        // A burst of edits: the old optimum stays, marked out of date, and
        // the one that arrives at the end is that of the last state.
        let atp = s.pathway().compound("atp").unwrap();
        for k in 1..=5 {
            s.edit(|st| st.conc[atp] = 1e-3 * f64::from(k)).unwrap();
        }
        assert!(!s.optimum_current());
        assert_eq!(s.mdf, first, "the last optimum stays shown meanwhile");
        s.settle();
        assert!(s.optimum_current());
        let expected = LiveMdf::solve(&s.prep, s.state());
        assert_eq!(s.mdf, expected);
        assert_ne!(s.mdf, first, "the held carrier moved, so the optimum did");
    }

    #[test]
    fn the_feasible_range_of_a_long_route_comes_from_the_background_and_matches_a_direct_solve() {
        let mut s = long_session(LIVE_MDF_SYNC_STEPS + 10);
        s.settle();
        let LiveMdf::Solved(m) = s.mdf.clone() else {
            panic!("solved")
        };
        let i = (0..m.parts.len())
            .find(|&i| m.parts[i] == crate::analysis::mdf::Part::Free)
            .unwrap();
        assert_eq!(s.feasible_range(&m, i), None, "not asked for yet");
        s.ask_range(i);
        assert!(s.optimum_waiting());
        s.settle();
        let direct = crate::analysis::mdf::feasible_range(&s.prep, s.state(), &m, i);
        assert_eq!(s.feasible_range(&m, i), Some(direct));
        // An edit makes the range unknown again.
        let c3 = s.pathway().compound("c3").unwrap();
        s.edit(|st| st.conc[c3] *= 2.0).unwrap();
        s.settle();
        let LiveMdf::Solved(m2) = s.mdf.clone() else {
            panic!("solved")
        };
        assert_eq!(s.feasible_range(&m2, i), None);
    }

    #[test]
    fn a_session_edits_writes_notices_outside_changes_and_reloads_without_a_screen() {
        let (_dir, path, mut s) = on_disk();
        let f6p = s.pathway().compound("f6p").unwrap();
        let dg_before = s.analysis.steps[2].dg;
        assert!(matches!(s.edit(|st| st.conc[f6p] = 2.5e-3), Ok(true)));
        assert_ne!(
            s.analysis.steps[2].dg, dg_before,
            "the analysis follows the edit"
        );
        assert!(matches!(s.edit(|st| st.conc[f6p] = 2.5e-3), Ok(false)));
        assert!(s.edit(|st| st.conc[f6p] = f64::NAN).is_err());
        assert_eq!(s.poll(), Poll::Unchanged);
        // An outside change is seen and reloaded; the edit and its undo stay.
        let outside = crate::DEMO.replace(r#"conc = "12 mM""#, r#"conc = "20 mM""#);
        std::fs::write(&path, &outside).unwrap();
        assert!(s.changed_on_disk());
        let Poll::Changed(Ok(text)) = s.poll() else {
            panic!("the change is not seen")
        };
        let r = s.reload(text).unwrap();
        assert_eq!(r.kept, 1);
        let glc = s.pathway().compound("glc").unwrap();
        assert_eq!((s.state().conc[glc], s.state().conc[f6p]), (20e-3, 2.5e-3));
        assert!(s.scenario.undo());
        assert_eq!(s.state().conc[glc], 20e-3);
        assert!(s.scenario.redo());
        // Writing makes the written text the base.
        let st = s.state().clone();
        s.write(&st).unwrap();
        assert!(!save::is_dirty(s.pathway(), s.state()));
        assert!(
            std::fs::read_to_string(&path)
                .unwrap()
                .contains(r#"conc = "2.5 mM""#)
        );
        assert!(!s.changed_on_disk());
    }
}
