//! Stepping through the rows of a samples table and tracking which sample
//! the concentrations are.

use super::app::{App, Tone};

impl App {
    pub(super) fn step_sample(&mut self, by: isize) {
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
        if !self.commit(|s| s.conc = conc) {
            // The sample could not be analysed; `commit` said why.
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
    pub(super) fn track_sample(&mut self) {
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
}
