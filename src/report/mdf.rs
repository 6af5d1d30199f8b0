//! Renderings of a driving-force optimisation result: the JSON document of
//! cli.md (`mdf --format json`, a contract) and an aligned table for people.
//! Solver noise is cleaned here (no −0, no 1e-9 residues); nothing is computed
//! beyond unit conversion.

use super::json::{ConditionsJson, Ordered, num};
use super::table::TextOptions;
use crate::analysis::mdf::{Bound, Mdf, Part};
use crate::analysis::{Direction, Prepared};
use crate::model::units;
use crate::present::{Align, EnergyUnit, aligned_lines, clean, energy3, fig3, headline};
use crate::scenario::State;
use serde::Serialize;

/// What the reader should keep in mind beside the bottlenecks (science.md §9 [C]).
pub const BOTTLENECK_CAUTION: &str = "A bottleneck here is costly in enzyme (little driving force to spare), not necessarily the step that controls the flux.";

/// A concentration (mol/L) rounded to 7 significant figures, for printing.
pub fn conc_value(c: f64) -> f64 {
    if !c.is_finite() || c == 0.0 {
        return c;
    }
    format!("{c:.6e}").parse().unwrap_or(c)
}

fn conc(c: f64) -> Option<f64> {
    c.is_finite().then(|| conc_value(c))
}

/// MDF gain (J/mol) per 10-fold widening of a bound whose dual is `price`.
pub fn gain_per_decade(m: &Mdf, price: f64) -> f64 {
    m.rt * std::f64::consts::LN_10 * price
}

fn shown(m: &Mdf) -> impl Iterator<Item = usize> + '_ {
    (0..m.parts.len()).filter(|&c| m.parts[c] != Part::Absent)
}

/// A bound that limits the MDF.
#[derive(Debug, Serialize)]
pub struct LimitingJson {
    /// Compound id.
    pub compound: String,
    /// lower or upper.
    pub bound: &'static str,
    /// The bound, mol/L.
    pub bound_m: Option<f64>,
    /// Its shadow price.
    pub price: Option<f64>,
    /// MDF gain per 10-fold wider bound, in the energy unit.
    pub gain_per_decade: Option<f64>,
}

/// The whole document of `mdf --format json`.
#[derive(Debug, Serialize)]
pub struct MdfJson {
    /// Pathway name.
    pub pathway: String,
    /// forward or reverse.
    pub direction: &'static str,
    /// The max-min driving force.
    pub mdf: Option<f64>,
    /// kJ/mol or kcal/mol.
    pub energy_unit: &'static str,
    /// MDF ≥ 0: the whole route can run forward within the bounds.
    pub feasible: bool,
    /// Conditions.
    pub conditions: ConditionsJson,
    /// Steps with a non-zero shadow price.
    pub bottlenecks: Vec<String>,
    /// One optimum, mol/L.
    pub concentrations_m: Ordered<Option<f64>>,
    /// −dG' per step at the optimum.
    pub driving_forces: Ordered<Option<f64>>,
    /// Shadow price per step.
    pub prices: Ordered<Option<f64>>,
    /// dG'° per step as run.
    pub dg0: Ordered<Option<f64>>,
    /// Range of each compound while the MDF holds, mol/L.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ranges_m: Option<Ordered<[Option<f64>; 2]>>,
    /// Bounds, mol/L.
    pub bounds_m: Ordered<[Option<f64>; 2]>,
    /// Compounds held because the file fixes them (or their bounds are equal).
    pub fixed: Vec<String>,
    /// Every compound held at its scenario value (fixed ones and carriers).
    pub held: Vec<String>,
    /// Per free compound, the range within which the route can run at all
    /// (every step at −dG' ≥ 0), mol/L; null when MDF < 0.
    pub feasible_ranges_m: Option<Ordered<[Option<f64>; 2]>>,
    /// Bounds that limit the MDF.
    pub limiting: Vec<LimitingJson>,
    /// Warnings in words.
    pub warnings: Vec<String>,
}

/// The typed document of cli.md (`mdf --format json`), with extra fields.
pub fn mdf_json(prep: &Prepared, state: &State, m: &Mdf, u: EnergyUnit) -> MdfJson {
    let p = &prep.pathway;
    let c = &state.conditions;
    let step_id = |k: usize| p.steps[m.steps[k]].id.clone();
    let per_step = |f: &dyn Fn(usize) -> f64| {
        Ordered(
            (0..m.steps.len())
                .map(|k| (step_id(k), num(f(k))))
                .collect(),
        )
    };
    let per_compound = |f: &dyn Fn(usize) -> [Option<f64>; 2]| {
        Ordered(
            shown(m)
                .map(|ci| (p.compounds[ci].id.clone(), f(ci)))
                .collect(),
        )
    };
    MdfJson {
        pathway: p.name.clone(),
        direction: m.direction.as_str(),
        mdf: num(u.of(m.value)),
        energy_unit: u.label(),
        feasible: m.feasible(),
        conditions: ConditionsJson {
            temperature_k: num(c.temperature),
            ph: num(c.ph),
            ionic_strength_m: num(c.ionic_strength),
            rt: num(u.of(m.rt)),
        },
        bottlenecks: m.bottlenecks.iter().map(|&k| step_id(k)).collect(),
        concentrations_m: Ordered(
            shown(m)
                .map(|ci| (p.compounds[ci].id.clone(), conc(m.conc[ci])))
                .collect(),
        ),
        driving_forces: per_step(&|k| u.of(m.driving_forces[k])),
        prices: per_step(&|k| m.prices[k]),
        dg0: per_step(&|k| u.of(m.dg0[k])),
        ranges_m: m
            .ranges
            .as_ref()
            .map(|r| per_compound(&|ci| [conc(r[ci].0), conc(r[ci].1)])),
        bounds_m: per_compound(&|ci| [conc(m.bounds[ci].0), conc(m.bounds[ci].1)]),
        fixed: shown(m)
            .filter(|&ci| {
                let (lo, hi) = p.bounds_of(ci);
                m.parts[ci] == Part::Held && (p.compounds[ci].fixed == Some(true) || lo == hi)
            })
            .map(|ci| p.compounds[ci].id.clone())
            .collect(),
        held: shown(m)
            .filter(|&ci| m.parts[ci] == Part::Held)
            .map(|ci| p.compounds[ci].id.clone())
            .collect(),
        feasible_ranges_m: m.feasible_ranges.as_ref().map(|r| {
            Ordered(
                shown(m)
                    .filter(|&ci| m.parts[ci] == Part::Free)
                    .map(|ci| (p.compounds[ci].id.clone(), [conc(r[ci].0), conc(r[ci].1)]))
                    .collect(),
            )
        }),
        limiting: m
            .limiting
            .iter()
            .map(|&(ci, b, price)| LimitingJson {
                compound: p.compounds[ci].id.clone(),
                bound: b.as_str(),
                bound_m: conc(match b {
                    Bound::Lower => m.bounds[ci].0,
                    Bound::Upper => m.bounds[ci].1,
                }),
                price: num(price),
                gain_per_decade: num(u.of(gain_per_decade(m, price))),
            })
            .collect(),
        warnings: m.warnings.clone(),
    }
}

/// A concentration in the unit that reads best.
pub fn conc_text(c: f64, ascii: bool) -> String {
    units::format_conc(conc_value(c), ascii)
}

/// "lo to hi", or one value when both read the same.
pub fn range_text(lo: f64, hi: f64, ascii: bool) -> String {
    let (a, b) = (conc_text(lo, ascii), conc_text(hi, ascii));
    if a == b { a } else { format!("{a} to {b}") }
}

/// Which compounds the optimisation held at their concentrations, and how to free them.
fn held_line(p: &crate::model::Pathway, m: &Mdf) -> String {
    let held: Vec<&str> = shown(m)
        .filter(|&c| m.parts[c] == Part::Held)
        .map(|c| p.compounds[c].id.as_str())
        .collect();
    let freed = if m.options.free_currencies {
        " (carriers freed by --free-currencies)"
    } else {
        ""
    };
    if held.is_empty() {
        return format!("nothing held at its concentration{freed}\n\n");
    }
    let hint = if m.options.free_currencies {
        freed
    } else {
        " (carriers by default: fixed = false on one, or --free-currencies, frees them)"
    };
    format!(
        "held at their concentrations: {}{hint}\n\n",
        held.join(", ")
    )
}

/// The aligned table: the MDF, each step's driving force and price, the
/// limiting bounds and the optimal concentrations with their ranges.
pub fn mdf_table(prep: &Prepared, state: &State, m: &Mdf, o: TextOptions) -> String {
    let p = &prep.pathway;
    let u = o.unit;
    let ul = u.label();
    let mut out = headline(&p.name, m.direction, &state.conditions);
    let v = energy3(u.of(m.value));
    let way = match m.direction {
        Direction::Forward => "forward",
        Direction::Reverse => "in reverse",
    };
    if m.feasible() {
        out.push_str(&format!(
            "max-min driving force: {v} {ul} — within the bounds, every route step can drop by at least this much\n\n"
        ));
    } else {
        out.push_str(&format!(
            "max-min driving force: {v} {ul} — no concentrations within the bounds let the whole route run {way};\nwiden the bounds of the limiting compounds, change the conditions, or couple the bottleneck steps\n\n"
        ));
    }
    out.push_str(&held_line(p, m));
    let al = [
        Align::Left,
        Align::Left,
        Align::Right,
        Align::Right,
        Align::Right,
        Align::Left,
    ];
    out.push_str(&aligned_lines(&step_rows(prep, m, o), &al));
    out.push_str(&limits_text(prep, m, o));
    out.push('\n');
    let al = [
        Align::Left,
        Align::Left,
        Align::Right,
        Align::Left,
        Align::Left,
    ];
    out.push_str(&aligned_lines(&compound_rows(prep, m, o.ascii), &al));
    out.push_str(&format!("\n{BOTTLENECK_CAUTION}\n"));
    out
}

/// Header and one row per route step: energies, price, bottleneck mark.
fn step_rows(prep: &Prepared, m: &Mdf, o: TextOptions) -> Vec<Vec<String>> {
    let u = o.unit;
    let ul = u.label();
    let mark = if o.ascii { "<" } else { "◀" };
    let mut rows = vec![vec![
        "step".to_string(),
        "enzyme".to_string(),
        format!("dG'° [{ul}]"),
        format!("-dG' at optimum [{ul}]"),
        "price".to_string(),
        String::new(),
    ]];
    let route = prep.route(m.direction).ok();
    for k in 0..m.steps.len() {
        let st = &prep.pathway.steps[m.steps[k]];
        let reversed = route
            .and_then(|r| r.steps.get(k))
            .is_some_and(|r| r.sign < 0.0);
        let priced = m.prices[k] > 0.0;
        rows.push(vec![
            if reversed {
                format!("{} (rev)", st.id)
            } else {
                st.id.clone()
            },
            st.enzyme.clone().unwrap_or_default(),
            energy3(u.of(m.dg0[k])),
            energy3(u.of(m.driving_forces[k])),
            if priced {
                fig3(clean(m.prices[k]))
            } else {
                "0".into()
            },
            if priced {
                format!("{mark} bottleneck")
            } else {
                String::new()
            },
        ]);
    }
    rows
}

/// The bottlenecks and the limiting bounds with their gains.
fn limits_text(prep: &Prepared, m: &Mdf, o: TextOptions) -> String {
    let p = &prep.pathway;
    let u = o.unit;
    let ul = u.label();
    let ids: Vec<&str> = m
        .bottlenecks
        .iter()
        .map(|&k| p.steps[m.steps[k]].id.as_str())
        .collect();
    let mut out = format!(
        "\nbottlenecks: {} (shadow prices sum to 1: each one's share of the limitation)\n",
        if ids.is_empty() {
            "none".to_string()
        } else {
            ids.join(", ")
        }
    );
    if m.limiting.is_empty() {
        out.push_str("limiting bounds: none\n");
        return out;
    }
    out.push_str("limiting bounds (MDF gain per 10-fold wider bound):\n");
    for &(ci, b, price) in &m.limiting {
        let (at, dir) = match b {
            Bound::Lower => (m.bounds[ci].0, "lower"),
            Bound::Upper => (m.bounds[ci].1, "upper"),
        };
        out.push_str(&format!(
            "  {} at its {dir} bound {}: +{} {ul} (price {})\n",
            p.compounds[ci].id,
            conc_text(at, o.ascii),
            energy3(u.of(gain_per_decade(m, price))),
            fig3(clean(price))
        ));
    }
    out
}

/// Header and one row per compound: bounds, optimum, range.
fn compound_rows(prep: &Prepared, m: &Mdf, ascii: bool) -> Vec<Vec<String>> {
    let mut rows = vec![vec![
        "compound".to_string(),
        "bounds".to_string(),
        "at optimum".to_string(),
        if m.ranges.is_some() {
            "range while the MDF holds".to_string()
        } else {
            String::new()
        },
        if m.feasible_ranges.is_some() {
            "range where the route can run".to_string()
        } else {
            String::new()
        },
    ]];
    for ci in shown(m) {
        let held = m.parts[ci] == Part::Held;
        rows.push(vec![
            prep.pathway.compounds[ci].id.clone(),
            if held {
                "held".to_string()
            } else {
                range_text(m.bounds[ci].0, m.bounds[ci].1, ascii)
            },
            conc_text(m.conc[ci], ascii),
            match (&m.ranges, held) {
                (Some(_), true) => "held".to_string(),
                (Some(r), false) => range_text(r[ci].0, r[ci].1, ascii),
                (None, _) => String::new(),
            },
            match (&m.feasible_ranges, held) {
                (Some(_), true) => "held".to_string(),
                (Some(r), false) => range_text(r[ci].0, r[ci].1, ascii),
                (None, _) => String::new(),
            },
        ]);
    }
    rows
}
