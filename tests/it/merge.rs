//! `merge`: a store built from `extract --sentences` shards equals a `scan` of the same files.
//! The documents are eLife articles (../shared/data/elife-articles, see its SOURCE.txt).

use crate::common::*;
use std::path::Path;

fn out(args: &[&str], store: &Path) -> String {
    json_lines(args, store)
        .iter()
        .map(|v| v.to_string())
        .collect::<Vec<_>>()
        .join("\n")
}

fn sorted_claims(store: &Path) -> Vec<String> {
    let mut v: Vec<String> = json_lines(&["claims"], store)
        .iter()
        .map(|c| c.to_string())
        .collect();
    v.sort();
    v
}

#[test]
fn merged_shards_equal_a_scan_claim_for_claim_and_count_for_count() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let mut names: Vec<_> = std::fs::read_dir(&articles)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    names.sort();
    for p in names.iter().take(12) {
        std::fs::copy(p, corpus.join(p.file_name().unwrap())).unwrap();
    }
    let scanned = tmp.path().join("scanned");
    json_lines(&["scan", corpus.to_str().unwrap()], &scanned);
    // Three shards, as three map tasks would write them; the last one arrives on stdin.
    let mut shards = Vec::new();
    for (i, chunk) in names
        .iter()
        .take(12)
        .collect::<Vec<_>>()
        .chunks(4)
        .enumerate()
    {
        let mut cmd = hearsay();
        cmd.args(["-q", "extract", "--sentences"]);
        for p in chunk {
            cmd.arg(corpus.join(p.file_name().unwrap()));
        }
        let o = cmd.output().unwrap();
        assert!(o.status.success());
        let shard = tmp.path().join(format!("shard-{i}.jsonl"));
        std::fs::write(&shard, &o.stdout).unwrap();
        shards.push(shard);
    }
    let merged = tmp.path().join("merged");
    let last = std::fs::read(&shards[2]).unwrap();
    hearsay()
        .arg("--store")
        .arg(&merged)
        .arg("merge")
        .arg(&shards[0])
        .arg(&shards[1])
        .arg("-")
        .write_stdin(last)
        .assert()
        .success();
    let claims = sorted_claims(&scanned);
    assert!(claims.len() > 100, "{}", claims.len());
    assert_eq!(claims, sorted_claims(&merged));
    let top = out(&["top", "-n", "0"], &scanned);
    assert_eq!(top, out(&["top", "-n", "0"], &merged));
    // Co-mention counts come from the sentence index, so they check the sentence records.
    let first = &json_lines(&["top", "-n", "5"], &scanned);
    let mut co = 0;
    for t in first {
        let (c, e) = (t["cause"].as_str().unwrap(), t["effect"].as_str().unwrap());
        let a = json_lines(&["pair", c, e], &scanned);
        assert_eq!(a, json_lines(&["pair", c, e], &merged));
        co += a[0]["co_mentions"].as_u64().unwrap();
        let b = json_lines(&["pair", e, "cells"], &scanned);
        assert_eq!(b, json_lines(&["pair", e, "cells"], &merged));
        co += b[0]["co_mentions"].as_u64().unwrap();
    }
    assert!(co > 0, "no co-mention was compared");
    let totals = |s: &Path| {
        let m: serde_json::Value =
            serde_json::from_slice(&std::fs::read(s.join("manifest.json")).unwrap()).unwrap();
        m["files"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| {
                (
                    f["path"].clone(),
                    f["documents"].clone(),
                    f["sentences"].clone(),
                    f["claims"].clone(),
                )
            })
            .collect::<Vec<_>>()
    };
    assert_eq!(totals(&scanned), totals(&merged));
}

#[test]
fn merge_names_the_shard_and_line_of_a_bad_record() {
    let tmp = tempfile::tempdir().unwrap();
    let shard = tmp.path().join("bad.jsonl");
    std::fs::write(&shard, "\n{\"not\": \"a record\"}\n").unwrap();
    let o = hearsay()
        .arg("--store")
        .arg(tmp.path().join("s"))
        .arg("merge")
        .arg(&shard)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("bad.jsonl:2:"), "{err}");
}
