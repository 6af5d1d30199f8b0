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

/// The table lines of a report: from the header to the first blank line.
fn table_lines(text: &str) -> Vec<&str> {
    text.lines()
        .skip_while(|l| !l.starts_with("energies in"))
        .skip(2)
        .take_while(|l| !l.is_empty())
        .collect()
}

#[test]
fn default_table_fits_120_columns_and_wide_shows_every_column() {
    let d = demo();
    for extra in [&[][..], &["--reverse"][..]] {
        let mut args = vec!["report", d.as_str()];
        args.extend_from_slice(extra);
        let t = ok(&args);
        let lines = table_lines(&t);
        assert!(lines.len() > 10, "{t}");
        for l in &lines {
            assert!(l.chars().count() <= 120, "{} wide: {l}", l.chars().count());
        }
        // Prose under the table is wrapped too.
        assert!(t.lines().all(|l| l.chars().count() <= 120), "{t}");
        assert!(
            lines[0].contains("per pass") && !lines[0].contains("turns"),
            "{}",
            lines[0]
        );
    }
    let wide = ok(&["report", &d, "--wide"]);
    let head = table_lines(&wide)[0];
    for h in [
        "reverse share",
        "enzyme factor",
        "J+/J-",
        "cumulative",
        "control 5–95 %",
    ] {
        assert!(head.contains(h), "{head}");
    }
    assert!(
        !head.contains("undone") && !head.contains("enzyme x"),
        "{head}"
    );
    // The full enzyme name only in the wide table.
    let name = "glyceraldehyde-3-phosphate dehydrogenase (phosphorylating)";
    assert!(wide.contains(name), "{wide}");
    assert!(!ok(&["report", &d]).contains(name));
}

#[test]
fn columns_option_chooses_and_orders_the_columns() {
    let c = chain();
    let t = ok(&["report", &c, "--columns", "dg,step,keq"]);
    let lines = table_lines(&t);
    let words: Vec<&str> = lines[0].split_whitespace().collect();
    assert_eq!(words, ["dG'", "step", "K'"], "{t}");
    // chain.toml s1: dG' = −10.708010 kJ/mol, K' = 7.515573 (worked in tests/cli.rs).
    let s1: Vec<&str> = lines[2].split_whitespace().collect();
    assert_eq!(s1, ["-10.7", "s1", "7.52"], "{t}");
    let bad = run(&["report", &c, "--columns", "dg,undone"]);
    let (_, err) = texts(&bad);
    assert_eq!(bad.status.code(), Some(2));
    assert!(
        err.contains("reverse_share"),
        "the message lists the names: {err}"
    );
}

#[test]
fn tables_and_markdown_show_three_significant_figures() {
    let d = demo();
    let json: serde_json::Value =
        serde_json::from_str(&ok(&["report", &d, "--format", "json"])).unwrap();
    let hxk = &json["steps"][0];
    let pyk = &json["steps"][9];
    assert_eq!(pyk["id"], "pyk");
    // JSON keeps the full numbers.
    let keq = hxk["keq"].as_f64().unwrap();
    let flux = pyk["flux_ratio"].as_f64().unwrap();
    assert!((keq - 625.9196).abs() < 1e-3, "{keq}");
    assert!((flux - 593.194).abs() < 0.01, "{flux}");
    let wide = ok(&["report", &d, "--wide"]);
    let md = ok(&["report", &d, "--format", "md"]);
    for text in [&wide, &md] {
        assert!(text.contains(" 626 ") && !text.contains("625.9"), "{text}");
        assert!(text.contains(" 593 ") && !text.contains("593.1"), "{text}");
        // J+/J- of hxk, 11420.29, and K' of pyk, 321313.5.
        assert!(text.contains("1.14e4") && text.contains("3.21e5"), "{text}");
    }
}

#[test]
fn markdown_carries_groups_net_sd_and_unsure_classes() {
    let d = demo();
    let md = ok(&["report", &d, "--format", "md"]);
    assert!(
        md.contains("coupled:** gapdh + pgk together dG' -3.00 kJ/mol ± 2.05"),
        "{md}"
    );
    assert!(
        md.contains("net per pass:** glc -1, etoh +2, co2 +2, atp +2"),
        "{md}"
    );
    assert!(md.contains("| ± sd |"), "{md}");
    let pfk = md.lines().find(|l| l.starts_with("| pfk ")).unwrap();
    assert!(
        pfk.contains("| 1.61 |") && pfk.contains("▼ far? |"),
        "{pfk}"
    );
    assert!(pfk.contains("control point"), "{pfk}");
    let lines: Vec<&str> = md.lines().filter(|l| l.starts_with('|')).collect();
    let n = lines[0].matches('|').count();
    assert!(lines.iter().all(|l| l.matches('|').count() == n), "{md}");
}

#[test]
fn csv_has_class_sure_and_units_in_its_headers() {
    let d = demo();
    for (unit, label) in [("kj", "kJ/mol"), ("kcal", "kcal/mol")] {
        let out = ok(&["report", &d, "--format", "csv", "--energy-unit", unit]);
        let mut r = csv::Reader::from_reader(out.as_bytes());
        let head: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
        for h in ["dg0", "dg", "dg_sd", "cumulative"] {
            assert!(head.contains(&format!("{h} [{label}]")), "{head:?}");
        }
        let sure = head.iter().position(|h| h == "class_sure").unwrap();
        let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
        let pfk = rows.iter().find(|r| &r[0] == "pfk").unwrap();
        let hxk = rows.iter().find(|r| &r[0] == "hxk").unwrap();
        assert_eq!((&pfk[sure], &hxk[sure]), ("false", "true"));
    }
}

#[test]
fn mdf_writes_every_advertised_format() {
    let d = demo();
    let help = ok(&["mdf", "--help"]);
    assert!(help.contains("csv") && help.contains("md"), "{help}");
    let j: serde_json::Value = serde_json::from_str(&ok(&["mdf", &d, "--format", "json"])).unwrap();
    let csv = ok(&["mdf", &d, "--format", "csv"]);
    assert_eq!(csv.lines().count(), 13, "header and 12 route steps: {csv}");
    let md = ok(&["mdf", &d, "--format", "md"]);
    let mdf = j["mdf"].as_f64().unwrap();
    // 2.53 kJ/mol on the demo; the Markdown shows it to three figures.
    assert!((mdf - 2.5333).abs() < 1e-3, "{mdf}");
    assert!(md.contains("**MDF: 2.53 kJ/mol**"), "{md}");
    for b in j["bottlenecks"].as_array().unwrap() {
        let row = md
            .lines()
            .find(|l| l.starts_with(&format!("| {} |", b.as_str().unwrap())))
            .unwrap();
        assert!(row.ends_with("| yes |"), "{row}");
    }
    assert!(md.contains("| compound | bounds | at optimum |"), "{md}");
}

#[test]
fn check_prints_the_warnings_report_and_mdf_give() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("warn.toml");
    let text = std::fs::read_to_string(path("data/mdf_conc_outside.toml")).unwrap();
    // An unused compound, a step left out of an explicit route (and s3
    // outside its bounds already).
    let text = text
        .replace("[compounds]", "[compounds]\nlonely = { conc = \"1 mM\" }")
        .replace(
            "name = \"worked chain",
            "route = [\"r1\", \"r2\", \"r3\"]\nname = \"worked chain",
        );
    std::fs::write(&file, &text).unwrap();
    let f = file.to_str().unwrap();
    let out = run(&["check", f]);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    assert!(so.contains("ok") && so.contains("with 3 warnings"), "{so}");
    assert!(err.contains("step 'r4' not in pathway.route"), "{err}");
    assert!(err.contains("'lonely' is used by no step"), "{err}");
    assert!(err.contains("'s3' is at 0.2 M"), "{err}");
    let (_, mdf_err) = texts(&run(&["mdf", f]));
    let (_, report_err) = texts(&run(&["report", f]));
    for line in err.lines() {
        assert!(mdf_err.contains(line), "mdf lacks {line}: {mdf_err}");
        assert!(
            report_err.contains(line),
            "report lacks {line}: {report_err}"
        );
    }
}

#[test]
fn verdict_reads_control_point_on_screen_and_in_json() {
    let c = chain();
    let t = ok(&["report", &c]);
    assert!(t.contains("◆ control point") && !t.contains("prime"), "{t}");
    let a = ok(&["report", &c, "--ascii"]);
    assert!(a.contains("* control point") && a.is_ascii(), "{a}");
    let j = ok(&["report", &c, "--format", "json"]);
    assert!(
        j.contains("\"verdict\": \"control_point\"") && !j.contains("prime"),
        "{j}"
    );
}

#[test]
fn ascii_report_uses_distinct_plain_glyphs() {
    let d = demo();
    let t = ok(&["report", &d, "--ascii", "--wide"]);
    assert!(t.is_ascii(), "{t}");
    // near and the cut enzyme name differ; the control point and other marks differ.
    assert!(t.contains("~ near"), "{t}");
    assert!(t.contains("v far") && t.contains("* control point") && t.contains("o candidate"));
    assert!(t.contains("<largest"), "{t}");
    let cut = ok(&["report", &d, "--ascii"]);
    assert!(cut.is_ascii());
    assert!(cut.contains("glyceraldehyde-3-... "), "{cut}");
}

#[test]
fn report_json_of_the_demo_matches_its_snapshot() {
    // Every field name and value of the demo's report: a renamed or dropped
    // field fails here. Review a change with `git diff tests/snapshots`.
    let d = demo();
    let text = ok(&["report", &d, "--format", "json", "--draws", "2000"]);
    insta::assert_snapshot!("report_json_demo", text);
    let mdf = ok(&["mdf", &d, "--format", "json"]);
    insta::assert_snapshot!("mdf_json_demo", mdf);
}

#[test]
fn new_starter_names_every_field_of_the_format_and_checks_clean() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("start.toml");
    let f = file.to_str().unwrap();
    ok(&["new", f]);
    let out = run(&["check", f]);
    let (so, err) = texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    assert!(so.contains("ok") && err.is_empty(), "{so}{err}");
    let text = std::fs::read_to_string(&file).unwrap();
    assert!(text.contains("docs/format.md"), "{text}");
    assert!(!text.contains("<=>"), "reactions use -> only");
    // Every field of the tables in docs/format.md appears in the starter.
    let format = std::fs::read_to_string(path("../docs/format.md")).unwrap();
    let fields: Vec<&str> = format
        .lines()
        .filter_map(|l| l.strip_prefix("| `"))
        .filter_map(|l| l.split('`').next())
        .filter(|f| {
            f.chars()
                .all(|c| c.is_ascii_lowercase() || c == '_' || c.is_ascii_digit())
        })
        .collect();
    assert!(fields.len() >= 30, "{fields:?}");
    for field in fields {
        let written = format!("{field} =");
        assert!(text.contains(&written), "the starter lacks {field}");
    }
    // Uncommenting the optional step fields still gives a file that loads.
    let full = text
        .lines()
        .map(|l| match l.strip_prefix("# ") {
            Some(rest) if rest.starts_with("dg0_sd") || rest.starts_with("ionic_strength") => rest,
            _ => l,
        })
        .collect::<Vec<_>>()
        .join("\n");
    std::fs::write(&file, full).unwrap();
    assert_eq!(run(&["check", f]).status.code(), Some(0));
}

/// Field names of a JSON document, leaving out the keys of id-keyed maps.
fn field_names(v: &serde_json::Value, out: &mut std::collections::BTreeSet<String>) {
    const BY_ID: [&str; 8] = [
        "net",
        "concentrations_m",
        "driving_forces",
        "prices",
        "dg0",
        "ranges_m",
        "bounds_m",
        "feasible_ranges_m",
    ];
    match v {
        serde_json::Value::Object(m) => {
            for (k, x) in m {
                out.insert(k.clone());
                if !(BY_ID.contains(&k.as_str()) && x.is_object()) {
                    field_names(x, out);
                }
            }
        }
        serde_json::Value::Array(a) => a.iter().for_each(|x| field_names(x, out)),
        _ => {}
    }
}

#[test]
fn docs_json_describes_every_field() {
    let docs = std::fs::read_to_string(path("../docs/json.md")).unwrap();
    let d = demo();
    let rev = path("../pathways/fermenter-reverse.toml");
    let rev = rev.to_str().unwrap();
    let mut names = std::collections::BTreeSet::new();
    for args in [
        vec!["report", d.as_str(), "--format", "json"],
        vec!["report", rev, "--format", "json", "--reverse"],
        vec!["mdf", d.as_str(), "--format", "json"],
    ] {
        let v: serde_json::Value = serde_json::from_str(&ok(&args)).unwrap();
        field_names(&v, &mut names);
    }
    assert!(names.len() > 40, "{names:?}");
    for n in names {
        assert!(docs.contains(&format!("`{n}`")), "docs/json.md lacks `{n}`");
    }
}

#[test]
fn huge_and_tiny_numbers_are_printed_in_scientific_notation() {
    // chain.toml with s1 at dG'° = −1500 kJ/mol and C at 1 pM: at 25 °C
    // K' of s1 = exp(1500/2.478957) = 6.15e262 and Q of s2 = 1e-12/1e-4 = 1e-8.
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("big.toml");
    let text = std::fs::read_to_string(path("data/chain.toml"))
        .unwrap()
        .replace("dg0 = \"-5 kJ/mol\"", "dg0 = \"-1500 kJ/mol\"")
        .replace("conc = \"0.01 mM\"", "conc = \"1 pM\"");
    std::fs::write(&file, text).unwrap();
    let f = file.to_str().unwrap();
    let wide = ok(&["report", f, "--wide"]);
    let s1 = wide.lines().find(|l| l.starts_with("s1 ")).unwrap();
    assert!(s1.contains(" 6.15e262 "), "{s1}");
    let s2 = wide.lines().find(|l| l.starts_with("s2 ")).unwrap();
    assert!(s2.contains(" 1e-8 "), "{s2}");
    let csv = ok(&["report", f, "--format", "csv"]);
    let md = ok(&["report", f, "--format", "md"]);
    for text in [&wide, &csv, &md] {
        // No run of 20 digits (a 263-digit integer) and no 0.000000… anywhere.
        let longest = text
            .split(|c: char| !c.is_ascii_digit())
            .map(str::len)
            .max()
            .unwrap();
        assert!(longest < 20, "{text}");
        assert!(!text.contains("0.000000"), "{text}");
    }
    let mut r = csv::Reader::from_reader(csv.as_bytes());
    let head: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let keq = head.iter().position(|h| h == "keq").unwrap();
    let row = r.records().next().unwrap().unwrap();
    let k: f64 = row[keq].parse().unwrap();
    assert!((k / 6.1465e262 - 1.0).abs() < 1e-4, "{k}");
}

#[test]
fn verdict_reasons_follow_the_energy_unit() {
    let d = demo();
    let kcal = ok(&["report", &d, "--energy-unit", "kcal"]);
    let control: String = kcal
        .lines()
        .skip_while(|l| *l != "control:")
        .take_while(|l| !l.is_empty())
        .collect::<Vec<_>>()
        .join("\n");
    // pfk: dG' = −12.21 kJ/mol = −2.92 kcal/mol (4.184 kJ per kcal, the
    // thermochemical calorie, from memory).
    assert!(control.contains("(dG' = -2.9 kcal/mol)"), "{control}");
    assert!(!control.contains("kJ"), "{control}");
    let j: serde_json::Value = serde_json::from_str(&ok(&[
        "report",
        &d,
        "--format",
        "json",
        "--energy-unit",
        "kcal",
    ]))
    .unwrap();
    for v in j["control"].as_array().unwrap() {
        for r in v["reasons"].as_array().unwrap() {
            assert!(!r.as_str().unwrap().contains("kJ"), "{r}");
        }
    }
}

#[test]
fn a_kcal_report_says_no_kj_anywhere() {
    // The demo has uphill steps, unsure classes and verdicts: every kind of
    // note and reason that carries an energy.
    let d = demo();
    for format in ["table", "md", "json", "csv"] {
        let text = ok(&["report", &d, "--energy-unit", "kcal", "--format", format]);
        assert!(!text.contains("kJ"), "{format}: {text}");
        assert!(text.contains("kcal/mol"), "{format}");
    }
    let table = ok(&["report", &d, "--energy-unit", "kcal"]);
    // adh's 95 % interval: −1.92 ± 1.96 × 1.99 kJ/mol = −5.81 to +1.97 kJ/mol,
    // −1.39 to +0.47 kcal/mol.
    assert!(table.contains("(-1.4 to +0.5 kcal/mol)"), "{table}");
    let mdf = ok(&["mdf", &d, "--energy-unit", "kcal"]);
    assert!(!mdf.contains("kJ"), "{mdf}");
}
