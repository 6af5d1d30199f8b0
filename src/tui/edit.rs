//! The edit line: checking a typed value before it is applied, applying it,
//! and loading the optimal concentrations.

use super::app::{App, LIVE_MDF_MAX_STEPS, Mode, Target, Tone};
use super::optimum::{LiveMdf, round_conc_sig3};
use crate::analysis::mdf::Part;
use crate::model::units::Kind;
use crate::model::{Pathway, check};

/// Why a value typed into an edit line was refused.
fn parse_target(p: &Pathway, target: Target, text: &str) -> Result<f64, String> {
    let t = text.trim();
    if t.is_empty() {
        return Err("type a value, or Esc to cancel".into());
    }
    // The same checker as the file and the command line (model::check).
    match target {
        Target::Conc(i) => check::concentration(t).map_err(|e| {
            if e.contains("not above zero") {
                format!("{e} (for {})", p.compounds[i].id)
            } else {
                e
            }
        }),
        Target::Temperature => check::quantity(t, Kind::Temperature),
        Target::Ph => check::ph_text(t),
        Target::IonicStrength => check::quantity(t, Kind::IonicStrength),
    }
}

impl App {
    pub(super) fn apply(&mut self) {
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
                            if self.commit(|s| s.conditions.temperature = v) {
                                self.say(format!("temperature {:.2} °C", v - 273.15), Tone::Info);
                            }
                        }
                        Target::Ph => {
                            if self.commit(|s| s.conditions.ph = v) {
                                self.say(format!("pH {v}"), Tone::Info);
                            }
                        }
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
