//! The CSV tables an import reads: standard energies per reaction (columns
//! `step`, `dg0`, optional `dg0_sd`) and concentrations per species (columns
//! `compound`, `conc`). A unit goes in the header (`dg0 [kJ/mol]`) or in the
//! cell; values are kept as written so the pathway file shows the same text.

use super::error::ImportError;
use super::sbml::Model;
use crate::model::check;
use crate::model::units::Kind;

/// A value as written (number and unit), already checked.
#[derive(Debug, Clone, PartialEq)]
pub struct Written {
    /// The number as written.
    pub number: String,
    /// The unit as written (from the cell or the header).
    pub unit: String,
    /// Line in the table.
    pub line: usize,
}

impl Written {
    /// `"-16.7 kJ/mol"`.
    pub fn text(&self) -> String {
        format!("{} {}", self.number, self.unit)
    }
    /// The same value with the opposite sign, written exactly.
    pub fn negated(&self) -> Written {
        let n = self.number.trim();
        let number = if let Some(rest) = n.strip_prefix('-') {
            rest.to_string()
        } else if let Some(rest) = n.strip_prefix('+') {
            format!("-{rest}")
        } else if n.parse::<f64>() == Ok(0.0) {
            n.to_string()
        } else {
            format!("-{n}")
        };
        Written {
            number,
            unit: self.unit.clone(),
            line: self.line,
        }
    }
}

/// One row of the dg0 table.
#[derive(Debug, Clone, PartialEq)]
pub struct Dg0Row {
    /// Reaction id as written in the table.
    pub step: String,
    /// dG'° of the reaction as the model writes it.
    pub dg0: Written,
    /// Its standard uncertainty, when given.
    pub dg0_sd: Option<Written>,
}

/// The dg0 table.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Dg0Table {
    /// File name for messages and comments.
    pub file: String,
    /// Rows in file order (rows with an empty dg0 cell left out).
    pub rows: Vec<Dg0Row>,
}

/// One row of the concentration table.
#[derive(Debug, Clone, PartialEq)]
pub struct ConcRow {
    /// Species id as written in the table.
    pub compound: String,
    /// The concentration.
    pub conc: Written,
}

/// The concentration table.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ConcTable {
    /// File name for messages and comments.
    pub file: String,
    /// Rows in file order (rows with an empty cell left out).
    pub rows: Vec<ConcRow>,
}

/// A column header whose unit is not written as `name [unit]`.
#[derive(Debug, thiserror::Error)]
enum HeaderError {
    /// A `[` without its `]` (the header).
    #[error("column '{0}' opens '[' but does not close it; write e.g. 'dg0 [kJ/mol]'")]
    Unclosed(String),
    /// Text after the `]` (the header).
    #[error("column '{0}' has text after the unit; write e.g. 'dg0 [kJ/mol]'")]
    AfterUnit(String),
}

/// `dg0 [kJ/mol]` -> ("dg0", Some("kJ/mol")).
fn split_header(h: &str) -> Result<(String, Option<String>), HeaderError> {
    let h = h.trim();
    match h.find('[') {
        None => Ok((h.to_string(), None)),
        Some(i) => {
            let name = h[..i].trim().to_string();
            let rest = &h[i + 1..];
            let Some(j) = rest.find(']') else {
                return Err(HeaderError::Unclosed(h.to_string()));
            };
            if !rest[j + 1..].trim().is_empty() {
                return Err(HeaderError::AfterUnit(h.to_string()));
            }
            Ok((name, Some(rest[..j].trim().to_string())))
        }
    }
}

struct Columns {
    key: usize,
    value: (usize, Option<String>),
    sd: Option<(usize, Option<String>)>,
}

fn columns(
    rdr: &mut csv::Reader<&[u8]>,
    file: &str,
    key: &str,
    value: &str,
    example: &str,
) -> Result<Columns, ImportError> {
    let headers = rdr
        .headers()
        .map_err(|e| ImportError::new(file, Some(1), format!("cannot read the header: {e}")))?
        .clone();
    let mut key_at = None;
    let mut value_at = None;
    let mut sd_at = None;
    for (i, h) in headers.iter().enumerate() {
        let h = h.trim_start_matches('\u{feff}');
        let (name, unit) =
            split_header(h).map_err(|e| ImportError::new(file, Some(1), e.to_string()))?;
        match name.as_str() {
            n if n == key => key_at = Some(i),
            n if n == value => value_at = Some((i, unit)),
            n if n == format!("{value}_sd") && value == "dg0" => sd_at = Some((i, unit)),
            _ => {}
        }
    }
    match (key_at, value_at) {
        (Some(k), Some(v)) => Ok(Columns {
            key: k,
            value: v,
            sd: sd_at,
        }),
        _ => Err(ImportError::new(
            file,
            Some(1),
            format!("the header needs columns '{key}' and '{value}'; write e.g. '{example}'"),
        )),
    }
}

fn cell(
    file: &str,
    line: usize,
    text: &str,
    header_unit: &Option<String>,
    kind: Kind,
    column: &str,
) -> Result<Option<Written>, ImportError> {
    let t = text.trim();
    if t.is_empty() {
        return Ok(None);
    }
    // Split the number from the unit the way the unit parser does.
    let n = t
        .char_indices()
        .find(|&(i, c)| {
            !(c.is_ascii_digit()
                || c == '.'
                || ((c == '-' || c == '+') && (i == 0 || t[..i].ends_with(['e', 'E'])))
                || ((c == 'e' || c == 'E') && i > 0))
        })
        .map(|(i, _)| i)
        .unwrap_or(t.len());
    let (number, cell_unit) = (t[..n].trim(), t[n..].trim());
    let unit = if !cell_unit.is_empty() {
        cell_unit.to_string()
    } else if let Some(u) = header_unit {
        u.clone()
    } else {
        return Err(ImportError::new(
            file,
            Some(line),
            format!(
                "'{t}' in column '{column}' has no unit and the header gives none; write '{t} {}' or put the unit in the header (e.g. '{column} [{}]')",
                default_unit(kind),
                default_unit(kind)
            ),
        ));
    };
    let si = check::quantity(&format!("{number} {unit}"), kind)
        .map_err(|m| ImportError::new(file, Some(line), format!("column '{column}': {m}")))?;
    if kind == Kind::Concentration && si <= 0.0 {
        return Err(ImportError::new(
            file,
            Some(line),
            format!(
                "concentration '{t}' must be above zero; write a small positive value such as 1 nM for a trace"
            ),
        ));
    }
    if column.ends_with("_sd") && si < 0.0 {
        return Err(ImportError::new(
            file,
            Some(line),
            format!("'{t}' in column '{column}' cannot be negative"),
        ));
    }
    Ok(Some(Written {
        number: number.to_string(),
        unit,
        line,
    }))
}

fn default_unit(kind: Kind) -> &'static str {
    match kind {
        Kind::Energy => "kJ/mol",
        _ => "mM",
    }
}

fn records(text: &str) -> csv::Reader<&[u8]> {
    csv::ReaderBuilder::new()
        .flexible(true)
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .from_reader(text.as_bytes())
}

/// Reads a dg0 table (columns `step`, `dg0`, optional `dg0_sd`).
pub fn read_dg0(text: &str, file: &str) -> Result<Dg0Table, ImportError> {
    let mut rdr = records(text);
    let c = columns(
        &mut rdr,
        file,
        "step",
        "dg0",
        "step,dg0 [kJ/mol],dg0_sd [kJ/mol]",
    )?;
    let mut rows: Vec<Dg0Row> = Vec::new();
    for rec in rdr.records() {
        let (rec, line, step) = keyed_row(
            rec,
            file,
            c.key,
            "a row has no step id; write the model's reaction id in the 'step' column",
        )?;
        let Some(dg0) = cell(
            file,
            line,
            rec.get(c.value.0).unwrap_or(""),
            &c.value.1,
            Kind::Energy,
            "dg0",
        )?
        else {
            continue;
        };
        let dg0_sd = match &c.sd {
            Some((i, u)) => cell(
                file,
                line,
                rec.get(*i).unwrap_or(""),
                u,
                Kind::Energy,
                "dg0_sd",
            )?,
            None => None,
        };
        if let Some(first) = rows.iter().find(|r| r.step == step) {
            return Err(ImportError::new(
                file,
                Some(line),
                format!(
                    "step '{step}' has a second row (first at line {}); keep one",
                    first.dg0.line
                ),
            ));
        }
        rows.push(Dg0Row { step, dg0, dg0_sd });
    }
    Ok(Dg0Table {
        file: file.to_string(),
        rows,
    })
}

/// One row of a table: the record, its line and its key (step or compound
/// id), or an error naming the line when the row cannot be read or has no key.
fn keyed_row(
    rec: Result<csv::StringRecord, csv::Error>,
    file: &str,
    key: usize,
    no_key: &str,
) -> Result<(csv::StringRecord, usize, String), ImportError> {
    let rec = rec.map_err(|e| {
        ImportError::new(
            file,
            e.position().map(|p| p.line() as usize),
            format!("cannot read the row: {e}"),
        )
    })?;
    let line = rec.position().map(|p| p.line() as usize).unwrap_or(0);
    let id = rec.get(key).unwrap_or("").to_string();
    if id.is_empty() {
        return Err(ImportError::new(file, Some(line), no_key.to_string()));
    }
    Ok((rec, line, id))
}

/// Reads a concentration table (columns `compound`, `conc`).
pub fn read_conc(text: &str, file: &str) -> Result<ConcTable, ImportError> {
    let mut rdr = records(text);
    let c = columns(&mut rdr, file, "compound", "conc", "compound,conc [mM]")?;
    let mut rows: Vec<ConcRow> = Vec::new();
    for rec in rdr.records() {
        let (rec, line, compound) = keyed_row(
            rec,
            file,
            c.key,
            "a row has no compound id; write the model's species id in the 'compound' column",
        )?;
        let Some(conc) = cell(
            file,
            line,
            rec.get(c.value.0).unwrap_or(""),
            &c.value.1,
            Kind::Concentration,
            "conc",
        )?
        else {
            continue;
        };
        if let Some(first) = rows.iter().find(|r| r.compound == compound) {
            return Err(ImportError::new(
                file,
                Some(line),
                format!(
                    "compound '{compound}' has a second row (first at line {}); keep one",
                    first.conc.line
                ),
            ));
        }
        rows.push(ConcRow { compound, conc });
    }
    Ok(ConcTable {
        file: file.to_string(),
        rows,
    })
}

fn unknown(file: &str, line: usize, what: &str, id: &str, ids: Vec<&str>) -> ImportError {
    let hint = crate::model::suggest(id, ids)
        .map(|s| format!("; did you mean '{s}'?"))
        .unwrap_or_default();
    ImportError::new(
        file,
        Some(line),
        format!("the model has no {what} '{id}'{hint}"),
    )
}

impl Dg0Table {
    /// Every row must name a reaction of the model.
    pub fn check_against(&self, model: &Model) -> Result<(), ImportError> {
        for r in &self.rows {
            if model.reaction_by_id(&r.step).is_none() {
                let ids = model.reactions.iter().map(|r| r.id.as_str()).collect();
                return Err(unknown(&self.file, r.dg0.line, "reaction", &r.step, ids));
            }
        }
        Ok(())
    }
    /// The row for a reaction, by its model index.
    pub fn get(&self, model: &Model, reaction: usize) -> Option<&Dg0Row> {
        self.rows
            .iter()
            .find(|r| model.reaction_by_id(&r.step) == Some(reaction))
    }
}

impl ConcTable {
    /// Every row must name a species of the model.
    pub fn check_against(&self, model: &Model) -> Result<(), ImportError> {
        for r in &self.rows {
            if model.species_by_id(&r.compound).is_none() {
                let ids = model.species.iter().map(|s| s.id.as_str()).collect();
                return Err(unknown(
                    &self.file,
                    r.conc.line,
                    "species",
                    &r.compound,
                    ids,
                ));
            }
        }
        Ok(())
    }
    /// The row for a species, by its model index.
    pub fn get(&self, model: &Model, species: usize) -> Option<&ConcRow> {
        self.rows
            .iter()
            .find(|r| model.species_by_id(&r.compound) == Some(species))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_from_header_or_cell() {
        let t = read_dg0(
            "step,dg0 [kJ/mol],dg0_sd [kJ/mol]\nPGI,2.5,0.4\nPFK,-3.4 kcal/mol,\n",
            "d.csv",
        )
        .unwrap();
        assert_eq!(t.rows[0].dg0.text(), "2.5 kJ/mol");
        assert_eq!(
            t.rows[0].dg0_sd.as_ref().map(Written::text).as_deref(),
            Some("0.4 kJ/mol")
        );
        assert_eq!(t.rows[1].dg0.text(), "-3.4 kcal/mol");
        assert_eq!(t.rows[1].dg0.negated().text(), "3.4 kcal/mol");
        assert_eq!(t.rows[0].dg0.negated().text(), "-2.5 kJ/mol");
        assert_eq!(t.rows[1].dg0.line, 3);
    }

    #[test]
    fn bad_tables() {
        let e = read_dg0("step,dg0\nPGI,2.5\n", "d.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("d.csv:2:") && e.contains("no unit"), "{e}");
        let e = read_dg0("step,dg0 [kJ/mol]\nPGI,2.5 furlongs\n", "d.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("unknown unit 'furlongs'"), "{e}");
        let e = read_dg0("reaction,dg0 [kJ/mol]\n", "d.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("needs columns 'step' and 'dg0'"), "{e}");
        let e = read_conc("compound,conc [mM]\nglc,-1\n", "c.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("above zero"), "{e}");
        let e = read_conc("compound,conc [mol]\nglc,1\n", "c.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("unknown unit 'mol'"), "{e}");
    }
}
