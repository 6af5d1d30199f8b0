//! `report --samples`: the summary, the per-sample CSV and JSON, and the
//! messages for a wrong samples table, all through the `dgpath` binary.

use crate::support::{root, run_in_root as dgpath, stderr, stdout};
use std::path::Path;

const PW: &str = "pathways/fermenter.toml";
const DEMO: &str = "pathways/fermenter-samples.csv";

fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.display().to_string()
}

fn json(args: &[&str]) -> serde_json::Value {
    let o = dgpath(args);
    assert!(o.status.success(), "{}", stderr(&o));
    serde_json::from_slice(&o.stdout).expect("valid JSON")
}

#[test]
fn batch_rows_equal_single_sample_reports() {
    // The last demo sample, passed one by one with --set, must give the same
    // numbers as its rows in the batch output.
    let table = std::fs::read_to_string(root().join(DEMO)).unwrap();
    let mut lines = table.lines();
    let head: Vec<String> = lines
        .next()
        .unwrap()
        .split(',')
        .map(|h| h.replace(" [mM]", ""))
        .collect();
    let last: Vec<&str> = lines.last().unwrap().split(',').collect();
    let mut args: Vec<String> = vec!["report".into(), PW.into(), "--format".into(), "json".into()];
    for (h, v) in head.iter().zip(&last).skip(1) {
        args.push("--set".into());
        args.push(format!("{h}={v}mM"));
    }
    let single = json(&args.iter().map(String::as_str).collect::<Vec<_>>());
    let batch = json(&["report", PW, "--samples", DEMO, "--format", "json"]);
    let samples = batch["samples"].as_array().unwrap();
    assert_eq!(samples.len(), 12);
    let b = samples.last().unwrap();
    assert_eq!(b["sample"], last[0]);
    let (ss, bs) = (
        single["steps"].as_array().unwrap(),
        b["steps"].as_array().unwrap(),
    );
    assert_eq!(ss.len(), bs.len());
    for (s, t) in ss.iter().zip(bs) {
        assert_eq!(s["id"], t["id"]);
        assert_eq!(s["class"], t["class"]);
        for f in ["dg0", "dg", "cumulative"] {
            assert!(
                (s[f].as_f64().unwrap() - t[f].as_f64().unwrap()).abs() < 1e-9,
                "{} {f}",
                s["id"]
            );
        }
    }
    let prime = single["control"]
        .as_array()
        .unwrap()
        .iter()
        .find(|v| v["verdict"] == "control_point")
        .map(|v| v["step"].clone());
    assert_eq!(prime.unwrap_or(serde_json::Value::Null), b["control_point"]);
    assert_eq!(single["largest_drop"], b["largest_drop"]);
}

#[test]
fn json_summary_agrees_with_the_samples() {
    let d = json(&["report", PW, "--samples", DEMO, "--format", "json"]);
    let samples = d["samples"].as_array().unwrap();
    let sum = &d["summary"];
    assert_eq!(sum["samples"], samples.len());
    // Class counts and prime counts recounted from the per-sample objects.
    for (k, st) in sum["steps"].as_array().unwrap().iter().enumerate() {
        let id = &st["id"];
        for class in ["far", "moderate", "near", "uphill"] {
            let n = samples
                .iter()
                .filter(|s| s["steps"][k]["class"] == class)
                .count();
            assert_eq!(st["classes"][class], n, "{id} {class}");
        }
        let n = samples.iter().filter(|s| &s["control_point"] == id).count();
        assert_eq!(st["control_point"], n, "{id} control point");
        let n = samples.iter().filter(|s| &s["largest_drop"] == id).count();
        assert_eq!(st["largest_drop"], n, "{id} largest");
        let mut dg: Vec<f64> = samples
            .iter()
            .map(|s| s["steps"][k]["dg"].as_f64().unwrap())
            .collect();
        dg.sort_by(f64::total_cmp);
        // Twelve values: the median is the mean of the 6th and 7th.
        assert!(
            (st["dg_median"].as_f64().unwrap() - (dg[5] + dg[6]) / 2.0).abs() < 1e-6,
            "{id}"
        );
        assert_eq!(st["dg_min"].as_f64().unwrap(), dg[0]);
    }
    let usual = &sum["usual_control_point"];
    let differ: Vec<&serde_json::Value> = samples
        .iter()
        .filter(|s| &s["control_point"] != usual)
        .map(|s| &s["sample"])
        .collect();
    let listed: Vec<&serde_json::Value> = sum["control_point_differs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| &x["sample"])
        .collect();
    assert_eq!(differ, listed);
    // Steps listed under class_differs are exactly those with more than one class,
    // and each lists the samples outside its usual class.
    let steps = sum["steps"].as_array().unwrap();
    let varied: Vec<&serde_json::Value> = steps
        .iter()
        .filter(|st| {
            ["far", "moderate", "near", "uphill"]
                .iter()
                .filter(|c| st["classes"][**c].as_u64() > Some(0))
                .count()
                > 1
        })
        .map(|st| &st["id"])
        .collect();
    let cd = sum["class_differs"].as_array().unwrap();
    assert_eq!(varied, cd.iter().map(|d| &d["step"]).collect::<Vec<_>>());
    for d in cd {
        let k = steps.iter().position(|st| st["id"] == d["step"]).unwrap();
        let other: Vec<&serde_json::Value> = samples
            .iter()
            .filter(|s| s["steps"][k]["class"] != d["usual"])
            .map(|s| &s["sample"])
            .collect();
        assert_eq!(
            other,
            d["samples"]
                .as_array()
                .unwrap()
                .iter()
                .map(|x| &x["sample"])
                .collect::<Vec<_>>()
        );
    }
    // The demo is built so that the picture changes as the sugar runs out.
    assert!(
        !listed.is_empty(),
        "the demo time course should move the prime step"
    );
}

#[test]
fn table_is_the_default_with_samples() {
    let o = dgpath(&["report", PW, "--samples", DEMO]);
    assert!(o.status.success(), "{}", stderr(&o));
    let t = stdout(&o);
    assert!(t.contains("12 samples"), "{t}");
    assert!(
        t.contains("median dG'") && t.contains("10–90 %") && t.contains("largest drop"),
        "{t}"
    );
    assert!(
        t.contains("usual control point: pfk") && t.contains("control point differs in"),
        "{t}"
    );
    // The demo's story: pgk leaves near equilibrium as the sugar runs out.
    assert!(
        t.lines()
            .any(|l| l.trim_start().starts_with("pgk: usually near") && l.contains("far in")),
        "{t}"
    );
    for id in ["hxk", "pgk", "adh"] {
        assert!(t.lines().any(|l| l.starts_with(id)), "{id} row in\n{t}");
    }
}

#[test]
fn csv_has_one_row_per_sample_and_step() {
    let o = dgpath(&["report", PW, "--samples", DEMO, "--format", "csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut r = csv::Reader::from_reader(o.stdout.as_slice());
    assert_eq!(
        r.headers().unwrap(),
        vec![
            "sample",
            "step",
            "dg0",
            "dg",
            "class",
            "against",
            "verdict",
            "cumulative",
            "control_coefficient"
        ]
    );
    let rows: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 12 * 12, "12 samples × 12 route steps");
    assert_eq!(&rows[0][0], "h00");
    assert_eq!(&rows[0][1], "hxk");
    assert_eq!(&rows[143][0], "h33");
    assert_eq!(&rows[143][1], "adh");
    // Cumulative is the running sum of times × dg; pgk (turns 2 per pass) checks the weighting.
    let c = |i: usize| rows[i][7].parse::<f64>().unwrap();
    let dg = |i: usize| rows[i][3].parse::<f64>().unwrap();
    assert!((c(6) - c(5) - 2.0 * dg(6)).abs() < 1e-6);
    // As ethanol accumulates adh runs backward in the last two samples (dG' > 0).
    let against = |i: usize| &rows[i][5] == "true";
    assert!(against(143) && against(131) && !against(119));
    assert!((0..144).all(|i| against(i) == (dg(i) > 0.0)));
}

#[test]
fn empty_cells_keep_the_file_value() {
    let dir = tempfile::tempdir().unwrap();
    let t = write(
        dir.path(),
        "s.csv",
        "sample,glc [mM],atp\nfile,,\nchanged,1,\n",
    );
    let d = json(&["report", PW, "--samples", &t, "--format", "json"]);
    let file = json(&["report", PW, "--format", "json"]);
    let s = d["samples"].as_array().unwrap();
    assert_eq!(s[0]["steps"][0]["dg"], file["steps"][0]["dg"]);
    // 12 mM -> 1 mM glucose raises hxk's dG' by RT ln 12 (glc is a substrate).
    let rt = file["conditions"]["rt"].as_f64().unwrap();
    let up = s[1]["steps"][0]["dg"].as_f64().unwrap() - file["steps"][0]["dg"].as_f64().unwrap();
    assert!((up - rt * 12f64.ln()).abs() < 1e-6, "{up}");
}

#[test]
fn mistakes_in_the_table_name_row_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        (
            "sample,glc [mM],gluc [mM]\na,1,2\n",
            ":1, column 'gluc [mM]': no compound 'gluc'",
        ),
        (
            "sample,glc [mM]\na,1\nb,two\n",
            ":3, column 'glc [mM]': 'two' is not a concentration",
        ),
        ("sample,glc\na,1\n", ":2, column 'glc': '1' has no unit"),
        (
            "sample,glc [mM]\na,1,3\n",
            ":2: this row has 3 cells but the header has 2",
        ),
        ("sample,h2o [mM]\na,1\n", "solvent"),
        ("glc [mM]\n1\n", "first column must be 'sample'"),
    ];
    for (i, (text, phrase)) in cases.iter().enumerate() {
        let t = write(dir.path(), &format!("bad{i}.csv"), text);
        for format in ["table", "csv", "json"] {
            let o = dgpath(&["report", PW, "--samples", &t, "--format", format]);
            assert_eq!(o.status.code(), Some(1), "{text:?}");
            let e = stderr(&o);
            assert!(e.contains(&t) && e.contains(phrase), "{text:?}: {e}");
            assert!(!e.contains("panicked"), "{e}");
            assert!(
                o.stdout.is_empty(),
                "nothing is printed before the table is known to be good"
            );
        }
    }
    let o = dgpath(&["report", PW, "--samples", "no/such.csv"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("no/such.csv: cannot read the samples table"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn mdf_per_sample_streams_rows_in_table_order_and_refuses_a_bad_table_before_any_output() {
    let dir = tempfile::tempdir().unwrap();
    let demo = std::fs::read_to_string(root().join(DEMO)).unwrap();
    let mut lines: Vec<String> = demo.lines().map(String::from).collect();
    let header = lines.remove(0);
    // More rows than one parallel chunk (512), so order across chunks counts.
    let mut text = format!("{header}\n");
    for i in 0..1100 {
        let row = &lines[i % lines.len()];
        let (_, values) = row.split_once(',').unwrap();
        text.push_str(&format!("r{i:04},{values}\n"));
    }
    let good = dir.path().join("many.csv");
    std::fs::write(&good, &text).unwrap();
    let out = dgpath(&[
        "mdf",
        "pathways/fermenter.toml",
        "--samples",
        good.to_str().unwrap(),
        "--format",
        "csv",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let csv = String::from_utf8(out.stdout).unwrap();
    let names: Vec<&str> = csv
        .lines()
        .skip(1)
        .map(|l| l.split(',').next().unwrap())
        .collect();
    let want: Vec<String> = (0..1100).map(|i| format!("r{i:04}")).collect();
    assert_eq!(names, want);
    // Rows with the same values (the table repeats its time course) get
    // the same optimum, whichever chunk and worker solved them.
    let per_name: std::collections::HashMap<&str, &str> = csv
        .lines()
        .skip(1)
        .map(|l| l.split_once(',').unwrap())
        .collect();
    let n = lines.len();
    let last = (1099 / n) * n;
    assert!(last >= 512, "the repeat lies in a later chunk");
    assert_eq!(per_name["r0000"], per_name[format!("r{last:04}").as_str()]);
    // A bad cell far down: an error naming it, and nothing on stdout.
    let bad = dir.path().join("bad.csv");
    std::fs::write(&bad, text.replacen("r1099,", "r1099,x", 1)).unwrap();
    let out = dgpath(&[
        "mdf",
        "pathways/fermenter.toml",
        "--samples",
        bad.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        out.stdout.is_empty(),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.csv"), "{err}");
}
