//! The claim confidence: calibration on held-out labelled data, a reproducible training command,
//! the `--min-confidence` filter and stores written with the older claim schema.

use crate::common::*;
use hearsay::evaluate::{self as eval, Reliability};
use hearsay::extract::{is_held_out, unit_key, ConfidenceModel, Extractor};
use hearsay::patterns::PatternSet;

fn scanned_demo() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    let store = dir.path().join("store");
    json_lines(&["scan", "corpora-demo"], &store);
    dir
}

/// The held-out judged claims of one dataset (the same hash rule as `train-confidence`, one
/// sentence in five), so the model has not seen them.
fn held_out(name: &str, judged: Vec<eval::Judged>) -> Vec<eval::Judged> {
    judged
        .into_iter()
        .filter(|j| is_held_out(&unit_key(name, &j.unit), 5))
        .collect()
}

/// Sources: SemEval-2010 Task 8 training split (Hendrickx et al. 2010), CC BY 3.0,
/// ../shared/data/semeval2010-task8/SOURCE.txt; Causal News Corpus V2 subtask 2 training split
/// (Tan et al. 2022), CC0, ../shared/data/causal-news-corpus/SOURCE.txt. On the held-out
/// sentences of both, the built-in model must be calibrated: expected calibration error (10
/// equal-width bins, the common definition) and Brier score under ceilings set just above what
/// the shipped model reaches, and better than a constant guess of the base rate on Brier.
#[test]
fn confidence_is_calibrated_on_held_out_sentences() {
    let (Some(sem), Some(cnc)) = (
        shared_data("semeval2010-task8/TRAIN_FILE.TXT"),
        shared_data("causal-news-corpus/train_subtask2.csv"),
    ) else {
        return;
    };
    let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
    let items = eval::parse_semeval(&std::fs::read_to_string(sem).unwrap()).unwrap();
    let mut held = held_out("semeval2010", eval::score_pairs_judged(&ex, &items).2);
    let p = cnc.display().to_string();
    let docs = hearsay::evaluate::parse_cnc(&p, &std::fs::read_to_string(&cnc).unwrap()).unwrap();
    held.extend(held_out(
        "cnc",
        hearsay::evaluate::score_spans_judged(&ex, &docs).2,
    ));
    let r = Reliability::from_judged(&held);
    let base = r.correct as f64 / r.claims.max(1) as f64;
    let constant = Reliability::from_outcomes(held.iter().map(|j| (base, j.correct)));
    eprintln!(
        "held out: {} claims, ECE {:.3}, Brier {:.3} (constant {base:.3}: Brier {:.3})",
        r.claims, r.expected_calibration_error, r.brier, constant.brier
    );
    assert!(r.claims >= 150, "too few held-out claims: {}", r.claims);
    assert!(
        r.expected_calibration_error <= ECE_CEILING,
        "ECE {} above {ECE_CEILING}",
        r.expected_calibration_error
    );
    assert!(
        r.brier <= BRIER_CEILING,
        "Brier {} above {BRIER_CEILING}",
        r.brier
    );
    assert!(
        r.brier < constant.brier - 0.05,
        "{} vs {}",
        r.brier,
        constant.brier
    );
    // Confidence must rank: the claims at or above 0.5 are right more often than those below.
    let hi: Vec<_> = held.iter().filter(|j| j.claim.confidence >= 0.5).collect();
    let lo: Vec<_> = held.iter().filter(|j| j.claim.confidence < 0.5).collect();
    let share =
        |v: &[&eval::Judged]| v.iter().filter(|j| j.correct).count() as f64 / v.len().max(1) as f64;
    assert!(
        share(&hi) > share(&lo) + 0.2,
        "{} vs {}",
        share(&hi),
        share(&lo)
    );
}

const ECE_CEILING: f64 = 0.09;
const BRIER_CEILING: f64 = 0.15;

/// Behaviour guard on invented sentences: a plain signed statement is not scored as almost
/// surely misread (the old labels made "Drought reduces crop yields." 0.04), and a hedge lowers
/// the confidence of the same statement.
#[test]
fn plain_signed_statements_are_not_crushed() {
    let conf = |s: &str| -> f64 {
        let out = hearsay()
            .args(["--format", "json", "explain", s])
            .output()
            .unwrap();
        assert!(out.status.success());
        let v: serde_json::Value =
            serde_json::from_slice(out.stdout.split(|&b| b == b'\n').next().unwrap()).unwrap();
        assert!(
            v["confidence_features"]
                .as_array()
                .is_some_and(|a| !a.is_empty()),
            "{v}"
        );
        v["claim"]["confidence"].as_f64().unwrap()
    };
    let plain = conf("Drought reduces crop yields.");
    assert!(plain >= 0.2, "{plain}");
    let causes = conf("Smoking causes cancer.");
    let hedged = conf("Smoking may cause cancer.");
    assert!(causes > 0.5 && hedged < causes, "{causes} {hedged}");
}

/// Behaviour guard on the invented demo corpus: `extract --min-confidence` prints exactly the
/// claims of a plain `extract` at or above the threshold.
#[test]
fn extract_takes_min_confidence() {
    let run = |extra: &[&str]| -> Vec<serde_json::Value> {
        let out = hearsay()
            .args(["-q", "extract", "corpora-demo"])
            .args(extra)
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        String::from_utf8(out.stdout)
            .unwrap()
            .lines()
            .map(|l| serde_json::from_str(l).unwrap())
            .collect()
    };
    let all = run(&[]);
    let kept = run(&["--min-confidence", "0.5"]);
    let expected: Vec<_> = all
        .iter()
        .filter(|c| c["confidence"].as_f64().unwrap() as f32 >= 0.5)
        .cloned()
        .collect();
    assert!(
        !kept.is_empty() && kept.len() < all.len(),
        "{} of {}",
        kept.len(),
        all.len()
    );
    assert_eq!(kept, expected);
}

/// `eval` prints the reliability table in both outputs. Source: BECAUSE v2.1
/// CongressionalHearings (Dunietz et al. 2017), MIT; ../shared/data/because/SOURCE.txt.
#[test]
fn eval_reports_reliability_with_ece_and_brier() {
    let Some(gold) = shared_data("because/CongressionalHearings") else {
        return;
    };
    let v = eval_json("because", &gold);
    let r = &v["reliability"];
    assert_eq!(r["bins"].as_array().unwrap().len(), 10);
    let counted: u64 = r["bins"]
        .as_array()
        .unwrap()
        .iter()
        .map(|b| b["claims"].as_u64().unwrap())
        .sum();
    // Each judged claim lands in one bin; every matched claim is judged right, and claims that
    // touch no gold span are not judged.
    assert_eq!(counted, r["claims"].as_u64().unwrap());
    assert!(counted <= v["predicted_claims"].as_u64().unwrap());
    assert!(r["correct"].as_u64().unwrap() >= v["tp"].as_u64().unwrap());
    let table = hearsay()
        .args([
            "--format",
            "table",
            "eval",
            "--gold-format",
            "because",
            "--gold",
        ])
        .arg(&gold)
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&table.stdout);
    assert!(text.contains("observed precision"), "{text}");
    assert!(text.contains("expected calibration error"), "{text}");
}

/// Training twice with the same data and options writes the same file. The data is the BECAUSE
/// CongressionalHearings part (MIT; ../shared/data/because/SOURCE.txt), small enough to be quick.
#[test]
fn train_confidence_is_reproducible() {
    let Some(gold) = shared_data("because/CongressionalHearings") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let mut files = Vec::new();
    for name in ["a.toml", "b.toml"] {
        let out = dir.path().join(name);
        let run = hearsay()
            .arg("train-confidence")
            .arg("--gold")
            .arg(format!("because={}", gold.display()))
            .arg("--out")
            .arg(&out)
            .output()
            .unwrap();
        assert!(
            run.status.success(),
            "{}",
            String::from_utf8_lossy(&run.stderr)
        );
        files.push(std::fs::read_to_string(&out).unwrap());
    }
    assert_eq!(files[0], files[1]);
    let m = ConfidenceModel::parse("a.toml", &files[0]).unwrap();
    assert!(m.weights.len() > 5, "{files:?}");
    // The trained file works as a pattern folder's override.
    let pat = dir.path().join("patterns");
    copy_tree(&root().join("patterns"), &pat);
    std::fs::write(pat.join("confidence.toml"), &files[0]).unwrap();
    let out = hearsay()
        .args(["--format", "json", "--patterns"])
        .arg(&pat)
        .args(["explain", "Heavy rain causes flooding."])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// Behaviour guard on the invented demo corpus: `--min-confidence` keeps exactly the claims at or
/// above the threshold, in every command that reads claims.
#[test]
fn min_confidence_filters_stored_claims() {
    let dir = scanned_demo();
    let store = dir.path().join("store");
    let all = json_lines(&["claims"], &store);
    assert!(all.len() > 10);
    let conf: Vec<f64> = all
        .iter()
        .map(|c| c["confidence"].as_f64().unwrap())
        .collect();
    assert!(conf.iter().all(|p| (0.0..=1.0).contains(p)));
    let mut sorted = conf.clone();
    sorted.sort_by(f64::total_cmp);
    let t = sorted[sorted.len() / 2];
    let kept = json_lines(&["claims", "--min-confidence", &t.to_string()], &store);
    let expected = conf.iter().filter(|&&p| p as f32 >= t as f32).count();
    assert_eq!(kept.len(), expected);
    assert!(
        kept.len() < all.len(),
        "the median threshold drops something"
    );
    assert!(kept
        .iter()
        .all(|c| c["confidence"].as_f64().unwrap() as f32 >= t as f32));
    for cmd in [&["top"][..], &["graph"][..]] {
        let mut args = cmd.to_vec();
        args.extend(["--min-confidence", "0.99"]);
        let out = hearsay()
            .arg("--store")
            .arg(&store)
            .args(&args)
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let bad = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["claims", "--min-confidence", "1.5"])
        .output()
        .unwrap();
    assert!(!bad.status.success());
    assert!(String::from_utf8_lossy(&bad.stderr).contains("from 0 to 1"));
}

/// A store written with claim schema 1 (no confidence) is refused with a message that says to
/// scan again; queries never misread its rows.
#[test]
fn schema_one_store_asks_for_a_rescan() {
    let dir = scanned_demo();
    let store = dir.path().join("store");
    let mpath = store.join("manifest.json");
    let mut m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&mpath).unwrap()).unwrap();
    assert_eq!(m["claim_schema"], hearsay::SCHEMA_VERSION);
    m["claim_schema"] = 1.into();
    std::fs::write(&mpath, serde_json::to_string(&m).unwrap()).unwrap();
    for args in [&["claims"][..], &["top"][..], &["scan", "corpora-demo"][..]] {
        let out = hearsay()
            .arg("--store")
            .arg(&store)
            .args(args)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains("schema 1") && err.contains("scan again"),
            "{err}"
        );
    }
}

/// The model a pattern folder carries is the one its claims are scored with (the extractor owns
/// its model; nothing is installed for the process): a copy of the shipped folder scores the demo
/// corpus exactly as the built-in patterns do, and a model that is only a bias gives every claim
/// the confidence of that bias, in `extract` and in `explain`.
#[test]
fn a_pattern_folders_own_model_scores_its_claims() {
    let dir = tempfile::tempdir().unwrap();
    let pat = dir.path().join("patterns");
    copy_tree(&root().join("patterns"), &pat);
    let extract = |patterns: Option<&std::path::Path>| -> Vec<serde_json::Value> {
        let mut cmd = hearsay();
        if let Some(p) = patterns {
            cmd.arg("--patterns").arg(p);
        }
        let out = succeeded(cmd.args(["-q", "extract", "corpora-demo"]));
        String::from_utf8(out.stdout)
            .unwrap()
            .lines()
            .map(|l| serde_json::from_str(l).unwrap())
            .collect()
    };
    let builtin = extract(None);
    assert!(builtin.len() > 10);
    assert_eq!(extract(Some(&pat)), builtin);
    // 1 / (1 + e^-2) = 0.8808, rounded to three decimals as every confidence is.
    std::fs::write(
        pat.join("confidence.toml"),
        "format = \"hearsay-confidence 1\"\nbias = 2.0\n\n[weights]\n",
    )
    .unwrap();
    let flat = extract(Some(&pat));
    assert_eq!(flat.len(), builtin.len());
    assert!(
        flat.iter().all(|c| c["confidence"].as_f64() == Some(0.881)),
        "{:?}",
        flat.iter().map(|c| &c["confidence"]).collect::<Vec<_>>()
    );
    let out = succeeded(
        hearsay()
            .args(["--format", "json", "--patterns"])
            .arg(&pat)
            .args(["explain", "Heavy rain causes flooding."]),
    );
    let v: serde_json::Value =
        serde_json::from_slice(out.stdout.split(|&b| b == b'\n').next().unwrap()).unwrap();
    assert_eq!(v["claim"]["confidence"].as_f64(), Some(0.881), "{v}");
    // A model file that is not one names the file.
    std::fs::write(
        pat.join("confidence.toml"),
        "format = \"other\"\nbias = 0\n",
    )
    .unwrap();
    let out = hearsay()
        .arg("--patterns")
        .arg(&pat)
        .args(["explain", "Heavy rain causes flooding."])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("confidence.toml"), "{err}");
}
