//! Renderings of an `Analysis`: aligned table, JSON (a contract, see
//! shared/design/cli.md), CSV and Markdown. Nothing here computes results.

pub mod mdf;
pub mod samples;

use crate::analysis::{Analysis, Class, Prepared, StepResult, VerdictKind, control};
use crate::model::units;
use crate::scenario::State;
use serde_json::{Map, Value, json};

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
        (VerdictKind::Prime, false) => "◆ prime",
        (VerdictKind::Candidate, false) => "◇ candidate",
        (VerdictKind::NotHere, false) => "· not here",
        (VerdictKind::Prime, true) => "* prime",
        (VerdictKind::Candidate, true) => "o candidate",
        (VerdictKind::NotHere, true) => "- not here",
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

/// A ratio that may span many decades: kept as is (only -0 becomes 0).
fn ratio(x: f64) -> Value {
    if x.is_finite() {
        json!(if x == 0.0 { 0.0 } else { x })
    } else {
        Value::Null
    }
}

fn num(x: f64) -> Value {
    if x.is_finite() {
        json!(clean(x))
    } else {
        Value::Null
    }
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
                    format!("{} {id}", units::sig3(nu.abs()))
                }
            })
            .collect::<Vec<_>>()
            .join(" + ")
    };
    format!("{} -> {}", side(false), side(true))
}

fn step_json(
    prep: &Prepared,
    a: &Analysis,
    s: &StepResult,
    u: EnergyUnit,
    on_route: bool,
) -> Value {
    let p = &prep.pathway;
    let st = &p.steps[s.step];
    let mut m = Map::new();
    m.insert("id".into(), json!(st.id));
    m.insert(
        "enzyme".into(),
        st.enzyme.as_ref().map_or(Value::Null, |e| json!(e)),
    );
    m.insert("reaction".into(), json!(reaction_as_run(prep, s)));
    m.insert("times".into(), num(s.times));
    m.insert("dg0".into(), num(u.of(s.dg0)));
    m.insert("dg".into(), num(u.of(s.dg)));
    m.insert(
        "dg_sd".into(),
        s.dg_sd.map_or(Value::Null, |v| num(u.of(v))),
    );
    m.insert("keq".into(), ratio(s.keq()));
    m.insert("q".into(), ratio(s.q()));
    m.insert("flux_ratio".into(), ratio(s.flux_ratio(a.rt)));
    m.insert("class".into(), json!(s.class.as_str()));
    m.insert("class_sure".into(), json!(s.class_sure));
    if on_route {
        m.insert("cumulative".into(), num(u.of(s.cumulative)));
        m.insert("share".into(), num(s.share));
    }
    m.insert("reverse_share".into(), ratio(s.reverse_share(a.rt)));
    m.insert(
        "enzyme_factor".into(),
        s.enzyme_factor(a.rt).map_or(Value::Null, ratio),
    );
    m.insert("side".into(), json!(!on_route));
    m.insert("reversed".into(), json!(s.sign < 0.0));
    m.insert(
        "bypass_of".into(),
        s.replaces.map_or(Value::Null, |r| json!(p.steps[r].id)),
    );
    if !s.class_sure {
        m.insert(
            "class_range".into(),
            json!([s.class_range.0.as_str(), s.class_range.1.as_str()]),
        );
    }
    m.insert("dg0_kept_at_reference".into(), json!(s.kept_reference_dg0));
    Value::Object(m)
}

/// The JSON document of cli.md (`report --format json`).
pub fn json_value(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> Value {
    let p = &prep.pathway;
    let c = &state.conditions;
    let steps: Vec<Value> = a
        .steps
        .iter()
        .map(|s| step_json(prep, a, s, u, true))
        .collect();
    let side: Vec<Value> = a
        .side
        .iter()
        .map(|s| step_json(prep, a, s, u, false))
        .collect();
    let groups: Vec<Value> = a
        .groups
        .iter()
        .map(|g| {
            json!({
                "steps": g.members.iter().map(|&k| p.steps[a.steps[k].step].id.clone()).collect::<Vec<_>>(),
                "dg": num(u.of(g.dg)),
                "dg_sd": g.dg_sd.map_or(Value::Null, |v| num(u.of(v))),
            })
        })
        .collect();
    let mut net = Map::new();
    for &(ci, v) in &a.net {
        net.insert(p.compounds[ci].id.clone(), num(v));
    }
    let control: Vec<Value> = a
        .control
        .iter()
        .map(|v| {
            json!({
                "step": p.steps[a.steps[v.position].step].id,
                "verdict": v.kind.as_str(),
                "reasons": v.reasons,
            })
        })
        .collect();
    let mut doc = Map::new();
    doc.insert("pathway".into(), json!(p.name));
    doc.insert("direction".into(), json!(a.direction.as_str()));
    doc.insert("energy_unit".into(), json!(u.label()));
    doc.insert(
        "conditions".into(),
        json!({
            "temperature_k": num(c.temperature),
            "ph": num(c.ph),
            "ionic_strength_m": num(c.ionic_strength),
            "rt": num(u.of(a.rt)),
        }),
    );
    doc.insert("steps".into(), Value::Array(steps));
    doc.insert("side_steps".into(), Value::Array(side));
    doc.insert("groups".into(), Value::Array(groups));
    doc.insert(
        "total".into(),
        json!({ "dg0": num(u.of(a.total_dg0)), "dg": num(u.of(a.total_dg)), "dg_sd": a.total_sd.map_or(Value::Null, |v| num(u.of(v))) }),
    );
    doc.insert("net".into(), Value::Object(net));
    doc.insert(
        "largest_drop".into(),
        a.largest_drop
            .map_or(Value::Null, |k| json!(p.steps[a.steps[k].step].id)),
    );
    doc.insert("control".into(), Value::Array(control));
    if a.direction == crate::analysis::Direction::Reverse {
        let nb: Vec<Value> = a
            .needs_bypass
            .iter()
            .map(|n| json!({ "step": p.steps[a.steps[n.position].step].id, "lacks": num(u.of(n.lacks)) }))
            .collect();
        doc.insert("needs_bypass".into(), Value::Array(nb));
        let bp: Vec<Value> = a
            .steps
            .iter()
            .enumerate()
            .filter_map(|(k, s)| {
                s.replaces.map(|r| {
                    json!({ "step": p.steps[s.step].id, "replaces": p.steps[r].id, "counterpart": a.counterpart == Some(k) })
                })
            })
            .collect();
        doc.insert("bypasses".into(), Value::Array(bp));
    }
    doc.insert("notes".into(), json!(a.notes));
    Value::Object(doc)
}

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

/// Compact number for ratios that span many decades (Q, K', J+/J−).
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

/// Share of forward flux undone by the reverse, as a percentage (only for downhill steps).
fn undone(s: &StepResult, rt: f64) -> String {
    if s.dg < 0.0 {
        format!("{:.1} %", s.reverse_share(rt) * 100.0)
    } else {
        "-".into()
    }
}

/// The aligned table with verdicts, notes and the closing caution.
pub fn table(prep: &Prepared, state: &State, a: &Analysis, o: TextOptions) -> String {
    let p = &prep.pathway;
    let u = o.unit;
    let c = &state.conditions;
    let mut out = String::new();
    out.push_str(&format!(
        "{} — {} route, {:.2} °C, pH {}, I = {} M\n\n",
        p.name,
        a.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    ));
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
        cells.extend([String::new(), String::new(), String::new()]);
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
        false,
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
            .map(|s| format!(" ± {:.2}", u.of(s)))
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
            out.push_str(&format!("  {} {}\n", id, verdict_symbol(v.kind, o.ascii)));
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
        "\nundone: share of forward flux undone by the reverse flux, e^(dG'/RT); enzyme x: enzyme needed relative to an irreversible step, 1/(1 - e^(dG'/RT)).\n{}\n",
        control::CAUTION
    ));
    out
}

/// One CSV row per step (route steps, then side steps).
pub fn csv(prep: &Prepared, a: &Analysis, u: EnergyUnit) -> String {
    let p = &prep.pathway;
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record([
        "step",
        "enzyme",
        "times",
        "dg0",
        "dg",
        "dg_sd",
        "keq",
        "q",
        "flux_ratio",
        "reverse_share",
        "enzyme_factor",
        "class",
        "cumulative",
        "share",
        "verdict",
        "side",
    ]);
    for (s, side) in a
        .steps
        .iter()
        .map(|s| (s, false))
        .chain(a.side.iter().map(|s| (s, true)))
    {
        let st = &p.steps[s.step];
        let _ = w.write_record([
            st.id.clone(),
            st.enzyme.clone().unwrap_or_default(),
            format!("{}", clean(s.times)),
            format!("{}", clean(u.of(s.dg0))),
            format!("{}", clean(u.of(s.dg))),
            s.dg_sd
                .map(|v| format!("{}", clean(u.of(v))))
                .unwrap_or_default(),
            format!("{}", s.keq()),
            format!("{}", s.q()),
            format!("{}", s.flux_ratio(a.rt)),
            format!("{}", s.reverse_share(a.rt)),
            s.enzyme_factor(a.rt)
                .map(|f| format!("{f}"))
                .unwrap_or_default(),
            s.class.as_str().to_string(),
            if side {
                String::new()
            } else {
                format!("{}", clean(u.of(s.cumulative)))
            },
            if side {
                String::new()
            } else {
                format!("{}", clean(s.share))
            },
            s.verdict
                .map(|v| a.control[v].kind.as_str().to_string())
                .unwrap_or_default(),
            side.to_string(),
        ]);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

/// A Markdown table with verdicts and notes.
pub fn markdown(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> String {
    let p = &prep.pathway;
    let ul = u.label();
    let c = &state.conditions;
    let mut out = format!(
        "## {}\n\n{} route, {:.2} °C, pH {}, I = {} M\n\n| step | enzyme | turns | dG'° [{ul}] | dG' [{ul}] | class | share | cumulative [{ul}] | verdict |\n|---|---|---:|---:|---:|---|---:|---:|---|\n",
        p.name,
        a.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    );
    for (k, s) in a.steps.iter().enumerate() {
        let st = &p.steps[s.step];
        out.push_str(&format!(
            "| {}{} | {} | {} | {:.2} | {:.2} | {} {} | {} | {:.2} | {} |\n",
            st.id,
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
            s.verdict.map(|v| a.control[v].kind.as_str()).unwrap_or("")
        ));
    }
    out.push_str(&format!(
        "\n**Total:** dG'° {:.2} {ul}, dG' {:.2} {ul}\n",
        clean(u.of(a.total_dg0)),
        clean(u.of(a.total_dg))
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
    out.push_str(&format!("\n_{}_\n", control::CAUTION));
    out
}
