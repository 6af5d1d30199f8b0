//! The generic part of reading: where a span is (line, column), collecting
//! problems, and reading one value of a table (text, number, flag, quantity,
//! bounds, sub-table) with a message that names the field.

use super::super::pathway::*;
use super::super::units::Kind;
use super::super::{check, units};

/// A parsed TOML table: keys and values with their byte spans, borrowing the
/// file's text where it can. Reading through `toml`'s spanned tree rather
/// than `toml_edit`'s document (which keeps every key's and value's layout
/// for writing) made parsing a 5,000-step file about 2.5 times faster; the
/// layout is only needed when saving, which still uses `toml_edit`.
pub(super) type Table<'i> = toml::de::DeTable<'i>;
/// One parsed value with its span.
pub(super) type Item<'i> = toml::Spanned<toml::de::DeValue<'i>>;

/// What the loader reads from a value, named as in `toml_edit` so the
/// readers above stay plain: text, numbers, flags, lists and tables.
pub(super) trait Read<'i> {
    /// Text in quotes.
    fn as_str(&self) -> Option<&str>;
    /// A whole number, as written (not a float).
    fn as_integer(&self) -> Option<i64>;
    /// A number written with a point or exponent (not a whole number).
    fn as_float(&self) -> Option<f64>;
    /// Any number, whole or not, as f64. A whole number beyond the 64-bit
    /// range is kept (as the nearest f64) so that the plausibility check
    /// names it, rather than being taken for text.
    fn as_number(&self) -> Option<f64>;
    /// true or false.
    fn as_bool(&self) -> Option<bool>;
    /// A list, `[...]`.
    fn as_array(&self) -> Option<&[Item<'i>]>;
    /// A table, `[name]` or `{ ... }`.
    fn as_table_like(&self) -> Option<&Table<'i>>;
    /// The value's span as the readers carry it.
    fn at(&self) -> Span;
}

impl<'i> Read<'i> for Item<'i> {
    fn as_str(&self) -> Option<&str> {
        self.get_ref().as_str()
    }
    fn as_integer(&self) -> Option<i64> {
        let i = self.get_ref().as_integer()?;
        i64::from_str_radix(i.as_str(), i.radix()).ok()
    }
    fn as_float(&self) -> Option<f64> {
        self.get_ref().as_float()?.as_str().parse().ok()
    }
    fn as_number(&self) -> Option<f64> {
        self.as_float()
            .or_else(|| self.as_integer().map(|i| i as f64))
            .or_else(|| {
                // Beyond i64: a decimal whole number still reads as f64.
                let i = self.get_ref().as_integer()?;
                (i.radix() == 10).then(|| i.as_str().parse().ok())?
            })
    }
    fn as_bool(&self) -> Option<bool> {
        self.get_ref().as_bool()
    }
    fn as_array(&self) -> Option<&[Item<'i>]> {
        self.get_ref().as_array().map(|a| &a[..])
    }
    fn as_table_like(&self) -> Option<&Table<'i>> {
        self.get_ref().as_table()
    }
    fn at(&self) -> Span {
        Some(self.span())
    }
}

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
pub(super) fn open(t: &Table, k: &str) -> bool {
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
    pub(super) fn known_keys(&mut self, t: &Table, allowed: &[&str], what: &str) {
        for (k, _) in t.iter() {
            let (span, k) = (Some(k.span()), k.get_ref().as_ref());
            if !allowed.contains(&k) {
                let hint = match suggest(k, allowed.iter().copied()) {
                    Some(s) => format!("; did you mean '{s}'?"),
                    None => format!("; allowed here: {}", allowed.join(", ")),
                };
                self.err(span, format!("unknown field '{k}' in {what}{hint}"));
            }
        }
    }

    pub(super) fn key_span(t: &Table, k: &str) -> Span {
        t.get_key_value(k).map(|(k, _)| k.span())
    }

    pub(super) fn value_span(t: &Table, k: &str) -> Span {
        t.get(k).map(|i| i.span())
    }

    pub(super) fn string(&mut self, t: &Table, k: &str, what: &str) -> Option<String> {
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

    pub(super) fn number(&mut self, t: &Table, k: &str, what: &str) -> Option<f64> {
        let item = t.get(k)?;
        match item.as_number() {
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

    pub(super) fn boolean(&mut self, t: &Table, k: &str, what: &str) -> bool {
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
        v: &Item,
        span: Span,
        kind: Kind,
        what: &str,
    ) -> Option<f64> {
        let r = if let Some(s) = v.as_str() {
            units::parse(s, kind).map_err(|e| e.to_string())
        } else if let Some(x) = v.as_number() {
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

    pub(super) fn quantity(&mut self, t: &Table, k: &str, kind: Kind, what: &str) -> Option<f64> {
        let item = t.get(k)?;
        let span = Self::value_span(t, k);
        self.quantity_value(item, span, kind, &format!("{what}.{k}"))
    }

    pub(super) fn bounds(&mut self, t: &Table, k: &str, what: &str) -> Option<(f64, f64)> {
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
            arr.first()?,
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

    pub(super) fn table<'d>(&mut self, root: &'d Table<'d>, k: &str) -> Option<&'d Table<'d>> {
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

    pub(super) fn table_span(root: &Table, k: &str) -> Span {
        Self::value_span(root, k)
    }
}
