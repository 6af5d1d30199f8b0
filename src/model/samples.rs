//! Measured concentrations for many samples (time points, strains,
//! replicates), read from a CSV table into one concentration vector per
//! sample. This is model-level work: columns are matched to compound ids,
//! units are converted to mol/L, and every mistake names the file, the line
//! and the column. Rows are read one at a time, so a table of any length can
//! be streamed through the batch analysis without holding it in memory.
//!
//! The format (pathway-format.md, "Samples"): the first column is `sample`,
//! then one column per compound id. A unit goes in the header (`glc [mM]`) or
//! in each cell (`2.5 mM`); a cell's own unit wins over the header's. An empty
//! cell keeps the pathway file's concentration for that compound.

use crate::model::{self, Pathway, units};
use std::collections::HashSet;
use std::fmt;
use std::io::{BufRead, BufReader, Read};
use std::path::Path;

/// Where in the table a problem sits.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Place {
    /// File name as the user gave it.
    pub file: String,
    /// 1-based line in the file, where known.
    pub line: Option<u64>,
    /// Column header (or its 1-based number), where known.
    pub column: Option<String>,
}

impl fmt::Display for Place {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some(l) = self.line {
            write!(f, ":{l}")?;
        }
        if let Some(c) = &self.column {
            write!(f, ", column '{c}'")?;
        }
        Ok(())
    }
}

/// A mistake in a samples table.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SampleError {
    /// The file cannot be opened or read.
    #[error("{file}: cannot read the samples table: {message}")]
    Io {
        /// File name.
        file: String,
        /// The system's reason.
        message: String,
    },
    /// The header row is wrong.
    #[error("{place}: {message}")]
    Header {
        /// Where.
        place: Place,
        /// What is wrong and what to write instead.
        message: String,
    },
    /// A data row or cell is wrong.
    #[error("{place}: {message}")]
    Cell {
        /// Where.
        place: Place,
        /// What is wrong and what to write instead.
        message: String,
    },
    /// The table has a header but no samples.
    #[error("{file}: the samples table has a header but no sample rows; add one row per sample")]
    NoSamples {
        /// File name.
        file: String,
    },
}

/// One sample: its name and a concentration for every compound (mol/L, solvents 1).
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// The `sample` cell.
    pub name: String,
    /// Concentrations indexed like `Pathway::compounds`.
    pub conc: Vec<f64>,
}

/// One compound column of the table.
#[derive(Debug, Clone)]
struct Column {
    /// Header text as written (for messages).
    header: String,
    /// Compound index.
    compound: usize,
    /// Factor to mol/L from the header's unit, when it gives one.
    factor: Option<f64>,
}

/// Reads a samples table row by row.
pub struct SampleReader<R: Read> {
    file: String,
    rows: csv::StringRecordsIntoIter<BufReader<R>>,
    columns: Vec<Column>,
    base: Vec<f64>,
    seen: HashSet<String>,
    count: usize,
    done: bool,
}

impl SampleReader<std::fs::File> {
    /// Opens a samples table for a pathway; `base` is the concentration each empty cell keeps.
    pub fn open(path: &Path, pathway: &Pathway, base: &[f64]) -> Result<Self, SampleError> {
        let file = path.display().to_string();
        let f = std::fs::File::open(path).map_err(|e| SampleError::Io {
            file: file.clone(),
            message: e.to_string(),
        })?;
        SampleReader::new(f, &file, pathway, base)
    }
}

/// Why a column header could not be split into an id and a unit.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
enum HeaderError {
    /// `glc [mM` (the header as written).
    #[error("'{0}' opens '[' but does not close it; write e.g. 'glc [mM]'")]
    Unclosed(String),
    /// `glc [mM] x` (the header as written).
    #[error("'{0}' has text after the unit; write e.g. 'glc [mM]'")]
    TextAfterUnit(String),
}

/// Why a concentration cell could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
enum CellError {
    /// Neither a number nor a number with a unit (the cell as written).
    #[error(
        "'{0}' is not a concentration; write a number such as 2.5 (with the unit in the header) or '2.5 mM'"
    )]
    NotAConcentration(String),
    /// A bare number under a header without a unit.
    #[error(
        "'{0}' has no unit and the column header gives none; write '{0} mM' or put the unit in the header (e.g. 'glc [mM]')"
    )]
    NoUnit(String),
    /// The number and unit could not be read.
    #[error(transparent)]
    Unit(#[from] units::UnitError),
    /// Zero or negative.
    #[error(
        "'{0}': a concentration must be above zero; leave the cell empty to keep the pathway file's value"
    )]
    NotPositive(String),
}

/// Splits `glc [mM]` into `glc` and `Some("mM")`.
fn split_header(h: &str) -> Result<(&str, Option<&str>), HeaderError> {
    let h = h.trim();
    match h.find('[') {
        None => Ok((h, None)),
        Some(i) => {
            let rest = &h[i + 1..];
            let Some(j) = rest.find(']') else {
                return Err(HeaderError::Unclosed(h.to_string()));
            };
            if !rest[j + 1..].trim().is_empty() {
                return Err(HeaderError::TextAfterUnit(h.to_string()));
            }
            Ok((h[..i].trim(), Some(rest[..j].trim())))
        }
    }
}

impl<R: Read> SampleReader<R> {
    /// Reads the header from `input` (a UTF-8 byte-order mark is skipped).
    pub fn new(input: R, file: &str, p: &Pathway, base: &[f64]) -> Result<Self, SampleError> {
        let mut buf = BufReader::new(input);
        let io = |e: std::io::Error| SampleError::Io {
            file: file.to_string(),
            message: e.to_string(),
        };
        if buf.fill_buf().map_err(io)?.starts_with(b"\xEF\xBB\xBF") {
            buf.consume(3);
        }
        let mut rdr = csv::ReaderBuilder::new()
            .has_headers(true)
            .trim(csv::Trim::All)
            .from_reader(buf);
        let headers = match rdr.headers() {
            Ok(h) => h.clone(),
            Err(e) => return Err(csv_error(file, &e)),
        };
        let columns = header_columns(&headers, file, p)?;
        Ok(SampleReader {
            file: file.to_string(),
            rows: rdr.into_records(),
            columns,
            base: base.to_vec(),
            seen: HashSet::new(),
            count: 0,
            done: false,
        })
    }

    /// Compound indices that have a column, in column order.
    pub fn compounds(&self) -> Vec<usize> {
        self.columns.iter().map(|c| c.compound).collect()
    }

    fn parse_record(&mut self, rec: &csv::StringRecord) -> Result<Sample, SampleError> {
        let line = rec.position().map(|p| p.line());
        let place = |column: &str| Place {
            file: self.file.clone(),
            line,
            column: Some(column.to_string()),
        };
        let name = rec.get(0).unwrap_or("").to_string();
        if name.is_empty() {
            return Err(SampleError::Cell {
                place: place("sample"),
                message: "the sample has no name; write one in the 'sample' column".into(),
            });
        }
        if !self.seen.insert(name.clone()) {
            return Err(SampleError::Cell {
                place: place("sample"),
                message: format!(
                    "sample '{name}' appears twice; give each row its own name (e.g. '{name}-b')"
                ),
            });
        }
        let mut conc = self.base.clone();
        for (k, col) in self.columns.iter().enumerate() {
            let cell = rec.get(k + 1).unwrap_or("");
            if cell.is_empty() {
                continue;
            }
            let v = parse_cell(cell, col.factor).map_err(|m| SampleError::Cell {
                place: place(&col.header),
                message: m.to_string(),
            })?;
            conc[col.compound] = v;
        }
        Ok(Sample { name, conc })
    }
}

/// A place on the header line.
fn head_place(file: &str, column: Option<String>) -> Place {
    Place {
        file: file.to_string(),
        line: Some(1),
        column,
    }
}

/// The compound columns of the header row, after checking that it is not
/// empty and starts with 'sample'.
fn header_columns(
    headers: &csv::StringRecord,
    file: &str,
    p: &Pathway,
) -> Result<Vec<Column>, SampleError> {
    if headers.is_empty() || headers.iter().all(|h| h.is_empty()) {
        return Err(SampleError::Header {
            place: head_place(file, None),
            message: "the samples table is empty; its first line must be a header such as 'sample,glc [mM],atp [mM]'".into(),
        });
    }
    let first = headers.get(0).unwrap_or("");
    if !first.eq_ignore_ascii_case("sample") {
        return Err(SampleError::Header {
            place: head_place(file, Some(first.to_string())),
            message: format!(
                "the first column must be 'sample' (the sample's name), not '{first}'"
            ),
        });
    }
    let mut columns = Vec::new();
    let mut used: Vec<Option<String>> = vec![None; p.compounds.len()];
    for (k, h) in headers.iter().enumerate().skip(1) {
        let place = head_place(
            file,
            Some(if h.is_empty() {
                format!("#{}", k + 1)
            } else {
                h.to_string()
            }),
        );
        columns.push(compound_column(h, k, p, &mut used, place)?);
    }
    Ok(columns)
}

/// Header cell `h` (column `k`, 0-based) as a compound column: a known,
/// non-solvent compound with no column yet (`used` holds the headers seen
/// per compound), and its unit when it gives one.
fn compound_column(
    h: &str,
    k: usize,
    p: &Pathway,
    used: &mut [Option<String>],
    place: Place,
) -> Result<Column, SampleError> {
    let refuse = |message: String| SampleError::Header {
        place: place.clone(),
        message,
    };
    let (id, unit) = split_header(h).map_err(|m| refuse(m.to_string()))?;
    if id.is_empty() {
        return Err(refuse(format!(
            "column {} has no compound id; write a compound id such as 'glc [mM]'",
            k + 1
        )));
    }
    let Some(ci) = p.compound(id) else {
        let hint = model::suggest(id, p.compounds.iter().map(|c| c.id.as_str()))
            .map(|s| format!("; did you mean '{s}'?"))
            .unwrap_or_else(|| {
                "; every column after 'sample' must be a compound id of the pathway".into()
            });
        return Err(refuse(format!("no compound '{id}' in {}{hint}", p.file)));
    };
    if p.compounds[ci].is_solvent() {
        return Err(refuse(format!(
            "'{id}' is a solvent (activity 1); it has no concentration — remove the column"
        )));
    }
    if let Some(prev) = &used[ci] {
        return Err(refuse(format!(
            "'{id}' already has a column ('{prev}'); keep one column per compound"
        )));
    }
    used[ci] = Some(h.to_string());
    let factor = match unit {
        None => None,
        Some(u) => Some(
            units::conc_divisor(&u.replace(' ', ""))
                .filter(|_| !u.is_empty())
                .ok_or_else(|| {
                    refuse(format!(
                        "unknown concentration unit '[{u}]'; use {}",
                        units::Kind::Concentration.units()
                    ))
                })?,
        ),
    };
    Ok(Column {
        header: h.to_string(),
        compound: ci,
        factor,
    })
}

/// Parses one concentration cell to mol/L; `factor` is how many of the header's unit make 1 M.
fn parse_cell(cell: &str, factor: Option<f64>) -> Result<f64, CellError> {
    let bad = || CellError::NotAConcentration(cell.to_string());
    let t = cell.trim();
    // A bare number takes the header's unit.
    let v = if let Ok(x) = t.parse::<f64>() {
        if t.chars()
            .any(|c| c.is_ascii_alphabetic() && c != 'e' && c != 'E')
        {
            return Err(bad());
        }
        match factor {
            Some(d) => x / d,
            None => return Err(CellError::NoUnit(cell.to_string())),
        }
    } else {
        units::parse(t, units::Kind::Concentration).map_err(|e| match e {
            units::UnitError::NotANumber(_) => bad(),
            e => CellError::Unit(e),
        })?
    };
    if !v.is_finite() {
        return Err(bad());
    }
    if v <= 0.0 {
        return Err(CellError::NotPositive(cell.to_string()));
    }
    Ok(v)
}

fn csv_error(file: &str, e: &csv::Error) -> SampleError {
    let line = e.position().map(|p| p.line());
    let message = match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => format!(
            "this row has {len} cells but the header has {expected_len}; give every row one cell per column (leave a cell empty to keep the file's value)"
        ),
        csv::ErrorKind::Utf8 { .. } => {
            "the row is not valid UTF-8; save the table as UTF-8 text".into()
        }
        csv::ErrorKind::Io(io) => {
            return SampleError::Io {
                file: file.into(),
                message: io.to_string(),
            };
        }
        _ => format!("cannot read this row: {e}"),
    };
    SampleError::Cell {
        place: Place {
            file: file.into(),
            line,
            column: None,
        },
        message,
    }
}

impl<R: Read> Iterator for SampleReader<R> {
    type Item = Result<Sample, SampleError>;

    fn next(&mut self) -> Option<Self::Item> {
        if self.done {
            return None;
        }
        match self.rows.next() {
            None => {
                self.done = true;
                (self.count == 0).then(|| {
                    Err(SampleError::NoSamples {
                        file: self.file.clone(),
                    })
                })
            }
            Some(Err(e)) => {
                self.done = true;
                Some(Err(csv_error(&self.file, &e)))
            }
            Some(Ok(rec)) => {
                // A line with only empty cells (e.g. a trailing ",,,") is skipped.
                if rec.iter().all(|c| c.is_empty()) {
                    return self.next();
                }
                let r = self.parse_record(&rec);
                if r.is_err() {
                    self.done = true;
                } else {
                    self.count += 1;
                }
                Some(r)
            }
        }
    }
}

/// Reads a whole table from text (for tests and small inputs).
pub fn read_str(
    text: &str,
    file: &str,
    p: &Pathway,
    base: &[f64],
) -> Result<Vec<Sample>, SampleError> {
    SampleReader::new(text.as_bytes(), file, p, base)?.collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    const PW: &str = r#"
format = 1
[pathway]
name = "t"
[conditions]
temperature = "25 C"
ph = 7.0
[compounds]
a = { conc = "1 mM" }
b = { conc = "2 mM" }
w = { role = "solvent" }
[[steps]]
id = "s1"
reaction = "a -> b + w"
dg0 = "-5 kJ/mol"
"#;

    fn pw() -> Pathway {
        model::load_str(PW, "t.toml").unwrap()
    }

    fn read(text: &str) -> Result<Vec<Sample>, SampleError> {
        let p = pw();
        let base = p.file_concentrations();
        read_str(text, "s.csv", &p, &base)
    }

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-12 * b.abs().max(1e-300)
    }

    #[test]
    fn header_units_and_cell_units() {
        let s = read("sample,a [uM],b\nt0,50,3 mM\nt1,0.2 mM,40 uM\n").unwrap();
        assert_eq!(s.len(), 2);
        assert!(close(s[0].conc[0], 50e-6));
        assert!(close(s[0].conc[1], 3e-3));
        // A cell's own unit wins over the header's.
        assert!(close(s[1].conc[0], 0.2e-3));
        assert!(close(s[1].conc[1], 40e-6));
        assert_eq!(s[0].conc[2], 1.0, "solvents stay at activity 1");
    }

    #[test]
    fn empty_cells_keep_the_file_value() {
        let s = read("sample,a [mM],b [mM]\nx,,5\n").unwrap();
        assert!(close(s[0].conc[0], 1e-3));
        assert!(close(s[0].conc[1], 5e-3));
    }

    #[test]
    fn quoting_and_bom_and_spaces() {
        let s = read("\u{feff}\"sample\",\"a [mM]\", b [M] \n\"day 1, morning\",\"2.5\", 1e-3\n")
            .unwrap();
        assert_eq!(s[0].name, "day 1, morning");
        assert!(close(s[0].conc[0], 2.5e-3));
        assert!(close(s[0].conc[1], 1e-3));
    }

    #[test]
    fn unknown_column_is_named_with_a_suggestion() {
        let e = read("sample,aa [mM]\nx,1\n").unwrap_err().to_string();
        assert!(
            e.contains("s.csv:1, column 'aa [mM]'")
                && e.contains("no compound 'aa'")
                && e.contains("did you mean 'a'"),
            "{e}"
        );
    }

    #[test]
    fn bad_cell_names_row_and_column() {
        let e = read("sample,a [mM],b [mM]\nx,1,2\ny,1,lots\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("s.csv:3, column 'b [mM]': 'lots' is not a concentration"),
            "{e}"
        );
        let e = read("sample,a [mM]\nx,-1\n").unwrap_err().to_string();
        assert!(
            e.contains("s.csv:2, column 'a [mM]'") && e.contains("above zero"),
            "{e}"
        );
        let e = read("sample,a\nx,1\n").unwrap_err().to_string();
        assert!(e.contains("no unit"), "{e}");
        let e = read("sample,a [mM]\nx,1 furlong\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("s.csv:2, column 'a [mM]'") && e.contains("furlong"),
            "{e}"
        );
    }

    #[test]
    fn header_mistakes() {
        for (text, phrase) in [
            ("name,a [mM]\nx,1\n", "first column must be 'sample'"),
            ("sample,a [mM],a [uM]\nx,1,2\n", "already has a column"),
            ("sample,w [mM]\nx,1\n", "solvent"),
            (
                "sample,a [mol]\nx,1\n",
                "unknown concentration unit '[mol]'",
            ),
            ("sample,a [mM\nx,1\n", "does not close"),
            ("sample,a [mM]\n", "no sample rows"),
            ("", "empty"),
        ] {
            let e = read(text).unwrap_err().to_string();
            assert!(e.contains(phrase), "{text:?}: {e}");
        }
    }

    #[test]
    fn row_mistakes() {
        let e = read("sample,a [mM]\nx,1,2\n").unwrap_err().to_string();
        assert!(
            e.contains("s.csv:2") && e.contains("3 cells but the header has 2"),
            "{e}"
        );
        let e = read("sample,a [mM]\nx,1\nx,2\n").unwrap_err().to_string();
        assert!(
            e.contains("s.csv:3, column 'sample'") && e.contains("appears twice"),
            "{e}"
        );
        let e = read("sample,a [mM]\n,1\n").unwrap_err().to_string();
        assert!(e.contains("no name"), "{e}");
    }

    #[test]
    fn blank_rows_are_skipped() {
        let s = read("sample,a [mM]\nx,1\n,\ny,2\n").unwrap();
        assert_eq!(
            s.iter().map(|s| s.name.as_str()).collect::<Vec<_>>(),
            ["x", "y"]
        );
    }
}
