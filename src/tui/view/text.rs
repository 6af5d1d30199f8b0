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
    out.push(if ascii { TRUNCATED_ASCII } else { '…' });
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
                "…" => "$",
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

/// The ASCII stand-in for a cut text (`~` is the near class).
pub const TRUNCATED_ASCII: char = '$';

/// A compound's role, at most 9 characters when `compact` (spelled so a
/// reader can guess it).
pub fn role_text(r: Role, compact: bool) -> &'static str {
    match (r, compact) {
        (Role::Intermediate, true) => "interm.",
        (r, _) => r.as_str(),
    }
}

/// A number to three significant figures: plain between 0.01 and 10,000,
/// else in exponent form (992, 4.68e3 is written 4680, 1.23e-5).
pub fn num3(x: f64) -> String {
    if !x.is_finite() {
        return if x > 0.0 { "inf".into() } else { "nan".into() };
    }
    if x != 0.0 && (x.abs() >= 1e4 || x.abs() < 1e-2) {
        return format!("{x:.2e}");
    }
    let mag = if x == 0.0 {
        0
    } else {
        x.abs().log10().floor() as i32
    };
    if mag > 2 {
        let f = 10f64.powi(mag - 2);
        format!("{:.0}", (x / f).round() * f)
    } else {
        crate::model::units::sig3(x)
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_show_three_significant_figures() {
        assert_eq!(num3(992.016), "992");
        assert_eq!(num3(4678.502), "4680");
        assert_eq!(num3(1.23456), "1.23");
        assert_eq!(num3(0.0123456), "0.0123");
        assert_eq!(num3(123456.0), "1.23e5");
        assert_eq!(num3(0.000123456), "1.23e-4");
    }
}
