//! The generic part of reading: where a span is (line, column), collecting
//! problems, and reading one value of a table (text, number, flag, quantity,
//! bounds, sub-table) with a message that names the field.

use super::super::pathway::*;
use super::super::units::Kind;
use super::super::{check, units};
use toml_edit::{TableLike, Value};

/// The reading context: the text, where its lines start, and the problems found.
pub(super) struct Cx<'s> {
    pub(super) file: String,
    pub(super) src: &'s str,
    /// Byte offset where each line starts, so that finding a line is a
    /// binary search rather than a scan from the top of the file.
    pub(super) line_starts: Vec<usize>,
    pub(super) problems: Vec<Problem>,
}

pub(super) type Span = Option<std::ops::Range<usize>>;

pub(super) const TOP: &[&str] = &[
    "format",
    "pathway",
    "conditions",
    "analysis",
    "compounds",
    "steps",
];
pub(super) const PATHWAY: &[&str] = &["name", "description", "route"];
pub(super) const CONDITIONS: &[&str] = &[
    "temperature",
    "ph",
    "ionic_strength",
    "reference_temperature",
    "reference_ph",
    "reference_ionic_strength",
];
pub(super) const ANALYSIS: &[&str] = &["far", "near_factor", "bounds"];
pub(super) const COMPOUND: &[&str] = &[
    "name",
    "conc",
    "role",
    "branch",
    "bounds",
    "fixed",
    "cv",
    "charge",
    "hydrogens",
    "pka",
];
pub(super) const STEP: &[&str] = &[
    "id",
    "enzyme",
    "reaction",
    "dg0",
    "keq",
    "dg0_sd",
    "dh0",
    "protons",
    "times",
    "side",
    "couple",
    "bypass_of",
    "standard",
];

/// `"?"`: a value `dgpath import` left for the person to fill in.
pub(super) fn open(t: &dyn TableLike, k: &str) -> bool {
    t.get(k).and_then(|i| i.as_str()).map(str::trim) == Some("?")
}

impl Cx<'_> {
    pub(super) fn finish(mut self) -> LoadError {
        self.problems
            .sort_by_key(|p| (p.line.unwrap_or(0), p.column.unwrap_or(0)));
        self.problems.dedup();
        LoadError {
            problems: self.problems,
        }
    }

    pub(super) fn pos(&self, span: &Span) -> (Option<usize>, Option<usize>) {
        match span {
            Some(r) => {
                let mut at = r.start.min(self.src.len());
                while !self.src.is_char_boundary(at) {
                    at -= 1;
                }
                let line = self.line_starts.partition_point(|&start| start <= at);
                let start = self.line_starts[line - 1];
                let col = self.src[start..at].chars().count() + 1;
                (Some(line), Some(col))
            }
            None => (None, None),
        }
    }

    pub(super) fn line(&self, span: &Span) -> usize {
        self.pos(span).0.unwrap_or(0)
    }

    pub(super) fn err(&mut self, span: Span, message: String) {
        let (line, column) = self.pos(&span);
        self.problems.push(Problem {
            file: self.file.clone(),
            line,
            column: column.filter(|_| false),
            message,
        });
        if let Some(p) = self.problems.last_mut() {
            // Columns only matter for syntax errors; keep them there.
            if p.message.starts_with("TOML syntax") {
                p.column = column;
            }
        }
    }

    /// Reports keys that are not allowed here, with a suggestion.
    pub(super) fn known_keys(&mut self, t: &dyn TableLike, allowed: &[&str], what: &str) {
        for (k, _) in t.iter() {
            if !allowed.contains(&k) {
                let span = t.key(k).and_then(|k| k.span());
                let hint = match suggest(k, allowed.iter().copied()) {
                    Some(s) => format!("; did you mean '{s}'?"),
                    None => format!("; allowed here: {}", allowed.join(", ")),
                };
                self.err(span, format!("unknown field '{k}' in {what}{hint}"));
            }
        }
    }

    pub(super) fn key_span(t: &dyn TableLike, k: &str) -> Span {
        t.key(k)
            .and_then(|k| k.span())
            .or_else(|| t.get(k).and_then(|i| i.span()))
    }

    pub(super) fn value_span(t: &dyn TableLike, k: &str) -> Span {
        t.get(k)
            .and_then(|i| i.span())
            .or_else(|| Self::key_span(t, k))
    }

    pub(super) fn string(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<String> {
        let item = t.get(k)?;
        match item.as_str() {
            Some(s) => Some(s.to_string()),
            None => {
                self.err(
                    Self::value_span(t, k),
                    format!("{what}.{k} must be text in quotes, e.g. {k} = \"...\""),
                );
                None
            }
        }
    }

    pub(super) fn number(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<f64> {
        let item = t.get(k)?;
        match item
            .as_float()
            .or_else(|| item.as_integer().map(|i| i as f64))
        {
            Some(v) if v.is_finite() => Some(v),
            _ => {
                self.err(
                    Self::value_span(t, k),
                    format!("{what}.{k} must be a number, e.g. {k} = 2"),
                );
                None
            }
        }
    }

    pub(super) fn boolean(&mut self, t: &dyn TableLike, k: &str, what: &str) -> bool {
        let Some(item) = t.get(k) else { return false };
        match item.as_bool() {
            Some(b) => b,
            None => {
                self.err(
                    Self::value_span(t, k),
                    format!("{what}.{k} must be true or false"),
                );
                false
            }
        }
    }

    pub(super) fn quantity_value(
        &mut self,
        v: &Value,
        span: Span,
        kind: Kind,
        what: &str,
    ) -> Option<f64> {
        let r = if let Some(s) = v.as_str() {
            units::parse(s, kind).map_err(|e| e.to_string())
        } else if let Some(x) = v.as_float().or_else(|| v.as_integer().map(|i| i as f64)) {
            units::from_number(x, kind).map_err(|e| e.to_string())
        } else {
            Err(format!("expected a value such as {}", kind.example()))
        };
        match r.and_then(|x| {
            if x.is_finite() {
                check::plausible(x, kind).map_err(|e| e.to_string())
            } else {
                Ok(x)
            }
        }) {
            Ok(x) if x.is_finite() => Some(x),
            Ok(_) => {
                self.err(
                    span,
                    format!("{what}: value is not finite; write e.g. {}", kind.example()),
                );
                None
            }
            Err(m) => {
                self.err(span, format!("{what}: {m}"));
                None
            }
        }
    }

    pub(super) fn quantity(
        &mut self,
        t: &dyn TableLike,
        k: &str,
        kind: Kind,
        what: &str,
    ) -> Option<f64> {
        let item = t.get(k)?;
        let span = Self::value_span(t, k);
        match item.as_value() {
            Some(v) => self.quantity_value(v, span, kind, &format!("{what}.{k}")),
            None => {
                self.err(
                    span,
                    format!("{what}.{k}: expected a value such as {}", kind.example()),
                );
                None
            }
        }
    }

    pub(super) fn bounds(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<(f64, f64)> {
        let item = t.get(k)?;
        let span = Self::value_span(t, k);
        let Some(arr) = item.as_array().filter(|a| a.len() == 2) else {
            self.err(
                span,
                format!("{what}.{k} must be a pair such as [\"1 uM\", \"10 mM\"]"),
            );
            return None;
        };
        let lo = self.quantity_value(
            arr.get(0)?,
            span.clone(),
            Kind::Concentration,
            &format!("{what}.{k}"),
        );
        let hi = self.quantity_value(
            arr.get(1)?,
            span.clone(),
            Kind::Concentration,
            &format!("{what}.{k}"),
        );
        let (lo, hi) = (lo?, hi?);
        if lo <= 0.0 || hi <= 0.0 {
            self.err(
                span,
                format!(
                    "{what}.{k}: bounds must be positive concentrations, e.g. [\"1 uM\", \"10 mM\"]"
                ),
            );
            return None;
        }
        if lo > hi {
            self.err(
                span,
                format!(
                    "{what}.{k}: lower bound {} is above upper bound {}; write the lower one first",
                    units::format_conc(lo, true),
                    units::format_conc(hi, true)
                ),
            );
            return None;
        }
        Some((lo, hi))
    }

    pub(super) fn table<'d>(
        &mut self,
        root: &'d toml_edit::Table,
        k: &str,
    ) -> Option<&'d dyn TableLike> {
        let item = root.get(k)?;
        match item.as_table_like() {
            Some(t) => Some(t),
            None => {
                self.err(
                    Self::value_span(root, k),
                    format!("'{k}' must be a table: write [{k}] on a line of its own"),
                );
                None
            }
        }
    }

    pub(super) fn table_span(root: &toml_edit::Table, k: &str) -> Span {
        root.get(k)
            .and_then(|i| i.as_table().and_then(|t| t.span()).or(i.span()))
            .or_else(|| Self::key_span(root, k))
    }
}
