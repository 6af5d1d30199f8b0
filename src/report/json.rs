//! The JSON rendering of an analysis (`report --format json`, a contract:
//! see cli.md).

use crate::analysis::{Analysis, Prepared, StepResult};
use crate::present::{EnergyUnit, clean, reaction_as_run};
use crate::scenario::State;
use serde_json::{Map, Value, json};

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

fn step_json(
    prep: &Prepared,
    a: &Analysis,
    s: &StepResult,
    u: EnergyUnit,
    position: Option<usize>,
) -> Value {
    let on_route = position.is_some();
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
    m.insert("against".into(), json!(s.against));
    if let Some(k) = position {
        m.insert("cumulative".into(), num(u.of(s.cumulative)));
        m.insert("share".into(), num(s.share));
        let est = &a.control_estimate;
        m.insert(
            "control_coefficient".into(),
            est.coefficient(k).map_or(Value::Null, num),
        );
        m.insert(
            "control_coefficient_range".into(),
            est.range(k)
                .map_or(Value::Null, |(lo, hi)| json!([num(lo), num(hi)])),
        );
    }
    m.insert(
        "reverse_share".into(),
        s.reverse_share(a.rt).map_or(Value::Null, ratio),
    );
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
    m.insert("reactant_model".into(), json!(s.species));
    Value::Object(m)
}

/// The JSON document of cli.md (`report --format json`).
pub fn json_value(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> Value {
    let p = &prep.pathway;
    let c = &state.conditions;
    let steps: Vec<Value> = a
        .steps
        .iter()
        .enumerate()
        .map(|(k, s)| step_json(prep, a, s, u, Some(k)))
        .collect();
    let side: Vec<Value> = a
        .side
        .iter()
        .map(|s| step_json(prep, a, s, u, None))
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
        json!({
            "dg0": num(u.of(a.total_dg0)),
            "dg": num(u.of(a.total_dg)),
            "dg_sd": a.total_sd.map_or(Value::Null, |v| num(u.of(v))),
            "steps_without_dg0_sd": a.steps_without_dg0_sd,
        }),
    );
    doc.insert("net".into(), Value::Object(net));
    doc.insert(
        "largest_drop".into(),
        a.largest_drop
            .map_or(Value::Null, |k| json!(p.steps[a.steps[k].step].id)),
    );
    doc.insert("runs_forward".into(), json!(a.runs_forward));
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
