//! A scan killed outright (SIGKILL) at random points, and two scans on one store at once, seen
//! from the command line: the store answers exactly as before the killed scan, the next scan
//! completes, and a second writer is turned away with a clear message.

use crate::common::*;
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

/// What the store answers: every claim record and the `top` table, as printed.
fn answers(store: &Path) -> (Vec<String>, String) {
    let claims = succeeded(
        hearsay()
            .arg("--store")
            .arg(store)
            .args(["--format", "json", "claims"]),
    );
    let mut claims: Vec<String> = String::from_utf8(claims.stdout)
        .unwrap()
        .lines()
        .map(str::to_string)
        .collect();
    // A store grown by several scans lists its segments in the order they were written; the
    // claims are the same set.
    claims.sort();
    let top = succeeded(
        hearsay()
            .arg("--store")
            .arg(store)
            .args(["--format", "table", "top", "--limit", "0"]),
    );
    (claims, String::from_utf8(top.stdout).unwrap())
}

fn scan_command(store: &Path, corpus: &Path) -> Command {
    let mut c = Command::new(assert_cmd::cargo::cargo_bin("hearsay"));
    c.current_dir(root())
        .env_remove("HEARSAY_STORE")
        .arg("--store")
        .arg(store)
        .args(["-q", "scan"])
        .arg(corpus)
        .stdout(Stdio::null())
        .stderr(Stdio::piped());
    c
}

/// Run a scan to its end; the test fails, showing its stderr, unless it succeeded.
fn finished(c: &mut Command) {
    let out = c.output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// xorshift64: the kill delays come from fixed seeds, so a failure can be replayed.
fn next(state: &mut u64) -> u64 {
    *state ^= *state << 13;
    *state ^= *state >> 7;
    *state ^= *state << 17;
    *state
}

#[test]
fn a_scan_killed_at_random_points_leaves_the_store_answering_as_before() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    // The invented demo corpus four times over: the scan the kills land in reads four more
    // copies, a few seconds of work.
    for i in 0..4 {
        copy_tree(
            &root().join("corpora-demo"),
            &corpus.join(format!("copy{i}")),
        );
    }
    let store = tmp.path().join("store");
    finished(&mut scan_command(&store, &corpus));
    let before = answers(&store);
    assert!(before.0.len() > 100, "{}", before.0.len());
    let pristine = tmp.path().join("pristine");
    copy_tree(&store, &pristine);

    for i in 4..8 {
        copy_tree(
            &root().join("corpora-demo"),
            &corpus.join(format!("copy{i}")),
        );
    }
    // How long the scan takes when left alone (on a copy of the store), and what it leaves.
    let probe = tmp.path().join("probe");
    copy_tree(&pristine, &probe);
    let started = Instant::now();
    finished(&mut scan_command(&probe, &corpus));
    let full = started.elapsed();
    let after = answers(&probe);
    assert_ne!(after.0.len(), before.0.len());

    // A kill lands before the new manifest is in place (the store must answer exactly as
    // before), or after it (exactly as an undisturbed scan): never anything in between.
    let mut mid_scan = 0;
    for seed in [0x9e37_79b9_7f4a_7c15u64, 7, 1234, 0xdead_beef] {
        std::fs::remove_dir_all(&store).unwrap();
        copy_tree(&pristine, &store);
        let mut state = seed;
        let fraction = 0.05 + 0.75 * (next(&mut state) % 1000) as f64 / 1000.0;
        let delay = full.mul_f64(fraction);
        let mut child = scan_command(&store, &corpus).spawn().unwrap();
        std::thread::sleep(delay);
        child.kill().unwrap(); // SIGKILL, or nothing if the scan has ended
        let status = child.wait().unwrap();
        let now = answers(&store);
        eprintln!(
            "seed {seed:#x}: killed after {delay:?} of {full:?} ({status}); store as before: {}",
            now == before
        );
        if now == before {
            assert_eq!(
                std::os::unix::process::ExitStatusExt::signal(&status),
                Some(9),
                "seed {seed:#x}: the scan ended without committing"
            );
            mid_scan += 1;
        } else {
            assert!(
                now == after,
                "seed {seed:#x}: killed after {delay:?} ({status}), the store answers neither as before nor as after the scan"
            );
        }
    }
    assert!(
        mid_scan >= 3,
        "only {mid_scan} of 4 kills landed before the scan committed (it took {full:?})"
    );
    // The next scan completes and leaves what an undisturbed scan leaves.
    let out = scan_command(&store, &corpus).output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let again = answers(&store);
    assert!(again.0 == after.0, "claims differ from an undisturbed scan");
    assert_eq!(again.1, after.1);
}

/// Start a scan of standard input that holds the store's lock until its input is closed.
fn scan_holding_the_lock(store: &Path) -> std::process::Child {
    use std::io::Write;
    let mut first = Command::new(assert_cmd::cargo::cargo_bin("hearsay"))
        .current_dir(root())
        .env_remove("HEARSAY_STORE")
        .arg("--store")
        .arg(store)
        .args(["-q", "--format", "json", "scan", "-"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    first
        .stdin
        .as_mut()
        .unwrap()
        .write_all(b"Heavy rain causes flooding in the valley.\n")
        .unwrap();
    // The lock file appears when the writer opens the store, which it does before it reads.
    let started = Instant::now();
    while !store.join("lock").exists() {
        assert!(
            started.elapsed() < Duration::from_secs(120),
            "the first scan never opened the store"
        );
        assert!(first.try_wait().unwrap().is_none(), "the first scan ended");
        std::thread::sleep(Duration::from_millis(50));
    }
    std::thread::sleep(Duration::from_millis(500));
    first
}

fn second_scan(store: &Path) -> std::process::Output {
    hearsay()
        .arg("--store")
        .arg(store)
        .args(["-q", "scan", "corpora-demo"])
        .output()
        .unwrap()
}

#[test]
fn a_second_scan_on_a_store_in_use_is_turned_away_and_the_first_completes() {
    use std::io::Write;
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    let mut first = scan_holding_the_lock(&store);
    let second = second_scan(&store);
    let stderr = String::from_utf8_lossy(&second.stderr);
    assert_eq!(second.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.starts_with("hearsay: error: ")
            && stderr.contains(&store.display().to_string())
            && stderr.contains("another scan is writing this store"),
        "{stderr}"
    );
    assert!(first.try_wait().unwrap().is_none(), "the first scan ended");
    {
        let mut input = first.stdin.take().unwrap();
        input.write_all(b"Drought reduces crop yields.\n").unwrap();
    }
    let out = first.wait_with_output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let summary: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(summary["claims"], 2, "{summary}");
    let claims = json_lines(&["claims"], &store);
    let pairs: Vec<(String, String)> = claims
        .iter()
        .map(|c| {
            (
                c["cause"]["key"].as_str().unwrap().to_string(),
                c["effect"]["key"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert_eq!(pairs.len(), 2, "{pairs:?}");
    assert!(pairs.iter().any(|(c, _)| c == "heavi rain"), "{pairs:?}");
    // With the lock released, the next scan goes ahead.
    let again = second_scan(&store);
    assert!(
        again.status.success(),
        "{}",
        String::from_utf8_lossy(&again.stderr)
    );
}

#[test]
fn the_lock_error_names_the_lock_file() {
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    let mut first = scan_holding_the_lock(&store);
    let second = second_scan(&store);
    drop(first.stdin.take());
    let _ = first.wait();
    let stderr = String::from_utf8_lossy(&second.stderr);
    assert!(
        stderr.contains(&store.join("lock").display().to_string())
            && stderr.contains("another scan"),
        "{stderr}"
    );
}
