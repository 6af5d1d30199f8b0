//! The CSV rendering: one row per step.

use crate::analysis::{Analysis, Prepared};
use crate::present::{EnergyUnit, clean};

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
        "against",
        "cumulative",
        "share",
        "verdict",
        "side",
        "control_coefficient",
        "control_low",
        "control_high",
    ]);
    let est = &a.control_estimate;
    for (k, (s, side)) in a
        .steps
        .iter()
        .map(|s| (s, false))
        .chain(a.side.iter().map(|s| (s, true)))
        .enumerate()
    {
        let route = (!side).then_some(k);
        let coef = route.and_then(|k| est.coefficient(k));
        let range = route.and_then(|k| est.range(k));
        let cell = |x: Option<f64>| x.map(|v| format!("{}", clean(v))).unwrap_or_default();
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
            s.reverse_share(a.rt)
                .map(|r| format!("{r}"))
                .unwrap_or_default(),
            s.enzyme_factor(a.rt)
                .map(|f| format!("{f}"))
                .unwrap_or_default(),
            s.class.as_str().to_string(),
            s.against.to_string(),
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
            cell(coef),
            cell(range.map(|r| r.0)),
            cell(range.map(|r| r.1)),
        ]);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}
