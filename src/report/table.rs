//! The aligned text table for people, with colour on a terminal.

use super::columns::{self, CellOptions, Column};
use crate::analysis::{Analysis, Class, Prepared, control};
use crate::present::{
    EnergyUnit, align, amount, clean, energy3, fig3, headline, sd_partial, to_ascii,
    verdict_symbol, wrap,
};
use crate::scenario::State;

/// Options for the text renderings.
#[derive(Debug, Clone, Copy, Default)]
pub struct TextOptions {
    /// Energy unit.
    pub unit: EnergyUnit,
    /// ANSI colour.
    pub color: bool,
    /// ASCII symbols only.
    pub ascii: bool,
}

fn paint(s: &str, code: &str, on: bool) -> String {
    if on {
        format!("\x1b[{code}m{s}\x1b[0m")
    } else {
        s.to_string()
    }
}

fn class_color(c: Class) -> &'static str {
    match c {
        Class::Far => "1;31",
        Class::Moderate => "33",
        Class::Near => "32",
        Class::Uphill => "1;35",
    }
}

/// Width at which the prose under the table is wrapped.
const WRAP: usize = 100;

/// The table with the default columns (they fit 120 characters on the demo).
pub fn table(prep: &Prepared, state: &State, a: &Analysis, o: TextOptions) -> String {
    table_with(prep, state, a, o, &columns::default_for(a))
}

/// The aligned table with these columns, then totals, verdicts, notes and
/// the closing caution.
pub fn table_with(
    prep: &Prepared,
    state: &State,
    a: &Analysis,
    o: TextOptions,
    cols: &[Column],
) -> String {
    let mut out = headline(&prep.pathway.name, a.direction, &state.conditions);
    out.push_str(&format!(
        "energies in {} per turn of the step\n\n",
        o.unit.label()
    ));
    let cut = cols != columns::ALL.as_slice();
    let co = CellOptions {
        unit: o.unit,
        ascii: o.ascii,
        enzyme_width: cut.then_some(columns::ENZYME_WIDTH),
    };
    let rows = columns::grid(prep, a, cols, co);
    let al: Vec<_> = cols.iter().map(|c| c.align()).collect();
    let class_col = cols.iter().position(|&c| c == Column::Class);
    let classes: Vec<Class> = a.steps.iter().chain(&a.side).map(|s| s.class).collect();
    let padded = align(&rows, &al);
    let width = padded
        .first()
        .map_or(0, |r| r.join("  ").trim_end().chars().count());
    for (i, mut r) in padded.into_iter().enumerate() {
        if let (Some(c), true) = (class_col, i > 0) {
            r[c] = paint(&r[c], class_color(classes[i - 1]), o.color);
        }
        out.push_str(r.join("  ").trim_end());
        out.push('\n');
        if i == 0 {
            out.push_str(&"-".repeat(width.max(20)));
            out.push('\n');
        }
    }
    out.push('\n');
    for l in summary_lines(prep, a, o.unit) {
        out.push_str(&l);
        out.push('\n');
    }
    out.push_str(&control_text(prep, a, o.ascii, o.unit));
    let notes = crate::present::notes(a, o.unit);
    if !notes.is_empty() {
        out.push('\n');
        for n in &notes {
            out.push_str(&wrap(&format!("note: {n}"), WRAP, "      "));
            out.push('\n');
        }
    }
    out.push('\n');
    for l in [
        legend(cols),
        control_legend(a),
        control::CAUTION.to_string(),
    ] {
        for l in l.lines() {
            out.push_str(&wrap(l, WRAP, ""));
            out.push('\n');
        }
    }
    if o.ascii { to_ascii(&out) } else { out }
}

/// Totals, the largest drop, coupled groups, the net per pass, and in reverse
/// the bypasses and the steps that need one: one line each.
pub fn summary_lines(prep: &Prepared, a: &Analysis, u: EnergyUnit) -> Vec<String> {
    let p = &prep.pathway;
    let ul = u.label();
    let id = |k: usize| p.steps[a.steps[k].step].id.as_str();
    let mut out = Vec::new();
    let mut total = format!(
        "total: dG'° {} {ul}, dG' {} {ul}{}",
        energy3(u.of(a.total_dg0)),
        energy3(u.of(a.total_dg)),
        a.total_sd
            .map(|s| format!(" ± {}{}", energy3(u.of(s)), sd_partial(a)))
            .unwrap_or_default()
    );
    if let Some(k) = a.largest_drop {
        total.push_str(&format!(
            "; largest drop: {} ({:.0} % of the drop)",
            id(k),
            a.steps[k].share * 100.0
        ));
    }
    out.push(total);
    for g in &a.groups {
        let ids: Vec<&str> = g.members.iter().map(|&m| id(m)).collect();
        out.push(format!(
            "coupled: {} together dG' {} {ul}{}",
            ids.join(" + "),
            energy3(u.of(g.dg)),
            g.dg_sd
                .map(|s| format!(" ± {}", energy3(u.of(s))))
                .unwrap_or_default()
        ));
    }
    let net: Vec<String> = a
        .net
        .iter()
        .map(|&(ci, v)| {
            let sign = if v > 0.0 { "+" } else { "" };
            format!("{} {sign}{}", p.compounds[ci].id, amount(v))
        })
        .collect();
    out.push(format!("net per pass: {}", net.join(", ")));
    for n in &a.needs_bypass {
        out.push(format!(
            "needs a bypass: {} is uphill in reverse and lacks {} {ul} per turn",
            id(n.position),
            energy3(u.of(n.lacks))
        ));
    }
    if a.direction == crate::analysis::Direction::Reverse {
        for (k, s) in a.steps.iter().enumerate() {
            if let Some(r) = s.replaces {
                let twin = if a.counterpart == Some(k) {
                    " — counterpart of the forward control point"
                } else {
                    ""
                };
                out.push(format!("bypass {} replaces {}{twin}", id(k), p.steps[r].id));
            }
        }
    }
    out
}

/// The verdicts with their reasons and flux control estimates.
fn control_text(prep: &Prepared, a: &Analysis, ascii: bool, u: EnergyUnit) -> String {
    if a.control.is_empty() {
        return String::new();
    }
    let mut out = String::from("\ncontrol:\n");
    for v in &a.control {
        let id = &prep.pathway.steps[a.steps[v.position].step].id;
        let est = match a.control_estimate.coefficient(v.position) {
            Some(c) => format!("   flux control estimate {}", fig3(clean(c))),
            None => String::new(),
        };
        out.push_str(&format!("  {id} {}{est}\n", verdict_symbol(v.kind, ascii)));
        for r in crate::present::reasons(v, u) {
            out.push_str(&wrap(&format!("      {r}"), WRAP, "      "));
            out.push('\n');
        }
    }
    out
}

/// What the shown columns whose names are short mean.
pub fn legend(cols: &[Column]) -> String {
    let mut parts = Vec::new();
    if cols.contains(&Column::ReverseShare) {
        parts.push(
            "reverse share: share of the forward flux undone by the reverse flux, e^(dG'/RT)",
        );
    }
    if cols.contains(&Column::EnzymeFactor) {
        parts.push(
            "enzyme factor: enzyme needed relative to an irreversible step, 1/(1 - e^(dG'/RT))",
        );
    }
    if cols.contains(&Column::Times) {
        parts.push("per pass: turns of the step per pass of the route");
    }
    if cols.contains(&Column::Verdict) {
        parts.push("verdict: control point (the committed step), candidate or not here");
    }
    if parts.is_empty() {
        String::new()
    } else {
        format!("{}.\n", parts.join("; "))
    }
}

/// What the control columns mean, with the number of saturation draws.
pub fn control_legend(a: &Analysis) -> String {
    let est = &a.control_estimate;
    let range = if est.draws > 0 {
        format!(
            "; 5–95 %: its range over {} random saturations of the enzymes (fixed seed; the mass-action value assumes none, so it can lie outside the range)",
            est.draws
        )
    } else {
        String::new()
    };
    format!(
        "control: flux control coefficient estimated from each step's dG' (mass action, no regulation){range}.\n"
    )
}
