//! Pictures of the explorer without a terminal: the screen rendered into a
//! buffer after replaying keys through `App::handle_key`, written as plain
//! text and as SVG. The SVG has one `<rect>` per run of equal background
//! and one `<text>` per run of equally styled cells, so the file stays small
//! and box lines join (crispEdges, cell height about 1.17 × font size).

use super::app::App;
use super::keys::{KeyError, parse_keys};
use super::view;
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Color, Modifier};
use std::fmt::Write;

/// Renders the app into a fresh buffer of the given size.
pub fn render_buffer(app: &App, width: u16, height: u16) -> Buffer {
    let area = Rect::new(0, 0, width, height);
    let mut buf = Buffer::empty(area);
    view::render(app, area, &mut buf);
    buf
}

/// Replays a key script (see `parse_keys`) into the app.
pub fn replay(app: &mut App, script: &str) -> Result<(), KeyError> {
    for k in parse_keys(script)? {
        // Each key sees the screen as a person who waited for the
        // background solver would (long routes only; short ones solve in the key).
        app.session.settle();
        app.handle_key(k);
        if app.quit {
            break;
        }
    }
    Ok(())
}

/// Why a screen size was refused; the caller names the text given.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SizeError {
    /// Not two whole numbers joined by `x`.
    #[error("write WIDTHxHEIGHT, e.g. 120x36 (40x12 at least)")]
    NotASize,
    /// A size outside 40x12 to 400x200 (width, height).
    #[error("write WIDTHxHEIGHT, e.g. 120x36 (40x12 at least)")]
    OutOfRange(u16, u16),
}

/// Reads a screen size written as WIDTHxHEIGHT (e.g. 120x36).
pub fn parse_size(size: &str) -> Result<(u16, u16), SizeError> {
    let (w, h) = size
        .split_once('x')
        .and_then(|(w, h)| Some((w.trim().parse::<u16>().ok()?, h.trim().parse::<u16>().ok()?)))
        .ok_or(SizeError::NotASize)?;
    if (40..=400).contains(&w) && (12..=200).contains(&h) {
        Ok((w, h))
    } else {
        Err(SizeError::OutOfRange(w, h))
    }
}

/// Replays `keys` into the app and returns the screen as (text, SVG).
pub fn screenshot(
    app: &mut App,
    keys: &str,
    width: u16,
    height: u16,
) -> Result<(String, String), KeyError> {
    replay(app, keys)?;
    app.finish_idle_work();
    let buf = render_buffer(app, width, height);
    Ok((to_text(&buf), to_svg(&buf)))
}

/// The buffer as text, one line per row, trailing spaces removed.
pub fn to_text(buf: &Buffer) -> String {
    let a = buf.area;
    let mut out = String::new();
    for y in 0..a.height {
        let mut line = String::new();
        for x in 0..a.width {
            let c = &buf[(a.x + x, a.y + y)];
            line.push_str(c.symbol());
        }
        out.push_str(line.trim_end());
        out.push('\n');
    }
    out
}

const FG: &str = "#d8d8d8";
const BG: &str = "#1b1d23";

fn hex(c: Color, fg: bool) -> String {
    let named = |i: u8| -> &'static str {
        [
            "#1b1d23", "#e05561", "#8cc265", "#d18f52", "#4aa5f0", "#c162de", "#42b3c2", "#d8d8d8",
            "#5c6370", "#ff616e", "#a5e075", "#f0a45d", "#4dc4ff", "#de73ff", "#4cd1e0", "#ffffff",
        ][i as usize]
    };
    match c {
        Color::Reset => (if fg { FG } else { BG }).to_string(),
        Color::Black => named(0).into(),
        Color::Red => named(1).into(),
        Color::Green => named(2).into(),
        Color::Yellow => named(3).into(),
        Color::Blue => named(4).into(),
        Color::Magenta => named(5).into(),
        Color::Cyan => named(6).into(),
        Color::Gray => named(7).into(),
        Color::DarkGray => named(8).into(),
        Color::LightRed => named(9).into(),
        Color::LightGreen => named(10).into(),
        Color::LightYellow => named(11).into(),
        Color::LightBlue => named(12).into(),
        Color::LightMagenta => named(13).into(),
        Color::LightCyan => named(14).into(),
        Color::White => named(15).into(),
        Color::Rgb(r, g, b) => format!("#{r:02x}{g:02x}{b:02x}"),
        Color::Indexed(i) if i < 16 => named(i).into(),
        Color::Indexed(i) if i >= 232 => {
            let v = 8 + 10 * (i - 232);
            format!("#{v:02x}{v:02x}{v:02x}")
        }
        Color::Indexed(i) => {
            let i = i - 16;
            let lv = |x: u8| if x == 0 { 0 } else { 55 + 40 * x };
            format!(
                "#{:02x}{:02x}{:02x}",
                lv(i / 36),
                lv((i / 6) % 6),
                lv(i % 6)
            )
        }
    }
}

fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// SVG attributes for a text run's modifiers (bold, italic, underlined, dim).
fn text_attrs(m: Modifier) -> String {
    let mut attrs = String::new();
    if m.contains(Modifier::BOLD) {
        attrs.push_str(r#" font-weight="bold""#);
    }
    if m.contains(Modifier::ITALIC) {
        attrs.push_str(r#" font-style="italic""#);
    }
    if m.contains(Modifier::UNDERLINED) {
        attrs.push_str(r#" text-decoration="underline""#);
    }
    if m.contains(Modifier::DIM) {
        attrs.push_str(r#" opacity="0.6""#);
    }
    attrs
}

/// The buffer as an SVG picture.
pub fn to_svg(buf: &Buffer) -> String {
    let font = 14.0_f64;
    let cw = font * 0.6;
    let ch = (font * 1.17).round();
    let a = buf.area;
    let (w, h) = (a.width as f64 * cw, a.height as f64 * ch);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w:.0}" height="{h:.0}" viewBox="0 0 {w:.1} {h:.1}" font-family="DejaVu Sans Mono, Menlo, Consolas, monospace" font-size="{font}">"#
    );
    let _ = writeln!(s, r#"<rect width="100%" height="100%" fill="{BG}"/>"#);
    for y in 0..a.height {
        // Effective colours of each cell (REVERSED swaps them).
        let cells: Vec<(String, String, Modifier, &str)> = (0..a.width)
            .map(|x| {
                let c = &buf[(a.x + x, a.y + y)];
                let (mut f, mut b) = (hex(c.fg, true), hex(c.bg, false));
                if c.modifier.contains(Modifier::REVERSED) {
                    std::mem::swap(&mut f, &mut b);
                }
                (f, b, c.modifier, c.symbol())
            })
            .collect();
        let top = y as f64 * ch;
        let mut x = 0;
        while x < cells.len() {
            let mut e = x + 1;
            while e < cells.len() && cells[e].1 == cells[x].1 {
                e += 1;
            }
            if cells[x].1 != BG {
                let _ = writeln!(
                    s,
                    r#"<rect x="{:.1}" y="{top:.1}" width="{:.1}" height="{ch:.1}" fill="{}" shape-rendering="crispEdges"/>"#,
                    x as f64 * cw,
                    (e - x) as f64 * cw,
                    cells[x].1
                );
            }
            x = e;
        }
        let mut x = 0;
        while x < cells.len() {
            let key = |c: &(String, String, Modifier, &str)| (c.0.clone(), c.2);
            let mut e = x + 1;
            while e < cells.len() && key(&cells[e]) == key(&cells[x]) {
                e += 1;
            }
            let text: String = cells[x..e].iter().map(|c| c.3).collect();
            if !text.trim().is_empty() {
                let attrs = text_attrs(cells[x].2);
                let _ = writeln!(
                    s,
                    r#"<text x="{:.1}" y="{:.1}" fill="{}" xml:space="preserve" textLength="{:.1}" lengthAdjust="spacingAndGlyphs"{attrs}>{}</text>"#,
                    x as f64 * cw,
                    top + ch * 0.78,
                    cells[x].0,
                    (e - x) as f64 * cw,
                    esc(&text)
                );
            }
            x = e;
        }
    }
    s.push_str("</svg>\n");
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use ratatui::style::Style;

    #[test]
    fn svg_groups_runs_and_reverses_colours() {
        let mut buf = Buffer::empty(Rect::new(0, 0, 6, 1));
        buf.set_string(0, 0, "ab", Style::default().fg(Color::Red));
        buf.set_string(
            2,
            0,
            "cd",
            Style::default().add_modifier(Modifier::REVERSED),
        );
        let svg = to_svg(&buf);
        assert_eq!(svg.matches("<text").count(), 2, "{svg}");
        assert!(svg.contains(">ab</text>"));
        // The reversed run gets a light background rectangle.
        assert!(
            svg.contains(&format!("fill=\"{FG}\" shape-rendering")),
            "{svg}"
        );
        assert_eq!(to_text(&buf), "abcd\n");
    }
}
