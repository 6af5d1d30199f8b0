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

/// Column widths and the energy scale shared by every line of the ladder.
struct Ladder<'g> {
    /// Glyphs, Unicode or ASCII.
    g: &'g Glyphs,
    /// Width of the step id column.
    idw: usize,
    /// Width of each value column.
    valw: usize,
    /// Width of each bar track.
    tw: usize,
    /// Two tracks (dG' and dG'°) side by side, else the dG'° levels as numbers only.
    two: bool,
    /// Lowest and highest running total (J/mol), the ends of the scale.
    lo: f64,
    hi: f64,
}

impl Ladder<'_> {
    /// The widths and scale for an area `width` wide; None when there is
    /// nothing to draw or no room.
    fn new(app: &App, width: usize, height: usize) -> Option<Ladder<'static>> {
        let g = if app.opts.ascii { &ASCII } else { &UNICODE };
        let a = &app.analysis;
        let p = app.pathway();
        if a.steps.is_empty() || width < 20 || height < 2 {
            return None;
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
        let mut lo: f64 = 0.0;
        let mut hi: f64 = 0.0;
        for s in &a.steps {
            lo = lo.min(s.cumulative).min(s.cumulative_dg0);
            hi = hi.max(s.cumulative).max(s.cumulative_dg0);
        }
        Some(Ladder {
            g,
            idw,
            valw,
            tw,
            two,
            lo,
            hi,
        })
    }

    /// The header: the running total's ends, then the standard ladder's title.
    fn header(&self, app: &App, t: &Theme) -> Line<'static> {
        let u = app.opts.unit;
        let (idw, tw, valw) = (self.idw, self.tw, self.valw);
        let std_w = if self.two { tw } else { 0 };
        // The rungs are the running total; the left end is the highest.
        let long = format!(
            "cumulative dG' {}: {:.0} left, {:.0} right",
            u.label(),
            u.of(self.hi),
            u.of(self.lo)
        );
        let total = if long.chars().count() <= 1 + idw + 1 + tw + 1 + valw {
            long
        } else {
            format!(
                "cumul. dG': {:.0} left, {:.0} right",
                u.of(self.hi),
                u.of(self.lo)
            )
        };
        let standard = match (self.two, app.opts.ascii) {
            (true, false) => "dG'° at the conditions",
            (true, true) => "dG'o at the conditions",
            (false, false) => "dG'°",
            (false, true) => "dG'o",
        };
        Line::from(vec![
            Span::styled(
                format!("{total:<w$}", w = 1 + idw + 1 + tw + 1 + valw),
                t.bold(),
            ),
            Span::raw("  "),
            Span::styled(fit(standard, std_w + valw, app.opts.ascii), t.dim()),
        ])
    }

    /// The connector row above rung `k`: where the previous drop ended, on
    /// both tracks, with the group bracket carried through.
    fn connector(&self, app: &App, k: usize, t: &Theme) -> Line<'static> {
        let a = &app.analysis;
        let prev = &a.steps[k - 1];
        let join = |e: f64| -> String {
            let c = col(e, self.lo, self.hi, self.tw);
            (0..self.tw)
                .map(|x| if x == c { self.g.join } else { ' ' })
                .collect()
        };
        let inside = a
            .groups
            .iter()
            .any(|gr| gr.members.contains(&(k - 1)) && gr.members.contains(&k));
        Line::from(vec![
            Span::styled(if inside { self.g.mid } else { ' ' }.to_string(), t.dim()),
            Span::raw(" ".repeat(1 + self.idw)),
            Span::styled(join(prev.cumulative), t.dim()),
            Span::raw(" ".repeat(self.valw + 2)),
            Span::styled(
                if self.two {
                    join(prev.cumulative_dg0)
                } else {
                    String::new()
                },
                t.dim(),
            ),
        ])
    }

    /// The group bracket beside rung `k` (blank outside coupled groups).
    fn bracket(&self, app: &App, k: usize) -> char {
        app.analysis
            .groups
            .iter()
            .find_map(|gr| {
                let pos = gr.members.iter().position(|&m| m == k)?;
                Some(if pos == 0 {
                    self.g.open
                } else if pos + 1 == gr.members.len() {
                    self.g.close
                } else {
                    self.g.mid
                })
            })
            .unwrap_or(' ')
    }

    /// Rung `k`: bracket and id, then (unless the walk has not reached it)
    /// the bar to scale with its sd, the running total, and the standard ladder.
    fn rung(&self, app: &App, k: usize, t: &Theme) -> Line<'static> {
        let a = &app.analysis;
        let s = &a.steps[k];
        let id = &app.pathway().steps[s.step].id;
        let hidden = app.walk.is_some_and(|w| k > w);
        let id_style = if hidden {
            t.dim()
        } else if k == app.step_sel {
            t.selected()
        } else {
            Style::default()
        };
        let idw = self.idw;
        let mut spans = vec![
            Span::styled(self.bracket(app, k).to_string(), t.dim()),
            Span::styled(format!("{:<idw$}", fit(id, idw, app.opts.ascii)), id_style),
            Span::raw(" "),
        ];
        if !hidden {
            self.push_levels(app, k, t, &mut spans);
        }
        Line::from(spans)
    }

    /// The drawn part of rung `k`: the bar, the running total and the
    /// standard ladder's bar and level.
    fn push_levels(&self, app: &App, k: usize, t: &Theme, spans: &mut Vec<Span<'static>>) {
        let (a, g, u, valw) = (&app.analysis, self.g, app.opts.unit, self.valw);
        let s = &a.steps[k];
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
        let drawn = track(from, s.cumulative, self.lo, self.hi, self.tw, bar, g.rung);
        match s.dg_sd.filter(|sd| *sd > 0.0) {
            Some(sd) => {
                let label = format!("{}{:.1}", g.pm, u.of(sd));
                spans.extend(self.sd_spans(&drawn, s.cumulative, sd, &label, bar_style, t));
            }
            None => spans.push(Span::styled(drawn, bar_style)),
        }
        let mark = if largest { g.mark } else { " " };
        spans.push(Span::styled(
            format!("{:>valw$.1}", tenth(u.of(s.cumulative))),
            if largest { t.bold() } else { Style::default() },
        ));
        spans.push(Span::styled(format!("{mark} "), t.bold()));
        if self.two {
            spans.push(Span::styled(
                track(
                    from0,
                    s.cumulative_dg0,
                    self.lo,
                    self.hi,
                    self.tw,
                    g.std_bar,
                    g.rung0,
                ),
                t.dim(),
            ));
        }
        spans.push(Span::styled(
            format!("{:>valw$.1}", tenth(u.of(s.cumulative_dg0))),
            t.dim(),
        ));
    }

    /// The bar `drawn` with the sd around `at` marked on it, split into
    /// spans so the bar keeps its class colour and the sd reads as a note.
    fn sd_spans(
        &self,
        drawn: &str,
        at: f64,
        sd: f64,
        label: &str,
        bar_style: Style,
        t: &Theme,
    ) -> Vec<Span<'static>> {
        let mut spans = Vec::new();
        let mut cells: Vec<char> = drawn.chars().collect();
        mark_sd(&mut cells, at, sd, self.lo, self.hi, self.g, label);
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
        spans
    }
}

/// The ladder's lines for an area `width` × `height` (header included).
pub fn lines(app: &App, width: usize, height: usize, t: &Theme) -> Vec<Line<'static>> {
    let Some(f) = Ladder::new(app, width, height) else {
        return vec![Line::from("(no route steps)")];
    };
    let n = app.analysis.steps.len();
    let mut out = vec![f.header(app, t)];
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
        if spaced && k > first && app.walk.is_none_or(|w| k <= w) {
            out.push(f.connector(app, k, t));
        }
        out.push(f.rung(app, k, t));
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
