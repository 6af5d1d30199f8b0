//! What a new user trips over in the explorer: stepped values, find, the
//! step pane's edits, wording and glyphs, samples as views, reloads and the
//! bundled demo, each driven through `App::handle_key`.

use super::explorer::{ci, demo, keys, on_disk, screen};
use dgpath::tui::app::{Mode, Pane};

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
    let narrow = screen(&app, 60, 24);
    assert!(narrow.contains('$'), "{narrow}");
    let wide = screen(&app, 120, 36);
    assert!(wide.lines().any(|l| l.contains("|+ g6p")), "{wide}");
    assert_eq!(app.focus, Pane::Steps);
    assert_eq!(app.mode, Mode::Normal);
}
