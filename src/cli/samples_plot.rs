//! The `--samples` branch of `report` and the `plot` command: open the
//! samples table, hand rows to the batch analysis, stream the renderings to
//! stdout or write the picture. Thin glue; the work is in the library.

use super::{Common, Format, state_from};
use anyhow::{Context, Result, anyhow, bail};
use dgpath::analysis::batch::{self, BatchError, Summary};
use dgpath::analysis::{self, Prepared};
use dgpath::report::{TextOptions, samples as render};
use dgpath::samples::SampleReader;
use dgpath::scenario::State;
use std::io::Write;
use std::path::Path;

fn is_broken_pipe(e: &std::io::Error) -> bool {
    e.kind() == std::io::ErrorKind::BrokenPipe
}

/// Reads the whole table once without analysing, so mistakes are reported before any output.
fn check_table(prep: &Prepared, state: &State, path: &Path) -> Result<()> {
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
            super::emit(&text)
        }
        Format::Csv | Format::Json => {
            check_table(prep, &state, path)?;
            let rows = SampleReader::open(path, &prep.pathway, &state.conc)?;
            let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
            let json = format == Format::Json;
            let head = if json {
                render::json_head(prep, &state, u)
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
                &state,
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
    }
}

/// `plot FILE -o OUT.svg|OUT.png [--samples TABLE]`.
pub fn run_plot(prep: &Prepared, common: &Common, output: &Path) -> Result<()> {
    let ext = output
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    let png = match ext.as_deref() {
        Some("svg") => false,
        Some("png") => true,
        _ => bail!(
            "{}: the output must end in .svg or .png, e.g. -o profile.svg",
            output.display()
        ),
    };
    let state = state_from(prep, common)?;
    let a = analysis::analyze(prep, &state).map_err(|e| anyhow!("{e}"))?;
    let sum = match &common.samples {
        Some(path) => Some(summarise(prep, &state, path)?),
        None => None,
    };
    let bytes = picture(prep, &a, sum.as_ref(), common, png)?;
    std::fs::write(output, bytes)
        .with_context(|| format!("{}: cannot write the picture", output.display()))?;
    super::emit(&format!("wrote {}\n", output.display()))
}

/// The plot as SVG text or PNG bytes.
#[cfg(feature = "plot")]
fn picture(
    prep: &Prepared,
    a: &analysis::Analysis,
    sum: Option<&Summary>,
    common: &Common,
    png: bool,
) -> Result<Vec<u8>> {
    let svg = dgpath::plot::svg(prep, a, sum, common.unit())?;
    Ok(if png {
        dgpath::plot::png(&svg)?
    } else {
        svg.into_bytes()
    })
}

/// Without the `plot` feature there is nothing to draw with.
#[cfg(not(feature = "plot"))]
fn picture(
    _: &Prepared,
    _: &analysis::Analysis,
    _: Option<&Summary>,
    _: &Common,
    _: bool,
) -> Result<Vec<u8>> {
    bail!("this dgpath was built without the `plot` feature: rebuild it with default features")
}
