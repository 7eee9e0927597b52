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

/// Expected counts come from corpora-demo/EXPECTED.md (invented data, written with the corpus).
#[test]
fn top_relations_match_the_demo_corpus_design() {
    let (_t, store) = demo_store();
    let rows = json_lines(&["top", "-n", "0"], &store);
    let find = |c: &str, e: &str| {
        rows.iter()
            .find(|r| r["cause"] == c && r["effect"] == e)
            .unwrap_or_else(|| panic!("{c} -> {e} missing: {rows:?}"))
            .clone()
    };
    let r = find("fertiliser runoff", "algae blooms");
    assert_eq!(
        (
            r["claims"].as_u64(),
            r["documents"].as_u64(),
            r["hedged"].as_u64()
        ),
        (Some(15), Some(12), Some(1))
    );
    let r = find("mussel density", "water clarity");
    assert_eq!(
        (r["claims"].as_u64(), r["documents"].as_u64()),
        (Some(8), Some(7))
    );
    let r = find("mussel density", "fish stocks");
    assert_eq!(
        (
            r["claims"].as_u64(),
            r["negated"].as_u64(),
            r["asserted"].as_u64()
        ),
        (Some(6), Some(4), Some(0))
    );
    let r = find("buffer strips", "fertiliser runoff");
    assert_eq!(
        (r["claims"].as_u64(), r["sign"].as_str()),
        // Prevent counts as decrease in an edge's sign (docs/graph.md).
        (Some(4), Some("decrease"))
    );
    let r = find("tourism revenue", "boat traffic");
    assert_eq!(r["claims"], 2);
    // The association-only pair is never a causal edge.
    let assoc: Vec<_> = rows.iter().filter(|r| r["kind"] == "association").collect();
    assert_eq!(assoc.len(), 1, "{assoc:?}");
    assert_eq!(assoc[0]["claims"], 3);
    assert!(!rows
        .iter()
        .any(|r| r["kind"] == "causal" && r["cause"] == "fish stocks"));
}

#[test]
fn pair_counts_associations_and_co_mentions() {
    let (_t, store) = demo_store();
    let p = &json_lines(&["pair", "fish stocks", "water clarity"], &store)[0];
    assert_eq!(
        (
            p["forward"]["claims"].as_u64(),
            p["backward"]["claims"].as_u64(),
            p["association"]["claims"].as_u64()
        ),
        (Some(0), Some(0), Some(3))
    );
    assert!(p["direction_ratio"].is_null());
    // Heron sightings and reed beds are only ever mentioned together (4 sentences).
    let p = &json_lines(&["pair", "heron sightings", "reed beds"], &store)[0];
    assert_eq!(p["co_mentions"], 4, "{p}");
    // Both directions are stated for boat traffic and tourism revenue.
    let p = &json_lines(&["pair", "boat traffic", "tourism revenue"], &store)[0];
    assert_eq!(
        (
            p["forward"]["claims"].as_u64(),
            p["backward"]["claims"].as_u64()
        ),
        (Some(4), Some(2))
    );
    assert!((p["direction_ratio"].as_f64().unwrap() - 4.0 / 6.0).abs() < 1e-9);
}

#[test]
fn extract_gives_the_same_claims_as_scan() {
    let (_t, store) = demo_store();
    let out = hearsay()
        .args(["extract", "corpora-demo"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let mut extracted: Vec<String> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(str::to_string)
        .collect();
    let mut stored: Vec<String> = json_lines(&["claims"], &store)
        .iter()
        .map(|v| serde_json::to_string(v).unwrap())
        .collect();
    let norm = |v: &mut Vec<String>| {
        for s in v.iter_mut() {
            *s = serde_json::to_string(&serde_json::from_str::<serde_json::Value>(s).unwrap())
                .unwrap();
        }
        v.sort();
    };
    norm(&mut extracted);
    norm(&mut stored);
    // 72: "detection limit 0.01 mg" gives no claim (an amount is no variable).
    assert_eq!(extracted.len(), 72);
    assert_eq!(extracted, stored);
}

#[test]
fn explain_says_why_no_claim_resulted() {
    let out = hearsay()
        .args([
            "--format",
            "table",
            "explain",
            "If it rains, something will cause shoreline erosion.",
        ])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("no claim: a span has no content word"),
        "{text}"
    );
    assert!(text.contains("conditional on \"if\""), "{text}");
    // A pronoun slot says what it was resolved to.
    let out = hearsay()
        .args([
            "--format",
            "table",
            "explain",
            "If boat traffic rises, it will cause shoreline erosion.",
        ])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("\"it\" resolved to \"boat traffic\""),
        "{text}"
    );
    let out = hearsay()
        .args(["--format", "table", "explain", "The cat sat on the mat."])
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).contains("no cue word found"));
}

#[test]
fn a_malformed_pattern_file_is_reported_with_file_and_line() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::create_dir_all(tmp.path().join("cues")).unwrap();
    std::fs::write(tmp.path().join("cues/mine.toml"), "[[cue]]\nid = \"x\"\npattern = \"CAUSE cause~\"\nkind = \"causal\"\npolarity = \"unsigned\"\nexamples = [{text = \"a causes b\", cause = \"a\", effect = \"b\"}]\n").unwrap();
    let out = hearsay()
        .arg("--patterns")
        .arg(tmp.path())
        .args(["patterns", "check"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains(
            "mine.toml:1: cue 'x': pattern \"CAUSE cause~\" must contain CAUSE and EFFECT"
        ),
        "{err}"
    );
}

#[test]
fn binary_and_bad_utf8_files_are_warnings_not_failures_of_the_run() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("c");
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("bin.txt"), b"\x00\x01\x02 binary causes trouble").unwrap();
    std::fs::write(dir.join("latin.txt"), b"Caf\xe9 noise causes stress.\n").unwrap();
    std::fs::write(dir.join("ok.txt"), "Heavy rain causes flooding.\n").unwrap();
    let out = hearsay()
        .arg("--store")
        .arg(tmp.path().join("s"))
        .args(["--format", "json", "scan"])
        .arg(&dir)
        .output()
        .unwrap();
    assert!(out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bin.txt: binary file"), "{err}");
    assert!(
        err.contains("latin.txt: not UTF-8, decoded as Latin-1"),
        "{err}"
    );
    let s: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(
        (s["files_failed"].as_u64(), s["claims"].as_u64()),
        (Some(1), Some(2)),
        "{s}"
    );
    let strict = hearsay()
        .arg("--store")
        .arg(tmp.path().join("s2"))
        .args(["--quiet", "scan", "--strict"])
        .arg(&dir)
        .output()
        .unwrap();
    assert_eq!(strict.status.code(), Some(1));
}

#[test]
fn stdin_is_read_with_a_dash() {
    let out = hearsay()
        .args(["extract", "-"])
        .write_stdin("Drought reduces crop yields.\n")
        .output()
        .unwrap();
    let line = String::from_utf8(out.stdout).unwrap();
    let v: serde_json::Value = serde_json::from_str(line.trim()).unwrap();
    assert_eq!(
        (v["source"]["path"].as_str(), v["polarity"].as_str()),
        (Some("-"), Some("decrease"))
    );
}
