//! Reading a model's answers: one row per answer, in CSV or JSON Lines, each resolved to a
//! question with variable keys.

use crate::claim::Polarity;
use crate::compare::questions::{question_id, Family, Question, Wording};
use crate::error::InputError;
use crate::variables::Normalizer;
use serde::Serialize;
use std::collections::{BTreeSet, HashMap};
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

/// The distinct questions among the answers, in first-answer order.
pub fn asked(answers: &[Answer]) -> Vec<Asked> {
    let mut seen = BTreeSet::new();
    answers
        .iter()
        .filter(|a| seen.insert(a.question.id.clone()))
        .map(|a| a.question.clone())
        .collect()
}
