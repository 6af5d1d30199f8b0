//! The step list: one row per route step with its energies, class, share of
//! the drop and verdict, the MDF in the title and the bottleneck flags.

use super::text::fit;
use super::text::{class_text, pad, rpad, tenth, window};
use super::theme::{MARKER_COLUMN, Theme, against_mark, block_with, bottleneck_mark};
use crate::model::units;
use crate::present;
use crate::tui::app::{App, LIVE_MDF_MAX_STEPS, Pane};
use crate::tui::optimum::LiveMdf;
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget};

/// Draws the step list.
pub fn steps_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let a = &app.analysis;
    let p = app.pathway();
    let u = app.opts.unit;
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
    let idw = (0..app.step_rows())
        .filter_map(|k| app.step_row(k))
        .map(|s| p.steps[s.step].id.chars().count())
        .max()
        .unwrap_or(3)
        .clamp(3, 10);
    let compact = w < 72;
    let (dgw, clw, shw, vw) = if compact {
        (7, 9, 5, 2)
    } else {
        (8, 10, 6, 12)
    };
    // Flux control estimate (science.md §7): " 0.57" when there is room for
    // it and a 10-character enzyme column, else a one-character bar.
    let base = 2 + idw + 1 + MARKER_COLUMN + dgw * 2 + 7 + clw + shw + 1 + vw;
    let ctw = if !compact && w >= base + 5 + 1 + 10 {
        5
    } else if w >= base + 2 {
        2
    } else {
        0
    };
    let fixed = base + ctw;
    let enzw = w.saturating_sub(fixed + 1);
    let show_enz = enzw >= 8;
    let mut header = format!("  {:<idw$} {:MARKER_COLUMN$}", "step", "");
    if show_enz {
        header.push_str(&pad("enzyme", enzw, ascii));
        header.push(' ');
    }
    header.push_str(&format!(
        "{:>dgw$}{:>dgw$} {:>5} {:<clw$}{:>shw$}{:>ctw$} {}",
        "dG'°",
        "dG'",
        "turns",
        "class",
        "share",
        match ctw {
            5 => "ctrl",
            2 => "c",
            _ => "",
        },
        if compact { "" } else { "verdict" }
    ));
    let mut lines = vec![Line::styled(fit(&header, w, ascii), t.bold())];
    let h = inner.height.saturating_sub(1) as usize;
    let n = app.step_rows();
    let first = window(n, h, app.step_sel);
    let rel_comp = (app.focus == Pane::Compounds).then_some(app.comp_sel);
    for k in first..(first + h).min(n) {
        let Some(s) = app.step_row(k) else { break };
        let st = &p.steps[s.step];
        let side = k >= a.steps.len();
        let selected = k == app.step_sel;
        let related = rel_comp.is_some_and(|c| app.step_uses(k, c));
        let largest = !side && a.largest_drop == Some(k);
        let row_style = if selected {
            t.selected()
        } else if related {
            t.related()
        } else {
            Style::default()
        };
        let row_style = if largest {
            row_style.add_modifier(Modifier::BOLD)
        } else {
            row_style
        };
        let lead = match (selected, related, ascii) {
            (true, _, false) => "▶ ",
            (true, _, true) => "> ",
            (false, true, false) => "• ",
            (false, true, true) => "* ",
            _ => "  ",
        };
        let mut spans = vec![Span::styled(lead, row_style)];
        spans.push(Span::styled(pad(&st.id, idw, ascii), row_style));
        let marker = match (!side && app.is_bottleneck(k), s.against) {
            (true, true) => format!("{}{}", bottleneck_mark(ascii), against_mark(ascii)),
            (true, false) => bottleneck_mark(ascii).to_string(),
            (false, true) => against_mark(ascii).to_string(),
            (false, false) => String::new(),
        };
        spans.push(Span::styled(" ", row_style));
        spans.push(Span::styled(
            format!("{marker:MARKER_COLUMN$}"),
            row_style.patch(t.warn()),
        ));
        if show_enz {
            let enz = match (side, s.replaces) {
                (true, _) => format!("{} (side)", st.enzyme.as_deref().unwrap_or("")),
                (_, Some(f)) => format!(
                    "{} (for {})",
                    st.enzyme.as_deref().unwrap_or(""),
                    p.steps[f].id
                ),
                _ => st.enzyme.clone().unwrap_or_default(),
            };
            spans.push(Span::styled(pad(&enz, enzw, ascii) + " ", row_style));
        }
        spans.push(Span::styled(
            format!(
                "{:>dgw$.1}{:>dgw$.1}",
                tenth(u.of(s.dg0)),
                tenth(u.of(s.dg))
            ),
            row_style,
        ));
        let turns = if side {
            " side".to_string()
        } else {
            format!(" {:>5}", units::sig3(s.times))
        };
        spans.push(Span::styled(turns + " ", row_style));
        spans.push(Span::styled(
            pad(&class_text(s, ascii), clw, ascii),
            row_style.patch(t.class(s.class)),
        ));
        let share = if side || s.share <= 0.0 {
            String::new()
        } else {
            format!("{:.0}%", s.share * 100.0)
        };
        let mark = if largest {
            if ascii { "<" } else { "◀" }
        } else {
            " "
        };
        spans.push(Span::styled(
            format!("{}{mark}", rpad(&share, shw - 1, ascii)),
            row_style,
        ));
        let ctrl = match (side, a.control_estimate.coefficient(k)) {
            (false, Some(c)) if ctw == 5 => format!("{c:.2}"),
            (false, Some(c)) if ctw == 2 => control_bar(c, ascii).to_string(),
            (false, None) if ctw == 5 => "-".into(),
            _ => String::new(),
        };
        spans.push(Span::styled(format!("{ctrl:>ctw$}"), row_style));
        if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
            let full = present::verdict_symbol(v.kind, ascii);
            let txt = if compact {
                full.split(' ').next().unwrap_or("").to_string()
            } else {
                full.to_string()
            };
            spans.push(Span::raw(" "));
            spans.push(Span::styled(txt, row_style.patch(t.verdict(v.kind))));
        }
        lines.push(Line::from(spans));
    }
    Paragraph::new(lines).render(inner, buf);
}

/// The MDF for the step list's title, in at most `room` characters.
fn mdf_title(app: &App, t: &Theme, room: usize) -> Vec<Span<'static>> {
    let u = app.opts.unit;
    let ascii = app.opts.ascii;
    let sep = if ascii { " | " } else { " · " };
    let (long, short, style) = match &app.mdf {
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
        LiveMdf::Failed(_) => (
            "MDF not solved (see step detail)".to_string(),
            "MDF failed".to_string(),
            t.warn(),
        ),
        LiveMdf::Skipped(_) => (
            format!("MDF off (over {LIVE_MDF_MAX_STEPS} steps)"),
            "MDF off".to_string(),
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
