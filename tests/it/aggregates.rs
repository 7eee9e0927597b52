//! The store's aggregate tables: every command that reads them (no filter) answers exactly as
//! the same command reading every claim row (`--min-confidence 0`, a filter that keeps every
//! claim and so takes the row path), with no alias file, with one that merges variables, and
//! with one that merges the two ends of a stated edge into one variable. On the demo corpus (a
//! behaviour guard, invented data) and on eLife articles (../shared/data/elife-articles, see its
//! SOURCE.txt).

use crate::common::*;
use std::path::Path;

fn run(store: &Path, args: &[&str]) -> Vec<u8> {
    let out = hearsay()
        .arg("--store")
        .arg(store)
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.code() == Some(0),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out.stdout
}

/// Every aggregate-reading command, with and without `--min-confidence 0`, under each alias
/// file: the answers must be byte for byte the same. Returns how many answers were compared.
fn aggregates_answer_as_rows(store: &Path, tmp: &Path) -> usize {
    let top = json_lines(&["top", "-n", "0"], store);
    let causal: Vec<(String, String)> = top
        .iter()
        .filter(|r| r["kind"] == "causal")
        .map(|r| {
            (
                r["cause"].as_str().unwrap().to_string(),
                r["effect"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert!(
        causal.len() >= 4,
        "too few causal relations: {}",
        causal.len()
    );
    let (x, y) = causal[0].clone();
    let (u, v) = causal[3].clone();
    // Merge two variables of different relations, and the two ends of one stated edge.
    let merging = tmp.join("merging.tsv");
    std::fs::write(&merging, format!("{u}\t{x}\n{v}\t{y}\n")).unwrap();
    let self_loop = tmp.join("self-loop.tsv");
    std::fs::write(&self_loop, format!("{y}\t{x}\n")).unwrap();
    let vars = tmp.join("vars.txt");
    std::fs::write(&vars, format!("{x}\n{y}\n{u}\n{v}\n")).unwrap();
    let vars = vars.to_str().unwrap();
    let mut compared = 0;
    for aliases in [None, Some(&merging), Some(&self_loop)] {
        let mut alias_opt: Vec<&str> = Vec::new();
        if let Some(a) = aliases {
            alias_opt = vec!["--aliases", a.to_str().unwrap()];
        }
        let queries: [&[&str]; 12] = [
            &["--format", "json", "top", "-n", "0"],
            &["--format", "table", "top", "-n", "0"],
            &[
                "--format",
                "json",
                "conflicts",
                "--limit",
                "0",
                "--evidence",
                "3",
            ],
            &["--format", "table", "conflicts", "--limit", "0"],
            &[
                "--format",
                "json",
                "cycles",
                "--limit",
                "0",
                "--evidence",
                "3",
            ],
            &["--format", "graphml", "graph"],
            &["--format", "json", "graph", "--weight-by", "sentences"],
            &["--format", "dot", "graph", "--weight-by", "mentions"],
            &["matrix", "--vars", vars],
            &["matrix", "--vars", vars, "--cell", "documents"],
            &["--format", "json", "paths", &u, &y, "--max-hops", "4"],
            &["report", "--rows", "500", "--edges", "60"],
        ];
        for q in queries {
            let args: Vec<&str> = alias_opt.iter().chain(q).copied().collect();
            let from_aggregates = run(store, &args);
            let mut filtered = args.clone();
            filtered.extend(["--min-confidence", "0"]);
            let from_rows = run(store, &filtered);
            assert!(
                !from_rows.is_empty() || q[0] == "--format",
                "{args:?}: no output"
            );
            assert_eq!(
                String::from_utf8_lossy(&from_aggregates),
                String::from_utf8_lossy(&from_rows),
                "{args:?}: the aggregate tables and the rows answer differently"
            );
            compared += 1;
        }
    }
    compared
}

#[test]
fn aggregate_tables_answer_as_the_rows_on_the_demo_corpus() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    assert_eq!(aggregates_answer_as_rows(&store, tmp.path()), 36);
}

#[test]
fn aggregate_tables_answer_as_the_rows_on_elife_articles() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    // Sixty articles in two files of JSON Lines records, scanned as two segments (the second
    // file added by a re-scan), so the answers combine two segments' tables.
    let names = sorted_files(&articles);
    let records = |range: std::ops::Range<usize>| -> String {
        range
            .map(|i| text_record(&format!("a{i}"), &names[i]))
            .collect()
    };
    std::fs::write(corpus.join("one.jsonl"), records(0..30)).unwrap();
    let store = tmp.path().join("store");
    scan_quietly(&store, &corpus);
    std::fs::write(corpus.join("two.jsonl"), records(30..60)).unwrap();
    scan_quietly(&store, &corpus);
    let aggs = aggregate_files(&store);
    assert_eq!(
        aggs.len(),
        3,
        "one table a segment and the summed one: {aggs:?}"
    );
    assert_eq!(aggregates_answer_as_rows(&store, tmp.path()), 36);
}

/// The aggregate tables of a store (segments' `seg-*.agg` and the summed `summed.*.agg`).
fn aggregate_files(store: &Path) -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(store)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".agg"))
        .collect();
    names.sort();
    names
}

/// A store grown over several scans (files added one at a time, then one changed and one
/// deleted) holds several segments and reads their summed table: every aggregate query, with
/// and without an alias file that merges variables, answers byte for byte as a fresh scan of
/// the corpus as it now is, which has one segment and no summed table. On eLife articles
/// (../shared/data/elife-articles, see its SOURCE.txt).
#[test]
fn a_store_of_several_segments_answers_as_a_fresh_one_segment_scan() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let names = sorted_files(&articles);
    let records = |range: std::ops::Range<usize>| -> String {
        range
            .map(|i| text_record(&format!("a{i}"), &names[i]))
            .collect()
    };
    let store = tmp.path().join("store");
    for part in 0..4 {
        let file = corpus.join(format!("part{part}.jsonl"));
        std::fs::write(file, records(part * 15..part * 15 + 15)).unwrap();
        scan_quietly(&store, &corpus);
    }
    let summed = |s: &Path| {
        aggregate_files(s)
            .into_iter()
            .filter(|n| n.starts_with("summed."))
    };
    assert_eq!(summed(&store).count(), 1, "{:?}", aggregate_files(&store));
    // A changed file and a deleted one leave every aggregate.
    std::fs::write(corpus.join("part1.jsonl"), records(60..70)).unwrap();
    std::fs::remove_file(corpus.join("part2.jsonl")).unwrap();
    scan_quietly(&store, &corpus);
    let tables = aggregate_files(&store);
    assert_eq!(tables.len(), 4, "three segments and their sum: {tables:?}");
    let fresh = tmp.path().join("fresh");
    scan_quietly(&fresh, &corpus);
    assert_eq!(summed(&fresh).count(), 0, "one segment needs no sum");

    let top = json_lines(&["top", "-n", "0"], &fresh);
    let causal: Vec<(String, String)> = top
        .iter()
        .filter(|r| r["kind"] == "causal")
        .map(|r| {
            (
                r["cause"].as_str().unwrap().to_string(),
                r["effect"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert!(causal.len() >= 4, "too few causal relations");
    let ((x, y), (u, v)) = (causal[0].clone(), causal[3].clone());
    let merging = tmp.path().join("merging.tsv");
    std::fs::write(&merging, format!("{u}\t{x}\n{v}\t{y}\n")).unwrap();
    let vars = tmp.path().join("vars.txt");
    std::fs::write(&vars, format!("{x}\n{y}\n{u}\n{v}\n")).unwrap();
    let (merging, vars) = (merging.to_str().unwrap(), vars.to_str().unwrap());
    let queries: [&[&str]; 11] = [
        &["--format", "json", "top", "-n", "0"],
        &["--format", "table", "top", "-n", "0"],
        &[
            "--format",
            "json",
            "conflicts",
            "--limit",
            "0",
            "--evidence",
            "3",
        ],
        &[
            "--format",
            "json",
            "cycles",
            "--limit",
            "0",
            "--evidence",
            "3",
        ],
        &["--format", "graphml", "graph"],
        &["--format", "json", "graph", "--weight-by", "sentences"],
        &["matrix", "--vars", vars, "--cell", "documents"],
        &["--format", "json", "paths", &u, &y, "--max-hops", "4"],
        &["report", "--rows", "500", "--edges", "60"],
        &["--format", "json", "pair", &x, &y],
        &["--format", "json", "claims", "--cause", &x],
    ];
    for aliases in [&[][..], &["--aliases", merging][..]] {
        for q in queries {
            let args: Vec<&str> = aliases.iter().chain(q).copied().collect();
            let (grown, one) = (run(&store, &args), run(&fresh, &args));
            // Fifty articles state no cycle and no path from u to y; every other answer has
            // something in it.
            let maybe_empty = q.contains(&"cycles") || q.contains(&"paths");
            assert!(maybe_empty || !one.is_empty(), "{args:?}: no output");
            assert_eq!(
                String::from_utf8_lossy(&grown),
                String::from_utf8_lossy(&one),
                "{args:?}: the grown store and a fresh scan answer differently"
            );
        }
    }
}
