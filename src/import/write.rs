//! Lays out the imported pathway file like the demo files: a header that
//! says where every kind of value came from, conditions, compounds (route
//! compounds, then carriers, then water) and steps (the route, then its
//! bypasses), each value with a comment where it is not plain.

use super::network::Network;
use super::options::{BranchesFrom, Imported, Options};
use super::roles::Kind;
use super::sbml::{Model, hydrogens, term};
use std::collections::BTreeSet;
use std::fmt::Write as _;

/// Everything the layout needs.
pub struct Input<'a> {
    /// The model.
    pub model: &'a Model,
    /// Model file name as given.
    pub file: &'a str,
    /// Route reactions in order.
    pub route: &'a [usize],
    /// Per route position: runs against the model's direction.
    pub flipped: &'a [bool],
    /// Per species.
    pub kinds: &'a [Kind],
    /// Branch points and bypasses.
    pub net: &'a Network,
    /// The person's options.
    pub opts: &'a Options,
    /// Temperature as it is to be written.
    pub temperature: &'a str,
    /// pH.
    pub ph: f64,
}

/// A TOML basic string, quoted and escaped.
pub fn quote(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\t' => out.push_str("\\t"),
            c if c.is_control() => {
                let _ = write!(out, "\\u{:04X}", c as u32);
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// An id the pathway format accepts: `[A-Za-z0-9_]`, starting with a letter
/// or digit, never a bare number; other characters become `_`.
pub fn file_id(id: &str, fallback_prefix: &str) -> String {
    let mut s: String = id
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() { c } else { '_' })
        .collect();
    let trimmed = s.trim_start_matches('_');
    if trimmed.len() != s.len() {
        s = trimmed.to_string();
    }
    if s.is_empty() || s.parse::<f64>().is_ok() {
        s = format!("{fallback_prefix}{s}");
    }
    s
}

/// `file_id` of every id, with `_2`, `_3`, ... added where two would be the same.
pub fn unique_ids<'a>(ids: impl Iterator<Item = &'a str>, fallback_prefix: &str) -> Vec<String> {
    let mut seen = std::collections::HashSet::new();
    ids.map(|id| {
        let base = file_id(id, fallback_prefix);
        let mut out = base.clone();
        let mut n = 1;
        while !seen.insert(out.clone()) {
            n += 1;
            out = format!("{base}_{n}");
        }
        out
    })
    .collect()
}

fn number(v: f64) -> String {
    // + 0.0 turns −0 (an empty f64 sum is −0) into 0.
    format!("{}", v + 0.0)
}

struct StepOut {
    reaction: usize,
    flipped: bool,
    bypass_of: Option<String>,
    undoes_more: Vec<String>,
}

/// Renders the pathway file.
pub fn render(inp: &Input) -> Imported {
    let m = inp.model;
    let rids = unique_ids(m.reactions.iter().map(|r| r.id.as_str()), "r");
    let steps = steps_out(inp, &rids);
    let mut w = Writer {
        inp,
        ids: unique_ids(m.species.iter().map(|s| s.id.as_str()), "c"),
        rids,
        out: String::new(),
        notes: Vec::new(),
        missing_dg0: Vec::new(),
        missing_conc: Vec::new(),
    };
    w.header();
    w.pathway_and_conditions();
    w.compounds(&used_compounds(inp, &steps));
    for st in &steps {
        w.step(st);
    }
    let branches = inp
        .net
        .branches
        .iter()
        .map(|(sp, _)| w.ids[*sp].clone())
        .collect();
    let step_ids =
        |s: &[StepOut]| -> Vec<String> { s.iter().map(|st| w.rids[st.reaction].clone()).collect() };
    let (route_steps, bypass_steps) = steps.split_at(inp.route.len());
    Imported {
        text: w.out,
        route: step_ids(route_steps),
        bypasses: step_ids(bypass_steps),
        branches,
        missing_dg0: w.missing_dg0,
        missing_conc: w.missing_conc,
        notes: w.notes,
    }
}

/// The route steps, then the bypass steps.
fn steps_out(inp: &Input, rids: &[String]) -> Vec<StepOut> {
    let mut steps: Vec<StepOut> = inp
        .route
        .iter()
        .zip(inp.flipped)
        .map(|(&r, &f)| StepOut {
            reaction: r,
            flipped: f,
            bypass_of: None,
            undoes_more: Vec::new(),
        })
        .collect();
    for b in &inp.net.bypasses {
        let ids: Vec<String> = b
            .undoes
            .iter()
            .map(|&p| rids[inp.route[p]].clone())
            .collect();
        let (last, rest) = ids
            .split_last()
            .map(|(l, r)| (l.clone(), r.to_vec()))
            .unwrap_or_default();
        steps.push(StepOut {
            reaction: b.reaction,
            flipped: b.flipped,
            bypass_of: Some(last),
            undoes_more: rest,
        });
    }
    steps
}

/// Compounds in order of first use: route compounds, then carriers, then water.
fn used_compounds(inp: &Input, steps: &[StepOut]) -> Vec<usize> {
    let m = inp.model;
    let mut used: Vec<usize> = Vec::new();
    let mut seen = vec![false; m.species.len()];
    for s in steps {
        for &(sp, _) in &m.reactions[s.reaction].stoich {
            if inp.kinds[sp] != Kind::Proton && !seen[sp] {
                seen[sp] = true;
                used.push(sp);
            }
        }
    }
    let rank = |k: Kind| match k {
        Kind::Other => 0,
        Kind::Currency => 1,
        _ => 2,
    };
    used.sort_by_key(|&sp| rank(inp.kinds[sp]));
    used
}

struct Writer<'a> {
    inp: &'a Input<'a>,
    ids: Vec<String>,
    rids: Vec<String>,
    out: String,
    notes: Vec<String>,
    missing_dg0: Vec<String>,
    missing_conc: Vec<String>,
}

impl Writer<'_> {
    /// The comment block that says where every kind of value came from.
    fn header(&mut self) {
        let (inp, m, out) = (self.inp, self.inp.model, &mut self.out);
        let level = match m.fbc {
            Some(v) => format!(
                "SBML Level {} Version {}, fbc version {v}",
                m.level, m.version
            ),
            None => format!("SBML Level {} Version {}", m.level, m.version),
        };
        let model_name = if m.id.is_empty() {
            "the model".to_string()
        } else {
            format!("model '{}'", m.id)
        };
        let _ = writeln!(
            out,
            "# Imported by dgpath import from {} ({level}, {model_name}).",
            inp.file
        );
        let _ = writeln!(out, "# Where the values come from:");
        let _ = writeln!(
            out,
            "#   name, charge, hydrogens: the model's species (charge; H count of the chemical formula)"
        );
        let _ = writeln!(
            out,
            "#   reaction: the model's reaction, turned to run the way the route runs; H+ left out"
        );
        let _ = writeln!(
            out,
            "#   protons: the model's H+ (net H+ released as the step runs)"
        );
        self.header_tables();
        let (inp, out) = (self.inp, &mut self.out);
        let _ = writeln!(
            out,
            "#   role: water is the solvent; carriers (ATP/ADP/AMP, GTP/GDP, UTP/UDP, CTP/CDP, NAD(P)+/NAD(P)H,"
        );
        let _ = writeln!(
            out,
            "#         FAD/FADH2, quinones/quinols, Pi, PPi, CoA) are currency, by common practice"
        );
        let from = match inp.opts.branches_from {
            BranchesFrom::Network => {
                "other reactions make or use (objective, exchange,\n#           sink, demand and bypass reactions not counted)"
            }
            BranchesFrom::All => "any other reaction makes or uses (--branches-from all)",
        };
        let _ = writeln!(out, "#   branch: route compounds that {from}");
        let _ = writeln!(
            out,
            "#   bypass_of: reactions that run part of the route backward (used by --reverse)"
        );
        let _ = writeln!(
            out,
            "# \"?\" is not a value: dgpath check lists each one until it is filled in."
        );
    }

    /// The header's lines on the dg0 and conc tables (or their absence).
    fn header_tables(&mut self) {
        let (inp, out) = (self.inp, &mut self.out);
        match &inp.opts.dg0 {
            Some(t) => {
                let _ = writeln!(
                    out,
                    "#   dg0, dg0_sd: {} (for each reaction as the model writes it; negated where a step runs it the other way)",
                    t.file
                );
            }
            None => {
                let _ = writeln!(
                    out,
                    "#   dg0: no table given (--dg0); every step says \"?\" until you fill it in"
                );
            }
        }
        match &inp.opts.conc {
            Some(t) => {
                let _ = writeln!(out, "#   conc: {}", t.file);
            }
            None => {
                let _ = writeln!(
                    out,
                    "#   conc: no table given (--conc); every compound says \"?\" until you fill it in"
                );
            }
        }
    }

    fn pathway_and_conditions(&mut self) {
        let (inp, m, out) = (self.inp, self.inp.model, &mut self.out);
        out.push_str("format = 1\n\n[pathway]\n");
        let first = &m.reactions[inp.route[0]].id;
        let last = &m.reactions[inp.route[inp.route.len() - 1]].id;
        let title = if m.id.is_empty() {
            format!("{first} to {last}")
        } else {
            format!("{first} to {last} ({})", m.id)
        };
        let _ = writeln!(out, "name = {}", quote(&title));
        let _ = writeln!(
            out,
            "description = {}",
            quote(&format!("Imported from {}", inp.file))
        );
        let route_ids: Vec<String> = inp.route.iter().map(|&r| quote(&self.rids[r])).collect();
        let _ = writeln!(out, "route = [{}]", route_ids.join(", "));
        out.push_str("\n[conditions]\n");
        let t_from = if inp.opts.temperature.is_some() {
            "--temperature"
        } else {
            "default; change to the cell's"
        };
        let ph_from = if inp.opts.ph.is_some() {
            "--ph"
        } else {
            "default"
        };
        let _ = writeln!(out, "temperature = {}   # {t_from}", quote(inp.temperature));
        let ph = if inp.ph.fract() == 0.0 {
            format!("{:.1}", inp.ph)
        } else {
            number(inp.ph)
        };
        let _ = writeln!(out, "ph = {ph}   # {ph_from}");
        out.push_str("\n[compounds]\n");
    }

    fn compounds(&mut self, used: &[usize]) {
        let (inp, m) = (self.inp, self.inp.model);
        let ids = &self.ids;
        let out = &mut self.out;
        let missing_conc = &mut self.missing_conc;
        let width = used.iter().map(|&sp| ids[sp].len()).max().unwrap_or(0);
        for &sp in used {
            let s = &m.species[sp];
            let kind = inp.kinds[sp];
            let mut fields = vec![format!("name = {}", quote(&s.name))];
            let mut comments: Vec<String> = Vec::new();
            if kind == Kind::Water {
                fields.push("role = \"solvent\"".into());
            } else {
                match inp.opts.conc.as_ref().and_then(|t| t.get(m, sp)) {
                    Some(row) => fields.push(format!("conc = {}", quote(&row.conc.text()))),
                    None => {
                        fields.push("conc = \"?\"".into());
                        comments.push("conc not in the table: fill it in".into());
                        missing_conc.push(ids[sp].clone());
                    }
                }
                if kind == Kind::Currency {
                    fields.push("role = \"currency\"".into());
                }
            }
            if let Some(c) = s.charge {
                fields.push(format!("charge = {}", number(c)));
            }
            if let Some(h) = s.formula.as_deref().and_then(hydrogens) {
                fields.push(format!("hydrogens = {}", number(h)));
            }
            if let Some((_, makers)) = inp.net.branches.iter().find(|(b, _)| *b == sp) {
                fields.push("branch = true".into());
                let names: Vec<&str> = makers
                    .iter()
                    .take(5)
                    .map(|&r| m.reactions[r].id.as_str())
                    .collect();
                let more = if makers.len() > 5 {
                    format!(" and {} more", makers.len() - 5)
                } else {
                    String::new()
                };
                comments.push(format!("branch point: {}{more}", names.join(", ")));
            }
            let comment = if comments.is_empty() {
                String::new()
            } else {
                format!("   # {}", comments.join("; "))
            };
            let _ = writeln!(
                out,
                "{:<width$} = {{ {} }}{comment}",
                ids[sp],
                fields.join(", ")
            );
        }
    }

    fn step(&mut self, st: &StepOut) {
        let (inp, m) = (self.inp, self.inp.model);
        let ids = &self.ids;
        let r = &m.reactions[st.reaction];
        let id = self.rids[st.reaction].clone();
        let sign = if st.flipped { -1.0 } else { 1.0 };
        let side = |want: f64| {
            r.stoich
                .iter()
                .filter(|&&(sp, v)| inp.kinds[sp] != Kind::Proton && v * sign * want > 0.0)
                .map(|&(sp, v)| term(v.abs(), &ids[sp]))
                .collect::<Vec<_>>()
                .join(" + ")
        };
        let protons: f64 = r
            .stoich
            .iter()
            .filter(|&&(sp, _)| inp.kinds[sp] == Kind::Proton)
            .map(|&(_, v)| v * sign)
            .sum();
        let reaction = format!("{} -> {}", side(-1.0), side(1.0));
        self.out.push_str("\n[[steps]]\n");
        self.step_comments(st, &id);
        let out = &mut self.out;
        let _ = writeln!(out, "id = {}", quote(&id));
        if !r.name.is_empty() {
            let _ = writeln!(out, "enzyme = {}", quote(&r.name));
        }
        let _ = writeln!(out, "reaction = {}", quote(&reaction));
        self.dg0_lines(st, &id);
        self.protons(st, &id, protons);
        let out = &mut self.out;
        if let Some(of) = &st.bypass_of {
            let extra = if st.undoes_more.is_empty() {
                String::new()
            } else {
                format!(
                    "; it also undoes {}, which still run backward in the reverse route",
                    st.undoes_more.join(", ")
                )
            };
            let _ = writeln!(
                out,
                "bypass_of = {}   # undoes {of}: a reaction of the model that runs it backward{extra}",
                quote(of)
            );
        }
    }

    /// The comments above a step (turned from the model's direction, crossing
    /// compartments), with their notes.
    fn step_comments(&mut self, st: &StepOut, id: &str) {
        let m = self.inp.model;
        let (out, notes) = (&mut self.out, &mut self.notes);
        let r = &m.reactions[st.reaction];
        if st.flipped {
            let _ = writeln!(
                out,
                "# runs the other way from the model, which writes it {}",
                m.equation(r)
            );
            if !r.reversible {
                let _ = writeln!(
                    out,
                    "# (the model marks it irreversible in its written direction)"
                );
                notes.push(format!(
                    "step '{id}' runs against the direction the model allows (irreversible there)"
                ));
            }
        }
        let compartments: BTreeSet<&str> = r
            .stoich
            .iter()
            .map(|&(sp, _)| m.species[sp].compartment.as_str())
            .collect();
        if compartments.len() > 1 {
            let list: Vec<&str> = compartments.into_iter().collect();
            let _ = writeln!(
                out,
                "# transport between compartments {}: its dg0 must include the membrane terms (not modelled yet)",
                list.join(" and ")
            );
            notes.push(format!(
                "step '{id}' crosses compartments ({}): its dg0 must include the membrane terms",
                list.join(", ")
            ));
        }
    }

    /// `dg0` (and `dg0_sd`) from the table, negated for a flipped step, or "?".
    fn dg0_lines(&mut self, st: &StepOut, id: &str) {
        let (inp, m) = (self.inp, self.inp.model);
        let out = &mut self.out;
        let missing_dg0 = &mut self.missing_dg0;
        match inp
            .opts
            .dg0
            .as_ref()
            .and_then(|t| t.get(m, st.reaction).map(|row| (t, row)))
        {
            Some((t, row)) => {
                let (v, how) = if st.flipped {
                    (
                        row.dg0.negated(),
                        format!(
                            "{} line {}, negated (the model writes it the other way)",
                            t.file, row.dg0.line
                        ),
                    )
                } else {
                    (row.dg0.clone(), format!("{} line {}", t.file, row.dg0.line))
                };
                let _ = writeln!(out, "dg0 = {}   # {how}", quote(&v.text()));
                if let Some(sd) = &row.dg0_sd {
                    let _ = writeln!(out, "dg0_sd = {}", quote(&sd.text()));
                }
            }
            None => {
                let why = if inp.opts.dg0.is_some() {
                    "not in the dg0 table"
                } else {
                    "no dg0 table given"
                };
                let _ = writeln!(
                    out,
                    "dg0 = \"?\"   # {why}: write this step's dG'° as it runs here"
                );
                missing_dg0.push(id.to_string());
            }
        }
    }

    /// `protons` from the model's H+. When every reactant has charge and
    /// hydrogens, the file's loader counts protons from them (−Σ ν nH, water
    /// nH 2); if the model's reaction is not balanced in hydrogen the two
    /// disagree, and the H+ count is kept as a comment so the file still loads.
    fn protons(&mut self, st: &StepOut, id: &str, protons: f64) {
        let (inp, m) = (self.inp, self.inp.model);
        let r = &m.reactions[st.reaction];
        let sign = if st.flipped { -1.0 } else { 1.0 };
        let counted: Option<f64> = r
            .stoich
            .iter()
            .filter(|&&(sp, _)| inp.kinds[sp] != Kind::Proton)
            .map(|&(sp, v)| {
                let s = &m.species[sp];
                let nh = if inp.kinds[sp] == Kind::Water {
                    Some(2.0)
                } else {
                    s.charge.and(s.formula.as_deref().and_then(hydrogens))
                };
                nh.map(|h| -h * v * sign)
            })
            .sum();
        match counted {
            Some(c) if (c - protons).abs() > 1e-9 => {
                let _ = writeln!(
                    self.out,
                    "# protons = {}: the model's H+; left out because the model's reaction is not balanced in hydrogen\n# (its reactants' hydrogens give {}, which dgpath uses): check the model",
                    number(protons),
                    number(c)
                );
                self.notes.push(format!(
                    "step '{id}': the model's reaction is not balanced in hydrogen (H+ gives {}, the reactants' hydrogens {})",
                    number(protons),
                    number(c)
                ));
            }
            _ if protons != 0.0 => {
                let _ = writeln!(
                    self.out,
                    "protons = {}   # from the model's H+",
                    number(protons)
                );
            }
            _ => {}
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ids_the_format_accepts_and_keeps_apart() {
        assert_eq!(file_id("13dpg_c", "c"), "13dpg_c");
        assert_eq!(file_id("__x", "c"), "x");
        assert_eq!(file_id("12", "c"), "c12");
        assert_eq!(file_id("a.b", "c"), "a_b");
        assert_eq!(
            unique_ids(["a.b", "a_b", "_a_b", "z"].into_iter(), "c"),
            ["a_b", "a_b_2", "a_b_3", "z"]
        );
        assert!(crate::model::reaction::valid_id(&file_id("1e5", "c")));
    }

    #[test]
    fn quoting_escapes() {
        assert_eq!(quote("a \"b\" \\ c\n"), "\"a \\\"b\\\" \\\\ c\\n\"");
    }
}
