//! The store: incremental re-scans, deletions, and surviving a scan killed mid-way.

use crate::common::*;
use serde_json::json;
use std::process::Stdio;
use std::time::Duration;

fn scan(corpus: &std::path::Path, store: &std::path::Path) -> serde_json::Value {
    let v = json_lines(&["scan", corpus.to_str().unwrap()], store);
    v.into_iter().next().expect("a summary line")
}

#[test]
fn second_scan_with_nothing_changed_reads_no_file() {
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    let first = scan(&root().join("corpora-demo"), &store);
    assert!(first["files_read"].as_u64().unwrap() >= 25, "{first}");
    let claims = first["claims"].as_u64().unwrap();
    assert!(claims > 0);
    let manifest_before = std::fs::read(store.join("manifest.json")).unwrap();
    let second = scan(&root().join("corpora-demo"), &store);
    assert_eq!(second["files_read"], 0, "{second}");
    assert_eq!(second["files_unchanged"], first["files_read"]);
    assert_eq!(second["claims"].as_u64().unwrap(), claims);
    assert_eq!(
        std::fs::read(store.join("manifest.json")).unwrap(),
        manifest_before,
        "an unchanged scan rewrites nothing"
    );
}

/// Claims read with one pattern set are never counted beside claims read with another: a scan
/// with other patterns re-reads every file, changed or not, and the next scan with the same
/// patterns reads none.
#[test]
fn scan_with_other_patterns_rereads_every_file() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    std::fs::write(corpus.join("a.txt"), "Heavy rain causes flooding.\n").unwrap();
    std::fs::write(corpus.join("b.txt"), "The harvest failed due to drought.\n").unwrap();
    let store = tmp.path().join("store");
    let first = scan(&corpus, &store);
    assert_eq!(
        (first["files_read"].as_u64(), first["claims"].as_u64()),
        (Some(2), Some(2)),
        "{first}"
    );
    // A pattern folder with the causal verbs only: "due to" is no cue there.
    let pats = tmp.path().join("patterns");
    std::fs::create_dir_all(pats.join("cues")).unwrap();
    std::fs::copy(
        root().join("patterns/cues/causal-verbs.toml"),
        pats.join("cues/causal-verbs.toml"),
    )
    .unwrap();
    let args = [
        "scan",
        "--patterns",
        pats.to_str().unwrap(),
        corpus.to_str().unwrap(),
    ];
    let second = json_lines(&args, &store).remove(0);
    assert_eq!(
        (
            second["files_read"].as_u64(),
            second["files_unchanged"].as_u64(),
            second["claims"].as_u64()
        ),
        (Some(2), Some(0), Some(1)),
        "{second}"
    );
    let third = json_lines(&args, &store).remove(0);
    assert_eq!(
        (third["files_read"].as_u64(), third["claims"].as_u64()),
        (Some(0), Some(1)),
        "{third}"
    );
    // Back to the built-in patterns: everything again.
    let fourth = scan(&corpus, &store);
    assert_eq!(
        (fourth["files_read"].as_u64(), fourth["claims"].as_u64()),
        (Some(2), Some(2)),
        "{fourth}"
    );
}

#[test]
fn rescan_rereads_changed_files_and_drops_deleted_ones() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    std::fs::write(corpus.join("a.txt"), "Heavy rain causes flooding.\n").unwrap();
    std::fs::write(corpus.join("b.txt"), "Drought reduces crop yields.\n").unwrap();
    std::fs::write(corpus.join("c.txt"), "Wind erosion lowers soil depth.\n").unwrap();
    let store = tmp.path().join("store");
    let first = scan(&corpus, &store);
    assert_eq!(first["claims"], 3, "{first}");
    // Same size, new content: the hash decides.
    std::thread::sleep(Duration::from_millis(20));
    std::fs::write(corpus.join("a.txt"), "Heavy rain causes mudslides.\n").unwrap();
    std::fs::remove_file(corpus.join("c.txt")).unwrap();
    let second = scan(&corpus, &store);
    assert_eq!(
        (
            second["files_read"].as_u64(),
            second["files_removed"].as_u64(),
            second["claims"].as_u64()
        ),
        (Some(1), Some(1), Some(2)),
        "{second}"
    );
    let claims = json_lines(&["claims"], &store);
    let effects: Vec<&str> = claims
        .iter()
        .map(|c| c["effect"]["text"].as_str().unwrap())
        .collect();
    assert_eq!(effects, ["mudslides", "crop yields"]);
    // The sentence index follows: the old sentence no longer counts as a co-mention.
    let pair = json_lines(&["pair", "heavy rain", "flooding"], &store);
    assert_eq!(pair[0]["forward"]["claims"], 0);
    assert_eq!(pair[0]["co_mentions"], 0);
}

fn big_corpus(dir: &std::path::Path, files: usize) {
    std::fs::create_dir_all(dir).unwrap();
    let para = "Heavy rain causes flooding in the valley. Drought reduces crop yields, which in turn raises food prices. \
                The committee met on Tuesday and discussed the budget at length without a decision. ";
    for i in 0..files {
        std::fs::write(dir.join(format!("doc{i:04}.txt")), para.repeat(200)).unwrap();
    }
}

#[test]
fn a_scan_killed_mid_way_leaves_the_last_complete_store() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    big_corpus(&corpus, 40);
    let store = tmp.path().join("store");
    let first = scan(&corpus, &store);
    let claims = first["claims"].as_u64().unwrap();
    assert!(claims > 1000);
    let pair_before = json_lines(&["pair", "heavy rain", "flooding"], &store);
    // Change every file, then kill scans at several points.
    for (round, delay) in [30u64, 120, 300, 600].into_iter().enumerate() {
        for i in 0..40 {
            std::fs::write(
                corpus.join(format!("doc{i:04}.txt")),
                format!("Round {round} note {i}. Soil erosion lowers yields. ").repeat(300),
            )
            .unwrap();
        }
        let mut child = std::process::Command::new(assert_cmd::cargo::cargo_bin("hearsay"))
            .args([
                "--quiet",
                "--store",
                store.to_str().unwrap(),
                "scan",
                corpus.to_str().unwrap(),
            ])
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(Duration::from_millis(delay));
        let _ = child.kill(); // SIGKILL
        let status = child.wait().unwrap();
        // Whether the scan finished or died, the store must answer, and answer consistently: the
        // claims it lists are the ones its manifest counts, and they are either all old or all new.
        let pair = json_lines(&["pair", "heavy rain", "flooding"], &store);
        let listed = json_lines(&["claims"], &store).len() as u64;
        let manifest: serde_json::Value =
            serde_json::from_slice(&std::fs::read(store.join("manifest.json")).unwrap()).unwrap();
        let counted: u64 = manifest["files"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f["claims"].as_u64().unwrap())
            .sum();
        assert_eq!(listed, counted, "round {round}");
        let old =
            pair[0]["forward"]["claims"] == pair_before[0]["forward"]["claims"] && listed == claims;
        let new = pair[0]["forward"]["claims"] == 0;
        assert!(old || new, "round {round} ({status}): store is neither the old nor a new one: {pair:?}, {listed} claims");
    }
    // And a final scan brings it up to date.
    let last = scan(&corpus, &store);
    assert_eq!(
        json_lines(&["claims"], &store).len() as u64,
        last["claims"].as_u64().unwrap()
    );
}

/// eLife articles (../shared/data/elife-articles, see its SOURCE.txt) as JSON Lines records.
fn elife_records(articles: &std::path::Path, picked: &[usize]) -> String {
    let names = sorted_files(articles);
    picked
        .iter()
        .map(|&i| text_record(&format!("a{i}"), &names[i]))
        .collect()
}

#[test]
fn a_changed_dump_drops_the_sentences_of_records_it_no_longer_has() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let dump = corpus.join("dump.jsonl");
    std::fs::write(&dump, elife_records(&articles, &[3, 40, 77])).unwrap();
    let store = tmp.path().join("store");
    scan(&corpus, &store);
    let pairs: Vec<(String, String)> = json_lines(&["top", "-n", "8"], &store)
        .iter()
        .map(|t| {
            (
                t["cause"].as_str().unwrap().into(),
                t["effect"].as_str().unwrap().into(),
            )
        })
        .collect();
    let co = |store: &std::path::Path| -> Vec<u64> {
        pairs
            .iter()
            .flat_map(|(c, e)| [(c.as_str(), e.as_str()), (e.as_str(), "cells")])
            .map(|(a, b)| {
                json_lines(&["pair", a, b], store)[0]["co_mentions"]
                    .as_u64()
                    .unwrap()
            })
            .collect()
    };
    let before = co(&store);
    // The last record goes; the file's size changes, so it is read again.
    std::fs::write(&dump, elife_records(&articles, &[3, 40])).unwrap();
    let again = scan(&corpus, &store);
    assert_eq!(again["files_read"], 1, "{again}");
    let fresh = tmp.path().join("fresh");
    scan(&corpus, &fresh);
    let after = co(&fresh);
    assert_ne!(
        before, after,
        "the dropped record held none of these co-mentions"
    );
    assert_eq!(
        co(&store),
        after,
        "sentences of the dropped record are still counted"
    );
}

/// What a store answers: its claims in order, the whole `top` table, and the co-mention counts
/// of its eight strongest pairs (from the sentence index). Standard input's path `-` is written
/// as `as_path`, so a store of piped text compares with one of the file.
fn store_answers(store: &std::path::Path, as_path: &str) -> Vec<String> {
    let mut v: Vec<String> = json_lines(&["claims"], store)
        .iter()
        .map(|c| c.to_string())
        .collect();
    let top = json_lines(&["top", "-n", "0"], store);
    v.extend(top.iter().map(|t| t.to_string()));
    for t in top.iter().take(8) {
        let (c, e) = (t["cause"].as_str().unwrap(), t["effect"].as_str().unwrap());
        let p = &json_lines(&["pair", c, e], store)[0];
        v.push(format!("{c} / {e}: {} co-mentions", p["co_mentions"]));
    }
    let (path, id) = (
        format!("\"path\":{}", json!(as_path)),
        format!("\"{as_path}#"),
    );
    v.iter()
        .map(|s| s.replace("\"path\":\"-\"", &path).replace("\"-#", &id))
        .collect()
}

/// The first place two stores' answers differ (the whole lists are too long to print).
fn first_difference(a: &[String], b: &[String]) -> String {
    match a.iter().zip(b).position(|(x, y)| x != y) {
        Some(i) => format!("answer {i}:\n{}\n{}", a[i], b[i]),
        None => format!("{} answers against {}", a.len(), b.len()),
    }
}

#[test]
fn a_large_input_whose_results_wait_on_disk_gives_the_same_store() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let dump = tmp.path().join("dump.jsonl");
    // About 1.5 MB of text: with --file-memory 1 its results go to disk more than once.
    let records = elife_records(&articles, &(0..36).collect::<Vec<_>>());
    assert!(records.len() > 1_400_000, "{}", records.len());
    std::fs::write(&dump, &records).unwrap();
    let dump_s = dump.to_str().unwrap();
    let held = tmp.path().join("held");
    json_lines(&["scan", dump_s], &held);
    let answers = store_answers(&held, dump_s);
    assert!(answers.len() > 500, "{}", answers.len());
    let co: Vec<&String> = answers
        .iter()
        .filter(|a| a.ends_with("co-mentions"))
        .collect();
    assert!(
        co.iter()
            .filter(|a| !a.ends_with(": 0 co-mentions"))
            .count()
            >= 6,
        "the index is read: {co:?}"
    );
    let spilled = tmp.path().join("spilled");
    json_lines(&["scan", "--file-memory", "1", dump_s], &spilled);
    let spilled = store_answers(&spilled, dump_s);
    assert!(
        spilled == answers,
        "{}",
        first_difference(&spilled, &answers)
    );
    // Standard input is streamed too (it was read whole, and refused over 1 GiB), hashed on
    // the way: the same content again is found unchanged.
    let piped = tmp.path().join("piped");
    let scan_stdin = || -> serde_json::Value {
        let out = succeeded(
            hearsay()
                .arg("--store")
                .arg(&piped)
                .args(["--format", "json", "scan", "--file-memory", "1", "-"])
                .write_stdin(records.clone()),
        );
        serde_json::from_slice(&out.stdout).unwrap()
    };
    let first = scan_stdin();
    assert_eq!(first["files_read"], 1, "{first}");
    let from_stdin = store_answers(&piped, dump_s);
    assert!(
        from_stdin == answers,
        "{}",
        first_difference(&from_stdin, &answers)
    );
    let again = scan_stdin();
    assert_eq!(
        (
            again["files_read"].as_u64(),
            again["files_unchanged"].as_u64()
        ),
        (Some(0), Some(1)),
        "{again}"
    );
    assert_eq!(again["claims"], first["claims"]);
}

#[test]
fn a_stream_that_breaks_part_way_keeps_what_the_store_had() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    use std::io::Write;
    let gzip = |records: &str| {
        let mut z = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
        z.write_all(records.as_bytes()).unwrap();
        z.finish().unwrap()
    };
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let dump = corpus.join("dump.jsonl.gz");
    std::fs::write(&dump, gzip(&elife_records(&articles, &[5, 6, 7]))).unwrap();
    let store = tmp.path().join("store");
    let dump_s = dump.to_str().unwrap();
    json_lines(&["scan", dump_s], &store);
    let before = store_answers(&store, dump_s);
    assert!(before.len() > 50, "{}", before.len());
    // A longer dump, cut off after more than a megabyte of its text has been read: what was
    // read of it went to disk (--file-memory 1) before the read failed.
    let long = gzip(&elife_records(&articles, &(0..36).collect::<Vec<_>>()));
    std::fs::write(&dump, &long[..long.len() * 9 / 10]).unwrap();
    let out = succeeded(hearsay().arg("--store").arg(&store).args([
        "--format",
        "json",
        "scan",
        "--file-memory",
        "1",
        dump_s,
    ]));
    let summary: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(summary["files_failed"], 1, "{summary}");
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("truncated compressed data"),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let after = store_answers(&store, dump_s);
    assert!(after == before, "{}", first_difference(&after, &before));
    let left: Vec<_> = std::fs::read_dir(&store)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| {
            let vocabulary = n.starts_with("vocabulary-") && n.ends_with(".json.zst");
            !(n.starts_with("seg-")
                || vocabulary
                || ["index", "lock", "manifest.json"].contains(&n.as_str()))
        })
        .collect();
    assert!(left.is_empty(), "left in the store: {left:?}");
}

/// Every file of a store (walked, whatever the layout holds), truncated to half or overwritten
/// with bytes that decode as nothing, in turn: the query commands either still answer or stop
/// with exit status 2 and an error that names the damaged file (or, for the search index, its
/// folder); never a panic.
#[test]
fn every_store_file_damaged_in_turn_gives_an_error_naming_it() {
    let tmp = tempfile::tempdir().unwrap();
    let good = demo_store_in(tmp.path());
    let top = json_lines(&["top", "-n", "1"], &good);
    let (x, y) = (
        top[0]["cause"].as_str().unwrap().to_string(),
        top[0]["effect"].as_str().unwrap().to_string(),
    );
    let mut files = Vec::new();
    let mut dirs = vec![good.clone()];
    while let Some(d) = dirs.pop() {
        for e in std::fs::read_dir(&d).unwrap().flatten() {
            if e.file_type().unwrap().is_dir() {
                dirs.push(e.path());
            } else if e.file_name() != "lock" && e.metadata().unwrap().len() > 0 {
                files.push(e.path().strip_prefix(&good).unwrap().to_path_buf());
            }
        }
    }
    files.sort();
    for ext in [".post", ".rows", ".agg", ".jsonl.zst", "manifest.json"] {
        assert!(
            files.iter().any(|f| f.to_string_lossy().ends_with(ext)),
            "no {ext} file in {files:?}"
        );
    }
    let commands: [&[&str]; 4] = [
        &["top", "-n", "5"],
        &["claims", "--cause", &x, "--limit", "5"],
        &["pair", &x, &y],
        &["conflicts"],
    ];
    let mut failures = 0;
    for rel in &files {
        let bytes = std::fs::read(good.join(rel)).unwrap();
        for damage in [bytes[..bytes.len() / 2].to_vec(), vec![0xff; bytes.len()]] {
            let store = tmp.path().join("damaged");
            let _ = std::fs::remove_dir_all(&store);
            copy_tree(&good, &store);
            std::fs::write(store.join(rel), &damage).unwrap();
            for args in commands {
                let out = hearsay()
                    .arg("--store")
                    .arg(&store)
                    .args(args)
                    .output()
                    .unwrap();
                let err = String::from_utf8_lossy(&out.stderr);
                let code = out.status.code();
                assert!(
                    code == Some(0) || code == Some(2),
                    "{} damaged, {args:?}: exit {code:?}\n{err}",
                    rel.display()
                );
                if code == Some(2) {
                    failures += 1;
                    let named = rel.file_name().unwrap().to_string_lossy();
                    let in_index = rel.starts_with("index");
                    assert!(
                        err.contains(&*named) || (in_index && err.contains("index")),
                        "{} damaged, {args:?}: the error does not name it:\n{err}",
                        rel.display()
                    );
                }
            }
        }
    }
    assert!(failures > 0, "no damage was noticed at all");
}

/// Scan, change one file and delete another, re-scan: every query reads the same answers as a
/// fresh scan of the corpus as it now is (the re-scanned store keeps the old segment, whose
/// postings still list the changed file's old rows: the manifest must leave them out, and the
/// old segment's aggregate tables are rebuilt from its live rows).
#[test]
fn a_rescanned_store_answers_every_query_as_a_fresh_scan() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    copy_tree(&root().join("corpora-demo"), &corpus);
    let store = tmp.path().join("store");
    scan(&corpus, &store);
    let top = json_lines(&["top", "-n", "3"], &store);
    let x = top[0]["cause"].as_str().unwrap().to_string();
    let y = top[0]["effect"].as_str().unwrap().to_string();
    // Change the first file that states the top relation, and delete the last file.
    let claims = json_lines(&["claims", "--cause", &x], &store);
    let changed = corpus.join(
        std::path::Path::new(claims[0]["source"]["path"].as_str().unwrap())
            .strip_prefix(corpus.to_str().unwrap())
            .unwrap_or_else(|_| {
                std::path::Path::new(claims[0]["source"]["path"].as_str().unwrap())
            }),
    );
    assert!(changed.exists(), "{}", changed.display());
    std::thread::sleep(Duration::from_millis(20));
    let mut text = std::fs::read_to_string(&changed).unwrap();
    text = text.replacen(&x, "the weather", 1);
    text.push_str(&format!("\n\nIn this account {x} does not reduce {y}.\n"));
    std::fs::write(&changed, text).unwrap();
    let files: Vec<_> = sorted_files(&corpus.join("faq"))
        .into_iter()
        .filter(|f| f.is_file())
        .collect();
    let gone = files.last().unwrap();
    assert_ne!(gone, &changed);
    std::fs::remove_file(gone).unwrap();
    let again = scan(&corpus, &store);
    assert_eq!(again["files_read"], 1, "{again}");
    assert_eq!(again["files_removed"], 1, "{again}");
    let fresh = tmp.path().join("fresh");
    scan(&corpus, &fresh);
    let vars = tmp.path().join("vars.txt");
    std::fs::write(&vars, format!("{x}\n{y}\nthe weather\n")).unwrap();
    let vars = vars.to_str().unwrap();
    let answers = |s: &std::path::Path| -> Vec<Vec<u8>> {
        let q: [&[&str]; 14] = [
            &["top", "-n", "0"],
            &["conflicts"],
            &["cycles"],
            &["graph", "--to", "graphml"],
            &["graph", "--to", "json", "--weight-by", "sentences"],
            &["matrix", "--vars", vars],
            &["report"],
            &["conflicts", "--limit", "0", "--min-confidence", "0"],
            &["claims"],
            &["claims", "--cause", &x],
            &["claims", "--var", &y],
            &["pair", &x, &y],
            &["pair", &y, "the weather"],
            &["paths", &x, &y],
        ];
        q.iter()
            .map(|args| {
                let out = hearsay()
                    .arg("--store")
                    .arg(s)
                    .args(["--format", "json"])
                    .args(*args)
                    .output()
                    .unwrap();
                // `pair` exits 3 for a name that is no variable (here "the weather"), with its
                // report on stdout all the same.
                let unknown_name = args[0] == "pair" && out.status.code() == Some(3);
                assert!(
                    out.status.success() || unknown_name,
                    "{args:?}: {}",
                    String::from_utf8_lossy(&out.stderr)
                );
                out.stdout
            })
            .collect()
    };
    let (a, b) = (answers(&store), answers(&fresh));
    for (i, (a, b)) in a.iter().zip(&b).enumerate() {
        assert_eq!(
            String::from_utf8_lossy(a),
            String::from_utf8_lossy(b),
            "query {i} differs"
        );
    }
}

/// A store of an older layout (version 7: the search index's document store lz4, not zstd) is refused by
/// every query with its version named and a request to scan again; never read in part.
#[test]
fn a_store_of_an_older_layout_asks_for_a_rescan_naming_its_version() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let mpath = store.join("manifest.json");
    let mut m: serde_json::Value = serde_json::from_slice(&std::fs::read(&mpath).unwrap()).unwrap();
    assert_eq!(m["store_version"], 8);
    m["store_version"] = json!(7);
    std::fs::write(&mpath, serde_json::to_vec(&m).unwrap()).unwrap();
    for args in [
        &["top"][..],
        &["pair", "a", "b"],
        &["claims", "--cause", "a"],
    ] {
        let out = hearsay()
            .arg("--store")
            .arg(&store)
            .args(args)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(
            err.contains("schema 7") && err.contains("reads 8") && err.contains("rescan"),
            "{args:?}: {err}"
        );
    }
}
