//! Text helpers of the explorer: cutting and padding to a width, rounding
//! for display, scrolling windows and the ASCII stand-ins.

use crate::analysis::{Role, StepResult};
use crate::present::class_symbol;
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Modifier, Style};
use ratatui::text::{Line, Span};

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

/// `s` cut and padded on the right to `w` characters.
pub fn pad(s: &str, w: usize, ascii: bool) -> String {
    format!("{:<w$}", fit(s, w, ascii))
}

/// `s` cut and padded on the left to `w` characters.
pub fn rpad(s: &str, w: usize, ascii: bool) -> String {
    format!("{:>w$}", fit(s, w, ascii))
}

/// Last guard of `--ascii`: every cell that is not ASCII gets a stand-in.
pub fn asciify(area: Rect, buf: &mut Buffer) {
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

/// First row shown of a list of `n` rows in `h` lines so that `sel` is visible.
pub fn window(n: usize, h: usize, sel: usize) -> usize {
    if n <= h || h == 0 {
        0
    } else {
        sel.saturating_sub(h / 2).min(n - h)
    }
}

/// A class as symbol, word and a `?` when unsure.
pub fn class_text(s: &StepResult, ascii: bool) -> String {
    format!(
        "{} {}{}",
        class_symbol(s.class, ascii),
        s.class.as_str(),
        if s.class_sure { "" } else { "?" }
    )
}

/// A compound's role, short when `compact`.
pub fn role_text(r: Role, compact: bool) -> &'static str {
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

/// A label and its value in bold.
pub fn kv(label: &str, value: String) -> Vec<Span<'static>> {
    vec![
        Span::raw(format!("{label} ")),
        Span::styled(value, Style::default().add_modifier(Modifier::BOLD)),
        Span::raw("   "),
    ]
}

/// Replaces the few non-ASCII characters used in fixed texts.
pub fn ascii_line(line: Line<'static>) -> Line<'static> {
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
