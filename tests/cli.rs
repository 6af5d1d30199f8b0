//! The command line through the binary: the JSON contract of cli.md on a
//! hand-computed file, the shared options, the other formats, check, new, the
//! bare command, exit codes and a closed pipe.
//!
//! tests/data/chain.toml, worked by hand at 25 °C (RT = 2.478957 kJ/mol,
//! RT ln 10 = 5.708010 kJ/mol, science.md §1 [C]):
//!   s1 a -> b, dG'° −5:  Q = 0.1/1 = 0.1,  dG' = −5 − 5.708010 = −10.708010 (far, ≤ −10)
//!                        K' = e^(5/RT) = 7.515573, J+/J− = K'/Q = 75.15573
//!   s2 b -> c, dG'° +2:  Q = 0.01/0.1 = 0.1, dG' = 2 − 5.708010 = −3.708010 (near, |dG'| ≤ 5.708)
//!                        K' = e^(−2/RT) = 0.4462879, J+/J− = 4.462879
//!   total dG'° −3, dG' −14.416020; cumulative −10.708010, −14.416020;
//!   share 10.708010/14.416020 = 0.742785 and 0.257215; group s1+s2 dG' −14.416020;
//!   net a −1, c +1; largest drop s1; control: s1 prime (not last, b is no branch point).

use crate::support::{Pw, close, dgpath, path, run, texts};
use serde_json::Value;
use std::io::Read;
use std::process::Stdio;

fn chain() -> String {
    path("data/chain.toml").to_str().unwrap().to_string()
}

fn json(args: &[&str]) -> Value {
    let out = run(args);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    serde_json::from_str(&so).unwrap_or_else(|e| panic!("{e}: {so}"))
}

fn report_json(extra: &[&str]) -> Value {
    let c = chain();
    let mut args = vec!["report", c.as_str(), "--format", "json"];
    args.extend_from_slice(extra);
    json(&args)
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn json_has_the_documented_fields_and_types() {
    let d = report_json(&[]);
    let o = d.as_object().unwrap();
    for k in [
        "pathway",
        "direction",
        "energy_unit",
        "conditions",
        "steps",
        "groups",
        "total",
        "net",
        "largest_drop",
        "control",
    ] {
        assert!(o.contains_key(k), "missing top-level field {k}");
    }
    assert!(d["pathway"].is_string() && d["direction"].is_string() && d["energy_unit"].is_string());
    assert!(d["conditions"].is_object() && d["steps"].is_array() && d["groups"].is_array());
    assert!(d["total"].is_object() && d["net"].is_object() && d["control"].is_array());
    for k in ["temperature_k", "ph", "ionic_strength_m", "rt"] {
        assert!(d["conditions"][k].is_number(), "conditions.{k}");
    }
    let step_fields = [
        "id",
        "enzyme",
        "reaction",
        "times",
        "dg0",
        "dg",
        "dg_sd",
        "keq",
        "q",
        "flux_ratio",
        "class",
        "cumulative",
        "share",
    ];
    for s in d["steps"].as_array().unwrap() {
        for k in step_fields {
            assert!(s.get(k).is_some(), "missing step field {k}");
        }
        for k in ["id", "enzyme", "reaction", "class"] {
            assert!(s[k].is_string(), "{k} is text");
        }
        for k in [
            "times",
            "dg0",
            "dg",
            "keq",
            "q",
            "flux_ratio",
            "cumulative",
            "share",
        ] {
            assert!(
                s[k].is_f64(),
                "{k} is a number written as a float: {}",
                s[k]
            );
        }
        assert!(s["dg_sd"].is_null(), "no uncertainty given");
    }
    let g = &d["groups"][0];
    assert!(g["steps"].is_array() && g["dg"].is_number());
    assert!(d["total"]["dg0"].is_number() && d["total"]["dg"].is_number());
    let v = &d["control"][0];
    assert!(v["step"].is_string() && v["verdict"].is_string() && v["reasons"].is_array());
    assert!(v["reasons"][0].is_string());
}

#[test]
fn json_values_match_the_hand_computation() {
    let d = report_json(&[]);
    assert_eq!(d["pathway"], "Hand chain");
    assert_eq!(d["direction"], "forward");
    assert_eq!(d["energy_unit"], "kJ/mol");
    close(f(&d["conditions"]["temperature_k"]), 298.15, 1e-9);
    close(f(&d["conditions"]["ph"]), 7.0, 0.0);
    close(f(&d["conditions"]["ionic_strength_m"]), 0.0, 0.0);
    close(f(&d["conditions"]["rt"]), 2.478957, 1e-6);
    let s = d["steps"].as_array().unwrap();
    assert_eq!(s.len(), 2);
    let want = [
        (
            "s1", "first", "a -> b", -5.0, -10.708010, 7.515573, 0.1, 75.15573, "far", -10.708010,
            0.742785,
        ),
        (
            "s2", "second", "b -> c", 2.0, -3.708010, 0.4462879, 0.1, 4.462879, "near", -14.416020,
            0.257215,
        ),
    ];
    for (s, (id, enz, rx, dg0, dg, keq, q, fr, class, cum, share)) in s.iter().zip(want) {
        assert_eq!(s["id"], id);
        assert_eq!(s["enzyme"], enz);
        assert_eq!(s["reaction"], rx);
        close(f(&s["times"]), 1.0, 0.0);
        close(f(&s["dg0"]), dg0, 1e-9);
        close(f(&s["dg"]), dg, 1e-6);
        close(f(&s["keq"]), keq, 1e-6 * keq);
        close(f(&s["q"]), q, 1e-12);
        close(f(&s["flux_ratio"]), fr, 1e-6 * fr);
        assert_eq!(s["class"], class);
        close(f(&s["cumulative"]), cum, 1e-6);
        close(f(&s["share"]), share, 1e-6);
    }
    assert_eq!(d["groups"][0]["steps"], serde_json::json!(["s1", "s2"]));
    close(f(&d["groups"][0]["dg"]), -14.416020, 1e-6);
    close(f(&d["total"]["dg0"]), -3.0, 1e-9);
    close(f(&d["total"]["dg"]), -14.416020, 1e-6);
    assert_eq!(d["net"], serde_json::json!({ "a": -1.0, "c": 1.0 }));
    assert_eq!(d["largest_drop"], "s1");
    assert_eq!(d["control"].as_array().unwrap().len(), 1);
    assert_eq!(d["control"][0]["step"], "s1");
    assert_eq!(d["control"][0]["verdict"], "control_point");
}

#[test]
fn json_flux_force_fields() {
    // science.md §6 [C]: reverse share e^{dG'/RT}, enzyme factor 1/(1 − e^{dG'/RT}).
    // s1: dG' = −10.708010 = −RT ln 75.15573 -> share 1/75.15573 = 0.0133057, factor 1.0134852.
    let d = report_json(&[]);
    let s1 = &d["steps"][0];
    close(f(&s1["reverse_share"]), 1.0 / 75.15573, 1e-7);
    close(f(&s1["enzyme_factor"]), 1.0 / (1.0 - 1.0 / 75.15573), 1e-7);
}

#[test]
fn set_changes_a_concentration() {
    // b = 1 mM: s1 Q = 1 -> dG' = −5 (near: |−5| ≤ 5.708); s2 Q = 0.01 -> 2 − 2 × 5.708010 = −9.416020 (moderate).
    let d = report_json(&["--set", "b=1mM"]);
    close(f(&d["steps"][0]["dg"]), -5.0, 1e-6);
    assert_eq!(d["steps"][0]["class"], "near");
    close(f(&d["steps"][1]["dg"]), -9.416020, 1e-6);
    assert_eq!(d["steps"][1]["class"], "moderate");
    assert_eq!(d["control"].as_array().unwrap().len(), 0);
    // Units are accepted with or without a space, repeated --set all apply.
    let d = report_json(&["--set", "b=1 mM", "--set", "c=100uM"]);
    close(f(&d["steps"][1]["q"]), 0.1, 1e-12);
}

#[test]
fn temperature_option_moves_rt() {
    // 37 °C: RT = 2.578731 kJ/mol; no dh0, so dG'° stays −5 and s1 dG' = −5 − 5.937747 = −10.937747.
    let d = report_json(&["--temperature", "37 C"]);
    close(f(&d["conditions"]["temperature_k"]), 310.15, 1e-9);
    close(f(&d["conditions"]["rt"]), 2.578731, 1e-6);
    close(f(&d["steps"][0]["dg0"]), -5.0, 1e-9);
    close(f(&d["steps"][0]["dg"]), -10.937747, 1e-6);
    let notes = d["notes"].as_array().unwrap();
    assert!(
        notes.iter().any(|n| n.as_str().unwrap().contains("kept")),
        "{notes:?}"
    );
    let d = report_json(&["--temperature", "310.15 K"]);
    close(f(&d["conditions"]["rt"]), 2.578731, 1e-6);
    // A bare number is an input error (exit 1), as in the file.
    let c = chain();
    let out = run(&["report", &c, "--temperature", "37"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(texts(&out).1.contains("needs a unit"));
}

#[test]
fn ph_option_uses_protons() {
    // s1 releases one H+: pH 7.5 moves dG'° by −0.5 × 5.708010 -> −7.854005; dG' −13.562014 (science.md §4 [C]).
    let d = report_json(&["--ph", "7.5"]);
    close(f(&d["conditions"]["ph"]), 7.5, 0.0);
    close(f(&d["steps"][0]["dg0"]), -7.854005, 1e-6);
    close(f(&d["steps"][0]["dg"]), -13.562014, 1e-6);
    // s2 has no protons: unchanged.
    close(f(&d["steps"][1]["dg0"]), 2.0, 1e-9);
}

#[test]
fn reverse_option_runs_the_route_backward() {
    // Reverse: s2 then s1, signs flipped: s2 +3.708010 (near), s1 +10.708010 (uphill, no bypass).
    let d = report_json(&["--reverse"]);
    assert_eq!(d["direction"], "reverse");
    let ids: Vec<&str> = d["steps"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["id"].as_str().unwrap())
        .collect();
    assert_eq!(ids, ["s2", "s1"]);
    assert_eq!(d["steps"][0]["reaction"], "c -> b");
    close(f(&d["steps"][0]["dg0"]), -2.0, 1e-9);
    close(f(&d["steps"][0]["dg"]), 3.708010, 1e-6);
    close(f(&d["steps"][1]["dg"]), 10.708010, 1e-6);
    assert_eq!(d["steps"][1]["class"], "uphill");
    close(f(&d["steps"][1]["keq"]), 1.0 / 7.515573, 1e-6);
    assert_eq!(d["net"], serde_json::json!({ "a": 1.0, "c": -1.0 }));
    assert_eq!(d["needs_bypass"][0]["step"], "s1");
    close(f(&d["needs_bypass"][0]["lacks"]), 10.708010, 1e-6);
    assert!(d["largest_drop"].is_null(), "nothing goes down");
    assert_eq!(d["groups"][0]["steps"], serde_json::json!(["s2", "s1"]));
}

#[test]
fn reverse_glycolysis_through_the_binary() {
    let g = path("data/glycolysis_reverse.toml");
    let d = json(&[
        "report",
        g.to_str().unwrap(),
        "--reverse",
        "--format",
        "json",
    ]);
    assert_eq!(d["direction"], "reverse");
    assert_eq!(d["needs_bypass"].as_array().unwrap().len(), 0);
    let bp = d["bypasses"].as_array().unwrap();
    let mine: Vec<(&str, &str, bool)> = bp
        .iter()
        .map(|b| {
            (
                b["step"].as_str().unwrap(),
                b["replaces"].as_str().unwrap(),
                b["counterpart"].as_bool().unwrap(),
            )
        })
        .collect();
    assert_eq!(
        mine,
        [
            ("pc", "pk", false),
            ("pepck", "pk", false),
            ("fbpase", "pfk", true),
            ("g6pase", "hk", false)
        ]
    );
    assert!(f(&d["net"]["atp"]) < 0.0 && f(&d["net"]["gtp"]) < 0.0);
}

#[test]
fn csv_and_markdown_are_parseable() {
    let c = chain();
    let out = run(&["report", &c, "--format", "csv"]);
    assert_eq!(out.status.code(), Some(0));
    let mut r = csv::Reader::from_reader(out.stdout.as_slice());
    let head: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let col = |n: &str| {
        head.iter()
            .position(|h| h == n)
            .unwrap_or_else(|| panic!("no column {n}: {head:?}"))
    };
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), 2);
    assert_eq!(&rows[0][col("step")], "s1");
    close(
        rows[0][col("dg [kJ/mol]")].parse().unwrap(),
        -10.708010,
        1e-6,
    );
    close(
        rows[1][col("cumulative [kJ/mol]")].parse().unwrap(),
        -14.416020,
        1e-6,
    );
    assert_eq!(&rows[1][col("class")], "near");

    let out = run(&["report", &c, "--format", "md"]);
    assert_eq!(out.status.code(), Some(0));
    let md = String::from_utf8(out.stdout).unwrap();
    let table: Vec<&str> = md.lines().filter(|l| l.starts_with('|')).collect();
    // Header, separator, two steps; every row has the same number of cells.
    assert_eq!(table.len(), 4, "{md}");
    let cells = table[0].matches('|').count();
    assert!(
        table.iter().all(|l| l.matches('|').count() == cells),
        "{md}"
    );
    assert!(
        table[2].contains("s1") && table[2].contains("-10.7") && table[2].contains("control point"),
        "{md}"
    );

    let out = run(&["report", &c]);
    assert_eq!(out.status.code(), Some(0));
    let t = String::from_utf8(out.stdout).unwrap();
    assert!(t.contains("-10.7") && t.contains("-14.4"), "{t}");
}

#[test]
fn check_accepts_a_good_file() {
    let c = chain();
    let out = run(&["check", &c]);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    assert!(
        so.contains("ok") && so.contains("3 compounds") && so.contains("2 steps"),
        "{so}"
    );
    assert!(err.is_empty(), "{err}");
}

#[test]
fn new_writes_a_checkable_file_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("mine.toml");
    let fs = f.to_str().unwrap();
    let out = run(&["new", fs]);
    assert_eq!(out.status.code(), Some(0), "{}", texts(&out).1);
    let written = std::fs::read_to_string(&f).unwrap();
    assert!(written.contains("format = 1"));
    let out = run(&["check", fs]);
    assert_eq!(out.status.code(), Some(0), "{}", texts(&out).1);
    let out = run(&["report", fs, "--format", "json"]);
    assert_eq!(out.status.code(), Some(0), "{}", texts(&out).1);
    // A second new refuses and leaves the file alone.
    std::fs::write(&f, "my own notes\n").unwrap();
    let out = run(&["new", fs]);
    assert_eq!(out.status.code(), Some(1));
    assert!(texts(&out).1.contains("already exists"));
    assert_eq!(std::fs::read_to_string(&f).unwrap(), "my own notes\n");
}

#[test]
fn bare_command_prints_the_demo_report_when_piped() {
    let out = run(&[]);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    let first = so.lines().next().unwrap_or("");
    assert!(
        first.contains("(invented)") && first.contains("forward route"),
        "{first}"
    );
    assert!(so.contains("control:"), "{so}");
    assert!(!so.contains('\x1b'), "no colour when not a terminal");
}

#[test]
fn set_unknown_compound_is_an_input_error_with_a_hint() {
    let c = chain();
    let out = run(&["report", &c, "--set", "nosuch=1mM"]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        err.contains("no compound 'nosuch'") && err.contains("a, b, c"),
        "{err}"
    );
    let out = run(&["report", &c, "--set", "bb=1mM"]);
    let (_, err) = texts(&out);
    assert_eq!(out.status.code(), Some(1));
    assert!(err.contains("did you mean 'b'"), "{err}");
    for bad in ["b", "b=0mM", "b=1 mg"] {
        let out = run(&["report", &c, "--set", bad]);
        assert_eq!(out.status.code(), Some(1), "--set {bad}");
        assert!(!texts(&out).1.contains("panicked"));
    }
}

#[test]
fn usage_errors_exit_2() {
    let c = chain();
    for args in [
        vec!["report"],
        vec!["frobnicate"],
        vec!["report", c.as_str(), "--format", "xml"],
        vec!["report", c.as_str(), "--ph", "seven"],
        vec!["check", c.as_str(), "--nosuch"],
    ] {
        let out = run(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", texts(&out).1);
        assert!(!texts(&out).1.contains("panicked"));
    }
    assert_eq!(run(&["--help"]).status.code(), Some(0));
}

#[test]
fn closed_pipe_ends_quietly() {
    // Like `dgpath report FILE | head -1`: the reader goes away after the first line.
    let g = path("data/glycolysis.toml");
    let mut child = dgpath()
        .args(["report", g.to_str().unwrap()])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close our end at once, before the report is written.
    drop(child.stdout.take());
    let mut err = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut err)
        .unwrap();
    let status = child.wait().unwrap();
    assert!(!err.contains("error") && !err.contains("panicked"), "{err}");
    assert!(status.success(), "{status:?}");
}

#[test]
fn ionic_strength_option() {
    // A neutral compound becomes an ATP⁴⁻-like species (z² − N_H = 4): at I = 0.25 M, 25 °C
    // dG'° moves by −3.239 kJ/mol (science.md §4 [C, from Alberty 2003 S]).
    let dir = tempfile::tempdir().unwrap();
    let file = Pw::new("i")
        .compound_with("a", "1 mM", "charge = 0, hydrogens = 0")
        .compound_with("b", "1 mM", "charge = -4, hydrogens = 12")
        .step("s1", "a -> b", "-5 kJ/mol")
        .write(dir.path(), "ionic.toml");
    let fs = file.as_str();
    let d = json(&[
        "report",
        fs,
        "--format",
        "json",
        "--ionic-strength",
        "250 mM",
    ]);
    close(f(&d["conditions"]["ionic_strength_m"]), 0.25, 1e-15);
    close(f(&d["steps"][0]["dg0"]), -5.0 - 3.239, 5e-4);
    // Without charges the correction cannot be made, and the report says so.
    let c = chain();
    let d = report_json(&["--ionic-strength", "0.1 M"]);
    close(f(&d["steps"][0]["dg0"]), -5.0, 1e-9);
    let notes: Vec<&str> = d["notes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n.as_str().unwrap())
        .collect();
    assert!(
        notes
            .iter()
            .any(|n| n.contains("lack charge and hydrogens")),
        "{notes:?}"
    );
    let out = run(&["report", &c, "--ionic-strength=-1 M"]);
    assert_eq!(out.status.code(), Some(1));
}
