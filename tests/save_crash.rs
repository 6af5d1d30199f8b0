//! A save killed part-way leaves either the old file or the new one, never a
//! broken one. The test runs itself again as a child process that starts a
//! save and stops at a chosen point; the parent kills it there with SIGKILL
//! (no destructors, no cleanup), then reads the file back.

use dgpath::model::load_str;
use dgpath::scenario::State;
use dgpath::scenario::save::{self, WritePoint};
use std::io::{BufRead, BufReader};
use std::process::{Command, Stdio};

const CHILD_ENV: &str = "DGPATH_SAVE_CRASH_CHILD";

/// In the child: save with a new glucose value and stop at the named point.
/// Ignored in a normal run (it is not a test of its own): the tests below
/// start it with `--ignored` in a child process.
#[test]
#[ignore = "run only as the child process of the save-crash tests"]
fn save_crash_child() {
    let spec = std::env::var(CHILD_ENV).expect("started by crash_at with the point and path");
    let (point, path) = spec.split_once('|').expect("point|path");
    let want = match point {
        "half" => WritePoint::HalfWritten,
        "before_rename" => WritePoint::BeforeRename,
        _ => WritePoint::Renamed,
    };
    let path = std::path::Path::new(path);
    let original = std::fs::read_to_string(path).expect("read");
    let p = load_str(&original, "f.toml").expect("loads");
    let mut st = State::from_pathway(&p);
    let glc = p.compound("glc").expect("glc");
    st.conc[glc] = 3.3e-3;
    let text = save::render(&original, &p, &st).expect("renders");
    save::write_atomic_observed(path, &text, |at| {
        if at == want {
            println!("stopped");
            loop {
                std::thread::sleep(std::time::Duration::from_secs(1));
            }
        }
    })
    .expect("writes");
}

fn crash_at(point: &str) -> (String, String) {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("f.toml");
    std::fs::write(&path, dgpath::DEMO).expect("write demo");
    let mut child = Command::new(std::env::current_exe().expect("test binary"))
        .args([
            "--exact",
            "save_crash::save_crash_child",
            "--ignored",
            "--nocapture",
            "--test-threads",
            "1",
        ])
        .env(CHILD_ENV, format!("{point}|{}", path.display()))
        .stdout(Stdio::piped())
        .stderr(Stdio::null())
        .spawn()
        .expect("child starts");
    let out = child.stdout.take().expect("stdout");
    let mut stopped = false;
    for line in BufReader::new(out).lines() {
        if line.expect("line").contains("stopped") {
            stopped = true;
            break;
        }
    }
    assert!(stopped, "the child did not reach {point}");
    child.kill().expect("SIGKILL");
    let _ = child.wait();
    let after = std::fs::read_to_string(&path).expect("the file is still there");
    let leftovers: Vec<String> = std::fs::read_dir(dir.path())
        .expect("list")
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n != "f.toml")
        .collect();
    (after, leftovers.join(","))
}

#[test]
fn a_save_killed_before_the_rename_leaves_the_old_file() {
    for point in ["half", "before_rename"] {
        let (after, leftovers) = crash_at(point);
        assert_eq!(
            after,
            dgpath::DEMO,
            "killed at {point}: the old file must be intact"
        );
        // What is left is only the temporary file of the interrupted save.
        assert!(
            leftovers.is_empty() || leftovers.starts_with(".dgpath-save-"),
            "{leftovers}"
        );
    }
}

#[test]
fn a_save_killed_after_the_rename_leaves_the_new_file_whole() {
    let (after, _) = crash_at("renamed");
    let p = load_str(&after, "f.toml").expect("the new file loads");
    let glc = p.compound("glc").expect("glc");
    assert_eq!(p.compounds[glc].conc, Some(3.3e-3));
    // Every comment of the original is still there.
    for line in dgpath::DEMO
        .lines()
        .filter(|l| l.trim_start().starts_with('#'))
    {
        assert!(after.contains(line), "comment lost: {line}");
    }
}
