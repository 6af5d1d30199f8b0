//! Finding a step or compound by name.

use super::app::{App, Pane, Tone};

impl App {
    /// Finds a step (id or enzyme) or compound (id or name) containing the text.
    pub(super) fn find(&mut self, query: &str, report: bool) -> bool {
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
}
