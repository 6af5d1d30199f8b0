//! `report FILE`: per-step results as a table, JSON, CSV or Markdown; with
//! `--samples TABLE`, one analysis per sample streamed to stdout.

use crate::cli::args::{Common, Format, View};
use crate::cli::output::{colour_ok, emit, emit_json, is_broken_pipe};
use crate::cli::request::state_from;
use anyhow::{Context, Result};
use dgpath::analysis::batch::{self, BatchError, Summary};
use dgpath::analysis::{self, Prepared};
use dgpath::model::samples::SampleReader;
use dgpath::report::{self, TextOptions, samples as render};
use dgpath::scenario::State;
use std::io::Write;
use std::path::Path;

/// Runs the report command on a prepared pathway.
pub fn run_report(prep: &Prepared, common: &Common, format: Format, view: &View) -> Result<()> {
    let state = state_from(prep, common)?;
    let mut a = analysis::analyze(prep, &state)?;
    analysis::mca::add_ranges(&mut a, common.draws());
    for w in report::warnings::warnings(prep, &state) {
        eprintln!("warning: {w}");
    }
    let u = common.unit();
    let text = match format {
        Format::Json => return emit_json(&report::json::report_json(prep, &state, &a, u)),
        Format::Csv => report::csv(prep, &a, u),
        Format::Md => {
            let cols = view.columns(&report::columns::ALL);
            report::markdown::markdown_with(prep, &state, &a, u, &cols)
        }
        Format::Table => report::table_with(
            prep,
            &state,
            &a,
            TextOptions {
                unit: u,
                color: colour_ok(),
                ascii: view.ascii,
            },
            &view.columns(&report::columns::default_for(&a)),
        ),
    };
    emit(&text)
}

/// Reads the whole table once without analysing, so mistakes are reported before any output.
pub(crate) fn check_table(prep: &Prepared, state: &State, path: &Path) -> Result<()> {
    for r in SampleReader::open(path, &prep.pathway, &state.conc)? {
        r?;
    }
    Ok(())
}

/// Summary only (no per-sample output).
pub fn summarise(prep: &Prepared, state: &State, path: &Path) -> Result<Summary> {
    let rows = SampleReader::open(path, &prep.pathway, &state.conc)?;
    Ok(batch::run(
        prep,
        state,
        rows,
        |_, _| String::new(),
        |_| Ok(()),
    )?)
}

/// `report FILE --samples TABLE`.
pub fn run_samples_report(
    prep: &Prepared,
    common: &Common,
    path: &Path,
    format: Format,
) -> Result<()> {
    let state = state_from(prep, common)?;
    let u = common.unit();
    match format {
        Format::Table | Format::Md => {
            let sum = summarise(prep, &state, path)?;
            let text = if format == Format::Md {
                render::markdown(prep, &state, &sum, u)
            } else {
                render::table(
                    prep,
                    &state,
                    &sum,
                    TextOptions {
                        unit: u,
                        color: false,
                        ascii: false,
                    },
                )
            };
            emit(&text)
        }
        Format::Csv | Format::Json => stream_samples(prep, &state, path, format == Format::Json, u),
    }
}

/// `report --samples` as CSV or JSON: the rows written as each chunk is solved.
fn stream_samples(
    prep: &Prepared,
    state: &State,
    path: &Path,
    json: bool,
    u: dgpath::present::EnergyUnit,
) -> Result<()> {
    check_table(prep, state, path)?;
    let rows = SampleReader::open(path, &prep.pathway, &state.conc)?;
    let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
    let head = if json {
        render::json_head(prep, state, u)
    } else {
        render::csv_header()
    };
    if let Err(e) = out.write_all(head.as_bytes()) {
        return if is_broken_pipe(&e) {
            Ok(())
        } else {
            Err(e).context("writing to stdout")
        };
    }
    let mut first = true;
    let result = batch::run(
        prep,
        state,
        rows,
        |name, a| {
            if json {
                render::json_sample_line(prep, name, a, u, true)
            } else {
                render::csv_rows(prep, name, a, u)
            }
        },
        |text| {
            if json && !first {
                out.write_all(b",\n")?;
            }
            first = false;
            out.write_all(text.as_bytes())
        },
    );
    let sum = match result {
        Ok(s) => s,
        Err(BatchError::Write(e)) if is_broken_pipe(&e) => return Ok(()),
        Err(e) => return Err(e.into()),
    };
    let tail = if json {
        render::json_tail(prep, &sum, u)
    } else {
        String::new()
    };
    match out.write_all(tail.as_bytes()).and_then(|_| out.flush()) {
        Err(e) if is_broken_pipe(&e) => Ok(()),
        r => r.context("writing to stdout"),
    }
}
