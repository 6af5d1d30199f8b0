//! The concentration pane: one row per compound with its role and value.

use super::text::{fit, pad, role_text, rpad, window};
use super::theme::{Theme, block};
use crate::model::units;
use crate::tui::app::{App, Pane};
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::Style;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget};

/// Draws the concentration pane.
pub fn compounds_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let p = app.pathway();
    let ascii = app.opts.ascii;
    let any_edit = (0..p.compounds.len()).any(|i| app.edited(i));
    let title = if any_edit {
        "Concentrations (* unsaved)"
    } else {
        "Concentrations"
    };
    let b = block(app, t, Pane::Compounds, title);
    let inner = b.inner(area);
    b.render(area, buf);
    let w = inner.width as usize;
    let compact = w < 40;
    let idw = p
        .compounds
        .iter()
        .map(|c| c.id.chars().count())
        .max()
        .unwrap_or(3)
        .clamp(3, 8);
    let rolew = if compact { 8 } else { 13 };
    let header = format!(
        "  {:<idw$} {:>9}  {:<rolew$}{}",
        "id",
        "value",
        "role",
        if compact { "" } else { "branch" }
    );
    let mut lines = vec![Line::styled(fit(&header, w, ascii), t.bold())];
    let h = inner.height.saturating_sub(1) as usize;
    let n = p.compounds.len();
    let first = window(n, h, app.comp_sel);
    let sel_step = if app.focus != Pane::Compounds {
        app.selected_step().map(|s| s.step)
    } else {
        None
    };
    for i in first..(first + h).min(n) {
        lines.push(row(app, t, i, sel_step, (idw, rolew, compact)));
    }
    Paragraph::new(lines).render(inner, buf);
    super::steps::more_mark(area, buf, first, h, n, ascii);
}

/// One row of the concentration pane; `widths` are the id and role widths
/// and whether the pane is compact.
fn row(
    app: &App,
    t: &Theme,
    i: usize,
    sel_step: Option<usize>,
    (idw, rolew, compact): (usize, usize, bool),
) -> Line<'static> {
    let (p, a, ascii) = (app.pathway(), &app.analysis, app.opts.ascii);
    let c = &p.compounds[i];
    let selected = i == app.comp_sel;
    let related = sel_step.is_some_and(|st| p.steps[st].stoich.iter().any(|x| x.0 == i));
    let style = if selected {
        t.selected()
    } else if related {
        t.related()
    } else {
        Style::default()
    };
    let lead = match (selected, related, ascii) {
        (true, _, false) => "▶ ",
        (true, _, true) => "> ",
        (false, true, false) => "• ",
        (false, true, true) => "+ ",
        _ => "  ",
    };
    let edited = app.edited(i);
    let value = if c.is_solvent() {
        "activity 1".to_string()
    } else {
        units::format_conc(app.state().conc[i], ascii)
    };
    let value_style = if edited {
        style.patch(t.edited())
    } else {
        style
    };
    let mut spans = vec![
        Span::styled(lead, style),
        Span::styled(pad(&c.id, idw, ascii) + " ", style),
        Span::styled(rpad(&value, 10, ascii), value_style),
        Span::styled(if edited { "* " } else { "  " }, value_style),
    ];
    let branch = a.branch.get(i).copied().unwrap_or(false);
    if compact && branch {
        // No room for a column: the branch point takes the role's place.
        spans.push(Span::styled(
            pad("branch", rolew, ascii),
            style.patch(t.bold()),
        ));
    } else {
        spans.push(Span::styled(
            pad(role_text(a.roles[i], compact), rolew, ascii),
            style,
        ));
        if branch {
            spans.push(Span::styled("branch", style.patch(t.bold())));
        }
    }
    Line::from(spans)
}
