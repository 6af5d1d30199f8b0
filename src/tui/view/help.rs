//! The `?` overlay: the key list and the legend of symbols.

use super::text::ascii_line;
use super::theme::{ASCII_BORDER, Theme};
use crate::tui::app::App;
use crate::tui::keymap::BINDINGS;
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Paragraph, Widget};

/// The rows of the `?` overlay: label and help of the key table's rows that have one.
pub fn key_rows() -> impl Iterator<Item = (&'static str, &'static str)> {
    BINDINGS
        .iter()
        .filter(|b| !b.label.is_empty())
        .map(|b| (b.label, b.help))
}

/// Every glyph of the screen, by pane.
pub const LEGEND: [&str; 5] = [
    " steps: ▼ far ↘ moderate ≈ near ▲ uphill ? unsure ◀ largest drop ■ bottleneck",
    "   ⇄ runs backward (dG' > 0)",
    " verdict: ◆ control point ◇ candidate · not here; ctrl ▁…█ flux control 0…1",
    " ladder: ━ drop █ largest ╍ rise ┃ rung (cumulative dG') │─ dG'° ┌│└ coupled",
    "   ├─┤ ±x 1 sd ┊ next start; lists: ▶ selected • used by it * unsaved … cut",
];

/// The legend in ASCII (each stand-in distinct within its pane).
pub const LEGEND_ASCII: [&str; 5] = [
    " steps: v far \\ moderate ~ near ^ uphill ? unsure < largest drop @ bottleneck",
    "   ! runs backward (dG' > 0)",
    " verdict: * control point o candidate - not here; ctrl .:-=+*#@ 0 to 1",
    " ladder: = drop # largest ~ rise | rung (cumulative dG') :- dG'o /|\\ coupled",
    "   [-] +-x 1 sd : next start; lists: > selected + used by it * unsaved $ cut",
];

/// Draws the key overlay.
pub fn help_overlay(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let w = area.width.min(88);
    let h = (key_rows().count() as u16 + 2 + LEGEND.len() as u16).min(area.height);
    let r = Rect {
        x: area.x + (area.width - w) / 2,
        y: area.y + (area.height - h) / 2,
        width: w,
        height: h,
    };
    Clear.render(r, buf);
    let mut b = Block::default()
        .borders(Borders::ALL)
        .title(Span::styled(" keys ", t.bold()))
        .border_style(t.bold());
    if app.opts.ascii {
        b = b.border_set(ASCII_BORDER);
    }
    let mut lines: Vec<Line<'static>> = key_rows()
        .map(|(k, what)| {
            Line::from(vec![
                Span::styled(format!(" {k:<16}"), t.bold()),
                Span::raw(what.to_string()),
            ])
        })
        .collect();
    if app.opts.ascii {
        lines = lines.into_iter().map(ascii_line).collect();
    }
    let legend = if app.opts.ascii {
        &LEGEND_ASCII
    } else {
        &LEGEND
    };
    lines.extend(legend.iter().map(|l| Line::styled(*l, t.dim())));
    Paragraph::new(lines).block(b).render(r, buf);
}
