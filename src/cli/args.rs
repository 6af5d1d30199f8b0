//! The command line as clap sees it: commands, shared options, formats.

use clap::{Args, Parser, Subcommand, ValueEnum};
use dgpath::present::EnergyUnit;
use dgpath::report::{self, Column};
use std::path::PathBuf;

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
        #[command(flatten)]
        view: View,
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
        /// Let the optimum choose carrier (currency) concentrations too, instead of holding them.
        #[arg(long)]
        free_currencies: bool,
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
    /// A pathway file from a route of an SBML model (docs/import.md).
    Import(ImportArgs),
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
        /// Keys to replay before rendering, one key per word, text to type in
        /// single quotes, e.g. "Tab Down Enter '2.5 mM' Enter".
        #[arg(long, default_value = "")]
        keys: String,
        #[arg(long)]
        ascii: bool,
    },
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions {
        /// The shell to complete for.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff) on stdout.
    Manual,
}

/// `dgpath import`: the model, the route, the tables and where to write.
#[derive(Args, Debug)]
pub struct ImportArgs {
    /// The SBML model (.xml, or .xml.gz).
    pub model: PathBuf,
    /// Reaction ids of the route in the order it runs, e.g. "PGI PFK FBA".
    #[arg(long, value_name = "\"R1 R2 ...\"", required_unless_present = "list")]
    pub route: Option<String>,
    /// Standard energies: CSV with columns step, dg0 [, dg0_sd], each for the reaction as the model writes it.
    #[arg(long, value_name = "TABLE.csv")]
    pub dg0: Option<PathBuf>,
    /// Concentrations: CSV with columns compound, conc.
    #[arg(long, value_name = "TABLE.csv")]
    pub conc: Option<PathBuf>,
    /// Temperature written into the file, e.g. "37 C" (default 25 C).
    #[arg(long)]
    pub temperature: Option<String>,
    /// pH written into the file (default 7.0).
    #[arg(long)]
    pub ph: Option<f64>,
    /// Run this route step against the direction the model writes it; repeatable.
    #[arg(long, value_name = "ID")]
    pub flip: Vec<String>,
    /// Run this route step as the model writes it; repeatable.
    #[arg(long, value_name = "ID")]
    pub keep: Vec<String>,
    /// Which reactions make branch points.
    #[arg(long = "branches-from", value_enum, default_value_t = BranchesArg::Network)]
    pub branches_from: BranchesArg,
    /// The pathway file to write.
    #[arg(
        short = 'o',
        long = "output",
        value_name = "OUT.toml",
        required_unless_present = "list"
    )]
    pub output: Option<PathBuf>,
    /// Replace OUT if it exists.
    #[arg(long)]
    pub force: bool,
    /// Print the model's reactions (id, name, equation) instead of importing.
    #[arg(long, conflicts_with_all = ["route", "output", "dg0", "conc", "flip", "keep"])]
    pub list: bool,
    /// With --list: only reactions whose id, name or equation contains WORD (any case).
    #[arg(long, value_name = "WORD", requires = "list")]
    pub grep: Option<String>,
}

/// Which reactions of the model make branch points.
#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum BranchesArg {
    /// All but the objective, exchange/sink/demand and bypass reactions.
    #[default]
    Network,
    /// Every reaction of the model.
    All,
}

/// What the table and Markdown show and how.
#[derive(Args, Debug, Clone, Default)]
pub struct View {
    /// Every column (the default table shows those read first and fits 120 characters).
    #[arg(long, conflicts_with = "columns")]
    pub wide: bool,
    /// Columns to show, comma-separated, in this order (names as in the JSON).
    #[arg(long, value_enum, value_delimiter = ',', value_name = "NAME,...")]
    pub columns: Vec<ColumnArg>,
    /// Plain ASCII symbols only.
    #[arg(long)]
    pub ascii: bool,
}

/// A column of the per-step table, named as its JSON field.
#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
#[value(rename_all = "snake_case")]
pub enum ColumnArg {
    Step,
    Enzyme,
    Times,
    Dg0,
    Dg,
    DgSd,
    Q,
    Keq,
    FluxRatio,
    ReverseShare,
    EnzymeFactor,
    Class,
    Share,
    Cumulative,
    Verdict,
    ControlCoefficient,
    ControlCoefficientRange,
}

impl View {
    /// The columns asked for: chosen, all (`--wide`) or the default ones.
    pub fn columns(&self, default: &[Column]) -> Vec<Column> {
        if self.wide {
            return report::columns::ALL.to_vec();
        }
        if self.columns.is_empty() {
            return default.to_vec();
        }
        self.columns
            .iter()
            .map(|c| match c {
                ColumnArg::Step => Column::Step,
                ColumnArg::Enzyme => Column::Enzyme,
                ColumnArg::Times => Column::Times,
                ColumnArg::Dg0 => Column::Dg0,
                ColumnArg::Dg => Column::Dg,
                ColumnArg::DgSd => Column::DgSd,
                ColumnArg::Q => Column::Q,
                ColumnArg::Keq => Column::Keq,
                ColumnArg::FluxRatio => Column::FluxRatio,
                ColumnArg::ReverseShare => Column::ReverseShare,
                ColumnArg::EnzymeFactor => Column::EnzymeFactor,
                ColumnArg::Class => Column::Class,
                ColumnArg::Share => Column::Share,
                ColumnArg::Cumulative => Column::Cumulative,
                ColumnArg::Verdict => Column::Verdict,
                ColumnArg::ControlCoefficient => Column::ControlCoefficient,
                ColumnArg::ControlCoefficientRange => Column::ControlCoefficientRange,
            })
            .collect()
    }
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
    /// Random enzyme saturations behind the flux control range (report,
    /// explore, screenshot); 50000 when not given.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..=10_000_000))]
    pub draws: Option<u64>,
}

#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum UnitArg {
    #[default]
    Kj,
    Kcal,
}

impl Common {
    /// Saturation draws for the flux control range.
    pub fn draws(&self) -> usize {
        self.draws
            .map_or(dgpath::analysis::mca::DEFAULT_DRAWS, |d| d as usize)
    }

    pub fn unit(&self) -> EnergyUnit {
        match self.energy_unit {
            UnitArg::Kj => EnergyUnit::KJ,
            UnitArg::Kcal => EnergyUnit::Kcal,
        }
    }
}
