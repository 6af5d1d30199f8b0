//! Saving edits back into the pathway file: only the values that changed are
//! rewritten (with `toml_edit`, so comments and layout stay), the write is
//! atomic (temporary file in the same folder, fsync, rename), and a stamp of
//! the file on disk tells whether someone else changed it since it was read.

use super::State;
use crate::model::{Pathway, units};
use std::hash::{Hash, Hasher};
use std::io::Write;
use std::path::Path;
use toml_edit::{DocumentMut, Item, Value};

/// Why a save could not be done.
#[derive(Debug, thiserror::Error)]
pub enum SaveError {
    /// The original text no longer parses as TOML.
    #[error(
        "{file}: cannot save: the file on disk is not valid TOML any more ({msg}); fix it or reload"
    )]
    Parse {
        /// File name.
        file: String,
        /// Parser message.
        msg: String,
    },
    /// The file does not have the table a value belongs in.
    #[error("{file}: cannot save: {msg}")]
    Shape {
        /// File name.
        file: String,
        /// What is missing.
        msg: String,
    },
    /// Writing failed; the old file is untouched.
    #[error("{file}: cannot save: {source}; the file on disk is unchanged")]
    Io {
        /// File name.
        file: String,
        /// The I/O error.
        #[source]
        source: std::io::Error,
    },
}

/// Shortest text in `unit` that reads back (through the units parser) to exactly `v`.
fn exact(v: f64, unit: &str, scale: f64, kind: units::Kind) -> String {
    let x = v * scale;
    for digits in 3..=17 {
        let s = format!("{:.*e}", digits - 1, x);
        let num: f64 = s.parse().unwrap_or(x);
        let text = format!("{} {unit}", trim(num));
        if units::parse(&text, kind).ok() == Some(v) {
            return text;
        }
    }
    format!("{} {unit}", x)
}

fn trim(x: f64) -> String {
    // `{}` on f64 prints the shortest round-trip form without exponent for normal ranges.
    format!("{x}")
}

/// The concentration as file text, in the unit a person would write.
pub fn conc_text(m: f64) -> String {
    let (unit, scale) = if m >= 0.1 {
        ("M", 1.0)
    } else if m >= 1e-4 {
        ("mM", 1e3)
    } else if m >= 1e-7 {
        ("uM", 1e6)
    } else if m >= 1e-10 {
        ("nM", 1e9)
    } else {
        ("pM", 1e12)
    };
    exact(m, unit, scale, units::Kind::Concentration)
}

/// The temperature as file text in °C.
pub fn temperature_text(k: f64) -> String {
    let c = k - 273.15;
    for digits in 1..=17 {
        let s = format!("{:.*}", digits, c);
        let s = s.trim_end_matches('0').trim_end_matches('.');
        let text = format!("{s} C");
        if units::parse(&text, units::Kind::Temperature).ok() == Some(k) {
            return text;
        }
    }
    format!("{k} K")
}

fn set_keep_decor(slot: &mut Value, new: Value) {
    let decor = slot.decor().clone();
    *slot = new;
    *slot.decor_mut() = decor;
}

fn set_in(t: &mut dyn toml_edit::TableLike, key: &str, new: Value) {
    match t.get_mut(key) {
        Some(item) => match item.as_value_mut() {
            Some(v) => set_keep_decor(v, new),
            None => *item = Item::Value(new),
        },
        None => {
            t.insert(key, Item::Value(new));
        }
    }
}

/// The file text with the state's changed concentrations and conditions written in.
pub fn render(original: &str, p: &Pathway, state: &State) -> Result<String, SaveError> {
    let mut doc: DocumentMut =
        original
            .parse()
            .map_err(|e: toml_edit::TomlError| SaveError::Parse {
                file: p.file.clone(),
                msg: e.message().to_string(),
            })?;
    let shape = |msg: String| SaveError::Shape {
        file: p.file.clone(),
        msg,
    };
    {
        let comps = doc
            .get_mut("compounds")
            .and_then(|i| i.as_table_like_mut())
            .ok_or_else(|| shape("there is no [compounds] table".into()))?;
        for (i, c) in p.compounds.iter().enumerate() {
            if c.is_solvent() {
                continue;
            }
            let new = state.conc[i];
            if c.conc == Some(new) {
                continue;
            }
            let entry = comps
                .get_mut(&c.id)
                .and_then(|i| i.as_table_like_mut())
                .ok_or_else(|| shape(format!("compound '{}' is no longer in the file", c.id)))?;
            set_in(entry, "conc", Value::from(conc_text(new)));
        }
    }
    let old = &p.conditions;
    let new = &state.conditions;
    if old != new {
        let t = doc
            .get_mut("conditions")
            .and_then(|i| i.as_table_like_mut())
            .ok_or_else(|| shape("there is no [conditions] table".into()))?;
        if old.temperature != new.temperature {
            set_in(
                t,
                "temperature",
                Value::from(temperature_text(new.temperature)),
            );
        }
        if old.ph != new.ph {
            set_in(t, "ph", Value::from(new.ph));
        }
        if old.ionic_strength != new.ionic_strength {
            set_in(
                t,
                "ionic_strength",
                Value::from(format!("{} M", new.ionic_strength)),
            );
        }
    }
    Ok(doc.to_string())
}

/// A point inside an atomic write, for tests that stop a save part-way.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WritePoint {
    /// The temporary file exists and holds the first half of the text.
    HalfWritten,
    /// The temporary file is complete and flushed; the rename has not happened.
    BeforeRename,
    /// The rename is done.
    Renamed,
}

/// Writes `text` to `path` atomically: temporary file in the same folder, fsync, rename.
pub fn write_atomic(path: &Path, text: &str) -> std::io::Result<()> {
    write_atomic_observed(path, text, |_| {})
}

/// `write_atomic`, calling `at` at each `WritePoint` (tests use it to stop a save part-way).
///
/// A symbolic link is followed: the file it points at is replaced (the
/// temporary file is written beside that file and renamed there), so the
/// link stays a link. The new file keeps the old file's permissions; a file
/// that no longer exists is created as any new file is (0666 less the umask),
/// never with the temporary file's private 0600.
pub fn write_atomic_observed(
    path: &Path,
    text: &str,
    mut at: impl FnMut(WritePoint),
) -> std::io::Result<()> {
    let path = resolve_links(path)?;
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let mut builder = tempfile::Builder::new();
    builder.prefix(".dgpath-save-").suffix(".tmp");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // Given to open(2), so the umask applies as for any new file.
        builder.permissions(std::fs::Permissions::from_mode(0o666));
    }
    let mut tmp = builder.tempfile_in(&dir)?;
    let bytes = text.as_bytes();
    let half = bytes.len() / 2;
    tmp.write_all(&bytes[..half])?;
    tmp.flush()?;
    at(WritePoint::HalfWritten);
    tmp.write_all(&bytes[half..])?;
    tmp.as_file().sync_all()?;
    if let Ok(meta) = std::fs::metadata(&path) {
        std::fs::set_permissions(tmp.path(), meta.permissions())?;
    }
    at(WritePoint::BeforeRename);
    tmp.persist(&path).map_err(|e| e.error)?;
    // Make the rename itself durable.
    if let Ok(d) = std::fs::File::open(&dir) {
        let _ = d.sync_all();
    }
    at(WritePoint::Renamed);
    Ok(())
}

/// The file a path finally names, following symbolic links (also a link
/// whose target does not exist yet, which a save then creates).
fn resolve_links(path: &Path) -> std::io::Result<std::path::PathBuf> {
    let mut p = path.to_path_buf();
    // The kernel's own limit on links followed in one lookup is 40.
    for _ in 0..40 {
        match std::fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let target = std::fs::read_link(&p)?;
                p = match p.parent() {
                    Some(parent) if target.is_relative() => parent.join(target),
                    _ => target,
                };
            }
            _ => return Ok(p),
        }
    }
    Err(std::io::Error::other(format!(
        "too many levels of symbolic links at {}",
        path.display()
    )))
}

/// Saves the state into the file at `path`, whose text as last read was `original`.
pub fn save(path: &Path, original: &str, p: &Pathway, state: &State) -> Result<String, SaveError> {
    let text = render(original, p, state)?;
    write_atomic(path, &text).map_err(|source| SaveError::Io {
        file: p.file.clone(),
        source,
    })?;
    Ok(text)
}

/// What a file on disk looked like when it was read: to notice outside changes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct DiskStamp {
    len: u64,
    modified: Option<std::time::SystemTime>,
    hash: u64,
}

impl DiskStamp {
    /// Stamp of some text as it would be on disk (for a file just written).
    pub fn of_text(text: &str, modified: Option<std::time::SystemTime>) -> Self {
        let mut h = std::collections::hash_map::DefaultHasher::new();
        text.as_bytes().hash(&mut h);
        DiskStamp {
            len: text.len() as u64,
            modified,
            hash: h.finish(),
        }
    }
    /// Stamp of the file now on disk.
    pub fn read(path: &Path) -> std::io::Result<Self> {
        let meta = std::fs::metadata(path)?;
        let bytes = std::fs::read(path)?;
        let mut h = std::collections::hash_map::DefaultHasher::new();
        bytes.hash(&mut h);
        Ok(DiskStamp {
            len: bytes.len() as u64,
            modified: meta.modified().ok(),
            hash: h.finish(),
        })
    }
    /// True when the contents differ (times alone do not count).
    pub fn content_differs(&self, other: &DiskStamp) -> bool {
        self.len != other.len || self.hash != other.hash
    }
    /// Cheap check: size or modification time changed (then read and compare contents).
    pub fn maybe_changed(&self, path: &Path) -> bool {
        match std::fs::metadata(path) {
            Ok(m) => m.len() != self.len || m.modified().ok() != self.modified,
            Err(_) => true,
        }
    }
}

/// After a reload: keep the unsaved edits (values that differ from the old file)
/// where the compound still exists; take everything else from the new file.
pub fn carry_edits(old_p: &Pathway, old_state: &State, new_p: &Pathway) -> State {
    let mut s = State::from_pathway(new_p);
    for (i, c) in old_p.compounds.iter().enumerate() {
        if c.is_solvent() || c.conc == Some(old_state.conc[i]) {
            continue;
        }
        if let Some(j) = new_p.compound(&c.id)
            && !new_p.compounds[j].is_solvent()
        {
            s.conc[j] = old_state.conc[i];
        }
    }
    let (oc, sc) = (&old_p.conditions, &old_state.conditions);
    if oc.temperature != sc.temperature {
        s.conditions.temperature = sc.temperature;
    }
    if oc.ph != sc.ph {
        s.conditions.ph = sc.ph;
    }
    if oc.ionic_strength != sc.ionic_strength {
        s.conditions.ionic_strength = sc.ionic_strength;
    }
    s.direction = old_state.direction;
    s
}

/// True when the state differs from what the file says.
pub fn is_dirty(p: &Pathway, state: &State) -> bool {
    p.conditions != state.conditions
        || p.compounds
            .iter()
            .enumerate()
            .any(|(i, c)| !c.is_solvent() && c.conc != Some(state.conc[i]))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::load_str;

    const TEXT: &str = "format = 1\n# my notes\n[pathway]\nname = \"t\"\n[conditions]\ntemperature = \"30 C\"  # fermenter\n[compounds]\na = { conc = \"1 mM\", cv = 0.1 }   # measured Tuesday\nb = { conc = \"80 uM\" }\n[compounds.w]\nrole = \"solvent\"\n[[steps]]\nid = \"s1\"\nreaction = \"a -> b + w\"\ndg0 = -5\n";

    #[test]
    fn render_changes_only_edited_values_and_keeps_comments() {
        let p = load_str(TEXT, "t.toml").unwrap();
        let mut s = State::from_pathway(&p);
        s.conc[0] = 2.5e-3;
        s.conditions.temperature = 310.15;
        let out = render(TEXT, &p, &s).unwrap();
        assert!(
            out.contains("a = { conc = \"2.5 mM\", cv = 0.1 }   # measured Tuesday"),
            "{out}"
        );
        assert!(out.contains("b = { conc = \"80 uM\" }"), "{out}");
        assert!(out.contains("temperature = \"37 C\"  # fermenter"), "{out}");
        assert!(out.contains("# my notes"));
        let back = load_str(&out, "t.toml").unwrap();
        assert_eq!(back.compounds[0].conc, Some(2.5e-3));
        assert_eq!(back.conditions.temperature, 310.15);
    }

    #[test]
    fn awkward_values_round_trip_exactly() {
        for m in [1.2589254117941673e-3, 3.3e-7, 0.1, 7.77e-11, 0.012345678] {
            let t = conc_text(m);
            assert_eq!(
                units::parse(&t, units::Kind::Concentration).unwrap(),
                m,
                "{t}"
            );
        }
        for k in [310.15, 303.15, 298.15 + 1e-3, 280.0] {
            let t = temperature_text(k);
            assert_eq!(
                units::parse(&t, units::Kind::Temperature).unwrap(),
                k,
                "{t}"
            );
        }
    }

    #[test]
    fn reload_keeps_unsaved_edits_of_compounds_that_remain() {
        let p = load_str(TEXT, "t.toml").unwrap();
        let mut s = State::from_pathway(&p);
        s.conc[1] = 5e-6; // edit b
        let new_text = TEXT.replace("\"1 mM\"", "\"3 mM\"");
        let p2 = load_str(&new_text, "t.toml").unwrap();
        let s2 = carry_edits(&p, &s, &p2);
        assert_eq!(s2.conc[0], 3e-3, "unedited value follows the file");
        assert_eq!(s2.conc[1], 5e-6, "unsaved edit survives the reload");
    }

    #[test]
    fn atomic_write_replaces_and_stamp_sees_outside_changes() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("p.toml");
        std::fs::write(&path, "old").unwrap();
        let st = DiskStamp::read(&path).unwrap();
        write_atomic(&path, "new text").unwrap();
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "new text");
        let st2 = DiskStamp::read(&path).unwrap();
        assert!(st.content_differs(&st2));
        let leftovers: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .filter_map(|e| e.ok())
            .collect();
        assert_eq!(leftovers.len(), 1, "no temporary file left behind");
    }
}
