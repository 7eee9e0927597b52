//! `hearsay questions` → answers → `hearsay compare` on the demo corpus.
//!
//! The answers are INVENTED: two made-up models ("invented-eager", "invented-careful") answer by a
//! fixed rule of the question id, only to exercise the command. The expected summary numbers are
//! computed independently in Python from `hearsay claims` (the claim records), with
//! scikit-learn (`cohen_kappa_score`, `roc_auc_score`) and scipy (`spearmanr`), never from
//! `compare`'s own output.

use crate::common::*;
use std::process::{Command, Stdio};

const VARS: &str = "fertiliser runoff\nalgae blooms\noxygen levels\nwater temperature\n\
boat traffic\ntourism revenue\nmussel density\nfish stocks\n";

/// Recompute the summaries from the claim records: support = non-negated causal claims x → y
/// (both directions for the symmetric family); corpus answer yes when support ≥ T and, except
/// for the symmetric family, support > the reverse support.
const SCRIPT: &str = r#"
import csv, json, sys
from collections import Counter, defaultdict
from sklearn.metrics import cohen_kappa_score, roc_auc_score
from scipy.stats import spearmanr
claims_path, questions_path, answers_path, T = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
support = Counter()
for line in open(claims_path):
    c = json.loads(line)
    a, b = c["cause"]["key"], c["effect"]["key"]
    if c["kind"] == "causal" and c["modality"] != "negated" and a != b:
        support[(a, b)] += 1
def lab(a):
    if a in ("yes", "no", "unsure"):
        return a, {"yes": 1.0, "no": 0.0, "unsure": 0.5}[a]
    p = float(a)
    return ("yes" if p > 0.5 else ("no" if p < 0.5 else "unsure")), p
qs = {q["id"]: q for q in csv.DictReader(open(questions_path))}
groups = defaultdict(list)
for r in csv.DictReader(open(answers_path)):
    q = qs[r["id"]]
    x, y, fam = q["x_key"], q["y_key"], q["family"]
    f, b = support[(x, y)], support[(y, x)]
    s = f + b if fam == "symmetric" else f
    corpus = "yes" if s >= T and (fam == "symmetric" or s > b) else "no"
    label, p = lab(r["answer"])
    for key in (fam, "all"):
        groups[(r["model"], key)].append((label, p, corpus, s))
out = {}
for (model, fam), rows in groups.items():
    labels = [r[0] for r in rows]
    corpus = [r[2] for r in rows]
    sup = [r[3] for r in rows]
    yes = [1 if l == "yes" else 0 for l in labels]
    out[model + "|" + fam] = {
        "questions": len(rows),
        "corpus_yes": corpus.count("yes"),
        "agreement": sum(1 for l, c in zip(labels, corpus) if l == c) / len(rows),
        "kappa": cohen_kappa_score(labels, corpus),
        "auc": roc_auc_score(yes, sup),
        "spearman": spearmanr(sup, [r[1] for r in rows]).statistic,
    }
# Asymmetry: the same wording asked both ways (directed and reversed families).
for model in {m for m, _ in groups}:
    ans = {}
    for r in csv.DictReader(open(answers_path)):
        q = qs[r["id"]]
        if r["model"] == model and q["family"] != "symmetric":
            ans[(q["template"], q["x_key"], q["y_key"])] = lab(r["answer"])[0]
    both = yes_both = stated = 0
    for (t, x, y), a in ans.items():
        if x < y and (t, y, x) in ans:
            both += 1
            yes_both += a == "yes" and ans[(t, y, x)] == "yes"
            stated += support[(x, y)] >= T and support[(y, x)] >= T
    out[model + "|all"].update(both_ways=both, model_yes_both=yes_both, corpus_states_both=stated)
print(json.dumps(out))
"#;

fn digit(id: &str) -> u32 {
    id.chars().filter_map(|c| c.to_digit(16)).sum()
}

#[test]
fn compare_on_the_demo_matches_an_independent_computation() {
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    json_lines(&["scan", "corpora-demo"], &store);
    let vars = tmp.path().join("vars.txt");
    std::fs::write(&vars, VARS).unwrap();
    let vars_s = vars.to_str().unwrap();
    let questions = tmp.path().join("questions.csv");
    let out = hearsay()
        .args(["--format", "csv", "questions", "--vars", vars_s])
        .output()
        .unwrap();
    assert!(out.status.success());
    std::fs::write(&questions, &out.stdout).unwrap();
    // Invented answers: "eager" says yes unless the id's digit sum is divisible by 5 (and is
    // unsure when it is divisible by 7); "careful" gives a probability, by id only (so compare
    // must look the question up through --vars).
    let mut answers = String::from("id,model,answer\n");
    let mut n = 0;
    for r in csv::Reader::from_reader(out.stdout.as_slice()).records() {
        let id = r.unwrap()[0].to_string();
        let d = digit(&id);
        let eager = if d.is_multiple_of(7) {
            "unsure"
        } else if d.is_multiple_of(5) {
            "no"
        } else {
            "yes"
        };
        answers += &format!("{id},invented-eager,{eager}\n");
        answers += &format!("{id},invented-careful,{}\n", f64::from(d % 11) / 10.0);
        n += 1;
    }
    assert_eq!(n, 8 * 7 * 3);
    let answers_path = tmp.path().join("answers.csv");
    std::fs::write(&answers_path, &answers).unwrap();
    let ans = answers_path.to_str().unwrap();
    let ours = json_lines(
        &["compare", ans, "--vars", vars_s, "--threshold", "2"],
        &store,
    );
    let claims = tmp.path().join("claims.jsonl");
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["--format", "json", "claims"])
        .output()
        .unwrap();
    std::fs::write(&claims, &out.stdout).unwrap();
    let py = Command::new("python3")
        .arg("-c")
        .arg(SCRIPT)
        .arg(&claims)
        .arg(&questions)
        .arg(&answers_path)
        .arg("2")
        .stdout(Stdio::piped())
        .output()
        .expect("python3 runs (scipy and scikit-learn are installed by .ci/run)");
    assert!(
        py.status.success(),
        "{}",
        String::from_utf8_lossy(&py.stderr)
    );
    let want: serde_json::Value = serde_json::from_slice(&py.stdout).unwrap();
    assert_eq!(ours.len(), 2 * 4, "two models × (all + three families)");
    for s in ours.iter().filter(|s| s["family"] == "all") {
        let w = &want[&format!("{}|all", s["model"].as_str().unwrap())];
        for f in ["both_ways", "model_yes_both", "corpus_states_both"] {
            assert_eq!(s[f], w[f], "{} {f}", s["model"]);
        }
    }
    for s in &ours {
        let key = format!(
            "{}|{}",
            s["model"].as_str().unwrap(),
            s["family"].as_str().unwrap()
        );
        let w = &want[&key];
        assert!(w.is_object(), "{key} missing from the reference");
        for f in ["questions", "corpus_yes"] {
            assert_eq!(s[f], w[f], "{key} {f}");
        }
        for f in ["agreement", "kappa", "auc", "spearman"] {
            let (a, b) = (s[f].as_f64(), w[f].as_f64());
            match (a, b) {
                (Some(a), Some(b)) => assert!((a - b).abs() < 1e-9, "{key} {f}: {a} vs {b}"),
                _ => panic!("{key} {f}: ours {a:?}, reference {b:?}"),
            }
        }
    }
    // The demo states some causal pairs at least twice, so the corpus answer is not all "no".
    assert!(ours.iter().any(|s| s["corpus_yes"].as_u64() > Some(0)));
    // Boat traffic and tourism revenue are stated both ways (4 and 2 claims).
    assert!(ours
        .iter()
        .any(|s| s["corpus_states_both"].as_u64() > Some(0)));
}

#[test]
fn explain_shows_the_evidence_and_bad_rows_name_their_line() {
    let tmp = tempfile::tempdir().unwrap();
    let store = tmp.path().join("store");
    json_lines(&["scan", "corpora-demo"], &store);
    let answers = tmp.path().join("a.jsonl");
    std::fs::write(
        &answers,
        "{\"x\":\"fertiliser runoff\",\"y\":\"algae blooms\",\"family\":\"directed\",\"answer\":\"yes\"}\n\
         {\"x\":\"boat traffic\",\"y\":\"tourism revenue\",\"family\":\"symmetric\",\"answer\":0.9}\n",
    )
    .unwrap();
    let a = answers.to_str().unwrap();
    let qs = json_lines(&["compare", a, "--view", "questions"], &store);
    assert_eq!(qs.len(), 2);
    assert_eq!(qs[0]["corpus_answer"], "yes");
    // Boat traffic and tourism revenue: 4 claims one way, 2 the other (corpora-demo/EXPECTED.md).
    assert_eq!(qs[1]["support"], 6, "{}", qs[1]);
    let id = qs[0]["id"].as_str().unwrap();
    let ex = &json_lines(&["compare", a, "--explain", id], &store)[0];
    assert_eq!(
        ex["profile"]["forward"],
        ex["pair"]["forward"]["claims"].as_u64().unwrap()
            - ex["pair"]["forward"]["negated"].as_u64().unwrap()
    );
    assert!(!ex["pair"]["evidence"].as_array().unwrap().is_empty());

    std::fs::write(
        &answers,
        "{\"x\":\"boat traffic\",\"y\":\"fish\",\"family\":\"directed\",\"answer\":\"perhaps\"}\n",
    )
    .unwrap();
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["compare", a])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!out.status.success());
    assert!(
        err.contains("a.jsonl:1:") && err.contains("perhaps"),
        "{err}"
    );
}
