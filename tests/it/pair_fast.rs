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

/// `claims --cause/--effect/--var` reads only the rows its postings name; its output must be the
/// whole `claims` list filtered by the same keys, in the same order (invented demo data, a
/// behaviour guard), with aliases and a claim filter.
#[test]
fn claims_of_a_variable_from_postings_equal_the_filtered_whole_list() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let aliases = tmp.path().join("aliases.tsv");
    std::fs::write(
        &aliases,
        "algal bloom\talgae bloom\nthe runoff\tfertiliser runoff\n",
    )
    .unwrap();
    let alias_opt = ["--aliases", aliases.to_str().unwrap(), "--format", "json"];
    let all: Vec<serde_json::Value> = pair_output(&store, &[&alias_opt[..], &["claims"]].concat())
        .split(|b| *b == b'\n')
        .filter(|l| !l.is_empty())
        .map(|l| serde_json::from_slice(l).unwrap())
        .collect();
    assert!(all.len() > 50, "{}", all.len());
    // The key of a name as the store resolves it: the key of the claim the name was read from.
    let key_of = |text: &str| -> String {
        let hit = all
            .iter()
            .flat_map(|c| [&c["cause"], &c["effect"]])
            .find(|s| s["text"] == text)
            .unwrap_or_else(|| panic!("no claim names {text}"));
        hit["key"].as_str().unwrap().to_string()
    };
    let resolve = |k: String| match k.as_str() {
        "algal bloom" => "algae bloom".to_string(),
        "runoff" => "fertiliser runoff".to_string(),
        _ => k,
    };
    let names: Vec<String> = all
        .iter()
        .take(40)
        .step_by(8)
        .map(|c| c["cause"]["text"].as_str().unwrap().to_string())
        .collect();
    let mut compared = 0;
    for name in &names {
        let key = resolve(key_of(name));
        for (flag, side) in [("--cause", 0), ("--effect", 1), ("--var", 2)] {
            let expect: Vec<String> = all
                .iter()
                .filter(|c| {
                    let (ce, ef) = (
                        resolve(c["cause"]["key"].as_str().unwrap().into()),
                        resolve(c["effect"]["key"].as_str().unwrap().into()),
                    );
                    // The graph leaves out a claim whose two sides are one variable.
                    ce != ef
                        && match side {
                            0 => ce == key,
                            1 => ef == key,
                            _ => ce == key || ef == key,
                        }
                })
                .map(|c| c.to_string())
                .collect();
            let got: Vec<String> =
                pair_output(&store, &[&alias_opt[..], &["claims", flag, name]].concat())
                    .split(|b| *b == b'\n')
                    .filter(|l| !l.is_empty())
                    .map(|l| {
                        serde_json::from_slice::<serde_json::Value>(l)
                            .unwrap()
                            .to_string()
                    })
                    .collect();
            assert_eq!(got, expect, "claims {flag} {name}");
            compared += got.len();
        }
    }
    assert!(compared > 10, "{compared}");
}
