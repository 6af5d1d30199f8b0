//! What a new user trips over in the explorer: stepped values, find, the
//! step pane's edits, wording and glyphs, samples as views, reloads and the
//! bundled demo, each driven through `App::handle_key`.

use super::explorer::{ci, demo, keys, on_disk, screen};
use dgpath::tui::app::{Mode, Pane, Target};

#[test]
fn stepped_values_are_rounded_to_three_figures_and_saved_so() {
    let (_dir, path, mut app) = on_disk();
    let f6p = ci(&app, "f6p");
    // f6p is 0.35 mM in the demo: 0.35 × 10^0.1 = 0.4406 → 0.441, × 10^0.1 → 0.555, × 10 → 5.55.
    keys(&mut app, "Tab Down Down + + >");
    assert_eq!(app.state().conc[f6p], 5.55e-3);
    keys(&mut app, "s");
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(
        text.contains(r#"f6p   = { name = "fructose 6-phosphate", conc = "5.55 mM", cv = 0.25 }"#),
        "{text}"
    );
    // Up and down again lands on the file's value exactly: nothing unsaved.
    keys(&mut app, "< - -");
    assert_eq!(app.state().conc[f6p], 0.35e-3);
    keys(&mut app, "+ -");
    assert_eq!(app.state().conc[f6p], 0.35e-3);
}

/// Significant figures of a printed number ("4680" has 3, "0.0120" has 3).
fn figures(n: &str) -> usize {
    let mantissa = n.split('e').next().unwrap();
    let digits: String = mantissa.chars().filter(|c| c.is_ascii_digit()).collect();
    let digits = digits.trim_start_matches('0');
    if mantissa.contains('.') {
        digits.len()
    } else {
        digits.trim_end_matches('0').len()
    }
}

#[test]
fn the_detail_shows_three_figures_and_sides_apart_from_contributions() {
    let mut app = demo();
    keys(&mut app, "/ 'pyk' Enter");
    let text = screen(&app, 160, 48);
    // No number in the detail pane carries more than three significant figures.
    let detail: Vec<&str> = text.lines().filter(|l| l.contains("K' ")).collect();
    assert_eq!(detail.len(), 1, "{text}");
    let k = detail[0]
        .split("K' ")
        .nth(1)
        .unwrap()
        .split_whitespace()
        .next()
        .unwrap();
    assert!(figures(k) <= 3, "K' {k}");
    let flux = text.lines().find(|l| l.contains("J+/J−")).unwrap();
    let j = flux
        .split("J+/J− ")
        .nth(1)
        .unwrap()
        .split_whitespace()
        .next()
        .unwrap();
    assert!(figures(j) <= 3 && j.parse::<f64>().is_ok(), "J+/J− {j}");
    assert!(text.contains("substrate pep"), "{text}");
    assert!(text.contains("product   pyr"), "{text}");
}

#[test]
fn one_wording_for_passes_spelled_roles_and_distinct_ascii_glyphs() {
    let mut app = demo();
    let text = screen(&app, 120, 36);
    assert!(
        text.contains("per pass") && !text.contains("turns"),
        "{text}"
    );
    // At 80 columns the roles are spelled out.
    let small = screen(&app, 80, 24);
    assert!(small.contains("input"), "{small}");
    for short in [" in ", " mid ", " br "] {
        assert!(!small.contains(short), "'{short}' in\n{small}");
    }
    // In ASCII, a cut name ends in '$' (not the near class's '~') and the
    // compounds used by the selected step carry '+' (not the control point's '*').
    app.opts.ascii = true;
    assert_eq!(dgpath::tui::view::fit("glycerol", 5, true), "glyc$");
    let wide = screen(&app, 120, 36);
    assert!(wide.lines().any(|l| l.contains("|+ g6p")), "{wide}");
    assert_eq!(app.focus, Pane::Steps);
    assert_eq!(app.mode, Mode::Normal);
}

#[test]
fn find_selects_in_its_own_pane_and_leaves_the_other_alone() {
    let mut app = demo();
    keys(&mut app, "/ 'pyk' Enter");
    let pyk = app.step_sel;
    assert_eq!(app.focus, Pane::Steps);
    // Typing "a" first matches the step ald; the compound match that follows
    // must put the step cursor back on pyk.
    keys(&mut app, "/ 'atp' Enter");
    assert_eq!(app.focus, Pane::Compounds);
    assert_eq!(app.comp_sel, ci(&app, "atp"));
    assert_eq!(app.step_sel, pyk, "the step pane keeps pyk");
    // And a step found from the compound pane keeps the compound selection.
    keys(&mut app, "/ 'hxk' Enter");
    assert_eq!((app.focus, app.step_sel), (Pane::Steps, 0));
    assert_eq!(app.comp_sel, ci(&app, "atp"));
}

#[test]
fn enter_on_a_step_edits_its_compounds_and_scaling_says_which() {
    let mut app = demo();
    keys(&mut app, "/ 'pyk' Enter");
    let comp_before = app.comp_sel;
    keys(&mut app, "Enter");
    let pep = ci(&app, "pep");
    assert!(
        matches!(app.mode, Mode::Edit { target: Target::Conc(c), .. } if c == pep),
        "{:?}",
        app.mode
    );
    let line = status_line(&app);
    assert!(
        line.starts_with(" pep (now") || line.starts_with("pep (now"),
        "{line}"
    );
    assert!(line.contains("Up/Down"), "{line}");
    // Down goes through the step's compounds (pep, adp, then its products).
    keys(&mut app, "Down");
    let adp = ci(&app, "adp");
    assert!(matches!(app.mode, Mode::Edit { target: Target::Conc(c), .. } if c == adp));
    keys(&mut app, "Up Up");
    let last = *app.step_compounds().last().unwrap();
    assert!(matches!(app.mode, Mode::Edit { target: Target::Conc(c), .. } if c == last));
    keys(&mut app, "Up Up '2' Enter");
    assert_eq!(app.state().conc[adp], 2e-3);
    assert_eq!(
        app.comp_sel, comp_before,
        "the concentration pane's selection is left alone"
    );
    // + with the step pane focused says which compound it changed.
    keys(&mut app, "+");
    let (m, _) = app.status.clone().unwrap();
    let id = &app.pathway().compounds[comp_before].id;
    assert!(
        m.starts_with(&format!("{id} = ")) && m.contains("concentration pane"),
        "{m}"
    );
}

fn status_line(app: &dgpath::tui::app::App) -> String {
    let text = screen(app, 120, 36);
    text.lines().rev().nth(1).unwrap().to_string()
}

#[test]
fn a_reload_keeps_the_undo_history_where_the_compounds_remain() {
    let (_dir, path, mut app) = on_disk();
    let (glc, f6p, fbp) = (ci(&app, "glc"), ci(&app, "f6p"), ci(&app, "fbp"));
    let fbp0 = app.state().conc[fbp];
    keys(
        &mut app,
        "Tab Down Down Enter '2.5 mM' Enter Down Enter '7 mM' Enter",
    );
    assert_eq!(app.state().conc[fbp], 7e-3);
    let changed = dgpath::DEMO.replace(r#"conc = "12 mM""#, r#"conc = "20 mM""#);
    std::fs::write(&path, &changed).unwrap();
    assert!(app.poll_disk());
    assert!(
        app.status
            .as_ref()
            .unwrap()
            .0
            .contains("kept 2 unsaved edits")
    );
    keys(&mut app, "u");
    assert_eq!(app.status.as_ref().unwrap().0, "undone");
    assert_eq!(app.state().conc[fbp], fbp0, "the fbp edit is undone");
    assert_eq!(app.state().conc[f6p], 2.5e-3, "the f6p edit stays");
    assert_eq!(
        app.state().conc[glc],
        20e-3,
        "the file's new value throughout"
    );
    keys(&mut app, "u");
    assert!(!app.dirty(), "back at the file as it is now");
    keys(&mut app, "u");
    assert_eq!(app.status.as_ref().unwrap().0, "nothing to undo");
    keys(&mut app, "C-r C-r");
    assert_eq!(app.state().conc[fbp], 7e-3);
}

#[test]
fn a_sample_is_a_view_and_copying_it_into_the_file_takes_s_capital() {
    let (_dir, path, app) = on_disk();
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let samples = dgpath::model::samples::read_str(
        &std::fs::read_to_string(root.join("pathways/fermenter-samples.csv")).unwrap(),
        "fermenter-samples.csv",
        app.pathway(),
        &app.state().conc,
    )
    .unwrap();
    let mut app = app.with_samples(samples.clone()).unwrap();
    let glc = ci(&app, "glc");
    assert_ne!(
        samples[0].conc[glc],
        app.pathway().compounds[glc].conc.unwrap()
    );
    assert!(!app.dirty(), "opening on a sample is not an edit");
    assert!(!screen(&app, 120, 36).contains("unsaved"));
    keys(&mut app, "s");
    assert!(
        app.status.as_ref().unwrap().0.contains("nothing to save"),
        "{:?}",
        app.status
    );
    assert_eq!(
        std::fs::read_to_string(&path).unwrap(),
        dgpath::DEMO,
        "s writes no sample"
    );
    keys(&mut app, "q");
    assert!(app.quit, "nothing unsaved: q quits at once");
    app.quit = false;
    // An edit on top of a sample is saved alone.
    keys(&mut app, "t '37 C' Enter");
    assert!(app.dirty());
    keys(&mut app, "s");
    let back = dgpath::model::load_file(&path).unwrap();
    assert!((back.conditions.temperature - 310.15).abs() < 1e-9);
    assert_eq!(
        back.compounds[glc].conc,
        Some(12e-3),
        "the demo file's glc, not the sample's"
    );
    // S copies the sample's values.
    keys(&mut app, "S");
    let back = dgpath::model::load_file(&path).unwrap();
    assert_eq!(back.compounds[glc].conc, Some(samples[0].conc[glc]));
    assert!(app.status.as_ref().unwrap().0.contains("sample h00"));
}

#[test]
fn the_built_in_demo_says_so_and_s_writes_it_to_a_named_file() {
    let dir = tempfile::tempdir().unwrap();
    let mut app = demo();
    let status = screen(&app, 120, 36).lines().last().unwrap().to_string();
    assert!(status.contains("built-in demo"), "{status}");
    assert!(!status.contains("fermenter.toml"), "{status}");
    keys(&mut app, "Tab +");
    let f6p_value = app.state().conc[app.comp_sel];
    keys(&mut app, "s");
    assert!(matches!(
        app.mode,
        Mode::Edit {
            target: Target::FileName,
            ..
        }
    ));
    assert!(screen(&app, 120, 36).contains("write the built-in demo to file:"));
    // An existing file is not replaced without a yes.
    let taken = dir.path().join("taken.toml");
    std::fs::write(&taken, "keep me").unwrap();
    keys(&mut app, &format!("'{}' Enter", taken.display()));
    assert_eq!(app.mode, Mode::ConfirmOverwrite);
    keys(&mut app, "n");
    assert_eq!(std::fs::read_to_string(&taken).unwrap(), "keep me");
    assert!(app.dirty() && app.source.path.is_none());
    let new = dir.path().join("mine.toml");
    keys(&mut app, &format!("s '{}' Enter", new.display()));
    let back = dgpath::model::load_file(&new).unwrap();
    assert_eq!(back.compounds[app.comp_sel].conc, Some(f6p_value));
    assert!(
        std::fs::read_to_string(&new)
            .unwrap()
            .contains("# INVENTED DEMO DATA")
    );
    assert_eq!(app.source.path.as_deref(), Some(new.as_path()));
    assert!(!app.dirty());
    assert!(
        status_line(&app).contains("wrote the demo to"),
        "{}",
        status_line(&app)
    );
    // And y replaces an existing file.
    keys(&mut app, "Tab +");
    let mut app2 = demo();
    keys(&mut app2, &format!("s '{}' Enter y", taken.display()));
    assert!(dgpath::model::load_file(&taken).is_ok());
}

#[test]
fn the_layout_fits_small_and_uses_wide_terminals() {
    let mut app = demo();
    // Below the minimum, one message instead of a broken screen.
    let tiny = screen(&app, 60, 20);
    assert!(tiny.contains("terminal too small (needs 80×24"), "{tiny}");
    assert!(!tiny.contains("Steps ("), "{tiny}");
    // At 80×24 the step list scrolls and says how many rows are hidden.
    let small = screen(&app, 80, 24);
    assert!(small.contains("↓ ") && small.contains(" more"), "{small}");
    keys(&mut app, "/ 'adh' Enter");
    assert!(
        screen(&app, 80, 24).contains("↑ "),
        "scrolled down: rows above"
    );
    // At 120×36 no class word is cut and the status line ends with the hint.
    let mid = screen(&app, 120, 36);
    assert!(!mid.contains("moderat…") && !mid.contains("near…"), "{mid}");
    assert!(mid.lines().last().unwrap().trim_end().ends_with("? keys"));
    // At 220 columns the step list shows sd, Q and K' next to a capped enzyme column.
    let wide = screen(&app, 220, 40);
    let header = wide.lines().nth(1).unwrap();
    for col in [" sd ", " Q ", " K' ", "dG'°", "per pass", "verdict"] {
        assert!(header.contains(col), "{col} missing: {header}");
    }
    // The enzyme column ends just after the longest name: no wide blank gap.
    let gaps = app.pathway().steps.iter().filter_map(|st| {
        let enz = st.enzyme.as_deref()?;
        let line = wide.lines().find(|l| l.contains(enz))?;
        let after = line.split(enz).nth(1)?;
        Some(after.len() - after.trim_start().len())
    });
    let narrowest = gaps.min().expect("enzymes shown");
    assert!(narrowest < 12, "{wide}");
    let hxk = wide.lines().find(|l| l.contains("│  hxk ")).unwrap();
    let k = dgpath::tui::view::text::num3(app.analysis.steps[0].keq());
    assert!(
        k.len() <= 7 && hxk.contains(&format!(" {k} ")),
        "K' {k} of hxk: {hxk}"
    );
}

#[test]
fn the_ladder_header_says_cumulative_and_the_help_lists_every_glyph() {
    let mut app = demo();
    let text = screen(&app, 160, 48);
    // The header names the running total and its ends: the highest (left)
    // at least the start (0), the lowest (right) at most the route's total dG'.
    let head = text
        .lines()
        .find(|l| l.contains("cumulative dG' kJ/mol: "))
        .expect("header");
    let rest = head.split("cumulative dG' kJ/mol: ").nth(1).unwrap();
    let (left, rest) = rest.split_once(" left, ").unwrap();
    let right = rest.split(" right").next().unwrap();
    let (left, right): (f64, f64) = (left.parse().unwrap(), right.parse().unwrap());
    let total = app.analysis.steps.last().unwrap().cumulative / 1e3;
    assert!(
        left >= 0.0 && right <= total.round() && left > right,
        "{head}"
    );
    let small = screen(&app, 80, 24);
    assert!(
        small.contains("cumul. dG': ") && small.contains(" right"),
        "{small}"
    );
    // The marker column has a header.
    let header = text.lines().nth(1).unwrap();
    assert!(header.contains("step  ■"), "{header}");
    keys(&mut app, "?");
    let help = screen(&app, 120, 40);
    for g in ["━", "┃", "╍", "█", "┌", "└", "◆", "◇", "·", "■", "◀"] {
        assert!(help.contains(&format!("{g} ")), "legend lacks {g}:\n{help}");
    }
    assert!(help.contains("rung (cumulative dG')"), "{help}");
    // At the minimum size the whole overlay, legend included, fits.
    let min = screen(&app, 80, 24);
    assert!(
        min.contains("│ q / Ctrl-c") && min.contains("… cut   │"),
        "{min}"
    );
    app.opts.ascii = true;
    let help = screen(&app, 120, 40);
    assert!(help.is_ascii());
    assert!(
        help.contains("$ cut") && help.contains("* control point"),
        "{help}"
    );
}

#[test]
fn one_key_table_makes_the_handling_the_overlay_and_the_hint_line() {
    use dgpath::tui::keymap::{BINDINGS, Keys, Where};
    use ratatui::crossterm::event::{KeyEvent, KeyModifiers};
    let app = demo();
    let overlay: Vec<_> = dgpath::tui::view::key_rows().collect();
    for b in BINDINGS.iter().filter(|b| b.when == Where::Browse) {
        let Keys::Plain(ks) = b.keys else { continue };
        for &k in ks {
            let m = app.message_for(KeyEvent::new(k, KeyModifiers::NONE));
            assert!(m.is_some(), "{k:?} ({}) sends nothing", b.label);
        }
        if !b.label.is_empty() {
            assert!(
                overlay.contains(&(b.label, b.help)),
                "{} not in the overlay",
                b.label
            );
        }
    }
    // A key the table lacks does nothing.
    let none = app.message_for(KeyEvent::new(
        ratatui::crossterm::event::KeyCode::Char('z'),
        KeyModifiers::NONE,
    ));
    assert_eq!(none, None);
    // The hint line fits at 80 columns and ends with the way to the overlay.
    let small = screen(&app, 80, 24);
    let hint = small.lines().rev().nth(1).unwrap().trim_end();
    assert!(
        hint.ends_with("? keys") && hint.starts_with("Tab pane"),
        "{hint}"
    );
}

#[test]
fn screenshot_refuses_an_unknown_key_name_and_lists_the_valid_ones() {
    let dir = tempfile::tempdir().unwrap();
    let out = crate::support::dgpath()
        .args(["screenshot", "pathways/fermenter.toml", "-o"])
        .arg(dir.path().join("shot"))
        .args(["--keys", "Tab Frobnicate"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("unknown key 'Frobnicate'") && err.contains("PageDown"),
        "{err}"
    );
    assert!(!dir.path().join("shot.txt").exists(), "nothing written");
    // Quoted text is typed.
    let ok = crate::support::dgpath()
        .args(["screenshot", "pathways/fermenter.toml", "-o"])
        .arg(dir.path().join("shot"))
        .args(["--keys", "Tab Down Down Enter '2.5 mM'"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert!(ok.status.success());
    let text = std::fs::read_to_string(dir.path().join("shot.txt")).unwrap();
    assert!(text.contains("f6p (now 0.35 mM) = 2.5 mM"), "{text}");
}
