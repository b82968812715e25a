//! A crash or kill in the middle of saving decisions loses nothing: after a SIGKILL at
//! an arbitrary moment, the decisions file holds either the previous save or the new
//! one, complete. The parent test starts this same test binary as a child that saves
//! two alternating versions in a tight loop, kills it at varying moments, and reads
//! the file back each time.

use std::path::Path;
use std::process::Command;
use std::time::Duration;

use telltale::decisions::{Decisions, Mark, Store};

const FP: &str = "c0ffee00c0ffee00";

/// Two versions, large enough (thousands of marks) that a save takes a while.
fn version(n: u8) -> Decisions {
    let mut d = Decisions::new(FP);
    for i in 0..4000 {
        let mark = if (i + n as usize).is_multiple_of(2) {
            Mark::Hide
        } else {
            Mark::Keep
        };
        d.marks.insert(format!("like:id:{i:06}-{n}"), mark);
    }
    d.real_values.insert("age".into(), format!("version-{n}"));
    d
}

/// Child side: save versions 1 and 2 alternately until killed. Run only by
/// `kill_mid_save_leaves_old_or_new` (it loops forever otherwise).
#[test]
#[ignore = "helper process for kill_mid_save_leaves_old_or_new"]
fn child_saver() {
    let Some(dir) = std::env::var_os("TELLTALE_CRASH_CHILD_DIR") else {
        return;
    };
    let store = Store::at(dir.into());
    let (a, b) = (version(1), version(2));
    loop {
        store.save(&a).unwrap();
        store.save(&b).unwrap();
    }
}

fn temps_in(dir: &Path) -> usize {
    std::fs::read_dir(dir)
        .map(|r| {
            r.flatten()
                .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
                .count()
        })
        .unwrap_or(0)
}

#[cfg(unix)]
#[test]
fn kill_mid_save_leaves_old_or_new() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::at(dir.path().to_path_buf());
    store.save(&version(1)).unwrap();
    let (a, b) = (version(1), version(2));
    let exe = std::env::current_exe().unwrap();
    let mut interrupted_mid_save = 0;
    let mut temps_seen = 0;
    for round in 0..25u64 {
        let mut child = Command::new(&exe)
            .args(["--exact", "child_saver", "--ignored", "--nocapture"])
            .env("TELLTALE_CRASH_CHILD_DIR", dir.path())
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        // Vary the moment of the kill: 40 ms to about 200 ms after start.
        std::thread::sleep(Duration::from_millis(40 + (round * 37) % 160));
        child.kill().unwrap(); // SIGKILL: no destructor, no flush, no cleanup runs
        child.wait().unwrap();
        // A temporary file left behind means the kill landed inside a save.
        let temps = temps_in(&dir.path().join("decisions"));
        if temps > temps_seen {
            interrupted_mid_save += 1;
        }
        temps_seen = temps;
        let loaded = store.load(FP);
        assert!(
            loaded.warning.is_none(),
            "round {round}: {:?}",
            loaded.warning
        );
        assert!(
            loaded.decisions == a || loaded.decisions == b,
            "round {round}: the file is neither the old nor the new version"
        );
    }
    println!("{interrupted_mid_save} of 25 kills landed while a temporary file was open");
    assert!(
        interrupted_mid_save > 0,
        "no kill landed mid-save; the test did not exercise the property"
    );
}
