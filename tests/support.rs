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

/// Runs the dgpath binary with these arguments.
pub fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_dgpath"))
        .args(args)
        .env("NO_COLOR", "1")
        .output()
        .expect("the dgpath binary runs")
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
