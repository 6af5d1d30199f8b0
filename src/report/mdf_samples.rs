//! `mdf --samples`: one optimum per sample, written as each is solved. JSON
//! and CSV stream row by row, so memory stays flat however long the table;
//! the aligned table keeps one short row per sample (name, MDF, bottleneck
//! ids) to size its name column.

use super::json::num;
use crate::analysis::mdf::Mdf;
use crate::analysis::{Prepared, Route};
use crate::present::{EnergyUnit, clean};
use serde::Serialize;

/// The ids of an optimum's bottleneck steps, in route order.
fn bottleneck_ids(prep: &Prepared, route: &Route, m: &Mdf) -> Vec<String> {
    m.bottlenecks
        .iter()
        .map(|&k| prep.pathway.steps[route.steps[k].step].id.clone())
        .collect()
}

/// One sample's optimum.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SampleMdfJson {
    /// Sample name.
    pub sample: String,
    /// Its MDF.
    pub mdf: Option<f64>,
    /// Its bottleneck steps.
    pub bottlenecks: Vec<String>,
}

/// `mdf --samples --format json`: the whole document (its `samples` are
/// written one by one by `Writer`; this type fixes the field order and is
/// what the JSON reference describes).
#[derive(Debug, Serialize)]
pub struct SamplesMdfJson {
    /// Pathway name.
    pub pathway: String,
    /// forward or reverse.
    pub direction: &'static str,
    /// kJ/mol or kcal/mol.
    pub energy_unit: &'static str,
    /// One optimum per sample.
    pub samples: Vec<SampleMdfJson>,
}

/// How `mdf --samples` is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Layout {
    /// One JSON document, samples streamed into its array.
    Json,
    /// A header and one CSV row per sample.
    Csv,
    /// An aligned table, written at the end.
    Table,
}

/// Writes the optimum of each sample as it comes: `head`, then `row` per
/// sample, then `tail`; each returns the text to write at that point.
#[derive(Debug)]
pub struct Writer<'a> {
    prep: &'a Prepared,
    route: &'a Route,
    unit: EnergyUnit,
    layout: Layout,
    rows_written: usize,
    /// Rows kept for the aligned table only.
    kept: Vec<SampleMdfJson>,
}

impl<'a> Writer<'a> {
    /// A writer for `route`'s optimum per sample, energies in `unit`.
    pub fn new(prep: &'a Prepared, route: &'a Route, unit: EnergyUnit, layout: Layout) -> Self {
        Writer {
            prep,
            route,
            unit,
            layout,
            rows_written: 0,
            kept: Vec::new(),
        }
    }

    /// The text before the first sample.
    pub fn head(&self) -> String {
        match self.layout {
            Layout::Json => {
                let doc = SamplesMdfJson {
                    pathway: self.prep.pathway.name.clone(),
                    direction: self.route.direction.as_str(),
                    energy_unit: self.unit.label(),
                    samples: Vec::new(),
                };
                let text = serde_json::to_string_pretty(&doc).unwrap_or_default();
                // `"samples": []` is last: open the array instead.
                match text.strip_suffix("[]\n}") {
                    Some(open) => format!("{open}["),
                    None => text,
                }
            }
            Layout::Csv => csv_line(&[
                "sample".to_string(),
                format!("mdf [{}]", self.unit.label()),
                "bottlenecks".into(),
            ]),
            Layout::Table => String::new(),
        }
    }

    /// The text for one sample's optimum.
    pub fn row(&mut self, name: &str, m: &Mdf) -> String {
        let u = self.unit;
        let first = self.rows_written == 0;
        self.rows_written += 1;
        match self.layout {
            Layout::Json => {
                let row = SampleMdfJson {
                    sample: name.to_string(),
                    mdf: num(u.of(m.value)),
                    bottlenecks: bottleneck_ids(self.prep, self.route, m),
                };
                let text = serde_json::to_string_pretty(&row).unwrap_or_default();
                // An element of the array two levels down: four more spaces
                // on every line (JSON strings hold no raw line breaks).
                let mut out = String::from(if first { "\n" } else { ",\n" });
                for (k, line) in text.lines().enumerate() {
                    if k > 0 {
                        out.push('\n');
                    }
                    out.push_str("    ");
                    out.push_str(line);
                }
                out
            }
            Layout::Csv => csv_line(&[
                name.to_string(),
                crate::present::full(clean(u.of(m.value))),
                bottleneck_ids(self.prep, self.route, m).join(" "),
            ]),
            Layout::Table => {
                self.kept.push(SampleMdfJson {
                    sample: name.to_string(),
                    mdf: Some(clean(u.of(m.value))),
                    bottlenecks: bottleneck_ids(self.prep, self.route, m),
                });
                String::new()
            }
        }
    }

    /// The text after the last sample.
    pub fn tail(&mut self) -> String {
        match self.layout {
            Layout::Json if self.rows_written == 0 => "]\n}\n".into(),
            Layout::Json => "\n  ]\n}\n".into(),
            Layout::Csv => String::new(),
            Layout::Table => self.table(),
        }
    }

    /// `mdf --samples`: one line per sample with its MDF and bottlenecks.
    fn table(&self) -> String {
        let w = self
            .kept
            .iter()
            .map(|r| r.sample.chars().count())
            .max()
            .unwrap_or(6)
            .max(6);
        let mut s = format!(
            "{} — max-min driving force per sample ({} route)\n\n{:<w$}  {:>12}  bottlenecks\n",
            self.prep.pathway.name,
            self.route.direction.as_str(),
            "sample",
            format!("MDF [{}]", self.unit.label()),
        );
        for r in &self.kept {
            s.push_str(&format!(
                "{:<w$}  {:>12.2}  {}\n",
                r.sample,
                r.mdf.unwrap_or(f64::NAN),
                r.bottlenecks.join(", ")
            ));
        }
        s.push_str("\nOnly held compounds (carriers, unless freed, and those marked fixed) and the conditions differ between samples in this optimisation; the others are chosen within their bounds.\n");
        s
    }
}

/// One CSV record with its line end, quoted as the csv crate quotes.
fn csv_line(fields: &[String]) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record(fields);
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}
