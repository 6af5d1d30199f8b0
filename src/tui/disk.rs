//! The file on disk: saving concentrations and conditions into it, noticing
//! outside changes and reloading.

use super::app::{App, Message, Mode, Target, Tone};
use crate::scenario::save;
use crate::scenario::session::{Poll, ReadError};
use std::path::PathBuf;

impl App {
    /// The answer to the overwrite question.
    pub(super) fn answer_overwrite(&mut self, yes: bool) {
        self.mode = Mode::Normal;
        if let Some(path) = self.save_as.take() {
            if yes {
                self.write_demo_to(path, true);
            } else {
                self.say("not saved; that file is unchanged", Tone::Info);
            }
        } else if yes {
            self.save(true, self.save_shown);
        } else {
            self.say("not saved; the file on disk is unchanged", Tone::Info);
        }
    }

    /// Writes the edits (with `shown`, the shown sample's values too) into the file.
    pub(super) fn save(&mut self, force: bool, shown: bool) {
        if self.source.path.is_none() {
            // The built-in demo has no file: ask for one to write it to.
            self.save_shown = shown;
            self.mode = Mode::Edit {
                target: Target::FileName,
                buffer: String::new(),
                error: None,
            };
            self.say("the built-in demo has no file of its own", Tone::Info);
            return;
        }
        if !force && self.session.changed_on_disk() {
            self.mode = Mode::ConfirmOverwrite;
            self.save_shown = shown;
            self.say(
                "the file changed on disk since it was read: y overwrites it, any other key cancels",
                Tone::Warn,
            );
            return;
        }
        let state = if shown {
            self.state().clone()
        } else {
            self.edits_only()
        };
        if !shown && !save::is_dirty(self.pathway(), &state) {
            let m = match self.sample_name() {
                Some(name) => format!(
                    "nothing to save: the values shown are sample {name}'s (a view); S writes them into the file"
                ),
                None => "nothing to save: the file already says this".to_string(),
            };
            self.say(m, Tone::Info);
            return;
        }
        match self.session.write(&state) {
            Err(e) => self.say(e.to_string(), Tone::Warn),
            Ok(()) => {
                self.after_change();
                let what = match self.sample_name() {
                    Some(name) if shown => format!(" (with the concentrations of sample {name})"),
                    Some(name) => format!(" (your edits; sample {name}'s values stay a view)"),
                    None => String::new(),
                };
                self.say(format!("saved {}{what}", self.source.name), Tone::Info);
            }
        }
    }

    /// Writes the built-in demo with the shown values to a new file and
    /// goes on with that file; an existing file is replaced only when
    /// `confirmed`.
    pub(super) fn write_demo_to(&mut self, path: PathBuf, confirmed: bool) {
        if !confirmed && path.exists() {
            self.mode = Mode::ConfirmOverwrite;
            self.say(
                format!(
                    "{} exists: y replaces it, any other key cancels",
                    path.display()
                ),
                Tone::Warn,
            );
            self.save_as = Some(path);
            return;
        }
        let state = self.state().clone();
        match self.session.write_to(path, &state) {
            Ok(()) => {
                self.after_change();
                let m = format!("wrote the demo to {}; s now saves there", self.source.name);
                self.say(m, Tone::Info);
            }
            Err(e) => self.say(format!("not saved: {e}"), Tone::Warn),
        }
    }

    /// Checks the file on disk; reloads it when its contents changed. True when something happened.
    pub fn poll_disk(&mut self) -> bool {
        match self.session.poll() {
            Poll::Unchanged => false,
            Poll::Unreadable(e) => {
                let msg = format!(
                    "{}: cannot read the file ({e}); showing the last good state",
                    self.source.name
                );
                if self.status.as_ref().map(|s| &s.0) == Some(&msg) {
                    return false;
                }
                self.say(msg, Tone::Warn);
                true
            }
            Poll::Changed(text) => {
                self.update(Message::Reloaded(text));
                true
            }
        }
    }

    pub(super) fn reload(&mut self, r: Result<String, ReadError>) {
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
        let keep_step = self
            .selected_step()
            .map(|s| self.pathway().steps[s.step].id.clone());
        let keep_comp = self
            .pathway()
            .compounds
            .get(self.comp_sel)
            .map(|c| c.id.clone());
        match self.session.reload(text) {
            Err(e) => self.say(e.to_string(), Tone::Warn),
            Ok(r) => {
                self.after_change();
                self.comp_sel = keep_comp
                    .and_then(|id| self.pathway().compound(&id))
                    .unwrap_or(0)
                    .min(self.pathway().compounds.len().saturating_sub(1));
                let st = keep_step.and_then(|id| self.pathway().step(&id));
                self.reselect(st);
                self.walk = None;
                let extra = match r.kept {
                    0 => String::new(),
                    1 => "; kept 1 unsaved edit".to_string(),
                    n => format!("; kept {n} unsaved edits"),
                };
                self.say(
                    format!("reloaded {} from disk{extra}", self.source.name),
                    Tone::Info,
                );
            }
        }
    }
}
