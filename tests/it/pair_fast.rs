//! `pair` builds its graph from the rows naming X or Y only; this checks that its output is
//! byte-identical to the report over the whole graph (`--whole-graph`), on the invented demo
//! corpus (a behaviour guard, invented data), in every output format, with filters and aliases.

use crate::common::*;
use std::path::Path;

fn pair_output(store: &Path, args: &[&str]) -> Vec<u8> {
    let out = hearsay()
        .arg("--store")
        .arg(store)
        .args(args)
        .output()
        .expect("runs");
    // 3 is the answer for a name that is no variable (one of the pairs below has one).
    assert!(
        matches!(out.status.code(), Some(0 | 3)),
        "hearsay {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out.stdout
}

#[test]
fn pair_from_selected_rows_equals_pair_over_the_whole_graph() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let aliases = tmp.path().join("aliases.tsv");
    std::fs::write(
        &aliases,
        "algal bloom\talgae bloom\nthe runoff\tfertiliser runoff\n",
    )
    .unwrap();
    // The four most-stated relations, plus an unknown variable, one pair twice over, a pair with
    // co-mentions and no claim, and a pair stated both ways.
    let mut pairs: Vec<(String, String)> = json_lines(&["top", "-n", "4"], &store)
        .iter()
        .map(|r| {
            (
                r["cause"].as_str().unwrap().to_string(),
                r["effect"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert_eq!(pairs.len(), 4);
    for (x, y) in [
        ("fertiliser runoff", "no such variable"),
        ("algae blooms", "algae blooms"),
        ("heron sightings", "reed beds"),
        ("tourism revenue", "boat traffic"),
        ("the runoff", "algal blooms"),
    ] {
        pairs.push((x.into(), y.into()));
    }
    let alias_opt = ["--aliases", aliases.to_str().unwrap()];
    let runs: [(&[&str], &[&str]); 6] = [
        (&["--format", "json"], &[]),
        (&["--format", "csv"], &[]),
        (&["--format", "table"], &[]),
        (&alias_opt, &[]),
        (&["--format", "json"], &["--modality", "hedged"]),
        (
            &["--format", "json"],
            &["--evidence", "10", "--min-confidence", "0.5"],
        ),
    ];
    let mut compared = 0;
    // Every pair in JSON; every option on three of them (each run costs a process start).
    for (i, (x, y)) in pairs.iter().enumerate() {
        let all = [0, 4, 8].contains(&i);
        for (opts, tail) in runs.into_iter().take(if all { runs.len() } else { 1 }) {
            let mut fast: Vec<&str> = opts.to_vec();
            fast.extend_from_slice(&["pair", x, y]);
            fast.extend_from_slice(tail);
            let mut whole = fast.clone();
            whole.push("--whole-graph");
            let (a, b) = (pair_output(&store, &fast), pair_output(&store, &whole));
            assert!(!a.is_empty());
            assert_eq!(
                String::from_utf8_lossy(&a),
                String::from_utf8_lossy(&b),
                "{fast:?}"
            );
            compared += 1;
        }
    }
    assert_eq!(compared, pairs.len() + 3 * (runs.len() - 1));
}
