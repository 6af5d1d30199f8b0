//! The file on disk: saving concentrations and conditions into it, noticing
//! outside changes and reloading.

use super::app::{App, Message, Mode, Tone};
use super::optimum::LiveMdf;
use crate::analysis::{self, Direction};
use crate::model::{self};
use crate::scenario::Scenario;
use crate::scenario::save::{self, DiskStamp};

impl App {
    pub(super) fn save(&mut self, force: bool) {
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

    pub(super) fn reload(&mut self, r: Result<String, String>) {
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
