//! Command-line definitions and dispatch. Thin: it turns arguments into a
//! prepared pathway, a scenario state and options, then calls the library.

use anyhow::{Context, Result, anyhow, bail};
use clap::{Args, Parser, Subcommand, ValueEnum};
use dgpath::analysis::{self, Direction, Prepared};
use dgpath::model::{self, LoadError, units};
use dgpath::report::{self, EnergyUnit, TextOptions};
use dgpath::scenario::State;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

/// Gibbs energies of pathway steps at your cell's conditions, live.
#[derive(Parser, Debug)]
#[command(name = "dgpath", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Option<Command>,
}

#[derive(Subcommand, Debug)]
pub enum Command {
    /// Write a commented starter pathway file.
    New { file: PathBuf },
    /// The terminal explorer (the main job).
    Explore {
        file: PathBuf,
        #[command(flatten)]
        common: Common,
        /// Draw with ASCII characters only.
        #[arg(long)]
        ascii: bool,
    },
    /// Per-step results.
    Report {
        file: PathBuf,
        #[command(flatten)]
        common: Common,
        /// Output format.
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
    },
    /// Validate a pathway file; print every problem.
    Check { file: PathBuf },
    /// Driving-force optimisation within concentration bounds.
    Mdf {
        file: PathBuf,
        #[command(flatten)]
        common: Common,
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
    },
    /// Energy profile picture (svg or png).
    Plot {
        file: PathBuf,
        #[command(flatten)]
        common: Common,
        /// Output file, .svg or .png.
        #[arg(short = 'o', long = "output")]
        output: PathBuf,
    },
    /// Render the explorer to OUT.txt and OUT.svg.
    Screenshot {
        file: PathBuf,
        #[command(flatten)]
        common: Common,
        /// Output path without extension.
        #[arg(short = 'o', long = "output")]
        output: PathBuf,
        /// Terminal size, WxH.
        #[arg(long, default_value = "120x36")]
        size: String,
        /// Keys to replay before rendering, e.g. "Tab Down Enter 2.5 mM Enter".
        #[arg(long, default_value = "")]
        keys: String,
        #[arg(long)]
        ascii: bool,
    },
}

/// Output formats.
#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    Table,
    Json,
    Csv,
    Md,
}

/// Options shared by report / mdf / plot / screenshot / explore.
#[derive(Args, Debug, Clone, Default)]
pub struct Common {
    /// Set a concentration: ID=VALUE (e.g. atp=2.5mM); repeatable.
    #[arg(long = "set", value_name = "ID=VALUE")]
    pub set: Vec<String>,
    /// Temperature, e.g. "37 C".
    #[arg(long)]
    pub temperature: Option<String>,
    /// pH.
    #[arg(long)]
    pub ph: Option<f64>,
    /// Ionic strength, e.g. "0.2 M".
    #[arg(long = "ionic-strength")]
    pub ionic_strength: Option<String>,
    /// Run the route in reverse (bypasses replace the steps they stand for).
    #[arg(long)]
    pub reverse: bool,
    /// Measured concentrations for many samples (CSV).
    #[arg(long)]
    pub samples: Option<PathBuf>,
    /// Energy unit for output.
    #[arg(long = "energy-unit", value_enum, default_value_t = UnitArg::Kj)]
    pub energy_unit: UnitArg,
}

#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum UnitArg {
    #[default]
    Kj,
    Kcal,
}

impl Common {
    pub fn unit(&self) -> EnergyUnit {
        match self.energy_unit {
            UnitArg::Kj => EnergyUnit::KJ,
            UnitArg::Kcal => EnergyUnit::Kcal,
        }
    }
}

fn load_error(e: LoadError) -> anyhow::Error {
    anyhow!("{e}")
}

/// Loads and prepares a pathway file.
pub fn load(path: &Path) -> Result<Prepared> {
    let p = model::load_file(path).map_err(load_error)?;
    analysis::prepare(p).map_err(load_error)
}

/// Loads the bundled demo.
pub fn load_demo() -> Result<Prepared> {
    let p = model::load_str(dgpath::DEMO, dgpath::DEMO_NAME).map_err(load_error)?;
    analysis::prepare(p).map_err(load_error)
}

/// Builds the scenario state from the file and the shared options.
pub fn state_from(prep: &Prepared, c: &Common) -> Result<State> {
    let p = &prep.pathway;
    let mut s = State::from_pathway(p);
    if let Some(t) = &c.temperature {
        s.conditions.temperature =
            units::parse(t, units::Kind::Temperature).map_err(|e| anyhow!("--temperature: {e}"))?;
        if s.conditions.temperature <= 0.0 {
            bail!("--temperature: {t} is at or below absolute zero; write e.g. \"37 C\"");
        }
    }
    if let Some(ph) = c.ph {
        if !(0.0..=14.0).contains(&ph) {
            bail!("--ph: {ph} is outside 0–14; write e.g. --ph 7.2");
        }
        s.conditions.ph = ph;
    }
    if let Some(i) = &c.ionic_strength {
        let v = units::parse(i, units::Kind::IonicStrength)
            .map_err(|e| anyhow!("--ionic-strength: {e}"))?;
        if v < 0.0 {
            bail!("--ionic-strength: cannot be negative; write e.g. \"0.15 M\"");
        }
        s.conditions.ionic_strength = v;
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
        let v = units::parse(val, units::Kind::Concentration)
            .map_err(|e| anyhow!("--set '{item}': {e}"))?;
        if v <= 0.0 {
            bail!("--set '{item}': a concentration must be above zero; write e.g. {id}=1uM");
        }
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

fn colour_ok() -> bool {
    std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// Writes to stdout; a closed pipe ends quietly.
pub fn emit(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        r => r.context("writing to stdout"),
    }
}

/// Runs the report command on a prepared pathway.
pub fn run_report(prep: &Prepared, common: &Common, format: Format) -> Result<()> {
    let state = state_from(prep, common)?;
    let a = analysis::analyze(prep, &state).map_err(|e| anyhow!("{e}"))?;
    let u = common.unit();
    let text = match format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&report::json_value(prep, &state, &a, u))?;
            s.push('\n');
            s
        }
        Format::Csv => report::csv(prep, &a, u),
        Format::Md => report::markdown(prep, &state, &a, u),
        Format::Table => report::table(
            prep,
            &state,
            &a,
            TextOptions {
                unit: u,
                color: colour_ok(),
                ascii: false,
            },
        ),
    };
    emit(&text)
}

/// Entry point after parsing.
pub fn run(cli: Cli) -> Result<()> {
    match cli.command {
        None => {
            let prep = load_demo()?;
            run_report(&prep, &Common::default(), Format::Table)
        }
        Some(Command::New { file }) => new_file(&file),
        Some(Command::Check { file }) => {
            let prep = load(&file)?;
            let mut msg = format!(
                "{}: ok — {} compounds, {} steps ({} on the route)",
                file.display(),
                prep.pathway.compounds.len(),
                prep.pathway.steps.len(),
                prep.forward.steps.len()
            );
            if let Err(e) = &prep.reverse {
                msg.push_str(&format!(
                    "\nnote: the reverse route cannot be built: {}",
                    e.message
                ));
            }
            emit(&(msg + "\n"))
        }
        Some(Command::Report {
            file,
            common,
            format,
        }) => {
            if common.samples.is_some() {
                bail!(
                    "--samples is not available in this version of dgpath yet; run report once per sample with --set"
                );
            }
            let prep = load(&file)?;
            run_report(&prep, &common, format)
        }
        Some(Command::Explore { .. })
        | Some(Command::Mdf { .. })
        | Some(Command::Plot { .. })
        | Some(Command::Screenshot { .. }) => {
            bail!("this command is not available in this version of dgpath yet")
        }
    }
}

/// The starter file written by `dgpath new`.
pub const STARTER: &str = include_str!("starter.toml");

fn new_file(path: &Path) -> Result<()> {
    if path.exists() {
        bail!(
            "{} already exists; dgpath new never overwrites a file — pick another name",
            path.display()
        );
    }
    let mut f = std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(path)
        .with_context(|| format!("{}: cannot create the file", path.display()))?;
    f.write_all(STARTER.as_bytes())
        .with_context(|| format!("{}: cannot write", path.display()))?;
    emit(&format!(
        "wrote {}; edit it, then run: dgpath check {}\n",
        path.display(),
        path.display()
    ))
}
