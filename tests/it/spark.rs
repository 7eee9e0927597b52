//! Apache Spark in local mode (PySpark) as the map-reduce engine, both cluster recipes of
//! docs/cluster.md: (1) every partition scans its records into a part store and `link` joins
//! the parts, which must answer every query byte for byte as one scan of the same files; (2) a
//! JSON Lines corpus's partitions are piped through `hearsay extract --sentences -` with
//! `RDD.pipe`, the output is merged, and the store must equal a single-machine `scan -` of the
//! same file. The documents are eLife articles (../shared/data/elife-articles, see its
//! SOURCE.txt).
//!
//! Needs PySpark (`.ci/run` installs `pyspark==3.5.*`) and Java 17 on PATH; about 17 s a test
//! here.

use crate::common::*;

/// Each partition writes its records to `inputs/part-NNNNN.jsonl` and scans that file into the
/// part store `stores/part-NNNNN`; the driver prints the part stores' paths.
const SCAN_DRIVER: &str = r#"
import os, subprocess, sys
from pyspark import SparkContext
hearsay, corpus, inputs, stores = sys.argv[1:5]
sc = SparkContext("local[2]", "hearsay-scan")
sc.setLogLevel("ERROR")

def scan_partition(index, records):
    records = list(records)
    if not records:
        return
    name = "part-%05d" % index
    text = os.path.join(inputs, name + ".jsonl")
    with open(text, "w") as f:
        f.writelines(r + "\n" for r in records)
    store = os.path.join(stores, name)
    subprocess.run([hearsay, "--store", store, "-q", "-j1", "scan", text], check=True)
    yield store

parts = sc.textFile(corpus, minPartitions=3).mapPartitionsWithIndex(scan_partition).collect()
print("\n".join(parts))
sc.stop()
"#;

#[test]
fn spark_partitions_scanned_into_parts_link_to_a_scan() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let jsonl: String = sorted_files(&articles)
        .iter()
        .take(12)
        .map(|p| text_record(&stem(p), p))
        .collect();
    let corpus = tmp.path().join("corpus.jsonl");
    std::fs::write(&corpus, &jsonl).unwrap();
    let (inputs, stores) = (tmp.path().join("inputs"), tmp.path().join("stores"));
    std::fs::create_dir_all(&inputs).unwrap();
    std::fs::create_dir_all(&stores).unwrap();
    let bin = assert_cmd::cargo::cargo_bin("hearsay");
    let out = std::process::Command::new("python3")
        .args(["-c", SCAN_DRIVER])
        .arg(&bin)
        .arg(&corpus)
        .arg(&inputs)
        .arg(&stores)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "the Spark job failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let parts: Vec<String> = String::from_utf8_lossy(&out.stdout)
        .lines()
        .filter(|l| l.contains("part-"))
        .map(str::to_string)
        .collect();
    assert!(parts.len() >= 3, "{parts:?}");
    let linked = tmp.path().join("linked");
    succeeded(
        hearsay()
            .arg("--store")
            .arg(&linked)
            .args(["-q", "link"])
            .args(&parts),
    );
    // One scan of the same files (the partitions' records, as the parts read them).
    let scanned = tmp.path().join("scanned");
    scan_quietly(&scanned, &inputs);
    let top = json_lines(&["top", "-n", "1"], &scanned);
    let (x, y) = (
        top[0]["cause"].as_str().unwrap(),
        top[0]["effect"].as_str().unwrap(),
    );
    let vars = tmp.path().join("vars.txt");
    std::fs::write(&vars, format!("{x}\n{y}\ncells\n")).unwrap();
    let (a, b) = (
        every_answer(&scanned, x, y, &vars),
        every_answer(&linked, x, y, &vars),
    );
    assert!(a.iter().any(|(q, out)| q == "claims" && out.len() > 10_000));
    if let Some(d) = first_different_answer(&a, &b) {
        panic!("{d}");
    }
}

const DRIVER: &str = r#"
import sys
from pyspark import SparkContext
hearsay, corpus, out = sys.argv[1:4]
sc = SparkContext("local[2]", "hearsay-extract")
sc.setLogLevel("ERROR")
lines = sc.textFile(corpus, minPartitions=3)
shards = lines.pipe(hearsay + " -q extract --sentences -")
with open(out, "w") as f:
    for l in shards.collect():
        f.write(l + "\n")
sc.stop()
"#;

#[test]
fn spark_partitions_piped_through_extract_merge_to_a_scan() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let names = sorted_files(&articles);
    let jsonl: String = names
        .iter()
        .take(9)
        .map(|p| text_record(&stem(p), p))
        .collect();
    let corpus = tmp.path().join("corpus.jsonl");
    std::fs::write(&corpus, &jsonl).unwrap();
    let scanned = tmp.path().join("scanned");
    hearsay()
        .arg("--store")
        .arg(&scanned)
        .args(["-q", "scan", "-"])
        .write_stdin(jsonl)
        .assert()
        .success();
    let shards = tmp.path().join("shards.jsonl");
    let bin = assert_cmd::cargo::cargo_bin("hearsay");
    let st = std::process::Command::new("python3")
        .args(["-c", DRIVER])
        .arg(&bin)
        .arg(&corpus)
        .arg(&shards)
        .status()
        .unwrap();
    assert!(st.success(), "the Spark job failed");
    let merged = tmp.path().join("merged");
    hearsay()
        .arg("--store")
        .arg(&merged)
        .args(["-q", "merge"])
        .arg(&shards)
        .assert()
        .success();
    let sorted = |s: &std::path::Path| {
        let mut v: Vec<String> = json_lines(&["claims"], s)
            .iter()
            .map(|c| c.to_string())
            .collect();
        v.sort();
        v
    };
    let claims = sorted(&scanned);
    assert!(claims.len() > 50, "{}", claims.len());
    assert_eq!(claims, sorted(&merged));
    assert_eq!(
        json_lines(&["top", "-n", "0"], &scanned),
        json_lines(&["top", "-n", "0"], &merged)
    );
}
