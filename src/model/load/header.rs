//! The top of the file: `format`, `[pathway]`, `[conditions]`, `[analysis]`,
//! then the compounds and steps, handed on to be resolved into a `Pathway`.

use super::super::check;
use super::super::pathway::*;
use super::super::units::Kind;
use super::reader::{ANALYSIS, CONDITIONS, Cx, PATHWAY, Read, Span, TOP, Table};

/// `pathway.route` as written: each step id with its span.
type RouteIds = Vec<(String, Span)>;

/// The top tables of a file, read before the ids are resolved.
pub(super) struct Header {
    /// `pathway.name` (None when missing or wrong).
    pub(super) name: Option<String>,
    /// `pathway.description`.
    pub(super) description: Option<String>,
    /// `pathway.route` as written, with spans.
    pub(super) route_ids: Option<RouteIds>,
    /// `[conditions]` (temperature NaN when missing or wrong).
    pub(super) conditions: Conditions,
    /// The reference conditions of the standard energies.
    pub(super) reference: Conditions,
    /// `[analysis]`.
    pub(super) settings: Settings,
}

impl Cx<'_> {
    pub(super) fn pathway(&mut self, root: &Table) -> Option<Pathway> {
        self.known_keys(root, TOP, "the top level");
        self.format_version(root);
        let (name, description, route_ids) = self.pathway_table(root);
        let (conditions, reference) = self.conditions(root);
        let settings = self.settings(root);
        let header = Header {
            name,
            description,
            route_ids,
            conditions,
            reference,
            settings,
        };
        let compounds = self.compounds(root);
        let raw_steps = self.raw_steps(root);
        self.resolve(header, compounds, raw_steps)
    }

    /// Refuses a missing `format` or one other than 1.
    fn format_version(&mut self, root: &Table) {
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
    }

    /// `[pathway]`: the name, the description and the route's ids.
    fn pathway_table(
        &mut self,
        root: &Table,
    ) -> (Option<String>, Option<String>, Option<RouteIds>) {
        let mut name = None;
        let mut description = None;
        let mut route_ids: Option<RouteIds> = None;
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
                route_ids = self.route_ids(t);
            }
        }
        (name, description, route_ids)
    }

    /// `pathway.route`: the step ids as written, each with its span.
    fn route_ids(&mut self, t: &Table) -> Option<RouteIds> {
        let item = t.get("route")?;
        let span = Self::value_span(t, "route");
        match item.as_array() {
            Some(a) if a.iter().all(|v| v.as_str().is_some()) => Some(
                a.iter()
                    .map(|v| {
                        (
                            v.as_str().unwrap_or_default().to_string(),
                            v.at().or(span.clone()),
                        )
                    })
                    .collect(),
            ),
            _ => {
                self.err(
                    span,
                    "pathway.route must be a list of step ids, e.g. route = [\"s1\", \"s2\"]"
                        .into(),
                );
                None
            }
        }
    }

    /// `[conditions]`: the scenario's conditions and the reference ones.
    fn conditions(&mut self, root: &Table) -> (Conditions, Conditions) {
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
                reference = self.reference_conditions(t);
                for (k, v) in [("ph", conditions.ph), ("reference_ph", reference.ph)] {
                    if t.get(k).is_some()
                        && let Err(m) = check::ph(v)
                    {
                        self.err(Self::value_span(t, k), format!("conditions.{k}: {m}"));
                    }
                }
            }
        }
        (conditions, reference)
    }

    /// The `reference_*` keys of `[conditions]` (25 °C, pH 7, I = 0 by default).
    fn reference_conditions(&mut self, t: &Table) -> Conditions {
        Conditions {
            temperature: self
                .quantity(t, "reference_temperature", Kind::Temperature, "conditions")
                .unwrap_or(298.15),
            ph: self.number(t, "reference_ph", "conditions").unwrap_or(7.0),
            ionic_strength: self
                .quantity(
                    t,
                    "reference_ionic_strength",
                    Kind::IonicStrength,
                    "conditions",
                )
                .unwrap_or(0.0),
        }
    }

    /// `[analysis]`: the far threshold, the near factor and the default bounds.
    fn settings(&mut self, root: &Table) -> Settings {
        let mut settings = Settings::default();
        let Some(t) = self.table(root, "analysis") else {
            return settings;
        };
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
        settings
    }

    /// `[compounds]`, in file order.
    fn compounds(&mut self, root: &Table) -> Vec<Compound> {
        let mut compounds = Vec::new();
        match self.table(root, "compounds") {
            None if !root.contains_key("compounds") => self.err(
                Some(0..0),
                "missing [compounds] table; declare every compound, e.g. glc = { name = \"glucose\", conc = \"5 mM\" }".into(),
            ),
            None => {}
            Some(t) => {
                for (id, item) in t.iter() {
                    let kspan = Some(id.span());
                    if let Some(c) = self.compound(id.get_ref(), item, kspan) {
                        compounds.push(c);
                    }
                }
            }
        }
        compounds
    }

    /// `[[steps]]` as read, before their ids are resolved.
    fn raw_steps(&mut self, root: &Table) -> Vec<super::steps::RawStep> {
        let mut raw_steps = Vec::new();
        match root.get("steps") {
            None => self.err(
                Some(0..0),
                "no [[steps]]; add at least one [[steps]] with id, reaction and dg0".into(),
            ),
            Some(item) => match item
                .as_array()
                .filter(|a| a.iter().all(|t| t.as_table_like().is_some()))
            {
                Some(arr) => {
                    for t in arr {
                        if let Some(s) = self.raw_step(t) {
                            raw_steps.push(s);
                        }
                    }
                }
                None => self.err(
                    item.at(),
                    "steps must be written as [[steps]] tables, one per step".into(),
                ),
            },
        }
        raw_steps
    }
}
