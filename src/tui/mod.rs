//! The terminal explorer: tune concentrations and conditions and watch every
//! step's numbers, classes, verdicts and the energy ladder change in the same
//! frame. Elm pattern: `app::App` is the state, `app::Message` what can
//! happen, `App::update` the one place of change (it recomputes the
//! `Analysis` and the driving-force optimisation when the scenario
//! changed), `view::render` a pure drawing.
//!
//! Module map: `app` (state, messages, update), `keys` (keys → messages,
//! key scripts), `edit` (the edit line), `find`, `nav` (moving the
//! selection, walking the route), `sample` (stepping through samples),
//! `optimum` (the live MDF), `disk` (saving and reloading through
//! `scenario::save`), `view` (panes, energy ladder, status line and key
//! overlay, one file each), `export` (buffer → text / SVG for screenshots).
//! This file owns the terminal: the `IsTerminal` check, init and restore
//! (on quit, error and panic) and the event loop, which redraws only when
//! something changed and polls the file on disk about every 500 ms.

pub mod app;
pub mod disk;
pub mod edit;
pub mod export;
pub mod find;
pub mod keymap;
pub mod keys;
pub mod message;
pub mod nav;
pub mod sample;
pub mod view;

pub use app::{App, Message, Options, Source};

use ratatui::crossterm::event::{self, Event};
use std::io::IsTerminal;
use std::time::{Duration, Instant};

/// How often the file on disk is checked for outside changes.
pub const POLL: Duration = Duration::from_millis(500);

/// How often an answer of the background solver is looked for while one is awaited.
pub const SOLVER_LOOK: Duration = Duration::from_millis(4);

/// Why the explorer could not run.
#[derive(Debug, thiserror::Error)]
pub enum TuiError {
    /// Standard output or input is not a terminal.
    #[error(
        "the explorer needs a terminal, but standard {0} is not one (piped or redirected); use `dgpath report FILE` for text output"
    )]
    NotTerminal(&'static str),
    /// The terminal failed (the I/O error follows as the source).
    #[error("terminal error")]
    Io(#[from] std::io::Error),
}

/// True when both standard input and output are terminals.
pub fn is_terminal() -> bool {
    std::io::stdout().is_terminal() && std::io::stdin().is_terminal()
}

/// Restores the terminal when dropped (normal exit, error or unwinding panic).
struct Restore;

impl Drop for Restore {
    fn drop(&mut self) {
        ratatui::restore();
    }
}

/// Runs the explorer until the person quits.
pub fn run(mut app: App) -> Result<(), TuiError> {
    if !std::io::stdout().is_terminal() {
        return Err(TuiError::NotTerminal("output"));
    }
    if !std::io::stdin().is_terminal() {
        return Err(TuiError::NotTerminal("input"));
    }
    // try_init installs a panic hook that restores the terminal before the message prints.
    let mut terminal = ratatui::try_init()?;
    let _restore = Restore;
    let mut redraw = true;
    let mut last_poll = Instant::now();
    loop {
        if redraw {
            terminal.draw(|f| view::draw(f, &app))?;
            redraw = false;
        }
        // Work left between keys (the flux control range) polls without
        // waiting; an answer awaited from the background solver is looked
        // for every few milliseconds.
        let wait = if app.busy() {
            Duration::ZERO
        } else if app.optimum_waiting() {
            SOLVER_LOOK.min(POLL.saturating_sub(last_poll.elapsed()))
        } else {
            POLL.saturating_sub(last_poll.elapsed())
        };
        if event::poll(wait)? {
            match event::read()? {
                Event::Key(k) => redraw |= app.handle_key(k),
                Event::Resize(..) => redraw = true,
                _ => {}
            }
        } else if app.busy() {
            redraw |= app.idle_work();
        }
        redraw |= app.receive();
        if app.quit {
            break;
        }
        if last_poll.elapsed() >= POLL {
            redraw |= app.poll_disk();
            last_poll = Instant::now();
        }
    }
    Ok(())
}
