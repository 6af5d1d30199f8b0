//! Benchmark for many samples (run by hand: `cargo bench --bench samples`).
//! Writes an invented table of N samples (default 10,000) for the fermenter
//! demo — the demo time course with random ±30 % noise on every cell — then
//! times reading + parallel analysis + summary, and the same with per-sample
//! CSV rows rendered and discarded. Target: 10,000 samples in ≤ 1 s on
//! 2 cores, peak memory ≤ 100 MB (measure with `/usr/bin/time -v`).
//!
//! Options: `--samples N`, `--keep FILE.csv` (keep the table, e.g. to time the
//! binary itself: `dgpath report pathways/fermenter.toml --samples FILE.csv`).

use dgpath::analysis::{self, batch};
use dgpath::model::samples::SampleReader;
use dgpath::report::{EnergyUnit, samples as render};
use dgpath::scenario::State;
use std::io::Write;
use std::time::{Duration, Instant};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let opt = |name: &str| {
        args.iter()
            .position(|a| a == name)
            .and_then(|i| args.get(i + 1))
            .cloned()
    };
    let n: usize = opt("--samples")
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
    let path = opt("--keep")
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
    let threads = rayon::current_num_threads();
    println!(
        "{n} samples × {} route steps, {threads} rayon threads",
        prep.forward.steps.len()
    );

    let time = |label: &str, f: &dyn Fn() -> usize| {
        let mut t: Vec<Duration> = (0..5)
            .map(|_| {
                let s = Instant::now();
                let k = f();
                assert_eq!(k, n);
                s.elapsed()
            })
            .collect();
        t.sort();
        println!(
            "{label:<40} min {:>8.1} ms   median {:>8.1} ms",
            t[0].as_secs_f64() * 1e3,
            t[2].as_secs_f64() * 1e3
        );
    };
    time("read + analyse + summary", &|| {
        let r = SampleReader::open(&path, &prep.pathway, &base.conc).unwrap();
        batch::run(&prep, &base, r, |_, _| String::new(), |_| Ok(()))
            .unwrap()
            .samples
    });
    time("read + analyse + summary + CSV rows", &|| {
        let r = SampleReader::open(&path, &prep.pathway, &base.conc).unwrap();
        let mut sink = std::io::sink();
        batch::run(
            &prep,
            &base,
            r,
            |name, a| render::csv_rows(&prep, name, a, EnergyUnit::KJ),
            |t| sink.write_all(t.as_bytes()),
        )
        .unwrap()
        .samples
    });
    time("read only", &|| {
        SampleReader::open(&path, &prep.pathway, &base.conc)
            .unwrap()
            .filter(|r| r.is_ok())
            .count()
    });
}
