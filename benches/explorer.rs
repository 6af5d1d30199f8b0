//! Explorer speed, run by hand (`cargo bench --bench explorer`): one edit →
//! recompute (with the live driving-force optimisation) → render into a
//! buffer for the demo, for a generated route at the longest length still
//! optimised live, and for a generated 2,000-step route (not optimised
//! live); the optimisation alone; the bytes written to a terminal for one
//! `+` on a 120×36 screen; and the time from start to the first frame.
//! Targets: ≤ 2 ms, ≤ 16 ms, ≤ 2 KB, ≤ 50 ms.

use dgpath::analysis;
use dgpath::model;
use dgpath::report::EnergyUnit;
use dgpath::scenario::State;
use dgpath::tui::app::{App, Options, Source};
use dgpath::tui::export;
use dgpath::tui::view;
use ratatui::backend::CrosstermBackend;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::layout::Rect;
use ratatui::{Terminal, TerminalOptions, Viewport};
use std::cell::Cell;
use std::io::Write;
use std::rc::Rc;
use std::time::{Duration, Instant};

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

/// An invented linear route of `n` steps (c0 -> c1 -> ... -> cn) with currency coupling.
fn synthetic(n: usize) -> String {
    dgpath::synthetic::route(n)
}

/// A terminal writer that only counts bytes (shared, so it can be read while the backend owns it).
#[derive(Clone, Default)]
struct Count(Rc<Cell<usize>>);

impl Write for Count {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        self.0.set(self.0.get() + b.len());
        Ok(b.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

fn key(c: char) -> KeyEvent {
    KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE)
}

/// Median time of one `+` or `-` on the selected compound, recompute and render.
fn edit_render(app: &mut App, w: u16, h: u16, rounds: usize) -> Duration {
    app.handle_key(KeyEvent::new(KeyCode::Tab, KeyModifiers::NONE));
    let mut times = Vec::with_capacity(rounds);
    for r in 0..rounds {
        let t0 = Instant::now();
        app.handle_key(key(if r % 2 == 0 { '+' } else { '-' }));
        let buf = export::render_buffer(app, w, h);
        std::hint::black_box(&buf);
        times.push(t0.elapsed());
    }
    times.sort();
    times[rounds / 2]
}

fn main() {
    let mut demo = app(dgpath::DEMO, dgpath::DEMO_NAME);
    let d = edit_render(&mut demo, 120, 36, 400);
    println!(
        "demo: edit + recompute + render 120x36: {:.3} ms (target 2 ms)",
        d.as_secs_f64() * 1e3
    );

    // The demo at its optimum (key o): every step runs forward, so the flux
    // control estimate is computed on every edit; the range is computed
    // between keys in parts of IDLE_DRAWS draws.
    let mut opt = app(dgpath::DEMO, dgpath::DEMO_NAME);
    opt.handle_key(key('o'));
    opt.finish_idle_work();
    assert!(opt.analysis.control_estimate.coefficients.is_some());
    let d = edit_render(&mut opt, 120, 36, 400);
    println!(
        "demo at its optimum (estimate on every edit): edit + recompute + render 120x36: {:.3} ms (target 2 ms)",
        d.as_secs_f64() * 1e3
    );
    let mut parts = Vec::new();
    let t_all = Instant::now();
    opt.handle_key(key('+'));
    while opt.busy() {
        let t0 = Instant::now();
        opt.idle_work();
        parts.push(t0.elapsed());
    }
    let all = t_all.elapsed();
    parts.sort();
    println!(
        "  range between keys: {} parts of {} draws, longest part {:.3} ms, whole range {:.1} ms",
        parts.len(),
        dgpath::tui::app::IDLE_DRAWS,
        parts.last().map_or(0.0, |p| p.as_secs_f64() * 1e3),
        all.as_secs_f64() * 1e3
    );

    // The longest route still optimised within the key itself.
    let n = dgpath::tui::app::LIVE_MDF_SYNC_STEPS;
    let text = synthetic(n);
    let mut at_limit = app(&text, "limit.toml");
    let d = edit_render(&mut at_limit, 120, 36, 40);
    println!(
        "{n}-step route (longest optimised in the key): edit + recompute + optimise + render 120x36: {:.3} ms (target 16 ms)",
        d.as_secs_f64() * 1e3
    );

    // Longer routes: optimised in the background; the key path is edit +
    // recompute + render, and the optimum follows.
    for n in [2000, 20000] {
        let text = synthetic(n);
        let mut long = app(&text, "long.toml");
        long.finish_idle_work();
        let d = edit_render(&mut long, 120, 36, 40);
        let t0 = Instant::now();
        long.handle_key(key('+'));
        long.finish_idle_work();
        let settle = t0.elapsed();
        println!(
            "{n}-step route (optimised in the background): edit + recompute + render 120x36: {:.3} ms (target {} ms); edit until the new optimum is in: {:.1} ms",
            d.as_secs_f64() * 1e3,
            if n <= 2000 { 16 } else { 33 },
            settle.as_secs_f64() * 1e3
        );
    }

    let text = synthetic(2000);
    let mut long = app(&text, "long.toml");
    long.finish_idle_work();
    let t0 = Instant::now();
    for _ in 0..10 {
        std::hint::black_box(analysis::analyze(&long.prep, long.state()).unwrap());
    }
    println!(
        "  of which analyze alone: {:.3} ms",
        t0.elapsed().as_secs_f64() * 1e2
    );
    let t0 = Instant::now();
    for _ in 0..10 {
        std::hint::black_box(dgpath::analysis::mdf::solve(&long.prep, long.state()).ok());
    }
    println!(
        "  driving-force optimisation alone (2000 steps): {:.3} ms",
        t0.elapsed().as_secs_f64() * 1e2
    );
    let t0 = Instant::now();
    for _ in 0..100 {
        std::hint::black_box(dgpath::analysis::mdf::solve(&demo.prep, demo.state()).ok());
    }
    println!(
        "  driving-force optimisation alone (demo): {:.3} ms",
        t0.elapsed().as_secs_f64() * 10.0
    );
    let t0 = Instant::now();
    for _ in 0..10 {
        std::hint::black_box(export::render_buffer(&long, 120, 36));
    }
    println!(
        "  of which render alone: {:.3} ms",
        t0.elapsed().as_secs_f64() * 1e2
    );

    // Bytes to the terminal for one `+`: draw twice, count the second.
    let mut a = app(dgpath::DEMO, dgpath::DEMO_NAME);
    a.handle_key(KeyEvent::new(KeyCode::Tab, KeyModifiers::NONE));
    let count = Count::default();
    let mut term = Terminal::with_options(
        CrosstermBackend::new(count.clone()),
        TerminalOptions {
            viewport: Viewport::Fixed(Rect::new(0, 0, 120, 36)),
        },
    )
    .expect("terminal");
    term.draw(|f| view::draw(f, &a)).expect("draw");
    let first = count.0.get();
    a.handle_key(key('+'));
    term.draw(|f| view::draw(f, &a)).expect("draw");
    let second = count.0.get() - first;
    println!("bytes for one '+' on 120x36: {second} (first frame {first}; target 2048)");

    // Start to first frame: parse, prepare, analyse, draw into a terminal backend.
    let mut best = Duration::MAX;
    for _ in 0..20 {
        let t0 = Instant::now();
        let a = app(dgpath::DEMO, dgpath::DEMO_NAME);
        let backend = CrosstermBackend::new(Count::default());
        let mut term = Terminal::with_options(
            backend,
            TerminalOptions {
                viewport: Viewport::Fixed(Rect::new(0, 0, 120, 36)),
            },
        )
        .expect("terminal");
        term.draw(|f| view::draw(f, &a)).expect("draw");
        best = best.min(t0.elapsed());
    }
    println!(
        "start to first frame (demo): {:.3} ms (target 50 ms)",
        best.as_secs_f64() * 1e3
    );
}
