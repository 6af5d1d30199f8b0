//! Styles of the explorer (colour only when allowed), pane borders and the
//! bottleneck mark.

use crate::analysis::{Class, VerdictKind};
use crate::tui::app::{App, Pane};
use ratatui::style::{Color, Modifier, Style};
use ratatui::symbols::border;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders};

/// Borders drawn with ASCII only.
pub const ASCII_BORDER: border::Set = border::Set {
    top_left: "+",
    top_right: "+",
    bottom_left: "+",
    bottom_right: "+",
    vertical_left: "|",
    vertical_right: "|",
    horizontal_top: "-",
    horizontal_bottom: "-",
};

/// Width of the step list's marker column (the bottleneck flag, then the backward mark).
pub const MARKER_COLUMN: usize = 2;

/// The bottleneck flag in the marker column, Unicode and ASCII.
pub fn bottleneck_mark(ascii: bool) -> &'static str {
    if ascii { "@" } else { "■" }
}

/// The mark of a route step that runs backward (dG' > 0), Unicode and ASCII.
pub fn against_mark(ascii: bool) -> &'static str {
    if ascii { "!" } else { "⇄" }
}

/// Styles, with colour only when allowed.
#[derive(Debug, Clone, Copy)]
pub struct Theme {
    color: bool,
}

impl Theme {
    /// Styles for a screen with colour (`true`) or without.
    pub fn new(color: bool) -> Self {
        Theme { color }
    }
    /// Foreground colour `c`, when colour is allowed.
    pub fn fg(&self, c: Color) -> Style {
        if self.color {
            Style::default().fg(c)
        } else {
            Style::default()
        }
    }
    /// Bold text.
    pub fn bold(&self) -> Style {
        Style::default().add_modifier(Modifier::BOLD)
    }
    /// Secondary text.
    pub fn dim(&self) -> Style {
        if self.color {
            Style::default().fg(Color::DarkGray)
        } else {
            Style::default().add_modifier(Modifier::DIM)
        }
    }
    /// The selected row.
    pub fn selected(&self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED)
    }
    /// A row related to the selection in the other pane.
    pub fn related(&self) -> Style {
        self.fg(Color::Cyan).add_modifier(Modifier::UNDERLINED)
    }
    /// An edited, unsaved value.
    pub fn edited(&self) -> Style {
        self.fg(Color::Yellow).add_modifier(Modifier::ITALIC)
    }
    /// A warning.
    pub fn warn(&self) -> Style {
        self.fg(Color::Red).add_modifier(Modifier::BOLD)
    }
    /// The colour of a class.
    pub fn class(&self, c: Class) -> Style {
        match c {
            Class::Far => self.fg(Color::Red),
            Class::Moderate => self.fg(Color::Yellow),
            Class::Near => self.fg(Color::Green),
            Class::Uphill => self.fg(Color::Magenta),
        }
    }
    /// The colour of a verdict.
    pub fn verdict(&self, v: VerdictKind) -> Style {
        match v {
            VerdictKind::Prime => self.fg(Color::LightRed).add_modifier(Modifier::BOLD),
            VerdictKind::Candidate => self.fg(Color::LightYellow),
            VerdictKind::NotHere => self.fg(Color::DarkGray),
        }
    }
}

/// A pane's border with its title, marked when the pane has the focus.
pub fn block<'a>(app: &App, t: &Theme, pane: Pane, title: &'a str) -> Block<'a> {
    block_with(app, t, pane, title, Vec::new())
}

/// A pane's border with its title and extra title spans.
pub fn block_with<'a>(
    app: &App,
    t: &Theme,
    pane: Pane,
    title: &'a str,
    extra: Vec<Span<'a>>,
) -> Block<'a> {
    let focused = app.focus == pane;
    let mark = match (focused, app.opts.ascii) {
        (true, false) => "▸ ",
        (true, true) => "> ",
        _ => "",
    };
    let b = Block::default()
        .borders(Borders::ALL)
        .title(Line::from(
            [
                Span::styled(mark, t.bold()),
                Span::styled(title, if focused { t.bold() } else { Style::default() }),
            ]
            .into_iter()
            .chain(extra)
            .collect::<Vec<_>>(),
        ))
        .border_style(if focused {
            t.fg(Color::Cyan).add_modifier(Modifier::BOLD)
        } else {
            t.dim()
        });
    if app.opts.ascii {
        b.border_set(ASCII_BORDER)
    } else {
        b
    }
}
