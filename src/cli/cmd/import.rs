//! `import MODEL.xml`: a pathway file from a route of an SBML model
//! (docs/import.md), or the model's reactions with `--list`.

use crate::cli::args::{BranchesArg, ImportArgs};
use crate::cli::output::emit;
use anyhow::{Result, bail};
use dgpath::import::{self, BranchesFrom, Options, tables};
use std::path::Path;

/// Reads a table file, naming it when it cannot be read.
fn read_table(path: &Path) -> Result<String> {
    match std::fs::read_to_string(path) {
        Ok(t) => Ok(t),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            bail!(
                "{}: no such file; check the path of the table",
                path.display()
            )
        }
        Err(e) => bail!("{}: cannot be read: {e}", path.display()),
    }
}

/// Runs the import (or the listing) as the arguments say.
pub fn run(a: &ImportArgs) -> Result<()> {
    let model = import::read_model(&a.model)?;
    if a.list {
        return emit(&import::list(&model, a.grep.as_deref()));
    }
    let (Some(route), Some(output)) = (&a.route, &a.output) else {
        bail!(
            "give the route with --route \"R1 R2 ...\" and the file to write with -o OUT.toml (or --list to see the reactions)"
        );
    };
    let dg0 = match &a.dg0 {
        Some(p) => Some(tables::read_dg0(&read_table(p)?, &p.display().to_string())?),
        None => None,
    };
    let conc = match &a.conc {
        Some(p) => Some(tables::read_conc(
            &read_table(p)?,
            &p.display().to_string(),
        )?),
        None => None,
    };
    let opts = Options {
        route: route
            .split(|c: char| c.is_whitespace() || c == ',')
            .filter(|s| !s.is_empty())
            .map(str::to_string)
            .collect(),
        flip: a.flip.clone(),
        keep: a.keep.clone(),
        dg0,
        conc,
        temperature: a.temperature.clone(),
        ph: a.ph,
        branches_from: match a.branches_from {
            BranchesArg::Network => BranchesFrom::Network,
            BranchesArg::All => BranchesFrom::All,
        },
    };
    let file = a.model.display().to_string();
    let out = import::import(&model, &file, &opts)?;
    import::write_new(output, &out.text, a.force)?;
    emit(&import::summary(&out, &output.display().to_string()))
}
