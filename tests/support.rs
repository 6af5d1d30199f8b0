//! Helpers shared by the integration tests: paths to the test data, loading
//! and analysing a pathway through the library, and running the binary.

use dgpath::analysis::{self, Analysis, Prepared};
use dgpath::model;
use dgpath::scenario::State;
use std::path::PathBuf;
use std::process::{Command, Output};

/// A file under tests/.
pub fn path(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join(rel)
}

/// Loads and prepares pathway text, panicking with the loader's message on failure.
pub fn prepare_str(text: &str, name: &str) -> Prepared {
    let p = model::load_str(text, name).unwrap_or_else(|e| panic!("{e}"));
    analysis::prepare(p).unwrap_or_else(|e| panic!("{e}"))
}

/// Loads and prepares a file under tests/.
pub fn prepare_file(rel: &str) -> Prepared {
    let p = model::load_file(&path(rel)).unwrap_or_else(|e| panic!("{e}"));
    analysis::prepare(p).unwrap_or_else(|e| panic!("{e}"))
}

/// Analyses with the file's own state after `edit` changes it.
pub fn analyze_with(prep: &Prepared, edit: impl FnOnce(&mut State)) -> Analysis {
    let mut s = State::from_pathway(&prep.pathway);
    edit(&mut s);
    analysis::analyze(prep, &s).unwrap_or_else(|e| panic!("{e}"))
}

/// Analyses with the file's own state.
pub fn analyze(prep: &Prepared) -> Analysis {
    analyze_with(prep, |_| {})
}

/// The route result of the step with this id.
pub fn step<'a>(prep: &Prepared, a: &'a Analysis, id: &str) -> &'a analysis::StepResult {
    let i = prep
        .pathway
        .step(id)
        .unwrap_or_else(|| panic!("no step {id}"));
    a.steps
        .iter()
        .find(|s| s.step == i)
        .unwrap_or_else(|| panic!("{id} is not on the route"))
}

/// Net change per pass of a compound, 0 when it is not listed.
pub fn net(prep: &Prepared, a: &Analysis, id: &str) -> f64 {
    let c = prep.pathway.compound(id).unwrap();
    a.net.iter().find(|(i, _)| *i == c).map_or(0.0, |x| x.1)
}

/// The dgpath binary built for these tests.
pub const BIN: &str = env!("CARGO_BIN_EXE_dgpath");

/// The top folder of the checkout (where `pathways/` is).
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A command for the dgpath binary with NO_COLOR set, as every test runs it.
pub fn dgpath() -> Command {
    let mut c = Command::new(BIN);
    c.env("NO_COLOR", "1");
    c
}

/// Runs the dgpath binary with these arguments.
pub fn run(args: &[&str]) -> Output {
    dgpath()
        .args(args)
        .output()
        .expect("the dgpath binary runs")
}

/// Runs the dgpath binary in the top folder (for paths like `pathways/...`).
pub fn run_in_root(args: &[&str]) -> Output {
    dgpath()
        .args(args)
        .current_dir(root())
        .output()
        .expect("the dgpath binary runs")
}

/// Runs the dgpath binary; returns (exit code, stdout, stderr).
pub fn run_code(args: &[&str]) -> (i32, String, String) {
    let out = run(args);
    let (o, e) = texts(&out);
    (out.status.code().unwrap_or(-1), o, e)
}

/// stdout as text.
pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// stderr as text.
pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// stdout and stderr as text.
pub fn texts(o: &Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// Asserts |got - want| <= tol with a readable message.
#[track_caller]
pub fn close(got: f64, want: f64, tol: f64) {
    assert!((got - want).abs() <= tol, "got {got}, want {want} ± {tol}");
}

/// A pathway file written for a test, so that the test shows only what it
/// needs: `Pw::new("t").compound("a", "1 mM").step("s1", "a -> b", "-5").text()`.
/// The temperature is 25 °C unless `temperature` says otherwise; energies
/// and concentrations are written as given (a bare number is kJ/mol or mM).
#[derive(Debug, Clone)]
pub struct Pw {
    name: String,
    route: Option<Vec<String>>,
    conditions: Vec<String>,
    analysis: Vec<String>,
    compounds: Vec<String>,
    steps: Vec<String>,
}

impl Pw {
    /// A pathway with this name, at 25 °C, with nothing in it yet.
    pub fn new(name: &str) -> Self {
        Pw {
            name: name.to_string(),
            route: None,
            conditions: vec!["temperature = \"25 C\"".to_string()],
            analysis: Vec::new(),
            compounds: Vec::new(),
            steps: Vec::new(),
        }
    }

    /// The temperature, with its unit ("30 C", "310 K").
    pub fn temperature(mut self, t: &str) -> Self {
        self.conditions[0] = format!("temperature = \"{t}\"");
        self
    }

    /// One more line of `[conditions]` as written (`ph = 7.5`).
    pub fn condition(mut self, line: &str) -> Self {
        self.conditions.push(line.to_string());
        self
    }

    /// One line of `[analysis]` as written (`far = "-15 kJ/mol"`).
    pub fn analysis(mut self, line: &str) -> Self {
        self.analysis.push(line.to_string());
        self
    }

    /// The concentration bounds of the optimisation.
    pub fn bounds(self, lo: &str, hi: &str) -> Self {
        self.analysis(&format!("bounds = [\"{lo}\", \"{hi}\"]"))
    }

    /// The explicit main route.
    pub fn route(mut self, ids: &[&str]) -> Self {
        self.route = Some(ids.iter().map(|s| s.to_string()).collect());
        self
    }

    /// A compound with its concentration.
    pub fn compound(self, id: &str, conc: &str) -> Self {
        self.compound_with(id, conc, "")
    }

    /// A compound with its concentration and more fields
    /// (`role = "currency"`, `branch = true`, `cv = 0.5`, ...).
    pub fn compound_with(mut self, id: &str, conc: &str, extra: &str) -> Self {
        let extra = if extra.is_empty() {
            String::new()
        } else {
            format!(", {extra}")
        };
        self.compounds
            .push(format!("{id} = {{ conc = \"{conc}\"{extra} }}"));
        self
    }

    /// A line of `[compounds]` as written (`d = { conc = 5 }`).
    pub fn compound_line(mut self, line: &str) -> Self {
        self.compounds.push(line.to_string());
        self
    }

    /// Compounds that share one concentration.
    pub fn compounds(self, ids: &[&str], conc: &str) -> Self {
        ids.iter().fold(self, |p, id| p.compound(id, conc))
    }

    /// A carrier (`role = "currency"`) with its concentration.
    pub fn currency(self, id: &str, conc: &str) -> Self {
        self.compound_with(id, conc, "role = \"currency\"")
    }

    /// A solvent (activity 1, no concentration).
    pub fn solvent(mut self, id: &str) -> Self {
        self.compounds
            .push(format!("{id} = {{ role = \"solvent\" }}"));
        self
    }

    /// A step with its reaction and dG'°.
    pub fn step(self, id: &str, reaction: &str, dg0: &str) -> Self {
        self.step_with(id, reaction, dg0, &[])
    }

    /// A step with more lines as written (`times = 4`, `couple = "s3"`,
    /// `dh0 = "-20 kJ/mol"`, ...).
    pub fn step_with(mut self, id: &str, reaction: &str, dg0: &str, extra: &[&str]) -> Self {
        let mut s =
            format!("[[steps]]\nid = \"{id}\"\nreaction = \"{reaction}\"\ndg0 = \"{dg0}\"\n");
        for line in extra {
            s.push_str(line);
            s.push('\n');
        }
        self.steps.push(s);
        self
    }

    /// A side step (`side = true`).
    pub fn side(self, id: &str, reaction: &str, dg0: &str) -> Self {
        self.step_with(id, reaction, dg0, &["side = true"])
    }

    /// A chain `c0 -> c1 -> ...` of steps `r1, r2, ...` with these dG'°
    /// (kJ/mol), every compound at `conc`.
    pub fn chain(self, dg0: &[f64], conc: &str) -> Self {
        let ids: Vec<String> = (0..=dg0.len()).map(|i| format!("s{i}")).collect();
        let ids: Vec<&str> = ids.iter().map(|s| s.as_str()).collect();
        dg0.iter()
            .enumerate()
            .fold(self.compounds(&ids, conc), |p, (i, g)| {
                p.step(
                    &format!("r{}", i + 1),
                    &format!("s{i} -> s{}", i + 1),
                    &format!("{g} kJ/mol"),
                )
            })
    }

    /// The file's text.
    pub fn text(&self) -> String {
        let mut t = format!("format = 1\n[pathway]\nname = \"{}\"\n", self.name);
        if let Some(r) = &self.route {
            let ids: Vec<String> = r.iter().map(|s| format!("\"{s}\"")).collect();
            t.push_str(&format!("route = [{}]\n", ids.join(", ")));
        }
        t.push_str("[conditions]\n");
        for l in &self.conditions {
            t.push_str(l);
            t.push('\n');
        }
        if !self.analysis.is_empty() {
            t.push_str("[analysis]\n");
            for l in &self.analysis {
                t.push_str(l);
                t.push('\n');
            }
        }
        t.push_str("[compounds]\n");
        for l in &self.compounds {
            t.push_str(l);
            t.push('\n');
        }
        t.extend(self.steps.iter().map(String::as_str));
        t
    }

    /// The text written to `name` in `dir`; returns the path as text.
    pub fn write(&self, dir: &std::path::Path, name: &str) -> String {
        let file = dir.join(name);
        std::fs::write(&file, self.text()).unwrap();
        file.to_str().unwrap().to_string()
    }

    /// Loaded and prepared (panics with the loader's message on failure).
    pub fn prepare(&self, file: &str) -> Prepared {
        prepare_str(&self.text(), file)
    }
}

#[test]
fn the_pathway_builder_writes_a_file_that_loads() {
    let p = Pw::new("t")
        .temperature("30 C")
        .condition("ph = 7.5")
        .bounds("1 uM", "10 mM")
        .route(&["s1", "s2"])
        .compounds(&["a", "b", "c"], "1 mM")
        .currency("atp", "2 mM")
        .solvent("w")
        .step("s1", "a -> b + w", "-5")
        .step_with("s2", "b -> c", "-3 kJ/mol", &["times = 2"])
        .side("x", "c + atp -> a", "-1")
        .prepare("t.toml");
    let q = &p.pathway;
    assert_eq!((q.compounds.len(), q.steps.len()), (5, 3));
    close(q.conditions.temperature, 303.15, 1e-12);
    close(q.conditions.ph, 7.5, 0.0);
    assert!(q.compounds[4].is_solvent());
}
