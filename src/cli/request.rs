//! From arguments to what the library needs: the prepared pathway, the
//! scenario state (with `--set`, `--temperature`, `--ph`, ...), the file's
//! text for the explorer and the samples of `--samples`.

use super::args::Common;
use anyhow::{Context, Result, anyhow, bail};
use dgpath::analysis::{self, Direction, Prepared};
use dgpath::model::samples::Sample;
use dgpath::model::{self, check, units};
use dgpath::scenario::State;
use dgpath::tui::Source;
use std::path::Path;

/// Loads and prepares a pathway file.
pub fn load(path: &Path) -> Result<Prepared> {
    let p = model::load_file(path)?;
    Ok(analysis::prepare(p)?)
}

/// Loads the bundled demo.
pub fn load_demo() -> Result<Prepared> {
    let p = model::load_str(dgpath::DEMO, dgpath::DEMO_NAME)?;
    Ok(analysis::prepare(p)?)
}

/// Builds the scenario state from the file and the shared options.
pub fn state_from(prep: &Prepared, c: &Common) -> Result<State> {
    let p = &prep.pathway;
    let mut s = State::from_pathway(p);
    // The same checker as the file and the explorer (model::check).
    if let Some(t) = &c.temperature {
        s.conditions.temperature =
            check::quantity(t, units::Kind::Temperature).context("--temperature")?;
    }
    if let Some(ph) = c.ph {
        s.conditions.ph = check::ph(ph).context("--ph")?;
    }
    if let Some(i) = &c.ionic_strength {
        s.conditions.ionic_strength =
            check::quantity(i, units::Kind::IonicStrength).context("--ionic-strength")?;
    }
    for item in &c.set {
        let (id, val) = item
            .split_once('=')
            .ok_or_else(|| anyhow!("--set '{item}': write ID=VALUE, e.g. --set atp=2.5mM"))?;
        let (id, val) = (id.trim(), val.trim());
        let ci = p.compound(id).ok_or_else(|| {
            let hint = model::suggest(id, p.compounds.iter().map(|c| c.id.as_str()))
                .map(|s| format!("; did you mean '{s}'?"))
                .unwrap_or_else(|| {
                    let ids: Vec<&str> = p
                        .compounds
                        .iter()
                        .filter(|c| !c.is_solvent())
                        .map(|c| c.id.as_str())
                        .collect();
                    format!("; the compounds are: {}", ids.join(", "))
                });
            anyhow!("--set '{item}': no compound '{id}' in {}{hint}", p.file)
        })?;
        let v = check::concentration(val).with_context(|| format!("--set '{item}'"))?;
        if p.compounds[ci].is_solvent() {
            bail!(
                "--set '{item}': '{id}' is a solvent (activity 1); its concentration does not enter Q"
            );
        }
        s.conc[ci] = v;
    }
    if c.reverse {
        s.direction = Direction::Reverse;
        if let Err(e) = &prep.reverse {
            bail!("cannot run the route in reverse: {e}");
        }
    }
    Ok(s)
}

/// Loads a pathway file for the explorer, keeping its text for saving.
pub fn load_source(file: &Path) -> Result<(Prepared, Source)> {
    let prep = load(file)?;
    let text = std::fs::read_to_string(file)
        .with_context(|| format!("{}: cannot read the file", file.display()))?;
    let source = Source {
        path: Some(file.to_path_buf()),
        name: file.display().to_string(),
        text,
    };
    Ok((prep, source))
}

/// Reads every sample of `--samples` for the explorer (errors before the screen opens).
pub fn explorer_samples(prep: &Prepared, state: &State, c: &Common) -> Result<Vec<Sample>> {
    let Some(path) = &c.samples else {
        return Ok(Vec::new());
    };
    let all = dgpath::model::samples::SampleReader::open(path, &prep.pathway, &state.conc)?
        .collect::<Result<Vec<Sample>, _>>()?;
    if all.is_empty() {
        bail!(
            "{}: the table has a header but no samples; add one row per sample",
            path.display()
        );
    }
    Ok(all)
}
