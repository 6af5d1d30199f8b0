//! The explorer's vocabulary: the panes, modes, edit targets, status tones
//! and the `Message`s that `App::update` applies.

use crate::present::EnergyUnit;

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
    /// The pane `by` places along (wrapping round).
    pub(super) fn shift(self, by: isize) -> Pane {
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
    /// The file to write the built-in demo to.
    FileName,
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
    /// Up / Down in an edit line opened from a step: the step's previous / next compound.
    Cycle(isize),
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
    /// `s`: write the person's edits into the file.
    Save,
    /// `S`: write the shown values, a sample's included, into the file.
    SaveShown,
    /// Answer to the overwrite question.
    Overwrite(bool),
    /// The file on disk changed: its new text (or why it could not be read).
    Reloaded(Result<String, crate::scenario::session::ReadError>),
    /// F12 in a build with the `test-panic` feature.
    #[cfg(feature = "test-panic")]
    Panic,
}
