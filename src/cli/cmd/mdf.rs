//! `mdf FILE`: the driving-force optimisation with concentration ranges; with
//! `--samples TABLE`, one optimisation per sample.

use crate::cli::args::{Common, Format};
use crate::cli::output::{colour_ok, emit};
use crate::cli::request::state_from;
use anyhow::{Result, anyhow};
use dgpath::analysis::{self, Prepared};
use dgpath::model::samples::SampleReader;
use dgpath::report::{self, TextOptions};
use dgpath::scenario::State;
use std::path::Path;

/// `mdf FILE --samples TABLE`: one optimisation per sample (only held
/// compounds and the conditions change between samples), without ranges.
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
    let u = common.unit();
    let route = prep.route(base.direction).map_err(|e| anyhow!("{e}"))?;
    let mut rows: Vec<(String, analysis::mdf::Mdf)> = Vec::new();
    // Samples that differ only in free compounds share one programme.
    let mut batch = analysis::mdf::Batch::default();
    for sample in SampleReader::open(path, p, &base.conc)? {
        let sample = sample?;
        let state = State {
            conc: sample.conc,
            ..base.clone()
        };
        let m = batch
            .solve(prep, &state, &opts)
            .map_err(|e| anyhow!("sample '{}': {e}", sample.name))?;
        rows.push((sample.name, m));
    }
    let text = match format {
        Format::Json => {
            let doc = report::mdf::samples_json(prep, route, &rows, u);
            let mut s = serde_json::to_string_pretty(&doc)?;
            s.push('\n');
            s
        }
        Format::Csv => report::mdf::samples_csv(prep, route, &rows, u),
        Format::Table | Format::Md => report::mdf::samples_table(prep, route, &rows, u),
    };
    emit(&text)
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
    let m = analysis::mdf::solve_with(prep, &state, &opts).map_err(|e| anyhow!("{e}"))?;
    for w in report::warnings::file_warnings(prep)
        .iter()
        .chain(&m.warnings)
    {
        eprintln!("warning: {w}");
    }
    let u = common.unit();
    let text = match format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&report::mdf::mdf_json(prep, &state, &m, u))?;
            s.push('\n');
            s
        }
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
