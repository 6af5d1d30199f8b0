//! The command line as clap sees it: commands, shared options, formats.

use clap::{Args, Parser, Subcommand, ValueEnum};
use dgpath::present::EnergyUnit;
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
