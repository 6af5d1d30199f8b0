//! Drawing the explorer: a pure function of `App` into a ratatui `Buffer`.
//! Step list (with the MDF in its title and bottleneck flags), concentration
//! pane, energy ladder, step detail, a message line and the status line
//! (with the chosen sample); the key overlay on top when asked. Meaning is always
//! carried by a symbol or word as well as by colour, so NO_COLOR and
//! `--ascii` lose nothing.
//!
//! Parts: `theme` (styles, borders), `text` (cutting, padding, ASCII
//! stand-ins), `steps`, `compounds`, `ladder`, `detail`, `status` (message
//! and status lines) and `help` (the key overlay).

pub mod compounds;
pub mod detail;
pub mod help;
pub mod ladder;
pub mod status;
pub mod steps;
pub mod text;
pub mod theme;

pub use detail::detail_lines;
pub use help::KEYS;
pub use text::{fit, tenth};
pub use theme::{MARKER_COLUMN, Theme, bottleneck_mark};

use super::app::{App, Mode};
use ratatui::Frame;
use ratatui::buffer::Buffer;
use ratatui::layout::{Constraint, Layout, Rect};

/// Draws the whole explorer into a frame.
pub fn draw(frame: &mut Frame, app: &App) {
    let area = frame.area();
    render(app, area, frame.buffer_mut());
}

/// Draws the whole explorer into a buffer area.
pub fn render(app: &App, area: Rect, buf: &mut Buffer) {
    let t = Theme::new(app.opts.color);
    let [main, msg, status] = Layout::vertical([
        Constraint::Min(0),
        Constraint::Length(1),
        Constraint::Length(1),
    ])
    .areas(area);
    let rows = (app.step_rows().max(app.pathway().compounds.len()) as u16).saturating_add(3);
    let top_h = rows.min((main.height * 55 / 100).max(8));
    let [top, bottom] =
        Layout::vertical([Constraint::Length(top_h), Constraint::Min(0)]).areas(main);
    let comp_w = if area.width >= 110 {
        44
    } else if area.width >= 90 {
        38
    } else {
        31
    };
    let [steps_a, comps_a] =
        Layout::horizontal([Constraint::Min(0), Constraint::Length(comp_w)]).areas(top);
    let [ladder_a, detail_a] =
        Layout::horizontal([Constraint::Percentage(55), Constraint::Percentage(45)]).areas(bottom);
    steps::steps_pane(app, &t, steps_a, buf);
    compounds::compounds_pane(app, &t, comps_a, buf);
    ladder::ladder_pane(app, &t, ladder_a, buf);
    detail::detail_pane(app, &t, detail_a, buf);
    status::message_line(app, &t, msg, buf);
    status::status_line(app, &t, status, buf);
    if app.mode == Mode::Help {
        help::help_overlay(app, &t, area, buf);
    }
    if app.opts.ascii {
        text::asciify(area, buf);
    }
}
