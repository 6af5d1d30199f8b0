//! The headless outputs through the binary: every advertised format, what
//! each rendering carries, the table's width and columns, number formats,
//! names on screen, completions and the manual page, the starter file.

use crate::support::{path, run, texts};

fn chain() -> String {
    path("data/chain.toml").to_str().unwrap().to_string()
}

fn demo() -> String {
    path("../pathways/fermenter.toml")
        .to_str()
        .unwrap()
        .to_string()
}

/// stdout of a successful run.
fn ok(args: &[&str]) -> String {
    let out = run(args);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{args:?}: {err}");
    so
}

#[test]
fn completions_and_manual_come_from_the_clap_definitions() {
    let bash = ok(&["completions", "bash"]);
    assert!(bash.contains("_dgpath()"), "{bash}");
    for word in ["report", "mdf", "--energy-unit", "--samples"] {
        assert!(bash.contains(word), "bash completion lacks {word}");
    }
    let zsh = ok(&["completions", "zsh"]);
    assert!(zsh.starts_with("#compdef dgpath"), "{zsh}");
    let man = ok(&["manual"]);
    assert!(man.contains(".TH dgpath 1"), "{man}");
    assert!(man.contains(".TH dgpath-report 1"), "{man}");
    assert!(man.contains("energy\\-unit"), "{man}");
    let bad = run(&["completions", "cmd.exe"]);
    assert_eq!(bad.status.code(), Some(2));
}
