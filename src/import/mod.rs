//! SBML models in: a route of reactions from a core or genome-scale model
//! becomes an ordinary pathway file (format 1) that a person then edits.
//! The network supplies what a person would otherwise have to know: which
//! way each step runs, H+ as `protons`, water and carriers, charges and
//! hydrogens, branch points and the bypasses of the reverse route
//! (science.md §11). Nothing here computes thermodynamics.
//!
//! Parts: `sbml` reads the document, `orient` decides which way each route
//! step runs, `network` finds branch points and bypasses, `tables` reads the
//! dg0 and concentration CSV files, `write` lays out the pathway file.

pub mod network;
pub mod orient;
pub mod sbml;
pub mod tables;
pub mod write;

use crate::model::{Problem, suggest};
use sbml::{Model, Species};
use std::fmt;
use std::path::Path;

/// An import mistake: the file, the line where known, what is wrong and what to write instead.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub struct ImportError(pub Problem);

impl ImportError {
    /// An error about `file` (at `line`, where known).
    pub fn new(file: &str, line: Option<usize>, message: String) -> Self {
        ImportError(Problem {
            file: file.to_string(),
            line,
            column: None,
            message,
        })
    }
}

impl fmt::Display for ImportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}

/// What a species is for the import.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// H+: left out of reactions, counted as `protons`.
    Proton,
    /// Water: the solvent.
    Water,
    /// A carrier (science.md §11): role = "currency".
    Currency,
    /// Anything else: mass-balanced along the route.
    Other,
}

/// Base ids (compartment suffix removed) of carriers, after science.md §11
/// (common practice): adenine, guanine, uracil and cytosine nucleotides,
/// NAD(P)(H), FAD(H2), quinones and quinols, phosphate, diphosphate, CoA.
pub const CURRENCY_IDS: &[&str] = &[
    "atp", "adp", "amp", "gtp", "gdp", "utp", "udp", "ctp", "cdp", "nad", "nadh", "nadp", "nadph",
    "fad", "fadh2", "q8", "q8h2", "q9", "q9h2", "q10", "q10h2", "mqn8", "mql8", "2dmmq8",
    "2dmmql8", "pi", "ppi", "coa",
];

/// Full names (lower case) that mark a carrier when the id does not.
const CURRENCY_NAMES: &[&str] = &[
    "nad+",
    "nadp+",
    "phosphate",
    "orthophosphate",
    "diphosphate",
    "pyrophosphate",
    "coenzyme a",
    "nicotinamide adenine dinucleotide",
    "nicotinamide adenine dinucleotide - reduced",
    "nicotinamide adenine dinucleotide phosphate",
    "nicotinamide adenine dinucleotide phosphate - reduced",
    "flavin adenine dinucleotide oxidized",
    "flavin adenine dinucleotide reduced",
    "ubiquinone-8",
    "ubiquinol-8",
    "menaquinone 8",
    "menaquinol 8",
    "menaquinone-8",
    "menaquinol-8",
];

/// The species id without its compartment suffix (`atp_c` in compartment `c` -> `atp`).
pub fn base_id(s: &Species) -> &str {
    if !s.compartment.is_empty()
        && let Some(b) = s.id.strip_suffix(s.compartment.as_str())
        && let Some(b) = b.strip_suffix('_')
        && !b.is_empty()
    {
        return b;
    }
    &s.id
}

/// Classifies a species by its formula, charge, id and name (rules in docs/import.md).
pub fn classify(s: &Species) -> Kind {
    let base = base_id(s).to_ascii_lowercase();
    let formula = s.formula.as_deref().map(str::trim);
    let proton = match formula {
        Some("H") => s.charge.is_none_or(|c| c == 1.0),
        Some(_) => false,
        None => base == "h" || s.name == "H+",
    };
    if proton {
        return Kind::Proton;
    }
    let water = match formula {
        Some(f) => f == "H2O" || f == "OH2",
        None => base == "h2o" || s.name.eq_ignore_ascii_case("water"),
    };
    if water {
        return Kind::Water;
    }
    let name = s.name.trim().to_ascii_lowercase();
    let first_word = name.split_whitespace().next().unwrap_or("");
    if CURRENCY_IDS.contains(&base.as_str())
        || CURRENCY_NAMES.contains(&name.as_str())
        || CURRENCY_IDS.contains(&first_word)
    {
        return Kind::Currency;
    }
    Kind::Other
}

/// Which reactions count when finding branch points.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum BranchesFrom {
    /// Every reaction except the objective, exchange/sink/demand and bypass reactions.
    #[default]
    Network,
    /// Every reaction of the model.
    All,
}

/// What the person asked for.
#[derive(Debug, Clone, Default)]
pub struct Options {
    /// Reaction ids of the route, in the order it runs (with or without `R_`).
    pub route: Vec<String>,
    /// Route steps to run against the model's written direction.
    pub flip: Vec<String>,
    /// Route steps to run as the model writes them.
    pub keep: Vec<String>,
    /// Standard energies, when a table was given.
    pub dg0: Option<tables::Dg0Table>,
    /// Concentrations, when a table was given.
    pub conc: Option<tables::ConcTable>,
    /// Temperature as written (`"30 C"`); default 25 C.
    pub temperature: Option<String>,
    /// pH; default 7.
    pub ph: Option<f64>,
    /// Which reactions make branch points.
    pub branches_from: BranchesFrom,
}

/// An imported pathway file and what the person should know about it.
#[derive(Debug, Clone, PartialEq)]
pub struct Imported {
    /// The pathway file text.
    pub text: String,
    /// Route step ids, in order.
    pub route: Vec<String>,
    /// Bypass step ids.
    pub bypasses: Vec<String>,
    /// Compounds marked as branch points.
    pub branches: Vec<String>,
    /// Steps written with `dg0 = "?"`.
    pub missing_dg0: Vec<String>,
    /// Compounds written with `conc = "?"`.
    pub missing_conc: Vec<String>,
    /// Other things worth saying (transport steps, unbalanced reactions, ...).
    pub notes: Vec<String>,
}

/// Reads a model file (plain or gzip-compressed SBML).
pub fn read_model(path: &Path) -> Result<Model, ImportError> {
    let file = path.display().to_string();
    if let Ok(meta) = std::fs::metadata(path)
        && meta.is_file()
        && meta.len() > sbml::MAX_MODEL_BYTES as u64
    {
        return Err(ImportError::new(
            &file,
            None,
            format!(
                "is {} MB, over the {} MB dgpath reads; check that it is the model file",
                meta.len() / (1024 * 1024),
                sbml::MAX_MODEL_BYTES / (1024 * 1024)
            ),
        ));
    }
    let bytes = std::fs::read(path).map_err(|e| {
        let why = match e.kind() {
            std::io::ErrorKind::NotFound => "no such file; check the path".to_string(),
            std::io::ErrorKind::IsADirectory => "is a folder; give the model's .xml file".into(),
            _ => format!("cannot be read: {e}"),
        };
        ImportError::new(&file, None, why)
    })?;
    let text = sbml::decode(&bytes, &file)?;
    sbml::parse(&text, &file)
}

/// The model's reactions as `id  name  equation` lines, those matching `grep` (any case) only.
pub fn list(model: &Model, grep: Option<&str>) -> String {
    let want = grep.map(str::to_lowercase);
    let rows: Vec<(String, &str, String)> = model
        .reactions
        .iter()
        .map(|r| (r.id.clone(), r.name.as_str(), model.equation(r)))
        .filter(|(id, name, eq)| {
            want.as_deref().is_none_or(|w| {
                id.to_lowercase().contains(w)
                    || name.to_lowercase().contains(w)
                    || eq.to_lowercase().contains(w)
            })
        })
        .collect();
    let wid = rows.iter().map(|r| r.0.chars().count()).max().unwrap_or(0);
    let wname = rows
        .iter()
        .map(|r| r.1.chars().count())
        .max()
        .unwrap_or(0)
        .min(40);
    let mut out = String::new();
    for (id, name, eq) in rows {
        let name = crate::model::shorten(name);
        out.push_str(&format!("{id:<wid$}  {name:<wname$}  {eq}\n"));
    }
    out
}

/// Ids that are not close enough for `suggest` still help when listed; up to three.
fn close_ids<'a>(word: &str, ids: impl Iterator<Item = &'a str>) -> Vec<&'a str> {
    let w = word.to_lowercase();
    let mut scored: Vec<(f64, &str)> = ids
        .map(|c| (strsim::jaro_winkler(&w, &c.to_lowercase()), c))
        .filter(|(s, _)| *s > 0.75)
        .collect();
    scored.sort_by(|a, b| b.0.total_cmp(&a.0));
    scored.into_iter().take(3).map(|(_, c)| c).collect()
}

/// Finds the route's reactions; unknown ids get close ids suggested.
pub fn resolve_route(model: &Model, file: &str, ids: &[String]) -> Result<Vec<usize>, ImportError> {
    if ids.is_empty() {
        return Err(ImportError::new(
            file,
            None,
            "no route given; name the reactions with --route \"R1 R2 ...\" (dgpath import MODEL --list shows them)".into(),
        ));
    }
    let mut route = Vec::new();
    for id in ids {
        let Some(r) = model.reaction_by_id(id) else {
            let near = close_ids(id, model.reactions.iter().map(|r| r.id.as_str()));
            let near = if near.is_empty() {
                suggest(id, model.reactions.iter().map(|r| r.id.as_str()))
                    .into_iter()
                    .collect()
            } else {
                near
            };
            let hint = if near.is_empty() {
                "; dgpath import MODEL --list --grep WORD finds reactions".to_string()
            } else {
                format!(
                    "; did you mean {}?",
                    near.iter()
                        .map(|n| format!("'{n}'"))
                        .collect::<Vec<_>>()
                        .join(", ")
                )
            };
            return Err(ImportError::new(
                file,
                None,
                format!("the model has no reaction '{id}' (route step){hint}"),
            ));
        };
        if route.contains(&r) {
            return Err(ImportError::new(
                file,
                None,
                format!("the route lists '{id}' twice; list each reaction once"),
            ));
        }
        route.push(r);
    }
    Ok(route)
}

/// Imports a route from a model: the pathway file text and what is missing.
pub fn import(model: &Model, file: &str, opts: &Options) -> Result<Imported, ImportError> {
    let route = resolve_route(model, file, &opts.route)?;
    let kinds: Vec<Kind> = model.species.iter().map(classify).collect();
    let find_step = |id: &String| -> Result<usize, ImportError> {
        match model.reaction_by_id(id) {
            Some(r) if route.contains(&r) => Ok(r),
            _ => Err(ImportError::new(
                file,
                None,
                format!(
                    "--flip/--keep names '{id}', which is not on the route; name route steps only"
                ),
            )),
        }
    };
    let flip = opts
        .flip
        .iter()
        .map(find_step)
        .collect::<Result<Vec<_>, _>>()?;
    let keep = opts
        .keep
        .iter()
        .map(find_step)
        .collect::<Result<Vec<_>, _>>()?;
    if let Some(r) = flip.iter().find(|r| keep.contains(r)) {
        return Err(ImportError::new(
            file,
            None,
            format!(
                "'{}' is given to both --flip and --keep; choose one",
                model.reactions[*r].id
            ),
        ));
    }
    let flipped = orient::orient(model, file, &route, &kinds, &flip, &keep)?;
    let net = network::analyse(model, &route, &flipped, &kinds, opts.branches_from);
    if let Some(t) = &opts.dg0 {
        t.check_against(model)?;
    }
    if let Some(t) = &opts.conc {
        t.check_against(model)?;
    }
    let temperature = opts.temperature.clone().unwrap_or_else(|| "25 C".into());
    if let Err(m) =
        crate::model::check::quantity(&temperature, crate::model::units::Kind::Temperature)
    {
        return Err(ImportError::new(
            file,
            None,
            format!("--temperature '{temperature}': {m}"),
        ));
    }
    let ph = opts.ph.unwrap_or(7.0);
    if let Err(m) = crate::model::check::ph(ph) {
        return Err(ImportError::new(file, None, format!("--ph: {m}")));
    }
    Ok(write::render(&write::Input {
        model,
        file,
        route: &route,
        flipped: &flipped,
        kinds: &kinds,
        net: &net,
        opts,
        temperature: &temperature,
        ph,
    }))
}

/// What an import wrote and what is left to do, for the person who ran it.
pub fn summary(out: &Imported, written: &str) -> String {
    let mut s = format!(
        "wrote {written}: {} route steps, {} bypass step{}, {} branch point{}\n",
        out.route.len(),
        out.bypasses.len(),
        if out.bypasses.len() == 1 { "" } else { "s" },
        out.branches.len(),
        if out.branches.len() == 1 { "" } else { "s" },
    );
    if !out.missing_dg0.is_empty() {
        s.push_str(&format!(
            "dg0 left as \"?\" for {} step{}: {} (dgpath check fails until they are filled in)\n",
            out.missing_dg0.len(),
            if out.missing_dg0.len() == 1 { "" } else { "s" },
            out.missing_dg0.join(", ")
        ));
    }
    if !out.missing_conc.is_empty() {
        s.push_str(&format!(
            "conc left as \"?\" for {} compound{}: {}\n",
            out.missing_conc.len(),
            if out.missing_conc.len() == 1 { "" } else { "s" },
            out.missing_conc.join(", ")
        ));
    }
    for n in &out.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s
}

/// Writes `text` to `path` atomically (a temporary file in the same folder,
/// synced, then renamed); an existing file is kept unless `force`.
pub fn write_new(path: &Path, text: &str, force: bool) -> Result<(), ImportError> {
    use std::io::Write;
    let name = path.display().to_string();
    if path.exists() && !force {
        return Err(ImportError::new(
            &name,
            None,
            "exists already; give --force to replace it, or choose another -o file".into(),
        ));
    }
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    let fail = |e: std::io::Error| ImportError::new(&name, None, format!("cannot be written: {e}"));
    let mut tmp = tempfile::NamedTempFile::new_in(dir).map_err(fail)?;
    tmp.write_all(text.as_bytes()).map_err(fail)?;
    tmp.as_file().sync_all().map_err(fail)?;
    tmp.persist(path).map_err(|e| fail(e.error))?;
    Ok(())
}
