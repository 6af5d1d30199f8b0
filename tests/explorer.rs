//! The explorer driven by key events through `App::handle_key`: the model
//! changes are asserted, and a few screens are snapshotted on a fixed-size
//! buffer (text with insta; style checked on cells where meaning depends on it).

use dgpath::analysis::mdf::{self, Part};
use dgpath::analysis::{self, Direction};
use dgpath::model;
use dgpath::report::EnergyUnit;
use dgpath::scenario::State;
use dgpath::tui::app::{App, Mode, Options, Pane, Source};
use dgpath::tui::keys::parse_keys;
use dgpath::tui::{export, view};
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::style::Modifier;
use std::path::Path;

/// R in J/(mol K), exact in the 2019 SI (science.md).
const R: f64 = 8.314462618;

pub(crate) fn opts() -> Options {
    Options {
        ascii: false,
        color: false,
        unit: EnergyUnit::KJ,
    }
}

pub(crate) fn app_from(text: &str, source: Source) -> App {
    let p = model::load_str(text, &source.name).expect("demo loads");
    let prep = analysis::prepare(p).expect("demo prepares");
    let state = State::from_pathway(&prep.pathway);
    App::new(prep, state, source, opts()).expect("demo analyses")
}

pub(crate) fn demo() -> App {
    app_from(dgpath::DEMO, Source::demo())
}

/// The demo copied into a temporary folder, opened from there.
pub(crate) fn on_disk() -> (tempfile::TempDir, std::path::PathBuf, App) {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("fermenter.toml");
    std::fs::write(&path, dgpath::DEMO).unwrap();
    let src = Source {
        path: Some(path.clone()),
        name: "fermenter.toml".into(),
        text: dgpath::DEMO.into(),
    };
    let app = app_from(dgpath::DEMO, src);
    (dir, path, app)
}

pub(crate) fn keys(app: &mut App, script: &str) {
    for k in parse_keys(script).unwrap() {
        app.handle_key(k);
    }
}

pub(crate) fn ci(app: &App, id: &str) -> usize {
    app.pathway().compound(id).unwrap()
}

pub(crate) fn dg_of(app: &App, id: &str) -> f64 {
    let st = app.pathway().step(id).unwrap();
    app.analysis.steps.iter().find(|s| s.step == st).unwrap().dg
}

pub(crate) fn screen(app: &App, w: u16, h: u16) -> String {
    export::to_text(&export::render_buffer(app, w, h))
}

#[test]
fn plus_scales_the_selected_concentration_and_undo_restores_it() {
    let mut app = demo();
    // Tab to the concentration pane, down from glc to f6p.
    keys(&mut app, "Tab Down Down");
    assert_eq!(app.focus, Pane::Compounds);
    let f6p = ci(&app, "f6p");
    assert_eq!(app.comp_sel, f6p);
    let (c0, pfk0, pgi0) = (
        app.state().conc[f6p],
        dg_of(&app, "pfk"),
        dg_of(&app, "pgi"),
    );
    keys(&mut app, "+");
    let c1 = app.state().conc[f6p];
    // A tenth of a decade, rounded to three figures.
    assert!((c1 / c0 - 10f64.powf(0.1)).abs() < 5e-3, "{c1} vs {c0}");
    // f6p is consumed by pfk and made by pgi: RT ln (c1/c0) moves them apart.
    let rt = R * 303.15; // 30 C, the demo's temperature
    let shift = rt * (c1 / c0).ln();
    assert!((dg_of(&app, "pfk") - (pfk0 - shift)).abs() < 1e-6);
    assert!((dg_of(&app, "pgi") - (pgi0 + shift)).abs() < 1e-6);
    assert!(app.dirty() && app.edited(f6p));
    keys(&mut app, "> > <");
    assert!((app.state().conc[f6p] / c1 - 10.0).abs() < 1e-12);
    keys(&mut app, "u u u u");
    assert_eq!(app.state().conc[f6p], c0, "undo restores the exact value");
    assert_eq!(dg_of(&app, "pfk"), pfk0);
    assert!(!app.dirty());
    app.handle_key(KeyEvent::new(KeyCode::Char('r'), KeyModifiers::CONTROL));
    assert_eq!(app.state().conc[f6p], c1, "Ctrl-r redoes");
    keys(&mut app, "-");
    assert!((app.state().conc[f6p] - c0).abs() < 1e-15);
}

#[test]
fn a_typed_value_with_a_unit_is_applied_and_a_bad_one_changes_nothing() {
    let mut app = demo();
    keys(&mut app, "Tab Down Down Enter '2.5 mM' Enter");
    let f6p = ci(&app, "f6p");
    assert_eq!(app.state().conc[f6p], 2.5e-3);
    assert_eq!(app.mode, Mode::Normal);
    // A bare number is mM, as in the file.
    keys(&mut app, "Enter '0.5' Enter");
    assert_eq!(app.state().conc[f6p], 0.5e-3);
    let before = app.state().clone();
    keys(&mut app, "Enter '2.5 mmol' Enter");
    match &app.mode {
        Mode::Edit { error: Some(e), .. } => assert!(e.contains("unknown unit 'mmol'"), "{e}"),
        m => panic!("expected an inline error, got {m:?}"),
    }
    assert_eq!(app.state(), &before, "a bad value changes nothing");
    keys(&mut app, "Esc");
    assert_eq!(app.mode, Mode::Normal);
    keys(&mut app, "Enter '-3 uM' Enter");
    assert!(matches!(app.mode, Mode::Edit { error: Some(_), .. }));
    keys(&mut app, "Esc");
    assert_eq!(app.state(), &before);
    // A bare temperature is refused, as in the file and on the command line.
    keys(&mut app, "t '37' Enter");
    match &app.mode {
        Mode::Edit { error: Some(e), .. } => assert!(e.contains("needs a unit"), "{e}"),
        m => panic!("expected an inline error, got {m:?}"),
    }
    keys(&mut app, "Esc");
    // Conditions: temperature, pH, ionic strength.
    keys(&mut app, "t '37 C' Enter p '7.4' Enter i '150 mM' Enter");
    let c = app.state().conditions;
    assert!((c.temperature - 310.15).abs() < 1e-9);
    assert_eq!(c.ph, 7.4);
    assert!((c.ionic_strength - 0.15).abs() < 1e-15);
    assert!((app.analysis.rt - R * 310.15).abs() < 1e-6);
    keys(&mut app, "p '15' Enter");
    assert!(matches!(app.mode, Mode::Edit { error: Some(_), .. }));
}

#[test]
fn reverse_toggles_the_direction_and_is_undoable() {
    let mut app = demo();
    keys(&mut app, "r");
    assert_eq!(app.state().direction, Direction::Reverse);
    assert_eq!(app.analysis.direction, Direction::Reverse);
    let first = app.analysis.steps[0].step;
    assert_eq!(
        app.pathway().steps[first].id,
        "adh",
        "the reverse route starts at the end"
    );
    assert!(app.analysis.steps[0].sign < 0.0);
    // The selection stays on the same step (hxk is last in reverse).
    let sel = app.selected_step().unwrap().step;
    assert_eq!(app.pathway().steps[sel].id, "hxk");
    assert!(screen(&app, 120, 36).contains("reverse"));
    keys(&mut app, "u");
    assert_eq!(app.state().direction, Direction::Forward);
}

#[test]
fn quitting_with_unsaved_edits_asks_first() {
    let mut app = demo();
    keys(&mut app, "q");
    assert!(app.quit, "no edits: q quits at once");
    let mut app = demo();
    keys(&mut app, "Tab + q");
    assert!(!app.quit);
    assert_eq!(app.mode, Mode::ConfirmQuit);
    keys(&mut app, "j");
    assert!(!app.quit && app.mode == Mode::Normal, "another key cancels");
    keys(&mut app, "q q");
    assert!(app.quit);
}

#[test]
fn find_walk_and_selection_highlights() {
    let mut app = demo();
    keys(&mut app, "/ 'pyk' Enter");
    let sel = app.selected_step().unwrap().step;
    assert_eq!(app.pathway().steps[sel].id, "pyk");
    keys(&mut app, "/ 'ethanol' Enter");
    assert_eq!(app.focus, Pane::Compounds);
    assert_eq!(app.comp_sel, ci(&app, "etoh"));
    keys(&mut app, "/ 'zzz' Enter");
    assert!(
        app.status
            .as_ref()
            .unwrap()
            .0
            .contains("no step or compound")
    );
    // Selecting etoh marks adh, the step that makes it, in the step list.
    let text = screen(&app, 120, 36);
    assert!(text.lines().any(|l| l.contains("• adh")), "{text}");
    assert!(!text.lines().any(|l| l.contains("• pfk")));
    keys(&mut app, "w");
    assert_eq!(app.walk, Some(0));
    keys(&mut app, "w w");
    assert_eq!((app.walk, app.step_sel), (Some(2), 2));
    keys(&mut app, "Esc");
    assert_eq!(app.walk, None);
}

#[test]
fn save_writes_the_file_keeping_comments() {
    let (_dir, path, mut app) = on_disk();
    keys(
        &mut app,
        "Tab Down Down Enter '2.5 mM' Enter t '37 C' Enter s",
    );
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(
        text.contains(r#"f6p   = { name = "fructose 6-phosphate", conc = "2.5 mM", cv = 0.25 }"#),
        "{text}"
    );
    assert!(text.contains(r#"temperature = "37 C""#));
    assert!(text.contains("# INVENTED DEMO DATA"));
    assert!(text.contains("# also feeds storage sugars"));
    assert!(!app.dirty(), "saved: nothing unsaved");
    assert!(app.status.as_ref().unwrap().0.starts_with("saved"));
    let back = model::load_file(&path).unwrap();
    assert_eq!(back.compounds[ci(&app, "f6p")].conc, Some(2.5e-3));
    keys(&mut app, "q");
    assert!(app.quit);
}

#[test]
fn find_cancelled_puts_the_selection_back_and_help_lists_the_keys() {
    let mut app = demo();
    keys(&mut app, "Down / 'ethan'");
    assert_eq!(
        app.comp_sel,
        ci(&app, "etoh"),
        "the find follows the typing"
    );
    keys(&mut app, "Esc");
    assert_eq!((app.focus, app.step_sel), (Pane::Steps, 1));
    assert_eq!(app.comp_sel, ci(&app, "glc"));
    keys(&mut app, "?");
    assert_eq!(app.mode, Mode::Help);
    let text = screen(&app, 120, 36);
    for k in [
        "q ",
        "? ",
        "Tab / Shift-Tab",
        "Up/Down, k/j",
        "Enter",
        "+ / -",
        "> / <",
        "/ ",
        "t / p / i",
        "r ",
        "w ",
        "u / Ctrl-r",
        "s ",
        "o ",
        "[ / ]",
    ] {
        assert!(
            text.lines().any(|l| l.contains(&format!("│ {k}"))),
            "help lacks '{k}':\n{text}"
        );
    }
    keys(&mut app, "j");
    assert_eq!(app.mode, Mode::Normal, "any key closes the help");
}

#[test]
fn saving_over_an_outside_change_asks_first() {
    let (_dir, path, mut app) = on_disk();
    keys(&mut app, "Tab +");
    let outside = dgpath::DEMO.replace(
        "# INVENTED DEMO DATA",
        "# edited elsewhere\n# INVENTED DEMO DATA",
    );
    std::fs::write(&path, &outside).unwrap();
    keys(&mut app, "s");
    assert_eq!(app.mode, Mode::ConfirmOverwrite);
    keys(&mut app, "n");
    assert_eq!(
        std::fs::read_to_string(&path).unwrap(),
        outside,
        "n keeps the file"
    );
    keys(&mut app, "s y");
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(
        text.contains("# INVENTED DEMO DATA") && !app.dirty(),
        "{:?} {:?}",
        app.status,
        app.mode
    );
}

#[test]
fn a_change_on_disk_reloads_and_keeps_unsaved_edits() {
    let (_dir, path, mut app) = on_disk();
    keys(&mut app, "Tab Down Down Enter '2.5 mM' Enter");
    let changed = dgpath::DEMO.replace(r#"conc = "12 mM""#, r#"conc = "20 mM""#);
    std::fs::write(&path, &changed).unwrap();
    assert!(app.poll_disk());
    assert_eq!(
        app.state().conc[ci(&app, "glc")],
        20e-3,
        "the file's new value"
    );
    assert_eq!(
        app.state().conc[ci(&app, "f6p")],
        2.5e-3,
        "the unsaved edit stays"
    );
    assert!(
        app.status
            .as_ref()
            .unwrap()
            .0
            .contains("kept 1 unsaved edit")
    );
    assert!(!app.poll_disk(), "nothing new on disk");
    // A file that no longer parses: error shown, last good state kept.
    std::fs::write(
        &path,
        changed.replace("[[steps]]\nid = \"pgi\"", "[[steps]\nid = \"pgi\""),
    )
    .unwrap();
    assert!(app.poll_disk());
    let (m, _) = app.status.clone().unwrap();
    assert!(
        m.contains("does not load") && m.contains("fermenter.toml:"),
        "{m}"
    );
    assert_eq!(app.state().conc[ci(&app, "glc")], 20e-3);
    assert!(screen(&app, 120, 36).contains("file on disk does not load"));
}

#[test]
fn the_largest_drop_row_is_bold_and_marked() {
    let app = demo();
    let buf = export::render_buffer(&app, 120, 36);
    let row_of = |id: &str| {
        (0..buf.area.height)
            .find(|&y| {
                let line: String = (0..76).map(|x| buf[(x, y)].symbol().to_string()).collect();
                line.contains(&format!("  {id} "))
            })
            .unwrap()
    };
    let (pdc, pyk) = (row_of("pdc"), row_of("pyk"));
    assert_eq!(
        app.pathway().steps[app.analysis.steps[app.analysis.largest_drop.unwrap()].step].id,
        "pdc"
    );
    let bold = |y: u16| (3..8).all(|x| buf[(x, y)].modifier.contains(Modifier::BOLD));
    assert!(bold(pdc), "largest drop row is bold");
    assert!(!bold(pyk), "other rows are not");
    let line: String = (0..76)
        .map(|x| buf[(x, pdc)].symbol().to_string())
        .collect();
    assert!(line.contains("49%◀"), "{line}");
}

#[test]
fn without_colour_no_cell_carries_a_colour() {
    // NO_COLOR turns `color` off; meaning must then rest on symbols and modifiers.
    let mut app = demo();
    keys(&mut app, "Tab Down +");
    let buf = export::render_buffer(&app, 120, 36);
    let coloured = buf
        .content()
        .iter()
        .filter(|c| c.fg != ratatui::style::Color::Reset || c.bg != ratatui::style::Color::Reset)
        .count();
    assert_eq!(coloured, 0);
    let text = export::to_text(&buf);
    assert!(
        text.contains("g6p       2.39 mM* "),
        "edited value marked by a star:\n{text}"
    );
    assert!(text.contains("● unsaved"));
}

#[test]
fn a_piped_explorer_explains_and_bare_dgpath_prints_the_report() {
    let root = env!("CARGO_MANIFEST_DIR");
    let out = crate::support::dgpath()
        .args(["explore", "pathways/fermenter.toml"])
        .current_dir(root)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("needs a terminal") && err.contains("dgpath report"),
        "{err}"
    );
    assert!(out.stdout.is_empty(), "no screen drawn into a pipe");
    let out = crate::support::dgpath().current_dir(root).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("% ◀largest"), "{text}");
}

#[test]
fn explore_reads_the_samples_first_and_a_bad_table_exits_before_the_screen() {
    let root = env!("CARGO_MANIFEST_DIR");
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.csv");
    std::fs::write(&bad, "sample,glc [mM]\nh00,40\nh01,forty\n").unwrap();
    let out = crate::support::dgpath()
        .args(["explore", "pathways/fermenter.toml", "--samples"])
        .arg(&bad)
        .current_dir(root)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.csv") && err.contains("forty"), "{err}");
    assert!(
        !err.contains("needs a terminal"),
        "the table is read first: {err}"
    );
    // A good table gets as far as the terminal check.
    let out = crate::support::dgpath()
        .args([
            "explore",
            "pathways/fermenter.toml",
            "--samples",
            "pathways/fermenter-samples.csv",
        ])
        .current_dir(root)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("needs a terminal"));
}

#[test]
fn snapshot_overview() {
    insta::assert_snapshot!("overview_120x36", screen(&demo(), 120, 36));
}

#[test]
fn snapshot_edit_with_a_bad_value_at_80x24() {
    let mut app = demo();
    keys(&mut app, "Tab Down Down Enter '2.5 mmol' Enter");
    insta::assert_snapshot!("bad_edit_80x24", screen(&app, 80, 24));
}

#[test]
fn snapshot_help_in_ascii() {
    let mut app = demo();
    app.opts.ascii = true;
    keys(&mut app, "?");
    let text = screen(&app, 100, 30);
    assert!(text.is_ascii(), "{text}");
    insta::assert_snapshot!("help_ascii_100x30", text);
}

/// The demo with the demo samples table, as `explore --samples` opens it.
pub(crate) fn demo_with_samples() -> (App, Vec<dgpath::model::samples::Sample>) {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let app = demo();
    let table = root.join("pathways/fermenter-samples.csv");
    let samples: Vec<_> =
        dgpath::model::samples::SampleReader::open(&table, app.pathway(), &app.state().conc)
            .unwrap()
            .collect::<Result<_, _>>()
            .unwrap();
    let app = app.with_samples(samples.clone()).unwrap();
    (app, samples)
}

pub(crate) fn status_text(app: &App, w: u16, h: u16) -> String {
    screen(app, w, h).lines().last().unwrap().to_string()
}

#[test]
fn o_loads_the_rounded_optimum_as_one_edit_and_u_restores() {
    let (_dir, path, mut app) = on_disk();
    let before = app.state().clone();
    let m = mdf::solve(&app.prep, app.state()).unwrap();
    keys(&mut app, "o");
    let after = app.state().clone();
    let mut moved = 0;
    for (i, c) in app.pathway().compounds.iter().enumerate() {
        if m.parts[i] == Part::Free {
            // Three significant figures: the value times a power of ten is a whole number below 1000.
            let v = after.conc[i];
            let scaled = v / 10f64.powi(v.log10().floor() as i32 - 2);
            assert!((scaled - scaled.round()).abs() < 1e-6, "{}: {v}", c.id);
            assert!(
                (v / m.conc[i] - 1.0).abs() <= 5e-3,
                "{}: {v} vs {}",
                c.id,
                m.conc[i]
            );
            let (lo, hi) = m.bounds[i];
            assert!(v >= lo && v <= hi, "{}: {v} outside {lo}..{hi}", c.id);
            moved += usize::from(v != before.conc[i]);
        } else {
            assert_eq!(after.conc[i], before.conc[i], "{} is held or absent", c.id);
        }
    }
    assert!(moved > 0);
    let msg = &app.status.as_ref().unwrap().0;
    assert!(msg.contains("3 significant figures"), "{msg}");
    // At the (rounded) optimum the MDF is the optimum's, up to the rounding.
    let now = app.optimum().unwrap().value;
    assert!((now - m.value).abs() < 1.0, "{now} vs {}", m.value);
    keys(&mut app, "u");
    assert_eq!(app.state(), &before, "one u undoes the whole load");
    // Saved, each optimal value is written with at most three figures.
    keys(&mut app, "o s");
    let text = std::fs::read_to_string(&path).unwrap();
    let back = model::load_file(&path).unwrap();
    for (i, c) in back.compounds.iter().enumerate() {
        if m.parts[i] != Part::Free {
            continue;
        }
        assert_eq!(c.conc, Some(app.state().conc[i]), "{} reads back", c.id);
        let line = text
            .lines()
            .find(|l| l.starts_with(&format!("{} ", c.id)))
            .unwrap();
        let value = line.split("conc = \"").nth(1).unwrap();
        let num = value.split(' ').next().unwrap();
        let digits = num.trim_start_matches(['0', '.']).replace('.', "");
        assert!(digits.trim_end_matches('0').len() <= 3, "{line}");
    }
}

#[test]
fn bottleneck_marks_follow_the_optimisation() {
    let mut app = demo();
    for script in ["", "r", "Tab Down Down > > >"] {
        keys(&mut app, script);
        let m = mdf::solve(&app.prep, app.state()).unwrap();
        assert!(!m.bottlenecks.is_empty());
        let buf = export::render_buffer(&app, 120, 36);
        let text = export::to_text(&buf);
        let title = text.lines().next().unwrap();
        let shown = format!("MDF {:+.1}", m.value / 1000.0).replace('-', "−");
        assert!(title.contains(&shown), "{title} lacks {shown}");
        assert_eq!(title.contains("cannot run"), m.value <= 0.0, "{title}");
        // Route steps are on rows 2.. (below the title and the column header);
        // the marker column follows the step id: lead (2) + id (5, "gapdh") + space.
        let x0 = 1 + 2 + 5 + 1;
        for k in 0..app.analysis.steps.len() {
            let id = &app.pathway().steps[app.analysis.steps[k].step].id;
            let row: String = (0..120)
                .map(|x| buf[(x, 2 + k as u16)].symbol().to_string())
                .collect();
            assert!(row.contains(id.as_str()), "row {k} is {row}");
            let marked = buf[(x0, 2 + k as u16)].symbol() == view::bottleneck_mark(false);
            assert_eq!(marked, row.contains('■'), "{row}");
            assert_eq!(
                marked,
                m.bottlenecks.contains(&k),
                "{id}: marker {marked}, prices {:?}\n{text}",
                m.prices
            );
            assert_eq!(app.is_bottleneck(k), m.prices[k] > 0.0);
        }
    }
}

#[test]
fn a_failed_optimisation_is_shown_without_breaking_the_screen() {
    // co2 is fixed at 1.2 mM; bounds that exclude it make the optimisation refuse.
    let text = dgpath::DEMO.replace(
        r#"co2   = { name = "carbon dioxide", conc = "1.2 mM", fixed = true }"#,
        r#"co2   = { name = "carbon dioxide", conc = "1.2 mM", fixed = true, bounds = ["1 uM", "1 mM"] }"#,
    );
    assert_ne!(text, dgpath::DEMO);
    let app = app_from(&text, Source::demo());
    let shown = screen(&app, 120, 36);
    assert!(shown.contains("MDF not solved"), "{shown}");
    assert!(shown.contains("optimum: not solved"), "{shown}");
    assert!(shown.contains("co2"), "{shown}");
    // The rest of the screen is there.
    assert!(shown.contains("Energy ladder") && shown.contains("? keys"));
    let mut app = app;
    keys(&mut app, "o");
    assert!(
        app.status
            .as_ref()
            .unwrap()
            .0
            .starts_with("no optimum to load")
    );
}

#[test]
fn samples_step_with_brackets_and_save_names_the_sample() {
    let (mut app, samples) = demo_with_samples();
    assert_eq!(samples.len(), 12);
    assert_eq!(
        app.state().conc,
        samples[0].conc,
        "opens on the first sample"
    );
    keys(&mut app, "] ] [");
    assert_eq!(app.sample_at, 1);
    assert_eq!(app.state().conc, samples[1].conc);
    // Row h03 of pathways/fermenter-samples.csv: glc 34.3 mM.
    assert_eq!(samples[1].name, "h03");
    assert!((app.state().conc[ci(&app, "glc")] - 34.3e-3).abs() < 1e-12);
    let status = status_text(&app, 120, 36);
    assert!(status.contains("sample h03 (2/12)"), "{status}");
    keys(&mut app, "u");
    assert_eq!(app.state().conc, samples[2].conc, "u undoes the [");
    assert!(status_text(&app, 120, 36).contains("sample h06 (3/12)"));
    keys(&mut app, "[ [ [");
    assert_eq!(app.sample_at, 0);
    assert!(app.status.as_ref().unwrap().0.contains("first sample"));
    // An edit after choosing a sample is shown.
    keys(&mut app, "Tab +");
    assert!(status_text(&app, 120, 36).contains("sample h00 (1/12) edited"));
}

#[test]
fn saving_after_a_sample_says_which_sample() {
    let (dir, path, app) = on_disk();
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let samples = dgpath::model::samples::read_str(
        &std::fs::read_to_string(root.join("pathways/fermenter-samples.csv")).unwrap(),
        "fermenter-samples.csv",
        app.pathway(),
        &app.state().conc,
    )
    .unwrap();
    let mut app = app.with_samples(samples.clone()).unwrap();
    keys(&mut app, "] ] ] S");
    let msg = &app.status.as_ref().unwrap().0;
    assert!(msg.contains("sample h09"), "{msg}");
    let back = model::load_file(&path).unwrap();
    let glc = back.compound("glc").unwrap();
    // Row h09 of pathways/fermenter-samples.csv: glc 18.1 mM.
    assert_eq!(back.compounds[glc].conc, Some(18.1e-3));
    drop(dir);
}

#[test]
fn the_ladder_marks_one_sd_only_where_a_step_has_one() {
    // Invented two-step route; s2 has no dG'° sd and its compounds no cv.
    let text = r#"
format = 1
[pathway]
name = "sd check (invented)"
[conditions]
temperature = "25 C"
ph = 7
[compounds]
a = { conc = "1 mM", cv = 0.2 }
b = { conc = "0.1 mM" }
c = { conc = "0.01 mM" }
[[steps]]
id = "s1"
reaction = "a -> b"
dg0 = "-20 kJ/mol"
dg0_sd = "3 kJ/mol"
[[steps]]
id = "s2"
reaction = "b -> c"
dg0 = "-10 kJ/mol"
"#;
    let app = app_from(text, Source::demo());
    assert!(app.analysis.steps[0].dg_sd.is_some());
    assert_eq!(app.analysis.steps[1].dg_sd, None);
    let buf = export::render_buffer(&app, 120, 36);
    let txt = export::to_text(&buf);
    let row_of = |id: &str| -> String {
        let (y, _) = txt
            .lines()
            .enumerate()
            .filter(|(_, l)| l.contains(&format!(" {id} ")))
            .last()
            .unwrap();
        // The ladder is the left half of the lower panes.
        (0..66)
            .map(|x| buf[(x, y as u16)].symbol().to_string())
            .collect()
    };
    let s1 = row_of("s1");
    let s2 = row_of("s2");
    let sd = app.analysis.steps[0].dg_sd.unwrap() / 1000.0;
    assert!(
        s1.contains(&format!("±{sd:.1}")) || (s1.contains('├') && s1.contains('┤')),
        "{s1}\n{txt}"
    );
    assert!(
        !s2.contains('±') && !s2.contains('├') && !s2.contains('┤'),
        "{s2}"
    );
    // ASCII draws it too.
    let mut app = app;
    app.opts.ascii = true;
    let txt = screen(&app, 120, 36);
    let l = txt.lines().rfind(|l| l.contains(" s1 ")).unwrap();
    assert!(
        l.contains("+-") || (l.contains('[') && l.contains(']')),
        "{l}"
    );
}

#[test]
fn screenshots_are_up_to_date() {
    // Each command in screenshots/README.md is run again; the committed files must match.
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("screenshots/README.md")).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let mut n = 0;
    for line in readme.lines() {
        let Some(cmd) = line.trim().strip_prefix("dgpath screenshot ") else {
            continue;
        };
        let args = split_args(cmd);
        let out_i = args.iter().position(|a| a == "-o").unwrap() + 1;
        let name = args[out_i].clone();
        let mut args2 = args.clone();
        let tmp_out = dir.path().join(Path::new(&name).file_name().unwrap());
        args2[out_i] = tmp_out.display().to_string();
        let st = std::process::Command::new(crate::support::BIN)
            .arg("screenshot")
            .args(&args2)
            .current_dir(root)
            .env_remove("NO_COLOR")
            .output()
            .unwrap();
        assert!(
            st.status.success(),
            "{cmd}: {}",
            String::from_utf8_lossy(&st.stderr)
        );
        for ext in ["txt", "svg"] {
            let fresh = std::fs::read_to_string(format!("{}.{ext}", tmp_out.display())).unwrap();
            let committed =
                std::fs::read_to_string(root.join(format!("{name}.{ext}"))).unwrap_or_default();
            assert!(
                fresh == committed,
                "{name}.{ext} is stale: run `{line}` (see screenshots/README.md)"
            );
        }
        n += 1;
    }
    assert!(n >= 4, "screenshots/README.md lists {n} commands");
}

/// Splits a command line on spaces, keeping "double-quoted words" together.
fn split_args(s: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    for c in s.chars() {
        match c {
            '"' => quoted = !quoted,
            ' ' if !quoted => {
                if !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                }
            }
            _ => cur.push(c),
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

#[test]
fn the_detail_says_which_way_an_unsure_class_could_flip() {
    let mut app = demo();
    // pfk in the demo: far, with a 95 % interval that reaches the moderate band.
    keys(&mut app, "/ 'pfk' Enter");
    let text = screen(&app, 120, 48);
    assert!(
        text.contains("not sure: within 95 % it could be moderate"),
        "{text}"
    );
    // hxk is surely far: no such line.
    keys(&mut app, "/ 'hxk' Enter");
    let text = screen(&app, 120, 48);
    assert!(!text.contains("not sure:"), "{text}");
}

#[test]
fn a_step_that_runs_backward_is_marked_in_the_list_and_the_detail() {
    // f6p 0.35 -> 3.5 mM makes pgi run backward (dG' = +3.64 kJ/mol, see forward.rs).
    let mut app = demo();
    keys(&mut app, "Tab Down Down Enter '3.5 mM' Enter / 'pgi' Enter");
    let text = screen(&app, 120, 36);
    let pgi = text
        .lines()
        .find(|l| l.contains(" pgi "))
        .unwrap_or_else(|| panic!("{text}"));
    assert!(pgi.contains("⇄"), "{pgi}");
    assert!(
        text.contains("⇄ runs backward at these concentrations"),
        "{text}"
    );
    assert!(text.contains("reverse share none"), "{text}");
    let hxk = text.lines().find(|l| l.contains(" hxk ")).unwrap();
    assert!(!hxk.contains("⇄"), "{hxk}");
}

#[test]
fn the_compound_detail_gives_the_range_where_the_route_can_run() {
    let mut app = demo();
    keys(&mut app, "Tab Down Down");
    let text = screen(&app, 120, 36);
    assert!(text.contains("Compound detail"), "{text}");
    // The range is the one `dgpath mdf` prints for f6p (the same programme with B = 0).
    let f6p = ci(&app, "f6p");
    let m = mdf::solve_with_ranges(&app.prep, app.state()).unwrap();
    let (lo, hi) = m.feasible_ranges.as_ref().unwrap()[f6p];
    let want = format!(
        "the route can run for {}–{}",
        model::units::format_conc(lo, false),
        model::units::format_conc(hi, false)
    );
    assert!(text.contains(&want), "{want}\n{text}");
    // A carrier is held, and says so.
    keys(&mut app, "/ 'atp' Enter");
    let text = screen(&app, 120, 36);
    assert!(
        text.contains("held at 2.6 mM in the optimisation (a carrier"),
        "{text}"
    );
    assert_eq!(m.parts[ci(&app, "atp")], Part::Held);
}

#[test]
fn an_edit_the_analysis_refuses_is_never_applied_and_keeps_the_redo_history() {
    // 3e304 protons are harmless at the reference pH (no shift) but make
    // dG'° overflow two pH units away, which the analysis refuses.
    let text = crate::support::Pw::new("overflow")
        .temperature("30 C")
        .compounds(&["a", "b"], "1 mM")
        .step_with("s1", "a -> b", "-5 kJ/mol", &["protons = 3e304"])
        .text();
    let mut app = app_from(&text, Source::demo());
    keys(&mut app, "Tab +");
    let edited = app.state().clone();
    keys(&mut app, "u");
    let before = app.state().clone();
    assert_ne!(before, edited);
    keys(&mut app, "p 5 Enter");
    assert_eq!(app.state(), &before, "the refused pH is not applied");
    let status = screen(&app, 100, 30);
    assert!(status.contains("cannot apply"), "{status}");
    keys(&mut app, "C-r");
    assert_eq!(app.state(), &edited, "redo still has the undone edit");
}

#[test]
fn a_long_route_marks_its_optimum_out_of_date_until_the_background_answer_arrives() {
    // 2,000 steps: over the length optimised inside a key, so the solver runs apart.
    let text = dgpath::synthetic::route(2000);
    let src = Source {
        path: None,
        name: "long.toml".into(),
        text: text.clone(),
    };
    let mut app = app_from(&text, src);
    app.finish_idle_work();
    let settled = screen(&app, 120, 36);
    assert!(settled.contains("MDF +"), "{settled}");
    assert!(!settled.contains("solving"), "{settled}");
    // A key does not wait: the old optimum is shown, marked, and `o` says to wait.
    let atp = ci(&app, "atp");
    keys(&mut app, "Tab");
    app.comp_sel = atp;
    keys(&mut app, "+");
    let before = screen(&app, 120, 36);
    assert!(before.contains("(out of date, solving)"), "{before}");
    keys(&mut app, "o");
    assert!(
        app.status
            .as_ref()
            .is_some_and(|(m, _)| m.contains("still being solved")),
        "{:?}",
        app.status
    );
    // Once it arrives the mark goes and the optimum is that of the new state.
    app.finish_idle_work();
    let after = screen(&app, 120, 36);
    assert!(!after.contains("solving"), "{after}");
    assert_eq!(
        app.mdf,
        dgpath::scenario::optimum::LiveMdf::solve(&app.prep, app.state())
    );
}

/// Counts what is written to a terminal (shared, so it can be read while
/// the backend owns it).
#[derive(Clone, Default)]
struct Count(std::rc::Rc<std::cell::Cell<usize>>);

impl std::io::Write for Count {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        self.0.set(self.0.get() + b.len());
        Ok(b.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

#[test]
fn one_key_writes_under_two_kilobytes_to_the_terminal() {
    use ratatui::backend::CrosstermBackend;
    use ratatui::layout::Rect;
    use ratatui::{Terminal, TerminalOptions, Viewport};
    let mut a = demo();
    keys(&mut a, "Tab");
    let count = Count::default();
    let mut term = Terminal::with_options(
        CrosstermBackend::new(count.clone()),
        TerminalOptions {
            viewport: Viewport::Fixed(Rect::new(0, 0, 120, 36)),
        },
    )
    .unwrap();
    term.draw(|f| view::draw(f, &a)).unwrap();
    let first = count.0.get();
    keys(&mut a, "+");
    term.draw(|f| view::draw(f, &a)).unwrap();
    let second = count.0.get() - first;
    // The project's budget for one key over a slow remote link: 2 KB, where
    // the whole first frame is several times that (only changed cells are sent).
    assert!(second > 0 && second <= 2048, "{second} bytes for one '+'");
    assert!(first > 4 * second, "first frame {first}, one key {second}");
}

#[test]
fn an_explorer_can_be_shared_between_threads() {
    // Checked when compiling: the key fuzz target keeps an explorer in a
    // static (Sync), and the solver thread's channel must not break that.
    fn shareable<T: Send + Sync>() {}
    shareable::<App>();
}
