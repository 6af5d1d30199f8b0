//! Reading a pathway file into a checked `Pathway`, collecting every problem
//! with its line instead of stopping at the first.

mod compounds;
mod header;
mod reader;
mod resolve;
mod steps;

use super::pathway::*;
use reader::{Cx, Span};

/// Most pKa values one compound may list.
pub(super) const MAX_PKA: usize = 16;

/// A count as written in a message: 1, -2, 0.5.
pub(super) fn fmt_count(x: f64) -> String {
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
    let doc = match reader::Table::parse(text) {
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
    let pw = cx.pathway(doc.get_ref());
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
