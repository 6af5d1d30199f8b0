//! Writes an invented route (see `dgpath::synthetic`) to standard output, for
//! timing whole processes against the reference scripts in
//! benches/reference/:
//!
//!     cargo run --release --example synthetic -- route 5000 > route5000.toml
//!     cargo run --release --example synthetic -- chain 1000 carrier > chain1000.toml

use std::io::Write;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let n = args.get(1).and_then(|v| v.parse().ok());
    let text = match (args.first().map(String::as_str), n) {
        (Some("route"), Some(n)) => dgpath::synthetic::route(n),
        (Some("chain"), Some(n)) => {
            dgpath::synthetic::chain(n, args.get(2).is_some_and(|a| a == "carrier"))
        }
        _ => {
            eprintln!("usage: synthetic route N | synthetic chain N [carrier]");
            std::process::exit(2);
        }
    };
    if std::io::stdout().write_all(text.as_bytes()).is_err() {
        std::process::exit(1);
    }
}
