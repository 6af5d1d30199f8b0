//! The message line (edit and find lines, messages, the hint) and the status
//! line (conditions, direction, sample, file, unsaved mark).

use super::text::ascii_line;
use super::theme::Theme;
use crate::model::units;
use crate::tui::app::{App, Mode, Target, Tone};
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Color, Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget};

/// Draws the message line.
pub fn message_line(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let ascii = app.opts.ascii;
    let cursor = if ascii { "_" } else { "█" };
    let line = match &app.mode {
        Mode::Edit {
            target,
            buffer,
            error,
        } => {
            let (what, now) = match *target {
                Target::Conc(i) => (
                    app.pathway().compounds[i].id.clone(),
                    units::format_conc(app.state().conc[i], ascii),
                ),
                Target::Temperature => (
                    "temperature".into(),
                    format!("{:.2} C", app.state().conditions.temperature - 273.15),
                ),
                Target::Ph => ("pH".into(), format!("{}", app.state().conditions.ph)),
                Target::IonicStrength => (
                    "ionic strength".into(),
                    format!("{} M", app.state().conditions.ionic_strength),
                ),
            };
            let mut spans = vec![
                Span::styled(format!("{what} (now {now}) = "), t.bold()),
                Span::raw(buffer.clone()),
                Span::styled(cursor, t.bold()),
            ];
            match error {
                Some(e) => {
                    let x = if ascii { "  x " } else { "  ✗ " };
                    spans.push(Span::styled(format!("{x}{e}"), t.warn()));
                }
                None => spans.push(Span::styled("  Enter applies · Esc cancels", t.dim())),
            }
            Line::from(spans)
        }
        Mode::Find { buffer } => Line::from(vec![
            Span::styled("find: ", t.bold()),
            Span::raw(buffer.clone()),
            Span::styled(cursor, t.bold()),
            Span::styled("  Enter goes there · Esc cancels", t.dim()),
        ]),
        _ => match &app.status {
            Some((m, Tone::Warn)) => {
                Line::styled(format!("{} {m}", if ascii { "!" } else { "⚠" }), t.warn())
            }
            Some((m, Tone::Info)) => Line::from(m.clone()),
            None => Line::styled(
                "Tab pane · j/k move · Enter edit · +/- ×10^0.1 · </> ×10 · r reverse · w walk · u undo · s save · ? keys",
                t.dim(),
            ),
        },
    };
    let line = if ascii { ascii_line(line) } else { line };
    Paragraph::new(line).render(area, buf);
}

/// Draws the status line.
pub fn status_line(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let c = &app.state().conditions;
    let ascii = app.opts.ascii;
    let sep = if ascii { " | " } else { " │ " };
    let deg = if ascii { " C" } else { " °C" };
    let mut spans = vec![
        Span::styled(format!(" {:.1}{deg}", c.temperature - 273.15), t.bold()),
        Span::raw(sep),
        Span::styled(format!("pH {}", c.ph), t.bold()),
        Span::raw(sep),
        Span::styled(format!("I {} M", c.ionic_strength), t.bold()),
        Span::raw(sep),
        Span::styled(
            app.state().direction.as_str().to_string(),
            if app.state().direction == crate::analysis::Direction::Reverse {
                t.bold().add_modifier(Modifier::REVERSED)
            } else {
                t.bold()
            },
        ),
        Span::raw(sep),
    ];
    // The sample comes before the (often long) file name so narrow screens keep it.
    if let Some(name) = app.sample_name() {
        spans.push(Span::styled(
            format!(
                "sample {name} ({}/{}){}",
                app.sample_at + 1,
                app.samples.len(),
                if app.sample_edited { " edited" } else { "" }
            ),
            t.bold(),
        ));
        spans.push(Span::raw(sep));
    }
    spans.push(Span::raw(app.source.name.clone()));
    if app.dirty() {
        spans.push(Span::raw(sep));
        spans.push(Span::styled(
            if ascii { "* unsaved" } else { "● unsaved" },
            t.edited().add_modifier(Modifier::BOLD),
        ));
    }
    if app.bad_stamp.is_some() {
        spans.push(Span::raw(sep));
        spans.push(Span::styled("file on disk does not load", t.warn()));
    }
    let used: usize = spans.iter().map(|s| s.content.chars().count()).sum();
    let hint = "? keys ";
    let gap = (area.width as usize).saturating_sub(used + hint.len());
    spans.push(Span::raw(" ".repeat(gap.max(1))));
    spans.push(Span::styled(hint, t.bold()));
    Paragraph::new(Line::from(spans))
        .style(if app.opts.color {
            Style::default().bg(Color::Indexed(236))
        } else {
            Style::default()
        })
        .render(area, buf);
}
