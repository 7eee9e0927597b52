//! How closely a model's answers follow the corpus: agreement and its statistics per model and
//! family, calibration by support, and answers across wordings.

use super::answers::{Answer, Asked, Label};
use super::profile::Profile;
use super::stats;
use crate::compare::questions::Family;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet, HashMap};

/// The summary of one model over one family ("all" for every family together).
#[derive(Debug, Clone, Serialize, Default)]
pub struct Summary {
    pub model: String,
    pub family: String,
    pub questions: usize,
    pub yes: usize,
    pub no: usize,
    pub unsure: usize,
    pub corpus_yes: usize,
    /// Share of answers equal to the corpus answer (unsure never agrees).
    pub agreement: Option<f64>,
    /// Cohen's kappa between the answers (yes/no/unsure) and the corpus answers (yes/no).
    pub kappa: Option<f64>,
    /// ROC AUC of support as a predictor of a "yes".
    pub auc: Option<f64>,
    /// Spearman's rho between support and the probability of yes.
    pub spearman: Option<f64>,
    /// Ordered pairs asked in both directions (same wording), for the asymmetry rate.
    pub both_ways: usize,
    /// Of those: yes in both directions.
    pub model_yes_both: usize,
    /// Of those: the corpus states both directions (support ≥ threshold each way).
    pub corpus_states_both: usize,
    /// model_yes_both / both_ways.
    pub model_both_rate: Option<f64>,
    /// corpus_states_both / both_ways.
    pub corpus_both_rate: Option<f64>,
    /// Questions asked in more than one wording of the same meaning (directed and reversed
    /// wordings of x → y; several wordings of one family): groups, and groups with differing answers.
    pub wording_groups: usize,
    pub wording_differ: usize,
    pub wording_sensitivity: Option<f64>,
}

/// One bin of the calibration table.
#[derive(Debug, Clone, Serialize)]
pub struct CalibrationBin {
    pub model: String,
    pub family: String,
    /// Support range, e.g. "0", "1", "2-3", "16+".
    pub support: String,
    pub questions: usize,
    pub mean_p_yes: f64,
    pub yes_share: f64,
    pub corpus_yes_share: f64,
}

/// One model's answers to one ordered pair across the wordings.
#[derive(Debug, Clone, Serialize)]
pub struct WordingRow {
    pub model: String,
    pub x: String,
    pub y: String,
    /// template → answer.
    pub answers: BTreeMap<String, Label>,
    /// The directed and reversed wordings (the same question) get different answers.
    pub same_question_differs: bool,
    /// Any two of the directed, reversed and symmetric wordings get different answers.
    pub families_differ: bool,
}

/// Everything `compare` reports.
#[derive(Debug, Clone, Serialize)]
pub struct Comparison {
    pub summaries: Vec<Summary>,
    pub calibration: Vec<CalibrationBin>,
    pub wording: Vec<WordingRow>,
}

const BINS: [(usize, usize, &str); 6] = [
    (0, 0, "0"),
    (1, 1, "1"),
    (2, 3, "2-3"),
    (4, 7, "4-7"),
    (8, 15, "8-15"),
    (16, usize::MAX, "16+"),
];

/// Summaries, calibration and wording rows of the answers against the profiles (matched by id).
pub fn summarise(answers: &[Answer], profiles: &[Profile]) -> Comparison {
    let by_id: HashMap<&str, &Profile> = profiles
        .iter()
        .map(|p| (p.question.id.as_str(), p))
        .collect();
    let mut groups: BTreeMap<(&str, String), Vec<(&Answer, &Profile)>> = BTreeMap::new();
    for a in answers {
        let Some(p) = by_id.get(a.question.id.as_str()) else {
            continue;
        };
        groups
            .entry((a.model.as_str(), "all".to_string()))
            .or_default()
            .push((a, p));
        groups
            .entry((a.model.as_str(), a.question.family.to_string()))
            .or_default()
            .push((a, p));
    }
    let mut summaries = Vec::new();
    let mut calibration = Vec::new();
    for ((model, family), rows) in &groups {
        let mut s = summary(model, family, rows);
        if family == "all" {
            let (g, d) = wording_counts(rows);
            s.wording_groups = g;
            s.wording_differ = d;
            s.wording_sensitivity = (g > 0).then(|| d as f64 / g as f64);
        }
        summaries.push(s);
        calibration.extend(calibrate(model, family, rows));
    }
    // "all" first within each model.
    summaries.sort_by(|a, b| {
        (a.model.as_str(), a.family != "all", a.family.as_str()).cmp(&(
            b.model.as_str(),
            b.family != "all",
            b.family.as_str(),
        ))
    });
    calibration.sort_by(|a, b| {
        (a.model.as_str(), a.family != "all", a.family.as_str()).cmp(&(
            b.model.as_str(),
            b.family != "all",
            b.family.as_str(),
        ))
    });
    Comparison {
        summaries,
        calibration,
        wording: wording_rows(answers),
    }
}

fn summary(model: &str, family: &str, rows: &[(&Answer, &Profile)]) -> Summary {
    let n = rows.len();
    let count = |l: Label| rows.iter().filter(|(a, _)| a.label == l).count();
    let model_labels: Vec<Label> = rows.iter().map(|(a, _)| a.label).collect();
    let corpus_labels: Vec<Label> = rows.iter().map(|(_, p)| p.corpus_answer).collect();
    let support: Vec<f64> = rows.iter().map(|(_, p)| p.support as f64).collect();
    let p_yes: Vec<f64> = rows.iter().map(|(a, _)| a.p_yes).collect();
    let said_yes: Vec<bool> = model_labels.iter().map(|l| *l == Label::Yes).collect();
    let agree = model_labels
        .iter()
        .zip(&corpus_labels)
        .filter(|(a, b)| a == b)
        .count();
    // Asymmetry: the same wording asked for (x, y) and (y, x), directed families only.
    let mut by_pair: HashMap<(&str, &str, &str), (Label, bool)> = HashMap::new();
    for (a, p) in rows {
        if a.question.family.is_directed() {
            let q = &a.question;
            by_pair.insert(
                (q.template.as_str(), &q.x_key, &q.y_key),
                (a.label, p.both_stated),
            );
        }
    }
    let (mut both_ways, mut model_yes_both, mut corpus_states_both) = (0, 0, 0);
    for (&(t, x, y), &(m1, stated)) in &by_pair {
        if x < y {
            if let Some(&(m2, _)) = by_pair.get(&(t, y, x)) {
                both_ways += 1;
                model_yes_both += usize::from(m1 == Label::Yes && m2 == Label::Yes);
                corpus_states_both += usize::from(stated);
            }
        }
    }
    let rate = |a: usize, b: usize| (b > 0).then(|| a as f64 / b as f64);
    Summary {
        model: model.to_string(),
        family: family.to_string(),
        questions: n,
        yes: count(Label::Yes),
        no: count(Label::No),
        unsure: count(Label::Unsure),
        corpus_yes: corpus_labels.iter().filter(|l| **l == Label::Yes).count(),
        agreement: rate(agree, n),
        kappa: stats::cohen_kappa(&model_labels, &corpus_labels),
        auc: stats::roc_auc(&support, &said_yes),
        spearman: stats::spearman(&support, &p_yes),
        both_ways,
        model_yes_both,
        corpus_states_both,
        model_both_rate: rate(model_yes_both, both_ways),
        corpus_both_rate: rate(corpus_states_both, both_ways),
        ..Summary::default()
    }
}

/// The meaning a wording asks about: directed and reversed wordings ask the same.
fn meaning(q: &Asked) -> (String, String, String) {
    match q.family {
        Family::Directed | Family::Reversed => ("x→y".into(), q.x_key.clone(), q.y_key.clone()),
        Family::Symmetric => {
            let (a, b) = if q.x_key < q.y_key {
                (&q.x_key, &q.y_key)
            } else {
                (&q.y_key, &q.x_key)
            };
            ("x~y".into(), a.clone(), b.clone())
        }
        Family::Sign => (format!("{:?}", q.sign), q.x_key.clone(), q.y_key.clone()),
    }
}

fn wording_counts(rows: &[(&Answer, &Profile)]) -> (usize, usize) {
    let mut groups: HashMap<(String, String, String), Vec<Label>> = HashMap::new();
    for (a, _) in rows {
        groups
            .entry(meaning(&a.question))
            .or_default()
            .push(a.label);
    }
    let multi: Vec<_> = groups.values().filter(|g| g.len() > 1).collect();
    let differ = multi
        .iter()
        .filter(|g| g.iter().collect::<BTreeSet<_>>().len() > 1)
        .count();
    (multi.len(), differ)
}

fn wording_rows(answers: &[Answer]) -> Vec<WordingRow> {
    let mut by: BTreeMap<(&str, &str, &str), Vec<&Answer>> = BTreeMap::new();
    for a in answers {
        let q = &a.question;
        by.entry((a.model.as_str(), q.x_key.as_str(), q.y_key.as_str()))
            .or_default()
            .push(a);
    }
    by.into_values()
        .map(|v| WordingRow {
            model: v[0].model.clone(),
            x: v[0].question.x.clone(),
            y: v[0].question.y.clone(),
            answers: v
                .iter()
                .map(|a| (a.question.template.clone(), a.label))
                .collect(),
            same_question_differs: differ(&v, &[Family::Directed, Family::Reversed]),
            families_differ: differ(&v, &[Family::Directed, Family::Reversed, Family::Symmetric]),
        })
        .collect()
}

/// True when the answers of these families are not all the same.
fn differ(answers: &[&Answer], families: &[Family]) -> bool {
    answers
        .iter()
        .filter(|a| families.contains(&a.question.family))
        .map(|a| a.label)
        .collect::<BTreeSet<_>>()
        .len()
        > 1
}

fn calibrate(model: &str, family: &str, rows: &[(&Answer, &Profile)]) -> Vec<CalibrationBin> {
    BINS.iter()
        .filter_map(|&(lo, hi, name)| {
            let inbin: Vec<_> = rows
                .iter()
                .filter(|(_, p)| (lo..=hi).contains(&p.support))
                .collect();
            let n = inbin.len() as f64;
            (!inbin.is_empty()).then(|| CalibrationBin {
                model: model.to_string(),
                family: family.to_string(),
                support: name.to_string(),
                questions: inbin.len(),
                mean_p_yes: inbin.iter().map(|(a, _)| a.p_yes).sum::<f64>() / n,
                yes_share: inbin.iter().filter(|(a, _)| a.label == Label::Yes).count() as f64 / n,
                corpus_yes_share: inbin
                    .iter()
                    .filter(|(_, p)| p.corpus_answer == Label::Yes)
                    .count() as f64
                    / n,
            })
        })
        .collect()
}
