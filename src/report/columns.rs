//! The columns of the per-step table, shared by the text table and Markdown:
//! which exist, which the default shows, their headers and their cells.

use crate::analysis::{Analysis, Prepared, StepResult};
use crate::present::{
    Align, EnergyUnit, amount, class_symbol, clean, energy3, fig3, verdict_symbol,
};

/// A column of the per-step table; the names are those of the JSON fields.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Column {
    /// Step id, with (rev), (side), (for X).
    Step,
    /// Enzyme name.
    Enzyme,
    /// Turns per pass of the route.
    Times,
    /// dG'° at the scenario's conditions.
    Dg0,
    /// dG' as run.
    Dg,
    /// Standard deviation of dG'.
    DgSd,
    /// Mass-action ratio.
    Q,
    /// K' at the scenario's conditions.
    Keq,
    /// Forward over reverse flux, J+/J−.
    FluxRatio,
    /// Share of the forward flux undone by the reverse.
    ReverseShare,
    /// Enzyme needed relative to an irreversible step.
    EnzymeFactor,
    /// Class with its symbol (and "?" when unsure).
    Class,
    /// Part of the route's drop (with the largest-drop mark).
    Share,
    /// Running sum of dG' along the route.
    Cumulative,
    /// Control verdict.
    Verdict,
    /// Flux control estimate.
    ControlCoefficient,
    /// Its 5–95 % range.
    ControlCoefficientRange,
}

/// Every column, in table order (`--wide`).
pub const ALL: [Column; 17] = [
    Column::Step,
    Column::Enzyme,
    Column::Times,
    Column::Dg0,
    Column::Dg,
    Column::DgSd,
    Column::Q,
    Column::Keq,
    Column::FluxRatio,
    Column::ReverseShare,
    Column::EnzymeFactor,
    Column::Class,
    Column::Share,
    Column::Cumulative,
    Column::Verdict,
    Column::ControlCoefficient,
    Column::ControlCoefficientRange,
];

/// The columns a practitioner reads first; on the demo they fit 120 characters.
pub const DEFAULT: [Column; 10] = [
    Column::Step,
    Column::Enzyme,
    Column::Times,
    Column::Dg0,
    Column::Dg,
    Column::DgSd,
    Column::Class,
    Column::Share,
    Column::Verdict,
    Column::ControlCoefficient,
];

/// Longest enzyme name the default table shows before cutting it with "…".
pub const ENZYME_WIDTH: usize = 20;

/// The default columns for this analysis: those of `DEFAULT`, without "per
/// pass" when every step turns once and without "control" when there is no
/// estimate (the route does not run forward), so the table stays narrow.
pub fn default_for(a: &Analysis) -> Vec<Column> {
    DEFAULT
        .iter()
        .copied()
        .filter(|c| match c {
            Column::Times => a.steps.iter().any(|s| (s.times - 1.0).abs() > 1e-9),
            Column::ControlCoefficient => a.control_estimate.coefficients.is_some(),
            _ => true,
        })
        .collect()
}

impl Column {
    /// The header (energies are in the unit the rendering states above the table).
    pub fn header(self) -> String {
        match self {
            Column::Step => "step".into(),
            Column::Enzyme => "enzyme".into(),
            Column::Times => "per pass".into(),
            Column::Dg0 => "dG'°".into(),
            Column::Dg => "dG'".into(),
            Column::DgSd => "± sd".into(),
            Column::Q => "Q".into(),
            Column::Keq => "K'".into(),
            Column::FluxRatio => "J+/J-".into(),
            Column::ReverseShare => "reverse share".into(),
            Column::EnzymeFactor => "enzyme factor".into(),
            Column::Class => "class".into(),
            Column::Share => "share".into(),
            Column::Cumulative => "cumulative".into(),
            Column::Verdict => "verdict".into(),
            Column::ControlCoefficient => "control".into(),
            Column::ControlCoefficientRange => "control 5–95 %".into(),
        }
    }

    /// Numbers right, words left.
    pub fn align(self) -> Align {
        match self {
            Column::Step | Column::Enzyme | Column::Class | Column::Verdict => Align::Left,
            Column::Share | Column::ControlCoefficientRange => Align::Left,
            _ => Align::Right,
        }
    }
}

/// How the cells are written.
#[derive(Debug, Clone, Copy)]
pub struct CellOptions {
    /// Energy unit.
    pub unit: EnergyUnit,
    /// ASCII symbols only.
    pub ascii: bool,
    /// Longest enzyme name before it is cut (None: never cut).
    pub enzyme_width: Option<usize>,
}

/// Cuts `s` to `max` characters, ending in "…" ("..." in ASCII) when cut.
fn cut(s: &str, max: Option<usize>, ascii: bool) -> String {
    let mark = if ascii { "..." } else { "…" };
    let keep = max.map(|m| m.saturating_sub(mark.chars().count()));
    match (max, keep) {
        (Some(m), Some(k)) if s.chars().count() > m && k > 0 => {
            let head: String = s.chars().take(k).collect();
            format!("{head}{mark}")
        }
        _ => s.to_string(),
    }
}

/// The step id with its marks: runs backward, (rev), (side), (for X).
fn step_label(prep: &Prepared, s: &StepResult, side: bool, ascii: bool) -> String {
    let p = &prep.pathway;
    let mut id = p.steps[s.step].id.clone();
    if s.against {
        id.push_str(if ascii { " !backward" } else { " ⇄backward" });
    }
    if side {
        id.push_str(" (side)");
    }
    if s.sign < 0.0 {
        id.push_str(" (rev)");
    }
    if let Some(r) = s.replaces {
        id.push_str(&format!(" (for {})", p.steps[r].id));
    }
    id
}

/// One cell. `position` is the place on the route (None for side steps).
pub fn cell(
    col: Column,
    prep: &Prepared,
    a: &Analysis,
    s: &StepResult,
    position: Option<usize>,
    o: CellOptions,
) -> String {
    let u = o.unit;
    let st = &prep.pathway.steps[s.step];
    let route = |f: &dyn Fn(usize) -> String| position.map_or(String::new(), f);
    match col {
        Column::Step => step_label(prep, s, position.is_none(), o.ascii),
        Column::Enzyme => cut(st.enzyme.as_deref().unwrap_or(""), o.enzyme_width, o.ascii),
        Column::Times => route(&|_| amount(s.times)),
        Column::Dg0 => energy3(u.of(s.dg0)),
        Column::Dg => energy3(u.of(s.dg)),
        Column::DgSd => s.dg_sd.map_or("-".into(), |v| energy3(u.of(v))),
        Column::Q => fig3(s.q()),
        Column::Keq => fig3(s.keq()),
        Column::FluxRatio => fig3(s.flux_ratio(a.rt)),
        Column::ReverseShare => s
            .reverse_share(a.rt)
            .map_or("-".into(), |r| format!("{} %", fig3(r * 100.0))),
        Column::EnzymeFactor => s.enzyme_factor(a.rt).map_or("-".into(), fig3),
        Column::Class => format!(
            "{} {}{}",
            class_symbol(s.class, o.ascii),
            s.class.as_str(),
            if s.class_sure { "" } else { "?" }
        ),
        Column::Share => route(&|k| share_cell(a, s, k, o.ascii)),
        Column::Cumulative => route(&|_| energy3(u.of(s.cumulative))),
        Column::Verdict => s.verdict.map_or(String::new(), |v| {
            verdict_symbol(a.control[v].kind, o.ascii).to_string()
        }),
        Column::ControlCoefficient => route(&|k| {
            a.control_estimate
                .coefficient(k)
                .map_or("-".into(), |c| fig3(clean(c)))
        }),
        Column::ControlCoefficientRange => route(&|k| {
            a.control_estimate
                .range(k)
                .map_or(String::new(), |(lo, hi)| {
                    format!(
                        "{}{}{}",
                        fig3(clean(lo)),
                        if o.ascii { " to " } else { "–" },
                        fig3(clean(hi))
                    )
                })
        }),
    }
}

/// The share as a percentage, with the largest-drop mark beside it.
fn share_cell(a: &Analysis, s: &StepResult, k: usize, ascii: bool) -> String {
    let mut out = if s.share > 0.0 {
        format!("{:>3.0} %", s.share * 100.0)
    } else {
        String::new()
    };
    if a.largest_drop == Some(k) {
        out.push_str(if ascii { " <largest" } else { " ◀largest" });
    }
    out
}

/// Header and rows (route steps, then side steps) for these columns.
pub fn grid(prep: &Prepared, a: &Analysis, cols: &[Column], o: CellOptions) -> Vec<Vec<String>> {
    let mut rows = vec![cols.iter().map(|c| c.header()).collect::<Vec<_>>()];
    let steps = a.steps.iter().enumerate().map(|(k, s)| (s, Some(k)));
    let side = a.side.iter().map(|s| (s, None));
    for (s, position) in steps.chain(side) {
        rows.push(
            cols.iter()
                .map(|&c| cell(c, prep, a, s, position, o))
                .collect(),
        );
    }
    rows
}
