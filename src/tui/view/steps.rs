//! The step list: one row per route step with its energies, class, share of
//! the drop and verdict, the MDF in the title and the bottleneck flags.

use super::text::fit;
use super::text::{class_text, num3, pad, rpad, tenth, window};
use super::theme::{MARKER_COLUMN, Theme, against_mark, block_with, bottleneck_mark};
use crate::model::{Pathway, Step, units};
use crate::present;
use crate::tui::app::LiveMdf;
use crate::tui::app::{App, Pane};
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget};

/// Columns of the sd, Q and K' block of a wide step list.
const EXTRA: usize = 29;
/// Enzyme columns kept before the sd, Q and K' block is shown.
const ENZ_ROOM: usize = 24;

/// The widths of the step list's columns for a pane `w` wide.
struct Cols {
    idw: usize,
    compact: bool,
    dgw: usize,
    clw: usize,
    shw: usize,
    pw: usize,
    ctw: usize,
    extra: bool,
    enzw: usize,
    show_enz: bool,
}

impl Cols {
    fn new(app: &App, w: usize) -> Cols {
        let p = app.pathway();
        let rows = || (0..app.step_rows()).filter_map(|k| app.step_row(k));
        let idw = rows()
            .map(|s| p.steps[s.step].id.chars().count())
            .max()
            .unwrap_or(3)
            .clamp(3, 10);
        let compact = w < 72;
        // `pw`: the per pass column ("/pass" when compact).
        let (dgw, clw, shw, vw, pw) = if compact {
            (7, 9, 5, 2, 5)
        } else {
            (8, 11, 6, 12, 8)
        };
        // Flux control estimate (science.md §7): " 0.57" when there is room for
        // it and a 10-character enzyme column, else a one-character bar.
        let base = 2 + idw + 1 + MARKER_COLUMN + dgw * 2 + pw + 2 + clw + shw + 1 + vw;
        let ctw = if !compact && w >= base + 5 + 1 + 10 {
            5
        } else if w >= base + 2 {
            2
        } else {
            0
        };
        let fixed = base + ctw;
        // A wide pane shows sd, Q and K' (`EXTRA` columns) once the enzyme has
        // `ENZ_ROOM` columns; the enzyme takes what is left.
        let extra = w >= fixed + 1 + ENZ_ROOM + EXTRA;
        let mut enzw = w.saturating_sub(fixed + 1 + if extra { EXTRA } else { 0 });
        if extra {
            // Room left after a full enzyme name is left blank at the end.
            let longest = rows()
                .map(|s| {
                    p.steps[s.step]
                        .enzyme
                        .as_deref()
                        .map_or(0, |e| e.chars().count())
                        + 7
                })
                .max()
                .unwrap_or(0);
            enzw = enzw.min(longest.max(ENZ_ROOM));
        }
        Cols {
            idw,
            compact,
            dgw,
            clw,
            shw,
            pw,
            ctw,
            extra,
            enzw,
            show_enz: enzw >= 8,
        }
    }

    fn header(&self, ascii: bool) -> String {
        let Cols {
            idw,
            dgw,
            pw,
            clw,
            shw,
            ctw,
            enzw,
            ..
        } = *self;
        let mut header = format!(
            "  {:<idw$} {:MARKER_COLUMN$}",
            "step",
            bottleneck_mark(ascii)
        );
        if self.show_enz {
            header.push_str(&pad("enzyme", enzw, ascii));
            header.push(' ');
        }
        if self.extra {
            header.push_str(&format!("{:>8}{:>10}{:>10} ", "sd", "Q", "K'"));
        }
        header.push_str(&format!(
            "{:>dgw$}{:>dgw$} {:>pw$} {:<clw$}{:>shw$}{:>ctw$} {}",
            "dG'°",
            "dG'",
            if self.compact { "/pass" } else { "per pass" },
            "class",
            "share",
            match ctw {
                5 => "ctrl",
                2 => "c",
                _ => "",
            },
            if self.compact { "" } else { "verdict" }
        ));
        header
    }
}

/// Draws the step list.
pub fn steps_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let a = &app.analysis;
    let ascii = app.opts.ascii;
    let title = format!(
        "Steps ({} route{}) {}",
        a.steps.len(),
        if a.side.is_empty() {
            String::new()
        } else {
            format!(" + {} side", a.side.len())
        },
        a.direction.as_str()
    );
    let room = (area.width as usize).saturating_sub(title.chars().count() + 4);
    let b = block_with(app, t, Pane::Steps, &title, mdf_title(app, t, room));
    let inner = b.inner(area);
    b.render(area, buf);
    let w = inner.width as usize;
    let cols = Cols::new(app, w);
    let mut lines = vec![Line::styled(fit(&cols.header(ascii), w, ascii), t.bold())];
    let h = inner.height.saturating_sub(1) as usize;
    let n = app.step_rows();
    let first = window(n, h, app.step_sel);
    for k in first..(first + h).min(n) {
        let Some(line) = row(app, t, k, &cols) else {
            break;
        };
        lines.push(line);
    }
    Paragraph::new(lines).render(inner, buf);
    more_mark(area, buf, first, h, n, ascii);
}

/// The style and lead of step-list row `k` (selected, used by the selected
/// compound, the largest drop).
fn row_look(app: &App, t: &Theme, k: usize) -> (Style, &'static str) {
    let a = &app.analysis;
    let side = k >= a.steps.len();
    let selected = k == app.step_sel;
    let related = app.focus == Pane::Compounds && app.step_uses(k, app.comp_sel);
    let largest = !side && a.largest_drop == Some(k);
    let style = if selected {
        t.selected()
    } else if related {
        t.related()
    } else {
        Style::default()
    };
    let style = if largest {
        style.add_modifier(Modifier::BOLD)
    } else {
        style
    };
    let lead = match (selected, related, app.opts.ascii) {
        (true, _, false) => "▶ ",
        (true, _, true) => "> ",
        (false, true, false) => "• ",
        (false, true, true) => "+ ",
        _ => "  ",
    };
    (style, lead)
}

/// The marker column: the bottleneck flag, then the backward-running flag.
fn marker_text(bottleneck: bool, against: bool, ascii: bool) -> String {
    match (bottleneck, against) {
        (true, true) => format!("{}{}", bottleneck_mark(ascii), against_mark(ascii)),
        (true, false) => bottleneck_mark(ascii).to_string(),
        (false, true) => against_mark(ascii).to_string(),
        (false, false) => String::new(),
    }
}

/// The enzyme column: the name, with "(side)" for a side step or the step a
/// bypass stands in for.
fn enzyme_text(p: &Pathway, st: &Step, side: bool, replaces: Option<usize>) -> String {
    match (side, replaces) {
        (true, _) => format!("{} (side)", st.enzyme.as_deref().unwrap_or("")),
        (_, Some(f)) => format!(
            "{} (for {})",
            st.enzyme.as_deref().unwrap_or(""),
            p.steps[f].id
        ),
        _ => st.enzyme.clone().unwrap_or_default(),
    }
}

/// The control column `ctw` wide: the coefficient as a number (5), a bar
/// (2) or nothing; "-" for a route step without one when there is room.
fn control_text(side: bool, coefficient: Option<f64>, ctw: usize, ascii: bool) -> String {
    match (side, coefficient) {
        (false, Some(c)) if ctw == 5 => format!("{c:.2}"),
        (false, Some(c)) if ctw == 2 => control_bar(c, ascii).to_string(),
        (false, None) if ctw == 5 => "-".into(),
        _ => String::new(),
    }
}

/// One row of the step list.
fn row(app: &App, t: &Theme, k: usize, cols: &Cols) -> Option<Line<'static>> {
    let Cols {
        idw,
        dgw,
        pw,
        clw,
        shw,
        ctw,
        enzw,
        ..
    } = *cols;
    let (a, p, u, ascii) = (&app.analysis, app.pathway(), app.opts.unit, app.opts.ascii);
    let s = app.step_row(k)?;
    let st = &p.steps[s.step];
    let side = k >= a.steps.len();
    let largest = !side && a.largest_drop == Some(k);
    let (row_style, lead) = row_look(app, t, k);
    let mut spans = vec![Span::styled(lead, row_style)];
    spans.push(Span::styled(pad(&st.id, idw, ascii), row_style));
    let marker = marker_text(!side && app.is_bottleneck(k), s.against, ascii);
    spans.push(Span::styled(" ", row_style));
    spans.push(Span::styled(
        format!("{marker:MARKER_COLUMN$}"),
        row_style.patch(t.warn()),
    ));
    if cols.show_enz {
        let enz = enzyme_text(p, st, side, s.replaces);
        spans.push(Span::styled(pad(&enz, enzw, ascii) + " ", row_style));
    }
    if cols.extra {
        let sd = s
            .dg_sd
            .map(|sd| format!("{}{:.1}", if ascii { "+-" } else { "±" }, u.of(sd)))
            .unwrap_or_default();
        let text = format!("{sd:>8}{:>10}{:>10} ", num3(s.q()), num3(s.keq()));
        spans.push(Span::styled(text, row_style));
    }
    let dgs = format!(
        "{:>dgw$.1}{:>dgw$.1}",
        tenth(u.of(s.dg0)),
        tenth(u.of(s.dg))
    );
    spans.push(Span::styled(dgs, row_style));
    let times = if side {
        "side".to_string()
    } else {
        units::sig3(s.times)
    };
    spans.push(Span::styled(format!(" {times:>pw$} "), row_style));
    spans.push(Span::styled(
        pad(&class_text(s, ascii), clw, ascii),
        row_style.patch(t.class(s.class)),
    ));
    let share = if side || s.share <= 0.0 {
        String::new()
    } else {
        format!("{:.0}%", s.share * 100.0)
    };
    let mark = match (largest, ascii) {
        (true, true) => "<",
        (true, false) => "◀",
        _ => " ",
    };
    spans.push(Span::styled(
        format!("{}{mark}", rpad(&share, shw - 1, ascii)),
        row_style,
    ));
    let ctrl = control_text(side, a.control_estimate.coefficient(k), ctw, ascii);
    spans.push(Span::styled(format!("{ctrl:>ctw$}"), row_style));
    if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
        let full = present::verdict_symbol(v.kind, ascii);
        let txt = match cols.compact {
            true => full.split(' ').next().unwrap_or("").to_string(),
            false => full.to_string(),
        };
        spans.push(Span::raw(" "));
        spans.push(Span::styled(txt, row_style.patch(t.verdict(v.kind))));
    }
    Some(Line::from(spans))
}

/// On the bottom border of a list pane: how many rows are above and below
/// the visible ones, when the list scrolls.
pub fn more_mark(area: Rect, buf: &mut Buffer, first: usize, h: usize, n: usize, ascii: bool) {
    if n <= h || area.height < 2 || area.width < 12 {
        return;
    }
    let below = n - (first + h).min(n);
    let (up, down) = if ascii { ("^", "v") } else { ("↑", "↓") };
    let mut parts = Vec::new();
    if first > 0 {
        parts.push(format!("{up} {first} more"));
    }
    if below > 0 {
        parts.push(format!("{down} {below} more"));
    }
    let text = format!(" {} ", parts.join(" "));
    let x = area.right().saturating_sub(text.chars().count() as u16 + 1);
    buf.set_string(
        x.max(area.left() + 1),
        area.bottom() - 1,
        text,
        Style::default(),
    );
}

/// The MDF for the step list's title, in at most `room` characters.
fn mdf_title(app: &App, t: &Theme, room: usize) -> Vec<Span<'static>> {
    let u = app.opts.unit;
    let ascii = app.opts.ascii;
    let sep = if ascii { " | " } else { " · " };
    let (long, short, style) = match &app.mdf {
        LiveMdf::Solved(m) if !app.optimum_current() => {
            let v = tenth(u.of(m.value));
            (
                format!("MDF {v:+.1} {} (out of date, solving)", u.label()),
                format!("MDF {v:+.1} (solving)"),
                t.dim(),
            )
        }
        LiveMdf::Solved(m) => {
            let v = tenth(u.of(m.value));
            let num = format!("MDF {v:+.1} {}", u.label());
            if m.value > 0.0 {
                (num.clone(), format!("MDF {v:+.1}"), t.bold())
            } else {
                (
                    format!("{num}: cannot run within the bounds"),
                    format!("MDF {v:+.1}: cannot run"),
                    t.warn(),
                )
            }
        }
        LiveMdf::Failed(_) if !app.optimum_current() => (
            "MDF not solved (out of date, solving)".to_string(),
            "MDF solving".to_string(),
            t.dim(),
        ),
        LiveMdf::Failed(_) => (
            "MDF not solved (see step detail)".to_string(),
            "MDF failed".to_string(),
            t.warn(),
        ),
        LiveMdf::Pending => (
            "MDF being solved".to_string(),
            "MDF solving".to_string(),
            t.dim(),
        ),
    };
    let pick = [long, short]
        .into_iter()
        .find(|x| x.chars().count() + sep.chars().count() < room);
    match pick {
        Some(text) => vec![
            Span::raw(sep),
            Span::styled(text.replace('-', if ascii { "-" } else { "−" }), style),
            Span::raw(" "),
        ],
        None => Vec::new(),
    }
}

/// One character for a flux control coefficient in [0, 1]: eight heights.
pub fn control_bar(c: f64, ascii: bool) -> &'static str {
    const BARS: [&str; 8] = ["▁", "▂", "▃", "▄", "▅", "▆", "▇", "█"];
    const ASCII: [&str; 8] = [".", ":", "-", "=", "+", "*", "#", "@"];
    let i = ((c.clamp(0.0, 1.0) * 8.0).floor() as usize).min(7);
    if ascii { ASCII[i] } else { BARS[i] }
}
