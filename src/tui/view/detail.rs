//! The step detail pane: the selected step's numbers, verdict and notes.

use super::text::{class_text, fit, kv, num3, role_text};
use super::theme::{Theme, block};
use super::theme::{against_mark, bottleneck_mark};
use crate::analysis::mdf::{Mdf, Part};
use crate::analysis::{Class, Role, StepResult, mca};
use crate::model::units;
use crate::present;
use crate::tui::app::LiveMdf;
use crate::tui::app::{App, Pane};
use ratatui::buffer::Buffer;
use ratatui::layout::Rect;
use ratatui::style::Modifier;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Widget, Wrap};

/// The detail lines for the selected step.
pub fn detail_lines(app: &App, t: &Theme) -> Vec<Line<'static>> {
    let Some(s) = app.selected_step() else {
        return vec![Line::from("no step selected")];
    };
    let p = app.pathway();
    let a = &app.analysis;
    let ascii = app.opts.ascii;
    let st = &p.steps[s.step];
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
            present::verdict_symbol(v.kind, ascii).to_string(),
            t.verdict(v.kind),
        ));
    }
    // The flux control estimate beside the verdict (the range and its
    // reasons follow the verdict below).
    if let Some(c) = (app.step_sel < a.steps.len())
        .then(|| a.control_estimate.coefficient(app.step_sel))
        .flatten()
    {
        head.push(Span::raw(format!("  ctrl {c:.3}")));
    }
    out.push(Line::from(head));
    let mut rx = present::reaction_as_run(&app.prep, s);
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
    out.extend(energy_lines(app, t, s));
    out.extend(flux_lines(app, t, s));
    out.extend(verdict_lines(app, t, s));
    out
}

/// Q, K' and the terms of dG' = dG'° + RT ln Q, with the spread.
fn energy_lines(app: &App, t: &Theme, s: &StepResult) -> Vec<Line<'static>> {
    let p = app.pathway();
    let a = &app.analysis;
    let u = app.opts.unit;
    let ul = u.label();
    let ascii = app.opts.ascii;
    let rt = a.rt;
    let mut out = Vec::new();
    let mut l = kv("Q", num3(s.q()));
    l.extend(kv("K'", num3(s.keq())));
    l.extend(kv("RT", format!("{:.3} {ul}", u.of(rt))));
    out.push(Line::from(l));
    out.push(Line::styled("dG' = dG'° + RT ln Q:", t.dim()));
    out.push(Line::from(format!(
        "{:>+8.2}  dG'° at the conditions",
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
        // The contribution, then apart from it which side the compound is on.
        let line = format!(
            "{:>+8.2} {:<9} {:<6} {:>8}",
            u.of(c.energy),
            if c.nu < 0.0 { "substrate" } else { "product" },
            fit(&comp.id, 6, ascii),
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
    out
}

/// Flux ratio, enzyme factor, a backward step, the optimum.
fn flux_lines(app: &App, t: &Theme, s: &StepResult) -> Vec<Line<'static>> {
    let a = &app.analysis;
    let ascii = app.opts.ascii;
    let rt = a.rt;
    let mut out = Vec::new();
    let mut l = kv("J+/J−", num3(s.flux_ratio(rt)));
    if ascii {
        l[0] = Span::raw("J+/J- ");
    }
    l.extend(kv(
        "reverse share",
        match s.reverse_share(rt) {
            Some(r) => format!("{:.1}%", 100.0 * r),
            None => if ascii {
                "none (dG' >= 0)"
            } else {
                "none (dG' ≥ 0)"
            }
            .to_string(),
        },
    ));
    out.push(Line::from(l));
    match s.enzyme_factor(rt) {
        Some(f) => out.push(Line::from(kv("enzyme factor", format!("×{}", num3(f))))),
        None => out.push(Line::styled(
            "enzyme factor: none (dG' ≥ 0: no net forward flux)"
                .replace('≥', if ascii { ">=" } else { "≥" }),
            t.warn(),
        )),
    }
    if s.against {
        out.push(Line::styled(
            format!(
                "{} runs backward at these concentrations (dG' > 0): the route cannot carry forward flux",
                against_mark(ascii)
            ),
            t.warn().add_modifier(Modifier::BOLD),
        ));
    }
    out.push(optimum_line(app, t, s));
    out
}

/// The flux control estimate of the selected route step: the estimate with
/// its range, how it comes about here, and the disagreement sentence.
fn estimate_lines(app: &App, t: &Theme) -> Vec<Line<'static>> {
    let a = &app.analysis;
    let ascii = app.opts.ascii;
    let fix = |l: String| {
        if ascii {
            l.replace('–', "-").replace('≥', ">=").replace('…', "...")
        } else {
            l
        }
    };
    let mut out = Vec::new();
    for (i, l) in mca::explain(app.pathway(), a, app.step_sel)
        .into_iter()
        .enumerate()
    {
        let l = fix(l);
        out.push(if i == 0 {
            Line::styled(l, t.bold())
        } else {
            Line::from(format!("  {l}"))
        });
    }
    // With an estimate, its notes are the disagreement sentence.
    let notes = match a.control_estimate.coefficients {
        Some(_) => a.control_estimate.notes.as_slice(),
        None => &[],
    };
    for n in notes {
        out.push(Line::styled(format!("  {}", fix(n.clone())), t.warn()));
    }
    out
}

/// The verdict with its reasons, the flux control estimate, bypass and coupling.
fn verdict_lines(app: &App, t: &Theme, s: &StepResult) -> Vec<Line<'static>> {
    let p = app.pathway();
    let a = &app.analysis;
    let u = app.opts.unit;
    let ul = u.label();
    let mut out = Vec::new();
    if let Some(v) = s.verdict.and_then(|i| a.control.get(i)) {
        out.push(Line::styled(
            format!("verdict: {}", v.kind.as_str().replace('_', " ")),
            t.verdict(v.kind),
        ));
        for r in present::reasons(v, app.opts.unit) {
            out.push(Line::from(format!("  {r}")));
        }
    } else if s.class != Class::Far {
        out.push(Line::styled(
            "verdict: none (only far steps get one)",
            t.dim(),
        ));
    }
    if app.step_sel < a.steps.len() {
        out.extend(estimate_lines(app, t));
    }
    if let Some(nb) = a
        .needs_bypass
        .iter()
        .find(|nb| a.steps.get(nb.position).is_some_and(|x| std::ptr::eq(x, s)))
    {
        out.push(Line::styled(
            format!(
                "reversed and uphill with no bypass: lacks {:.2} {ul} per pass",
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

/// The selected compound: its value and bounds, the steps that use it, its
/// part in the driving-force optimisation and the range within which the
/// whole route can run (every step at −dG' ≥ 0, the others free in their bounds).
pub fn compound_lines(app: &App, t: &Theme) -> Vec<Line<'static>> {
    let p = app.pathway();
    let i = app.comp_sel;
    let Some(c) = p.compounds.get(i) else {
        return vec![Line::from("no compound selected")];
    };
    let ascii = app.opts.ascii;
    let role = app.analysis.roles.get(i).copied().unwrap_or(Role::OffRoute);
    let mut out = vec![Line::from(vec![
        Span::styled(c.id.clone(), t.bold()),
        Span::raw(format!(" {}  ", c.name)),
        Span::styled(role_text(role, false).trim().to_string(), t.dim()),
    ])];
    if c.is_solvent() {
        out.push(Line::from("solvent: activity 1, left out of Q"));
        return out;
    }
    let (lo, hi) = p.bounds_of(i);
    out.push(Line::from(format!(
        "now {}; bounds {} to {}",
        units::format_conc(app.state().conc[i], ascii),
        units::format_conc(lo, ascii),
        units::format_conc(hi, ascii)
    )));
    let users: Vec<&str> = (0..app.step_rows())
        .filter_map(|k| app.step_row(k))
        .filter(|s| p.steps[s.step].stoich.iter().any(|x| x.0 == i))
        .map(|s| p.steps[s.step].id.as_str())
        .collect();
    if !users.is_empty() {
        // A carrier on a long route is used by thousands of steps: name the
        // first few (the pane shows one line of them anyway).
        const NAMED: usize = 12;
        let more = match users.len().saturating_sub(NAMED) {
            0 => String::new(),
            n => format!(" and {n} more"),
        };
        let named = &users[..users.len().min(NAMED)];
        out.push(Line::from(format!("used by {}{more}", named.join(", "))));
    }
    match &app.mdf {
        LiveMdf::Solved(m) => out.extend(compound_optimum_lines(app, t, m, i)),
        LiveMdf::Failed(e) => {
            out.push(Line::styled(format!("optimum: not solved — {e}"), t.warn()))
        }
        LiveMdf::Pending => out.push(Line::styled(
            "optimum: being solved in the background",
            t.dim(),
        )),
    }
    out
}

/// A compound's part in the live optimisation and where the route can run.
fn compound_optimum_lines(app: &App, t: &Theme, m: &Mdf, i: usize) -> Vec<Line<'static>> {
    let ascii = app.opts.ascii;
    let conc = |x: f64| units::format_conc(x, ascii);
    let c = &app.pathway().compounds[i];
    match m.parts.get(i) {
        Some(Part::Free) => {
            let mut v = vec![Line::from(format!("at the optimum: {}", conc(m.conc[i])))];
            let (dash, ge) = if ascii { ("-", ">=") } else { ("–", "≥") };
            v.push(match app.session.feasible_range(m, i) {
                None => Line::styled("route range: being solved in the background", t.dim()),
                Some(Ok(Some((lo, hi)))) => Line::from(format!(
                    "the route can run for {}{dash}{} (every step at -dG' {ge} 0, the others free within their bounds)",
                    conc(lo),
                    conc(hi)
                )),
                Some(Ok(None)) => Line::styled(
                    "no concentration lets the whole route run within the bounds (MDF < 0)",
                    t.warn(),
                ),
                Some(Err(e)) => Line::styled(format!("range not solved — {e}"), t.warn()),
            });
            v
        }
        Some(Part::Held) => {
            let why = if c.fixed == Some(true) {
                " (fixed = true)"
            } else if c.is_currency() {
                " (a carrier: fixed = false frees it)"
            } else {
                " (its bounds are equal)"
            };
            vec![Line::from(format!(
                "held at {} in the optimisation{why}",
                conc(m.conc[i])
            ))]
        }
        _ => vec![Line::styled(
            "not in the optimisation (no route step uses it)",
            t.dim(),
        )],
    }
}

/// The selected step at the driving-force optimum.
fn optimum_line(app: &App, t: &Theme, s: &StepResult) -> Line<'static> {
    let u = app.opts.unit;
    let a = &app.analysis;
    match &app.mdf {
        LiveMdf::Failed(e) => Line::styled(format!("optimum: not solved — {e}"), t.warn()),
        LiveMdf::Pending => Line::styled("optimum: being solved in the background", t.dim()),
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
                    if !app.optimum_current() {
                        l.push(Span::styled("  (out of date, solving)", t.dim()));
                    }
                    Line::from(l)
                }
            }
        }
    }
}

/// Draws the step detail pane.
pub fn detail_pane(app: &App, t: &Theme, area: Rect, buf: &mut Buffer) {
    let compound = app.focus == Pane::Compounds;
    let title = if compound {
        "Compound detail"
    } else {
        "Step detail"
    };
    let b = block(app, t, Pane::Detail, title);
    let inner = b.inner(area);
    b.render(area, buf);
    let lines = if compound {
        compound_lines(app, t)
    } else {
        detail_lines(app, t)
    };
    Paragraph::new(lines)
        .wrap(Wrap { trim: false })
        .scroll((app.detail_scroll, 0))
        .render(inner, buf);
}
