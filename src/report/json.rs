//! The JSON rendering of an analysis (`report --format json`, a contract:
//! see cli.md and docs/json.md). Typed: every field is a member of a
//! `Serialize` struct below, so a renamed or dropped field fails the snapshot
//! test.

use crate::analysis::{Analysis, Direction, Prepared, StepResult};
use crate::present::{EnergyUnit, clean, reaction_as_run};
use crate::scenario::State;
use serde::Serialize;

/// A number cleaned of float noise; None (null) when not finite.
pub fn num(x: f64) -> Option<f64> {
    x.is_finite().then(|| clean(x))
}

/// A ratio that may span many decades: kept as is (only -0 becomes 0); None when not finite.
pub fn ratio(x: f64) -> Option<f64> {
    x.is_finite().then_some(if x == 0.0 { 0.0 } else { x })
}

/// Pairs written as a JSON object in their own order (net per pass keeps route order).
#[derive(Debug, Default)]
pub struct Ordered<V>(pub Vec<(String, V)>);

impl<V: Serialize> Serialize for Ordered<V> {
    fn serialize<S: serde::Serializer>(&self, ser: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeMap;
        let mut m = ser.serialize_map(Some(self.0.len()))?;
        for (k, v) in &self.0 {
            m.serialize_entry(k, v)?;
        }
        m.end()
    }
}

/// The conditions of the scenario.
#[derive(Debug, Serialize)]
pub struct ConditionsJson {
    /// Kelvin.
    pub temperature_k: Option<f64>,
    /// pH.
    pub ph: Option<f64>,
    /// mol/L.
    pub ionic_strength_m: Option<f64>,
    /// RT in the energy unit.
    pub rt: Option<f64>,
}

/// Fields only route steps have.
#[derive(Debug, Serialize)]
pub struct RouteFields {
    /// Running sum of times × dg along the route.
    pub cumulative: Option<f64>,
    /// Part of the route's drop.
    pub share: Option<f64>,
    /// Flux control estimate (mass action).
    pub control_coefficient: Option<f64>,
    /// Its 5–95 % range over sampled saturation.
    pub control_coefficient_range: Option<[Option<f64>; 2]>,
}

/// One step.
#[derive(Debug, Serialize)]
pub struct StepJson {
    /// Step id.
    pub id: String,
    /// Enzyme name.
    pub enzyme: Option<String>,
    /// The reaction as it runs.
    pub reaction: String,
    /// Turns per pass.
    pub times: Option<f64>,
    /// dG'° at the conditions, per turn.
    pub dg0: Option<f64>,
    /// dG' per turn.
    pub dg: Option<f64>,
    /// Standard deviation of dG'.
    pub dg_sd: Option<f64>,
    /// K'.
    pub keq: Option<f64>,
    /// Mass-action ratio.
    pub q: Option<f64>,
    /// J+/J−.
    pub flux_ratio: Option<f64>,
    /// far, moderate, near or uphill.
    pub class: &'static str,
    /// Same class at both ends of the 95 % interval.
    pub class_sure: bool,
    /// dG' > 0 as run: the step runs backward at these concentrations.
    pub against: bool,
    /// Route-only fields.
    #[serde(flatten)]
    pub route: Option<RouteFields>,
    /// e^(dG'/RT); null for a step that runs backward.
    pub reverse_share: Option<f64>,
    /// 1/(1 − e^(dG'/RT)); null for steps that go up.
    pub enzyme_factor: Option<f64>,
    /// A side step.
    pub side: bool,
    /// Runs against its written direction.
    pub reversed: bool,
    /// The step this bypass replaces.
    pub bypass_of: Option<String>,
    /// The two classes within the 95 % interval, when not sure.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub class_range: Option<[&'static str; 2]>,
    /// dG'° kept at the reference temperature (no dh0).
    pub dg0_kept_at_reference: bool,
    /// pH and ionic strength went through the reactant model (species data).
    pub reactant_model: bool,
}

/// A chain of coupled steps.
#[derive(Debug, Serialize)]
pub struct GroupJson {
    /// Step ids in route order.
    pub steps: Vec<String>,
    /// Sum of the per-turn dG'.
    pub dg: Option<f64>,
    /// Its standard deviation.
    pub dg_sd: Option<f64>,
}

/// Totals over the route.
#[derive(Debug, Serialize)]
pub struct TotalJson {
    /// Σ times × dG'°.
    pub dg0: Option<f64>,
    /// Σ times × dG'.
    pub dg: Option<f64>,
    /// Its standard deviation.
    pub dg_sd: Option<f64>,
    /// Route steps that give no dg0_sd (the sd leaves their dG'° out).
    pub steps_without_dg0_sd: usize,
}

/// A control verdict.
#[derive(Debug, Serialize)]
pub struct VerdictJson {
    /// Step id.
    pub step: String,
    /// control_point, candidate or not_here.
    pub verdict: &'static str,
    /// The reasons in words.
    pub reasons: Vec<String>,
}

/// A step of the reverse route that is uphill with no bypass.
#[derive(Debug, Serialize)]
pub struct NeedsBypassJson {
    /// Step id.
    pub step: String,
    /// Energy it lacks per turn.
    pub lacks: Option<f64>,
}

/// A bypass on the reverse route.
#[derive(Debug, Serialize)]
pub struct BypassJson {
    /// The bypass step.
    pub step: String,
    /// The step it replaces.
    pub replaces: String,
    /// It stands in for the forward control point.
    pub counterpart: bool,
}

/// The whole document of `report --format json`.
#[derive(Debug, Serialize)]
pub struct ReportJson {
    /// Pathway name.
    pub pathway: String,
    /// forward or reverse.
    pub direction: &'static str,
    /// kJ/mol or kcal/mol.
    pub energy_unit: &'static str,
    /// Conditions.
    pub conditions: ConditionsJson,
    /// Route steps in order.
    pub steps: Vec<StepJson>,
    /// Side steps.
    pub side_steps: Vec<StepJson>,
    /// Coupled groups.
    pub groups: Vec<GroupJson>,
    /// Totals.
    pub total: TotalJson,
    /// Net change per pass of each input, output and currency compound.
    pub net: Ordered<Option<f64>>,
    /// Step with the largest share of the drop.
    pub largest_drop: Option<String>,
    /// No route step runs backward.
    pub runs_forward: bool,
    /// Verdicts.
    pub control: Vec<VerdictJson>,
    /// Reverse route only: steps that need a bypass.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub needs_bypass: Option<Vec<NeedsBypassJson>>,
    /// Reverse route only: the bypasses.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub bypasses: Option<Vec<BypassJson>>,
    /// Notes in words.
    pub notes: Vec<String>,
}

fn step_json(
    prep: &Prepared,
    a: &Analysis,
    s: &StepResult,
    u: EnergyUnit,
    position: Option<usize>,
) -> StepJson {
    let p = &prep.pathway;
    let st = &p.steps[s.step];
    let est = &a.control_estimate;
    StepJson {
        id: st.id.clone(),
        enzyme: st.enzyme.clone(),
        reaction: reaction_as_run(prep, s),
        times: num(s.times),
        dg0: num(u.of(s.dg0)),
        dg: num(u.of(s.dg)),
        dg_sd: s.dg_sd.and_then(|v| num(u.of(v))),
        keq: ratio(s.keq()),
        q: ratio(s.q()),
        flux_ratio: ratio(s.flux_ratio(a.rt)),
        class: s.class.as_str(),
        class_sure: s.class_sure,
        against: s.against,
        route: position.map(|k| RouteFields {
            cumulative: num(u.of(s.cumulative)),
            share: num(s.share),
            control_coefficient: est.coefficient(k).and_then(num),
            control_coefficient_range: est.range(k).map(|(lo, hi)| [num(lo), num(hi)]),
        }),
        reverse_share: s.reverse_share(a.rt).and_then(ratio),
        enzyme_factor: s.enzyme_factor(a.rt).and_then(ratio),
        side: position.is_none(),
        reversed: s.sign < 0.0,
        bypass_of: s.replaces.map(|r| p.steps[r].id.clone()),
        class_range: (!s.class_sure).then(|| [s.class_range.0.as_str(), s.class_range.1.as_str()]),
        dg0_kept_at_reference: s.kept_reference_dg0,
        reactant_model: s.species,
    }
}

/// The typed document of cli.md (`report --format json`).
pub fn report_json(prep: &Prepared, state: &State, a: &Analysis, u: EnergyUnit) -> ReportJson {
    let p = &prep.pathway;
    let c = &state.conditions;
    let id = |k: usize| p.steps[a.steps[k].step].id.clone();
    let reverse = a.direction == Direction::Reverse;
    ReportJson {
        pathway: p.name.clone(),
        direction: a.direction.as_str(),
        energy_unit: u.label(),
        conditions: ConditionsJson {
            temperature_k: num(c.temperature),
            ph: num(c.ph),
            ionic_strength_m: num(c.ionic_strength),
            rt: num(u.of(a.rt)),
        },
        steps: a
            .steps
            .iter()
            .enumerate()
            .map(|(k, s)| step_json(prep, a, s, u, Some(k)))
            .collect(),
        side_steps: a
            .side
            .iter()
            .map(|s| step_json(prep, a, s, u, None))
            .collect(),
        groups: a
            .groups
            .iter()
            .map(|g| GroupJson {
                steps: g.members.iter().map(|&k| id(k)).collect(),
                dg: num(u.of(g.dg)),
                dg_sd: g.dg_sd.and_then(|v| num(u.of(v))),
            })
            .collect(),
        total: TotalJson {
            dg0: num(u.of(a.total_dg0)),
            dg: num(u.of(a.total_dg)),
            dg_sd: a.total_sd.and_then(|v| num(u.of(v))),
            steps_without_dg0_sd: a.steps_without_dg0_sd,
        },
        net: Ordered(
            a.net
                .iter()
                .map(|&(ci, v)| (p.compounds[ci].id.clone(), num(v)))
                .collect(),
        ),
        largest_drop: a.largest_drop.map(id),
        runs_forward: a.runs_forward,
        control: a
            .control
            .iter()
            .map(|v| VerdictJson {
                step: id(v.position),
                verdict: v.kind.as_str(),
                reasons: crate::present::reasons(v, u),
            })
            .collect(),
        needs_bypass: reverse.then(|| {
            a.needs_bypass
                .iter()
                .map(|n| NeedsBypassJson {
                    step: id(n.position),
                    lacks: num(u.of(n.lacks)),
                })
                .collect()
        }),
        bypasses: reverse.then(|| bypasses_json(p, a)),
        notes: crate::present::notes(a, u),
    }
}

/// The reverse route's steps that stand in for forward steps.
fn bypasses_json(p: &crate::model::Pathway, a: &Analysis) -> Vec<BypassJson> {
    a.steps
        .iter()
        .enumerate()
        .filter_map(|(k, s)| {
            s.replaces.map(|r| BypassJson {
                step: p.steps[s.step].id.clone(),
                replaces: p.steps[r].id.clone(),
                counterpart: a.counterpart == Some(k),
            })
        })
        .collect()
}

/// The JSON document as a `serde_json::Value` (for callers that read fields).
pub fn json_value(
    prep: &Prepared,
    state: &State,
    a: &Analysis,
    u: EnergyUnit,
) -> serde_json::Value {
    serde_json::to_value(report_json(prep, state, a, u)).unwrap_or(serde_json::Value::Null)
}
