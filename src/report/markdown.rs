//! The Markdown rendering: a table with verdicts and notes.

use crate::analysis::{Analysis, Prepared, control};
use crate::model::units;
use crate::present::{EnergyUnit, class_symbol, clean, sd_partial};
use crate::scenario::State;

/// A Markdown table with verdicts and notes.
pub fn markdown(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> String {
    let p = &prep.pathway;
    let ul = u.label();
    let c = &state.conditions;
    let mut out = format!(
        "## {}\n\n{} route, {:.2} °C, pH {}, I = {} M\n\n| step | enzyme | turns | dG'° [{ul}] | dG' [{ul}] | class | share | cumulative [{ul}] | verdict | control | 5–95 % |\n|---|---|---:|---:|---:|---|---:|---:|---|---:|---|\n",
        p.name,
        a.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    );
    for (k, s) in a.steps.iter().enumerate() {
        let st = &p.steps[s.step];
        out.push_str(&format!(
            "| {}{}{} | {} | {} | {:.2} | {:.2} | {} {} | {} | {:.2} | {} | {} | {} |\n",
            st.id,
            if s.against {
                " ⇄ **runs backward**"
            } else {
                ""
            },
            if a.largest_drop == Some(k) {
                " **(largest drop)**"
            } else {
                ""
            },
            st.enzyme.clone().unwrap_or_default(),
            units::sig3(s.times),
            clean(u.of(s.dg0)),
            clean(u.of(s.dg)),
            class_symbol(s.class, false),
            s.class.as_str(),
            if s.share > 0.0 {
                format!("{:.0} %", s.share * 100.0)
            } else {
                String::new()
            },
            clean(u.of(s.cumulative)),
            s.verdict.map(|v| a.control[v].kind.as_str()).unwrap_or(""),
            a.control_estimate
                .coefficient(k)
                .map_or("-".into(), |c| format!("{c:.3}")),
            a.control_estimate
                .range(k)
                .map_or(String::new(), |(lo, hi)| format!("{lo:.3}–{hi:.3}"))
        ));
    }
    out.push_str(&format!(
        "\n**Total:** dG'° {:.2} {ul}, dG' {:.2} {ul}{}\n",
        clean(u.of(a.total_dg0)),
        clean(u.of(a.total_dg)),
        a.total_sd
            .map(|s| format!(" ± {:.2}{}", u.of(s), sd_partial(a)))
            .unwrap_or_default()
    ));
    if !a.control.is_empty() {
        out.push_str("\n### Control\n\n");
        for v in &a.control {
            out.push_str(&format!(
                "- **{}** `{}`: {}\n",
                p.steps[a.steps[v.position].step].id,
                v.kind.as_str(),
                v.reasons.join("; ")
            ));
        }
    }
    for n in &a.notes {
        out.push_str(&format!("\n> note: {n}\n"));
    }
    out.push_str(&format!(
        "\n_{}{}_\n",
        crate::report::table::control_legend(a).replace('\n', " "),
        control::CAUTION
    ));
    out
}
