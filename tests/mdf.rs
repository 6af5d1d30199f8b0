//! `dgpath mdf` through the binary: the JSON contract of cli.md, the worked
//! chain of the science reference, the shared options, and bad input.

use crate::support::run_code as run;
use serde_json::Value;
use std::path::PathBuf;

fn data(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

fn mdf_json(file: &str, extra: &[&str]) -> Value {
    let path = data(file);
    let mut args = vec![
        "mdf",
        path.to_str().expect("utf-8 path"),
        "--format",
        "json",
    ];
    args.extend_from_slice(extra);
    let (code, out, err) = run(&args);
    assert_eq!(code, 0, "stderr: {err}");
    serde_json::from_str(&out).unwrap_or_else(|e| panic!("not JSON ({e}): {out}"))
}

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// science.md §5 closed form for a 1:1 chain [C]: min over runs a..b of
/// [Σ −dG'°_i + RT(ln u_{a−1} − ln l_b)] / (b − a + 1); energies in kJ/mol.
#[allow(clippy::needless_range_loop)] // indices follow the formula
fn closed_form(dg0: &[f64], lo: &[f64], hi: &[f64], rt: f64) -> f64 {
    let mut best = f64::INFINITY;
    for a in 0..dg0.len() {
        let mut g = 0.0;
        for b in a..dg0.len() {
            g -= dg0[b];
            best = best.min((g + rt * (hi[a].ln() - lo[b + 1].ln())) / (b - a + 1) as f64);
        }
    }
    best
}

const WORKED: [f64; 4] = [-5.0, 10.0, -20.0, -5.0];

#[test]
fn mdf_json_worked_chain_at_25_c() {
    let j = mdf_json("mdf_chain.toml", &[]);
    // science.md §5 worked case [C]: 298.15 K, MDF = 8.9160 kJ/mol, binding run r1–r2
    // with prices 0.5, 0.5, 0, 0, S1 = 2.060 mM (unique).
    assert!((num(&j["mdf"]) - 8.9160).abs() < 5e-5, "{}", j["mdf"]);
    assert_eq!(j["energy_unit"], "kJ/mol");
    assert_eq!(j["bottlenecks"], serde_json::json!(["r1", "r2"]));
    for (id, want) in [("r1", 0.5), ("r2", 0.5), ("r3", 0.0), ("r4", 0.0)] {
        assert!(
            (num(&j["prices"][id]) - want).abs() < 1e-6,
            "price of {id}: {}",
            j["prices"][id]
        );
    }
    assert!(
        (num(&j["concentrations_m"]["s1"]) * 1e3 - 2.060).abs() < 5e-4,
        "{}",
        j["concentrations_m"]["s1"]
    );
    let r = &j["ranges_m"]["s1"];
    assert!(
        (num(&r[0]) / num(&r[1]) - 1.0).abs() < 1e-5,
        "S1 is unique: {r}"
    );
    for id in ["r1", "r2"] {
        assert_eq!(
            j["driving_forces"][id], j["mdf"],
            "a bottleneck's driving force is the MDF"
        );
    }
    assert!(num(&j["driving_forces"]["r3"]) > num(&j["mdf"]));
    // The limiting bounds are s0's upper and s2's lower, each with price 0.5.
    let lim = j["limiting"].as_array().expect("limiting");
    let got: Vec<(&str, &str)> = lim
        .iter()
        .map(|l| {
            (
                l["compound"].as_str().unwrap(),
                l["bound"].as_str().unwrap(),
            )
        })
        .collect();
    assert_eq!(got, vec![("s0", "upper"), ("s2", "lower")]);
    assert_eq!(j["feasible"], true);
    assert_eq!(j["warnings"], serde_json::json!([]));
}

#[test]
fn mdf_json_worked_chain_at_37_c() {
    let j = mdf_json("mdf_chain.toml", &["--temperature", "37 C"]);
    // science.md §5 worked case [C]: 310.15 K, MDF = 9.3755 kJ/mol, S1 = 1.833 mM.
    assert!((num(&j["mdf"]) - 9.3755).abs() < 5e-5, "{}", j["mdf"]);
    assert!((num(&j["concentrations_m"]["s1"]) * 1e3 - 1.833).abs() < 5e-4);
    assert!((num(&j["conditions"]["temperature_k"]) - 310.15).abs() < 1e-9);
}

#[test]
fn mdf_kcal_unit() {
    let j = mdf_json("mdf_chain.toml", &["--energy-unit", "kcal"]);
    assert_eq!(j["energy_unit"], "kcal/mol");
    // 8.9160 kJ/mol [C, science.md §5] over 4.184 kJ/kcal (thermochemical calorie, exact by definition).
    assert!((num(&j["mdf"]) - 8.9160 / 4.184).abs() < 5e-5);
}

#[test]
fn mdf_fixed_compound_is_held_and_set_moves_it() {
    let rt = 8.314462618e-3 * 298.15;
    let (mut lo, mut hi) = ([1e-6; 5], [1e-2; 5]);
    lo[0] = 1e-3;
    hi[0] = 1e-3;
    let j = mdf_json("mdf_fixed.toml", &[]);
    // [C] the §5 closed form with s0 held at 1 mM.
    assert!((num(&j["mdf"]) - closed_form(&WORKED, &lo, &hi, rt)).abs() < 1e-6);
    assert_eq!(j["fixed"], serde_json::json!(["s0"]));
    assert!(
        j["limiting"]
            .as_array()
            .unwrap()
            .iter()
            .all(|l| l["compound"] != "s0")
    );
    // Held at its upper bound, s0 gives back the free optimum 8.9160 kJ/mol [C, science.md §5].
    let j = mdf_json("mdf_fixed.toml", &["--set", "s0=10mM"]);
    assert!((num(&j["mdf"]) - 8.9160).abs() < 5e-5, "{}", j["mdf"]);
}

#[test]
fn mdf_reverse_route() {
    let j = mdf_json("mdf_chain.toml", &["--reverse"]);
    assert_eq!(j["direction"], "reverse");
    let rt = 8.314462618e-3 * 298.15;
    let back: Vec<f64> = WORKED.iter().rev().map(|g| -g).collect();
    // [C] the §5 closed form on the mirrored chain; it is negative: backward the
    // chain cannot run within the bounds.
    let want = closed_form(&back, &[1e-6; 5], &[1e-2; 5], rt);
    assert!(want < 0.0);
    assert!(
        (num(&j["mdf"]) - want).abs() < 1e-6,
        "{} vs {want}",
        j["mdf"]
    );
    assert_eq!(j["feasible"], false);
    let prices: f64 = j["prices"].as_object().unwrap().values().map(num).sum();
    assert!((prices - 1.0).abs() < 1e-6);
}

#[test]
fn mdf_table_worked_chain() {
    let path = data("mdf_chain.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("max-min driving force: 8.92 kJ/mol"), "{out}");
    assert!(out.contains("bottlenecks: r1, r2"), "{out}");
    assert!(out.contains("s0 at its upper bound 10 mM"), "{out}");
    assert!(out.contains("s2 at its lower bound 1 µM"), "{out}");
    assert!(out.contains("2.06 mM"), "{out}");
    assert!(!out.contains("-0.00"), "no negative zero: {out}");
}

#[test]
fn mdf_negative_is_an_answer_not_an_error() {
    let path = data("mdf_uphill.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("no concentrations within the bounds let the whole route run forward"),
        "{out}"
    );
    let j = mdf_json("mdf_uphill.toml", &[]);
    // [C] −40 + RT ln(10 mM / 1 µM) at 298.15 K.
    let want = -40.0 + 8.314462618e-3 * 298.15 * 1e4f64.ln();
    assert!((num(&j["mdf"]) - want).abs() < 1e-6);
    assert_eq!(j["bottlenecks"], serde_json::json!(["up"]));
}

#[test]
fn mdf_fixed_outside_bounds_is_an_error() {
    let path = data("mdf_fixed_outside.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap()]);
    assert_eq!(code, 1, "{out}");
    assert!(
        err.contains("mdf_fixed_outside.toml:17:"),
        "names file and line: {err}"
    );
    assert!(
        err.contains("'s0' is fixed at 50 mM, outside its bounds 1 uM to 10 mM"),
        "{err}"
    );
    assert!(err.contains("widen its bounds"), "says what to do: {err}");
    assert!(!err.contains("panicked"));
    // The same through --set on a file where s0 is fixed inside its bounds.
    let path = data("mdf_fixed.toml");
    let (code, _, err) = run(&["mdf", path.to_str().unwrap(), "--set", "s0=0.5uM"]);
    assert_eq!(code, 1);
    assert!(err.contains("'s0' is fixed at 0.5 uM"), "{err}");
}

#[test]
fn mdf_concentration_outside_bounds_warns() {
    let path = data("mdf_conc_outside.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap(), "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    assert!(
        err.contains("warning:") && err.contains("'s3' is at 0.2 M"),
        "{err}"
    );
    let j: Value = serde_json::from_str(&out).expect("stdout stays JSON");
    // The bounds decide, not the scenario's value: 8.9160 kJ/mol [C, science.md §5].
    assert!((num(&j["mdf"]) - 8.9160).abs() < 5e-5);
}

#[test]
fn mdf_bounds_backwards_is_an_error() {
    let path = data("mdf_bad_bounds.toml");
    let (code, _, err) = run(&["mdf", path.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(
        err.contains("mdf_bad_bounds.toml:19")
            && err.contains("lower bound 10 mM is above upper bound 1 mM"),
        "{err}"
    );
}

#[test]
fn mdf_demo_runs() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("pathways/fermenter.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap(), "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).expect("JSON");
    // Every step's driving force is at least the MDF, and the bottlenecks' equal it.
    let mdf = num(&j["mdf"]);
    for (id, f) in j["driving_forces"].as_object().unwrap() {
        assert!(num(f) >= mdf - 1e-9, "{id}: {f} < {mdf}");
    }
    for b in j["bottlenecks"].as_array().unwrap() {
        assert_eq!(j["driving_forces"][b.as_str().unwrap()], j["mdf"]);
    }
    // Fixed currency compounds stay at their file values.
    assert_eq!(num(&j["concentrations_m"]["atp"]), 0.0026);
}

#[test]
fn mdf_csv_has_one_row_per_step_and_still_warns() {
    let path = data("mdf_conc_outside.toml");
    let (code, out, err) = run(&["mdf", path.to_str().unwrap(), "--format", "csv"]);
    assert_eq!(code, 0, "{err}");
    assert!(err.contains("warning"), "{err}");
    let (_, json, _) = run(&["mdf", path.to_str().unwrap(), "--format", "json"]);
    let j: serde_json::Value = serde_json::from_str(&json).unwrap();
    let mut r = csv::Reader::from_reader(out.as_bytes());
    let head: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    assert_eq!(head[3], "driving_force [kJ/mol]", "{head:?}");
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), j["driving_forces"].as_object().unwrap().len());
    for row in &rows {
        let f: f64 = row[3].parse().unwrap();
        assert_eq!(
            f,
            j["driving_forces"][&row[0]].as_f64().unwrap(),
            "{}",
            &row[0]
        );
        let mdf: f64 = row[6].parse().unwrap();
        assert_eq!(mdf, j["mdf"].as_f64().unwrap());
    }
}

#[test]
fn mdf_per_sample_matches_mdf_with_set() {
    // Two samples that move the fixed compound s0: each sample's MDF must equal
    // the single run with --set s0=... (same optimisation, same held value).
    let dir = tempfile::tempdir().expect("temp dir");
    let csv = dir.path().join("s.csv");
    std::fs::write(&csv, "sample,s0 [uM]\nlow,20\nhigh,5000\n").expect("write csv");
    let path = data("mdf_fixed.toml");
    let (code, out, err) = run(&[
        "mdf",
        path.to_str().expect("utf-8"),
        "--samples",
        csv.to_str().expect("utf-8"),
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "stderr: {err}");
    let v: Value = serde_json::from_str(&out).expect("json");
    let rows = v["samples"].as_array().expect("samples list");
    assert_eq!(rows.len(), 2);
    for (row, set) in rows.iter().zip(["s0=20uM", "s0=5mM"]) {
        let single = mdf_json("mdf_fixed.toml", &["--set", set]);
        assert!(
            (num(&row["mdf"]) - num(&single["mdf"])).abs() < 1e-6,
            "{row} vs {single}"
        );
        assert_eq!(row["bottlenecks"], single["bottlenecks"]);
    }
    // More substrate held at the top of the chain gives more driving force.
    assert!(num(&rows[1]["mdf"]) > num(&rows[0]["mdf"]));
}
