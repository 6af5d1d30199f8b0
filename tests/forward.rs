//! Through the binary: steps that run backward (`against`, `runs_forward`),
//! carriers held in the optimisation (`held`, `--free-currencies`) and the
//! ranges within which the route can run (`feasible_ranges_m`).

use crate::support::{Pw, close, path, run, texts};
use serde_json::Value;

const DEMO: &str = "pathways/fermenter.toml";

fn demo() -> String {
    path(&format!("../{DEMO}")).to_str().unwrap().to_string()
}

fn json(args: &[&str]) -> Value {
    let out = run(args);
    let (o, e) = texts(&out);
    assert!(out.status.success(), "{args:?}: {e}");
    serde_json::from_str(&o).unwrap_or_else(|err| panic!("{err}: {o}"))
}

fn step<'a>(d: &'a Value, id: &str) -> &'a Value {
    d["steps"]
        .as_array()
        .unwrap()
        .iter()
        .find(|s| s["id"] == id)
        .unwrap_or_else(|| panic!("no step {id}"))
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn a_step_with_positive_dg_is_flagged_in_json() {
    let d = demo();
    let base = json(&["report", &d, "--format", "json"]);
    assert_eq!(base["runs_forward"], true);
    assert!(
        base["steps"]
            .as_array()
            .unwrap()
            .iter()
            .all(|s| s["against"] == false)
    );
    // f6p at 3.5 mM: pgi (dG'° 2.1 kJ/mol at 30 °C, no protons) has
    // dG' = 2.1 + RT ln(3.5 / 1.9) = +3.640 kJ/mol [C, science.md §1].
    let b = json(&["report", &d, "--format", "json", "--set", "f6p=3.5mM"]);
    let pgi = step(&b, "pgi");
    let rt = f(&b["conditions"]["rt"]);
    close(f(&pgi["dg"]), 2.1 + rt * (3.5f64 / 1.9).ln(), 1e-6);
    close(f(&pgi["dg"]), 3.640, 5e-4);
    assert_eq!(pgi["against"], true);
    assert_eq!(b["runs_forward"], false);
    // No share undone and no enzyme factor for a step that cannot run forward.
    assert!(pgi["reverse_share"].is_null() && pgi["enzyme_factor"].is_null());
    assert_eq!(step(&b, "pfk")["against"], false);
    let notes: Vec<&str> = b["notes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n.as_str().unwrap())
        .collect();
    assert!(
        notes
            .iter()
            .any(|n| n.contains("cannot carry forward flux") && n.contains("pgi")),
        "{notes:?}"
    );
}

#[test]
fn a_step_that_runs_backward_shows_in_every_format() {
    let d = demo();
    let set = ["--set", "f6p=3.5mM"];
    for format in ["table", "md"] {
        let out = run(&["report", &d, "--format", format, set[0], set[1]]);
        let (o, e) = texts(&out);
        assert!(out.status.success(), "{e}");
        assert!(o.contains("⇄"), "{format}: {o}");
        assert!(
            o.contains("cannot carry forward flux at these concentrations"),
            "{format}: {o}"
        );
    }
    let out = run(&["report", &d, "--format", "csv", set[0], set[1]]);
    let (o, _) = texts(&out);
    let mut lines = o.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = header
        .iter()
        .position(|h| *h == "against")
        .expect("against column");
    let pgi: Vec<&str> = lines
        .find(|l| l.starts_with("pgi,"))
        .unwrap()
        .split(',')
        .collect();
    assert_eq!(pgi[col], "true");
}

#[test]
fn samples_summary_counts_backward_samples() {
    // As ethanol accumulates in the demo's time course, adh runs backward in h30 and h33.
    let d = demo();
    let s = path("../pathways/fermenter-samples.csv");
    let out = run(&["report", &d, "--samples", s.to_str().unwrap()]);
    let (o, e) = texts(&out);
    assert!(out.status.success(), "{e}");
    let adh = o
        .lines()
        .find(|l| l.starts_with("adh "))
        .unwrap_or_else(|| panic!("{o}"));
    assert!(adh.contains("2/12"), "{adh}");
    assert!(o.contains("h30") && o.contains("h33"), "{o}");
}

#[test]
fn carriers_are_held_and_listed() {
    let d = demo();
    let held = json(&["mdf", &d, "--format", "json"]);
    let ids: Vec<&str> = held["held"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    for c in ["atp", "adp", "nad", "nadh", "pi", "co2"] {
        assert!(ids.contains(&c), "{ids:?}");
    }
    let free = json(&["mdf", &d, "--format", "json", "--free-currencies"]);
    let ids: Vec<&str> = free["held"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    // co2 is fixed = true in the file, so it stays held.
    assert_eq!(ids, ["co2"]);
    // Freeing the carriers lets the optimum pick ratios no cell keeps, and a larger MDF.
    assert!(f(&free["mdf"]) > f(&held["mdf"]) + 1.0);
    let c = &free["concentrations_m"];
    assert!(f(&c["atp"]) / f(&c["adp"]) != 2.6 / 0.9);
    // The table says what was held.
    let out = run(&["mdf", &d]);
    let (o, _) = texts(&out);
    assert!(o.contains("held at their concentrations"), "{o}");
}

/// The worked chain of science.md §5: dG'° = [−5, +10, −20, −5] kJ/mol, 1 µM–10 mM, 25 °C.
fn worked_chain(dir: &std::path::Path, dg0: [f64; 4]) -> String {
    Pw::new("chain")
        .bounds("1 uM", "10 mM")
        .chain(&dg0, "0.1 mM")
        .write(dir, "chain.toml")
}

#[test]
fn feasible_ranges_through_the_binary() {
    let dir = tempfile::tempdir().unwrap();
    let file = worked_chain(dir.path(), [-5.0, 10.0, -20.0, -5.0]);
    let d = json(&["mdf", &file, "--format", "json"]);
    close(f(&d["mdf"]), 8.9160, 5e-5);
    // With B = 0 (science.md §10) S1 needs S2 ≥ 1 µM behind a +10 kJ/mol step:
    // S1 ≥ 1 µM × exp(10 / RT) = 56.5 µM, and can go up to its bound, 10 mM [C].
    let rt = 2.478957;
    let s1 = d["feasible_ranges_m"]["s1"].as_array().unwrap();
    close(f(&s1[0]), 1e-6 * (10.0f64 / rt).exp(), 1e-9);
    close(f(&s1[1]), 1e-2, 1e-9);
    // S0 must stay above 1 µM × exp((10 − 5) / RT) = 7.52 µM [C].
    let s0 = d["feasible_ranges_m"]["s0"].as_array().unwrap();
    close(f(&s0[0]) / (1e-6 * (5.0f64 / rt).exp()), 1.0, 1e-6);
    // An uphill route has none.
    let file = worked_chain(dir.path(), [-5.0, 60.0, -20.0, -5.0]);
    let d = json(&["mdf", &file, "--format", "json"]);
    assert!(f(&d["mdf"]) < 0.0);
    assert!(d["feasible_ranges_m"].is_null());
}

#[test]
fn the_demo_optimum_with_carriers_held_and_freed_is_optimal() {
    use dgpath::analysis::mdf::{self, Options};
    let prep = crate::support::prepare_file("../pathways/fermenter.toml");
    let state = dgpath::scenario::State::from_pathway(&prep.pathway);
    for free_currencies in [false, true] {
        let opts = Options {
            free_currencies,
            ranges: true,
        };
        let m = mdf::solve_with(&prep, &state, &opts).expect("solves");
        // Primal and dual feasibility, strong duality and complementary slackness
        // of the programme actually solved (carriers held or not).
        let c = mdf::certificate(&prep, &state, &m).expect("certificate");
        assert!(
            c.primal < 1e-6 && c.dual < 1e-6 && c.gap < 1e-6 && c.complementary < 1e-6,
            "{free_currencies}: {c:?}"
        );
        // Every feasible range holds the optimum and lies within the bounds.
        let f = m.feasible_ranges.as_ref().expect("MDF > 0");
        for (i, part) in m.parts.iter().enumerate() {
            if *part == mdf::Part::Free {
                let (lo, hi) = f[i];
                assert!(lo <= m.conc[i] * (1.0 + 1e-9) && m.conc[i] <= hi * (1.0 + 1e-9));
                assert!(lo >= m.bounds[i].0 * (1.0 - 1e-9) && hi <= m.bounds[i].1 * (1.0 + 1e-9));
            }
        }
    }
}

#[test]
fn the_total_sd_says_when_it_is_partial() {
    let dir = tempfile::tempdir().unwrap();
    let file = Pw::new("p")
        .compounds(&["a", "b", "c"], "1 mM")
        .step_with("s1", "a -> b", "-5", &["dg0_sd = 1.5"])
        .step("s2", "b -> c", "-5")
        .write(dir.path(), "partial.toml");
    let f = file.as_str();
    let (table, _) = texts(&run(&["report", f]));
    assert!(
        table.contains("± 1.50; 1 of 2 steps give no dg0_sd"),
        "{table}"
    );
    let md = texts(&run(&["report", f, "--format", "md"])).0;
    assert!(md.contains("± 1.50; 1 of 2 steps give no dg0_sd"), "{md}");
    let d = json(&["report", f, "--format", "json"]);
    assert_eq!(d["total"]["steps_without_dg0_sd"], 1);
    close(d["total"]["dg_sd"].as_f64().unwrap(), 1.5, 1e-9);
}
