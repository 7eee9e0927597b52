//! Extraction quality on span-annotated data: `hearsay eval` with the `because`, `cnc` and
//! `jsonl` gold formats. Floors sit just under what the current patterns reach, so that a
//! regression fails; the measured numbers are printed (run with `--nocapture` to see them).

use crate::common::*;
use serde_json::Value;

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap()
}

/// Source: BECAUSE v2.1, CongressionalHearings part (Dunietz, Levin & Carbonell 2017), MIT;
/// ../shared/data/because/SOURCE.txt. Consequence, Motivation and Purpose events with both a
/// Cause and an Effect; sign from Degree (Facilitate/Inhibit).
#[test]
fn because_congressional_hearings_precision_recall_and_sign() {
    let Some(gold) = shared_data("because/CongressionalHearings") else {
        return;
    };
    let r = eval_json("because", &gold);
    eprintln!(
        "BECAUSE CongressionalHearings: precision {:.3} recall {:.3} f1 {:.3} (tp {} fp {} fn {}, gold {}), sign accuracy {:.3} on {} matched",
        f(&r["precision"]), f(&r["recall"]), f(&r["f1"]), r["tp"], r["fp"], r["fn"], r["gold_claims"],
        f(&r["sign_accuracy"]["accuracy"]), r["sign_accuracy"]["labelled"]
    );
    assert_eq!(r["documents"], 3);
    assert_eq!(
        r["gold_claims"], 281,
        "events with both a Cause and an Effect"
    );
    assert!(f(&r["precision"]) >= 0.225, "{r}");
    assert!(f(&r["recall"]) >= 0.117, "{r}");
    assert!(f(&r["f1"]) >= 0.154, "{r}");
    assert!(f(&r["sign_accuracy"]["accuracy"]) >= 0.9, "{r}");
    assert!(r["sign_accuracy"]["labelled"].as_u64().unwrap() >= 33);
}

/// Source: Causal News Corpus V2, training split, subtask 2 (Tan et al. 2022), CC0;
/// ../shared/data/causal-news-corpus/SOURCE.txt. <ARG0> = cause, <ARG1> = effect.
#[test]
fn causal_news_corpus_subtask2_claim_level() {
    let Some(gold) = shared_data("causal-news-corpus/train_subtask2.csv") else {
        return;
    };
    let r = eval_json("cnc", &gold);
    eprintln!(
        "CNC subtask 2 train: precision {:.3} recall {:.3} f1 {:.3} (tp {} fp {} fn {})",
        f(&r["precision"]),
        f(&r["recall"]),
        f(&r["f1"]),
        r["tp"],
        r["fp"],
        r["fn"]
    );
    assert_eq!(r["gold_claims"], 2257, "one gold pair per CSV row");
    assert_eq!(r["documents"], 1624, "rows grouped by sentence");
    assert!(f(&r["precision"]) >= 0.257, "{r}");
    assert!(f(&r["recall"]) >= 0.036, "{r}");
}

/// Source: Causal News Corpus V2, training split, subtask 1 (sentence causal or not), CC0;
/// ../shared/data/causal-news-corpus/SOURCE.txt. A sentence is predicted causal when a causal
/// claim is found in it.
#[test]
fn causal_news_corpus_subtask1_sentence_level() {
    let Some(gold) = shared_data("causal-news-corpus/train_subtask1.csv") else {
        return;
    };
    let r = eval_json("cnc", &gold);
    let s = &r["sentence_level"];
    eprintln!(
        "CNC subtask 1 train: precision {:.3} recall {:.3} f1 {:.3} accuracy {:.3} ({} sentences, {} causal)",
        f(&s["precision"]), f(&s["recall"]), f(&s["f1"]), f(&s["accuracy"]), s["sentences"], s["causal"]
    );
    assert_eq!(s["sentences"], 3075);
    assert_eq!(s["causal"], 1624);
    assert!(f(&s["precision"]) >= 0.74, "{s}");
    assert!(f(&s["recall"]) >= 0.15, "{s}");
}

/// Invented data (tests/data/README.md): hedges, negation, questions, conditionals and
/// associations. Guards modality decisions; not an external check.
#[test]
fn modality_on_invented_sentences() {
    let gold = root().join("tests/data/modality.jsonl");
    let r = eval_json("jsonl", &gold);
    let m = &r["modality_accuracy"];
    eprintln!(
        "modality set (invented): modality accuracy {:.3} on {} matched; claims precision {:.3} recall {:.3}; kind accuracy {:.3}",
        f(&m["accuracy"]), m["labelled"], f(&r["precision"]), f(&r["recall"]), f(&r["kind_accuracy"]["accuracy"])
    );
    assert!(r["documents"].as_u64().unwrap() >= 150);
    assert!(f(&m["accuracy"]) >= 0.94, "{r}");
    assert!(m["labelled"].as_u64().unwrap() >= 160, "{r}");
    assert!(f(&r["kind_accuracy"]["accuracy"]) >= 0.99, "{r}");
    assert!(f(&r["recall"]) >= 0.95, "{r}");
}

#[test]
fn eval_errors_list_each_false_positive_and_negative() {
    let dir = tempfile::tempdir().unwrap();
    let gold = dir.path().join("g.jsonl");
    std::fs::write(
        &gold,
        "{\"sentence\": \"Heavy rain causes flooding.\", \"claims\": [{\"cause\": \"Heavy rain\", \"effect\": \"flooding\"}]}\n{\"sentence\": \"Dust causes coughing.\", \"claims\": []}\n{\"sentence\": \"The hens laid eggs.\", \"claims\": [{\"cause\": \"hens\", \"effect\": \"eggs\"}]}\n",
    )
    .unwrap();
    let out = hearsay()
        .args([
            "--format",
            "json",
            "eval",
            "--gold-format",
            "jsonl",
            "--errors",
            "--gold",
        ])
        .arg(&gold)
        .output()
        .unwrap();
    let lines: Vec<Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(
        (
            lines[0]["tp"].as_u64(),
            lines[0]["fp"].as_u64(),
            lines[0]["fn"].as_u64()
        ),
        (Some(1), Some(1), Some(1))
    );
    let outcomes: Vec<&str> = lines[1..]
        .iter()
        .map(|l| l["outcome"].as_str().unwrap())
        .collect();
    assert_eq!(outcomes.len(), 2);
    assert!(outcomes.contains(&"false_positive") && outcomes.contains(&"false_negative"));
    let fp = lines[1..]
        .iter()
        .find(|l| l["outcome"] == "false_positive")
        .unwrap();
    assert_eq!(fp["sentence"], "Dust causes coughing.");
    assert_eq!(fp["pair"]["cause"], "Dust");
}

/// Source: UD English-EWT test split (CC BY-SA 4.0), ../shared/data/pos-treebank/SOURCE.txt and
/// ud-english-ewt/SOURCE.txt; Penn Treebank tags (XPOS column). The model was trained on the
/// EWT train split and GUM, never on this file.
#[test]
fn tagger_accuracy_on_ewt_test() {
    let Some(test) = shared_data("pos-treebank/ud-english-ewt/en_ewt-ud-test.conllu") else {
        return;
    };
    let gold = hearsay::extract::read_conllu(&std::fs::read_to_string(test).unwrap());
    let acc = hearsay::extract::tagger_accuracy(hearsay::extract::Tagger::load_builtin(), &gold);
    let tokens: usize = gold.iter().map(Vec::len).sum();
    eprintln!("tagger on EWT test: accuracy {acc:.4} over {tokens} tokens");
    assert!(tokens > 20_000);
    assert!(acc >= 0.935, "tagger accuracy {acc} fell under 0.935");
}

/// The shipped model stays small and says where it came from.
#[test]
fn tagger_model_is_small_and_has_its_notice() {
    let size = std::fs::metadata(root().join("patterns/tagger.model"))
        .unwrap()
        .len();
    assert!(size < 5_000_000, "patterns/tagger.model is {size} bytes");
    let notice = std::fs::read_to_string(root().join("patterns/tagger.NOTICE")).unwrap();
    assert!(notice.contains("CC BY-SA 4.0") && notice.contains("CC BY 4.0"));
}
