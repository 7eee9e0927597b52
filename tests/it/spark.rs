//! Apache Spark in local mode (PySpark) as the map-reduce engine: a JSON Lines corpus's
//! partitions are piped through `hearsay extract --sentences -` with `RDD.pipe`, the output is
//! merged, and the store must equal a single-machine `scan -` of the same file. The documents are
//! eLife articles (../shared/data/elife-articles, see its SOURCE.txt).
//!
//! Needs PySpark (`.ci/run` installs `pyspark==3.5.*`) and Java 17 on PATH; about 17 s here.

use crate::common::*;

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
