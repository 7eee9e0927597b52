//! JSON Lines dumps read like the files they were made from.
//!
//! Source: the eLife corpus, ../shared/data/elife-articles/SOURCE.txt (plain text, one
//! paragraph a line). Eight articles (every 120th in file-name order, so the test stays a few
//! seconds) are written as one JSON Lines file (`{"id": file stem, "text": file text}`), then
//! compressed with Python's `gzip` module and the `zstd` program (Debian zstd). All three must
//! give exactly the claims of the folder of `.txt` files: cause, effect, cue, polarity,
//! modality and sentence, with each record id naming its file; so must the dump piped into
//! standard input.

use crate::common::*;
use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

type Claims = BTreeMap<String, Vec<[String; 6]>>;

/// Claims per document: by record id for JSON Lines, by file stem for text files. `stdin` is
/// piped in when a path is `-`.
fn claims_by_document(paths: &[&Path], stdin: Option<&Path>) -> BTreeMap<String, Claims> {
    let mut cmd = hearsay();
    cmd.args(["-q", "extract"]).args(paths);
    if let Some(p) = stdin {
        cmd.pipe_stdin(p).unwrap();
    }
    let out = cmd.output().expect("runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let records: Vec<serde_json::Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    group_by_document(&records)
}

/// Claim records grouped by input (`txt` for text files) and document.
fn group_by_document(records: &[serde_json::Value]) -> BTreeMap<String, Claims> {
    let mut by_input: BTreeMap<String, Claims> = BTreeMap::new();
    for c in records {
        let s = |v: &serde_json::Value| v.as_str().unwrap_or_default().to_string();
        let path = s(&c["source"]["path"]);
        let (input, doc) = match c["source"]["record"].as_str() {
            Some(r) => (path, r.to_string()),
            None => (
                "txt".to_string(),
                Path::new(&path)
                    .file_stem()
                    .unwrap()
                    .to_string_lossy()
                    .into_owned(),
            ),
        };
        by_input
            .entry(input)
            .or_default()
            .entry(doc)
            .or_default()
            .push([
                s(&c["cause"]["text"]),
                s(&c["effect"]["text"]),
                s(&c["cue"]),
                s(&c["polarity"]),
                s(&c["modality"]),
                s(&c["sentence"]),
            ]);
    }
    by_input
}

#[test]
fn elife_as_jsonl_gz_and_zst_gives_the_claims_of_the_text_files() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    if !external_tool("zstd", "zstd") {
        return;
    }
    let tmp = tempfile::tempdir().unwrap();
    let (txt, dump) = picked_articles(&articles, tmp.path(), 120, 8);
    let gz = tmp.path().join("elife2.jsonl.gz");
    let st = Command::new("python3")
        .args([
            "-c",
            "import gzip,shutil,sys; shutil.copyfileobj(open(sys.argv[1],'rb'), gzip.open(sys.argv[2],'wb'))",
        ])
        .arg(&dump)
        .arg(&gz)
        .status()
        .expect("python3 runs");
    assert!(st.success());
    let zst = tmp.path().join("elife3.jsonl.zst");
    let st = Command::new("zstd")
        .args(["-q", "-o"])
        .arg(&zst)
        .arg(&dump)
        .status()
        .expect("zstd runs");
    assert!(st.success());

    // Standard input streams too: the dump piped in is sniffed as JSON Lines although its first
    // record is longer than the bytes sniffed.
    let all = claims_by_document(&[&txt, &dump, &gz, &zst, Path::new("-")], Some(&dump));
    let from_txt = &all["txt"];
    let n: usize = from_txt.values().map(Vec::len).sum();
    assert!(n >= 100, "only {n} claims from the text files");
    assert_eq!(from_txt.len(), 8, "every article states something");
    for p in [&dump, &gz, &zst, &Path::new("-").to_path_buf()] {
        let got = all
            .get(&p.to_string_lossy().into_owned())
            .unwrap_or_else(|| panic!("no claims from {}", p.display()));
        assert_eq!(got, from_txt, "{} differs from the text files", p.display());
    }
}

/// Copies of the eLife articles picked by `step`, as text files in `txt/` and as one JSON Lines
/// dump (`{"id": file stem, "text": file text}`).
fn picked_articles(
    articles: &Path,
    tmp: &Path,
    step: usize,
    n: usize,
) -> (std::path::PathBuf, std::path::PathBuf) {
    let files: Vec<_> = sorted_files(articles)
        .into_iter()
        .filter(|p| p.extension().is_some_and(|e| e == "txt"))
        .collect();
    let picked: Vec<_> = files.iter().step_by(step).take(n).collect();
    assert_eq!(picked.len(), n);
    let txt = tmp.join("txt");
    std::fs::create_dir_all(&txt).unwrap();
    let mut jsonl = String::new();
    for f in picked {
        std::fs::copy(f, txt.join(f.file_name().unwrap())).unwrap();
        jsonl.push_str(&text_record(&stem(f), f));
    }
    let dump = tmp.join("dump").join("elife.jsonl");
    std::fs::create_dir_all(dump.parent().unwrap()).unwrap();
    std::fs::write(&dump, jsonl).unwrap();
    (txt, dump)
}

#[test]
fn a_dump_of_many_batches_scans_to_the_claims_of_the_text_files() {
    let Some(articles) = shared_data("elife-articles/articles") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    // 80 articles, about 3 MB: a stream of several 1 MB batches, extracted in parallel.
    let (txt, dump) = picked_articles(&articles, tmp.path(), 12, 80);
    assert!(std::fs::metadata(&dump).unwrap().len() > 2 << 20);
    let from_txt = claims_by_document(&[&txt], None);
    let store = tmp.path().join("store");
    json_lines(&["scan", dump.parent().unwrap().to_str().unwrap()], &store);
    let scanned = group_by_document(&json_lines(&["claims"], &store));
    let key = dump.to_string_lossy().into_owned();
    assert!(from_txt["txt"].values().map(Vec::len).sum::<usize>() > 1000);
    assert_eq!(
        scanned[&key], from_txt["txt"],
        "the scanned dump differs from the text files"
    );
    let extracted = claims_by_document(&[&dump], None);
    assert_eq!(
        extracted[&key], from_txt["txt"],
        "the extracted dump differs"
    );
}
