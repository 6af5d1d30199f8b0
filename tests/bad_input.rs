//! Bad input through the binary: every fixture in tests/bad/ holds one mistake
//! and says in its first lines what the message must contain (`# expect:`),
//! and where (`# line:`, `# column:`). Each must exit 1 with that message,
//! naming the file, and never panic.

use crate::support::{path, run, texts};
use std::path::Path;

struct Expect {
    phrases: Vec<String>,
    line: Option<usize>,
    column: Option<usize>,
}

fn expectations(file: &Path) -> Expect {
    let text = std::fs::read_to_string(file).unwrap();
    let mut e = Expect {
        phrases: Vec::new(),
        line: None,
        column: None,
    };
    for l in text.lines().take_while(|l| l.starts_with('#')) {
        if let Some(p) = l.strip_prefix("# expect: ") {
            e.phrases.push(p.to_string());
        } else if let Some(n) = l.strip_prefix("# line: ") {
            e.line = Some(n.trim().parse().unwrap());
        } else if let Some(n) = l.strip_prefix("# column: ") {
            e.column = Some(n.trim().parse().unwrap());
        }
    }
    assert!(
        !e.phrases.is_empty(),
        "{} has no '# expect:' line",
        file.display()
    );
    e
}

fn check_fixture(file: &Path) -> Result<(), String> {
    let e = expectations(file);
    let arg = file.to_str().unwrap();
    let out = run(&["check", arg]);
    let (_, err) = texts(&out);
    let mut why = Vec::new();
    if out.status.code() != Some(1) {
        why.push(format!("exit code {:?}, want 1", out.status.code()));
    }
    if err.contains("panicked") {
        why.push("panicked".into());
    }
    if !err.contains(arg) {
        why.push("the message does not name the file".into());
    }
    for p in &e.phrases {
        if !err.contains(p.as_str()) {
            why.push(format!("missing phrase {p:?}"));
        }
    }
    if let Some(l) = e.line {
        let at = match e.column {
            Some(c) => format!("{arg}:{l}:{c}:"),
            None => format!("{arg}:{l}:"),
        };
        if !err.contains(&at) {
            why.push(format!("no {at:?}"));
        }
    }
    if why.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "{}: {}\n  stderr: {err}",
            file.display(),
            why.join("; ")
        ))
    }
}

#[test]
fn every_bad_fixture_is_refused_with_its_message() {
    let mut files: Vec<_> = std::fs::read_dir(path("bad"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    files.sort();
    // The list of mistakes the brief requires; each has its own fixture.
    for name in [
        "toml_syntax",
        "unknown_compound",
        "bare_temperature",
        "hplus",
        "missing_conc",
        "zero_conc",
        "negative_conc",
        "duplicate_step",
        "duplicate_compound",
        "both_dg0_keq",
        "neither_dg0_keq",
        "unbalanceable",
        "unknown_unit",
        "unknown_field",
        "zero_coefficient",
        "negative_coefficient",
        "both_sides",
        "route_unknown_step",
        "couple_unknown_step",
        "bypass_unknown_step",
        "format_missing",
        "format_wrong",
        "keq_zero",
        "keq_negative",
        "couple_unequal_turns",
        "dg0_open",
        "conc_open",
        "number_id",
    ] {
        assert!(
            files.iter().any(|f| f.file_stem().unwrap() == name),
            "missing fixture tests/bad/{name}.toml"
        );
    }
    let failures: Vec<String> = files
        .iter()
        .filter_map(|f| check_fixture(f).err())
        .collect();
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn syntax_error_gives_line_and_column() {
    let f = path("bad/toml_syntax.toml");
    let e = expectations(&f);
    assert!(e.line.is_some() && e.column.is_some());
    check_fixture(&f).unwrap();
}

#[test]
fn report_refuses_bad_files_too() {
    // The same loader stands behind report: exit 1, the same message.
    let f = path("bad/unknown_compound.toml");
    let out = run(&["report", f.to_str().unwrap()]);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    assert!(so.is_empty(), "nothing on stdout: {so}");
    assert!(
        err.contains("unknown compound 'glx'") && err.contains("did you mean 'glc'"),
        "{err}"
    );
}

#[test]
fn several_mistakes_are_all_reported() {
    // check prints every problem, in file order.
    let text = std::fs::read_to_string(path("bad/unknown_field.toml"))
        .unwrap()
        .replace("conc = \"80 uM\"", "conc = \"80 mg\"");
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("two.toml");
    std::fs::write(&f, text).unwrap();
    let out = run(&["check", f.to_str().unwrap()]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    let unit = err.find("unknown unit 'mg'").expect(&err);
    let field = err.find("unknown field 'enzym'").expect(&err);
    assert!(unit < field, "file order: {err}");
}

#[test]
fn directory_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let out = run(&["check", dir.path().to_str().unwrap()]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    assert!(err.contains("is a folder"), "{err}");
    assert!(!err.contains("panicked"));
}

#[test]
fn non_utf8_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("latin1.toml");
    // "format = 1\n[pathway]\nname = \"caf\xe9\"" in Latin-1: byte 0xE9 is not UTF-8 here.
    let mut bytes = b"format = 1\n[pathway]\nname = \"caf".to_vec();
    bytes.push(0xE9);
    bytes.extend_from_slice(b"\"\n");
    std::fs::write(&f, bytes).unwrap();
    let out = run(&["check", f.to_str().unwrap()]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        err.contains("latin1.toml")
            && err.contains("not UTF-8")
            && err.contains("offset 32")
            && err.contains("latin1.toml:3:"),
        "{err}"
    );
    assert!(!err.contains("panicked"));
}

#[test]
fn empty_file_is_refused_with_what_is_missing() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("empty.toml");
    std::fs::write(&f, "").unwrap();
    let out = run(&["check", f.to_str().unwrap()]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    for want in [
        "missing 'format'",
        "missing [pathway]",
        "missing [conditions]",
        "missing [compounds]",
        "no [[steps]]",
    ] {
        assert!(err.contains(want), "{want}: {err}");
    }
}
