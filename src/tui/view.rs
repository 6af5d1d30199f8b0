//! Drawing the explorer: a pure function of `App` into a ratatui `Buffer`.
//! Step list (with the MDF in its title and bottleneck flags), concentration
//! pane, energy ladder, step detail, a message line and the status line
//! (with the chosen sample); the key overlay on top when asked. Meaning is always
//! carried by a symbol or word as well as by colour, so NO_COLOR and
//! `--ascii` lose nothing.

use super::app::{App, LIVE_MDF_MAX_STEPS, LiveMdf, Mode, Pane, Target, Tone};
use super::ladder;
use crate::analysis::{Class, Role, StepResult, VerdictKind};
use crate::model::units;
use crate::report::{self, class_symbol, sci};
use ratatui::Frame;
use ratatui::buffer::Buffer;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::symbols::border;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Paragraph, Widget, Wrap};

/// Borders drawn with ASCII only.
const ASCII_BORDER: border::Set = border::Set {
    top_left: "+",
    top_right: "+",
    bottom_left: "+",
    bottom_right: "+",
    vertical_left: "|",
    vertical_right: "|",
    horizontal_top: "-",
    horizontal_bottom: "-",
};

/// Width of the step list's marker column (the bottleneck flag).
pub const MARKER_COLUMN: usize = 2;

/// The bottleneck flag in the marker column, Unicode and ASCII.
pub fn bottleneck_mark(ascii: bool) -> &'static str {
    if ascii { "@" } else { "■" }
}

/// Styles, with colour only when allowed.
#[derive(Debug, Clone, Copy)]
pub struct Theme {
    color: bool,
}

impl Theme {
    fn fg(&self, c: Color) -> Style {
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
    fn verdict(&self, v: VerdictKind) -> Style {
        match v {
            VerdictKind::Prime => self.fg(Color::LightRed).add_modifier(Modifier::BOLD),
            VerdictKind::Candidate => self.fg(Color::LightYellow),
            VerdictKind::NotHere => self.fg(Color::DarkGray),
        }
    }
}

/// Cuts `s` to `w` characters, marking the cut.
pub fn fit(s: &str, w: usize, ascii: bool) -> String {
    let n = s.chars().count();
    if n <= w {
        return s.to_string();
    }
    if w == 0 {
        return String::new();
    }
    let mut out: String = s.chars().take(w - 1).collect();
    out.push(if ascii { '~' } else { '…' });
    out
}

/// Rounds to 0.1 without printing "-0.0".
pub fn tenth(x: f64) -> f64 {
    let r = (x * 10.0).round() / 10.0;
    if r == 0.0 { 0.0 } else { r }
}

fn pad(s: &str, w: usize, ascii: bool) -> String {
    format!("{:<w$}", fit(s, w, ascii))
}

fn rpad(s: &str, w: usize, ascii: bool) -> String {
    format!("{:>w$}", fit(s, w, ascii))
}

/// Draws the whole explorer into a frame.
pub fn draw(frame: &mut Frame, app: &App) {
    let area = frame.area();
    render(app, area, frame.buffer_mut());
}

/// Draws the whole explorer into a buffer area.
pub fn render(app: &App, area: Rect, buf: &mut Buffer) {
    let t = Theme {
        color: app.opts.color,
    };
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
    steps_pane(app, &t, steps_a, buf);
    compounds_pane(app, &t, comps_a, buf);
    ladder_pane(app, &t, ladder_a, buf);
    detail_pane(app, &t, detail_a, buf);
    message_line(app, &t, msg, buf);
    status_line(app, &t, status, buf);
    if app.mode == Mode::Help {
        help_overlay(app, &t, area, buf);
    }
    if app.opts.ascii {
        asciify(area, buf);
    }
}

/// Last guard of `--ascii`: every cell that is not ASCII gets a stand-in.
fn asciify(area: Rect, buf: &mut Buffer) {
    for y in area.top()..area.bottom() {
        for x in area.left()..area.right() {
            let cell = &mut buf[(x, y)];
            if cell.symbol().is_ascii() {
                continue;
            }
            let c = match cell.symbol() {
                "°" => "o",
                "·" | "│" => "|",
                "—" | "−" | "─" => "-",
                "×" => "x",
                "÷" => "/",
                "±" => "~",
                "µ" | "μ" => "u",
                "…" => "~",
                "→" => ">",
                "⇌" => "=",
                _ => "?",
            };
            cell.set_symbol(c);
        }
    }
}

fn block<'a>(app: &App, t: &Theme, pane: Pane, title: &'a str) -> Block<'a> {
    block_with(app, t, pane, title, Vec::new())
}

fn block_with<'a>(
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

/// First row shown of a list of `n` rows in `h` lines so that `sel` is visible.
fn window(n: usize, h: usize, sel: usize) -> usize {
    if n <= h || h == 0 {
        0
    } else {
        sel.saturating_sub(h / 2).min(n - h)
    }
}

fn class_text(s: &StepResult, ascii: bool) -> String {
    format!(
        "{} {}{}",
        class_symbol(s.class, ascii),
        s.class.as_str(),
        if s.class_sure { "" } else { "?" }
    )
}

fn steps_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
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
    let fixed = 2 + idw + 1 + MARKER_COLUMN + dgw * 2 + 7 + clw + shw + 1 + vw;
    let enzw = w.saturating_sub(fixed + 1);
    let show_enz = enzw >= 8;
    let mut header = format!("  {:<idw$} {:MARKER_COLUMN$}", "step", "");
    if show_enz {
        header.push_str(&pad("enzyme", enzw, ascii));
        header.push(' ');
    }
    header.push_str(&format!(
        "{:>dgw$}{:>dgw$} {:>5} {:<clw$}{:>shw$} {}",
        "dG'°",
        "dG'",
        "turns",
        "class",
        "share",
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
        let marker = if !side && app.is_bottleneck(k) {
            bottleneck_mark(ascii)
        } else {
            ""
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
        if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
            let full = report::verdict_symbol(v.kind, ascii);
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

fn role_text(r: Role, compact: bool) -> &'static str {
    match (r, compact) {
        (Role::Input, true) => "in",
        (Role::Output, true) => "out",
        (Role::Intermediate, true) => "mid",
        (Role::Currency, true) => "cur",
        (Role::Solvent, true) => "solv",
        (Role::OffRoute, true) => "off",
        (r, false) => r.as_str(),
    }
}

fn compounds_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let p = app.pathway();
    let a = &app.analysis;
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
    let rolew = if compact { 5 } else { 13 };
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
            (false, true, true) => "* ",
            _ => "  ",
        };
        let edited = app.edited(i);
        let value = if c.is_solvent() {
            "activity 1".to_string()
        } else {
            units::format_conc(app.state().conc[i], ascii)
        };
        let mut spans = vec![
            Span::styled(lead, style),
            Span::styled(pad(&c.id, idw, ascii) + " ", style),
            Span::styled(
                rpad(&value, 10, ascii),
                if edited {
                    style.patch(t.edited())
                } else {
                    style
                },
            ),
            if edited {
                Span::styled("* ", style.patch(t.edited()))
            } else {
                Span::styled("  ", style)
            },
            Span::styled(pad(role_text(a.roles[i], compact), rolew, ascii), style),
        ];
        if a.branch.get(i).copied().unwrap_or(false) {
            spans.push(Span::styled(
                if compact { "br" } else { "branch" },
                style.patch(t.bold()),
            ));
        }
        lines.push(Line::from(spans));
    }
    Paragraph::new(lines).render(inner, buf);
}

fn ladder_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let title = match app.walk {
        Some(k) => format!(
            "Energy ladder — walk {}/{}",
            k + 1,
            app.analysis.steps.len()
        ),
        None => "Energy ladder".to_string(),
    };
    let b = block(app, t, Pane::Ladder, &title);
    let inner = b.inner(area);
    b.render(area, buf);
    let lines = ladder::lines(app, inner.width as usize, inner.height as usize, t);
    Paragraph::new(lines).render(inner, buf);
}

fn kv(label: &str, value: String) -> Vec<Span<'static>> {
    vec![
        Span::raw(format!("{label} ")),
        Span::styled(value, Style::default().add_modifier(Modifier::BOLD)),
        Span::raw("   "),
    ]
}

/// The detail lines for the selected step.
pub fn detail_lines(app: &App, t: &Theme) -> Vec<Line<'static>> {
    let Some(s) = app.selected_step() else {
        return vec![Line::from("no step selected")];
    };
    let p = app.pathway();
    let a = &app.analysis;
    let u = app.opts.unit;
    let ul = u.label();
    let ascii = app.opts.ascii;
    let st = &p.steps[s.step];
    let rt = a.rt;
    let mut out = Vec::new();
    let mut head = vec![
        Span::styled(st.id.clone(), t.bold()),
        Span::raw(format!(" {} ", st.enzyme.as_deref().unwrap_or(""))),
        Span::styled(
            class_text(s, ascii),
            t.class(s.class).add_modifier(Modifier::BOLD),
        ),
    ];
    if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
        head.push(Span::raw("  "));
        head.push(Span::styled(
            report::verdict_symbol(v.kind, ascii).to_string(),
            t.verdict(v.kind),
        ));
    }
    out.push(Line::from(head));
    let mut rx = report::reaction_as_run(&app.prep, s);
    if !ascii {
        rx = rx.replace("->", "→").replace("<=>", "⇌");
    }
    out.push(Line::from(format!(
        "{rx}{}",
        if s.times != 1.0 {
            format!("   ×{} per pass", units::sig3(s.times))
        } else {
            String::new()
        }
    )));
    let mut l = kv("Q", sci(s.q()));
    l.extend(kv("K'", sci(s.keq())));
    l.extend(kv("RT", format!("{:.3} {ul}", u.of(rt))));
    out.push(Line::from(l));
    out.push(Line::styled("dG' = dG'° + RT ln Q:", t.dim()));
    out.push(Line::from(format!(
        "  {:>8.2}  dG'° at the conditions",
        u.of(s.dg0)
    )));
    let biggest = s
        .contributions
        .iter()
        .map(|c| c.energy.abs())
        .fold(0.0, f64::max);
    for c in &s.contributions {
        let comp = &p.compounds[c.compound];
        let drives = biggest > 0.0 && c.energy.abs() == biggest;
        let line = format!(
            "  {:>+8.2}  {} {:<8} {:>9}",
            u.of(c.energy),
            if c.nu < 0.0 { "−" } else { "+" }.replace('−', if ascii { "-" } else { "−" }),
            fit(&comp.id, 8, ascii),
            units::format_conc(app.state().conc[c.compound], ascii),
        );
        let mut spans = vec![Span::raw(line)];
        if (c.nu.abs() - 1.0).abs() > 1e-12 {
            spans.push(Span::styled(
                format!(" ×{}", units::sig3(c.nu.abs())),
                t.dim(),
            ));
        }
        if drives {
            spans.push(Span::styled(
                if ascii { " <- largest" } else { " ◀ largest" },
                t.bold(),
            ));
        }
        out.push(Line::from(spans));
    }
    let sd = s
        .dg_sd
        .map(|sd| format!(" {} {:.2}", if ascii { "+/-" } else { "±" }, u.of(sd)))
        .unwrap_or_default();
    out.push(Line::from(vec![
        Span::raw("  "),
        Span::styled(format!("{:>+8.2}", u.of(s.dg)), t.bold()),
        Span::raw(format!("  dG' {ul}{sd}")),
    ]));
    if let Some(main) = s.sd_main {
        let what = match main {
            None => "the dG'° uncertainty".to_string(),
            Some(c) => format!("the measured {} (cv)", p.compounds[c].id),
        };
        out.push(Line::styled(
            format!("  spread mostly from {what}"),
            t.dim(),
        ));
    }
    if !s.class_sure {
        let mut could: Vec<&str> = Vec::new();
        for c in [s.class_range.0, s.class_range.1] {
            if c != s.class && !could.contains(&c.as_str()) {
                could.push(c.as_str());
            }
        }
        out.push(Line::styled(
            format!("  not sure: within 95 % it could be {}", could.join(" or ")),
            t.bold(),
        ));
    }
    let mut l = kv("J+/J−", sci(s.flux_ratio(rt)));
    if ascii {
        l[0] = Span::raw("J+/J- ");
    }
    l.extend(kv(
        "reverse share",
        format!("{:.1}%", 100.0 * s.reverse_share(rt).min(1e6)),
    ));
    out.push(Line::from(l));
    match s.enzyme_factor(rt) {
        Some(f) => out.push(Line::from(kv("enzyme factor", format!("×{}", sci(f))))),
        None => out.push(Line::styled(
            "enzyme factor: none (dG' ≥ 0: no net forward flux)"
                .replace('≥', if ascii { ">=" } else { "≥" }),
            t.warn(),
        )),
    }
    out.push(optimum_line(app, t, s));
    if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
        out.push(Line::styled(
            format!("verdict: {}", v.kind.as_str().replace('_', " ")),
            t.verdict(v.kind),
        ));
        for r in &v.reasons {
            out.push(Line::from(format!("  {r}")));
        }
    } else if s.class != Class::Far {
        out.push(Line::styled(
            "verdict: none (only far steps get one)",
            t.dim(),
        ));
    }
    if let Some(nb) = a
        .needs_bypass
        .iter()
        .find(|nb| a.steps.get(nb.position).is_some_and(|x| std::ptr::eq(x, s)))
    {
        out.push(Line::styled(
            format!(
                "reversed and uphill with no bypass: lacks {:.2} {ul} per turn",
                u.of(nb.lacks)
            ),
            t.warn(),
        ));
    }
    if let (Some(cp), Some(f)) = (a.counterpart, s.replaces)
        && a.steps.get(cp).is_some_and(|x| std::ptr::eq(x, s))
    {
        out.push(Line::from(format!(
            "bypass for {}, the forward route's committed step",
            p.steps[f].id
        )));
    }
    if let Some(g) = a.groups.iter().find(|g| {
        g.members
            .iter()
            .any(|&m| a.steps.get(m).is_some_and(|x| std::ptr::eq(x, s)))
    }) {
        let ids: Vec<&str> = g
            .members
            .iter()
            .map(|&m| p.steps[a.steps[m].step].id.as_str())
            .collect();
        out.push(Line::from(format!(
            "coupled: {} together dG' {:+.2} {ul}",
            ids.join(" + "),
            u.of(g.dg)
        )));
    }
    out
}

/// The selected step at the driving-force optimum.
fn optimum_line(app: &App, t: &Theme, s: &StepResult) -> Line<'static> {
    let u = app.opts.unit;
    let a = &app.analysis;
    match &app.mdf {
        LiveMdf::Failed(e) => Line::styled(format!("optimum: not solved — {e}"), t.warn()),
        LiveMdf::Skipped(n) => Line::styled(
            format!(
                "optimum: not computed live for routes over {LIVE_MDF_MAX_STEPS} steps ({n} here); run `dgpath mdf FILE`"
            ),
            t.dim(),
        ),
        LiveMdf::Solved(_) => {
            let pos = a.steps.iter().position(|x| std::ptr::eq(x, s));
            match pos.and_then(|k| app.price_at(k).map(|pf| (k, pf))) {
                None => Line::styled(
                    "optimum: side steps are not part of the driving-force optimisation",
                    t.dim(),
                ),
                Some((k, (price, force))) => {
                    let mut l = kv("shadow price", format!("{price:.2}"));
                    l.extend(kv(
                        "driving force at optimum",
                        format!("{:.2} {}", u.of(force), u.label()),
                    ));
                    if app.is_bottleneck(k) {
                        l.push(Span::styled(
                            format!("{} bottleneck", bottleneck_mark(app.opts.ascii)),
                            t.warn(),
                        ));
                    }
                    Line::from(l)
                }
            }
        }
    }
}

fn detail_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let b = block(app, t, Pane::Detail, "Step detail");
    let inner = b.inner(area);
    b.render(area, buf);
    Paragraph::new(detail_lines(app, t))
        .wrap(Wrap { trim: false })
        .scroll((app.detail_scroll, 0))
        .render(inner, buf);
}

fn message_line(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
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

/// Replaces the few non-ASCII characters used in fixed texts.
fn ascii_line(line: Line<'static>) -> Line<'static> {
    let spans: Vec<Span<'static>> = line
        .spans
        .into_iter()
        .map(|s| {
            let c = s
                .content
                .replace('·', "|")
                .replace('°', "o")
                .replace(['—', '−'], "-")
                .replace('×', "x")
                .replace('µ', "u");
            Span::styled(c, s.style)
        })
        .collect();
    Line::from(spans).style(line.style)
}

fn status_line(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
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

fn help_overlay(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
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
    lines.push(Line::styled(
        " ▼ far ↘ moderate ≈ near ▲ uphill ? unsure ◀ largest drop ■ bottleneck ± 1 sd",
        t.dim(),
    ));
    if app.opts.ascii {
        lines = lines.into_iter().map(ascii_line).collect();
        if let Some(last) = lines.last_mut() {
            *last = Line::styled(
                " v far \\ moderate ~ near ^ uphill ? unsure < largest drop @ bottleneck +- 1 sd",
                t.dim(),
            );
        }
    }
    Paragraph::new(lines).block(b).render(r, buf);
}
