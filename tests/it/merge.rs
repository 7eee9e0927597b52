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
    let names = sorted_files(&articles);
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
        let mut args = vec![std::ffi::OsString::from("--sentences")];
        args.extend(
            chunk
                .iter()
                .map(|p| corpus.join(p.file_name().unwrap()).into()),
        );
        let shard = tmp.path().join(format!("shard-{i}.jsonl"));
        std::fs::write(&shard, extract_output(&args, None)).unwrap();
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
    // The vocabulary comes through the same writer calls: the same abbreviations, and the same
    // graph counted at the head level.
    let abbreviations = out(&["variables", "--abbreviations", "-n", "0"], &scanned);
    assert!(abbreviations.contains("\"short\""), "{abbreviations}");
    assert_eq!(
        abbreviations,
        out(&["variables", "--abbreviations", "-n", "0"], &merged)
    );
    let heads = out(&["--roll-up", "heads", "top", "-n", "0"], &scanned);
    assert_ne!(heads, top, "the roll-up changes the counts");
    assert_eq!(
        heads,
        out(&["--roll-up", "heads", "top", "-n", "0"], &merged)
    );
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

/// The standard output of `hearsay -q extract ARGS...`, fed `stdin` if given; it must succeed.
fn extract_output<S: AsRef<std::ffi::OsStr>>(args: &[S], stdin: Option<&str>) -> Vec<u8> {
    let mut cmd = hearsay();
    cmd.args(["-q", "extract"]).args(args);
    if let Some(s) = stdin {
        cmd.write_stdin(s.to_string());
    }
    succeeded(&mut cmd).stdout
}

/// Drop the `begin_file` records, as shards of older hearsay versions lack them.
fn without_begin_records(shard: &[u8]) -> Vec<u8> {
    let text = String::from_utf8(shard.to_vec()).unwrap();
    let mut out = String::new();
    for l in text.lines().filter(|l| !l.starts_with("{\"begin_file\"")) {
        out.push_str(l);
        out.push('\n');
    }
    out.into_bytes()
}

#[test]
fn a_path_split_across_shards_merges_in_order_with_older_shards_too() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let names = sorted_files(&articles);
    // Standard input of six articles as records, split in two partitions (both get the path
    // `-`), with a text file's shard between them.
    let records: Vec<String> = names[20..26]
        .iter()
        .map(|p| text_record(&stem(p), p))
        .collect();
    let (part1, part2) = (records[..3].concat(), records[3..].concat());
    let file = tmp.path().join("other.txt");
    std::fs::copy(&names[30], &file).unwrap();
    let extract = |stdin: Option<&str>, path: &str| extract_output(&["--sentences", path], stdin);
    let shards = [
        extract(Some(&part1), "-"),
        extract(None, file.to_str().unwrap()),
        without_begin_records(&extract(Some(&part2), "-")),
    ];
    assert!(String::from_utf8_lossy(&shards[0]).starts_with("{\"begin_file\":\"-\"}"));
    let mut args = Vec::new();
    for (i, s) in shards.iter().enumerate() {
        let p = tmp.path().join(format!("shard-{i}.jsonl"));
        std::fs::write(&p, s).unwrap();
        args.push(p);
    }
    let merged = tmp.path().join("merged");
    hearsay()
        .arg("--store")
        .arg(&merged)
        .arg("merge")
        .args(&args)
        .assert()
        .success();
    let scanned = tmp.path().join("scanned");
    let mut scan = hearsay();
    scan.arg("--store")
        .arg(&scanned)
        .args(["-q", "scan", "-"])
        .arg(&file)
        .write_stdin(records.concat())
        .assert()
        .success();
    // Claims in store order, not only as sets: the two runs of `-` are one file in order.
    let claims = out(&["claims"], &scanned);
    assert!(claims.lines().count() > 100, "{}", claims.lines().count());
    assert_eq!(claims, out(&["claims"], &merged));
    let manifest: serde_json::Value =
        serde_json::from_slice(&std::fs::read(merged.join("manifest.json")).unwrap()).unwrap();
    let stdin_entry = manifest["files"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["path"] == "-")
        .unwrap();
    assert_eq!(stdin_entry["documents"], 6);
    assert_eq!(
        stdin_entry["more_rows"].as_array().map(Vec::len),
        Some(1),
        "the second run of `-` is a second row range: {stdin_entry}"
    );
    let mut co = 0;
    for t in &json_lines(&["top", "-n", "6"], &scanned) {
        let (c, e) = (t["cause"].as_str().unwrap(), t["effect"].as_str().unwrap());
        for (a, b) in [(c, e), (e, "cells"), (c, "protein")] {
            let s = json_lines(&["pair", a, b], &scanned);
            assert_eq!(s, json_lines(&["pair", a, b], &merged), "{a} / {b}");
            co += s[0]["co_mentions"].as_u64().unwrap();
        }
    }
    assert!(co > 0, "no co-mention was compared");
}

/// A shard cut off inside a file (its extract run stopped part-way) still merges, and the
/// warning says so and names the file; a shard without sentence records gets the other warning.
#[test]
fn merge_names_a_file_whose_shard_stops_part_way() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let names = sorted_files(&articles);
    let (cut_file, plain_file) = (tmp.path().join("cut.txt"), tmp.path().join("plain.txt"));
    std::fs::copy(&names[40], &cut_file).unwrap();
    std::fs::copy(&names[41], &plain_file).unwrap();
    let extract = |extra: &[&str], file: &Path| {
        let args = [extra, &[file.to_str().unwrap()]].concat();
        String::from_utf8(extract_output(&args, None)).unwrap()
    };
    let full = extract(&["--sentences"], &cut_file);
    let lines: Vec<&str> = full.lines().collect();
    assert!(
        lines.last().unwrap().contains("\"file\""),
        "{:?}",
        lines.last()
    );
    // Everything but the closing file record and the last few records before it.
    let cut = lines[..lines.len() - 5].join("\n");
    let cut_shard = tmp.path().join("cut.jsonl");
    std::fs::write(&cut_shard, cut).unwrap();
    let plain_shard = tmp.path().join("plain.jsonl");
    std::fs::write(&plain_shard, extract(&[], &plain_file)).unwrap();
    let o = hearsay()
        .arg("--store")
        .arg(tmp.path().join("s"))
        .arg("merge")
        .arg(&cut_shard)
        .arg(&plain_shard)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(o.status.success(), "{err}");
    assert!(err.contains("stopped part-way"), "{err}");
    assert!(
        err.contains("cut.txt") && !err.contains("first: plain"),
        "{err}"
    );
    assert!(err.contains("1 file(s) have no sentence records"), "{err}");
}
