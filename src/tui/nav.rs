//! Moving the selection in the focused pane and walking the route one step
//! at a time.

use super::app::{App, Pane, Tone};

impl App {
    pub(super) fn move_by(&mut self, by: isize) {
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

    pub(super) fn walk_next(&mut self) {
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
}
