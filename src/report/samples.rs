//! Renderings for many samples: per-sample CSV rows and JSON objects (small
//! pieces, so that output streams while samples are analysed), and the
//! summary across samples as a table, Markdown or JSON. Nothing here computes
//! results; the numbers come from `analysis::batch`.

use super::json::{ConditionsJson, Ordered, num};
use super::table::TextOptions;
use crate::analysis::batch::{StepSpread, Summary, prime_of};
use crate::analysis::{Analysis, Class, Prepared};
use crate::present::{Align, EnergyUnit, aligned_lines, clean, energy3, fig3, full};
use crate::scenario::State;
use serde::Serialize;
use serde_json::Value;

/// Text of a JSON value (strings quoted and escaped).
fn text<T: Serialize + ?Sized>(v: &T) -> String {
    serde_json::to_string(v).unwrap_or_default()
}

fn step_id<'a>(prep: &'a Prepared, a: &Analysis, k: usize) -> &'a str {
    &prep.pathway.steps[a.steps[k].step].id
}

/// The header line of `report --samples --format csv`.
pub fn csv_header() -> String {
    "sample,step,dg0,dg,class,against,verdict,cumulative,control_coefficient\n".to_string()
}

/// One CSV row per route step of one sample.
pub fn csv_rows(prep: &Prepared, name: &str, a: &Analysis, u: EnergyUnit) -> String {
    let mut w = csv::WriterBuilder::new()
        .has_headers(false)
        .from_writer(Vec::with_capacity(64 * a.steps.len()));
    for (k, s) in a.steps.iter().enumerate() {
        let _ = w.write_record([
            name,
            &prep.pathway.steps[s.step].id,
            &full(clean(u.of(s.dg0))),
            &full(clean(u.of(s.dg))),
            s.class.as_str(),
            if s.against { "true" } else { "false" },
            s.verdict.map(|v| a.control[v].kind.as_str()).unwrap_or(""),
            &full(clean(u.of(s.cumulative))),
            &a.control_estimate
                .coefficient(k)
                .map(|c| full(clean(c)))
                .unwrap_or_default(),
        ]);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

#[derive(serde::Serialize)]
struct StepRow<'a> {
    id: &'a str,
    dg0: Option<f64>,
    dg: Option<f64>,
    class: &'static str,
    against: bool,
    verdict: Option<&'static str>,
    cumulative: Option<f64>,
    control_coefficient: Option<f64>,
}

#[derive(serde::Serialize)]
struct Total {
    dg: Option<f64>,
}

#[derive(serde::Serialize)]
struct SampleRow<'a> {
    sample: &'a str,
    steps: Vec<StepRow<'a>>,
    total: Total,
    largest_drop: Option<&'a str>,
    control_point: Option<&'a str>,
    runs_forward: bool,
}

fn opt(x: f64) -> Option<f64> {
    x.is_finite().then(|| clean(x))
}

fn sample_row<'a>(prep: &'a Prepared, name: &'a str, a: &Analysis, u: EnergyUnit) -> SampleRow<'a> {
    SampleRow {
        sample: name,
        steps: a
            .steps
            .iter()
            .enumerate()
            .map(|(k, s)| StepRow {
                id: &prep.pathway.steps[s.step].id,
                dg0: opt(u.of(s.dg0)),
                dg: opt(u.of(s.dg)),
                class: s.class.as_str(),
                against: s.against,
                verdict: s.verdict.map(|v| a.control[v].kind.as_str()),
                cumulative: opt(u.of(s.cumulative)),
                control_coefficient: a.control_estimate.coefficient(k).and_then(opt),
            })
            .collect(),
        total: Total {
            dg: opt(u.of(a.total_dg)),
        },
        largest_drop: a.largest_drop.map(|k| step_id(prep, a, k)),
        control_point: prime_of(a).map(|k| step_id(prep, a, k)),
        runs_forward: a.runs_forward,
    }
}

/// One sample as a JSON object (an element of the `samples` array).
pub fn json_sample(prep: &Prepared, name: &str, a: &Analysis, u: EnergyUnit) -> Value {
    serde_json::to_value(sample_row(prep, name, a, u)).unwrap_or(Value::Null)
}

/// The opening of the streamed JSON document, up to and including `"samples": [`.
pub fn json_head(prep: &Prepared, state: &State, u: EnergyUnit) -> String {
    let c = &state.conditions;
    let rt = crate::thermo::rt(c.temperature);
    format!(
        "{{\n  \"pathway\": {},\n  \"direction\": {},\n  \"energy_unit\": {},\n  \"conditions\": {},\n  \"samples\": [\n",
        text(&prep.pathway.name),
        text(state.direction.as_str()),
        text(u.label()),
        text(&ConditionsJson {
            temperature_k: num(c.temperature),
            ph: num(c.ph),
            ionic_strength_m: num(c.ionic_strength),
            rt: num(u.of(rt)),
        }),
    )
}

/// One element of the streamed `samples` array; `first` leaves out the separating comma.
pub fn json_sample_line(
    prep: &Prepared,
    name: &str,
    a: &Analysis,
    u: EnergyUnit,
    first: bool,
) -> String {
    let v = serde_json::to_string(&sample_row(prep, name, a, u)).unwrap_or_default();
    format!("{}    {v}", if first { "" } else { ",\n" })
}

fn spread_id<'a>(prep: &'a Prepared, s: &StepSpread) -> &'a str {
    &prep.pathway.steps[s.step].id
}

/// One step of the summary across samples.
#[derive(Debug, Serialize)]
pub struct SpreadJson {
    /// Step id.
    pub id: String,
    /// dG'° (the same in every sample).
    pub dg0: Option<f64>,
    /// Median dG'.
    pub dg_median: Option<f64>,
    /// 10th percentile of dG'.
    pub dg_p10: Option<f64>,
    /// 90th percentile of dG'.
    pub dg_p90: Option<f64>,
    /// Smallest dG'.
    pub dg_min: Option<f64>,
    /// Largest dG'.
    pub dg_max: Option<f64>,
    /// Samples per class.
    pub classes: Ordered<usize>,
    /// Samples in which it is the largest drop.
    pub largest_drop: usize,
    /// Samples in which it is the control point.
    pub control_point: usize,
    /// Samples in which it runs backward (dG' > 0).
    pub against: usize,
    /// The names of those samples.
    pub against_samples: Vec<String>,
    /// Median flux control estimate.
    pub control_coefficient_median: Option<f64>,
    /// Samples behind that median.
    pub control_samples: usize,
}

/// A sample and its class (or control point).
#[derive(Debug, Serialize)]
pub struct SampleClassJson {
    /// Sample name.
    pub sample: String,
    /// Its class.
    pub class: &'static str,
}

/// A step whose class differs between samples.
#[derive(Debug, Serialize)]
pub struct ClassDiffersJson {
    /// Step id.
    pub step: String,
    /// Its most common class.
    pub usual: &'static str,
    /// The samples outside it.
    pub samples: Vec<SampleClassJson>,
}

/// A sample whose control point is not the usual one.
#[derive(Debug, Serialize)]
pub struct PointDiffersJson {
    /// Sample name.
    pub sample: String,
    /// Its control point (null: none).
    pub control_point: Option<String>,
}

/// The summary across samples.
#[derive(Debug, Serialize)]
pub struct SummaryJson {
    /// Number of samples.
    pub samples: usize,
    /// Per route step.
    pub steps: Vec<SpreadJson>,
    /// The most common control point.
    pub usual_control_point: Option<String>,
    /// Steps whose class changes.
    pub class_differs: Vec<ClassDiffersJson>,
    /// Samples with another control point.
    pub control_point_differs: Vec<PointDiffersJson>,
    /// Samples in which the whole route runs forward.
    pub runs_forward: usize,
}

fn spread_json(prep: &Prepared, s: &StepSpread, u: EnergyUnit) -> SpreadJson {
    let classes = [Class::Far, Class::Moderate, Class::Near, Class::Uphill]
        .iter()
        .map(|&c| (c.as_str().to_string(), s.classes.of(c)))
        .collect();
    SpreadJson {
        id: spread_id(prep, s).to_string(),
        dg0: num(u.of(s.dg0)),
        dg_median: num(u.of(s.median)),
        dg_p10: num(u.of(s.p10)),
        dg_p90: num(u.of(s.p90)),
        dg_min: num(u.of(s.min)),
        dg_max: num(u.of(s.max)),
        classes: Ordered(classes),
        largest_drop: s.largest,
        control_point: s.prime,
        against: s.against,
        against_samples: s.against_samples.clone(),
        control_coefficient_median: s.control_median.and_then(num),
        control_samples: s.control_samples,
    }
}

/// The summary as JSON (the `summary` member of the samples document).
pub fn json_summary(prep: &Prepared, sum: &Summary, u: EnergyUnit) -> SummaryJson {
    let id = |p: Option<usize>| p.map(|k| spread_id(prep, &sum.steps[k]).to_string());
    SummaryJson {
        samples: sum.samples,
        steps: sum.steps.iter().map(|s| spread_json(prep, s, u)).collect(),
        usual_control_point: id(sum.usual_prime),
        class_differs: sum
            .class_differs
            .iter()
            .map(|d| ClassDiffersJson {
                step: spread_id(prep, &sum.steps[d.position]).to_string(),
                usual: d.usual.as_str(),
                samples: d
                    .samples
                    .iter()
                    .map(|(n, c)| SampleClassJson {
                        sample: n.clone(),
                        class: c.as_str(),
                    })
                    .collect(),
            })
            .collect(),
        control_point_differs: sum
            .prime_differs
            .iter()
            .map(|(n, p)| PointDiffersJson {
                sample: n.clone(),
                control_point: id(*p),
            })
            .collect(),
        runs_forward: sum.runs_forward,
    }
}

/// The closing of the streamed JSON document, with the summary.
pub fn json_tail(prep: &Prepared, sum: &Summary, u: EnergyUnit) -> String {
    let body = serde_json::to_string_pretty(&json_summary(prep, sum, u))
        .unwrap_or_default()
        .replace('\n', "\n  ");
    format!("\n  ],\n  \"summary\": {body}\n}}\n")
}

fn pct(n: usize, of: usize) -> String {
    if of == 0 {
        "-".into()
    } else {
        format!("{:.0} %", 100.0 * n as f64 / of as f64)
    }
}

fn names(list: &[(String, Option<usize>)], prep: &Prepared, sum: &Summary, max: usize) -> String {
    let mut parts: Vec<String> = list
        .iter()
        .take(max)
        .map(|(n, p)| {
            format!(
                "{n} ({})",
                p.map_or("none", |k| spread_id(prep, &sum.steps[k]))
            )
        })
        .collect();
    if list.len() > max {
        parts.push(format!("and {} more", list.len() - max));
    }
    parts.join(", ")
}

/// "2/12", or "-" when the step runs forward in every sample.
fn backward(n: usize, of: usize) -> String {
    if n == 0 {
        "-".into()
    } else {
        format!("{n}/{of}")
    }
}

/// In how many samples the route runs forward, and which steps run backward where.
fn against_lines(prep: &Prepared, sum: &Summary) -> Vec<String> {
    let mut out = vec![format!(
        "the route runs forward in {} of {} samples",
        sum.runs_forward, sum.samples
    )];
    for s in sum.steps.iter().filter(|s| s.against > 0) {
        let mut shown = s
            .against_samples
            .iter()
            .take(10)
            .cloned()
            .collect::<Vec<_>>()
            .join(", ");
        if s.against_samples.len() > 10 {
            shown.push_str(&format!(" and {} more", s.against_samples.len() - 10));
        }
        out.push(format!(
            "  {} runs backward (dG' > 0) in {} of {}: {shown}",
            spread_id(prep, s),
            s.against,
            sum.samples
        ));
    }
    out
}

fn prime_lines(prep: &Prepared, sum: &Summary) -> Vec<String> {
    let usual = sum
        .usual_prime
        .map_or("none", |k| spread_id(prep, &sum.steps[k]));
    let same = sum.samples - sum.prime_differs.len();
    let mut out = vec![format!(
        "usual control point: {usual} ({same} of {} samples)",
        sum.samples
    )];
    if sum.prime_differs.is_empty() {
        out.push("the control point is the same in every sample".into());
    } else {
        out.push(format!(
            "control point differs in {} sample{}: {}",
            sum.prime_differs.len(),
            if sum.prime_differs.len() == 1 {
                ""
            } else {
                "s"
            },
            names(&sum.prime_differs, prep, sum, 20)
        ));
    }
    out
}

fn class_lines(prep: &Prepared, sum: &Summary) -> Vec<String> {
    let mut out = Vec::new();
    for d in &sum.class_differs {
        let st = &sum.steps[d.position];
        let mut parts = vec![format!(
            "{}: usually {} ({} of {})",
            spread_id(prep, st),
            d.usual.as_str(),
            st.classes.of(d.usual),
            sum.samples
        )];
        for c in [Class::Far, Class::Moderate, Class::Near, Class::Uphill] {
            let list: Vec<&str> = d
                .samples
                .iter()
                .filter(|(_, k)| *k == c)
                .map(|(n, _)| n.as_str())
                .collect();
            if list.is_empty() {
                continue;
            }
            let mut shown = list.iter().take(10).copied().collect::<Vec<_>>().join(", ");
            if list.len() > 10 {
                shown.push_str(&format!(" and {} more", list.len() - 10));
            }
            parts.push(format!("{} in {}: {shown}", c.as_str(), list.len()));
        }
        out.push(parts.join("; "));
    }
    out
}

/// The summary across samples as an aligned table.
pub fn table(prep: &Prepared, state: &State, sum: &Summary, o: TextOptions) -> String {
    let u = o.unit;
    let ul = u.label();
    let c = &state.conditions;
    let dash = if o.ascii { ".." } else { "…" };
    let mut out = format!(
        "{} — {} samples, {} route, {:.2} °C, pH {}, I = {} M\n\n",
        prep.pathway.name,
        sum.samples,
        state.direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    );
    let n = sum.samples;
    let mut rows = vec![
        [
            "step".to_string(),
            format!("dG'° [{ul}]"),
            format!("median dG' [{ul}]"),
            "dG' 10–90 % range".to_string(),
            "far".into(),
            "moderate".into(),
            "near".into(),
            "uphill".into(),
            "largest drop".into(),
            "control point".into(),
            "backward".into(),
            "median control".into(),
        ]
        .to_vec(),
    ];
    for s in &sum.steps {
        rows.push(vec![
            spread_id(prep, s).to_string(),
            energy3(u.of(s.dg0)),
            energy3(u.of(s.median)),
            format!("{} {dash} {}", energy3(u.of(s.p10)), energy3(u.of(s.p90))),
            pct(s.classes.far, n),
            pct(s.classes.moderate, n),
            pct(s.classes.near, n),
            pct(s.classes.uphill, n),
            pct(s.largest, n),
            pct(s.prime, n),
            backward(s.against, n),
            control_cell(s),
        ]);
    }
    let mut al = vec![Align::Right; 12];
    al[0] = Align::Left;
    out.push_str(&aligned_lines(&rows, &al));
    out.push('\n');
    for l in against_lines(prep, sum) {
        out.push_str(&l);
        out.push('\n');
    }
    for l in prime_lines(prep, sum) {
        out.push_str(&l);
        out.push('\n');
    }
    let changes = class_lines(prep, sum);
    if !changes.is_empty() {
        out.push_str("\nsteps whose class changes between samples:\n");
        for l in changes {
            out.push_str(&format!("  {l}\n"));
        }
    }
    out.push_str(&format!(
        "\nshares are of {n} samples; dG' range is the 10th to 90th percentile across samples; median control is the median flux control estimate (mass action) over the samples where every route step runs forward, their number in brackets when not all; per-sample rows: --format csv or json\n"
    ));
    out.push_str(&format!("\n{}\n", crate::analysis::control::CAUTION));
    out
}

/// The summary across samples as Markdown.
pub fn markdown(prep: &Prepared, state: &State, sum: &Summary, u: EnergyUnit) -> String {
    let ul = u.label();
    let n = sum.samples;
    let mut out = format!(
        "## {} — {n} samples\n\n{} route, {:.2} °C, pH {}\n\n| step | dG'° [{ul}] | median dG' [{ul}] | 10–90 % [{ul}] | far | moderate | near | uphill | largest drop | control point | backward | median control |\n|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|\n",
        prep.pathway.name,
        state.direction.as_str(),
        state.conditions.temperature - 273.15,
        state.conditions.ph
    );
    for s in &sum.steps {
        out.push_str(&format!(
            "| {} | {} | {} | {} to {} | {} | {} | {} | {} | {} | {} | {} | {} |\n",
            spread_id(prep, s),
            energy3(u.of(s.dg0)),
            energy3(u.of(s.median)),
            energy3(u.of(s.p10)),
            energy3(u.of(s.p90)),
            pct(s.classes.far, n),
            pct(s.classes.moderate, n),
            pct(s.classes.near, n),
            pct(s.classes.uphill, n),
            pct(s.largest, n),
            pct(s.prime, n),
            backward(s.against, n),
            control_cell(s),
        ));
    }
    out.push('\n');
    for l in against_lines(prep, sum) {
        out.push_str(&format!("- {}\n", l.trim_start()));
    }
    for l in prime_lines(prep, sum) {
        out.push_str(&format!("- {l}\n"));
    }
    for l in class_lines(prep, sum) {
        out.push_str(&format!("- {l}\n"));
    }
    out.push_str(&format!("\n_{}_\n", crate::analysis::control::CAUTION));
    out
}

/// Median flux control estimate of a step across samples, with the number
/// of samples behind it when some had none ("-" when none had one).
fn control_cell(s: &StepSpread) -> String {
    match s.control_median {
        None => "-".into(),
        Some(m)
            if s.control_samples
                == s.classes.far + s.classes.moderate + s.classes.near + s.classes.uphill =>
        {
            fig3(clean(m))
        }
        Some(m) => format!("{} ({})", fig3(clean(m)), s.control_samples),
    }
}
