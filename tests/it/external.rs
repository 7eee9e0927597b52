//! Checks against data from outside the project.

use crate::common::*;

/// Source: SemEval-2010 Task 8 training split (Hendrickx et al. 2010), CC BY 3.0;
/// ../shared/data/semeval2010-task8/SOURCE.txt. 8000 sentences, 1003 Cause-Effect.
/// Matching rule as in `hearsay eval --help`. The floors sit just under what the current
/// patterns reach, so that a regression fails.
#[test]
fn semeval2010_task8_cause_effect_precision_and_recall() {
    let Some(gold) = shared_data("semeval2010-task8/TRAIN_FILE.TXT") else {
        return;
    };
    let s = eval_json("semeval2010", &gold);
    eprintln!("SemEval-2010 Task 8 train: precision {} recall {} f1 {} (tp {} fp {} fn {}), claims on negatives {}", s["precision"], s["recall"], s["f1"], s["tp"], s["fp"], s["fn_"], s["negative_claim_rate"]);
    assert_eq!(s["items"], 8000);
    assert_eq!(
        s["positives"], 1003,
        "the file has 1003 Cause-Effect sentences (SOURCE.txt)"
    );
    let (p, r) = (
        s["precision"].as_f64().unwrap(),
        s["recall"].as_f64().unwrap(),
    );
    assert!(
        p >= PRECISION_FLOOR,
        "precision {p} fell under {PRECISION_FLOOR}"
    );
    assert!(r >= RECALL_FLOOR, "recall {r} fell under {RECALL_FLOOR}");
    // 0.7525 was the first target; whole constructions (relatives, reduced relatives, "Y after
    // X", change nouns kept in the span) took it to 0.8002.
    let f1 = s["f1"].as_f64().unwrap();
    assert!(f1 >= F1_FLOOR, "F1 {f1} fell under {F1_FLOOR}");
    let neg = s["negative_claim_rate"].as_f64().unwrap();
    assert!(
        neg < 0.01,
        "{neg} of the non-causal marked pairs got a claim (target: under 1%)"
    );
}

const PRECISION_FLOOR: f64 = 0.91;
const RECALL_FLOOR: f64 = 0.712;
const F1_FLOOR: f64 = 0.799;
