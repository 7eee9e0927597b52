//! `score`, `paths`, `conflicts`, `cycles` and `matrix`.
//!
//! The scoring check uses the eight-variable "Asia" network of Lauritzen & Spiegelhalter (1988,
//! J. R. Stat. Soc. B 50(2)), with its eight edges written by hand from the published network
//! description: visit to Asia → tuberculosis, smoking → lung cancer, smoking → bronchitis,
//! tuberculosis → "tuberculosis or cancer", lung cancer → "tuberculosis or cancer",
//! "tuberculosis or cancer" → positive X-ray, "tuberculosis or cancer" → dyspnoea,
//! bronchitis → dyspnoea. The claim texts scored against it are invented for the test. The
//! metrics are recomputed independently in Python from the node-link export, and the
//! structural Hamming distance is checked against networkx's graph edit distance (PyPI
//! `networkx`): with node names fixed, edit distance = missing + extra + 2 × reversed, while SHD
//! counts a reversal once.

use crate::common::{demo_store_in, hearsay};
use std::path::{Path, PathBuf};
use std::process::Command;

const ASIA: &[(&str, &str)] = &[
    ("visit to asia", "tuberculosis"),
    ("smoking", "lung cancer"),
    ("smoking", "bronchitis"),
    ("tuberculosis", "tuberculosis or cancer"),
    ("lung cancer", "tuberculosis or cancer"),
    ("tuberculosis or cancer", "positive x-ray"),
    ("tuberculosis or cancer", "dyspnoea"),
    ("bronchitis", "dyspnoea"),
];

/// Invented statements: four reference edges (one of them stated both ways, mostly reversed),
/// one extra edge, one hedged extra edge below threshold 1, and one edge to a variable outside
/// the reference.
const TEXTS: &[&str] = &[
    "A visit to Asia increases tuberculosis.",
    "Visit to Asia increases tuberculosis.",
    "Smoking causes lung cancer.",
    "Smoking causes lung cancer.",
    "Smoking causes lung cancer.",
    "Smoking causes bronchitis.",
    "Smoking causes bronchitis.",
    "Bronchitis causes dyspnoea.",
    "Dyspnoea causes bronchitis.",
    "Dyspnoea causes bronchitis.",
    "Smoking causes tuberculosis.",
    "Tuberculosis may cause dyspnoea.",
    "Smoking causes yellow teeth.",
];

fn asia_store(dir: &Path) -> PathBuf {
    let corpus = dir.join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    for (i, t) in TEXTS.iter().enumerate() {
        std::fs::write(corpus.join(format!("d{i:02}.txt")), format!("{t}\n")).unwrap();
    }
    let store = dir.join("store");
    hearsay()
        .arg("--store")
        .arg(&store)
        .arg("-q")
        .arg("scan")
        .arg(&corpus)
        .assert()
        .success();
    store
}

fn run_json(store: &Path, args: &[&str]) -> serde_json::Value {
    let out = hearsay()
        .arg("--store")
        .arg(store)
        .args(["-q", "--format", "json"])
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

const INDEPENDENT: &str = r#"
import sys, json, csv, networkx as nx
graph = json.load(open(sys.argv[1]))
truth = [tuple(r) for r in csv.reader(open(sys.argv[2])) if r and r[0] != "cause"]
ours = json.load(open(sys.argv[3]))
# Match reference names to claim variables by their label (the demo texts use the same words).
by_label = {n["label"]: n["id"] for n in graph["nodes"]}
name = lambda x: by_label.get(x, "ref:" + x)
T = {(name(a), name(b)) for a, b in truth}
V = {v for e in T for v in e}
W = {(e["source"], e["target"]): e["weight"] for e in graph["edges"]
     if e["source"] in V and e["target"] in V}
def score(t):
    kept = {e: w for e, w in W.items() if w > 0 and w >= t}
    skel = {}
    for (a, b), w in kept.items():
        back = kept.get((b, a), 0)
        skel[frozenset((a, b))] = (a, b) if w > back else ((b, a) if back > w else None)
    ts = {frozenset(e) for e in T}
    shared = [p for p in skel if p in ts]
    missing = len(ts - set(skel)); extra = len(set(skel) - ts)
    good = sum(1 for p in shared if skel[p] in T)
    mis = len(shared) - good
    oriented = {o for o in skel.values() if o}
    tp = len(oriented & T)
    prf = lambda tp, p, a: (tp / p if p else None, tp / a if a else None)
    sp, sr = prf(len(shared), len(skel), len(ts)); op, orr = prf(tp, len(oriented), len(T))
    f = lambda p, r: (2*p*r/(p+r) if p + r > 0 else 0.0) if p is not None and r is not None else None
    # networkx graph edit distance between the reference and the oriented prediction.
    G1 = nx.DiGraph(); G1.add_nodes_from((v, {"n": v}) for v in V); G1.add_edges_from(T)
    G2 = nx.DiGraph(); G2.add_nodes_from((v, {"n": v}) for v in V); G2.add_edges_from(oriented)
    ged = nx.graph_edit_distance(G1, G2, node_match=lambda x, y: x["n"] == y["n"])
    return dict(shd=missing + extra + mis, missing=missing, extra=extra, mis=mis,
                sp=sp, sr=sr, sf=f(sp, sr), op=op, orr=orr, of=f(op, orr),
                acc=good / len(shared) if shared else None, ged=ged)
def close(a, b):
    return (a is None and b is None) or (a is not None and b is not None and abs(a - b) < 1e-9)
rows = [ours["at"]] + ours["curve"]
for r in rows:
    s = score(r["threshold"])
    assert s["shd"] == r["shd"] and s["missing"] == r["missing"] and s["extra"] == r["extra"] \
        and s["mis"] == r["misoriented"], (r, s)
    for k, (grp, m) in {"sp": ("skeleton", "precision"), "sr": ("skeleton", "recall"),
                        "sf": ("skeleton", "f1"), "op": ("orientation", "precision"),
                        "orr": ("orientation", "recall"), "of": ("orientation", "f1")}.items():
        assert close(s[k], r[grp][m]), (k, s[k], r[grp][m], r["threshold"])
    assert close(s["acc"], r["orientation_accuracy"])
    # No ties in this corpus, so every predicted pair is oriented and edit distance counts a
    # reversal twice.
    assert s["ged"] == s["shd"] + s["mis"], (s, r["threshold"])
print(ours["at"]["shd"], len(rows))
"#;

#[test]
fn score_agrees_with_an_independent_computation_on_asia() {
    let dir = tempfile::tempdir().unwrap();
    let store = asia_store(dir.path());
    let truth = dir.path().join("asia.csv");
    let mut csv_text = String::from("cause,effect\n");
    let mut dot_text = String::from("digraph asia {\n");
    for (a, b) in ASIA {
        csv_text.push_str(&format!("{a},{b}\n"));
        dot_text.push_str(&format!("  \"{a}\" -> \"{b}\";\n"));
    }
    dot_text.push_str("}\n");
    std::fs::write(&truth, &csv_text).unwrap();
    let truth_dot = dir.path().join("asia.dot");
    std::fs::write(&truth_dot, &dot_text).unwrap();
    let ours = run_json(&store, &["score", "--truth", truth.to_str().unwrap()]);
    // Hand count at threshold 1: found smoking→lung cancer, smoking→bronchitis,
    // visit to Asia→tuberculosis; bronchitis–dyspnoea is reversed (2 documents against 1);
    // smoking→tuberculosis is extra; four edges through "tuberculosis or cancer" are missing.
    let at = &ours["at"];
    assert_eq!(
        (
            at["missing"].as_u64(),
            at["extra"].as_u64(),
            at["misoriented"].as_u64()
        ),
        (Some(4), Some(1), Some(1)),
        "{at}"
    );
    assert_eq!(at["shd"], 6);
    let from_dot = run_json(&store, &["score", "--truth", truth_dot.to_str().unwrap()]);
    assert_eq!(from_dot["at"], ours["at"]);
    assert_eq!(from_dot["curve"], ours["curve"]);
    let graph = dir.path().join("g.json");
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["-q", "--format", "json", "graph", "-o"])
        .arg(&graph)
        .assert()
        .success();
    let ours_file = dir.path().join("ours.json");
    std::fs::write(&ours_file, ours.to_string()).unwrap();
    let out = Command::new("python3")
        .arg("-c")
        .arg(INDEPENDENT)
        .arg(&graph)
        .arg(&truth)
        .arg(&ours_file)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // The threshold of 1, then the curve at 0.5, 1, 2 and 3.
    assert_eq!(String::from_utf8_lossy(&out.stdout).trim(), "6 5");
    // The curve file is CSV with one row per threshold.
    let curve = dir.path().join("curve.csv");
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["-q", "--format", "json", "score", "--truth"])
        .arg(&truth)
        .arg("--curve")
        .arg(&curve)
        .assert()
        .success();
    let text = std::fs::read_to_string(&curve).unwrap();
    assert!(text.starts_with("threshold,predicted_pairs,shd,"));
    assert_eq!(text.lines().count(), 1 + 4);
    // A bad reference names the file and line.
    let bad = dir.path().join("bad.csv");
    std::fs::write(&bad, "smoking,lung cancer\nlung cancer,smoking\n").unwrap();
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["score", "--truth"])
        .arg(&bad)
        .assert()
        .failure()
        .stderr(predicates::str::contains("bad.csv:2:"));
}

fn lines(store: &Path, args: &[&str]) -> Vec<serde_json::Value> {
    crate::common::json_lines(args, store)
}

#[test]
fn paths_conflicts_cycles_and_matrix_on_the_demo() {
    // Behaviour guards on the invented demo corpus (see corpora-demo/EXPECTED.md).
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let chains = lines(&store, &["paths", "fertiliser runoff", "tourism revenue"]);
    assert!(!chains.is_empty());
    let c = &chains[0];
    assert_eq!(c["hops"].as_array().unwrap().len(), 2);
    assert_eq!(c["hops"][1]["cause"], c["hops"][0]["effect"]);
    // runoff increases blooms, blooms reduce revenue: the chain decreases.
    assert_eq!(c["sign"], "decrease");
    for h in c["hops"].as_array().unwrap() {
        assert!(!h["evidence"].as_array().unwrap().is_empty());
        assert!(c["support"].as_f64() <= h["weight"].as_f64());
    }
    let conflicts = lines(&store, &["conflicts"]);
    let kinds: Vec<&str> = conflicts
        .iter()
        .map(|c| c["kind"].as_str().unwrap())
        .collect();
    for k in ["both-directions", "opposite-signs", "asserted-and-denied"] {
        assert!(kinds.contains(&k), "{kinds:?}");
    }
    for c in &conflicts {
        assert!(!c["evidence"][0].as_array().unwrap().is_empty());
        assert!(!c["evidence"][1].as_array().unwrap().is_empty());
    }
    let supports: Vec<u64> = conflicts
        .iter()
        .map(|c| c["support"].as_u64().unwrap())
        .collect();
    assert!(supports.windows(2).all(|w| w[0] >= w[1]));
    let cycles = lines(&store, &["cycles", "--min-weight", "1"]);
    assert!(cycles
        .iter()
        .any(|c| c["hops"].as_array().unwrap().len() == 2));
    let vars = dir.path().join("vars.txt");
    std::fs::write(&vars, "fertiliser runoff\nalgae blooms\noxygen levels\n").unwrap();
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["-q", "matrix", "--cell", "documents", "--vars"])
        .arg(&vars)
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let rows: Vec<Vec<&str>> = text.lines().map(|l| l.split(',').collect()).collect();
    assert_eq!(
        rows[0][1..],
        ["fertiliser runoff", "algae blooms", "oxygen levels"]
    );
    // Row = cause: runoff → blooms is stated, blooms → runoff is not.
    assert!(rows[1][2].parse::<f64>().unwrap() >= 10.0, "{text}");
    assert_eq!(rows[2][1], "0");
    assert!(rows[2][3].parse::<f64>().unwrap() >= 4.0);
}
