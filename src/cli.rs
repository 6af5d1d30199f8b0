//! Command-line definitions and dispatch. Thin: it turns arguments into a
//! prepared pathway, a scenario state and options, then calls the library.

use anyhow::{Context, Result, anyhow, bail};
use clap::{Args, Parser, Subcommand, ValueEnum};
use dgpath::analysis::{self, Direction, Prepared};
use dgpath::model::{self, LoadError, units};
use dgpath::report::{self, EnergyUnit, TextOptions};
use dgpath::samples::Sample;
use dgpath::scenario::State;
use dgpath::tui::{self, Source};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

mod samples_plot;

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
        if s.conditions.temperature > model::MAX_TEMPERATURE {
            bail!(
                "--temperature: {t} is above {} K, far outside any cell; write e.g. \"37 C\"",
                model::MAX_TEMPERATURE
            );
        }
        if s.conditions.temperature > model::MAX_TEMPERATURE {
            bail!(
                "--temperature: {t} is above {} K, far outside any cell; write e.g. \"37 C\"",
                model::MAX_TEMPERATURE
            );
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

/// `mdf FILE --samples TABLE`: one optimisation per sample (only held
/// compounds and the conditions change between samples), without ranges.
fn run_mdf_samples(prep: &Prepared, common: &Common, path: &Path, format: Format) -> Result<()> {
    let base = state_from(prep, common)?;
    let p = &prep.pathway;
    let u = common.unit();
    let route = prep.route(base.direction).map_err(|e| anyhow!("{e}"))?;
    let mut rows: Vec<(String, analysis::mdf::Mdf)> = Vec::new();
    for sample in dgpath::samples::SampleReader::open(path, p, &base.conc)? {
        let sample = sample?;
        let state = State {
            conc: sample.conc,
            ..base.clone()
        };
        let m = analysis::mdf::solve(prep, &state)
            .map_err(|e| anyhow!("sample '{}': {e}", sample.name))?;
        rows.push((sample.name, m));
    }
    let ids = |m: &analysis::mdf::Mdf| -> Vec<String> {
        m.bottlenecks
            .iter()
            .map(|&k| p.steps[route.steps[k].step].id.clone())
            .collect()
    };
    let text = if format == Format::Json {
        let list: Vec<serde_json::Value> = rows
            .iter()
            .map(|(name, m)| {
                serde_json::json!({
                    "sample": name,
                    "mdf": report::clean(u.of(m.value)),
                    "bottlenecks": ids(m),
                })
            })
            .collect();
        let doc = serde_json::json!({
            "pathway": p.name,
            "direction": base.direction.as_str(),
            "energy_unit": u.label(),
            "samples": list,
        });
        let mut s = serde_json::to_string_pretty(&doc)?;
        s.push('\n');
        s
    } else {
        let w = rows
            .iter()
            .map(|r| r.0.chars().count())
            .max()
            .unwrap_or(6)
            .max(6);
        let mut s = format!(
            "{} — max-min driving force per sample ({} route)\n\n{:<w$}  {:>12}  bottlenecks\n",
            p.name,
            base.direction.as_str(),
            "sample",
            format!("MDF [{}]", u.label()),
        );
        for (name, m) in &rows {
            s.push_str(&format!(
                "{name:<w$}  {:>12.2}  {}\n",
                report::clean(u.of(m.value)),
                ids(m).join(", ")
            ));
        }
        s.push_str("\nOnly compounds marked fixed (and the conditions) differ between samples in this optimisation; the others are chosen within their bounds.\n");
        s
    };
    emit(&text)
}

/// Runs the driving-force optimisation (with concentration ranges) and prints it.
pub fn run_mdf(prep: &Prepared, common: &Common, format: Format) -> Result<()> {
    if matches!(format, Format::Csv | Format::Md) {
        bail!("mdf writes --format table or --format json");
    }
    if let Some(path) = &common.samples {
        return run_mdf_samples(prep, common, path, format);
    }
    let state = state_from(prep, common)?;
    let m = analysis::mdf::solve_with_ranges(prep, &state).map_err(|e| anyhow!("{e}"))?;
    for w in &m.warnings {
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
        Format::Csv | Format::Md => bail!("mdf writes --format table or --format json"),
    };
    emit(&text)
}

/// Entry point after parsing.
pub fn run(cli: Cli) -> Result<()> {
    match cli.command {
        None => {
            let prep = load_demo()?;
            if dgpath::tui::is_terminal() {
                let state = state_from(&prep, &Common::default())?;
                explore(prep, state, Source::demo(), &Common::default(), false)
            } else {
                run_report(&prep, &Common::default(), Format::Table)
            }
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
            let prep = load(&file)?;
            match &common.samples {
                Some(path) => samples_plot::run_samples_report(&prep, &common, path, format),
                None => run_report(&prep, &common, format),
            }
        }
        Some(Command::Mdf {
            file,
            common,
            format,
        }) => {
            let prep = load(&file)?;
            run_mdf(&prep, &common, format)
        }
        Some(Command::Plot {
            file,
            common,
            output,
        }) => samples_plot::run_plot(&load(&file)?, &common, &output),
        Some(Command::Explore {
            file,
            common,
            ascii,
        }) => {
            let (prep, source) = load_source(&file)?;
            let state = state_from(&prep, &common)?;
            explore(prep, state, source, &common, ascii)
        }
        Some(Command::Screenshot {
            file,
            common,
            output,
            size,
            keys,
            ascii,
        }) => screenshot(&file, &common, &output, &size, &keys, ascii),
    }
}

/// Loads a pathway file for the explorer, keeping its text for saving.
fn load_source(file: &Path) -> Result<(Prepared, Source)> {
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
fn explorer_samples(prep: &Prepared, state: &State, c: &Common) -> Result<Vec<Sample>> {
    let Some(path) = &c.samples else {
        return Ok(Vec::new());
    };
    let all = dgpath::samples::SampleReader::open(path, &prep.pathway, &state.conc)?
        .collect::<Result<Vec<Sample>, _>>()?;
    if all.is_empty() {
        bail!(
            "{}: the table has a header but no samples; add one row per sample",
            path.display()
        );
    }
    Ok(all)
}

fn explore(prep: Prepared, state: State, source: Source, c: &Common, ascii: bool) -> Result<()> {
    let samples = explorer_samples(&prep, &state, c)?;
    let opts = tui::Options {
        ascii,
        color: std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty()),
        unit: c.unit(),
    };
    let app = tui::App::new(prep, state, source, opts)
        .and_then(|a| a.with_samples(samples))
        .map_err(|e| anyhow!("{e}"))?;
    tui::run(app).map_err(|e| anyhow!("{e}"))
}

fn screenshot(
    file: &Path,
    c: &Common,
    output: &Path,
    size: &str,
    keys: &str,
    ascii: bool,
) -> Result<()> {
    let (w, h) = tui::export::parse_size(size).map_err(|e| anyhow!("--size {e}"))?;
    let (prep, source) = load_source(file)?;
    let state = state_from(&prep, c)?;
    let samples = explorer_samples(&prep, &state, c)?;
    // Pictures are always in colour: they are files, not a terminal.
    let opts = tui::Options {
        ascii,
        color: true,
        unit: c.unit(),
    };
    let mut app = tui::App::new(prep, state, source, opts)
        .and_then(|a| a.with_samples(samples))
        .map_err(|e| anyhow!("{e}"))?;
    let (txt, svg) =
        tui::export::screenshot(&mut app, keys, w, h).map_err(|e| anyhow!("--keys: {e}"))?;
    let with = |ext: &str| {
        let mut p = output.as_os_str().to_owned();
        p.push(ext);
        PathBuf::from(p)
    };
    for (path, text) in [(with(".txt"), txt), (with(".svg"), svg)] {
        std::fs::write(&path, text).with_context(|| format!("{}: cannot write", path.display()))?;
    }
    emit(&format!(
        "wrote {} and {}\n",
        with(".txt").display(),
        with(".svg").display()
    ))
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
