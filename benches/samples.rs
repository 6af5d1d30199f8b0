//! Many samples, run by hand (`cargo bench --bench samples`; divan). Writes
//! an invented table of N samples (default 10,000; `DGPATH_BENCH_SAMPLES=N`)
//! for the fermenter demo — the demo time course with random ±30 % noise on
//! every cell — then times reading + parallel analysis + summary, the same
//! with per-sample CSV rows rendered and discarded, reading alone, and one
//! driving-force optimisation per sample. Target: 10,000 samples in ≤ 1 s on
//! 2 cores. Memory is a whole-process figure: keep the table
//! (`DGPATH_BENCH_KEEP=FILE.csv`) and time the binary itself, e.g.
//! `dgpath mdf pathways/fermenter.toml --samples FILE.csv --format json`.

use dgpath::analysis::{self, batch};
use dgpath::model::samples::SampleReader;
use dgpath::report::{EnergyUnit, samples as render};
use dgpath::scenario::State;
use std::io::Write;

fn main() {
    divan::main();
}

/// The pathway, its state and the written table (made once).
struct Setup {
    prep: analysis::Prepared,
    base: State,
    path: std::path::PathBuf,
    n: usize,
    _dir: tempfile::TempDir,
}

static SETUP: std::sync::LazyLock<Setup> = std::sync::LazyLock::new(setup);

fn setup() -> Setup {
    let n: usize = std::env::var("DGPATH_BENCH_SAMPLES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000);
    let root = env!("CARGO_MANIFEST_DIR");
    let prep = analysis::prepare(
        dgpath::model::load_file(format!("{root}/pathways/fermenter.toml").as_ref()).unwrap(),
    )
    .unwrap();
    let base = State::from_pathway(&prep.pathway);
    let demo = std::fs::read_to_string(format!("{root}/pathways/fermenter-samples.csv")).unwrap();
    let mut lines = demo.lines();
    let header = lines.next().unwrap();
    let rows: Vec<Vec<f64>> = lines
        .map(|l| l.split(',').skip(1).map(|v| v.parse().unwrap()).collect())
        .collect();

    let dir = tempfile::tempdir().unwrap();
    let path = std::env::var_os("DGPATH_BENCH_KEEP")
        .map(std::path::PathBuf::from)
        .unwrap_or_else(|| dir.path().join("many.csv"));
    {
        let mut f = std::io::BufWriter::new(std::fs::File::create(&path).unwrap());
        writeln!(f, "{header}").unwrap();
        let mut x: u64 = 0x9E37_79B9_7F4A_7C15;
        for i in 0..n {
            write!(f, "s{i:06}").unwrap();
            for v in &rows[i % rows.len()] {
                // xorshift64: deterministic noise without a dependency.
                x ^= x << 13;
                x ^= x >> 7;
                x ^= x << 17;
                let u = (x >> 11) as f64 / (1u64 << 53) as f64;
                write!(f, ",{:.4}", v * (0.7 + 0.6 * u)).unwrap();
            }
            writeln!(f).unwrap();
        }
    }
    println!(
        "{n} samples × {} route steps, {} rayon threads",
        prep.forward.steps.len(),
        rayon::current_num_threads()
    );
    Setup {
        prep,
        base,
        path,
        n,
        _dir: dir,
    }
}

#[divan::bench(sample_count = 5)]
fn read_analyse_summary() -> usize {
    let s = &*SETUP;
    let r = SampleReader::open(&s.path, &s.prep.pathway, &s.base.conc).unwrap();
    let k = batch::run(&s.prep, &s.base, r, |_, _| String::new(), |_| Ok(()))
        .unwrap()
        .samples;
    assert_eq!(k, s.n);
    k
}

#[divan::bench(sample_count = 5)]
fn read_analyse_summary_csv_rows() -> usize {
    let s = &*SETUP;
    let r = SampleReader::open(&s.path, &s.prep.pathway, &s.base.conc).unwrap();
    let mut sink = std::io::sink();
    let k = batch::run(
        &s.prep,
        &s.base,
        r,
        |name, a| render::csv_rows(&s.prep, name, a, EnergyUnit::KJ),
        |t| sink.write_all(t.as_bytes()),
    )
    .unwrap()
    .samples;
    assert_eq!(k, s.n);
    k
}

#[divan::bench(sample_count = 5)]
fn read_only() -> usize {
    let s = &*SETUP;
    SampleReader::open(&s.path, &s.prep.pathway, &s.base.conc)
        .unwrap()
        .filter(|r| r.is_ok())
        .count()
}

/// One optimisation per sample, in table order, as `mdf --samples` does
/// (without the output); held carriers differ between rows, so most rows
/// are distinct programmes.
#[divan::bench(sample_count = 3)]
fn optimum_per_sample() -> usize {
    let s = &*SETUP;
    let mut batch = analysis::mdf::Batch::default();
    let opts = analysis::mdf::Options::default();
    let mut k = 0;
    for row in SampleReader::open(&s.path, &s.prep.pathway, &s.base.conc).unwrap() {
        let row = row.unwrap();
        let st = State {
            conc: row.conc,
            ..s.base.clone()
        };
        batch.solve(&s.prep, &st, &opts).unwrap();
        k += 1;
    }
    k
}
