//! Files that are not pathway files at all — too large, not UTF-8 text, a
//! folder, missing, unreadable — given to the binary: each gets one clear
//! message that names the file and says what is wrong, and exit code 1, for
//! both `dgpath check` and `dgpath report`.

use crate::support::{BIN, dgpath};
use std::path::Path;
use std::process::Command;

/// Runs `dgpath <cmd> <file>` and returns (exit code, stderr).
fn run(cmd: &str, file: &Path) -> (Option<i32>, String) {
    run_with(dgpath(), cmd, file)
}

/// Runs `<program> <cmd> <file>` and returns (exit code, stderr).
fn run_with(mut program: Command, cmd: &str, file: &Path) -> (Option<i32>, String) {
    let out = program
        .arg(cmd)
        .arg(file)
        .env("NO_COLOR", "1")
        .output()
        .expect("the dgpath binary runs");
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// Both commands refuse `file` with exit 1 and a message containing `phrase`.
fn refused(file: &Path, phrase: &str) {
    refused_by(dgpath, file, phrase);
}

/// As `refused`, with the binary started by `program`.
fn refused_by(program: impl Fn() -> Command, file: &Path, phrase: &str) {
    for cmd in ["check", "report"] {
        let (code, err) = run_with(program(), cmd, file);
        assert_eq!(
            code,
            Some(1),
            "dgpath {cmd} {}: stderr {err:?}",
            file.display()
        );
        assert!(
            err.contains(phrase),
            "dgpath {cmd}: expected {phrase:?} in {err:?}"
        );
        assert!(
            err.contains(&file.display().to_string()),
            "dgpath {cmd}: message should name the file: {err:?}"
        );
        assert!(!err.contains("panicked"), "dgpath {cmd} panicked: {err}");
        assert_eq!(
            err.trim_end().lines().count(),
            1,
            "one clear line, got {err:?}"
        );
    }
}

#[test]
fn file_over_the_size_limit_is_refused_before_reading() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("huge.toml");
    let f = std::fs::File::create(&path).unwrap();
    // A sparse file one byte over the limit: nothing is written to disk.
    f.set_len(dgpath::model::MAX_FILE_BYTES + 1).unwrap();
    drop(f);
    refused(&path, "over the 50 MB limit");
}

#[test]
fn file_at_the_size_limit_is_read() {
    // Exactly at the limit the file is read; this one is valid TOML padded
    // with a comment, so it is checked as a pathway (and found incomplete).
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("full.toml");
    let mut text = String::from("format = 1\n#");
    let pad = dgpath::model::MAX_FILE_BYTES as usize - text.len() - 1;
    text.push_str(&"x".repeat(pad));
    text.push('\n');
    assert_eq!(text.len() as u64, dgpath::model::MAX_FILE_BYTES);
    std::fs::write(&path, text).unwrap();
    let (code, err) = run("check", &path);
    assert_eq!(code, Some(1), "{err}");
    assert!(err.contains("missing [pathway] table"), "{err}");
    assert!(!err.contains("limit"), "{err}");
}

#[test]
fn file_that_is_not_utf8_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("latin1.toml");
    // "format = 1" then a name in Latin-1 (0xE9 is é there, invalid in UTF-8).
    std::fs::write(&path, b"format = 1\n[pathway]\nname = \"caf\xe9\"\n").unwrap();
    refused(
        &path,
        "is not UTF-8 text (bad byte at offset 32); save it as UTF-8",
    );
}

#[test]
fn folder_given_as_a_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    refused(dir.path(), "is a folder, not a pathway file");
}

#[test]
fn missing_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    refused(
        &dir.path().join("nope.toml"),
        "no such file; check the path",
    );
}

#[test]
fn unreadable_file_is_refused() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("locked.toml");
    std::fs::write(&path, dgpath::DEMO).unwrap();
    std::fs::set_permissions(&path, std::fs::Permissions::from_mode(0o000)).unwrap();
    if std::fs::read(&path).is_err() {
        refused(&path, "cannot be read (permission denied)");
        return;
    }
    // Running as root (as CI does): mode 000 does not stop root, so the
    // binary runs as the unprivileged user `nobody` instead, from a copy in
    // the open test folder so that nobody can reach it wherever the checkout is.
    std::fs::set_permissions(dir.path(), std::fs::Permissions::from_mode(0o755)).unwrap();
    let bin = dir.path().join("dgpath");
    std::fs::copy(BIN, &bin).unwrap();
    std::fs::set_permissions(&bin, std::fs::Permissions::from_mode(0o755)).unwrap();
    let as_nobody = || {
        let mut c = Command::new("setpriv");
        c.args(["--reuid=65534", "--regid=65534", "--clear-groups"])
            .arg(&bin);
        c
    };
    refused_by(as_nobody, &path, "cannot be read (permission denied)");
}
