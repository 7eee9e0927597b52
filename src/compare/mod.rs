//! Set a model's answers to causal questions beside what the corpus states.
//!
//! hearsay never calls a model: the user answers the questions of `hearsay questions` in any way
//! they like, and this module reads those answers ([`read_answers`]), gives every question the
//! corpus's support profile ([`profiles`]), and summarises how closely the answers follow it
//! ([`summarise`]). Support is computed from the claim graph and one index query per variable
//! ([`MentionIndex`]), never by a scan per pair, so hundreds of pairs cost about as much as one.
//!
//! Agreement with the corpus means the answer follows what the text states. It is not
//! correctness: the corpus's statements are not evidence that the causation is real.

pub mod questions;
pub mod stats;

use crate::claim::{Modality, Polarity};
use crate::compare::questions::{question_id, Family, Question, Wording};
use crate::error::InputError;
use crate::graph::{ClaimGraph, Relation};
use crate::query::comention::{claim_sentences, MentionIndex};
use crate::variables::{Aliases, Normalizer};
use petgraph::graph::NodeIndex;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fmt;
use std::path::Path;

/// A categorical answer.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Label {
    Yes,
    No,
    Unsure,
}

impl fmt::Display for Label {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Label::Yes => "yes",
            Label::No => "no",
            Label::Unsure => "unsure",
        })
    }
}

/// Read an answer cell: yes, no, unsure, or a probability of yes in [0, 1]. A probability above
/// one half counts as yes, below as no, exactly one half as unsure.
pub fn parse_answer(s: &str) -> Result<(Label, f64), String> {
    let t = s.trim().to_ascii_lowercase();
    match t.as_str() {
        "yes" | "true" => return Ok((Label::Yes, 1.0)),
        "no" | "false" => return Ok((Label::No, 0.0)),
        "unsure" => return Ok((Label::Unsure, 0.5)),
        "" => return Err("the answer is empty".into()),
        _ => {}
    }
    match t.parse::<f64>() {
        Ok(p) if (0.0..=1.0).contains(&p) => {
            let l = if p > 0.5 {
                Label::Yes
            } else if p < 0.5 {
                Label::No
            } else {
                Label::Unsure
            };
            Ok((l, p))
        }
        _ => Err(format!(
            "answer '{s}' is not yes, no, unsure or a probability between 0 and 1"
        )),
    }
}

/// A question, resolved to variable keys.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Asked {
    pub id: String,
    pub x: String,
    pub y: String,
    pub x_key: String,
    pub y_key: String,
    pub family: Family,
    pub template: String,
    /// For the sign family: the sign asked about.
    #[serde(skip)]
    pub sign: Option<Polarity>,
}

/// One model's answer to one question.
#[derive(Debug, Clone)]
pub struct Answer {
    /// Line (CSV, JSON Lines) of the answer in its file.
    pub line: usize,
    pub model: String,
    pub question: Asked,
    pub label: Label,
    pub p_yes: f64,
}

/// What answer rows are resolved against: the normaliser, the wordings, and (optionally) the
/// question set, for rows that give only an id.
pub struct AnswerContext<'a> {
    pub normalizer: &'a Normalizer,
    pub wordings: &'a [Wording],
    pub questions: &'a [Question],
}

type Record = (usize, HashMap<String, String>);

fn records(path: &Path, text: &str) -> Result<Vec<Record>, InputError> {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    let json = match ext.as_str() {
        "csv" => false,
        "jsonl" | "json" | "ndjson" => true,
        _ => text.trim_start().starts_with('{'),
    };
    let mut out = Vec::new();
    if json {
        for (i, l) in text.lines().enumerate() {
            if l.trim().is_empty() {
                continue;
            }
            let v: serde_json::Map<String, serde_json::Value> = serde_json::from_str(l)
                .map_err(|e| InputError::invalid(path, i + 1, format!("not a JSON object: {e}")))?;
            let rec = v
                .into_iter()
                .filter_map(|(k, v)| {
                    let s = match v {
                        serde_json::Value::String(s) => s,
                        serde_json::Value::Number(n) => n.to_string(),
                        serde_json::Value::Bool(b) => b.to_string(),
                        _ => return None,
                    };
                    Some((k.trim().to_ascii_lowercase(), s))
                })
                .collect();
            out.push((i + 1, rec));
        }
    } else {
        let mut r = csv::ReaderBuilder::new().from_reader(text.as_bytes());
        let headers: Vec<String> = r
            .headers()
            .map_err(|e| InputError::invalid(path, 1, format!("bad CSV header: {e}")))?
            .iter()
            .map(|h| h.trim().to_ascii_lowercase())
            .collect();
        for rec in r.records() {
            let rec = rec.map_err(|e| {
                let line = e.position().map_or(0, |p| p.line() as usize);
                InputError::invalid(path, line, format!("bad CSV record: {e}"))
            })?;
            let line = rec.position().map_or(0, |p| p.line() as usize);
            let map = headers
                .iter()
                .cloned()
                .zip(rec.iter().map(str::to_string))
                .collect();
            out.push((line, map));
        }
    }
    Ok(out)
}

/// Read an answers file (CSV or JSON Lines, by extension, else by its first character). Each row
/// gives `answer`, optionally `model`, and the question: its `id` (looked up in the question set)
/// or `x`, `y` and `family` (optionally `template`, the wording id).
pub fn read_answers(
    path: &Path,
    text: &str,
    cx: &AnswerContext,
) -> Result<Vec<Answer>, InputError> {
    let by_id: HashMap<&str, &Question> = cx.questions.iter().map(|q| (q.id.as_str(), q)).collect();
    let mut seen: HashMap<(String, String), usize> = HashMap::new();
    let mut out = Vec::new();
    for (line, rec) in records(path, text)? {
        let err = |m: String| InputError::invalid(path, line, m);
        let get = |k: &str| rec.get(k).map(|s| s.trim()).filter(|s| !s.is_empty());
        let answer = get("answer").ok_or_else(|| err("no `answer` value".into()))?;
        let (label, p_yes) = parse_answer(answer).map_err(err)?;
        let model = get("model").unwrap_or("model").to_string();
        let known = get("id").and_then(|id| by_id.get(id).copied());
        let question = match (get("x"), get("y"), known) {
            (Some(x), Some(y), _) => {
                let family = match (get("family"), known) {
                    (Some(f), _) => f.parse::<Family>().map_err(err)?,
                    (None, Some(q)) => q.family,
                    (None, None) => return Err(err("no `family` for the pair".into())),
                };
                let template = get("template").or(known.map(|q| q.template.as_str()));
                resolve(cx, x, y, family, template, get("id")).map_err(err)?
            }
            (_, _, Some(q)) => {
                resolve(cx, &q.x, &q.y, q.family, Some(&q.template), Some(&q.id)).map_err(err)?
            }
            _ => {
                return Err(err(match get("id") {
                    Some(id) => format!(
                        "question id '{id}' is not in the question set and the row has no x and y \
                         (give --vars or --pairs with the list the questions were made from)"
                    ),
                    None => "the row names no question: give `id`, or `x`, `y` and `family`".into(),
                }))
            }
        };
        if let Some(first) = seen.insert((model.clone(), question.id.clone()), line) {
            return Err(err(format!(
                "model '{model}' answers question {} twice (first on line {first})",
                question.id
            )));
        }
        out.push(Answer {
            line,
            model,
            question,
            label,
            p_yes,
        });
    }
    if out.is_empty() {
        return Err(InputError::invalid(path, 0, "no answers"));
    }
    Ok(out)
}

fn resolve(
    cx: &AnswerContext,
    x: &str,
    y: &str,
    family: Family,
    template: Option<&str>,
    id: Option<&str>,
) -> Result<Asked, String> {
    let (x_key, y_key) = (cx.normalizer.key(x), cx.normalizer.key(y));
    for (name, key) in [(x, &x_key), (y, &y_key)] {
        if key.is_empty() {
            return Err(format!(
                "'{name}' has no content words, so it names no variable"
            ));
        }
    }
    if x_key == y_key {
        return Err(format!("x and y are the same variable (key '{x_key}')"));
    }
    let wording = match template {
        Some(t) => cx.wordings.iter().find(|w| w.id == t),
        None => cx.wordings.iter().find(|w| w.family == family),
    };
    let sign = match (family, wording) {
        (Family::Sign, Some(w)) if w.family == Family::Sign => w.sign,
        (Family::Sign, _) => {
            return Err("a sign question needs `template` naming a sign wording \
                        (such as increase or decrease)"
                .into())
        }
        _ => None,
    };
    let template = template
        .map(str::to_string)
        .or_else(|| wording.map(|w| w.id.clone()))
        .unwrap_or_else(|| family.to_string());
    let id = id
        .map(str::to_string)
        .unwrap_or_else(|| question_id(family, &template, &x_key, &y_key));
    Ok(Asked {
        id,
        x: x.to_string(),
        y: y.to_string(),
        x_key,
        y_key,
        family,
        template,
        sign,
    })
}

/// What the corpus has to say to the question, and the answer it implies.
#[derive(Debug, Clone, Serialize)]
pub struct Profile {
    #[serde(flatten)]
    pub question: Asked,
    /// Causal claims x → y that state rather than deny it (all but negated).
    pub forward: usize,
    /// The same for y → x.
    pub backward: usize,
    /// Every causal claim x → y, and how many of them are hedged or negated.
    pub forward_claims: usize,
    pub hedged: usize,
    pub negated: usize,
    /// (hedged + negated) / forward_claims; absent without claims.
    pub hedged_or_negated_share: Option<f64>,
    /// Association claims between x and y (either order).
    pub association: usize,
    /// Sentences naming both with no claim between them.
    pub co_mentions: usize,
    /// Non-negated claims x → y of the asked sign (sign family only).
    pub signed: Option<usize>,
    /// The support the implied answer is read from: forward (directed, reversed), forward +
    /// backward (symmetric), signed (sign).
    pub support: usize,
    pub corpus_answer: Label,
    /// Both directions reach the threshold (forward and backward support ≥ threshold).
    pub both_stated: bool,
}

/// The graph and index a comparison reads.
pub struct Corpus<'a> {
    pub graph: &'a ClaimGraph,
    pub aliases: &'a Aliases,
    pub mentions: &'a MentionIndex,
    /// Sentences in the index (for PMI).
    pub sentences: u64,
}

impl Corpus<'_> {
    /// The alias-resolved key of a variable, and its node when the graph has it.
    pub fn node(&self, key: &str) -> (String, Option<NodeIndex>) {
        let k = self.aliases.resolve(key).to_string();
        let n = self.graph.index.get(&k).copied();
        (k, n)
    }

    fn edge(&self, a: Option<NodeIndex>, b: Option<NodeIndex>) -> Option<&Relation> {
        self.graph.edge(a?, b?)
    }
}

fn signed_support(rel: Option<&Relation>, sign: Polarity) -> usize {
    let Some(r) = rel else { return 0 };
    let of = |p: Polarity| {
        r.counts.polarity(p)
            - r.counts
                .by
                .get(&p)
                .and_then(|m| m.get(&Modality::Negated))
                .copied()
                .unwrap_or(0)
    };
    match sign {
        Polarity::Decrease => of(Polarity::Decrease) + of(Polarity::Prevent),
        p => of(p),
    }
}

fn opposite(sign: Polarity) -> Polarity {
    if sign == Polarity::Increase {
        Polarity::Decrease
    } else {
        Polarity::Increase
    }
}

/// The implied answer (documented in docs/compare.md): yes when the family's support reaches
/// `threshold` and, for directed questions, exceeds the support of the competing reading
/// (reverse direction; for sign questions, the opposite sign). Otherwise no: "the corpus does not
/// state it", which is not "the corpus denies it".
pub fn implied(family: Family, support: usize, competing: usize, threshold: usize) -> Label {
    let yes = support >= threshold.max(1) && (family == Family::Symmetric || support > competing);
    if yes {
        Label::Yes
    } else {
        Label::No
    }
}

/// The support profile of every question (the order of `asked` is kept).
pub fn profiles(c: &Corpus, asked: &[Asked], threshold: usize) -> Vec<Profile> {
    asked
        .iter()
        .map(|q| {
            let (xk, xn) = c.node(&q.x_key);
            let (yk, yn) = c.node(&q.y_key);
            let fwd = c.edge(xn, yn);
            let (forward, backward) = (
                fwd.map_or(0, Relation::support),
                c.edge(yn, xn).map_or(0, Relation::support),
            );
            let counts = fwd.map(|r| &r.counts);
            let forward_claims = counts.map_or(0, |c| c.total);
            let hedged = counts.map_or(0, |c| c.modality(Modality::Hedged));
            let negated = counts.map_or(0, |c| c.modality(Modality::Negated));
            let association = match (xn, yn) {
                (Some(a), Some(b)) => c.graph.association(a, b).map_or(0, |r| r.counts.total),
                _ => 0,
            };
            let signed = q.sign.map(|s| signed_support(fwd, s));
            let (support, competing) = match (q.family, q.sign) {
                (Family::Symmetric, _) => (forward + backward, 0),
                (Family::Sign, Some(s)) => (signed.unwrap_or(0), signed_support(fwd, opposite(s))),
                _ => (forward, backward),
            };
            Profile {
                question: q.clone(),
                forward,
                backward,
                forward_claims,
                hedged,
                negated,
                hedged_or_negated_share: (forward_claims > 0)
                    .then(|| (hedged + negated) as f64 / forward_claims as f64),
                association,
                co_mentions: c.mentions.co_mentions(c.graph, (&xk, xn), (&yk, yn)),
                signed,
                support,
                corpus_answer: implied(q.family, support, competing, threshold),
                both_stated: forward >= threshold.max(1) && backward >= threshold.max(1),
            }
        })
        .collect()
}

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

/// The "correlation, not causation" view of one unordered pair.
#[derive(Debug, Clone, Serialize)]
pub struct PairView {
    pub x: String,
    pub y: String,
    pub sentences_x: usize,
    pub sentences_y: usize,
    pub sentences_both: usize,
    /// log2(N · both / (x · y)), N the sentences in the corpus; absent when both is 0.
    pub pmi: Option<f64>,
    /// Sentences with a causal claim between x and y (either direction, any modality).
    pub causal_sentences: usize,
    /// Sentences with only an association claim between them.
    pub association_sentences: usize,
    pub co_mentions: usize,
    /// causal / (causal + association + co-mentions).
    pub causal_rate: Option<f64>,
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

/// The "correlation, not causation" view of every unordered pair among the questions.
pub fn pair_views(c: &Corpus, asked: &[Asked]) -> Vec<PairView> {
    let mut seen: BTreeSet<(&str, &str)> = BTreeSet::new();
    let mut out = Vec::new();
    for q in asked {
        let (a, b) = if q.x_key < q.y_key {
            (&q.x_key, &q.y_key)
        } else {
            (&q.y_key, &q.x_key)
        };
        if !seen.insert((a, b)) {
            continue;
        }
        let (xk, xn) = c.node(&q.x_key);
        let (yk, yn) = c.node(&q.y_key);
        let both = c.mentions.both(&xk, &yk).len();
        let (causal, association) = match (xn, yn) {
            (Some(x), Some(y)) => claim_sentences(c.graph, x, y),
            _ => (0, 0),
        };
        let co_mentions = c.mentions.co_mentions(c.graph, (&xk, xn), (&yk, yn));
        let (sx, sy) = (c.mentions.count(&xk), c.mentions.count(&yk));
        let pmi = (both > 0 && c.sentences > 0)
            .then(|| ((c.sentences as f64 * both as f64) / (sx as f64 * sy as f64)).log2());
        let total = causal + association + co_mentions;
        out.push(PairView {
            x: q.x.clone(),
            y: q.y.clone(),
            sentences_x: sx,
            sentences_y: sy,
            sentences_both: both,
            pmi,
            causal_sentences: causal,
            association_sentences: association,
            co_mentions,
            causal_rate: (total > 0).then(|| causal as f64 / total as f64),
        });
    }
    out
}

/// The distinct questions among the answers, in first-answer order.
pub fn asked(answers: &[Answer]) -> Vec<Asked> {
    let mut seen = BTreeSet::new();
    answers
        .iter()
        .filter(|a| seen.insert(a.question.id.clone()))
        .map(|a| a.question.clone())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn answers_are_words_or_probabilities() {
        assert_eq!(parse_answer(" Yes ").unwrap(), (Label::Yes, 1.0));
        assert_eq!(parse_answer("0.5").unwrap(), (Label::Unsure, 0.5));
        assert_eq!(parse_answer("0.2").unwrap().0, Label::No);
        assert!(parse_answer("1.2").is_err());
        assert!(parse_answer("maybe").is_err());
    }

    #[test]
    fn the_implied_answer_needs_the_threshold_and_the_lead() {
        assert_eq!(implied(Family::Directed, 2, 1, 1), Label::Yes);
        assert_eq!(implied(Family::Directed, 2, 2, 1), Label::No);
        assert_eq!(implied(Family::Directed, 2, 0, 3), Label::No);
        assert_eq!(implied(Family::Symmetric, 2, 0, 2), Label::Yes);
        assert_eq!(implied(Family::Reversed, 0, 0, 0), Label::No);
    }
}
