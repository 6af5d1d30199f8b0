//! `mdf FILE`: the driving-force optimisation with concentration ranges; with
//! `--samples TABLE`, one optimisation per sample.

use crate::cli::args::{Common, Format};
use crate::cli::cmd::report::check_table;
use crate::cli::output::{colour_ok, emit, emit_json, is_broken_pipe};
use crate::cli::request::state_from;
use anyhow::{Context, Result};
use dgpath::analysis::{self, Prepared};
use dgpath::model::samples::SampleReader;
use dgpath::report::mdf_samples::{Layout, Writer};
use dgpath::report::{self, TextOptions};
use rayon::prelude::*;
use std::io::Write;

/// Samples read and solved together before their rows are written.
const CHUNK: usize = 512;
use dgpath::scenario::State;
use std::path::Path;

/// `mdf FILE --samples TABLE`: one optimisation per sample (only held
/// compounds and the conditions change between samples), without ranges,
/// each written as it is solved (the aligned table at the end).
fn run_mdf_samples(
    prep: &Prepared,
    common: &Common,
    path: &Path,
    format: Format,
    free_currencies: bool,
) -> Result<()> {
    let opts = analysis::mdf::Options {
        free_currencies,
        ranges: false,
    };
    let base = state_from(prep, common)?;
    let p = &prep.pathway;
    let route = prep.route(base.direction).map_err(Clone::clone)?;
    let layout = match format {
        Format::Json => Layout::Json,
        Format::Csv => Layout::Csv,
        Format::Table | Format::Md => Layout::Table,
    };
    let mut writer = Writer::new(prep, route, common.unit(), layout);
    // The whole table is read once before anything is written, so its
    // mistakes come before any output (as in `report --samples`).
    check_table(prep, &base, path)?;
    let rows = SampleReader::open(path, p, &base.conc)?;
    let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
    let mut put = |text: &str| -> Result<bool> {
        match out.write_all(text.as_bytes()) {
            Ok(()) => Ok(true),
            Err(e) if is_broken_pipe(&e) => Ok(false),
            Err(e) => Err(e).context("writing to stdout"),
        }
    };
    if !put(&writer.head())? {
        return Ok(());
    }
    // Solved in parallel a chunk at a time and written in table order. In
    // each worker, samples that differ only in free compounds share one
    // programme.
    let mut chunk = Vec::with_capacity(CHUNK);
    let mut rows = rows.peekable();
    while rows.peek().is_some() {
        chunk.clear();
        for sample in rows.by_ref().take(CHUNK) {
            chunk.push(sample?);
        }
        let solved: Vec<_> = chunk
            .par_iter()
            .map_init(analysis::mdf::Batch::default, |batch, sample| {
                let state = State {
                    conc: sample.conc.clone(),
                    ..base.clone()
                };
                batch.solve(prep, &state, &opts)
            })
            .collect();
        for (sample, m) in chunk.iter().zip(solved) {
            let m = m.with_context(|| format!("sample '{}'", sample.name))?;
            if !put(&writer.row(&sample.name, &m))? {
                return Ok(());
            }
        }
    }
    put(&writer.tail())?;
    match out.flush() {
        Err(e) if is_broken_pipe(&e) => Ok(()),
        r => r.context("writing to stdout"),
    }
}

/// Runs the driving-force optimisation (with concentration ranges) and prints it.
pub fn run_mdf(
    prep: &Prepared,
    common: &Common,
    format: Format,
    free_currencies: bool,
) -> Result<()> {
    if let Some(path) = &common.samples {
        return run_mdf_samples(prep, common, path, format, free_currencies);
    }
    let state = state_from(prep, common)?;
    let opts = analysis::mdf::Options {
        free_currencies,
        ranges: true,
    };
    let m = analysis::mdf::solve_with(prep, &state, &opts)?;
    for w in report::warnings::file_warnings(prep)
        .iter()
        .chain(&m.warnings)
    {
        eprintln!("warning: {w}");
    }
    let u = common.unit();
    let text = match format {
        Format::Json => return emit_json(&report::mdf::mdf_json(prep, &state, &m, u)),
        Format::Table => report::mdf::mdf_table(
            prep,
            &state,
            &m,
            TextOptions {
                unit: u,
                color: colour_ok(),
                ascii: false,
            },
        ),
        Format::Csv => report::mdf_flat::mdf_csv(prep, &m, u),
        Format::Md => report::mdf_flat::mdf_markdown(prep, &state, &m, u),
    };
    emit(&text)
}
