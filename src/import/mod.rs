//! SBML models in: a route of reactions from a core or genome-scale model
//! becomes an ordinary pathway file (format 1) that a person then edits.
//! The network supplies what a person would otherwise have to know: which
//! way each step runs, H+ as `protons`, water and carriers, charges and
//! hydrogens, branch points and the bypasses of the reverse route
//! (science.md §11). Nothing here computes thermodynamics.
//!
//! Parts: `sbml` reads the document, `roles` says what each species is,
//! `orient` decides which way each route step runs, `network` finds branch
//! points and bypasses, `tables` reads the dg0 and concentration CSV files,
//! `write` lays out the pathway file; `options` and `error` hold the types
//! they share. Here: reading a model file, listing it, and the import itself.

pub mod error;
pub mod network;
pub mod options;
pub mod orient;
pub mod roles;
pub mod sbml;
pub mod tables;
pub mod write;

pub use error::ImportError;
pub use options::{BranchesFrom, Imported, Options};
pub use roles::{CURRENCY_IDS, Kind, base_id, classify};

use crate::model::suggest;
use sbml::Model;
use std::path::Path;

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
    check_two_sided(model, file, &route, &kinds)?;
    let (flip, keep) = flip_and_keep(model, file, &route, opts)?;
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

/// Refuses a route step with nothing on one side once H+ is left out.
fn check_two_sided(
    model: &Model,
    file: &str,
    route: &[usize],
    kinds: &[Kind],
) -> Result<(), ImportError> {
    for &r in route {
        let rx = &model.reactions[r];
        let side = |sign: f64| {
            rx.stoich
                .iter()
                .any(|&(s, v)| v * sign > 0.0 && kinds[s] != Kind::Proton)
        };
        if !side(1.0) || !side(-1.0) {
            return Err(ImportError::new(
                file,
                None,
                format!(
                    "route step '{}' ({}) has nothing on one side once H+ is left out (an exchange, sink or demand reaction, or a proton transport); start and end the route at reactions that convert compounds",
                    rx.id,
                    model.equation(rx)
                ),
            ));
        }
    }
    Ok(())
}

/// The route steps of `--flip` and `--keep` (reaction indices); each must be
/// on the route and in only one of the two.
fn flip_and_keep(
    model: &Model,
    file: &str,
    route: &[usize],
    opts: &Options,
) -> Result<(Vec<usize>, Vec<usize>), ImportError> {
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
    Ok((flip, keep))
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
