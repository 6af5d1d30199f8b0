//! The energy ladder as text: one rung per route step at its cumulative
//! level (each step weighted by its turns), the step's drop drawn as a bar to
//! scale from the previous rung, the largest drop marked, coupled groups
//! bracketed, ± one sd of the step's dG' around the rung (a whisker when it
//! spans a cell, else the number beside the rung), and the standard-state
//! ladder (dG'° at the conditions) beside it on the same scale. Pure: it
//! turns an `App` into lines for a given size.

use super::text::{fit, tenth};
use super::theme::{Theme, block};
use crate::tui::app::{App, Pane};
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::{Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget};

/// Glyphs of the ladder, Unicode or ASCII.
struct Glyphs {
    drop: char,
    largest: char,
    rise: char,
    rung: char,
    rung0: char,
    std_bar: char,
    open: char,
    mid: char,
    close: char,
    mark: &'static str,
    join: char,
    w_open: char,
    w_line: char,
    w_close: char,
    pm: &'static str,
}

const UNICODE: Glyphs = Glyphs {
    drop: '━',
    largest: '█',
    rise: '╍',
    rung: '┃',
    rung0: '│',
    std_bar: '─',
    open: '┌',
    mid: '│',
    close: '└',
    mark: "◀",
    join: '┊',
    w_open: '├',
    w_line: '─',
    w_close: '┤',
    pm: "±",
};

const ASCII: Glyphs = Glyphs {
    drop: '=',
    largest: '#',
    rise: '~',
    rung: '|',
    rung0: ':',
    std_bar: '-',
    open: '/',
    mid: '|',
    close: '\\',
    mark: "<",
    join: ':',
    w_open: '[',
    w_line: '-',
    w_close: ']',
    pm: "+-",
};

/// Column of energy `e` on a track `w` cells wide spanning [lo, hi] (hi on the left).
fn col(e: f64, lo: f64, hi: f64, w: usize) -> usize {
    if w <= 1 || hi <= lo {
        return 0;
    }
    let x = (hi - e) / (hi - lo) * (w - 1) as f64;
    (x.round().max(0.0) as usize).min(w - 1)
}

/// One track: the bar from `from` to `to` and the rung at `to`.
fn track(from: f64, to: f64, lo: f64, hi: f64, w: usize, bar: char, rung: char) -> String {
    let (a, b) = (col(from, lo, hi, w), col(to, lo, hi, w));
    let (l, r) = (a.min(b), a.max(b));
    (0..w)
        .map(|x| {
            if x == b {
                rung
            } else if x >= l && x <= r {
                bar
            } else {
                ' '
            }
        })
        .collect()
}

/// Marks ± `sd` around the rung at energy `at` on a drawn track: a whisker
/// from `at − sd` to `at + sd` when its ends fall on other cells than the
/// rung, else `label` (e.g. "±1.3") in blank cells beside the rung, right
/// side first. Nothing when neither fits.
fn mark_sd(cells: &mut [char], at: f64, sd: f64, lo: f64, hi: f64, g: &Glyphs, label: &str) {
    let w = cells.len();
    let c = col(at, lo, hi, w);
    let (l, r) = (col(at + sd, lo, hi, w), col(at - sd, lo, hi, w));
    if l < c && r > c {
        for (x, cell) in cells.iter_mut().enumerate().take(r + 1).skip(l) {
            if x == l {
                *cell = g.w_open;
            } else if x == r {
                *cell = g.w_close;
            } else if *cell == ' ' {
                *cell = g.w_line;
            }
        }
        return;
    }
    let n = label.chars().count();
    let blank = |from: usize, to: usize| (from..to).all(|x| cells[x] == ' ');
    // Right of the rung, straight after it.
    if c + 1 + n <= w && blank(c + 1, c + 1 + n) {
        for (i, ch) in label.chars().enumerate() {
            cells[c + 1 + i] = ch;
        }
        return;
    }
    // Left of whatever is drawn there.
    let left = cells.iter().position(|&x| x != ' ').unwrap_or(c);
    if left > n {
        for (i, ch) in label.chars().enumerate() {
            cells[left - 1 - n + i] = ch;
        }
    }
}

/// The ladder's lines for an area `width` × `height` (header included).
pub fn lines(app: &App, width: usize, height: usize, t: &Theme) -> Vec<Line<'static>> {
    let g = if app.opts.ascii { &ASCII } else { &UNICODE };
    let a = &app.analysis;
    let p = app.pathway();
    let u = app.opts.unit;
    let n = a.steps.len();
    if n == 0 || width < 20 || height < 2 {
        return vec![Line::from("(no route steps)")];
    }
    let idw = a
        .steps
        .iter()
        .map(|s| p.steps[s.step].id.chars().count())
        .max()
        .unwrap_or(3)
        .clamp(3, 10);
    let valw = 7;
    // bracket + id + space, then two tracks each followed by its value.
    let fixed = 1 + idw + 1 + (1 + valw) * 2 + 2;
    // Two bar tracks when each gets at least 12 cells; else one track and
    // the dG'° levels as numbers beside it.
    let two = width.saturating_sub(fixed) / 2 >= 12;
    let tw = if two {
        width.saturating_sub(fixed) / 2
    } else {
        width.saturating_sub(fixed).max(4)
    };
    let std_w = if two { tw } else { 0 };
    let mut lo: f64 = 0.0;
    let mut hi: f64 = 0.0;
    for s in &a.steps {
        lo = lo.min(s.cumulative).min(s.cumulative_dg0);
        hi = hi.max(s.cumulative).max(s.cumulative_dg0);
    }
    let walk_end = app.walk;
    let header = Line::from(vec![
        Span::styled(
            format!(
                "{:<w$}",
                format!(
                    "{} {} {:.0} {} {:.0}",
                    if tw >= 20 { "cumulative dG'" } else { "dG'" },
                    u.label(),
                    u.of(hi),
                    if app.opts.ascii { "..." } else { "…" },
                    u.of(lo)
                ),
                w = 1 + idw + 1 + tw + 1 + valw
            ),
            t.bold(),
        ),
        Span::raw("  "),
        Span::styled(
            fit(
                match (two, app.opts.ascii) {
                    (true, false) => "dG'° at the conditions",
                    (true, true) => "dG'o at the conditions",
                    (false, false) => "dG'°",
                    (false, true) => "dG'o",
                },
                std_w + valw,
                app.opts.ascii,
            ),
            t.dim(),
        ),
    ]);
    let mut out = vec![header];
    let rows = height - 1;
    let sel = app.step_sel.min(n - 1);
    let first = if n <= rows {
        0
    } else {
        sel.saturating_sub(rows / 2).min(n - rows)
    };
    // On a tall pane, a connector row between rungs shows where the next drop starts.
    let spaced = rows + 1 >= 2 * n;
    for k in first..(first + rows).min(n) {
        if spaced && k > first && walk_end.is_none_or(|w| k <= w) {
            let prev = &a.steps[k - 1];
            let join = |e: f64| -> String {
                let c = col(e, lo, hi, tw);
                (0..tw).map(|x| if x == c { g.join } else { ' ' }).collect()
            };
            let inside = a
                .groups
                .iter()
                .any(|gr| gr.members.contains(&(k - 1)) && gr.members.contains(&k));
            out.push(Line::from(vec![
                Span::styled(if inside { g.mid } else { ' ' }.to_string(), t.dim()),
                Span::raw(" ".repeat(1 + idw)),
                Span::styled(join(prev.cumulative), t.dim()),
                Span::raw(" ".repeat(valw + 2)),
                Span::styled(
                    if two {
                        join(prev.cumulative_dg0)
                    } else {
                        String::new()
                    },
                    t.dim(),
                ),
            ]));
        }
        let s = &a.steps[k];
        let id = &p.steps[s.step].id;
        let bracket = a
            .groups
            .iter()
            .find_map(|gr| {
                let pos = gr.members.iter().position(|&m| m == k)?;
                Some(if pos == 0 {
                    g.open
                } else if pos + 1 == gr.members.len() {
                    g.close
                } else {
                    g.mid
                })
            })
            .unwrap_or(' ');
        let selected = k == app.step_sel;
        let mut id_style = if selected {
            t.selected()
        } else {
            Style::default()
        };
        let hidden = walk_end.is_some_and(|w| k > w);
        if hidden {
            id_style = t.dim();
        }
        let mut spans = vec![
            Span::styled(bracket.to_string(), t.dim()),
            Span::styled(format!("{:<idw$}", fit(id, idw, app.opts.ascii)), id_style),
            Span::raw(" "),
        ];
        if hidden {
            out.push(Line::from(spans));
            continue;
        }
        let (from, from0) = if k == 0 {
            (0.0, 0.0)
        } else {
            (a.steps[k - 1].cumulative, a.steps[k - 1].cumulative_dg0)
        };
        let largest = a.largest_drop == Some(k);
        let bar = if largest {
            g.largest
        } else if s.cumulative > from {
            g.rise
        } else {
            g.drop
        };
        let mut bar_style = t.class(s.class);
        if largest {
            bar_style = bar_style.add_modifier(Modifier::BOLD);
        }
        let drawn = track(from, s.cumulative, lo, hi, tw, bar, g.rung);
        match s.dg_sd.filter(|sd| *sd > 0.0) {
            Some(sd) => {
                let mut cells: Vec<char> = drawn.chars().collect();
                let label = format!("{}{:.1}", g.pm, u.of(sd));
                mark_sd(&mut cells, s.cumulative, sd, lo, hi, g, &label);
                // Split so the bar keeps its class colour and the sd reads as a note.
                let plain: Vec<char> = drawn.chars().collect();
                let mut cur = String::new();
                let mut cur_sd = false;
                for (x, ch) in cells.iter().enumerate() {
                    let is_sd = plain[x] != *ch;
                    if is_sd != cur_sd && !cur.is_empty() {
                        let st = if cur_sd { t.bold() } else { bar_style };
                        spans.push(Span::styled(std::mem::take(&mut cur), st));
                    }
                    cur_sd = is_sd;
                    cur.push(*ch);
                }
                if !cur.is_empty() {
                    spans.push(Span::styled(cur, if cur_sd { t.bold() } else { bar_style }));
                }
            }
            None => spans.push(Span::styled(drawn, bar_style)),
        }
        let mark = if largest { g.mark } else { " " };
        spans.push(Span::styled(
            format!("{:>valw$.1}", tenth(u.of(s.cumulative))),
            if largest { t.bold() } else { Style::default() },
        ));
        spans.push(Span::styled(format!("{mark} "), t.bold()));
        if two {
            spans.push(Span::styled(
                track(from0, s.cumulative_dg0, lo, hi, tw, g.std_bar, g.rung0),
                t.dim(),
            ));
        }
        spans.push(Span::styled(
            format!("{:>valw$.1}", tenth(u.of(s.cumulative_dg0))),
            t.dim(),
        ));
        out.push(Line::from(spans));
    }
    out
}

/// Draws the energy-ladder pane.
pub fn ladder_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
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
    let lines = lines(app, inner.width as usize, inner.height as usize, t);
    Paragraph::new(lines).render(inner, buf);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_sd_is_a_whisker_when_it_spans_cells_else_a_number() {
        // 21 cells over 0..-100: 5 units a cell; the rung of -50 is cell 10.
        let mut cells: Vec<char> = track(0.0, -50.0, -100.0, 0.0, 21, '=', '|')
            .chars()
            .collect();
        mark_sd(&mut cells, -50.0, 10.0, -100.0, 0.0, &ASCII, "+-10.0");
        let s: String = cells.iter().collect();
        assert_eq!(s, "========[=|-]        ");
        // sd 1 is a fifth of a cell: the number goes right of the rung.
        let mut cells: Vec<char> = track(0.0, -50.0, -100.0, 0.0, 21, '=', '|')
            .chars()
            .collect();
        mark_sd(&mut cells, -50.0, 1.0, -100.0, 0.0, &ASCII, "+-1.0");
        let s: String = cells.iter().collect();
        assert_eq!(s, "==========|+-1.0     ");
        // A rung at the right edge: the number goes left of the bar.
        let mut cells: Vec<char> = track(-80.0, -100.0, -100.0, 0.0, 21, '=', '|')
            .chars()
            .collect();
        mark_sd(&mut cells, -100.0, 1.0, -100.0, 0.0, &ASCII, "+-1.0");
        let s: String = cells.iter().collect();
        assert_eq!(s, "          +-1.0 ====|");
    }

    #[test]
    fn bars_are_drawn_to_scale() {
        // A 10-cell track over 0..-90: each cell is 10 units.
        let s = track(0.0, -45.0, -90.0, 0.0, 10, '=', '|');
        assert_eq!(s, "=====|    ");
        let s = track(-90.0, -45.0, -90.0, 0.0, 10, '=', '|');
        assert_eq!(s, "     |====");
    }
}
