//! `dgpath import`, run by hand (`cargo bench --bench import`; divan).
//! Writes an invented genome-scale-sized SBML model: the hand-written test
//! network (tests/sbml/chain_l3v1.xml) plus generated species and reactions
//! up to about 2,600 reactions and 1,800 species, each with notes and an
//! annotation block as real models carry them (about 10 MB). Then times
//! reading (parse), importing the glycolytic route with its tables, loading
//! the written file back, and all three. Target: the whole import well under
//! a second.
//!
//! Settings by environment: `DGPATH_BENCH_REACTIONS` (default 2,600),
//! `DGPATH_BENCH_SPECIES` (default 1,800), `DGPATH_BENCH_KEEP=FILE.xml` (keep
//! the model, e.g. to time the binary itself:
//! `dgpath import FILE.xml --route "GLCt HEX PGI PFK FBA TPI GAPD PGK PGM ENO PYK" -o out.toml`).

use dgpath::import::{self, Options, tables};
use std::fmt::Write as _;

const ROUTE: &str = "GLCt HEX PGI PFK FBA TPI GAPD PGK PGM ENO PYK";

fn main() {
    divan::main();
}

/// The written model and the import's tables (made once).
struct Setup {
    path: std::path::PathBuf,
    dg0: String,
    conc: String,
    _dir: tempfile::TempDir,
}

static SETUP: std::sync::LazyLock<Setup> = std::sync::LazyLock::new(setup);

fn env_or(name: &str, default: usize) -> usize {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

fn setup() -> Setup {
    let n_reactions = env_or("DGPATH_BENCH_REACTIONS", 2_600);
    let n_species = env_or("DGPATH_BENCH_SPECIES", 1_800);
    let root = env!("CARGO_MANIFEST_DIR");
    let base = std::fs::read_to_string(format!("{root}/tests/sbml/chain_l3v1.xml")).unwrap();
    let core_species = base.matches("<species ").count();
    let core_reactions = base.matches("<reaction ").count();
    let core_ids: Vec<String> = base
        .match_indices("<species id=\"")
        .map(|(i, m)| {
            let rest = &base[i + m.len()..];
            rest[..rest.find('"').unwrap()].to_string()
        })
        .collect();

    // xorshift64: deterministic choices without a dependency.
    let mut x: u64 = 0x9E37_79B9_7F4A_7C15;
    let mut next = |n: usize| {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x % n as u64) as usize
    };
    let mut species = String::new();
    let extra_species = n_species.saturating_sub(core_species);
    for i in 0..extra_species {
        let (c, h, o) = (2 + next(20), 2 + next(30), 1 + next(12));
        let z = -(next(4) as i64);
        let _ = write!(
            species,
            "      <species metaid=\"meta_M_x{i}_c\" id=\"M_x{i}_c\" name=\"invented metabolite {i}\" compartment=\"c\" hasOnlySubstanceUnits=\"false\" boundaryCondition=\"false\" constant=\"false\" fbc:charge=\"{z}\" fbc:chemicalFormula=\"C{c}H{h}O{o}\">\n        <notes><body xmlns=\"http://www.w3.org/1999/xhtml\"><p>invented for the import benchmark</p><p>FORMULA: C{c}H{h}O{o}</p><p>CHARGE: {z}</p><p>INCHI: none (invented)</p></body></notes>\n        <annotation><rdf:RDF xmlns:rdf=\"http://www.w3.org/1999/02/22-rdf-syntax-ns#\" xmlns:bqbiol=\"http://biomodels.net/biology-qualifiers/\"><rdf:Description rdf:about=\"#meta_M_x{i}_c\"><bqbiol:is><rdf:Bag><rdf:li rdf:resource=\"https://example.org/invented/compound/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/other/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/structure/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/name/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/record/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/entry/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/0/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/1/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/2/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/3/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/4/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/synonym/5/{i}\"/></rdf:Bag></bqbiol:is></rdf:Description></rdf:RDF></annotation>\n      </species>\n"
        );
    }
    let pick = |next: &mut dyn FnMut(usize) -> usize| -> String {
        // One reference in 40 touches the hand-written network, so route
        // compounds get branch points as in a real model.
        if next(40) == 0 {
            core_ids[next(core_ids.len())].clone()
        } else {
            format!("M_x{}_c", next(extra_species.max(1)))
        }
    };
    let mut reactions = String::new();
    let extra_reactions = n_reactions.saturating_sub(core_reactions);
    for i in 0..extra_reactions {
        let mut used: Vec<String> = Vec::new();
        let refs = |k: usize, next: &mut dyn FnMut(usize) -> usize, used: &mut Vec<String>| {
            let mut s = String::new();
            for _ in 0..k {
                let id = pick(next);
                if used.contains(&id) {
                    continue;
                }
                let coef = 1 + next(2);
                let _ = writeln!(
                    s,
                    "          <speciesReference species=\"{id}\" stoichiometry=\"{coef}\" constant=\"true\"/>"
                );
                used.push(id);
            }
            s
        };
        let left = refs(1 + next(3), &mut next, &mut used);
        let right = refs(1 + next(3), &mut next, &mut used);
        let rev = if next(2) == 0 { "true" } else { "false" };
        let lb = if rev == "true" { "lb_back" } else { "lb_zero" };
        let _ = write!(
            reactions,
            "      <reaction metaid=\"meta_R_X{i}\" id=\"R_X{i}\" name=\"invented reaction {i}\" reversible=\"{rev}\" fast=\"false\" fbc:lowerFluxBound=\"{lb}\" fbc:upperFluxBound=\"ub_fwd\">\n        <notes><body xmlns=\"http://www.w3.org/1999/xhtml\"><p>GENE_ASSOCIATION: g{a} and g{b}</p><p>SUBSYSTEM: invented subsystem {s}</p><p>CONFIDENCE LEVEL: 2</p><p>AUTHORS: invented for the import benchmark, not a real reference</p></body></notes>\n        <annotation><rdf:RDF xmlns:rdf=\"http://www.w3.org/1999/02/22-rdf-syntax-ns#\" xmlns:bqbiol=\"http://biomodels.net/biology-qualifiers/\"><rdf:Description rdf:about=\"#meta_R_X{i}\"><bqbiol:is><rdf:Bag><rdf:li rdf:resource=\"https://example.org/invented/reaction/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/enzyme/{a}\"/><rdf:li rdf:resource=\"https://example.org/invented/pathway/{s}\"/><rdf:li rdf:resource=\"https://example.org/invented/rule/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/class/{a}.{b}\"/><rdf:li rdf:resource=\"https://example.org/invented/record/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/entry/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/link/{i}\"/></rdf:Bag></bqbiol:is><bqbiol:isDescribedBy><rdf:Bag><rdf:li rdf:resource=\"https://example.org/invented/paper/{a}\"/><rdf:li rdf:resource=\"https://example.org/invented/paper/{b}\"/><rdf:li rdf:resource=\"https://example.org/invented/note/{i}\"/></rdf:Bag></bqbiol:isDescribedBy><bqbiol:hasProperty><rdf:Bag><rdf:li rdf:resource=\"https://example.org/invented/property/0/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/1/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/2/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/3/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/4/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/5/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/6/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/7/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/8/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/9/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/10/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/11/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/12/{i}\"/><rdf:li rdf:resource=\"https://example.org/invented/property/13/{i}\"/></rdf:Bag></bqbiol:hasProperty></rdf:Description></rdf:RDF></annotation>\n        <listOfReactants>\n{left}        </listOfReactants>\n        <listOfProducts>\n{right}        </listOfProducts>\n      </reaction>\n",
            a = next(1500),
            b = next(1500),
            s = next(90),
        );
    }
    let text = base
        .replacen(
            "    </listOfSpecies>",
            &format!("{species}    </listOfSpecies>"),
            1,
        )
        .replacen(
            "    </listOfReactions>",
            &format!("{reactions}    </listOfReactions>"),
            1,
        );
    let dir = tempfile::tempdir().unwrap();
    let path = std::env::var_os("DGPATH_BENCH_KEEP")
        .map(std::path::PathBuf::from)
        .unwrap_or_else(|| dir.path().join("big.xml"));
    std::fs::write(&path, &text).unwrap();
    let dg0 = std::fs::read_to_string(format!("{root}/tests/sbml/chain_dg0.csv")).unwrap();
    let conc = std::fs::read_to_string(format!("{root}/tests/sbml/chain_conc.csv")).unwrap();
    let model = import::read_model(&path).unwrap();
    let out = import::import(&model, "big.xml", &options(&dg0, &conc)).unwrap();
    println!(
        "model: {} reactions, {} species, {:.1} MB; route of {} steps, {} branch points",
        model.reactions.len(),
        model.species.len(),
        text.len() as f64 / 1e6,
        ROUTE.split_whitespace().count(),
        out.text.matches("branch = true").count()
    );
    Setup {
        path,
        dg0,
        conc,
        _dir: dir,
    }
}

fn options(dg0: &str, conc: &str) -> Options {
    Options {
        route: ROUTE.split_whitespace().map(str::to_string).collect(),
        dg0: Some(tables::read_dg0(dg0, "chain_dg0.csv").unwrap()),
        conc: Some(tables::read_conc(conc, "chain_conc.csv").unwrap()),
        ..Options::default()
    }
}

#[divan::bench(sample_count = 10)]
fn read_and_parse() -> usize {
    import::read_model(&SETUP.path).unwrap().reactions.len()
}

#[divan::bench(sample_count = 10)]
fn import_route(bencher: divan::Bencher) {
    let s = &*SETUP;
    let model = import::read_model(&s.path).unwrap();
    bencher.bench_local(|| import::import(&model, "big.xml", &options(&s.dg0, &s.conc)).unwrap());
}

#[divan::bench(sample_count = 10)]
fn load_back(bencher: divan::Bencher) {
    let s = &*SETUP;
    let model = import::read_model(&s.path).unwrap();
    let out = import::import(&model, "big.xml", &options(&s.dg0, &s.conc)).unwrap();
    bencher.bench_local(|| dgpath::model::load_str(&out.text, "out.toml").unwrap());
}

#[divan::bench(sample_count = 10)]
fn whole_import() -> bool {
    let s = &*SETUP;
    let model = import::read_model(&s.path).unwrap();
    let out = import::import(&model, "big.xml", &options(&s.dg0, &s.conc)).unwrap();
    dgpath::model::load_str(&out.text, "out.toml").is_ok()
}
