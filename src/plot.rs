//! The energy-profile picture for a slide or a paper: the cumulative dG'
//! along the route at the scenario's concentrations beside the standard
//! dG'° profile, steps labelled with their ids and classes, far steps drawn
//! heavy, steps that run backward (dG' > 0) marked, the largest drop marked
//! and coupled groups bracketed; with samples,
//! a panel with each step's dG' spread across samples. SVG comes from
//! `plotters`; PNG is that SVG rendered by `resvg` with a bundled DejaVu Sans
//! (no system font libraries). This module only reads results and draws.

use crate::analysis::batch::Summary;
use crate::analysis::{Analysis, Class, Prepared};
use crate::present::EnergyUnit;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// The font every label uses; the same face is bundled for PNG rendering.
pub const FONT_FAMILY: &str = "DejaVu Sans";
/// DejaVu Sans (Bitstream Vera licence, see src/fonts/DejaVuSans-LICENSE.txt).
pub const FONT_DATA: &[u8] = include_bytes!("fonts/DejaVuSans.ttf");

/// Why a picture could not be made.
#[derive(Debug, thiserror::Error)]
pub enum PlotError {
    /// Drawing the SVG failed.
    #[error("cannot draw the plot: {0}")]
    Draw(String),
    /// The SVG could not be rendered to PNG.
    #[error("cannot render the plot to PNG: {0}")]
    Render(String),
    /// The route has no steps to draw.
    #[error("the route has no steps, so there is no profile to draw")]
    Empty,
}

fn draw_err<E: std::fmt::Debug>(e: E) -> PlotError {
    PlotError::Draw(format!("{e:?}"))
}

// Far steps: a thick dark neutral line (red would read as "bottleneck" or
// danger); the others thin and light, so the far ones stand out in grey
// print too.
const FAR: RGBColor = RGBColor(34, 34, 34);
const OTHER: RGBColor = RGBColor(150, 160, 175);
const STANDARD: RGBColor = RGBColor(110, 110, 110);
const MARK: RGBColor = RGBColor(230, 140, 0);
/// Room left and right of the steps, in steps.
const X_PAD: f64 = 0.3;
const INK: RGBColor = RGBColor(20, 20, 20);
/// Steps that run backward at these concentrations (dG' > 0).
const AGAINST: RGBColor = RGBColor(128, 40, 150);

fn font(size: u32) -> TextStyle<'static> {
    (FONT_FAMILY, size).into_font().color(&INK)
}

fn centred(size: u32, v: VPos) -> TextStyle<'static> {
    font(size).pos(Pos::new(HPos::Center, v))
}

/// Everything the picture shows, taken from an analysis (energies in the output unit).
struct Profile {
    ids: Vec<String>,
    classes: Vec<Class>,
    /// The step runs backward at these concentrations.
    against: Vec<bool>,
    /// Turns per pass of each step.
    times: Vec<f64>,
    /// dG'° per turn of each step.
    dg0: Vec<f64>,
    /// Levels before and after each step (n + 1 values), actual and standard.
    actual: Vec<f64>,
    standard: Vec<f64>,
    largest: Option<usize>,
    groups: Vec<(usize, usize)>,
    far: f64,
    unit: &'static str,
}

fn profile(prep: &Prepared, a: &Analysis, u: EnergyUnit) -> Profile {
    let p = &prep.pathway;
    let mut actual = vec![0.0];
    let mut standard = vec![0.0];
    for s in &a.steps {
        actual.push(u.of(s.cumulative));
        standard.push(u.of(s.cumulative_dg0));
    }
    Profile {
        ids: a.steps.iter().map(|s| p.steps[s.step].id.clone()).collect(),
        classes: a.steps.iter().map(|s| s.class).collect(),
        against: a.steps.iter().map(|s| s.against).collect(),
        times: a.steps.iter().map(|s| s.times).collect(),
        dg0: a.steps.iter().map(|s| u.of(s.dg0)).collect(),
        actual,
        standard,
        largest: a.largest_drop,
        groups: a
            .groups
            .iter()
            .filter_map(|g| Some((*g.members.iter().min()?, *g.members.iter().max()?)))
            .collect(),
        far: u.of(p.settings.far),
        unit: u.label(),
    }
}

/// A y range with headroom below for brackets and labels.
fn y_range(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (mut lo, mut hi) = (0.0f64, 0.0f64);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    let span = (hi - lo).max(1.0);
    // Room above the data for the legend, so it never sits on the curve.
    (lo - 0.14 * span, hi + 0.16 * span)
}

/// The chart of a profile panel: steps along x, energies along y.
type Chart<'a, DB> = ChartContext<
    'a,
    DB,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// Draws one profile panel; `levels` holds n + 1 cumulative values.
fn profile_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    pr: &Profile,
    levels: &[f64],
    actual: bool,
    y: (f64, f64),
    caption: &str,
) -> Result<(), PlotError> {
    let n = pr.ids.len();
    let every = label_stride(n, area.dim_in_pixel().0);
    let caption = thinned(caption, every);
    let mut chart = ChartBuilder::on(area)
        .caption(&caption, font(18))
        .margin(12)
        .margin_right(20)
        .x_label_area_size(72)
        .y_label_area_size(64)
        // A margin on both sides keeps the first and last plateaus inside.
        .build_cartesian_2d(-X_PAD..n as f64 + X_PAD, y.0..y.1)
        .map_err(draw_err)?;
    chart
        .configure_mesh()
        .disable_x_mesh()
        .x_labels(0)
        .y_labels(8)
        .y_desc(format!(
            "cumulative {} [{}]",
            if actual { "dG'" } else { "dG'°" },
            pr.unit
        ))
        .label_style(font(13))
        .axis_desc_style(font(14))
        .light_line_style(TRANSPARENT)
        .draw()
        .map_err(draw_err)?;
    draw_steps(&mut chart, pr, levels, actual)?;
    draw_marks(&mut chart, pr, levels, actual, y)?;
    draw_step_labels(area, &chart, pr, actual, y, every)?;
    if actual {
        draw_legend(&mut chart, pr, y)?;
    }
    Ok(())
}

/// The zero level and each step: a short level at each intermediate joined
/// by the step's slope; far steps thick and dark, the others thin and light.
fn draw_steps<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    pr: &Profile,
    levels: &[f64],
    actual: bool,
) -> Result<(), PlotError> {
    let n = pr.ids.len();
    chart
        .draw_series(LineSeries::new(
            [(0.0, 0.0), (n as f64, 0.0)],
            RGBColor(170, 170, 170).stroke_width(1),
        ))
        .map_err(draw_err)?;
    for k in 0..n {
        let far = actual && pr.classes[k] == Class::Far;
        let colour = if !actual {
            STANDARD
        } else if pr.against[k] {
            AGAINST
        } else if far {
            FAR
        } else {
            OTHER
        };
        let width = if far { 5 } else { 1 };
        let (x0, x1) = (k as f64, k as f64 + 1.0);
        chart
            .draw_series(LineSeries::new(
                [
                    (x0, levels[k]),
                    (x0 + 0.2, levels[k]),
                    (x1 - 0.2, levels[k + 1]),
                    (x1, levels[k + 1]),
                ],
                colour.stroke_width(width),
            ))
            .map_err(draw_err)?;
    }
    Ok(())
}

/// The largest drop (actual panel) and a bracket under each coupled group.
fn draw_marks<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    pr: &Profile,
    levels: &[f64],
    actual: bool,
    y: (f64, f64),
) -> Result<(), PlotError> {
    let span = y.1 - y.0;
    if actual && let Some(k) = pr.largest {
        let mid = (k as f64 + 0.5, (pr.actual[k] + pr.actual[k + 1]) / 2.0);
        chart
            .draw_series([Circle::new(mid, 7, MARK.filled())])
            .map_err(draw_err)?;
        chart
            .draw_series([Text::new(
                "largest drop",
                (mid.0 + 0.15, mid.1),
                font(13).pos(Pos::new(HPos::Left, VPos::Center)),
            )])
            .map_err(draw_err)?;
    }
    for &(a, b) in &pr.groups {
        let low = levels[a..=b + 1]
            .iter()
            .cloned()
            .fold(f64::INFINITY, f64::min)
            - 0.05 * span;
        let (x0, x1) = (a as f64 + 0.1, b as f64 + 0.9);
        let tick = 0.025 * span;
        chart
            .draw_series(LineSeries::new(
                [(x0, low + tick), (x0, low), (x1, low), (x1, low + tick)],
                INK.stroke_width(1),
            ))
            .map_err(draw_err)?;
        chart
            .draw_series([Text::new(
                "coupled",
                ((x0 + x1) / 2.0, low - 0.01 * span),
                centred(12, VPos::Top),
            )])
            .map_err(draw_err)?;
    }
    Ok(())
}

/// Step labels under the axis: id, then class (or the value of dG'°), and
/// the backward mark; every `every`-th step.
fn draw_step_labels<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    chart: &Chart<'_, DB>,
    pr: &Profile,
    actual: bool,
    y: (f64, f64),
    every: usize,
) -> Result<(), PlotError> {
    let root_y = chart.backend_coord(&(0.0, y.0)).1;
    let base = area.get_base_pixel();
    for k in (0..pr.ids.len()).step_by(every) {
        let (x, _) = chart.backend_coord(&(k as f64 + 0.5, y.0));
        let turns = if (pr.times[k] - 1.0).abs() > 1e-9 {
            format!(" ×{}", crate::present::amount(pr.times[k]))
        } else {
            String::new()
        };
        let second = if actual {
            format!("{}{turns}", pr.classes[k].as_str())
        } else {
            format!("{:+.1}{turns}", pr.dg0[k])
        };
        let at = |dy: i32| (x - base.0, root_y - base.1 + dy);
        area.draw(&Text::new(pr.ids[k].clone(), at(8), centred(13, VPos::Top)))
            .map_err(draw_err)?;
        area.draw(&Text::new(second, at(26), centred(11, VPos::Top)))
            .map_err(draw_err)?;
        if actual && pr.against[k] {
            area.draw(&Text::new(
                "⇄ backward",
                at(41),
                centred(11, VPos::Top).color(&AGAINST),
            ))
            .map_err(draw_err)?;
        }
    }
    Ok(())
}

/// The legend in the headroom above the data: far steps, and steps that run backward.
fn draw_legend<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    pr: &Profile,
    y: (f64, f64),
) -> Result<(), PlotError> {
    let span = y.1 - y.0;
    chart
        .draw_series(LineSeries::new(
            [(0.0, y.1 - 0.05 * span), (0.4, y.1 - 0.05 * span)],
            FAR.stroke_width(5),
        ))
        .map_err(draw_err)?;
    chart
        .draw_series([Text::new(
            format!("far from equilibrium (dG' ≤ {:.0} {})", pr.far, pr.unit),
            (0.5, y.1 - 0.05 * span),
            font(12).pos(Pos::new(HPos::Left, VPos::Center)),
        )])
        .map_err(draw_err)?;
    if pr.against.iter().any(|&b| b) {
        chart
            .draw_series(LineSeries::new(
                [(0.0, y.1 - 0.09 * span), (0.4, y.1 - 0.09 * span)],
                AGAINST.stroke_width(2),
            ))
            .map_err(draw_err)?;
        chart
            .draw_series([Text::new(
                "⇄ runs backward (dG' > 0): the route cannot carry forward flux here",
                (0.5, y.1 - 0.09 * span),
                font(12)
                    .color(&AGAINST)
                    .pos(Pos::new(HPos::Left, VPos::Center)),
            )])
            .map_err(draw_err)?;
    }
    Ok(())
}

/// Draws the across-samples panel: min–max line, 10–90 % bar, median tick per step.
fn spread_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    pr: &Profile,
    sum: &Summary,
    u: EnergyUnit,
) -> Result<(), PlotError> {
    let n = sum.steps.len();
    let every = label_stride(n, area.dim_in_pixel().0);
    let y = y_range(
        sum.steps
            .iter()
            .flat_map(|s| [u.of(s.min), u.of(s.max)])
            .chain([pr.far]),
    );
    let mut chart = ChartBuilder::on(area)
        .caption(
            format!(
                "dG' per step across {} samples: median (tick), 10–90 % (bar), min–max (line)",
                sum.samples
            ),
            font(18),
        )
        .margin(12)
        .margin_right(20)
        .x_label_area_size(72)
        .y_label_area_size(64)
        .build_cartesian_2d(0f64..n as f64, y.0..y.1)
        .map_err(draw_err)?;
    chart
        .configure_mesh()
        .disable_x_mesh()
        .x_labels(0)
        .y_labels(8)
        .y_desc(format!("dG' [{}]", pr.unit))
        .label_style(font(13))
        .axis_desc_style(font(14))
        .light_line_style(TRANSPARENT)
        .draw()
        .map_err(draw_err)?;
    draw_spread_guides(&mut chart, pr, n)?;
    draw_spreads(&mut chart, sum, u)?;
    let root_y = chart.backend_coord(&(0.0, y.0)).1 - area.get_base_pixel().1;
    for (k, s) in sum.steps.iter().enumerate().step_by(every) {
        let x = chart.backend_coord(&(k as f64 + 0.5, y.0)).0 - area.get_base_pixel().0;
        area.draw(&Text::new(
            pr.ids[k].clone(),
            (x, root_y + 8),
            centred(13, VPos::Top),
        ))
        .map_err(draw_err)?;
        area.draw(&Text::new(
            format!("far {}/{}", s.classes.far, sum.samples),
            (x, root_y + 26),
            centred(11, VPos::Top),
        ))
        .map_err(draw_err)?;
        if s.against > 0 {
            area.draw(&Text::new(
                format!("⇄ {}/{}", s.against, sum.samples),
                (x, root_y + 41),
                centred(11, VPos::Top).color(&AGAINST),
            ))
            .map_err(draw_err)?;
        }
    }
    Ok(())
}

/// The across-samples panel's guides: the far threshold (dashed, labelled) and zero.
fn draw_spread_guides<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    pr: &Profile,
    n: usize,
) -> Result<(), PlotError> {
    chart
        .draw_series(DashedLineSeries::new(
            [(0.0, pr.far), (n as f64, pr.far)],
            8,
            5,
            FAR.stroke_width(1),
        ))
        .map_err(draw_err)?;
    chart
        .draw_series([Text::new(
            format!("far threshold {:.0} {}", pr.far, pr.unit),
            (0.05, pr.far),
            font(11).pos(Pos::new(HPos::Left, VPos::Bottom)),
        )])
        .map_err(draw_err)?;
    chart
        .draw_series(LineSeries::new(
            [(0.0, 0.0), (n as f64, 0.0)],
            RGBColor(170, 170, 170).stroke_width(1),
        ))
        .map_err(draw_err)?;
    Ok(())
}

/// Per step: the min–max line, the 10–90 % bar (dark when mostly far) and the median tick.
fn draw_spreads<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    sum: &Summary,
    u: EnergyUnit,
) -> Result<(), PlotError> {
    for (k, s) in sum.steps.iter().enumerate() {
        let x = k as f64 + 0.5;
        let mostly_far = 2 * s.classes.far > sum.samples;
        let colour = if mostly_far { FAR } else { OTHER };
        chart
            .draw_series(LineSeries::new(
                [(x, u.of(s.min)), (x, u.of(s.max))],
                INK.stroke_width(1),
            ))
            .map_err(draw_err)?;
        chart
            .draw_series([Rectangle::new(
                [(x - 0.18, u.of(s.p10)), (x + 0.18, u.of(s.p90))],
                colour.mix(0.55).filled(),
            )])
            .map_err(draw_err)?;
        chart
            .draw_series(LineSeries::new(
                [(x - 0.26, u.of(s.median)), (x + 0.26, u.of(s.median))],
                INK.stroke_width(3),
            ))
            .map_err(draw_err)?;
    }
    Ok(())
}

/// Most steps drawn at full width with every label; longer routes share the
/// same width.
const MAX_LABELLED: usize = 40;

/// Label every `k`-th step so that labels keep about 62 px each.
fn label_stride(n: usize, width: u32) -> usize {
    let per = f64::from(width.saturating_sub(110).max(1)) / n.max(1) as f64;
    ((62.0 / per).ceil() as usize).max(1)
}

/// The caption, saying which steps carry labels when not all do.
fn thinned(caption: &str, every: usize) -> String {
    if every > 1 {
        format!("{caption} (every {every}th step labelled)")
    } else {
        caption.to_string()
    }
}

/// The energy-profile picture as SVG text.
pub fn svg(
    prep: &Prepared,
    a: &Analysis,
    spread: Option<&Summary>,
    u: EnergyUnit,
) -> Result<String, PlotError> {
    let pr = profile(prep, a, u);
    let n = pr.ids.len();
    if n == 0 {
        return Err(PlotError::Empty);
    }
    // 62 px a step up to a cap: a long route is drawn narrower, its labels
    // thinned to every k-th step (the caption says so), so a 5,000-step
    // route stays a picture of a few MB rather than a quarter-million pixels.
    let panel_w = (110 + 62 * n.min(MAX_LABELLED) as u32).max(560);
    let top_h = 560u32;
    let spread_h = if spread.is_some() { 420u32 } else { 0 };
    let (w, h) = (2 * panel_w, 50 + top_h + spread_h);
    let y = y_range(pr.actual.iter().chain(pr.standard.iter()).copied());
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        root.draw(&Text::new(
            format!("{} — {} route", prep.pathway.name, a.direction.as_str()),
            (w as i32 / 2, 14),
            centred(20, VPos::Top),
        ))
        .map_err(draw_err)?;
        let body = root.margin(44, 0, 0, 0);
        let (top, bottom) = body.split_vertically(top_h);
        let (left, right) = top.split_horizontally(panel_w);
        let cap_a = if spread.is_some() {
            "actual dG' (the file's concentrations)"
        } else {
            "actual dG'"
        };
        profile_panel(&left, &pr, &pr.actual, true, y, cap_a)?;
        profile_panel(
            &right,
            &pr,
            &pr.standard,
            false,
            y,
            "standard dG'° (1 M each)",
        )?;
        if let Some(s) = spread {
            spread_panel(&bottom, &pr, s, u)?;
        }
        root.present().map_err(draw_err)?;
    }
    Ok(out)
}

/// Renders SVG text to PNG bytes with the bundled font.
pub fn png(svg: &str) -> Result<Vec<u8>, PlotError> {
    use resvg::{tiny_skia, usvg};
    let mut opt = usvg::Options {
        font_family: FONT_FAMILY.to_string(),
        ..usvg::Options::default()
    };
    let db = opt.fontdb_mut();
    db.load_font_data(FONT_DATA.to_vec());
    db.set_sans_serif_family(FONT_FAMILY);
    let tree = usvg::Tree::from_str(svg, &opt).map_err(|e| PlotError::Render(e.to_string()))?;
    let size = tree.size().to_int_size();
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height())
        .ok_or_else(|| PlotError::Render("the picture has no area".into()))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    resvg::render(&tree, tiny_skia::Transform::default(), &mut pixmap.as_mut());
    pixmap
        .encode_png()
        .map_err(|e| PlotError::Render(e.to_string()))
}
