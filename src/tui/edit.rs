//! The edit line: checking a typed value before it is applied, applying it,
//! and loading the optimal concentrations.

use super::app::{App, Mode, Pane, Target, Tone};
use crate::analysis::mdf::Part;
use crate::model::Pathway;
use crate::model::check::{self, CheckError};
use crate::model::units::Kind;
use crate::scenario::optimum::{LiveMdf, round_conc_sig3};

/// Why a value typed into an edit line was refused.
#[derive(Debug, thiserror::Error)]
enum EditError {
    /// Enter on an empty line.
    #[error("type a value, or Esc to cancel")]
    Empty,
    /// A concentration of zero or less, with the compound it was typed for.
    #[error("{source} (for {id})")]
    NotPositive {
        /// The checker's refusal.
        source: CheckError,
        /// The compound's id.
        id: String,
    },
    /// Any other refusal of the checker.
    #[error(transparent)]
    Check(#[from] CheckError),
    /// A file name line read as a number (never reached: it has its own arm).
    #[error("a file name is not a number")]
    FileName,
}

/// Parses and checks a value typed into an edit line.
fn parse_target(p: &Pathway, target: Target, text: &str) -> Result<f64, EditError> {
    let t = text.trim();
    if t.is_empty() {
        return Err(EditError::Empty);
    }
    // The same checker as the file and the command line (model::check).
    Ok(match target {
        Target::Conc(i) => check::concentration(t).map_err(|e| match e {
            CheckError::NotPositive(_) => EditError::NotPositive {
                source: e,
                id: p.compounds[i].id.clone(),
            },
            e => EditError::Check(e),
        })?,
        Target::Temperature => check::quantity(t, Kind::Temperature)?,
        Target::Ph => check::ph_text(t)?,
        Target::IonicStrength => check::quantity(t, Kind::IonicStrength)?,
        Target::FileName => return Err(EditError::FileName),
    })
}

impl App {
    /// Moves an edit line opened from a step to the step's next compound.
    pub(super) fn cycle_edit(&mut self, by: isize) {
        let n = self.edit_choices.len();
        if let Mode::Edit {
            target: target @ Target::Conc(_),
            error,
            ..
        } = &mut self.mode
            && n > 0
        {
            let Target::Conc(at) = *target else { return };
            let i = self.edit_choices.iter().position(|&c| c == at).unwrap_or(0);
            let next = (i as isize + by).rem_euclid(n as isize) as usize;
            *target = Target::Conc(self.edit_choices[next]);
            *error = None;
        }
    }

    /// A character typed into the edit or find line.
    pub(super) fn type_char(&mut self, c: char) {
        match &mut self.mode {
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
        }
    }

    /// Backspace in the edit or find line.
    pub(super) fn erase(&mut self) {
        match &mut self.mode {
            Mode::Edit { buffer, error, .. } => {
                buffer.pop();
                *error = None;
            }
            Mode::Find { buffer } => {
                buffer.pop();
            }
            _ => {}
        }
    }

    /// Opens the edit line for `target` (with a step focused: the step's compounds for Up/Down).
    pub(super) fn start_edit(&mut self, target: Target) {
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
        self.edit_choices = match target {
            Target::Conc(_) if self.focus != Pane::Compounds => self.step_compounds(),
            _ => Vec::new(),
        };
        self.mode = Mode::Edit {
            target,
            buffer: String::new(),
            error: None,
        };
    }

    /// Esc: closes a line (a find puts the selection back) or ends a walk.
    pub(super) fn cancel(&mut self) {
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

    /// Opens the find line, remembering the selections to restore on Esc.
    pub(super) fn start_find(&mut self) {
        self.status = None;
        self.find_from = (self.focus, self.step_sel, self.comp_sel);
        self.edit_choices.clear();
        self.mode = Mode::Find {
            buffer: String::new(),
        }
    }

    pub(super) fn apply(&mut self) {
        match std::mem::replace(&mut self.mode, Mode::Normal) {
            Mode::Find { buffer } => {
                if self.find(&buffer, true) {
                    self.status = None;
                }
            }
            Mode::Edit {
                target: Target::FileName,
                buffer,
                ..
            } => {
                let name = buffer.trim();
                if name.is_empty() {
                    self.mode = Mode::Edit {
                        target: Target::FileName,
                        error: Some("type a file name, or Esc to cancel".into()),
                        buffer,
                    };
                    return;
                }
                self.write_demo_to(std::path::PathBuf::from(name), false);
            }
            Mode::Edit { target, buffer, .. } => {
                match parse_target(self.pathway(), target, &buffer) {
                    Err(e) => {
                        self.mode = Mode::Edit {
                            target,
                            buffer,
                            error: Some(e.to_string()),
                        }
                    }
                    Ok(v) => match target {
                        Target::Conc(i) => self.set_conc(i, v),
                        Target::Temperature => {
                            if self.commit(|s| s.conditions.temperature = v) {
                                self.say(format!("temperature {:.2} °C", v - 273.15), Tone::Info);
                            }
                        }
                        Target::Ph => {
                            if self.commit(|s| s.conditions.ph = v) {
                                self.say(format!("pH {v}"), Tone::Info);
                            }
                        }
                        Target::FileName => {}
                        Target::IonicStrength => {
                            if self.commit(|s| s.conditions.ionic_strength = v) {
                                self.say(format!("ionic strength {v} M"), Tone::Info);
                            }
                        }
                    },
                }
            }
            other => self.mode = other,
        }
    }

    pub(super) fn load_optimum(&mut self) {
        if !self.optimum_current() {
            self.say(
                "the optimum for this state is still being solved; press o again when the title's mark clears",
                Tone::Warn,
            );
            return;
        }
        let m = match &self.mdf {
            LiveMdf::Solved(m) => m.clone(),
            LiveMdf::Failed(e) => {
                self.say(format!("no optimum to load: {e}"), Tone::Warn);
                return;
            }
            LiveMdf::Pending => return,
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
        if !self.commit(|s| {
            for &(i, v) in &values {
                s.conc[i] = v;
            }
        }) {
            return;
        }
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
}
