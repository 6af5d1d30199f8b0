//! Any sequence of key presses in the explorer on the bundled demo, with the
//! screen drawn every few keys at a size taken from the input (20x6 up to
//! 200x60): no key and no screen size may panic, and the selections must
//! stay on existing rows.
//!
//! Input bytes: the first picks the drawing options (ASCII, colour, energy
//! unit); then a byte below `KEYS.len()` is a key press, any other byte
//! draws the screen at a size read from the next two bytes. The screen is
//! also drawn after every eighth key and at the end. Quitting (`q q`, or
//! Ctrl-c) ends the sequence, as it ends the explorer.
//!
//! Saving never touches a file: the app is built from `Source::demo()`,
//! whose `path` is None, so `s` only shows a message saying the demo has no
//! file to save into (`App::save` returns before any write). The disk is not
//! polled either, so no file is read.
#![no_main]

use dgpath::analysis;
use dgpath::model;
use dgpath::report::EnergyUnit;
use dgpath::scenario::State;
use dgpath::tui::app::{App, Mode, Options, Source, Target};
use dgpath::tui::export::render_buffer;
use libfuzzer_sys::fuzz_target;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use std::sync::OnceLock;

const fn plain(code: KeyCode) -> (KeyCode, KeyModifiers) {
    (code, KeyModifiers::NONE)
}

const fn ch(c: char) -> (KeyCode, KeyModifiers) {
    plain(KeyCode::Char(c))
}

/// Every key the explorer knows, plus the characters typed into the edit
/// and find lines (numbers, units, compound ids) and a few it ignores.
const KEYS: &[(KeyCode, KeyModifiers)] = &[
    ch('q'),
    ch('?'),
    plain(KeyCode::Tab),
    (KeyCode::BackTab, KeyModifiers::SHIFT),
    plain(KeyCode::Up),
    plain(KeyCode::Down),
    ch('j'),
    ch('k'),
    plain(KeyCode::Enter),
    plain(KeyCode::Esc),
    ch('+'),
    ch('='),
    ch('-'),
    ch('>'),
    ch('<'),
    ch('/'),
    ch('t'),
    ch('p'),
    ch('i'),
    ch('r'),
    ch('w'),
    ch('u'),
    (KeyCode::Char('r'), KeyModifiers::CONTROL),
    ch('s'),
    ch('o'),
    ch('['),
    ch(']'),
    ch('y'),
    ch('n'),
    ch('.'),
    ch(' '),
    plain(KeyCode::Backspace),
    plain(KeyCode::PageUp),
    plain(KeyCode::PageDown),
    plain(KeyCode::Left),
    plain(KeyCode::Right),
    plain(KeyCode::Home),
    plain(KeyCode::End),
    (KeyCode::Char('c'), KeyModifiers::CONTROL),
    (KeyCode::Char('z'), KeyModifiers::CONTROL),
    ch('0'),
    ch('1'),
    ch('2'),
    ch('3'),
    ch('4'),
    ch('5'),
    ch('6'),
    ch('7'),
    ch('8'),
    ch('9'),
    ch('a'),
    ch('b'),
    ch('c'),
    ch('d'),
    ch('e'),
    ch('f'),
    ch('g'),
    ch('h'),
    ch('l'),
    ch('m'),
    ch('v'),
    ch('x'),
    ch('z'),
    ch('C'),
    ch('K'),
    ch('M'),
    ch('Y'),
    ch('E'),
    ch('_'),
    ch(','),
    ch('µ'),
    ch('°'),
];

/// The demo, loaded and prepared once; each run clones it.
fn base() -> &'static App {
    static APP: OnceLock<App> = OnceLock::new();
    APP.get_or_init(|| {
        let source = Source::demo();
        let p = model::load_str(dgpath::DEMO, &source.name).expect("demo loads");
        let prep = analysis::prepare(p).expect("demo prepares");
        let state = State::from_pathway(&prep.pathway);
        App::new(prep, state, source, Options::default()).expect("demo analyses")
    })
}

fn draw(app: &App, (w, h): (u16, u16)) {
    let buf = render_buffer(app, w, h);
    assert_eq!(buf.area.width, w);
}

fn check(app: &App) {
    assert!(app.source.path.is_none(), "the demo gained a file");
    assert!(
        app.comp_sel < app.pathway().compounds.len(),
        "comp_sel {}",
        app.comp_sel
    );
    let rows = app.step_rows();
    assert!(
        rows == 0 || app.step_sel < rows,
        "step_sel {} of {rows}",
        app.step_sel
    );
}

fuzz_target!(|data: &[u8]| {
    let Some((&first, rest)) = data.split_first() else {
        return;
    };
    let mut app = base().clone();
    app.opts = Options {
        ascii: first & 1 != 0,
        color: first & 2 != 0,
        unit: if first & 4 != 0 {
            EnergyUnit::Kcal
        } else {
            EnergyUnit::KJ
        },
    };
    let mut size = (80, 24);
    let mut bytes = rest.iter().copied();
    let mut since_draw = 0;
    while let Some(b) = bytes.next() {
        if let Some(&(code, mods)) = KEYS.get(b as usize) {
            // The built-in demo's `s` asks for a file name to write it to;
            // Enter there would write a file, so the fuzzer answers Esc.
            let writing = matches!(
                app.mode,
                Mode::Edit {
                    target: Target::FileName,
                    ..
                }
            );
            let code = if writing && code == KeyCode::Enter {
                KeyCode::Esc
            } else {
                code
            };
            app.handle_key(KeyEvent::new(code, mods));
            check(&app);
            if app.quit {
                break;
            }
            since_draw += 1;
            if since_draw == 8 {
                draw(&app, size);
                since_draw = 0;
            }
        } else {
            let w = bytes.next().unwrap_or(60);
            let h = bytes.next().unwrap_or(20);
            size = (20 + u16::from(w) % 181, 6 + u16::from(h) % 55);
            draw(&app, size);
            since_draw = 0;
        }
    }
    draw(&app, size);
});
