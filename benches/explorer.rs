//! Explorer speed, run by hand (`cargo bench --bench explorer`; divan).
//!
//! - `edit_frame`: one `+` or `-` on the selected compound → recompute →
//!   render 120×36 into a buffer: the demo (target ≤ 2 ms), a generated
//!   route at the longest length optimised inside the key (200 steps), and
//!   2,000 and 20,000 steps, which are optimised on the solver thread, so
//!   the key path is edit + recompute + render (targets ≤ 16 ms and ≤ 33 ms).
//! - `edit_until_optimum`: the same edit until the new optimum has arrived
//!   from the solver thread.
//! - `demo_at_optimum_range`: the flux control range computed between keys
//!   after one edit of the demo at its optimum (every step runs forward).
//! - `optimise` and `analyze` alone, at 2,000 steps.
//! - `first_frame`: parse, prepare, analyse and draw the demo into a
//!   terminal backend (target ≤ 50 ms).
//!
//! The bytes one key writes to a terminal are checked by a test
//! (`tests/explorer.rs`), not timed here.

use dgpath::analysis;
use dgpath::model;
use dgpath::report::EnergyUnit;
use dgpath::scenario::State;
use dgpath::tui::app::{App, Options, Source};
use dgpath::tui::{export, view};
use ratatui::backend::CrosstermBackend;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::layout::Rect;
use ratatui::{Terminal, TerminalOptions, Viewport};

fn main() {
    divan::main();
}

fn opts() -> Options {
    Options {
        ascii: false,
        color: true,
        unit: EnergyUnit::KJ,
    }
}

fn app(text: &str, name: &str) -> App {
    let p = model::load_str(text, name).expect("loads");
    let prep = analysis::prepare(p).expect("prepares");
    let st = State::from_pathway(&prep.pathway);
    let src = Source {
        path: None,
        name: name.into(),
        text: text.into(),
    };
    App::new(prep, st, src, opts()).expect("analyses")
}

/// The demo (0) or an invented linear route of `n` steps with currency coupling,
/// its first answer from the solver in, the concentrations pane focused.
fn ready(n: usize) -> App {
    let mut a = if n == 0 {
        app(dgpath::DEMO, dgpath::DEMO_NAME)
    } else {
        app(&dgpath::synthetic::route(n), "route.toml")
    };
    a.finish_idle_work();
    a.handle_key(KeyEvent::new(KeyCode::Tab, KeyModifiers::NONE));
    a
}

fn key(c: char) -> KeyEvent {
    KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE)
}

/// Route lengths: 0 is the demo; 200 the longest optimised inside the key.
const LENGTHS: [usize; 4] = [0, 200, 2_000, 20_000];

#[divan::bench(args = LENGTHS, sample_count = 40)]
fn edit_frame(bencher: divan::Bencher, n: usize) {
    let mut a = ready(n);
    let mut up = true;
    bencher.bench_local(|| {
        a.handle_key(key(if up { '+' } else { '-' }));
        up = !up;
        export::render_buffer(&a, 120, 36)
    });
    // Answers left in the channel are taken before the app is dropped.
    a.finish_idle_work();
}

#[divan::bench(args = [2_000, 20_000], sample_count = 10)]
fn edit_until_optimum(bencher: divan::Bencher, n: usize) {
    let mut a = ready(n);
    let mut up = true;
    bencher.bench_local(|| {
        a.handle_key(key(if up { '+' } else { '-' }));
        up = !up;
        a.finish_idle_work();
    });
}

#[divan::bench(sample_count = 10)]
fn demo_at_optimum_range(bencher: divan::Bencher) {
    let mut a = ready(0);
    a.handle_key(key('o'));
    a.finish_idle_work();
    assert!(a.analysis.control_estimate.coefficients.is_some());
    let mut up = true;
    bencher.bench_local(|| {
        a.handle_key(key(if up { '+' } else { '-' }));
        up = !up;
        a.finish_idle_work();
    });
}

#[divan::bench(sample_count = 20)]
fn optimise_2000(bencher: divan::Bencher) {
    let a = ready(2_000);
    bencher.bench_local(|| analysis::mdf::solve(&a.prep, a.state()).ok());
}

#[divan::bench(sample_count = 20)]
fn analyze_2000(bencher: divan::Bencher) {
    let a = ready(2_000);
    bencher.bench_local(|| analysis::analyze(&a.prep, a.state()).expect("analyses"));
}

#[divan::bench(sample_count = 20)]
fn first_frame(bencher: divan::Bencher) {
    bencher.bench_local(|| {
        let a = app(dgpath::DEMO, dgpath::DEMO_NAME);
        let mut term = Terminal::with_options(
            CrosstermBackend::new(std::io::sink()),
            TerminalOptions {
                viewport: Viewport::Fixed(Rect::new(0, 0, 120, 36)),
            },
        )
        .expect("terminal");
        term.draw(|f| view::draw(f, &a)).expect("draw");
    });
}
