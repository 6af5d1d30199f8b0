//! The aligned text table for people, with colour on a terminal.

use crate::analysis::{Analysis, Class, Prepared, StepResult, control};
use crate::model::units;
use crate::present::{EnergyUnit, class_symbol, clean, headline, sci, sd_partial, verdict_symbol};
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

/// Share of forward flux undone by the reverse, as a percentage (only for downhill steps).
fn undone(s: &StepResult, rt: f64) -> String {
    match s.reverse_share(rt) {
        Some(r) => format!("{:.1} %", r * 100.0),
        None => "-".into(),
    }
}

/// The aligned table with verdicts, notes and the closing caution.
pub fn table(prep: &Prepared, state: &State, a: &Analysis, o: TextOptions) -> String {
    let p = &prep.pathway;
    let u = o.unit;
    let c = &state.conditions;
    let mut out = String::new();
    out.push_str(&headline(&p.name, a.direction, c));
    let ul = u.label();
    let head = vec![
        "step".to_string(),
        "enzyme".to_string(),
        "turns".to_string(),
        format!("dG'° [{ul}]"),
        format!("dG' [{ul}]"),
        format!("± sd [{ul}]"),
        "Q".to_string(),
        "K'".to_string(),
        "J+/J-".to_string(),
        "undone".to_string(),
        "enzyme x".to_string(),
        "class".to_string(),
        "share".to_string(),
        format!("cumul. [{ul}]"),
        "verdict".to_string(),
        "control".to_string(),
        "5–95 %".to_string(),
    ];
    // The cells both kinds of rows share: energies, ratios, flux-force, class.
    let middle = |s: &StepResult| -> Vec<String> {
        vec![
            format!("{:.2}", clean(u.of(s.dg0))),
            format!("{:.2}", clean(u.of(s.dg))),
            s.dg_sd
                .map(|v| format!("{:.2}", u.of(v)))
                .unwrap_or_else(|| "-".into()),
            sci(s.q()),
            sci(s.keq()),
            sci(s.flux_ratio(a.rt)),
            undone(s, a.rt),
            s.enzyme_factor(a.rt)
                .map(|f| format!("{f:.3}"))
                .unwrap_or_else(|| "-".into()),
            format!(
                "{} {}{}",
                class_symbol(s.class, o.ascii),
                s.class.as_str(),
                if s.class_sure { "" } else { "?" }
            ),
        ]
    };
    let mut rows: Vec<(Vec<String>, Option<Class>)> = Vec::new();
    for (k, s) in a.steps.iter().enumerate() {
        let st = &p.steps[s.step];
        let mut id = st.id.clone();
        if a.largest_drop == Some(k) {
            id.push_str(if o.ascii { " <largest" } else { " ◀largest" });
        }
        if s.against {
            id.push_str(if o.ascii {
                " !backward"
            } else {
                " ⇄backward"
            });
        }
        if s.sign < 0.0 {
            id.push_str(" (rev)");
        }
        if let Some(r) = s.replaces {
            id.push_str(&format!(" (for {})", p.steps[r].id));
        }
        let verdict = match s.verdict {
            Some(v) => verdict_symbol(a.control[v].kind, o.ascii).to_string(),
            None => String::new(),
        };
        let mut cells = vec![
            id,
            st.enzyme.clone().unwrap_or_default(),
            units::sig3(s.times),
        ];
        cells.extend(middle(s));
        cells.push(if s.share > 0.0 {
            format!("{:.0} %", s.share * 100.0)
        } else {
            String::new()
        });
        cells.push(format!("{:.2}", clean(u.of(s.cumulative))));
        cells.push(verdict);
        let est = &a.control_estimate;
        cells.push(est.coefficient(k).map_or("-".into(), |c| format!("{c:.3}")));
        cells.push(est.range(k).map_or(String::new(), |(lo, hi)| {
            format!("{lo:.3}{}{hi:.3}", if o.ascii { "-" } else { "–" })
        }));
        rows.push((cells, Some(s.class)));
    }
    for s in &a.side {
        let st = &p.steps[s.step];
        let mut cells = vec![
            format!("{} (side)", st.id),
            st.enzyme.clone().unwrap_or_default(),
            String::new(),
        ];
        cells.extend(middle(s));
        cells.extend(std::iter::repeat_n(String::new(), 5));
        rows.push((cells, Some(s.class)));
    }
    let ncol = head.len();
    let mut w = vec![0usize; ncol];
    for (i, h) in head.iter().enumerate() {
        w[i] = h.chars().count();
    }
    for (r, _) in &rows {
        for (i, cell) in r.iter().enumerate() {
            w[i] = w[i].max(cell.chars().count());
        }
    }
    let numeric = [
        false, false, true, true, true, true, true, true, true, true, true, false, true, true,
        false, true, false,
    ];
    let class_col = 11;
    let fmt_row = |cells: &[String]| -> Vec<String> {
        cells
            .iter()
            .enumerate()
            .map(|(i, cell)| {
                let pad = w[i] - cell.chars().count();
                if numeric[i] {
                    format!("{}{}", " ".repeat(pad), cell)
                } else {
                    format!("{}{}", cell, " ".repeat(pad))
                }
            })
            .collect()
    };
    out.push_str(fmt_row(&head).join("  ").trim_end());
    out.push('\n');
    out.push_str(&"-".repeat(w.iter().sum::<usize>() + 2 * (ncol - 1)));
    out.push('\n');
    for (r, cls) in &rows {
        let mut cells = fmt_row(r);
        if let Some(cl) = cls {
            cells[class_col] = paint(&cells[class_col], class_color(*cl), o.color);
        }
        out.push_str(cells.join("  ").trim_end());
        out.push('\n');
    }
    out.push_str(&format!(
        "\ntotal: dG'° {:.2} {ul}, dG' {:.2} {ul}{}",
        clean(u.of(a.total_dg0)),
        clean(u.of(a.total_dg)),
        a.total_sd
            .map(|s| format!(" ± {:.2}{}", u.of(s), sd_partial(a)))
            .unwrap_or_default()
    ));
    if let Some(k) = a.largest_drop {
        out.push_str(&format!(
            "; largest drop: {} ({:.0} % of the drop)",
            p.steps[a.steps[k].step].id,
            a.steps[k].share * 100.0
        ));
    }
    out.push('\n');
    for g in &a.groups {
        let ids: Vec<&str> = g
            .members
            .iter()
            .map(|&m| p.steps[a.steps[m].step].id.as_str())
            .collect();
        out.push_str(&format!(
            "coupled: {} together dG' {:.2} {ul}\n",
            ids.join(" + "),
            clean(u.of(g.dg))
        ));
    }
    let net: Vec<String> = a
        .net
        .iter()
        .map(|&(ci, v)| {
            format!(
                "{} {}{}",
                p.compounds[ci].id,
                if v > 0.0 { "+" } else { "" },
                units::sig3(clean(v))
            )
        })
        .collect();
    out.push_str(&format!("net per pass: {}\n", net.join(", ")));
    if !a.needs_bypass.is_empty() {
        out.push_str("\nneeds a bypass (uphill in reverse, none given):\n");
        for n in &a.needs_bypass {
            out.push_str(&format!(
                "  {} lacks {:.2} {ul} per turn\n",
                p.steps[a.steps[n.position].step].id,
                u.of(n.lacks)
            ));
        }
    }
    if a.direction == crate::analysis::Direction::Reverse {
        for (k, s) in a.steps.iter().enumerate() {
            if let Some(r) = s.replaces {
                out.push_str(&format!(
                    "bypass {} replaces {}{}\n",
                    p.steps[s.step].id,
                    p.steps[r].id,
                    if a.counterpart == Some(k) {
                        " — counterpart of the forward prime step"
                    } else {
                        ""
                    }
                ));
            }
        }
    }
    if !a.control.is_empty() {
        out.push_str("\ncontrol:\n");
        for v in &a.control {
            let id = &p.steps[a.steps[v.position].step].id;
            let est = match a.control_estimate.coefficient(v.position) {
                Some(c) => format!("   flux control estimate {c:.3}"),
                None => String::new(),
            };
            out.push_str(&format!(
                "  {} {}{est}\n",
                id,
                verdict_symbol(v.kind, o.ascii)
            ));
            for r in &v.reasons {
                out.push_str(&format!("      {r}\n"));
            }
        }
    }
    if !a.notes.is_empty() {
        out.push('\n');
        for n in &a.notes {
            out.push_str(&format!("note: {n}\n"));
        }
    }
    out.push_str(&format!(
        "\nundone: share of forward flux undone by the reverse flux, e^(dG'/RT); enzyme x: enzyme needed relative to an irreversible step, 1/(1 - e^(dG'/RT)).\n{}{}\n",
        control_legend(a),
        control::CAUTION
    ));
    out
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
