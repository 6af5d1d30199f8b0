//! SBML import: models written by hand from the SBML specifications
//! (tests/sbml/), imported through the library, then read back by the loader
//! and checked and reported by the binary.

use crate::support::{close, path, run, texts};
use dgpath::import::{self, BranchesFrom, Options, tables};
use dgpath::model::{self, Pathway, Standard, StatedRole};

const ROUTE: &str = "GLCt HEX PGI PFK FBA TPI GAPD PGK PGM ENO PYK";

fn model(rel: &str) -> import::sbml::Model {
    import::read_model(&path(rel)).unwrap_or_else(|e| panic!("{e}"))
}

fn opts(route: &str) -> Options {
    Options {
        route: route.split_whitespace().map(str::to_string).collect(),
        ..Options::default()
    }
}

fn with_tables(route: &str) -> Options {
    let dg0 = std::fs::read_to_string(path("sbml/chain_dg0.csv")).unwrap();
    let conc = std::fs::read_to_string(path("sbml/chain_conc.csv")).unwrap();
    Options {
        dg0: Some(tables::read_dg0(&dg0, "chain_dg0.csv").unwrap()),
        conc: Some(tables::read_conc(&conc, "chain_conc.csv").unwrap()),
        ..opts(route)
    }
}

fn imported(rel: &str, o: &Options) -> (import::Imported, Pathway) {
    let m = model(rel);
    let out = import::import(&m, rel, o).unwrap_or_else(|e| panic!("{e}"));
    let p =
        model::load_str(&out.text, "out.toml").unwrap_or_else(|e| panic!("{e}\n---\n{}", out.text));
    (out, p)
}

/// Like `imported`, with every value left open ("?") filled in for the loader.
fn imported_open(rel: &str, o: &Options) -> (import::Imported, Pathway) {
    let m = model(rel);
    let out = import::import(&m, rel, o).unwrap_or_else(|e| panic!("{e}"));
    let text = out
        .text
        .replace("dg0 = \"?\"", "dg0 = \"0 kJ/mol\"")
        .replace("conc = \"?\"", "conc = \"1 mM\"");
    let p = model::load_str(&text, "out.toml").unwrap_or_else(|e| panic!("{e}\n---\n{}", out.text));
    (out, p)
}

fn step<'a>(p: &'a Pathway, id: &str) -> &'a model::Step {
    &p.steps[p.step(id).unwrap_or_else(|| panic!("no step {id}"))]
}

fn compound<'a>(p: &'a Pathway, id: &str) -> &'a model::Compound {
    &p.compounds[p.compound(id).unwrap_or_else(|| panic!("no compound {id}"))]
}

fn reaction_text(p: &Pathway, id: &str) -> String {
    step(p, id).reaction.clone()
}

fn dg0_kj(p: &Pathway, id: &str) -> f64 {
    match step(p, id).standard {
        Standard::Dg0(v) => v / 1000.0,
        Standard::Keq(_) => panic!("{id} has keq"),
    }
}

#[test]
fn level3_route_is_oriented_with_protons_roles_and_model_data() {
    let (out, p) = imported("sbml/chain_l3v1.xml", &with_tables(ROUTE));
    assert!(
        out.missing_dg0.is_empty() && out.missing_conc.is_empty(),
        "{out:?}"
    );
    let route: Vec<&str> = p.route.iter().map(|&i| p.steps[i].id.as_str()).collect();
    assert_eq!(route, ROUTE.split_whitespace().collect::<Vec<_>>());
    // PGK and PGM are written backward in the model: flipped, dg0 negated.
    assert_eq!(reaction_text(&p, "PGK"), "13dpg_c + adp_c -> 3pg_c + atp_c");
    close(dg0_kj(&p, "PGK"), -18.5, 1e-12);
    assert_eq!(reaction_text(&p, "PGM"), "3pg_c -> 2pg_c");
    close(dg0_kj(&p, "PGM"), 4.4, 1e-12);
    // Steps written the route's way keep the table's value.
    assert_eq!(
        reaction_text(&p, "HEX"),
        "glc__D_c + atp_c -> g6p_c + adp_c"
    );
    close(dg0_kj(&p, "HEX"), -17.0, 1e-12);
    close(step(&p, "HEX").dg0_sd.unwrap(), 1000.0, 1e-9);
    // H+ leaves the reactions as protons (net released as the step runs).
    for (id, h) in [
        ("HEX", 1.0),
        ("PFK", 1.0),
        ("GAPD", 1.0),
        ("PYK", -1.0),
        ("PGK", 0.0),
        ("ENO", 0.0),
    ] {
        assert_eq!(step(&p, id).protons, h, "{id}");
    }
    assert!(p.compound("h_c").is_none());
    assert_eq!(reaction_text(&p, "ENO"), "2pg_c -> pep_c + h2o_c");
    // Roles: water is the solvent, carriers are currency.
    assert_eq!(compound(&p, "h2o_c").role, Some(StatedRole::Solvent));
    let w = compound(&p, "h2o_c");
    assert_eq!(
        (w.charge, w.hydrogens, w.conc),
        (Some(0.0), Some(2.0), None)
    );
    for id in ["atp_c", "adp_c", "nad_c", "nadh_c", "pi_c"] {
        assert_eq!(compound(&p, id).role, Some(StatedRole::Currency), "{id}");
    }
    assert_eq!(compound(&p, "g6p_c").role, None);
    // Charge and hydrogens from fbc:charge and the formula's H count.
    let c = compound(&p, "13dpg_c");
    assert_eq!((c.charge, c.hydrogens), (Some(-4.0), Some(4.0)));
    let c = compound(&p, "nadh_c");
    assert_eq!((c.charge, c.hydrogens), (Some(-2.0), Some(27.0)));
    // Concentrations from the table, units from the header or the cell.
    assert_eq!(compound(&p, "13dpg_c").conc, Some(3e-6));
    assert_eq!(compound(&p, "g6p_c").conc, Some(1.2e-3));
    assert_eq!(compound(&p, "glc__D_e").name, "D-glucose");
}

#[test]
fn branch_points_and_bypasses_come_from_the_network() {
    let (out, p) = imported("sbml/chain_l3v1.xml", &with_tables(ROUTE));
    // G6PDH (a dehydrogenase) makes g6p a branch point, LDH makes pyr one.
    assert!(compound(&p, "g6p_c").branch);
    assert!(compound(&p, "pyr_c").branch);
    // Only the objective (GROWTH), a reaction named biomass (BIOMASS_alt),
    // the exchange, the demand or the bypass touch these: no branch points.
    for id in [
        "f6p_c", "fdp_c", "3pg_c", "2pg_c", "pep_c", "glc__D_e", "glc__D_c", "dhap_c",
    ] {
        assert!(!compound(&p, id).branch, "{id}");
    }
    let line = out.text.lines().find(|l| l.starts_with("pyr_c")).unwrap();
    assert!(line.ends_with("# branch point: LDH"), "{line}");
    let line = out.text.lines().find(|l| l.starts_with("g6p_c")).unwrap();
    assert!(line.ends_with("# branch point: G6PDH"), "{line}");
    // The phosphatase undoes the kinase step: a bypass step of PFK.
    let fbp = step(&p, "FBP");
    assert_eq!(fbp.bypass_of, p.step("PFK"));
    assert_eq!(fbp.reaction, "fdp_c + h2o_c -> f6p_c + pi_c");
    close(dg0_kj(&p, "FBP"), -9.2, 1e-12);
    assert_eq!(p.steps.len(), 12);
    assert_eq!(out.bypasses, ["FBP"]);
    assert_eq!(out.branches, ["g6p_c", "pyr_c"]);
    assert_eq!(
        import::summary(&out, "o.toml"),
        "wrote o.toml: 11 route steps, 1 bypass step, 2 branch points\nnote: step 'GLCt' crosses compartments (c, e): its dg0 must include the membrane terms\n"
    );
    // The transport step says its dg0 needs the membrane terms.
    assert!(
        out.text
            .contains("# transport between compartments c and e"),
        "{}",
        out.text
    );
    assert!(
        out.notes
            .iter()
            .any(|n| n.contains("'GLCt' crosses compartments"))
    );
}

#[test]
fn branches_from_all_counts_every_reaction() {
    let o = Options {
        branches_from: BranchesFrom::All,
        ..with_tables(ROUTE)
    };
    let (out, p) = imported("sbml/chain_l3v1.xml", &o);
    assert!(compound(&p, "f6p_c").branch);
    assert!(compound(&p, "glc__D_e").branch);
    let line = out.text.lines().find(|l| l.starts_with("f6p_c")).unwrap();
    assert!(line.ends_with("# branch point: FBP, GROWTH"), "{line}");
}

#[test]
fn level2_with_notes_boundary_species_and_a_kinetic_law_objective() {
    let (_, p) = imported_open("sbml/chain_l2v1.xml", &opts("HEX PGI PFK FBA"));
    assert_eq!(reaction_text(&p, "PGI"), "g6p_c -> f6p_c");
    let c = compound(&p, "g6p_c");
    assert_eq!((c.charge, c.hydrogens), (Some(-2.0), Some(11.0)));
    let c = compound(&p, "f6p_c");
    assert_eq!((c.charge, c.hydrogens), (Some(-2.0), Some(11.0)));
    assert!(compound(&p, "g6p_c").branch);
    // GROW2 is the objective, GLCin starts at a boundary species.
    assert!(!compound(&p, "f6p_c").branch);
    assert!(!compound(&p, "glc_c").branch);
    assert_eq!(step(&p, "PFK").protons, 1.0);
}

#[test]
fn level3_version2_and_gzip() {
    let dir = tempfile::tempdir().unwrap();
    let gz = dir.path().join("small.xml.gz");
    {
        use std::io::Write;
        let text = std::fs::read(path("sbml/small_l3v2.xml")).unwrap();
        let mut enc = flate2::write::GzEncoder::new(
            std::fs::File::create(&gz).unwrap(),
            flate2::Compression::default(),
        );
        enc.write_all(&text).unwrap();
        enc.finish().unwrap();
    }
    let m = import::read_model(&gz).unwrap();
    assert_eq!((m.level, m.version, m.fbc), (3, 2, Some(2)));
    // A byte-order mark before the XML declaration is skipped.
    let bom = dir.path().join("bom.xml");
    let mut text = b"\xef\xbb\xbf".to_vec();
    text.extend(std::fs::read(path("sbml/small_l3v2.xml")).unwrap());
    std::fs::write(&bom, text).unwrap();
    assert_eq!(import::read_model(&bom).unwrap().reactions.len(), 2);
    let out = import::import(&m, "small.xml.gz", &opts("DEHY PROT")).unwrap();
    let p = model::load_str(&out.text, "x.toml");
    // Without tables every value is "?", and the loader names each one.
    let e = p.unwrap_err().to_string();
    for id in ["DEHY", "PROT"] {
        assert!(
            e.contains(&format!("step '{id}': dg0 is still \"?\"")),
            "{e}"
        );
    }
    for id in ["a_c", "b_c", "c_c"] {
        assert!(
            e.contains(&format!("compound '{id}': conc is still \"?\"")),
            "{e}"
        );
    }
    assert_eq!(out.missing_dg0, vec!["DEHY", "PROT"]);
    assert_eq!(out.missing_conc, vec!["a_c", "b_c", "c_c"]);
    assert!(out.text.contains("reaction = \"b_c -> c_c\"\ndg0 = \"?\""));
    assert!(out.text.contains("protons = -1   # from the model's H+"));
}

#[test]
fn list_shows_id_name_and_equation() {
    let m = model("sbml/chain_l3v1.xml");
    let all = import::list(&m, None);
    assert_eq!(all.lines().count(), 19);
    let pgk = import::list(&m, Some("glycerate KIN"));
    assert_eq!(pgk.lines().count(), 1, "{pgk}");
    assert!(
        pgk.starts_with("PGK  phosphoglycerate kinase  3pg_c + atp_c <=> 13dpg_c + adp_c"),
        "{pgk}"
    );
}

/// Writes the import, then check and report it through the binary.
#[test]
fn round_trip_import_check_report() {
    let dir = tempfile::tempdir().unwrap();
    let out_path = dir.path().join("route.toml");
    let m = model("sbml/chain_l3v1.xml");
    let o = Options {
        temperature: Some("30 C".into()),
        ..with_tables(ROUTE)
    };
    let out = import::import(&m, "chain_l3v1.xml", &o).unwrap();
    import::write_new(&out_path, &out.text, false).unwrap();
    // An existing file is kept without force.
    let e = import::write_new(&out_path, "x", false)
        .unwrap_err()
        .to_string();
    assert!(e.contains("exists already; give --force"), "{e}");
    assert_eq!(std::fs::read_to_string(&out_path).unwrap(), out.text);
    let f = out_path.to_str().unwrap();
    let r = run(&["check", f]);
    assert_eq!(r.status.code(), Some(0), "{:?}", texts(&r));
    let r = run(&["report", f, "--format", "json"]);
    let (so, se) = texts(&r);
    assert_eq!(r.status.code(), Some(0), "{se}");
    let j: serde_json::Value = serde_json::from_str(&so).unwrap();
    let s = j["steps"]
        .as_array()
        .unwrap()
        .iter()
        .find(|s| s["id"] == "PGK")
        .unwrap();
    // dG' = dG'° + RT ln Q at 30 C (no dh0: the 25 C dG'° is kept; I and pH at the reference).
    let rt = 8.314462618e-3 * 303.15; // R exact in the 2019 SI (CODATA 2018)
    let q: f64 = (0.5e-3 * 3e-3) / (3e-6 * 0.8e-3);
    close(s["dg0"].as_f64().unwrap(), -18.5, 1e-9);
    close(s["dg"].as_f64().unwrap(), -18.5 + rt * q.ln(), 1e-6);
    // GAPD turns twice per pass: FBA makes two trioses.
    let gapd = j["steps"]
        .as_array()
        .unwrap()
        .iter()
        .find(|s| s["id"] == "GAPD")
        .unwrap();
    close(gapd["times"].as_f64().unwrap(), 2.0, 1e-12);
    // The reverse route takes the bypass in place of PFK.
    let r = run(&["report", f, "--reverse", "--format", "json"]);
    let (so, se) = texts(&r);
    assert_eq!(r.status.code(), Some(0), "{se}");
    let j: serde_json::Value = serde_json::from_str(&so).unwrap();
    let ids: Vec<&str> = j["steps"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["id"].as_str().unwrap())
        .collect();
    assert_eq!(
        ids,
        [
            "PYK", "ENO", "PGM", "PGK", "GAPD", "TPI", "FBA", "FBP", "PGI", "HEX", "GLCt"
        ]
    );
}

#[test]
fn a_missing_dg0_makes_check_fail_naming_the_step() {
    let dir = tempfile::tempdir().unwrap();
    let mut o = with_tables(ROUTE);
    if let Some(t) = o.dg0.as_mut() {
        t.rows.retain(|r| r.step != "PYK" && r.step != "PGM");
    }
    let m = model("sbml/chain_l3v1.xml");
    let out = import::import(&m, "chain_l3v1.xml", &o).unwrap();
    assert_eq!(out.missing_dg0, vec!["PGM", "PYK"]);
    assert!(out.text.contains("dg0 = \"?\"   # not in the dg0 table"));
    let f = dir.path().join("route.toml");
    import::write_new(&f, &out.text, false).unwrap();
    let r = run(&["check", f.to_str().unwrap()]);
    let (_, err) = texts(&r);
    assert_eq!(r.status.code(), Some(1), "{err}");
    assert!(err.contains("step 'PGM': dg0 is still \"?\""), "{err}");
    assert!(err.contains("step 'PYK': dg0 is still \"?\""), "{err}");
    // Every analysing command refuses it the same way.
    let r = run(&["report", f.to_str().unwrap()]);
    let (_, err) = texts(&r);
    assert_eq!(r.status.code(), Some(1), "{err}");
    assert!(err.contains("step 'PGM': dg0 is still \"?\""), "{err}");
}

#[test]
fn model_ids_may_start_with_a_digit() {
    let text = r#"format = 1
[pathway]
name = "t"
[conditions]
temperature = "25 C"
[compounds]
13dpg_c = { conc = "3 uM" }
3pg_c = { conc = "1 mM" }
2atp = { conc = "1 mM" }
atp = { conc = "1 mM" }
[[steps]]
id = "2step"
reaction = "2 13dpg_c + 2atp -> 3pg_c + 2atp2"
dg0 = -5
"#;
    // The declared id wins over a glued coefficient; an undeclared one is named.
    let e = model::load_str(text, "x.toml").unwrap_err().to_string();
    assert!(e.contains("unknown compound 'atp2'"), "{e}");
    let p = model::load_str(&text.replace("2atp2", "2 atp"), "x.toml").unwrap();
    let s = step(&p, "2step");
    let id = |i: usize| p.compounds[i].id.as_str();
    let st: Vec<(&str, f64)> = s.stoich.iter().map(|&(c, v)| (id(c), v)).collect();
    assert_eq!(
        st,
        [
            ("13dpg_c", -2.0),
            ("2atp", -1.0),
            ("3pg_c", 1.0),
            ("atp", 2.0)
        ]
    );
}

fn import_err(rel: &str, o: &Options) -> String {
    let m = model(rel);
    import::import(&m, rel, o).unwrap_err().to_string()
}

#[test]
fn ambiguous_orientation_names_the_step_and_flip_or_keep_decides() {
    let e = import_err("sbml/chain_l3v1.xml", &opts("FBA TPI"));
    assert!(e.contains("step 'TPI'") && e.contains("--flip TPI"), "{e}");
    assert!(!e.contains("step 'FBA'"), "{e}");
    let keep = Options {
        keep: vec!["TPI".into()],
        ..opts("FBA TPI")
    };
    let (_, p) = imported("sbml/chain_l3v1.xml", &load_free(keep));
    assert_eq!(reaction_text(&p, "TPI"), "dhap_c -> g3p_c");
    let flip = Options {
        flip: vec!["TPI".into()],
        ..opts("FBA TPI")
    };
    let m = model("sbml/chain_l3v1.xml");
    let out = import::import(&m, "m", &flip).unwrap();
    assert!(
        out.text.contains("reaction = \"g3p_c -> dhap_c\""),
        "{}",
        out.text
    );
}

/// Fills every "?" so that the loader accepts the file.
fn load_free(o: Options) -> Options {
    let dg0 = std::fs::read_to_string(path("sbml/chain_dg0.csv")).unwrap();
    let conc = std::fs::read_to_string(path("sbml/chain_conc.csv")).unwrap();
    Options {
        dg0: Some(tables::read_dg0(&dg0, "chain_dg0.csv").unwrap()),
        conc: Some(tables::read_conc(&conc, "chain_conc.csv").unwrap()),
        ..o
    }
}

#[test]
fn bad_inputs_get_clear_messages() {
    let dir = tempfile::tempdir().unwrap();
    let write = |name: &str, text: &[u8]| {
        let p = dir.path().join(name);
        std::fs::write(&p, text).unwrap();
        p
    };
    let e = import::read_model(&write("a.xml", b"this is not xml <"))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("a.xml:1:") && e.contains("is not well-formed XML"),
        "{e}"
    );
    let e = import::read_model(&write(
        "b.xml",
        b"<?xml version=\"1.0\"?>\n<html><body/></html>",
    ))
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("b.xml:2:") && e.contains("not SBML (its top element is <html>"),
        "{e}"
    );
    let e = import::read_model(&write("c.xml", b"\xff\xfe binary"))
        .unwrap_err()
        .to_string();
    assert!(e.contains("is not UTF-8 text"), "{e}");
    let e = import::read_model(&dir.path().join("none.xml"))
        .unwrap_err()
        .to_string();
    assert!(e.contains("no such file"), "{e}");
    // An unknown route id, with close ids suggested.
    let e = import_err("sbml/chain_l3v1.xml", &opts("HEX PGII PFK"));
    assert!(
        e.contains("no reaction 'PGII'") && e.contains("did you mean 'PGI'"),
        "{e}"
    );
    // Steps that do not connect.
    let e = import_err("sbml/chain_l3v1.xml", &opts("HEX PFK"));
    assert!(e.contains("do not connect: 'HEX' (glc__D_c + atp_c -> g6p_c + adp_c + h_c) and 'PFK' (f6p_c + atp_c -> fdp_c + adp_c + h_c) share no compound"), "{e}");
    // A forced direction that breaks the chain.
    let e = import_err(
        "sbml/chain_l3v1.xml",
        &Options {
            flip: vec!["PGI".into()],
            ..opts("HEX PGI PFK")
        },
    );
    assert!(
        e.contains("do not connect: 'HEX' makes g6p_c + adp_c but 'PGI' uses f6p_c"),
        "{e}"
    );
    // A table row for a reaction the model lacks; a bad unit.
    let mut o = opts("HEX PGI");
    o.dg0 = Some(tables::read_dg0("step,dg0 [kJ/mol]\nHEX,-17\nHEK,-3\n", "d.csv").unwrap());
    let e = import_err("sbml/chain_l3v1.xml", &o);
    assert!(
        e.contains("d.csv:3:")
            && e.contains("no reaction 'HEK'")
            && e.contains("did you mean 'HEX'"),
        "{e}"
    );
    let mut o = opts("HEX PGI");
    o.conc = Some(tables::read_conc("compound,conc [mM]\ng6p,1\n", "c.csv").unwrap());
    let e = import_err("sbml/chain_l3v1.xml", &o);
    assert!(
        e.contains("c.csv:2:")
            && e.contains("no species 'g6p'")
            && e.contains("did you mean 'g6p_c'"),
        "{e}"
    );
    let e = tables::read_dg0("step,dg0 [kJ/mole]\nHEX,-17\n", "d.csv")
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("d.csv:2:") && e.contains("unknown unit 'kJ/mole'"),
        "{e}"
    );
    let e = import_err(
        "sbml/chain_l3v1.xml",
        &Options {
            flip: vec!["FBP".into()],
            ..opts("HEX PGI")
        },
    );
    assert!(e.contains("'FBP', which is not on the route"), "{e}");
    let e = import_err("sbml/chain_l3v1.xml", &opts("EX_glc__D_e GLCt"));
    assert!(
        e.contains("route step 'EX_glc__D_e' (glc__D_e <=>) has nothing on one side"),
        "{e}"
    );
    let e = import_err("sbml/chain_l3v1.xml", &opts("HEX PGI HEX"));
    assert!(e.contains("lists 'HEX' twice"), "{e}");
}

#[test]
fn a_bypass_undoes_the_step_whose_compounds_it_shares() {
    let (out, p) = imported_open("sbml/uptake_l3v1.xml", &opts("UPT LUMP ENO PYK"));
    let pps = step(&p, "PPS");
    assert_eq!(pps.bypass_of, p.step("PYK"));
    assert_eq!(
        pps.reaction,
        "pyr_c + atp_c + h2o_c -> pep_c + amp_c + pi_c"
    );
    assert_eq!(pps.protons, 2.0);
    // Known by id when the model gives no formula.
    assert!(p.compound("h_c").is_none());
    assert_eq!(compound(&p, "h2o_c").role, Some(StatedRole::Solvent));
    assert_eq!(compound(&p, "amp_c").role, Some(StatedRole::Currency));
    assert_eq!(compound(&p, "pyr_c").charge, None);
    // Neither pep nor pyr is a branch point: PPS is the bypass.
    assert!(!out.text.contains("branch = true"), "{}", out.text);
    assert_eq!(step(&p, "PYK").protons, -1.0);
}

#[test]
fn a_branch_point_comment_names_five_reactions_and_counts_the_rest() {
    // A small Level 3 model made in the test: A -> B -> C, and seven
    // reactions that each take B elsewhere.
    let mut species = vec!["a", "b", "c"];
    let x: Vec<String> = (1..=7).map(|i| format!("x{i}")).collect();
    species.extend(x.iter().map(String::as_str));
    let mut reactions = vec![("S1", "a", "b"), ("S2", "b", "c")];
    let outs: Vec<String> = (1..=7).map(|i| format!("OUT{i}")).collect();
    for (o, xi) in outs.iter().zip(&x) {
        reactions.push((o.as_str(), "b", xi.as_str()));
    }
    let xml = inline_model(&species, &reactions);
    let m = import::sbml::parse(&xml, "m.xml").unwrap();
    let out = import::import(&m, "m.xml", &opts("S1 S2")).unwrap();
    let line = out.text.lines().find(|l| l.starts_with("b ")).unwrap();
    assert!(
        line.ends_with("# conc not in the table: fill it in; branch point: OUT1, OUT2, OUT3, OUT4, OUT5 and 2 more"),
        "{line}"
    );
}

#[test]
fn a_reaction_unbalanced_in_hydrogen_keeps_the_h_plus_count_as_a_comment() {
    // The hand-written model with compound B given one H too few.
    let xml = std::fs::read_to_string(path("sbml/small_l3v2.xml"))
        .unwrap()
        .replace(
            "fbc:chemicalFormula=\"C3H3O2\"",
            "fbc:chemicalFormula=\"C3H2O2\"",
        );
    let m = import::sbml::parse(&xml, "m.xml").unwrap();
    let out = import::import(&m, "m.xml", &opts("DEHY PROT")).unwrap();
    // DEHY: A (5 H) -> B (2 H) + water (2 H) releases 1 H+ by the hydrogens, 0 by the model's H+.
    assert!(
        out.text.contains("# protons = 0: the model's H+; left out because the model's reaction is not balanced in hydrogen\n# (its reactants' hydrogens give 1, which dgpath uses)"),
        "{}",
        out.text
    );
    assert!(
        out.text
            .contains("# protons = -1: the model's H+; left out"),
        "{}",
        out.text
    );
    assert!(!out.text.contains("\nprotons ="), "{}", out.text);
    assert_eq!(out.notes.len(), 2, "{:?}", out.notes);
}

/// The command itself: writes, refuses to overwrite without --force, lists.
#[test]
fn import_command_through_the_binary() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("route.toml");
    let o = out.to_str().unwrap();
    let model = path("sbml/chain_l3v1.xml");
    let dg0 = path("sbml/chain_dg0.csv");
    let conc = path("sbml/chain_conc.csv");
    let args = [
        "import",
        model.to_str().unwrap(),
        "--route",
        "GLCt,HEX PGI PFK FBA TPI GAPD PGK PGM ENO PYK",
        "--dg0",
        dg0.to_str().unwrap(),
        "--conc",
        conc.to_str().unwrap(),
        "--temperature",
        "37 C",
        "--ph",
        "7.2",
        "-o",
        o,
    ];
    let r = run(&args);
    let (so, se) = texts(&r);
    assert_eq!(r.status.code(), Some(0), "{se}");
    assert!(
        so.starts_with(&format!(
            "wrote {o}: 11 route steps, 1 bypass step, 2 branch points\n"
        )),
        "{so}"
    );
    let text = std::fs::read_to_string(&out).unwrap();
    assert!(
        text.contains("temperature = \"37 C\"   # --temperature\nph = 7.2   # --ph"),
        "{text}"
    );
    let r = run(&["check", o]);
    assert_eq!(r.status.code(), Some(0), "{:?}", texts(&r));
    // An existing file is kept, unless --force.
    std::fs::write(&out, "# mine\n").unwrap();
    let r = run(&args);
    let (_, se) = texts(&r);
    assert_eq!(r.status.code(), Some(1), "{se}");
    assert!(se.contains("exists already; give --force"), "{se}");
    assert_eq!(std::fs::read_to_string(&out).unwrap(), "# mine\n");
    let mut forced = args.to_vec();
    forced.push("--force");
    let r = run(&forced);
    assert_eq!(r.status.code(), Some(0), "{:?}", texts(&r));
    assert_eq!(std::fs::read_to_string(&out).unwrap(), text);
    // --list --grep
    let r = run(&[
        "import",
        model.to_str().unwrap(),
        "--list",
        "--grep",
        "KINASE",
    ]);
    let (so, _) = texts(&r);
    let ids: Vec<&str> = so
        .lines()
        .map(|l| l.split_whitespace().next().unwrap())
        .collect();
    assert_eq!(ids, ["HEX", "PFK", "PGK", "PYK"], "{so}");
    // Bad input: exit 1 with the file named, never a panic.
    let bad = dir.path().join("notes.xml");
    std::fs::write(&bad, "<notes>just notes</notes>").unwrap();
    let r = run(&[
        "import",
        bad.to_str().unwrap(),
        "--route",
        "A B",
        "-o",
        o,
        "--force",
    ]);
    let (_, se) = texts(&r);
    assert_eq!(r.status.code(), Some(1), "{se}");
    assert!(se.contains("notes.xml:1: is XML but not SBML"), "{se}");
    let r = run(&[
        "import",
        model.to_str().unwrap(),
        "--route",
        "HEX PGI",
        "--dg0",
        "missing.csv",
        "-o",
        o,
        "--force",
    ]);
    let (_, se) = texts(&r);
    assert_eq!(r.status.code(), Some(1), "{se}");
    assert!(se.contains("missing.csv: no such file"), "{se}");
    // Without --route or -o: a usage error.
    let r = run(&["import", model.to_str().unwrap()]);
    assert_eq!(r.status.code(), Some(2));
}

/// A Level 3 Version 2 model made in a test: species in compartment c and
/// irreversible one-to-one reactions (id, from, to), no formulas.
fn inline_model(species: &[&str], reactions: &[(&str, &str, &str)]) -> String {
    let sp: Vec<String> = species
        .iter()
        .map(|id| {
            format!(
                r#"<species id="M_{id}" compartment="c" hasOnlySubstanceUnits="false" boundaryCondition="false" constant="false"/>"#
            )
        })
        .collect();
    let rx: Vec<String> = reactions
        .iter()
        .map(|(id, from, to)| {
            format!(
                r#"<reaction id="R_{id}" reversible="false"><listOfReactants><speciesReference species="M_{from}" stoichiometry="1" constant="true"/></listOfReactants><listOfProducts><speciesReference species="M_{to}" stoichiometry="1" constant="true"/></listOfProducts></reaction>"#
            )
        })
        .collect();
    format!(
        r#"<?xml version="1.0" encoding="UTF-8"?>
<sbml xmlns="http://www.sbml.org/sbml/level3/version2/core" level="3" version="2">
<model id="m"><listOfCompartments><compartment id="c" constant="true"/></listOfCompartments>
<listOfSpecies>{}</listOfSpecies><listOfReactions>{}</listOfReactions></model></sbml>"#,
        sp.join("\n"),
        rx.join("\n")
    )
}

#[test]
fn a_bypass_over_several_steps_stands_in_for_the_last_and_names_the_others() {
    let xml = inline_model(
        &["a", "b", "c", "d"],
        &[
            ("S1", "a", "b"),
            ("S2", "b", "c"),
            ("S3", "c", "d"),
            ("BACK", "d", "a"),
        ],
    );
    let m = import::sbml::parse(&xml, "m.xml").unwrap();
    let out = import::import(&m, "m.xml", &opts("S1 S2 S3")).unwrap();
    assert_eq!(out.bypasses, ["BACK"]);
    assert!(
        out.text.contains("bypass_of = \"S3\"   # undoes S3: a reaction of the model that runs it backward; it also undoes S1, S2, which still run backward in the reverse route"),
        "{}",
        out.text
    );
    assert!(out.branches.is_empty());
}

/// A file written by the import is an ordinary pathway file: saving an edit
/// into it (as the explorer's `s` does) keeps every comment the import
/// wrote, and reading it back gives every other value unchanged.
#[test]
fn an_imported_file_keeps_its_comments_and_values_through_a_save() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("route.toml");
    let o = Options {
        temperature: Some("30 C".into()),
        ..with_tables(ROUTE)
    };
    let out = import::import(&model("sbml/chain_l3v1.xml"), "chain_l3v1.xml", &o).unwrap();
    import::write_new(&path, &out.text, false).unwrap();
    let before = model::load_str(&out.text, "route.toml").unwrap();
    let mut state = dgpath::scenario::State::from_pathway(&before);
    let g6p = before
        .compounds
        .iter()
        .position(|c| c.id == "g6p_c")
        .unwrap();
    state.conc[g6p] = 0.25e-3;
    let saved = dgpath::scenario::save::save(&path, &out.text, &before, &state).unwrap();
    let comments: Vec<&str> = out
        .text
        .lines()
        .filter(|l| l.contains('#'))
        .map(|l| &l[l.find('#').unwrap()..])
        .collect();
    assert!(comments.len() > 5, "the import writes comments");
    for c in &comments {
        assert!(saved.contains(c), "comment lost in the save: {c}");
    }
    let after = model::load_str(&std::fs::read_to_string(&path).unwrap(), "route.toml").unwrap();
    assert_eq!(after.compounds[g6p].conc, Some(0.25e-3));
    for (a, b) in before.compounds.iter().zip(&after.compounds) {
        assert_eq!(a.id, b.id);
        if a.id != "g6p_c" {
            assert_eq!(a.conc, b.conc, "{}", a.id);
        }
        assert_eq!((a.charge, a.hydrogens), (b.charge, b.hydrogens), "{}", a.id);
    }
    for (a, b) in before.steps.iter().zip(&after.steps) {
        assert_eq!(
            (&a.id, &a.stoich, a.protons, a.bypass_of),
            (&b.id, &b.stoich, b.protons, b.bypass_of)
        );
    }
}
