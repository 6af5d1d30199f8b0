//! Presentation shared by the front ends (report, explorer, plot): the energy
//! unit a person asked for, the class and verdict symbols, number formats and
//! the reaction as it runs. Front ends use this module, never each other.

use crate::analysis::{Analysis, Class, EnergyNote, Prepared, StepResult, VerdictKind};
use crate::analysis::{Reason, Verdict};
use crate::model::Conditions;
use crate::scenario::Direction;

/// Energy unit for output.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum EnergyUnit {
    /// kJ/mol (the default).
    #[default]
    KJ,
    /// kcal/mol.
    Kcal,
}

impl EnergyUnit {
    /// Converts J/mol to this unit.
    pub fn of(self, j: f64) -> f64 {
        match self {
            EnergyUnit::KJ => j / 1e3,
            EnergyUnit::Kcal => j / 4184.0,
        }
    }
    /// "kJ/mol" or "kcal/mol".
    pub fn label(self) -> &'static str {
        match self {
            EnergyUnit::KJ => "kJ/mol",
            EnergyUnit::Kcal => "kcal/mol",
        }
    }
}

/// Symbol for a class, so meaning never rests on colour alone.
pub fn class_symbol(c: Class, ascii: bool) -> &'static str {
    match (c, ascii) {
        (Class::Far, false) => "▼",
        (Class::Moderate, false) => "↘",
        (Class::Near, false) => "≈",
        (Class::Uphill, false) => "▲",
        (Class::Far, true) => "v",
        (Class::Moderate, true) => "\\",
        (Class::Near, true) => "~",
        (Class::Uphill, true) => "^",
    }
}

/// Short marker for a verdict.
pub fn verdict_symbol(v: VerdictKind, ascii: bool) -> &'static str {
    match (v, ascii) {
        (VerdictKind::Prime, false) => "◆ control point",
        (VerdictKind::Candidate, false) => "◇ candidate",
        (VerdictKind::NotHere, false) => "· not here",
        (VerdictKind::Prime, true) => "* control point",
        (VerdictKind::Candidate, true) => "o candidate",
        (VerdictKind::NotHere, true) => "- not here",
    }
}

/// A verdict in words, without its symbol ("control point", "candidate", "not here").
pub fn verdict_words(v: VerdictKind) -> &'static str {
    match v {
        VerdictKind::Prime => "control point",
        VerdictKind::Candidate => "candidate",
        VerdictKind::NotHere => "not here",
    }
}

/// A number to `sig` significant figures with at most `max_dec` decimals,
/// in scientific notation (`1.81e4`, `3.2e-7`) when it is 10,000 or more or
/// below 0.001: the one number format of the tables and Markdown.
pub fn figures(x: f64, sig: usize, max_dec: usize) -> String {
    if !x.is_finite() {
        return if x.is_nan() {
            "nan".into()
        } else if x > 0.0 {
            "inf".into()
        } else {
            "-inf".into()
        };
    }
    if x == 0.0 {
        return "0".into();
    }
    // Round to `sig` figures first, so 0.99996 becomes 1.00 (not 1.000).
    let x: f64 = format!("{:.*e}", sig.saturating_sub(1), x)
        .parse()
        .unwrap_or(x);
    let a = x.abs();
    if !(1e-3..1e4).contains(&a) {
        let s = format!("{:.*e}", sig.saturating_sub(1), x);
        return match s.split_once('e') {
            Some((m, e)) if m.contains('.') => {
                format!("{}e{e}", m.trim_end_matches('0').trim_end_matches('.'))
            }
            _ => s,
        };
    }
    let mag = a.log10().floor() as i32;
    let dec = ((sig as i32 - 1 - mag).max(0) as usize).min(max_dec);
    let s = format!("{x:.dec$}");
    if s.trim_start_matches('-')
        .trim_matches(['0', '.'])
        .is_empty()
    {
        "0".into()
    } else {
        s
    }
}

/// A count or amount (turns, net change): three significant figures without
/// trailing zeros ("2", "0.5", "1.33").
pub fn amount(x: f64) -> String {
    let s = fig3(x);
    match s.split_once('e') {
        None if s.contains('.') => s.trim_end_matches('0').trim_end_matches('.').to_string(),
        _ => s,
    }
}

/// Wraps prose at `width` characters, keeping its leading blanks; lines after
/// the first start with `indent`.
pub fn wrap(text: &str, width: usize, indent: &str) -> String {
    let body = text.trim_start();
    let mut line = text[..text.len() - body.len()].to_string();
    let start = line.len();
    let mut out = String::new();
    for word in body.split_whitespace() {
        let len = line.chars().count();
        if len > start && len + 1 + word.chars().count() > width {
            out.push_str(&line);
            out.push('\n');
            line = indent.to_string();
        } else if len > start {
            line.push(' ');
        }
        line.push_str(word);
    }
    out.push_str(&line);
    out
}

/// Three significant figures (ratios, factors, coefficients).
pub fn fig3(x: f64) -> String {
    figures(x, 3, 12)
}

/// An energy in the unit asked for: three significant figures, at most two
/// decimals, float and solver noise rounded away.
pub fn energy3(x: f64) -> String {
    figures(clean(x), 3, 2)
}

/// A number at full precision for CSV: the shortest text that reads back to
/// the same value, in scientific notation when very large or very small.
pub fn full(x: f64) -> String {
    if !x.is_finite() {
        return String::new();
    }
    let x = if x == 0.0 { 0.0 } else { x };
    let a = x.abs();
    if a != 0.0 && !(1e-4..1e15).contains(&a) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

/// How a column of an aligned table is justified.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text: padded on the right.
    Left,
    /// Numbers: padded on the left.
    Right,
}

/// Pads every cell to its column's width (in characters); the one table
/// aligner of the text outputs. Rows may be shorter than `align`.
pub fn align(rows: &[Vec<String>], align: &[Align]) -> Vec<Vec<String>> {
    let mut w = vec![0usize; align.len()];
    for r in rows {
        for (i, c) in r.iter().enumerate().take(w.len()) {
            w[i] = w[i].max(c.chars().count());
        }
    }
    rows.iter()
        .map(|r| {
            r.iter()
                .enumerate()
                .take(w.len())
                .map(|(i, c)| {
                    let fill = " ".repeat(w[i] - c.chars().count());
                    match align[i] {
                        Align::Left => format!("{c}{fill}"),
                        Align::Right => format!("{fill}{c}"),
                    }
                })
                .collect()
        })
        .collect()
}

/// Aligned lines (two spaces between columns, no trailing blanks), with a rule
/// of dashes under the first row.
pub fn aligned_lines(rows: &[Vec<String>], al: &[Align]) -> String {
    let lines: Vec<String> = align(rows, al)
        .iter()
        .map(|r| r.join("  ").trim_end().to_string())
        .collect();
    let width = lines.iter().map(|l| l.chars().count()).max().unwrap_or(0);
    let mut out = String::new();
    for (i, l) in lines.iter().enumerate() {
        out.push_str(l);
        out.push('\n');
        if i == 0 {
            out.push_str(&"-".repeat(width));
            out.push('\n');
        }
    }
    out
}

/// Plain ASCII stand-ins for the symbols of the text outputs (`--ascii`);
/// any other non-ASCII character becomes `?`.
pub fn to_ascii(text: &str) -> String {
    const PAIRS: [(&str, &str); 13] = [
        ("dG'°", "dG'0"),
        ("°C", "C"),
        ("°", " deg"),
        ("—", "-"),
        ("–", "-"),
        ("−", "-"),
        ("±", "+/-"),
        ("≥", ">="),
        ("≤", "<="),
        ("…", "..."),
        ("µ", "u"),
        ("×", "x"),
        ("→", "->"),
    ];
    let mut s = text.to_string();
    for (from, to) in PAIRS {
        s = s.replace(from, to);
    }
    s.chars()
        .map(|c| if c.is_ascii() { c } else { '?' })
        .collect()
}

/// An energy in J/mol as words in the unit asked for, one decimal ("-24.7 kJ/mol").
pub fn energy_words(j: f64, u: EnergyUnit) -> String {
    format!("{:.1} {}", clean(u.of(j)), u.label())
}

/// A verdict's reason in words, energies in the unit asked for.
pub fn reason_text(r: &Reason, u: EnergyUnit) -> String {
    let e = |j: f64| energy_words(j, u);
    match r {
        Reason::LastStep { dg } => format!(
            "last step of the route (dG' = {}): by the time material reaches it, every step before has already committed it, so controlling here would only pile up intermediates",
            e(*dg)
        ),
        Reason::BranchProduct { dg, compounds } => {
            let x = compounds.join(", ");
            format!(
                "its product {x} is a branch point (dG' = {}): flux can leave or enter the route right after it, so controlling this step does not control what follows; the committed step comes after {x}",
                e(*dg)
            )
        }
        Reason::FirstFar { dg } => format!(
            "first step far from equilibrium (dG' = {}) that neither ends the route nor feeds a branch point: the committed step",
            e(*dg)
        ),
        Reason::AfterControlPoint { dg, control_point } => format!(
            "far from equilibrium (dG' = {}) with no rule against it, but {control_point} before it is already the committed step",
            e(*dg)
        ),
        Reason::BranchBetween {
            compounds,
            control_point: cp,
        } => format!(
            "branch point {} lies between {cp} and this step: flux leaving or entering there is not set by {cp}, so this step may control what reaches the end",
            compounds.join(", ")
        ),
        Reason::Unsure { half_width, other } => format!(
            "not sure: within the 95 % interval of dG' (± {}) it could be {}, and then it would get no verdict",
            e(*half_width),
            other.as_str()
        ),
        Reason::Coupled { steps, group_dg } => format!(
            "read together with {} (coupled, group dG' = {})",
            steps.join(" + "),
            e(*group_dg)
        ),
    }
}

/// A signed energy in J/mol as words, one decimal ("+3.1 kJ/mol").
fn signed_energy(j: f64, u: EnergyUnit) -> String {
    format!("{:+.1} {}", clean(u.of(j)), u.label())
}

/// A note that carries energies, in words in the unit asked for.
pub fn energy_note_text(n: &EnergyNote, u: EnergyUnit) -> String {
    match n {
        EnergyNote::Uphill {
            step,
            dg,
            group_dg: Some(g),
        } => format!(
            "{step} is uphill (dG' = {}) and its coupled group runs downhill ({}); coupling can only lower its dG' through the concentrations it sets, so at these concentrations {step} still runs backward.",
            signed_energy(*dg, u),
            signed_energy(*g, u)
        ),
        EnergyNote::Uphill { step, dg, .. } => format!(
            "{step} is uphill (dG' = {}): it cannot carry forward flux alone; unless it is coupled to a step that pays for it, the concentrations or dG'° may be inconsistent.",
            signed_energy(*dg, u)
        ),
        EnergyNote::Unsure {
            step,
            class,
            interval: (lo, hi),
            others,
        } => {
            let words: Vec<&str> = others.iter().map(|c| c.as_str()).collect();
            let then = if *class == Class::Far {
                ", and then it would get no verdict"
            } else if others.contains(&Class::Far) {
                ", and then it would get a verdict"
            } else {
                ""
            };
            format!(
                "{step} is {}, but not surely: within the 95 % interval of dG' ({:+.1} to {:+.1} {}) it could be {}{then}.",
                class.as_str(),
                clean(u.of(*lo)),
                clean(u.of(*hi)),
                u.label(),
                words.join(" or ")
            )
        }
    }
}

/// Every note of an analysis in words: the plain ones, then those with energies.
pub fn notes(a: &Analysis, u: EnergyUnit) -> Vec<String> {
    let worded = a.energy_notes.iter().map(|n| energy_note_text(n, u));
    a.notes.iter().cloned().chain(worded).collect()
}

/// All reasons of a verdict in words.
pub fn reasons(v: &Verdict, u: EnergyUnit) -> Vec<String> {
    v.reasons.iter().map(|r| reason_text(r, u)).collect()
}

/// "; 4 of 5 steps give no dg0_sd" when the total's ± leaves some dG'° out.
pub fn sd_partial(a: &Analysis) -> String {
    match a.steps_without_dg0_sd {
        0 => String::new(),
        n => format!(
            "; {n} of {} step{} give no dg0_sd",
            a.steps.len(),
            if a.steps.len() == 1 { "" } else { "s" }
        ),
    }
}

/// Rounds away solver and float noise for printing: no -0, no 1e-12 residues.
pub fn clean(x: f64) -> f64 {
    if !x.is_finite() {
        return x;
    }
    let r = (x * 1e9).round() / 1e9;
    if r == 0.0 { 0.0 } else { r }
}

/// The reaction as it runs (reversed steps have their sides swapped).
pub fn reaction_as_run(prep: &Prepared, s: &StepResult) -> String {
    let st = &prep.pathway.steps[s.step];
    if s.sign > 0.0 {
        return st.reaction.clone();
    }
    let side = |want_pos: bool| -> String {
        st.stoich
            .iter()
            .filter(|(_, nu)| (*nu * s.sign > 0.0) == want_pos)
            .map(|&(c, nu)| {
                let id = &prep.pathway.compounds[c].id;
                if (nu.abs() - 1.0).abs() < 1e-12 {
                    id.clone()
                } else {
                    format!("{} {id}", amount(nu.abs()))
                }
            })
            .collect::<Vec<_>>()
            .join(" + ")
    };
    format!("{} -> {}", side(false), side(true))
}

/// Compact number for ratios that span many decades (Q, K', J+/J−), as the
/// explorer shows them.
pub fn sci(x: f64) -> String {
    if !x.is_finite() {
        return if x > 0.0 { "inf".into() } else { "nan".into() };
    }
    if x != 0.0 && (x.abs() >= 1e4 || x.abs() < 1e-2) {
        format!("{x:.2e}")
    } else {
        format!("{x:.3}")
    }
}

/// The headline of the text renderings: name, direction and conditions
/// (with the blank line after it).
pub fn headline(name: &str, direction: Direction, c: &Conditions) -> String {
    format!(
        "{} — {} route, {:.2} °C, pH {}, I = {} M\n\n",
        name,
        direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    )
}
