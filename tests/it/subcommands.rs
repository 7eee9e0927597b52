//! Subcommands over the demo corpus (invented data: corpora-demo/EXPECTED.md lists what it states).

use crate::common::*;

fn demo_store() -> (tempfile::TempDir, std::path::PathBuf) {
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    json_lines(&["scan", "corpora-demo"], &store);
    (tmp, store)
}

#[test]
fn patterns_check_runs_every_example() {
    let out = hearsay().args(["patterns", "check"]).output().unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "{text}");
    assert!(text.contains(", 0 failed"), "{text}");
}

#[test]
fn pair_reports_both_directions_with_evidence() {
    let (_t, store) = demo_store();
    let p = &json_lines(&["pair", "Fertiliser runoff", "the algae bloom"], &store)[0];
    assert_eq!(p["x"]["known"], true);
    assert!(p["forward"]["claims"].as_u64().unwrap() >= 10, "{p}");
    assert_eq!(p["backward"]["claims"], 0);
    assert_eq!(p["direction_ratio"], 1.0);
    assert!(!p["evidence"].as_array().unwrap().is_empty());
}
