//! The edit line: checking a typed value before it is applied, applying it,
//! and loading the optimal concentrations.

use super::app::{App, LIVE_MDF_MAX_STEPS, Mode, Target, Tone};
use super::optimum::{LiveMdf, round_conc_sig3};
use crate::analysis::mdf::Part;
use crate::model::{Pathway, units};

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
}
