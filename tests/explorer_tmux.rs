//! The explorer in a real terminal: tmux on a private server runs it on a
//! copy of the demo, the test types keys, reads the screen, saves, quits and
//! checks the exit status; a second test builds with the `test-panic`
//! feature and checks that a panic leaves the terminal restored.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

/// True when tmux runs here. Without it the tests are skipped on a
/// developer's machine, but under CI (CI set) a missing tmux fails them:
/// a skipped terminal test must never pass as green.
fn have_tmux() -> bool {
    let ok = Command::new("tmux")
        .arg("-V")
        .output()
        .is_ok_and(|o| o.status.success());
    if !ok {
        assert!(
            std::env::var_os("CI").is_none(),
            "tmux is not installed, and under CI the real-terminal tests must run"
        );
        eprintln!("skipped: tmux is not installed");
    }
    ok
}

/// A private tmux server, killed on drop.
///
/// The command runs under a shell that writes its exit status to a file once
/// it has reaped the explorer: tmux's own `pane_dead_status` was seen empty
/// for over 20 s on a busy machine while the explorer was already a zombie
/// (tmux had not reaped it), which made these tests flaky.
struct Tmux {
    socket: String,
    conf: PathBuf,
    status: PathBuf,
}

impl Tmux {
    fn new(dir: &Path, tag: &str) -> Tmux {
        let conf = dir.join("tmux.conf");
        std::fs::write(&conf, "set -g status off\nset -g remain-on-exit on\n").unwrap();
        Tmux {
            socket: format!("dgpath-{tag}-{}", std::process::id()),
            conf,
            status: dir.join("exit-status"),
        }
    }
    fn cmd(&self, args: &[&str]) -> String {
        let out = Command::new("tmux")
            .arg("-L")
            .arg(&self.socket)
            .arg("-f")
            .arg(&self.conf)
            .args(args)
            .output()
            .expect("tmux runs");
        String::from_utf8_lossy(&out.stdout).into_owned()
    }
    /// Runs `command` in a new session; its exit status goes to `self.status`.
    fn start(&self, dir: &Path, command: &str) {
        let command = format!("{command}; echo $? > '{}'", self.status.display());
        self.cmd(&[
            "new-session",
            "-d",
            "-s",
            "t",
            "-x",
            "120",
            "-y",
            "36",
            "-c",
            &dir.display().to_string(),
            &command,
        ]);
    }
    fn screen(&self) -> String {
        self.cmd(&["capture-pane", "-p", "-t", "t"])
    }
    /// The screen with its scrollback.
    fn screen_all(&self) -> String {
        self.cmd(&["capture-pane", "-p", "-S", "-", "-t", "t"])
    }
    fn var(&self, name: &str) -> String {
        self.cmd(&["display", "-p", "-t", "t", &format!("#{{{name}}}")])
            .trim()
            .to_string()
    }
    fn keys(&self, keys: &[&str]) {
        let mut args = vec!["send-keys", "-t", "t"];
        args.extend_from_slice(keys);
        self.cmd(&args);
    }
    fn text(&self, text: &str) {
        self.cmd(&["send-keys", "-t", "t", "-l", text]);
    }
    /// Polls until `ok` holds for the screen (never a bare sleep), or fails after 20 s.
    fn wait(&self, what: &str, ok: impl Fn(&str) -> bool) -> String {
        let t0 = Instant::now();
        loop {
            let s = self.screen();
            if ok(&s) {
                return s;
            }
            if t0.elapsed() > Duration::from_secs(20) {
                panic!("timed out waiting for {what}; screen:\n{s}");
            }
            std::thread::sleep(Duration::from_millis(30));
        }
    }
    /// Polls until tmux shows the explorer's last output: the shell has
    /// reaped it, yet tmux may not have read everything it wrote.
    fn settle(&self, ok: impl Fn(&str) -> bool) -> String {
        let t0 = Instant::now();
        loop {
            let s = self.screen_all();
            if self.var("alternate_on") == "0" && ok(&s) {
                return s;
            }
            assert!(
                t0.elapsed() < Duration::from_secs(20),
                "the terminal was not restored (alternate_on {}):\n{s}",
                self.var("alternate_on")
            );
            std::thread::sleep(Duration::from_millis(30));
        }
    }
    /// Polls until the shell has reaped the explorer and written its exit
    /// status (a number, or 128 + the signal), and returns it; fails after 20 s.
    fn wait_exit(&self) -> i32 {
        let t0 = Instant::now();
        loop {
            let text = std::fs::read_to_string(&self.status).unwrap_or_default();
            if let Some(line) = text.strip_suffix('\n') {
                return line
                    .trim()
                    .parse()
                    .unwrap_or_else(|_| panic!("exit status {line:?} is not a number"));
            }
            assert!(
                t0.elapsed() < Duration::from_secs(20),
                "the explorer did not end:\n{}",
                self.screen()
            );
            std::thread::sleep(Duration::from_millis(30));
        }
    }
}

impl Drop for Tmux {
    fn drop(&mut self) {
        let _ = Command::new("tmux")
            .arg("-L")
            .arg(&self.socket)
            .arg("kill-server")
            .output();
    }
}

/// The dG' column of a step row in the step list.
fn dg_on_screen(screen: &str, id: &str) -> f64 {
    let words = |l: &str| -> Vec<String> {
        l.split(|c: char| c == '│' || c.is_whitespace())
            .filter(|w| !w.is_empty())
            .map(String::from)
            .collect()
    };
    // Rows read "▶ pfk  phosphofru…  -15.0  -11.1 ...": the id is among the first two words.
    let line = screen
        .lines()
        .map(words)
        .find(|w| w.iter().take(2).any(|x| x == id))
        .unwrap_or_else(|| panic!("no row for {id}:\n{screen}"));
    let nums: Vec<f64> = line.iter().filter_map(|w| w.parse::<f64>().ok()).collect();
    nums[1]
}

#[test]
fn explorer_in_tmux_edits_saves_and_quits_cleanly() {
    if !have_tmux() {
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("fermenter.toml");
    std::fs::write(&file, dgpath::DEMO).unwrap();
    // The explorer opens a symbolic link to the file: saving must write the
    // file it points at and leave the link a link.
    std::os::unix::fs::symlink("fermenter.toml", dir.path().join("link.toml")).unwrap();
    let t = Tmux::new(dir.path(), "edit");
    t.start(
        dir.path(),
        &format!(
            "env NO_COLOR=1 TERM=xterm-256color {} explore link.toml",
            crate::support::BIN
        ),
    );
    let s = t.wait("the first frame", |s| {
        s.contains("Steps (") && s.contains("? keys")
    });
    let before = dg_on_screen(&s, "pfk");
    assert_eq!(before, -12.2, "pfk dG' as in the report of the demo");
    // Tab to the concentrations, down to f6p, type a value.
    t.keys(&["Tab", "Down", "Down", "Enter"]);
    t.wait("the edit line", |s| s.contains("f6p (now 0.35 mM)"));
    t.text("2.5 mM");
    t.keys(&["Enter"]);
    let s = t.wait("the new value", |s| s.contains("f6p = 2.5 mM"));
    // RT ln(2.5 / 0.35) at 30 C is 4.955 kJ/mol (R from the 2019 SI); f6p is a substrate of pfk.
    let expected = -12.21 - 8.314462618e-3 * 303.15 * (2.5f64 / 0.35).ln();
    let after = dg_on_screen(&s, "pfk");
    assert!(
        (after - expected).abs() < 0.06,
        "pfk dG' {after}, expected {expected:.2}\n{s}"
    );
    assert!(s.contains("● unsaved"));
    t.keys(&["s"]);
    t.wait("the save message", |s| s.contains("saved link.toml"));
    let link = std::fs::symlink_metadata(dir.path().join("link.toml")).unwrap();
    assert!(link.file_type().is_symlink(), "the link is still a link");
    let text = std::fs::read_to_string(&file).unwrap();
    assert!(
        text.contains(r#"f6p   = { name = "fructose 6-phosphate", conc = "2.5 mM", cv = 0.25 }"#),
        "{text}"
    );
    assert!(text.contains("# INVENTED DEMO DATA") && text.contains("# also feeds storage sugars"));
    // F12 does nothing in a normal build (the panic switch is a cargo feature, off by default).
    t.keys(&["F12", "q"]);
    assert_eq!(t.wait_exit(), 0, "q exits with status 0");
    t.settle(|_| true);
}

#[test]
fn a_panic_in_the_explorer_restores_the_terminal() {
    if !have_tmux() {
        return;
    }
    // A build with the test-panic switch, in its own target folder (the outer cargo holds ours).
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let target = root.join("target/panic");
    // Seed it with a copy of the normal debug build, so that only dgpath itself is
    // compiled again (the dependencies do not depend on dgpath's features).
    let built = root.join("target/debug");
    if !target.join("debug").exists() && built.join("deps").exists() {
        std::fs::create_dir_all(target.join("debug")).unwrap();
        let copied = Command::new("cp")
            .arg("-a")
            .args(["deps", "build", ".fingerprint"].map(|d| built.join(d)))
            .arg(target.join("debug"))
            .status();
        if !matches!(copied, Ok(s) if s.success()) {
            // Not fatal: cargo then builds everything in the new folder.
            let _ = std::fs::remove_dir_all(target.join("debug"));
        }
    }
    let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".into());
    let st = Command::new(cargo)
        .args([
            "build",
            "--quiet",
            "--features",
            "test-panic",
            "--bin",
            "dgpath",
            "--target-dir",
        ])
        .arg(&target)
        .current_dir(root)
        .status()
        .expect("cargo runs");
    assert!(st.success(), "building with --features test-panic failed");
    let bin = target.join("debug/dgpath");
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("f.toml"), dgpath::DEMO).unwrap();
    let t = Tmux::new(dir.path(), "panic");
    t.start(
        dir.path(),
        &format!(
            "printf 'before-explorer\\n'; RUST_BACKTRACE=0 {} explore f.toml",
            bin.display()
        ),
    );
    t.wait("the first frame", |s| s.contains("Steps ("));
    assert_eq!(
        t.var("alternate_on"),
        "1",
        "the explorer draws on the alternate screen"
    );
    t.keys(&["F12"]);
    let status = t.wait_exit();
    // With scrollback: the pane's first lines may have scrolled up.
    let s = t.settle(|s| s.contains("test-panic: F12 pressed"));
    assert!(
        s.contains("before-explorer"),
        "the shell's text is back:\n{s}"
    );
    assert!(
        s.contains("test-panic: F12 pressed"),
        "the panic message is readable:\n{s}"
    );
    assert!(
        !s.contains("Steps ("),
        "no explorer screen left behind:\n{s}"
    );
    assert_eq!(status, 101, "a panic exits with 101:\n{s}");
}

#[test]
fn a_terminal_below_the_minimum_says_so_and_a_larger_one_draws_again() {
    if !have_tmux() {
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("fermenter.toml"), dgpath::DEMO).unwrap();
    let t = Tmux::new(dir.path(), "small");
    t.start(
        dir.path(),
        &format!(
            "env NO_COLOR=1 TERM=xterm-256color {} explore fermenter.toml",
            crate::support::BIN
        ),
    );
    t.wait("the first frame", |s| {
        s.contains("Steps (") && s.contains("? keys")
    });
    t.cmd(&["resize-window", "-t", "t", "-x", "60", "-y", "20"]);
    let s = t.wait("the too-small message", |s| {
        s.contains("terminal too small")
    });
    assert!(s.contains("needs 80×24") && s.contains("is 60×20"), "{s}");
    assert!(!s.contains("Steps ("), "{s}");
    t.cmd(&["resize-window", "-t", "t", "-x", "80", "-y", "24"]);
    let s = t.wait("the screen again", |s| {
        s.contains("Steps (") && s.contains(" more")
    });
    assert!(!s.contains("terminal too small"), "{s}");
    t.keys(&["q"]);
    assert_eq!(t.wait_exit(), 0);
    t.settle(|_| true);
}

#[test]
fn a_long_route_gets_its_optimum_from_the_background_in_a_real_terminal() {
    if !have_tmux() {
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    // 2,000 steps: optimised on the solver thread, not inside the key.
    std::fs::write(dir.path().join("long.toml"), dgpath::synthetic::route(2000)).unwrap();
    let t = Tmux::new(dir.path(), "long");
    t.start(
        dir.path(),
        &format!(
            "env NO_COLOR=1 TERM=xterm-256color {} explore long.toml",
            env!("CARGO_BIN_EXE_dgpath")
        ),
    );
    // The first optimum arrives through the event loop (nothing waits for it).
    let s = t.wait("the first optimum", |s| {
        s.contains("Steps (2000 route)") && s.contains("MDF +")
    });
    assert!(!s.contains("solving"), "{s}");
    // An edit of the held carrier: the screen follows, and the optimum of
    // the new state replaces the out-of-date one.
    t.keys(&["Tab", "+", "+", "+"]);
    let s = t.wait("the edit and its optimum", |s| {
        s.contains("(* unsaved)") && s.contains("MDF +") && !s.contains("solving")
    });
    assert!(s.contains("atp"), "{s}");
    t.keys(&["q"]);
    t.wait("the unsaved question", |s| s.contains("press q again"));
    t.keys(&["q"]);
    let code = t.wait_exit();
    assert!(code == 0, "exit status {code}:\n{}", t.screen());
    t.settle(|_| true);
}
