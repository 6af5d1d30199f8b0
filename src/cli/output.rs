//! Writing to standard output: colour only on a terminal, a closed pipe ends
//! quietly.

use anyhow::{Context, Result};
use std::io::{IsTerminal, Write};

/// True when stdout is a terminal and NO_COLOR is not set.
pub fn colour_ok() -> bool {
    std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// Writes to stdout; a closed pipe ends quietly.
pub fn emit(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        r => r.context("writing to stdout"),
    }
}

/// True for the error of writing into a closed pipe.
pub fn is_broken_pipe(e: &std::io::Error) -> bool {
    e.kind() == std::io::ErrorKind::BrokenPipe
}

/// Writes `value` as pretty JSON and a line end straight to stdout (no
/// copy of the whole document in memory); a closed pipe ends quietly.
pub fn emit_json<T: serde::Serialize>(value: &T) -> Result<()> {
    let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
    let written = serde_json::to_writer_pretty(&mut out, value)
        .map_err(std::io::Error::from)
        .and_then(|_| out.write_all(b"\n"))
        .and_then(|_| out.flush());
    match written {
        Err(e) if is_broken_pipe(&e) => Ok(()),
        r => r.context("writing to stdout"),
    }
}
