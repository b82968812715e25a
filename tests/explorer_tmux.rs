//! The explorer driven for real in a terminal: tmux runs the release binary at 80×24
//! on the demo reporter archive, keys go in with send-keys, the screen comes back with
//! capture-pane. Open → cautions shown once → item list → filter → hide an item → the
//! overview changes → quit; the decisions file is then on disk and the terminal has
//! left the alternate screen. A second run checks SIGTERM restores the terminal and
//! keeps the decisions too, a third that SIGINT does the same, and a fourth that a panic (switched on by a test-only environment variable) does too. A second test covers
//! the loading screen: it is up at once, Esc and Ctrl-C leave it with the terminal
//! restored (a test-only variable makes the load slow), and a load error ends the
//! explorer with the error's message. Skipped, with a message saying so, where tmux is
//! absent, except under CI (`CI=true`), where a missing tmux fails the test.

use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

struct Tmux {
    socket: String,
    /// The session being driven.
    target: String,
}

impl Tmux {
    fn run(&self, args: &[&str]) -> String {
        let out = Command::new("tmux")
            .args(["-L", &self.socket])
            .args(args)
            .output()
            .expect("tmux runs");
        String::from_utf8_lossy(&out.stdout).into_owned()
    }

    fn screen(&self) -> String {
        self.run(&["capture-pane", "-p", "-t", &self.target])
    }

    /// The pane with its scrollback, wrapped lines joined.
    fn history(&self) -> String {
        self.run(&["capture-pane", "-p", "-J", "-S", "-200", "-t", &self.target])
    }

    fn keys(&self, keys: &[&str]) {
        let mut args = vec!["send-keys", "-t", self.target.as_str()];
        args.extend_from_slice(keys);
        self.run(&args);
    }

    /// Wait until the screen satisfies `pred`; panic with the screen after 40 s (the
    /// machine may be busy with other builds).
    fn wait_for(&self, what: &str, pred: impl Fn(&str) -> bool) -> String {
        let start = Instant::now();
        loop {
            let s = self.screen();
            if pred(&s) {
                return s;
            }
            if start.elapsed() > Duration::from_secs(40) {
                panic!("timed out waiting for {what}; screen:\n{s}");
            }
            std::thread::sleep(Duration::from_millis(100));
        }
    }

    fn pane(&self, format: &str) -> String {
        self.run(&["display-message", "-p", "-t", &self.target, format])
            .trim()
            .to_string()
    }

    /// Start the explorer in a new session (the server keeps earlier, dead ones, so
    /// it never shuts down between runs).
    fn start(&mut self, name: &str, data_dir: &Path) {
        self.start_with(name, data_dir, "");
    }

    /// [`Tmux::start`] with extra `NAME=value` environment settings.
    fn start_with(&mut self, name: &str, data_dir: &Path, env: &str) {
        let archive = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter");
        self.start_on(name, data_dir, env, archive);
    }

    /// [`Tmux::start_with`] on another archive path.
    fn start_on(&mut self, name: &str, data_dir: &Path, env: &str, archive: &str) {
        self.start_args(name, data_dir, env, &format!("'{archive}'"));
    }

    /// Start the explorer with these (already quoted) command-line arguments.
    fn start_args(&mut self, name: &str, data_dir: &Path, env: &str, args: &str) {
        self.target = name.to_string();
        let bin = env!("CARGO_BIN_EXE_telltale");
        let cmd = format!(
            "exec env {env} TELLTALE_DATA_DIR='{}' NO_COLOR=1 TERM=xterm-256color '{bin}' {args}",
            data_dir.display()
        );
        self.run(&[
            "new-session",
            "-d",
            "-s",
            name,
            "-x",
            "80",
            "-y",
            "24",
            &cmd,
        ]);
        self.run(&["set-option", "-t", name, "remain-on-exit", "on"]);
    }
}

impl Drop for Tmux {
    fn drop(&mut self) {
        let _ = Command::new("tmux")
            .args(["-L", &self.socket, "kill-server"])
            .output();
    }
}

/// CI sets `CI=true`: there a missing tool fails a test instead of skipping it.
fn in_ci() -> bool {
    std::env::var("CI").is_ok_and(|v| !matches!(v.trim(), "" | "0" | "false" | "no"))
}

fn tmux_available() -> bool {
    Command::new("tmux")
        .arg("-V")
        .output()
        .is_ok_and(|o| o.status.success())
}

/// The probability shown on the overview's first bar line ("… 62%  population …").
fn first_probability(screen: &str) -> String {
    screen
        .lines()
        .find(|l| l.contains("population"))
        .and_then(|l| l.split("population").next())
        .and_then(|l| l.split_whitespace().last())
        .unwrap_or("")
        .to_string()
}

/// A tmux driver on a server of its own (socket `SOCKET-PID`), or `None` after a
/// SKIPPED line naming the test when tmux is not installed (a failure under CI).
fn driver(test: &str, what: &str, socket: &str) -> Option<Tmux> {
    if !tmux_available() {
        assert!(
            !in_ci(),
            "{test}: tmux is not installed, and under CI (CI=true) {what} must be driven in a real terminal (.ci/run installs tmux)"
        );
        println!(
            "SKIPPED {test}: tmux is not installed, so {what} was not driven in a real terminal"
        );
        return None;
    }
    Some(Tmux {
        socket: format!("{socket}-{}", std::process::id()),
        target: String::new(),
    })
}

#[test]
fn explorer_in_a_real_terminal() {
    let Some(mut t) = driver(
        "explorer_in_a_real_terminal",
        "the explorer",
        "telltale-test",
    ) else {
        return;
    };
    let data = tempfile::tempdir().unwrap();
    t.start("first", data.path());
    // First run: the cautions come first.
    t.wait_for("the cautions", |s| s.contains("Before you act on this"));
    t.keys(&["Space"]);
    let overview = t.wait_for("the overview", |s| {
        s.contains("population rate") && !s.contains("Before you act on this")
    });
    let before = first_probability(&overview);
    assert!(before.ends_with('%'), "{overview}");
    assert!(data.path().join("cautions-seen").exists());

    // Item list, filtered to the first attribute (Enter on the overview), then likes.
    t.keys(&["Enter"]);
    t.wait_for("the item list", |s| s.contains("points to"));
    t.keys(&["t"]);
    t.wait_for("the likes filter", |s| s.contains("likes"));
    t.keys(&["x"]);
    t.wait_for("the hidden mark", |s| s.contains("Hidden (what-if)"));
    t.keys(&["1"]);
    let after = t.wait_for("the changed overview", |s| s.contains("before hiding"));
    // The hidden like changes some reading: the first one's figure, or another's
    // (the first can stay at 100% when other items already settle it).
    assert!(
        first_probability(&after) != before || after.contains("before hiding"),
        "{after}"
    );
    assert!(after.contains("1 hidden"), "{after}");

    t.keys(&["q"]);
    t.wait_for("the program to end", |_| t.pane("#{pane_dead}") == "1");
    assert_eq!(
        t.pane("#{alternate_on}"),
        "0",
        "still in the alternate screen"
    );
    let text = saved_decisions(data.path());
    assert!(text.contains("\"hide\""), "{text}");

    // Reopen: decisions restored, no cautions; then SIGTERM.
    t.start("second", data.path());
    let s = t.wait_for("the restored session", |s| {
        s.contains("Restored your saved decisions")
    });
    assert!(s.contains("1 hidden"), "{s}");
    assert!(!s.contains("Before you act on this"));
    let pid = t.pane("#{pane_pid}");
    Command::new("kill").args(["-TERM", &pid]).status().unwrap();
    t.wait_for("the program to end on SIGTERM", |_| {
        t.pane("#{pane_dead}") == "1"
    });
    assert_eq!(
        t.pane("#{alternate_on}"),
        "0",
        "SIGTERM left the alternate screen on"
    );
    // The program leaves normally (status 0), never killed by the signal. tmux
    // sometimes records neither a status nor a signal for a dead pane; then only the
    // terminal check above speaks.
    let (status, signal) = (t.pane("#{pane_dead_status}"), t.pane("#{pane_dead_signal}"));
    assert!(
        status == "0" || (status.is_empty() && signal.is_empty()),
        "exit after SIGTERM: status {status:?}, signal {signal:?}; screen:\n{}",
        t.screen()
    );

    // Once more with SIGINT (as `kill -INT` or a terminal's interrupt sends it when
    // raw mode is off): the same orderly exit.
    t.start("third", data.path());
    t.wait_for("the restored session", |s| {
        s.contains("Restored your saved decisions")
    });
    let pid = t.pane("#{pane_pid}");
    Command::new("kill").args(["-INT", &pid]).status().unwrap();
    t.wait_for("the program to end on SIGINT", |_| {
        t.pane("#{pane_dead}") == "1"
    });
    assert_eq!(
        t.pane("#{alternate_on}"),
        "0",
        "SIGINT left the alternate screen on"
    );
    // The program leaves normally (status 0), never killed by the signal. tmux
    // sometimes records neither a status nor a signal for a dead pane; then only the
    // terminal check above speaks.
    let (status, signal) = (t.pane("#{pane_dead_status}"), t.pane("#{pane_dead_signal}"));
    assert!(
        status == "0" || (status.is_empty() && signal.is_empty()),
        "exit after SIGINT: status {status:?}, signal {signal:?}; screen:\n{}",
        t.screen()
    );

    // A panic once the screen is up (a test-only switch): the panic hook leaves the
    // alternate screen before the message prints, and the exit is Rust's panic status.
    t.start_with("fourth", data.path(), "TELLTALE_TEST_PANIC=1");
    t.wait_for("the program to end on a panic", |_| {
        t.pane("#{pane_dead}") == "1"
    });
    assert_eq!(
        t.pane("#{alternate_on}"),
        "0",
        "a panic left the alternate screen on"
    );
    let screen = t.screen();
    assert!(screen.contains("deliberate panic"), "{screen}");
    let status = t.pane("#{pane_dead_status}");
    assert!(status == "101" || status.is_empty(), "status {status:?}");
}

#[test]
fn loading_screen_keys_and_load_errors() {
    let Some(mut t) = driver(
        "loading_screen_keys_and_load_errors",
        "the loading screen",
        "telltale-load",
    ) else {
        return;
    };
    let data = tempfile::tempdir().unwrap();
    // A slow load: the loading screen names the first step and the keys that stop.
    for (name, key) in [("esc", "Escape"), ("ctrlc", "C-c"), ("q", "q")] {
        t.start_with(name, data.path(), "TELLTALE_TEST_SLOW_LOAD=1");
        let s = t.wait_for("the loading screen", |s| {
            s.contains("Loading the reference statistics")
        });
        assert!(s.contains("q, Esc or Ctrl-C stops"), "{s}");
        assert!(s.contains("Reading reporter"), "{s}");
        assert_eq!(t.pane("#{alternate_on}"), "1", "{s}");
        t.keys(&[key]);
        t.wait_for("the program to end on a key while loading", |_| {
            t.pane("#{pane_dead}") == "1"
        });
        assert_eq!(
            t.pane("#{alternate_on}"),
            "0",
            "{key} on the loading screen left the alternate screen on"
        );
        let status = t.pane("#{pane_dead_status}");
        assert!(status == "0" || status.is_empty(), "status {status:?}");
    }
    // A load error: the terminal is restored and the message is the scan's own.
    let missing = data.path().join("no-such-archive.zip");
    t.start_on("missing", data.path(), "", &missing.display().to_string());
    t.wait_for("the program to end on a load error", |_| {
        t.pane("#{pane_dead}") == "1"
    });
    assert_eq!(t.pane("#{alternate_on}"), "0");
    // The same words as off a terminal (where the text report's scan fails the same way).
    let piped = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .arg(&missing)
        .stdin(std::process::Stdio::null())
        .output()
        .unwrap();
    let expected = String::from_utf8_lossy(&piped.stderr).trim().to_string();
    assert!(expected.starts_with("telltale: "), "{expected}");
    assert!(expected.contains("no-such-archive.zip"), "{expected}");
    let screen = t.history();
    assert!(screen.contains(&expected), "{screen}\nexpected: {expected}");
    let status = t.pane("#{pane_dead_status}");
    assert!(status == "1" || status.is_empty(), "status {status:?}");
}

/// Closing the terminal (here: killing the tmux server, which closes the terminal's
/// master side) ends the explorer promptly with the decisions saved. The program is
/// not the terminal's session leader here (a shell starts it without `exec`), so it
/// sees the hangup as end of input on its terminal rather than as SIGHUP: POSIX sends
/// SIGHUP to the controlling process on a modem disconnect (POSIX.1-2017, General
/// Terminal Interface, 11.1.10 Modem Disconnect, from memory), and later reads return
/// end of file. Before the fix the explorer spun on that end of input for ever.
#[test]
fn closing_the_terminal_saves_and_quits() {
    let Some(mut t) = driver(
        "closing_the_terminal_saves_and_quits",
        "a closed terminal",
        "telltale-hangup",
    ) else {
        return;
    };
    t.target = "hangup".into();
    let data = tempfile::tempdir().unwrap();
    let archive = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter");
    let bin = env!("CARGO_BIN_EXE_telltale");
    // No `exec`: the shell stays the session leader, as in a terminal window.
    let cmd = format!(
        "TELLTALE_DATA_DIR='{}' NO_COLOR=1 TERM=xterm-256color '{bin}' '{archive}'; true",
        data.path().display()
    );
    t.run(&[
        "new-session",
        "-d",
        "-s",
        "hangup",
        "-x",
        "80",
        "-y",
        "24",
        &cmd,
    ]);
    t.wait_for("the cautions", |s| s.contains("Before you act on this"));
    t.keys(&["Space"]);
    t.wait_for("the overview", |s| {
        s.contains("population rate") && !s.contains("Before you act on this")
    });
    t.keys(&["Enter"]);
    t.wait_for("the item list", |s| s.contains("points to"));
    t.keys(&["x"]);
    t.wait_for("the hidden mark", |s| s.contains("Hidden (what-if)"));
    // The explorer's process: the pane's shell's child.
    let shell = t.pane("#{pane_pid}");
    let out = Command::new("pgrep")
        .args(["-P", &shell])
        .output()
        .expect("pgrep runs");
    let pid = String::from_utf8_lossy(&out.stdout).trim().to_string();
    assert!(
        !pid.is_empty(),
        "no explorer process under the shell {shell}"
    );
    t.run(&["kill-server"]);
    let alive = |pid: &str| {
        std::fs::read_to_string(format!("/proc/{pid}/stat")).is_ok_and(|s| {
            !s.rsplit(')')
                .next()
                .unwrap_or("")
                .trim_start()
                .starts_with('Z')
        })
    };
    // A few seconds: common practice, no source (it leaves within a poll interval).
    let until = Instant::now() + Duration::from_secs(5);
    while alive(&pid) && Instant::now() < until {
        std::thread::sleep(Duration::from_millis(50));
    }
    let still = alive(&pid);
    if still {
        let _ = Command::new("kill").args(["-KILL", &pid]).status();
    }
    assert!(
        !still,
        "the explorer ({pid}) still runs 5 s after its terminal closed"
    );
    let text = saved_decisions(data.path());
    assert!(text.contains("\"hide\""), "{text}");
}

/// The text of the one decisions file saved under the data folder.
/// Workshop use: with --no-save (or TELLTALE_NO_SAVE=1) the cautions open every run
/// and the data folder is never created; after a normal run has saved decisions,
/// `telltale forget ARCHIVE` removes them and says which file went.
#[test]
fn workshop_mode_saves_nothing_and_forget_removes_what_was_saved() {
    let Some(mut t) = driver(
        "workshop_mode_saves_nothing_and_forget_removes_what_was_saved",
        "the no-save mode",
        "telltale-workshop",
    ) else {
        return;
    };
    let archive = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter");
    let root = tempfile::tempdir().unwrap();
    let data = root.path().join("data");
    for (run, env, args) in [
        ("ws1", "", format!("explore --no-save '{archive}'")),
        ("ws2", "TELLTALE_NO_SAVE=1", format!("'{archive}'")),
    ] {
        t.start_args(run, &data, env, &args);
        t.wait_for("the cautions", |s| s.contains("Before you act on this"));
        t.keys(&["Space"]);
        t.wait_for("the overview", |s| s.contains("population rate"));
        t.keys(&["2"]);
        t.wait_for("the item list", |s| s.contains("points to"));
        t.keys(&["x"]);
        t.wait_for("the hidden mark", |s| s.contains("Hidden (what-if)"));
        t.keys(&["q"]);
        t.wait_for("the program to end", |_| t.pane("#{pane_dead}") == "1");
        assert!(
            !data.exists(),
            "{run}: the no-save mode wrote to the data folder"
        );
    }
    // A normal run saves; forget removes it and names the file.
    t.start_args("ws3", &data, "", &format!("'{archive}'"));
    t.wait_for("the cautions", |s| s.contains("Before you act on this"));
    t.keys(&["Space"]);
    t.wait_for("the overview", |s| s.contains("population rate"));
    t.keys(&["2"]);
    t.wait_for("the item list", |s| s.contains("points to"));
    t.keys(&["x"]);
    t.wait_for("the hidden mark", |s| s.contains("Hidden (what-if)"));
    t.keys(&["q"]);
    t.wait_for("the program to end", |_| t.pane("#{pane_dead}") == "1");
    assert!(saved_decisions(&data).contains("\"hide\""));
    let out = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(["forget", archive])
        .env("TELLTALE_DATA_DIR", &data)
        .output()
        .unwrap();
    let said = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "{said}");
    assert!(said.contains("Removed") && said.contains(".json"), "{said}");
    let left: Vec<_> = std::fs::read_dir(data.join("decisions"))
        .map(|d| d.flatten().map(|e| e.path()).collect())
        .unwrap_or_default();
    assert!(left.is_empty(), "left behind: {left:?}");
    let again = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(["forget", "--all"])
        .env("TELLTALE_DATA_DIR", &data)
        .output()
        .unwrap();
    let said = String::from_utf8_lossy(&again.stdout);
    assert!(said.contains("cautions-seen"), "{said}");
    assert!(!data.exists(), "forget --all leaves no folder behind");
}

fn saved_decisions(data: &std::path::Path) -> String {
    let saved = std::fs::read_dir(data.join("decisions"))
        .unwrap()
        .flatten()
        .find(|e| e.path().extension().is_some_and(|x| x == "json"))
        .expect("a decisions file");
    std::fs::read_to_string(saved.path()).unwrap()
}
