//! The `?` overlay: the key list and the legend of symbols.

use super::text::ascii_line;
use super::theme::{ASCII_BORDER, Theme};
use crate::tui::app::App;
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Paragraph, Widget};

/// The key list of the `?` overlay (a contract: these keys do these things).
pub const KEYS: &[(&str, &str)] = &[
    (
        "q",
        "quit (a second q confirms when there are unsaved edits)",
    ),
    ("?", "this help (any key closes it)"),
    ("Tab / Shift-Tab", "next / previous pane"),
    ("Up/Down, k/j", "move in the pane"),
    (
        "Enter",
        "edit the selected concentration (with or without a unit)",
    ),
    ("  Enter / Esc", "apply / cancel the typed value"),
    ("+ / -", "selected concentration × / ÷ 10^0.1"),
    ("> / <", "selected concentration × / ÷ 10"),
    ("/", "find a step or compound by name"),
    ("t / p / i", "edit temperature / pH / ionic strength"),
    ("r", "reverse route on/off"),
    ("w", "walk the route one step at a time (Esc ends)"),
    (
        "o",
        "load the optimal concentrations (MDF; rounded to 3 figures)",
    ),
    ("[ / ]", "previous / next sample (with --samples TABLE.csv)"),
    ("u / Ctrl-r", "undo / redo"),
    ("s", "save concentrations and conditions into the file"),
    ("Ctrl-c", "quit at once"),
];

/// Draws the key overlay.
pub fn help_overlay(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let w = area.width.min(84);
    let h = (KEYS.len() as u16 + 4).min(area.height);
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
    let mut lines: Vec<Line<'static>> = KEYS
        .iter()
        .map(|(k, what)| {
            Line::from(vec![
                Span::styled(format!(" {k:<16}"), t.bold()),
                Span::raw(what.to_string()),
            ])
        })
        .collect();
    let legend: [&str; 2] = if app.opts.ascii {
        lines = lines.into_iter().map(ascii_line).collect();
        [
            " v far \\ moderate ~ near ^ uphill ? unsure +- 1 sd",
            " < largest drop @ bottleneck ! runs backward (dG' > 0)",
        ]
    } else {
        [
            " ▼ far ↘ moderate ≈ near ▲ uphill ? unsure ± 1 sd",
            " ◀ largest drop ■ bottleneck ⇄ runs backward (dG' > 0)",
        ]
    };
    for l in legend {
        lines.push(Line::styled(l, t.dim()));
    }
    Paragraph::new(lines).block(b).render(r, buf);
}
