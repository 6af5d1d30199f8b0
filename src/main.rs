//! The `dgpath` binary: parse arguments, run, map errors to exit codes
//! (0 ok, 1 bad input, 2 usage).

// No unwrap or expect: every failure becomes a message and an exit code.
#![deny(clippy::unwrap_used, clippy::expect_used)]

mod cli;

use clap::Parser;

/// mimalloc: the loader builds many small strings and tables; glibc's
/// allocator spent about a fifth of a large report in malloc, free and
/// fresh-page faults.
#[global_allocator]
static ALLOC: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    let cli = match cli::Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            std::process::exit(code);
        }
    };
    if let Err(e) = cli::run(cli) {
        eprintln!("error: {e:#}");
        std::process::exit(1);
    }
}
