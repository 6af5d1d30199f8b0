//! Reading a pathway file into a checked `Pathway`, collecting every problem
//! with its line instead of stopping at the first.

use super::check;
use super::reaction;
use super::units::{self, Kind};
use super::*;
use std::collections::HashMap;
use toml_edit::{Document, Item, TableLike, Value};

/// Most pKa values one compound may list.
const MAX_PKA: usize = 16;

/// A count as written in a message: 1, -2, 0.5.
fn fmt_count(x: f64) -> String {
    let r = (x * 1e9).round() / 1e9;
    if r == 0.0 { "0".into() } else { format!("{r}") }
}

/// Files larger than this are refused before parsing (bytes).
pub const MAX_FILE_BYTES: u64 = 50 * 1024 * 1024;

/// Reads and checks a pathway file from disk.
pub fn load_file(path: &std::path::Path) -> Result<Pathway, LoadError> {
    let name = path.display().to_string();
    let one = |message: String| LoadError {
        problems: vec![Problem {
            file: name.clone(),
            line: None,
            column: None,
            message,
        }],
    };
    let meta = std::fs::metadata(path).map_err(|e| one(io_message(&e)))?;
    if meta.is_dir() {
        return Err(one(
            "is a folder, not a pathway file; give the path of a .toml file".into(),
        ));
    }
    if meta.len() > MAX_FILE_BYTES {
        return Err(one(format!(
            "is {} MB, over the {} MB limit for pathway files; split it or check that it is the right file",
            meta.len() / (1024 * 1024),
            MAX_FILE_BYTES / (1024 * 1024)
        )));
    }
    let bytes = std::fs::read(path).map_err(|e| one(io_message(&e)))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        let line = e.as_bytes()[..at].iter().filter(|&&b| b == b'\n').count() + 1;
        LoadError {
            problems: vec![Problem {
                file: name.clone(),
                line: Some(line),
                column: None,
                message: format!("is not UTF-8 text (bad byte at offset {at}); save it as UTF-8"),
            }],
        }
    })?;
    load_str(&text, &name)
}

fn io_message(e: &std::io::Error) -> String {
    match e.kind() {
        std::io::ErrorKind::NotFound => {
            "no such file; check the path (dgpath new FILE writes a starter file)".into()
        }
        std::io::ErrorKind::PermissionDenied => {
            "cannot be read (permission denied); check the file's permissions".into()
        }
        _ => format!("cannot be read: {e}"),
    }
}

/// Parses and checks pathway text; `file` names it in messages.
pub fn load_str(text: &str, file: &str) -> Result<Pathway, LoadError> {
    let line_starts = std::iter::once(0)
        .chain(text.match_indices('\n').map(|(i, _)| i + 1))
        .collect();
    let mut cx = Cx {
        file: file.to_string(),
        src: text,
        line_starts,
        problems: Vec::new(),
    };
    let doc = match Document::parse(text) {
        Ok(d) => d,
        Err(e) => {
            let span = e.span();
            let msg = e.message().trim().to_string();
            if msg == "duplicate key"
                && let Some(m) = duplicate_key_message(text, &span)
            {
                cx.err(span, m);
                return Err(cx.finish());
            }
            cx.err(span, format!("TOML syntax error: {msg}"));
            return Err(cx.finish());
        }
    };
    let pw = cx.pathway(doc.as_table());
    match pw {
        Some(p) if cx.problems.is_empty() => Ok(p),
        _ => Err(cx.finish()),
    }
}

/// Names the key a TOML "duplicate key" error points at, and the table it is in.
fn duplicate_key_message(text: &str, span: &Span) -> Option<String> {
    let start = span.as_ref()?.start.min(text.len());
    let rest = &text[start..];
    let key: String = rest
        .chars()
        .take_while(|c| c.is_ascii_alphanumeric() || *c == '_' || *c == '-')
        .collect();
    if key.is_empty() {
        return None;
    }
    let line_of = |at: usize| text[..at].matches('\n').count() + 1;
    // The table header above the key, and the first line of the same key under it.
    let before = &text[..start];
    let (table, table_start) = before
        .match_indices('\n')
        .map(|(i, _)| i + 1)
        .chain(std::iter::once(0))
        .filter_map(|i| {
            let l = text[i..].lines().next().unwrap_or("").trim();
            (l.starts_with('[') && !l.starts_with("[[")).then(|| {
                (
                    l.trim_matches(|c| c == '[' || c == ']').trim().to_string(),
                    i,
                )
            })
        })
        .max_by_key(|&(_, i)| i)?;
    let first = text[table_start..start]
        .match_indices('\n')
        .map(|(i, _)| table_start + i + 1)
        .find(|&i| {
            let l = &text[i..];
            l.starts_with(key.as_str()) && l[key.len()..].trim_start().starts_with('=')
        })
        .map(line_of);
    let at = first
        .map(|l| format!(" (first at line {l})"))
        .unwrap_or_default();
    Some(if table == "compounds" {
        format!("compound '{key}' is declared twice{at}; give each compound its own id")
    } else {
        format!("'{key}' is written twice in [{table}]{at}; keep one of them")
    })
}

/// `"?"`: a value `dgpath import` left for the person to fill in.
fn open(t: &dyn TableLike, k: &str) -> bool {
    t.get(k).and_then(|i| i.as_str()).map(str::trim) == Some("?")
}

struct Cx<'s> {
    file: String,
    src: &'s str,
    /// Byte offset where each line starts, so that finding a line is a
    /// binary search rather than a scan from the top of the file.
    line_starts: Vec<usize>,
    problems: Vec<Problem>,
}

type Span = Option<std::ops::Range<usize>>;

const TOP: &[&str] = &[
    "format",
    "pathway",
    "conditions",
    "analysis",
    "compounds",
    "steps",
];
const PATHWAY: &[&str] = &["name", "description", "route"];
const CONDITIONS: &[&str] = &[
    "temperature",
    "ph",
    "ionic_strength",
    "reference_temperature",
    "reference_ph",
    "reference_ionic_strength",
];
const ANALYSIS: &[&str] = &["far", "near_factor", "bounds"];
const COMPOUND: &[&str] = &[
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
const STEP: &[&str] = &[
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

struct RawStep {
    id: String,
    line: usize,
    span: Span,
    enzyme: Option<String>,
    reaction: Option<(String, Span)>,
    standard: Option<Standard>,
    dg0_sd: Option<f64>,
    dh0: Option<f64>,
    protons: Option<f64>,
    standard_state: f64,
    times: Option<f64>,
    side: bool,
    couple: Option<(String, Span)>,
    bypass_of: Option<(String, Span)>,
}

impl<'s> Cx<'s> {
    fn finish(mut self) -> LoadError {
        self.problems
            .sort_by_key(|p| (p.line.unwrap_or(0), p.column.unwrap_or(0)));
        self.problems.dedup();
        LoadError {
            problems: self.problems,
        }
    }

    fn pos(&self, span: &Span) -> (Option<usize>, Option<usize>) {
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

    fn line(&self, span: &Span) -> usize {
        self.pos(span).0.unwrap_or(0)
    }

    fn err(&mut self, span: Span, message: String) {
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
    fn known_keys(&mut self, t: &dyn TableLike, allowed: &[&str], what: &str) {
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

    fn key_span(t: &dyn TableLike, k: &str) -> Span {
        t.key(k)
            .and_then(|k| k.span())
            .or_else(|| t.get(k).and_then(|i| i.span()))
    }

    fn value_span(t: &dyn TableLike, k: &str) -> Span {
        t.get(k)
            .and_then(|i| i.span())
            .or_else(|| Self::key_span(t, k))
    }

    fn string(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<String> {
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

    fn number(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<f64> {
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

    fn boolean(&mut self, t: &dyn TableLike, k: &str, what: &str) -> bool {
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

    fn quantity_value(&mut self, v: &Value, span: Span, kind: Kind, what: &str) -> Option<f64> {
        let r = if let Some(s) = v.as_str() {
            units::parse(s, kind)
        } else if let Some(x) = v.as_float().or_else(|| v.as_integer().map(|i| i as f64)) {
            units::from_number(x, kind)
        } else {
            Err(format!("expected a value such as {}", kind.example()))
        };
        match r.and_then(|x| {
            if x.is_finite() {
                check::plausible(x, kind)
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

    fn quantity(&mut self, t: &dyn TableLike, k: &str, kind: Kind, what: &str) -> Option<f64> {
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

    fn bounds(&mut self, t: &dyn TableLike, k: &str, what: &str) -> Option<(f64, f64)> {
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

    fn table<'d>(&mut self, root: &'d toml_edit::Table, k: &str) -> Option<&'d dyn TableLike> {
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

    fn pathway(&mut self, root: &toml_edit::Table) -> Option<Pathway> {
        self.known_keys(root, TOP, "the top level");
        match root.get("format") {
            None => self.err(
                Some(0..0),
                "missing 'format'; put format = 1 on the first line".into(),
            ),
            Some(f) if f.as_integer() == Some(1) => {}
            Some(_) => self.err(
                Self::value_span(root, "format"),
                "this dgpath reads format = 1 only; write format = 1 (or use a newer dgpath)"
                    .into(),
            ),
        }
        // [pathway]
        let mut name = None;
        let mut description = None;
        let mut route_ids: Option<Vec<(String, Span)>> = None;
        match self.table(root, "pathway") {
            None if !root.contains_key("pathway") => self.err(
                Some(0..0),
                "missing [pathway] table; add [pathway] with name = \"...\"".into(),
            ),
            None => {}
            Some(t) => {
                self.known_keys(t, PATHWAY, "[pathway]");
                name = self.string(t, "name", "pathway");
                if name.is_none() && t.get("name").is_none() {
                    self.err(
                        Self::table_span(root, "pathway"),
                        "[pathway] needs a name: name = \"...\"".into(),
                    );
                }
                description = self.string(t, "description", "pathway");
                if let Some(item) = t.get("route") {
                    let span = Self::value_span(t, "route");
                    match item.as_array() {
                        Some(a) if a.iter().all(|v| v.as_str().is_some()) => {
                            route_ids = Some(
                                a.iter().map(|v| (v.as_str().unwrap_or_default().to_string(), v.span().or(span.clone()))).collect(),
                            )
                        }
                        _ => self.err(span, "pathway.route must be a list of step ids, e.g. route = [\"s1\", \"s2\"]".into()),
                    }
                }
            }
        }
        // [conditions]
        let mut conditions = Conditions {
            temperature: f64::NAN,
            ph: 7.0,
            ionic_strength: 0.0,
        };
        let mut reference = Conditions {
            temperature: 298.15,
            ph: 7.0,
            ionic_strength: 0.0,
        };
        match self.table(root, "conditions") {
            None if !root.contains_key("conditions") => self.err(
                Some(0..0),
                "missing [conditions] table; add [conditions] with temperature = \"30 C\"".into(),
            ),
            None => {}
            Some(t) => {
                self.known_keys(t, CONDITIONS, "[conditions]");
                match t.get("temperature") {
                    None => self.err(
                        Self::table_span(root, "conditions"),
                        "[conditions] needs a temperature, e.g. temperature = \"30 C\"".into(),
                    ),
                    Some(_) => {
                        if let Some(v) =
                            self.quantity(t, "temperature", Kind::Temperature, "conditions")
                        {
                            conditions.temperature = v;
                        }
                    }
                }
                conditions.ph = self.number(t, "ph", "conditions").unwrap_or(7.0);
                conditions.ionic_strength = self
                    .quantity(t, "ionic_strength", Kind::IonicStrength, "conditions")
                    .unwrap_or(0.0);
                reference.temperature = self
                    .quantity(t, "reference_temperature", Kind::Temperature, "conditions")
                    .unwrap_or(298.15);
                reference.ph = self.number(t, "reference_ph", "conditions").unwrap_or(7.0);
                reference.ionic_strength = self
                    .quantity(
                        t,
                        "reference_ionic_strength",
                        Kind::IonicStrength,
                        "conditions",
                    )
                    .unwrap_or(0.0);
                for (k, v) in [("ph", conditions.ph), ("reference_ph", reference.ph)] {
                    if t.get(k).is_some()
                        && let Err(m) = check::ph(v)
                    {
                        self.err(Self::value_span(t, k), format!("conditions.{k}: {m}"));
                    }
                }
            }
        }
        // [analysis]
        let mut settings = Settings::default();
        if let Some(t) = self.table(root, "analysis") {
            self.known_keys(t, ANALYSIS, "[analysis]");
            if let Some(f) = self.quantity(t, "far", Kind::Energy, "analysis") {
                if f >= 0.0 {
                    self.err(
                        Self::value_span(t, "far"),
                        "analysis.far must be negative, e.g. far = \"-10 kJ/mol\"".into(),
                    );
                }
                settings.far = f;
            }
            if let Some(n) = self.number(t, "near_factor", "analysis") {
                if n <= 1.0 {
                    self.err(
                        Self::value_span(t, "near_factor"),
                        "analysis.near_factor must be above 1, e.g. near_factor = 10".into(),
                    );
                } else {
                    settings.near_factor = n;
                }
            }
            if let Some(b) = self.bounds(t, "bounds", "analysis") {
                settings.bounds = b;
            }
        }
        // [compounds]
        let mut compounds = Vec::new();
        match self.table(root, "compounds") {
            None if !root.contains_key("compounds") => self.err(
                Some(0..0),
                "missing [compounds] table; declare every compound, e.g. glc = { name = \"glucose\", conc = \"5 mM\" }".into(),
            ),
            None => {}
            Some(t) => {
                for (id, item) in t.iter() {
                    let kspan = Self::key_span(t, id);
                    if let Some(c) = self.compound(id, item, kspan) {
                        compounds.push(c);
                    }
                }
            }
        }
        // [[steps]]
        let mut raw_steps = Vec::new();
        match root.get("steps") {
            None => self.err(
                Some(0..0),
                "no [[steps]]; add at least one [[steps]] with id, reaction and dg0".into(),
            ),
            Some(item) => match item.as_array_of_tables() {
                Some(arr) => {
                    for t in arr.iter() {
                        if let Some(s) = self.raw_step(t) {
                            raw_steps.push(s);
                        }
                    }
                }
                None => self.err(
                    item.span(),
                    "steps must be written as [[steps]] tables, one per step".into(),
                ),
            },
        }
        self.resolve(
            name,
            description,
            route_ids,
            conditions,
            reference,
            settings,
            compounds,
            raw_steps,
        )
    }

    /// `pka = [7.60, 4.68]`: finite numbers, highest first; only with charge and hydrogens.
    fn pka(&mut self, t: &dyn TableLike, what: &str, has_species: bool) -> Vec<f64> {
        let Some(item) = t.get("pka") else {
            return Vec::new();
        };
        let span = Self::value_span(t, "pka");
        let values: Option<Vec<f64>> = item.as_array().and_then(|a| {
            a.iter()
                .map(|v| v.as_float().or_else(|| v.as_integer().map(|i| i as f64)))
                .collect()
        });
        let Some(values) = values.filter(|v| v.iter().all(|x| x.is_finite())) else {
            self.err(
                span,
                format!(
                    "{what}: pka must be a list of numbers, highest first, e.g. pka = [7.60, 4.68]"
                ),
            );
            return Vec::new();
        };
        if values.len() > MAX_PKA {
            self.err(
                span,
                format!("{what}: pka lists {} values, more than the {MAX_PKA} that are read; keep those within a few units of the pH", values.len()),
            );
            return Vec::new();
        }
        if values.windows(2).any(|w| w[1] > w[0]) {
            self.err(
                span,
                format!("{what}: pka must be listed highest first (the first proton bound to the most deprotonated species), e.g. pka = [7.60, 4.68]"),
            );
            return Vec::new();
        }
        if !values.is_empty() && !has_species {
            self.err(
                span,
                format!("{what}: pka needs the charge and hydrogens of the most deprotonated species; add e.g. charge = -4, hydrogens = 12"),
            );
            return Vec::new();
        }
        values
    }

    /// `standard = "1 mM"`: the standard state of dg0/keq, mol/L (1 when absent).
    fn standard_state(&mut self, t: &dyn TableLike, what: &str) -> f64 {
        match self.quantity(t, "standard", Kind::Concentration, what) {
            Some(c) if c > 0.0 => c,
            Some(_) => {
                self.err(
                    Self::value_span(t, "standard"),
                    format!("{what}: standard must be a positive concentration; write standard = \"1 mM\" (or leave it out for 1 M)"),
                );
                1.0
            }
            None => 1.0,
        }
    }

    /// A stated `protons` must match the base species' hydrogens when every
    /// reactant has charge and hydrogens (science.md §4).
    fn check_protons(&mut self, raw: &[RawStep], steps: &[Step], compounds: &[Compound]) {
        for (r, s) in raw.iter().zip(steps) {
            let (Some(stated), Some(counted)) = (r.protons, s.base_protons(compounds)) else {
                continue;
            };
            if (stated - counted).abs() > 1e-9 {
                self.err(
                    r.span.clone(),
                    format!(
                        "step '{}' states protons = {} but its reactants' charge and hydrogens give {} (−Σ ν nH of the most deprotonated species, water nH 2); correct protons to {} or leave it out",
                        s.id,
                        fmt_count(stated),
                        fmt_count(counted),
                        fmt_count(counted)
                    ),
                );
            }
        }
    }

    fn table_span(root: &toml_edit::Table, k: &str) -> Span {
        root.get(k)
            .and_then(|i| i.as_table().and_then(|t| t.span()).or(i.span()))
            .or_else(|| Self::key_span(root, k))
    }

    fn compound(&mut self, id: &str, item: &Item, kspan: Span) -> Option<Compound> {
        let line = self.line(&kspan);
        if !reaction::valid_id(id) {
            self.err(
                kspan.clone(),
                format!("compound id '{id}' is not valid; {}", reaction::ID_RULE),
            );
        }
        let Some(t) = item.as_table_like() else {
            self.err(kspan, format!("compound '{id}' must be a table, e.g. {id} = {{ name = \"...\", conc = \"1 mM\" }}"));
            return None;
        };
        let what = format!("compound '{id}'");
        self.known_keys(t, COMPOUND, &what);
        let name = self
            .string(t, "name", &what)
            .unwrap_or_else(|| id.to_string());
        let role = match t.get("role") {
            None => None,
            Some(r) => match r.as_str() {
                Some("currency") => Some(StatedRole::Currency),
                Some("solvent") => Some(StatedRole::Solvent),
                other => {
                    let got = other.unwrap_or("?");
                    let hint = suggest(got, ["currency", "solvent"])
                        .map(|s| format!("; did you mean '{s}'?"))
                        .unwrap_or_default();
                    self.err(Self::value_span(t, "role"), format!("{what}: role '{got}' is not known; write role = \"currency\" or role = \"solvent\" (other roles are inferred){hint}"));
                    None
                }
            },
        };
        let conc = if open(t, "conc") {
            self.err(Self::value_span(t, "conc"), format!("{what}: conc is still \"?\" (left open by dgpath import); write its concentration, e.g. conc = \"1 mM\""));
            None
        } else {
            self.quantity(t, "conc", Kind::Concentration, &what)
        };
        let solvent = role == Some(StatedRole::Solvent);
        match conc {
            Some(c) if c <= 0.0 && !solvent => self.err(
                Self::value_span(t, "conc"),
                format!("{what}: concentration must be above zero; write a small positive value such as \"1 nM\" for a trace compound"),
            ),
            None if !solvent && t.get("conc").is_none() => self.err(
                kspan.clone(),
                format!("{what} has no concentration; add conc = \"1 mM\" (or role = \"solvent\" for water)"),
            ),
            _ => {}
        }
        let charge = self.number(t, "charge", &what);
        let hydrogens = self.number(t, "hydrogens", &what);
        let pka = self.pka(t, &what, charge.is_some() && hydrogens.is_some());
        let cv = self.number(t, "cv", &what);
        if let Some(v) = cv
            && v < 0.0
        {
            self.err(
                Self::value_span(t, "cv"),
                format!("{what}: cv cannot be negative; write e.g. cv = 0.2 for 20 %"),
            );
        }
        Some(Compound {
            id: id.to_string(),
            name,
            conc: if solvent { None } else { conc },
            role,
            branch: self.boolean(t, "branch", &what),
            bounds: self.bounds(t, "bounds", &what),
            fixed: t
                .get("fixed")
                .is_some()
                .then(|| self.boolean(t, "fixed", &what)),
            cv,
            charge,
            hydrogens,
            pka,
            line,
        })
    }

    fn raw_step(&mut self, t: &toml_edit::Table) -> Option<RawStep> {
        let span = t.span();
        let line = self.line(&span);
        let id = match self.string(t, "id", "step") {
            Some(id) => id,
            None => {
                if t.get("id").is_none() {
                    self.err(
                        span.clone(),
                        "a [[steps]] entry has no id; add id = \"s1\"".into(),
                    );
                }
                return None;
            }
        };
        let what = format!("step '{id}'");
        if !reaction::valid_id(&id) {
            self.err(
                Self::value_span(t, "id"),
                format!("step id '{id}' is not valid; {}", reaction::ID_RULE),
            );
        }
        self.known_keys(t, STEP, &what);
        let reaction = match self.string(t, "reaction", &what) {
            Some(r) => Some((r, Self::value_span(t, "reaction"))),
            None => {
                if t.get("reaction").is_none() {
                    self.err(
                        span.clone(),
                        format!("{what} has no reaction; add reaction = \"a + b -> c\""),
                    );
                }
                None
            }
        };
        let dg0 = if open(t, "dg0") {
            self.err(Self::value_span(t, "dg0"), format!("{what}: dg0 is still \"?\" (left open by dgpath import); write the step's standard energy as it runs here, e.g. dg0 = \"-16.7 kJ/mol\""));
            None
        } else {
            self.quantity(t, "dg0", Kind::Energy, &what)
        };
        let keq = self.number(t, "keq", &what);
        let standard = match (t.get("dg0").is_some(), t.get("keq").is_some()) {
            (true, true) => {
                self.err(
                    Self::key_span(t, "keq"),
                    format!("{what} gives both dg0 and keq; keep exactly one of them"),
                );
                None
            }
            (false, false) => {
                self.err(
                    span.clone(),
                    format!(
                        "{what} has neither dg0 nor keq; add dg0 = \"-16.7 kJ/mol\" (or keq = 850)"
                    ),
                );
                None
            }
            (true, false) => dg0.map(Standard::Dg0),
            (false, true) => match keq {
                Some(k) if k > 0.0 => Some(Standard::Keq(k)),
                Some(_) => {
                    self.err(
                        Self::value_span(t, "keq"),
                        format!("{what}: keq must be above zero; write e.g. keq = 850"),
                    );
                    None
                }
                None => None,
            },
        };
        let dg0_sd = self.quantity(t, "dg0_sd", Kind::Energy, &what);
        if let Some(sd) = dg0_sd
            && sd < 0.0
        {
            self.err(
                Self::value_span(t, "dg0_sd"),
                format!("{what}: dg0_sd cannot be negative; write e.g. dg0_sd = \"1.5 kJ/mol\""),
            );
        }
        let times = self.number(t, "times", &what);
        if let Some(x) = times
            && x <= 0.0
        {
            self.err(
                Self::value_span(t, "times"),
                format!("{what}: times must be a positive number of turns, e.g. times = 2"),
            );
        }
        let link =
            |cx: &mut Self, k: &str| cx.string(t, k, &what).map(|s| (s, Self::value_span(t, k)));
        Some(RawStep {
            line,
            span,
            enzyme: self.string(t, "enzyme", &what),
            reaction,
            standard,
            dg0_sd,
            dh0: self.quantity(t, "dh0", Kind::Energy, &what),
            protons: self.number(t, "protons", &what),
            standard_state: self.standard_state(t, &what),
            times,
            side: self.boolean(t, "side", &what),
            couple: link(self, "couple"),
            bypass_of: link(self, "bypass_of"),
            id,
        })
    }

    #[allow(clippy::too_many_arguments)]
    fn resolve(
        &mut self,
        name: Option<String>,
        description: Option<String>,
        route_ids: Option<Vec<(String, Span)>>,
        conditions: Conditions,
        reference: Conditions,
        settings: Settings,
        compounds: Vec<Compound>,
        raw: Vec<RawStep>,
    ) -> Option<Pathway> {
        let compound_ids: Vec<&str> = compounds.iter().map(|c| c.id.as_str()).collect();
        let step_ids: Vec<&str> = raw.iter().map(|s| s.id.as_str()).collect();
        // Index of the first compound and step with each id (lookups in
        // constant time, so files of 100,000 steps load in linear time).
        let mut compound_at: HashMap<&str, usize> = HashMap::with_capacity(compound_ids.len());
        for (i, id) in compound_ids.iter().enumerate() {
            compound_at.entry(id).or_insert(i);
        }
        let mut step_at: HashMap<&str, usize> = HashMap::with_capacity(step_ids.len());
        for (i, id) in step_ids.iter().enumerate() {
            step_at.entry(id).or_insert(i);
        }
        // Unique step ids.
        for (i, s) in raw.iter().enumerate() {
            if let Some(&j) = step_at.get(s.id.as_str()).filter(|&&j| j < i) {
                self.err(
                    s.span.clone(),
                    format!(
                        "step id '{}' is used twice (first at line {}); give each step its own id",
                        s.id, raw[j].line
                    ),
                );
            }
        }
        let find_step = |cx: &mut Self, id: &str, span: &Span, what: &str| -> Option<usize> {
            match step_at.get(id).copied() {
                Some(i) => Some(i),
                None => {
                    let hint = suggest(id, step_ids.iter().copied())
                        .map(|s| format!("; did you mean '{s}'?"))
                        .unwrap_or_default();
                    cx.err(
                        span.clone(),
                        format!("{what} names step '{id}', which is not declared{hint}"),
                    );
                    None
                }
            }
        };
        let mut steps = Vec::new();
        for s in &raw {
            let what = format!("step '{}'", s.id);
            let mut stoich: Vec<(usize, f64)> = Vec::new();
            if let Some((text, span)) = &s.reaction {
                match reaction::parse_with(text, &|id| compound_ids.contains(&id)) {
                    Err(m) => self.err(span.clone(), format!("{what}: {m}")),
                    Ok(eq) => {
                        let mut left_ids = Vec::new();
                        for (sign, side) in [(-1.0, &eq.left), (1.0, &eq.right)] {
                            for term in side.iter() {
                                let Some(ci) = compound_at.get(term.id.as_str()).copied() else {
                                    let hint = suggest(&term.id, compound_ids.iter().copied())
                                        .map(|c| format!("did you mean '{c}'? Or declare it"))
                                        .unwrap_or_else(|| "declare it".to_string());
                                    self.err(
                                        span.clone(),
                                        format!("{what}: unknown compound '{}' in reaction; {hint} under [compounds], e.g. {} = {{ name = \"...\", conc = \"1 mM\" }}", term.id, term.id),
                                    );
                                    continue;
                                };
                                if sign < 0.0 {
                                    left_ids.push(ci);
                                } else if left_ids.contains(&ci) {
                                    self.err(
                                        span.clone(),
                                        format!("{what}: compound '{}' is on both sides of the reaction; write only its net change", term.id),
                                    );
                                    continue;
                                }
                                match stoich.iter_mut().find(|(c, _)| *c == ci) {
                                    Some(e) => e.1 += sign * term.coef,
                                    None => stoich.push((ci, sign * term.coef)),
                                }
                            }
                        }
                    }
                }
            }
            let couple = s
                .couple
                .as_ref()
                .and_then(|(id, span)| find_step(self, id, span, &format!("{what}: couple")));
            if couple.is_some() && couple == step_at.get(s.id.as_str()).copied() {
                self.err(
                    s.couple.as_ref().and_then(|c| c.1.clone()),
                    format!("{what} is coupled to itself; couple names the following step"),
                );
            }
            let bypass_of = s
                .bypass_of
                .as_ref()
                .and_then(|(id, span)| find_step(self, id, span, &format!("{what}: bypass_of")));
            if s.side && bypass_of.is_some() {
                self.err(
                    s.span.clone(),
                    format!(
                        "{what} is both a side step and a bypass; keep one of side / bypass_of"
                    ),
                );
            }
            steps.push(Step {
                id: s.id.clone(),
                enzyme: s.enzyme.clone(),
                reaction: s
                    .reaction
                    .as_ref()
                    .map(|r| r.0.trim().to_string())
                    .unwrap_or_default(),
                stoich,
                standard: s.standard.unwrap_or(Standard::Dg0(0.0)),
                dg0_sd: s.dg0_sd,
                dh0: s.dh0,
                protons: s.protons.unwrap_or(0.0),
                standard_state: s.standard_state,
                times: s.times,
                side: s.side,
                couple,
                bypass_of,
                line: s.line,
            });
        }
        self.check_protons(&raw, &steps, &compounds);
        for (i, s) in raw.iter().enumerate() {
            if let Some(b) = steps[i].bypass_of
                && (steps[b].bypass_of.is_some() || steps[b].side)
            {
                self.err(
                    s.bypass_of.as_ref().and_then(|x| x.1.clone()),
                    format!(
                        "step '{}': bypass_of must name a step of the main route, not '{}'",
                        s.id, steps[b].id
                    ),
                );
            }
        }
        // The route.
        let mut route = Vec::new();
        match route_ids {
            Some(ids) => {
                let mut listed = vec![false; steps.len()];
                for (id, span) in &ids {
                    let Some(i) = find_step(self, id, span, "pathway.route") else {
                        continue;
                    };
                    if std::mem::replace(&mut listed[i], true) {
                        self.err(
                            span.clone(),
                            format!("pathway.route lists step '{id}' twice; list each step once"),
                        );
                    } else if steps[i].side {
                        self.err(span.clone(), format!("pathway.route lists '{id}', which is marked side = true; remove it from the route or drop side"));
                    } else if steps[i].bypass_of.is_some() {
                        self.err(span.clone(), format!("pathway.route lists '{id}', a bypass step (bypass_of); bypasses run only in the reverse route"));
                    } else {
                        route.push(i);
                    }
                }
            }
            None => {
                route = (0..steps.len())
                    .filter(|&i| !steps[i].side && steps[i].bypass_of.is_none())
                    .collect()
            }
        }
        if route.is_empty() && !raw.is_empty() && self.problems.is_empty() {
            self.err(
                None,
                "the main route has no steps; add steps that are neither side = true nor bypass_of"
                    .into(),
            );
        }
        let name = name?;
        if !conditions.temperature.is_finite() {
            return None;
        }
        Some(Pathway {
            file: self.file.clone(),
            name,
            description,
            compounds,
            steps,
            route,
            conditions,
            reference,
            settings,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"format = 1
[pathway]
name = "t"
[conditions]
temperature = "30 C"
[compounds]
a = { conc = "1 mM" }
b = { conc = "80 uM", branch = true }
w = { role = "solvent" }
[[steps]]
id = "s1"
reaction = "a + w -> 2 b"
dg0 = -5
"#;

    fn errors(text: &str) -> Vec<String> {
        load_str(text, "x.toml")
            .unwrap_err()
            .problems
            .iter()
            .map(|p| p.to_string())
            .collect()
    }

    #[test]
    fn reads_a_small_file() {
        let p = load_str(GOOD, "x.toml").unwrap();
        assert_eq!(p.compounds.len(), 3);
        assert!((p.conditions.temperature - 303.15).abs() < 1e-12);
        assert_eq!(p.steps[0].stoich, vec![(0, -1.0), (2, -1.0), (1, 2.0)]);
        assert_eq!(p.steps[0].standard, Standard::Dg0(-5000.0));
        assert_eq!(p.route, vec![0]);
        assert!(p.compounds[1].branch);
        assert_eq!(p.compounds[1].conc, Some(80e-6));
    }

    #[test]
    fn syntax_error_names_line_and_column() {
        let e = errors("format = 1\n[pathway\nname = 1\n");
        assert!(e[0].starts_with("x.toml:2:"), "{e:?}");
        assert!(e[0].contains("TOML syntax"), "{e:?}");
    }

    #[test]
    fn unknown_field_suggests() {
        let e = errors(&GOOD.replace("branch = true", "brnch = true"));
        assert!(
            e.iter()
                .any(|m| m.contains("x.toml:8:") && m.contains("did you mean 'branch'")),
            "{e:?}"
        );
    }

    #[test]
    fn unknown_compound_suggests() {
        let e = errors(&GOOD.replace("a + w", "aa + w"));
        assert!(
            e.iter()
                .any(|m| m.contains("unknown compound 'aa'") && m.contains("did you mean 'a'")),
            "{e:?}"
        );
    }
}
