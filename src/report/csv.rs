//! The CSV rendering: one row per step, every number at full precision, each
//! energy column's unit in its header.

use crate::analysis::{Analysis, Prepared, StepResult};
use crate::present::{EnergyUnit, clean, full};

/// The header row; energy columns carry the unit asked for.
pub fn header(u: EnergyUnit) -> Vec<String> {
    let ul = u.label();
    let mut h: Vec<String> = ["step", "enzyme", "times"].map(String::from).to_vec();
    h.push(format!("dg0 [{ul}]"));
    h.push(format!("dg [{ul}]"));
    h.push(format!("dg_sd [{ul}]"));
    for s in [
        "keq",
        "q",
        "flux_ratio",
        "reverse_share",
        "enzyme_factor",
        "class",
        "class_sure",
        "against",
    ] {
        h.push(s.into());
    }
    h.push(format!("cumulative [{ul}]"));
    for s in [
        "share",
        "verdict",
        "side",
        "control_coefficient",
        "control_low",
        "control_high",
    ] {
        h.push(s.into());
    }
    h
}

/// One row; `position` is the place on the route (None for side steps).
fn row(
    prep: &Prepared,
    a: &Analysis,
    s: &StepResult,
    position: Option<usize>,
    u: EnergyUnit,
) -> Vec<String> {
    let est = &a.control_estimate;
    let coef = position.and_then(|k| est.coefficient(k));
    let range = position.and_then(|k| est.range(k));
    let opt = |x: Option<f64>| x.map(|v| full(clean(v))).unwrap_or_default();
    let on_route = |x: f64| position.map_or(String::new(), |_| full(clean(x)));
    let st = &prep.pathway.steps[s.step];
    vec![
        st.id.clone(),
        st.enzyme.clone().unwrap_or_default(),
        full(clean(s.times)),
        full(clean(u.of(s.dg0))),
        full(clean(u.of(s.dg))),
        opt(s.dg_sd.map(|v| u.of(v))),
        full(s.keq()),
        full(s.q()),
        full(s.flux_ratio(a.rt)),
        opt(s.reverse_share(a.rt)),
        opt(s.enzyme_factor(a.rt)),
        s.class.as_str().to_string(),
        s.class_sure.to_string(),
        s.against.to_string(),
        on_route(u.of(s.cumulative)),
        on_route(s.share),
        s.verdict
            .map(|v| a.control[v].kind.as_str().to_string())
            .unwrap_or_default(),
        position.is_none().to_string(),
        opt(coef),
        opt(range.map(|r| r.0)),
        opt(range.map(|r| r.1)),
    ]
}

/// One CSV row per step (route steps, then side steps).
pub fn csv(prep: &Prepared, a: &Analysis, u: EnergyUnit) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record(header(u));
    let route = a.steps.iter().enumerate().map(|(k, s)| (s, Some(k)));
    for (s, position) in route.chain(a.side.iter().map(|s| (s, None))) {
        let _ = w.write_record(row(prep, a, s, position, u));
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}
