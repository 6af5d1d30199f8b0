//! Reading an SBML document (Level 3 with the fbc package, or Level 2) into
//! the few things the import needs: species with their compartment, formula,
//! charge and boundary flag, reactions with signed stoichiometry, and which
//! reactions are the model's objective.

use super::error::ImportError;
use std::collections::HashMap;

/// A species of the model.
#[derive(Debug, Clone, PartialEq)]
pub struct Species {
    /// Id with a leading `M_` removed, usable as a compound id.
    pub id: String,
    /// Id as the model writes it.
    pub sbml_id: String,
    /// Name (the id when the model gives none).
    pub name: String,
    /// Compartment id (a leading `C_` removed).
    pub compartment: String,
    /// Chemical formula, when the model gives one.
    pub formula: Option<String>,
    /// Charge, when the model gives one.
    pub charge: Option<f64>,
    /// `boundaryCondition="true"`: held outside the system.
    pub boundary: bool,
}

/// A reaction of the model.
#[derive(Debug, Clone, PartialEq)]
pub struct Reaction {
    /// Id with a leading `R_` removed, usable as a step id.
    pub id: String,
    /// Id as the model writes it.
    pub sbml_id: String,
    /// Name (empty when the model gives none).
    pub name: String,
    /// Signed stoichiometry as written: (species index, ν), ν > 0 for products.
    pub stoich: Vec<(usize, f64)>,
    /// The model allows it to run backward.
    pub reversible: bool,
    /// Part of the model's objective (or named as a biomass reaction).
    pub objective: bool,
}

/// What the import reads from one SBML document.
#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    /// SBML level.
    pub level: u32,
    /// SBML version within the level.
    pub version: u32,
    /// fbc package version, when the document declares it.
    pub fbc: Option<u32>,
    /// Model id (or name), for the header of the written file.
    pub id: String,
    /// Species in document order.
    pub species: Vec<Species>,
    /// Reactions in document order.
    pub reactions: Vec<Reaction>,
    species_index: HashMap<String, usize>,
    reaction_index: HashMap<String, usize>,
}

impl Model {
    /// Index of a species by its id, with or without the leading `M_`.
    pub fn species_by_id(&self, id: &str) -> Option<usize> {
        self.species_index.get(id).copied()
    }
    /// Index of a reaction by its id, with or without the leading `R_`.
    pub fn reaction_by_id(&self, id: &str) -> Option<usize> {
        self.reaction_index.get(id).copied()
    }
    /// The reaction's equation as the model writes it (ids without prefixes).
    pub fn equation(&self, r: &Reaction) -> String {
        let side = |sign: f64| {
            r.stoich
                .iter()
                .filter(|(_, v)| v * sign > 0.0)
                .map(|&(s, v)| term(v.abs(), &self.species[s].id))
                .collect::<Vec<_>>()
                .join(" + ")
        };
        let arrow = if r.reversible { "<=>" } else { "->" };
        format!("{} {arrow} {}", side(-1.0), side(1.0))
            .trim()
            .to_string()
    }
}

/// `2 atp`, or `atp` for a coefficient of one.
pub fn term(coef: f64, id: &str) -> String {
    if coef == 1.0 {
        id.to_string()
    } else {
        format!("{coef} {id}")
    }
}

/// Largest model file read (bytes, after decompression).
pub const MAX_MODEL_BYTES: usize = 512 * 1024 * 1024;

/// Turns the file's bytes (plain or gzip-compressed) into text.
pub fn decode(bytes: &[u8], file: &str) -> Result<String, ImportError> {
    let bytes = if bytes.starts_with(&[0x1f, 0x8b]) {
        use std::io::Read;
        let mut out = Vec::new();
        flate2::read::MultiGzDecoder::new(bytes)
            .take(MAX_MODEL_BYTES as u64 + 1)
            .read_to_end(&mut out)
            .map_err(|e| {
                ImportError::new(
                    file,
                    None,
                    format!("looks gzip-compressed but cannot be unpacked ({e}); check that the download is complete"),
                )
            })?;
        if out.len() > MAX_MODEL_BYTES {
            return Err(ImportError::new(
                file,
                None,
                format!(
                    "unpacks to more than {} MB; this is not a model dgpath can read",
                    MAX_MODEL_BYTES / (1024 * 1024)
                ),
            ));
        }
        std::borrow::Cow::Owned(out)
    } else {
        std::borrow::Cow::Borrowed(bytes)
    };
    match std::str::from_utf8(&bytes) {
        Ok(s) => Ok(s.strip_prefix('\u{feff}').unwrap_or(s).to_string()),
        Err(e) => {
            let at = e.valid_up_to();
            let line = bytes[..at].iter().filter(|&&b| b == b'\n').count() + 1;
            Err(ImportError::new(
                file,
                Some(line),
                "is not UTF-8 text, so not an SBML model; give the model's .xml (or .xml.gz) file"
                    .to_string(),
            ))
        }
    }
}

/// Parses SBML text; `file` names it in messages.
pub fn parse(text: &str, file: &str) -> Result<Model, ImportError> {
    let opt = roxmltree::ParsingOptions {
        allow_dtd: true,
        ..Default::default()
    };
    let doc = roxmltree::Document::parse_with_options(text, opt).map_err(|e| {
        ImportError::new(
            file,
            Some(e.pos().row as usize),
            format!("is not well-formed XML ({e}); give an SBML model file"),
        )
    })?;
    let root = doc.root_element();
    let line_of = |n: roxmltree::Node| doc.text_pos_at(n.range().start).row as usize;
    if root.tag_name().name() != "sbml" {
        return Err(ImportError::new(
            file,
            Some(line_of(root)),
            format!(
                "is XML but not SBML (its top element is <{}>, not <sbml>); give an SBML model file",
                root.tag_name().name()
            ),
        ));
    }
    let level: u32 = root
        .attribute("level")
        .and_then(|v| v.trim().parse().ok())
        .unwrap_or(0);
    let version: u32 = root
        .attribute("version")
        .and_then(|v| v.trim().parse().ok())
        .unwrap_or(0);
    if !(level == 2 || level == 3) {
        return Err(ImportError::new(
            file,
            Some(line_of(root)),
            format!(
                "is SBML Level {level}; dgpath reads Level 2 and Level 3 (convert the model to Level 3 Version 2 with fbc)"
            ),
        ));
    }
    let fbc = root
        .namespaces()
        .filter_map(|ns| fbc_version(ns.uri()))
        .max();
    let Some(model) = child(root, "model") else {
        return Err(ImportError::new(
            file,
            Some(line_of(root)),
            "is SBML but holds no <model>; give a file with a model in it".into(),
        ));
    };
    let model_id = model
        .attribute("id")
        .or(model.attribute("name"))
        .unwrap_or("")
        .to_string();
    let parameters = read_parameters(model);
    let (species, species_index) = read_species(model, file, &line_of)?;
    let objective_ids = read_objectives(model);
    let (reactions, reaction_index) = read_reactions(
        model,
        file,
        &line_of,
        &species_index,
        &parameters,
        &objective_ids,
    )?;
    Ok(Model {
        level,
        version,
        fbc,
        id: model_id,
        species,
        reactions,
        species_index,
        reaction_index,
    })
}

type Node<'a, 'i> = roxmltree::Node<'a, 'i>;

/// Parameter values by id (fbc flux bounds refer to them).
fn read_parameters<'a>(model: Node<'a, '_>) -> HashMap<&'a str, f64> {
    let mut parameters: HashMap<&str, f64> = HashMap::new();
    if let Some(list) = child(model, "listOfParameters") {
        for p in elements(list, "parameter") {
            if let (Some(id), Some(v)) = (
                p.attribute("id"),
                p.attribute("value").and_then(|v| v.trim().parse().ok()),
            ) {
                parameters.insert(id, v);
            }
        }
    }
    parameters
}

/// Species, and their indices by SBML id and by id without `M_`.
fn read_species(
    model: Node,
    file: &str,
    line_of: &dyn Fn(Node) -> usize,
) -> Result<(Vec<Species>, HashMap<String, usize>), ImportError> {
    let mut species = Vec::new();
    let mut species_index = HashMap::new();
    if let Some(list) = child(model, "listOfSpecies") {
        for s in elements(list, "species") {
            let Some(sbml_id) = s.attribute("id") else {
                return Err(ImportError::new(
                    file,
                    Some(line_of(s)),
                    "a <species> has no id; the model is not valid SBML".into(),
                ));
            };
            let (mut formula, mut charge) = (fbc_attr(s, "chemicalFormula"), fbc_attr(s, "charge"));
            // Level 2 (and older exports): a charge attribute, notes with FORMULA: and CHARGE:.
            if charge.is_none() {
                charge = s.attribute("charge");
            }
            let notes = notes_fields(s);
            let formula = formula
                .take()
                .map(str::to_string)
                .or_else(|| notes.get("FORMULA").cloned())
                .filter(|f| !f.trim().is_empty());
            let charge = charge
                .take()
                .map(str::to_string)
                .or_else(|| notes.get("CHARGE").cloned())
                .and_then(|c| c.trim().parse::<f64>().ok())
                .filter(|c| c.is_finite());
            let i = species.len();
            let id = strip(sbml_id, "M_").to_string();
            species_index.insert(sbml_id.to_string(), i);
            species_index.entry(id.clone()).or_insert(i);
            species.push(Species {
                name: s.attribute("name").unwrap_or(&id).to_string(),
                id,
                sbml_id: sbml_id.to_string(),
                compartment: strip(s.attribute("compartment").unwrap_or(""), "C_").to_string(),
                formula,
                charge,
                boundary: s.attribute("boundaryCondition").map(str::trim) == Some("true"),
            });
        }
    }
    Ok((species, species_index))
}

/// Ids of the objective's reactions: the fbc active objective (else every
/// objective) with a non-zero coefficient.
fn read_objectives<'a>(model: Node<'a, '_>) -> Vec<&'a str> {
    // Objective reactions: fbc objectives (the active one, else all), or a
    // Level 2 kinetic-law parameter OBJECTIVE_COEFFICIENT.
    let mut objective_ids: Vec<&str> = Vec::new();
    if let Some(list) = child(model, "listOfObjectives") {
        let active = fbc_attr(list, "activeObjective");
        for o in elements(list, "objective") {
            if active.is_some() && fbc_attr(o, "id") != active {
                continue;
            }
            for fo in o
                .descendants()
                .filter(|n| n.has_tag_name_local("fluxObjective"))
            {
                let coef: f64 = fbc_attr(fo, "coefficient")
                    .and_then(|c| c.trim().parse().ok())
                    .unwrap_or(1.0);
                if let Some(r) = fbc_attr(fo, "reaction")
                    && coef != 0.0
                {
                    objective_ids.push(r);
                }
            }
        }
    }
    objective_ids
}

/// Reactions, and their indices by SBML id and by id without `R_`.
fn read_reactions(
    model: Node,
    file: &str,
    line_of: &dyn Fn(Node) -> usize,
    species_index: &HashMap<String, usize>,
    parameters: &HashMap<&str, f64>,
    objective_ids: &[&str],
) -> Result<(Vec<Reaction>, HashMap<String, usize>), ImportError> {
    let mut reactions = Vec::new();
    let mut reaction_index = HashMap::new();
    if let Some(list) = child(model, "listOfReactions") {
        for r in elements(list, "reaction") {
            // Lines are found only for messages: each lookup scans the text.
            let Some(sbml_id) = r.attribute("id") else {
                return Err(ImportError::new(
                    file,
                    Some(line_of(r)),
                    "a <reaction> has no id; the model is not valid SBML".into(),
                ));
            };
            let stoich = reaction_stoich(r, sbml_id, file, line_of, species_index)?;
            let lower = fbc_attr(r, "lowerFluxBound").and_then(|p| parameters.get(p));
            // Level 2 defaults to reversible; Level 3 requires the attribute.
            let mut reversible = r.attribute("reversible").map(str::trim) != Some("false");
            if let Some(&lo) = lower
                && lo >= 0.0
            {
                reversible = false;
            }
            let name = r.attribute("name").unwrap_or("").to_string();
            let objective = is_objective(r, sbml_id, &name, objective_ids);
            let i = reactions.len();
            let id = strip(sbml_id, "R_").to_string();
            reaction_index.insert(sbml_id.to_string(), i);
            reaction_index.entry(id.clone()).or_insert(i);
            reactions.push(Reaction {
                id,
                sbml_id: sbml_id.to_string(),
                name,
                stoich,
                reversible,
                objective,
            });
        }
    }
    Ok((reactions, reaction_index))
}

/// A reaction's net stoichiometry (species index, coefficient; products
/// positive), zero entries left out.
fn reaction_stoich(
    r: Node,
    sbml_id: &str,
    file: &str,
    line_of: &dyn Fn(Node) -> usize,
    species_index: &HashMap<String, usize>,
) -> Result<Vec<(usize, f64)>, ImportError> {
    let mut stoich: Vec<(usize, f64)> = Vec::new();
    for (list_name, sign) in [("listOfReactants", -1.0), ("listOfProducts", 1.0)] {
        let Some(l) = child(r, list_name) else {
            continue;
        };
        for sr in elements(l, "speciesReference") {
            let sid = sr.attribute("species").unwrap_or("");
            let Some(&si) = species_index.get(sid) else {
                return Err(ImportError::new(
                    file,
                    Some(line_of(sr)),
                    format!(
                        "reaction '{sbml_id}' names species '{sid}', which the model does not declare; the model is not valid SBML"
                    ),
                ));
            };
            let Some(coef) = coefficient(sr) else {
                let v = sr.attribute("stoichiometry").unwrap_or("");
                return Err(ImportError::new(
                    file,
                    Some(line_of(sr)),
                    format!(
                        "reaction '{sbml_id}': stoichiometry '{v}' of '{sid}' is not a non-negative number"
                    ),
                ));
            };
            match stoich.iter_mut().find(|(s, _)| *s == si) {
                Some(e) => e.1 += sign * coef,
                None => stoich.push((si, sign * coef)),
            }
        }
    }
    stoich.retain(|(_, v)| *v != 0.0);
    Ok(stoich)
}

/// The stoichiometry of a species reference; None when it is not a
/// non-negative number. Level 2 defaults to 1; Level 3 leaves it open, and
/// models that omit it mean 1.
fn coefficient(sr: Node) -> Option<f64> {
    match sr.attribute("stoichiometry") {
        None => Some(1.0),
        Some(v) => v
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|c| c.is_finite() && *c >= 0.0),
    }
}

/// An objective reaction: named by the fbc objectives, with a Level 2
/// `OBJECTIVE_COEFFICIENT` other than zero, or "biomass" in its id or name.
fn is_objective(r: Node, sbml_id: &str, name: &str, objective_ids: &[&str]) -> bool {
    let l2_objective = r
        .descendants()
        .filter(|n| n.has_tag_name_local("parameter"))
        .any(|p| {
            p.attribute("id") == Some("OBJECTIVE_COEFFICIENT")
                && p.attribute("value")
                    .and_then(|v| v.trim().parse::<f64>().ok())
                    .is_some_and(|v| v != 0.0)
        });
    objective_ids.contains(&sbml_id)
        || l2_objective
        || sbml_id.to_ascii_lowercase().contains("biomass")
        || name.to_ascii_lowercase().contains("biomass")
}

/// `M_glc__D_c` -> `glc__D_c`; an id that would be empty keeps its prefix.
fn strip<'a>(id: &'a str, prefix: &str) -> &'a str {
    match id.strip_prefix(prefix) {
        Some(rest) if !rest.is_empty() => rest,
        _ => id,
    }
}

/// The fbc version a namespace URI declares, if it is the fbc package's.
fn fbc_version(uri: &str) -> Option<u32> {
    let rest = uri.strip_prefix("http://www.sbml.org/sbml/level3/version")?;
    let v = rest.split("/fbc/version").nth(1)?;
    v.trim_end_matches('/').parse().ok()
}

trait LocalName {
    fn has_tag_name_local(&self, name: &str) -> bool;
}

impl LocalName for roxmltree::Node<'_, '_> {
    fn has_tag_name_local(&self, name: &str) -> bool {
        self.is_element() && self.tag_name().name() == name
    }
}

fn child<'a, 'i>(n: roxmltree::Node<'a, 'i>, name: &str) -> Option<roxmltree::Node<'a, 'i>> {
    n.children().find(|c| c.has_tag_name_local(name))
}

fn elements<'a, 'i: 'a>(
    n: roxmltree::Node<'a, 'i>,
    name: &'a str,
) -> impl Iterator<Item = roxmltree::Node<'a, 'i>> + 'a {
    n.children().filter(move |c| c.has_tag_name_local(name))
}

/// An attribute of the fbc package (any fbc version), by local name.
fn fbc_attr<'a>(n: roxmltree::Node<'a, '_>, name: &str) -> Option<&'a str> {
    n.attributes()
        .find(|a| a.name() == name && a.namespace().is_some_and(|ns| ns.contains("/fbc/")))
        .map(|a| a.value())
}

/// `KEY: value` lines in a species' notes (Level 2 models keep FORMULA and CHARGE there).
fn notes_fields(s: roxmltree::Node) -> HashMap<String, String> {
    let mut out = HashMap::new();
    let Some(notes) = child(s, "notes") else {
        return out;
    };
    for t in notes.descendants().filter(|n| n.is_text()) {
        for line in t.text().unwrap_or("").lines() {
            if let Some((k, v)) = line.split_once(':') {
                let k = k.trim().to_ascii_uppercase();
                if (k == "FORMULA" || k == "CHARGE") && !out.contains_key(&k) {
                    out.insert(k, v.trim().to_string());
                }
            }
        }
    }
    out
}

/// Hydrogen atoms in a chemical formula (`C6H12O6` -> 12), None when the
/// formula has parts that are not element symbols and counts.
pub fn hydrogens(formula: &str) -> Option<f64> {
    fn group(b: &[u8], i: &mut usize, depth: usize) -> Option<f64> {
        let mut h = 0.0;
        while *i < b.len() {
            match b[*i] {
                b'(' | b'[' if depth < 8 => {
                    *i += 1;
                    let inner = group(b, i, depth + 1)?;
                    if *i >= b.len() || !(b[*i] == b')' || b[*i] == b']') {
                        return None;
                    }
                    *i += 1;
                    h += inner * count(b, i);
                }
                b')' | b']' if depth > 0 => return Some(h),
                c if c.is_ascii_uppercase() => {
                    let start = *i;
                    *i += 1;
                    while *i < b.len() && b[*i].is_ascii_lowercase() {
                        *i += 1;
                    }
                    let symbol = &b[start..*i];
                    let n = count(b, i);
                    if symbol == b"H" {
                        h += n;
                    }
                }
                _ => return None,
            }
        }
        (depth == 0).then_some(h)
    }
    fn count(b: &[u8], i: &mut usize) -> f64 {
        let start = *i;
        while *i < b.len() && (b[*i].is_ascii_digit() || b[*i] == b'.') {
            *i += 1;
        }
        std::str::from_utf8(&b[start..*i])
            .ok()
            .and_then(|s| s.parse().ok())
            .unwrap_or(1.0)
    }
    let b = formula.trim().as_bytes();
    if b.is_empty() {
        return None;
    }
    let mut i = 0;
    group(b, &mut i, 0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hydrogen_count_of_formulas() {
        assert_eq!(hydrogens("C6H12O6"), Some(12.0));
        assert_eq!(hydrogens("H2O"), Some(2.0));
        assert_eq!(hydrogens("H"), Some(1.0));
        assert_eq!(hydrogens("C21H26N7O14P2"), Some(26.0));
        // Hg and He are not hydrogen.
        assert_eq!(hydrogens("HgCl2"), Some(0.0));
        assert_eq!(hydrogens("Ca(OH)2"), Some(2.0));
        assert_eq!(hydrogens("C10H15RO"), Some(15.0));
        assert_eq!(hydrogens("C6H12O6*"), None);
        assert_eq!(hydrogens(""), None);
        assert_eq!(hydrogens("Ca(OH2"), None);
    }

    #[test]
    fn fbc_namespace_versions() {
        assert_eq!(
            fbc_version("http://www.sbml.org/sbml/level3/version1/fbc/version2"),
            Some(2)
        );
        assert_eq!(
            fbc_version("http://www.sbml.org/sbml/level3/version1/core"),
            None
        );
    }
}
