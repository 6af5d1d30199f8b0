//! Saving through a symbolic link writes the file the link points at and
//! leaves the link a link; the saved file keeps its permissions, and a file
//! that was deleted meanwhile comes back with ordinary permissions, never
//! the temporary file's 0600.

use dgpath::model::load_str;
use dgpath::scenario::State;
use dgpath::scenario::save;
use std::os::unix::fs::{PermissionsExt, symlink};
use std::path::Path;

/// Saves the demo with glucose at 3.3 mM into `path`.
fn save_demo_to(path: &Path) {
    let p = load_str(dgpath::DEMO, "f.toml").expect("the demo loads");
    let mut st = State::from_pathway(&p);
    st.conc[p.compound("glc").expect("glc")] = 3.3e-3;
    save::save(path, dgpath::DEMO, &p, &st).expect("saves");
}

fn glc_in(path: &Path) -> Option<f64> {
    let text = std::fs::read_to_string(path).expect("reads");
    let p = load_str(&text, "f.toml").expect("loads");
    p.compounds[p.compound("glc").expect("glc")].conc
}

fn mode(path: &Path) -> u32 {
    std::fs::metadata(path).expect("stat").permissions().mode() & 0o777
}

#[test]
fn a_save_through_a_link_writes_the_target_and_keeps_the_link() {
    let dir = tempfile::tempdir().unwrap();
    let data = dir.path().join("data");
    std::fs::create_dir(&data).unwrap();
    let real = data.join("real.toml");
    std::fs::write(&real, dgpath::DEMO).unwrap();
    std::fs::set_permissions(&real, std::fs::Permissions::from_mode(0o640)).unwrap();
    // A relative link in another folder, as `ln -s data/real.toml link.toml` makes.
    let link = dir.path().join("link.toml");
    symlink("data/real.toml", &link).unwrap();

    save_demo_to(&link);

    assert!(
        std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink(),
        "the link must stay a link"
    );
    assert_eq!(
        glc_in(&real),
        Some(3.3e-3),
        "the target holds the new value"
    );
    assert_eq!(mode(&real), 0o640, "the target keeps its permissions");
    // No temporary file left beside the link or the target.
    for d in [dir.path(), data.as_path()] {
        let stray: Vec<_> = std::fs::read_dir(d)
            .unwrap()
            .filter_map(|e| e.ok())
            .map(|e| e.file_name().to_string_lossy().into_owned())
            .filter(|n| n.starts_with(".dgpath-save-"))
            .collect();
        assert!(stray.is_empty(), "{stray:?}");
    }
}

#[test]
fn a_chain_of_links_and_a_dangling_link_are_followed() {
    let dir = tempfile::tempdir().unwrap();
    let real = dir.path().join("real.toml");
    let a = dir.path().join("a.toml");
    let b = dir.path().join("b.toml");
    symlink(&real, &a).unwrap(); // absolute, and dangling: real.toml does not exist yet
    symlink("a.toml", &b).unwrap();
    save_demo_to(&b);
    assert!(
        std::fs::symlink_metadata(&b)
            .unwrap()
            .file_type()
            .is_symlink()
    );
    assert!(
        std::fs::symlink_metadata(&a)
            .unwrap()
            .file_type()
            .is_symlink()
    );
    assert_eq!(glc_in(&real), Some(3.3e-3));
}

#[test]
fn a_file_deleted_before_saving_comes_back_with_ordinary_permissions() {
    let dir = tempfile::tempdir().unwrap();
    // What this process's umask gives a new file.
    let probe = dir.path().join("probe");
    std::fs::File::create(&probe).unwrap();
    let ordinary = mode(&probe);
    let path = dir.path().join("f.toml");
    save_demo_to(&path);
    assert_eq!(mode(&path), ordinary);
    assert_ne!(mode(&path), 0o600, "never the temporary file's mode");
    assert_eq!(glc_in(&path), Some(3.3e-3));
}

#[test]
fn a_loop_of_links_is_an_error_not_a_hang() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.toml");
    let b = dir.path().join("b.toml");
    symlink(&b, &a).unwrap();
    symlink(&a, &b).unwrap();
    let p = load_str(dgpath::DEMO, "f.toml").unwrap();
    let st = State::from_pathway(&p);
    let err = save::save(&a, dgpath::DEMO, &p, &st).expect_err("a loop cannot be saved through");
    assert!(err.to_string().contains("symbolic links"), "{err}");
}
