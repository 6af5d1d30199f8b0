//! The driving-force optimisation as CSV (one row per route step) and as
//! Markdown (the MDF, a step table and a compound table).

use super::markdown::{md_row, md_rule};
use super::mdf::{BOTTLENECK_CAUTION, gain_per_decade};
use crate::analysis::Prepared;
use crate::analysis::mdf::{Bound, Mdf, Part};
use crate::present::{Align, EnergyUnit, clean, energy3, fig3, full};
use crate::scenario::State;

/// `mdf --format csv`: one row per route step with its standard energy,
/// driving force at the optimum and shadow price; energy headers carry the unit.
pub fn mdf_csv(prep: &Prepared, m: &Mdf, u: EnergyUnit) -> String {
    let ul = u.label();
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record([
        "step".to_string(),
        "enzyme".to_string(),
        format!("dg0 [{ul}]"),
        format!("driving_force [{ul}]"),
        "price".to_string(),
        "bottleneck".to_string(),
        format!("mdf [{ul}]"),
    ]);
    for k in 0..m.steps.len() {
        let st = &prep.pathway.steps[m.steps[k]];
        let _ = w.write_record([
            st.id.clone(),
            st.enzyme.clone().unwrap_or_default(),
            full(clean(u.of(m.dg0[k]))),
            full(clean(u.of(m.driving_forces[k]))),
            full(clean(m.prices[k])),
            m.bottlenecks.contains(&k).to_string(),
            full(clean(u.of(m.value))),
        ]);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

fn conc_text(c: f64) -> String {
    super::mdf::conc_text(c, false)
}

/// `mdf --format md`: the MDF, the steps, the limiting bounds and the compounds.
pub fn mdf_markdown(prep: &Prepared, state: &State, m: &Mdf, u: EnergyUnit) -> String {
    let p = &prep.pathway;
    let ul = u.label();
    let c = &state.conditions;
    let mut out = format!(
        "## {} — max-min driving force\n\n{} route, {:.2} °C, pH {}, I = {} M\n\n**MDF: {} {ul}**{}\n\n",
        p.name,
        m.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength,
        energy3(u.of(m.value)),
        if m.feasible() {
            " — every route step can drop by at least this much within the bounds"
        } else {
            " — no concentrations within the bounds let the whole route run"
        }
    );
    out.push_str(&md_row(&[
        "step".into(),
        "enzyme".into(),
        format!("dG'° [{ul}]"),
        format!("-dG' at optimum [{ul}]"),
        "price".into(),
        "bottleneck".into(),
    ]));
    out.push_str(&md_rule(&[
        Align::Left,
        Align::Left,
        Align::Right,
        Align::Right,
        Align::Right,
        Align::Left,
    ]));
    for k in 0..m.steps.len() {
        let st = &p.steps[m.steps[k]];
        out.push_str(&md_row(&[
            st.id.clone(),
            st.enzyme.clone().unwrap_or_default(),
            energy3(u.of(m.dg0[k])),
            energy3(u.of(m.driving_forces[k])),
            fig3(clean(m.prices[k])),
            if m.bottlenecks.contains(&k) {
                "yes".into()
            } else {
                String::new()
            },
        ]));
    }
    out.push('\n');
    for &(ci, b, price) in &m.limiting {
        let (at, dir) = match b {
            Bound::Lower => (m.bounds[ci].0, "lower"),
            Bound::Upper => (m.bounds[ci].1, "upper"),
        };
        out.push_str(&format!(
            "- **{}** at its {dir} bound {}: MDF +{} {ul} per 10-fold wider bound\n",
            p.compounds[ci].id,
            conc_text(at),
            energy3(u.of(gain_per_decade(m, price)))
        ));
    }
    out.push_str(&compound_table(prep, m));
    out.push_str(&format!("\n_{BOTTLENECK_CAUTION}_\n"));
    out
}

/// Bounds, optimum and range of each compound the optimisation saw.
fn compound_table(prep: &Prepared, m: &Mdf) -> String {
    let mut out = String::from("\n");
    out.push_str(&md_row(&[
        "compound".into(),
        "bounds".into(),
        "at optimum".into(),
        "range while the MDF holds".into(),
        "range where the route can run".into(),
    ]));
    out.push_str(&md_rule(&[
        Align::Left,
        Align::Left,
        Align::Right,
        Align::Left,
        Align::Left,
    ]));
    for ci in (0..m.parts.len()).filter(|&c| m.parts[c] != Part::Absent) {
        let held = m.parts[ci] == Part::Held;
        let range = |lo: f64, hi: f64| format!("{} to {}", conc_text(lo), conc_text(hi));
        out.push_str(&md_row(&[
            prep.pathway.compounds[ci].id.clone(),
            if held {
                "held".into()
            } else {
                range(m.bounds[ci].0, m.bounds[ci].1)
            },
            conc_text(m.conc[ci]),
            match (&m.ranges, held) {
                (_, true) => "held".into(),
                (Some(r), false) => range(r[ci].0, r[ci].1),
                (None, false) => String::new(),
            },
            match (&m.feasible_ranges, held) {
                (_, true) => "held".into(),
                (Some(r), false) => range(r[ci].0, r[ci].1),
                (None, false) => String::new(),
            },
        ]));
    }
    out
}
