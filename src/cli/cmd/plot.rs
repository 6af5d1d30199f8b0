//! `plot FILE -o OUT.svg|OUT.png`: the energy profile picture, with the
//! spread of `--samples` when given.

use super::report::summarise;
use crate::cli::args::Common;
use crate::cli::output::emit;
use crate::cli::request::state_from;
use anyhow::{Context, Result, bail};
use dgpath::analysis::batch::Summary;
use dgpath::analysis::{self, Prepared};
use std::path::Path;

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
    let a = analysis::analyze(prep, &state)?;
    let sum = match &common.samples {
        Some(path) => Some(summarise(prep, &state, path)?),
        None => None,
    };
    let bytes = picture(prep, &a, sum.as_ref(), common, png)?;
    std::fs::write(output, bytes)
        .with_context(|| format!("{}: cannot write the picture", output.display()))?;
    emit(&format!("wrote {}\n", output.display()))
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
