//! The Markdown rendering: the per-step table (every column unless chosen),
//! totals, coupled groups, the net per pass, verdicts and notes.

use super::columns::{self, CellOptions, Column};
use super::table::{control_legend, legend, summary_lines};
use crate::analysis::{Analysis, Prepared, control};
use crate::present::{Align, EnergyUnit, clean, fig3, verdict_words};
use crate::scenario::State;

/// A Markdown table row; `|` inside a cell is escaped.
pub fn md_row(cells: &[String]) -> String {
    let cells: Vec<String> = cells.iter().map(|c| c.trim().replace('|', "\\|")).collect();
    format!("| {} |\n", cells.join(" | "))
}

/// The rule under a Markdown header: `---:` for numbers.
pub fn md_rule(al: &[Align]) -> String {
    let parts: Vec<&str> = al
        .iter()
        .map(|a| match a {
            Align::Left => "---",
            Align::Right => "---:",
        })
        .collect();
    format!("|{}|\n", parts.join("|"))
}

/// A Markdown report with every column.
pub fn markdown(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> String {
    markdown_with(prep, state, a, u, &columns::ALL)
}

/// A Markdown report with these columns.
pub fn markdown_with(
    prep: &Prepared,
    state: &State,
    a: &Analysis,
    u: EnergyUnit,
    cols: &[Column],
) -> String {
    let p = &prep.pathway;
    let c = &state.conditions;
    let mut out = format!(
        "## {}\n\n{} route, {:.2} °C, pH {}, I = {} M; energies in {} per turn of the step\n\n",
        p.name,
        a.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength,
        u.label()
    );
    let co = CellOptions {
        unit: u,
        ascii: false,
        enzyme_width: None,
    };
    let rows = columns::grid(prep, a, cols, co);
    let al: Vec<Align> = cols.iter().map(|c| c.align()).collect();
    for (i, r) in rows.iter().enumerate() {
        out.push_str(&md_row(r));
        if i == 0 {
            out.push_str(&md_rule(&al));
        }
    }
    out.push('\n');
    for l in summary_lines(prep, a, u) {
        let (head, rest) = l.split_once(": ").unwrap_or((l.as_str(), ""));
        out.push_str(&format!("- **{head}:** {rest}\n"));
    }
    if !a.control.is_empty() {
        out.push_str("\n### Control\n\n");
        for v in &a.control {
            let est = a
                .control_estimate
                .coefficient(v.position)
                .map_or(String::new(), |c| {
                    format!(" (flux control estimate {})", fig3(clean(c)))
                });
            out.push_str(&format!(
                "- **{}** {}{est}: {}\n",
                p.steps[a.steps[v.position].step].id,
                verdict_words(v.kind),
                crate::present::reasons(v, u).join("; ")
            ));
        }
    }
    for n in crate::present::notes(a, u) {
        out.push_str(&format!("\n> note: {n}\n"));
    }
    out.push_str(&format!(
        "\n_{}{}{}_\n",
        legend(cols).replace('\n', " "),
        control_legend(a).replace('\n', " "),
        control::CAUTION
    ));
    out
}
