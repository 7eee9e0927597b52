//! Helpers shared by the integration tests: running the real binary, temporary stores, and
//! locating the shared datasets.

#![allow(dead_code)]

use assert_cmd::Command;
use std::path::{Path, PathBuf};

pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The `hearsay` binary, run from the repository root.
pub fn hearsay() -> Command {
    let mut c = Command::cargo_bin("hearsay").expect("binary is built");
    c.current_dir(root()).env_remove("HEARSAY_STORE");
    c
}

/// Run a hearsay command to its end; the test fails, showing its stderr, unless it succeeded.
pub fn succeeded(cmd: &mut Command) -> std::process::Output {
    let out = cmd.output().expect("runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// The shared datasets folder (`../shared/data` beside the repository, or `$HEARSAY_SHARED_DATA`).
/// A test that needs it fails when it is missing, unless `HEARSAY_SKIP_EXTERNAL=1` is set, in
/// which case it returns `None` and the test says it was skipped.
pub fn shared_data(rel: &str) -> Option<PathBuf> {
    let base = std::env::var_os("HEARSAY_SHARED_DATA")
        .map(PathBuf::from)
        .unwrap_or_else(|| root().join("../shared/data"));
    let p = base.join(rel);
    if p.exists() {
        return Some(p);
    }
    if std::env::var("HEARSAY_SKIP_EXTERNAL").is_ok_and(|v| v == "1") {
        eprintln!("SKIPPED: {} is not available", p.display());
        return None;
    }
    panic!("external dataset {} not found (set HEARSAY_SHARED_DATA, or HEARSAY_SKIP_EXTERNAL=1 to skip)", p.display());
}

/// Run hearsay with JSON output and parse stdout as JSON Lines.
pub fn json_lines(args: &[&str], store: &Path) -> Vec<serde_json::Value> {
    let out = hearsay()
        .arg("--store")
        .arg(store)
        .arg("--format")
        .arg("json")
        .args(args)
        .output()
        .expect("runs");
    // `pair` exits 3 when a name is no variable of the store; its report is printed all the same
    // (co-mentions need no claim), so tests of co-mentions read it like any other.
    let pair_unknown = args.contains(&"pair") && out.status.code() == Some(3);
    assert!(
        out.status.success() || pair_unknown,
        "hearsay {args:?} failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .expect("utf-8")
        .lines()
        .filter(|l| !l.trim().is_empty())
        .map(|l| serde_json::from_str(l).expect("json line"))
        .collect()
}

/// The files of a folder, sorted by name (the order the shared datasets are read in).
pub fn sorted_files(dir: &Path) -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    files.sort();
    files
}

/// One JSON Lines record `{"id": id, "text": the file's text}`, newline included: the dump the
/// JSON Lines reader reads with its default fields.
pub fn text_record(id: &str, file: &Path) -> String {
    let text = std::fs::read_to_string(file).unwrap();
    serde_json::json!({"id": id, "text": text}).to_string() + "\n"
}

/// A file's name without its extension.
pub fn stem(file: &Path) -> String {
    file.file_stem().unwrap().to_string_lossy().into_owned()
}

/// Copy a folder tree.
pub fn copy_tree(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        let dest = to.join(e.file_name());
        if e.file_type().unwrap().is_dir() {
            copy_tree(&e.path(), &dest);
        } else {
            std::fs::copy(e.path(), dest).unwrap();
        }
    }
}

/// Scan `corpus` into `store` (quietly; a failed scan fails the test).
pub fn scan_quietly(store: &Path, corpus: &Path) -> std::process::Output {
    succeeded(
        hearsay()
            .arg("--store")
            .arg(store)
            .args(["-q", "scan"])
            .arg(corpus),
    )
}

/// Scan the invented demo corpus into `dir/store` and return the store's path.
pub fn demo_store_in(dir: &Path) -> PathBuf {
    let store = dir.join("store");
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["-q", "scan", "corpora-demo"])
        .assert()
        .success();
    store
}

/// Whether an external program (from the Debian package `package`, installed by .ci/run) is on
/// the path. A test that needs it fails when it is missing, unless `HEARSAY_SKIP_EXTERNAL=1` is
/// set, in which case this returns `false` and the test says it was skipped.
pub fn external_tool(name: &str, package: &str) -> bool {
    let found = std::process::Command::new("sh")
        .args(["-c", &format!("command -v {name}")])
        .output()
        .is_ok_and(|o| o.status.success());
    if found {
        return true;
    }
    if std::env::var("HEARSAY_SKIP_EXTERNAL").is_ok_and(|v| v == "1") {
        eprintln!("SKIPPED: {name} is not installed (Debian package {package})");
        return false;
    }
    panic!("{name} not found (install the Debian package {package}, or set HEARSAY_SKIP_EXTERNAL=1 to skip)");
}

/// The sentences hearsay reads from `path` (`extract --sentences`), in order, as one string per
/// sentence; extra arguments go before the path.
pub fn sentences_read(path: &Path, extra: &[&str]) -> Vec<String> {
    let out = hearsay()
        .args(["-q", "extract", "--sentences"])
        .args(extra)
        .arg(path)
        .output()
        .expect("runs");
    assert!(
        out.status.success(),
        "extract {} failed: {}",
        path.display(),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .expect("utf-8")
        .lines()
        .filter_map(|l| {
            let v: serde_json::Value = serde_json::from_str(l).expect("json line");
            v.get("sentence_of")?;
            Some(v["text"].as_str().expect("text").to_string())
        })
        .collect()
}

/// Lower-cased words (runs of letters; digits and punctuation are not words).
pub fn words(text: &str) -> Vec<String> {
    text.split(|c: char| !c.is_alphabetic())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect()
}

/// Bag-of-words agreement of `ours` with `reference`: the F1 of word multisets (common count
/// over the mean size), 1.0 when the two texts use the same words equally often in any order.
pub fn bag_of_words_f1(ours: &str, reference: &str) -> f64 {
    use std::collections::HashMap;
    let bag = |t: &str| {
        let mut m: HashMap<String, usize> = HashMap::new();
        for w in words(t) {
            *m.entry(w).or_default() += 1;
        }
        m
    };
    let (a, b) = (bag(ours), bag(reference));
    let common: usize = a
        .iter()
        .map(|(w, n)| (*n).min(b.get(w).copied().unwrap_or(0)))
        .sum();
    let (na, nb): (usize, usize) = (a.values().sum(), b.values().sum());
    if na + nb == 0 {
        return 1.0;
    }
    2.0 * common as f64 / (na + nb) as f64
}

/// Words joined by single spaces, for substring checks that ignore line breaks and punctuation.
pub fn word_string(text: &str) -> String {
    text.split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect::<Vec<_>>()
        .join(" ")
}

/// `hearsay --format json eval --gold-format FORMAT --gold GOLD`: the first JSON line (the scores).
pub fn eval_json(format: &str, gold: &Path) -> serde_json::Value {
    let out = succeeded(
        hearsay()
            .args([
                "--format",
                "json",
                "eval",
                "--gold-format",
                format,
                "--gold",
            ])
            .arg(gold),
    );
    let first = out.stdout.split(|&b| b == b'\n').next().unwrap();
    serde_json::from_slice(first).unwrap()
}

/// What a store answers to every query command, each output as printed (`--format json`
/// unless the command writes its own format): the whole-graph queries in every format, the
/// report page, the claims, and the look-ups of `x` and `y` (`vars`: a variable list file for
/// `matrix`). Two stores of the same documents must give the same bytes.
pub fn every_answer(store: &Path, x: &str, y: &str, vars: &Path) -> Vec<(String, Vec<u8>)> {
    let vars = vars.to_str().expect("a UTF-8 path");
    let queries: [&[&str]; 24] = [
        &["top", "-n", "0"],
        &["top", "-n", "0", "--format", "csv"],
        &["conflicts"],
        &["conflicts", "--limit", "0", "--min-confidence", "0"],
        &["cycles"],
        &["graph", "--format", "graphml"],
        &["graph", "--format", "gexf"],
        &["graph", "--format", "dot"],
        &["graph", "--format", "json", "--weight-by", "sentences"],
        &["graph", "--format", "json"],
        &["graph", "--evidence"],
        &["matrix", "--vars", vars],
        &["report"],
        &["report", "--pair", x, y],
        &["claims"],
        &["claims", "--cause", x],
        &["claims", "--var", y],
        &["pair", x, y],
        &["pair", y, x],
        &["paths", x, y],
        &["variables", "-n", "0"],
        &["variables", "--abbreviations", "-n", "0"],
        &["--roll-up", "heads", "top", "-n", "0"],
        &["--roll-up", "abbreviations", "top", "-n", "0"],
    ];
    queries
        .iter()
        .map(|args| {
            let mut cmd = hearsay();
            cmd.arg("--store").arg(store);
            if !args.contains(&"--format") {
                cmd.args(["--format", "json"]);
            }
            let out = cmd.args(*args).output().expect("runs");
            assert!(
                out.status.success(),
                "{args:?}: {}",
                String::from_utf8_lossy(&out.stderr)
            );
            (args.join(" "), out.stdout)
        })
        .collect()
}

/// The first query whose answers differ between two stores, with both answers (as text).
pub fn first_different_answer(a: &[(String, Vec<u8>)], b: &[(String, Vec<u8>)]) -> Option<String> {
    a.iter().zip(b).find(|(x, y)| x != y).map(|(x, y)| {
        format!(
            "`{}` differs:\n{}\n---\n{}",
            x.0,
            String::from_utf8_lossy(&x.1)
                .chars()
                .take(3000)
                .collect::<String>(),
            String::from_utf8_lossy(&y.1)
                .chars()
                .take(3000)
                .collect::<String>()
        )
    })
}
