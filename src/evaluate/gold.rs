//! Labelled data with cause and effect *spans*: BECAUSE (brat standoff), the Causal News Corpus
//! (CSV) and hearsay's own JSON Lines gold format.
//!
//! Every format is read into the same shape, a [`GoldDoc`]: a text and the claims it states at
//! byte offsets into that text. A document may be one sentence (CNC, JSON Lines) or a whole
//! transcript (BECAUSE); scoring ([`crate::evaluate::score_spans`]) runs the ordinary pipeline over the text
//! either way, so the sentence splitter is part of what is measured. SemEval-2010, whose gold
//! marks short nominals rather than spans, keeps its own reader and rule in [`crate::evaluate`].
//!
//! ## The JSON Lines gold format
//!
//! One object a line; blank lines and lines starting with `#` are skipped:
//!
//! ```json
//! {"id": "s1", "sentence": "Heavy rain may cause flooding.",
//!  "claims": [{"cause": "Heavy rain", "effect": "flooding",
//!              "kind": "causal", "polarity": "increase", "modality": "hedged"}]}
//! ```
//!
//! `id` is optional (the line number is used). `cause` and `effect` are substrings of `sentence`
//! (the first occurrence is taken; `cause_at` / `effect_at` give a byte offset to pick a later
//! one). `kind`, `polarity` and `modality` are optional and, when given, scored on matched
//! claims. An empty `claims` list marks a sentence that states no claim: any claim found there
//! is a false positive.

use crate::claim::{Kind, Modality, Polarity};
use crate::error::InputError;
use crate::evaluate::GoldSpan;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The sign BECAUSE gives a causal relation (its `Degree` attribute).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Sign {
    /// The cause makes the effect more likely or larger (BECAUSE's default).
    Facilitate,
    /// The cause makes the effect less likely or smaller, or prevents it.
    Inhibit,
}

impl Sign {
    /// Does a predicted polarity agree with this sign? Facilitate = increase or unsigned;
    /// Inhibit = decrease or prevent. A denial (`none`) agrees with neither.
    pub fn agrees(self, p: Polarity) -> bool {
        match self {
            Sign::Facilitate => matches!(p, Polarity::Increase | Polarity::Unsigned),
            Sign::Inhibit => matches!(p, Polarity::Decrease | Polarity::Prevent),
        }
    }
}

/// One expected claim.
#[derive(Debug, Clone, Serialize)]
pub struct GoldClaim {
    pub cause: GoldSpan,
    pub effect: GoldSpan,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub kind: Option<Kind>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub polarity: Option<Polarity>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub modality: Option<Modality>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sign: Option<Sign>,
    /// The annotation's own label for the relation (BECAUSE event type, say).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub label: Option<String>,
}

/// A labelled text: its expected claims, and (for sentence-level data) whether it is causal.
#[derive(Debug, Clone, Serialize)]
pub struct GoldDoc {
    pub id: String,
    pub text: String,
    pub claims: Vec<GoldClaim>,
    /// Sentence-level label (CNC subtask 1), when the data has one and no spans.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub causal: Option<bool>,
    /// Does the text come one paragraph a line (decided as the text reader decides)?
    #[serde(skip)]
    pub lines_are_paragraphs: bool,
}

/// Char offsets (brat) to byte offsets.
fn char_to_byte(text: &str) -> Vec<usize> {
    let mut v: Vec<usize> = text.char_indices().map(|(b, _)| b).collect();
    v.push(text.len());
    v
}

/// Parse one BECAUSE document: its `.txt` and `.ann` (brat standoff). Events of type
/// Consequence, Motivation and Purpose with both a Cause and an Effect argument become claims;
/// `Degree` gives the sign (Facilitate when absent, as `annotation.conf` declares).
pub fn parse_because(id: &str, text: &str, ann: &str) -> Result<GoldDoc, InputError> {
    let offsets = char_to_byte(text);
    let mut spans: BTreeMap<&str, GoldSpan> = BTreeMap::new();
    let mut events: Vec<(&str, &str, BTreeMap<&str, &str>)> = Vec::new();
    let mut inhibit: Vec<&str> = Vec::new();
    let path = format!("{id}.ann");
    for (n, line) in ann.lines().enumerate() {
        let fields: Vec<&str> = line.split('\t').collect();
        let Some(key) = fields.first().copied() else {
            continue;
        };
        if key.starts_with('T') {
            let meta = fields
                .get(1)
                .ok_or_else(|| InputError::invalid(&path, n + 1, "text-bound line without type"))?;
            // "Type START END" or "Type START END;START END" (discontinuous): take the outer range.
            let mut parts = meta.split(' ');
            let _ty = parts.next();
            let rest: Vec<usize> = parts
                .flat_map(|p| p.split(';'))
                .map(|x| x.parse::<usize>())
                .collect::<Result<_, _>>()
                .map_err(|_| InputError::invalid(&path, n + 1, "bad offsets"))?;
            let (Some(&s), Some(&e)) = (rest.iter().min(), rest.iter().max()) else {
                return Err(InputError::invalid(&path, n + 1, "missing offsets"));
            };
            let (Some(&bs), Some(&be)) = (offsets.get(s), offsets.get(e)) else {
                return Err(InputError::invalid(&path, n + 1, "offset past end of text"));
            };
            spans.insert(key, GoldSpan { start: bs, end: be });
        } else if key.starts_with('E') {
            let body = fields.get(1).copied().unwrap_or("");
            let mut args = body.split(' ');
            let ty = args.next().and_then(|a| a.split(':').next()).unwrap_or("");
            let roles = args.filter_map(|a| a.split_once(':')).collect();
            events.push((key, ty, roles));
        } else if key.starts_with('A') {
            let body: Vec<&str> = fields.get(1).copied().unwrap_or("").split(' ').collect();
            if body.len() == 3 && body[0] == "Degree" && body[2] == "Inhibit" {
                inhibit.push(body[1]);
            }
        }
    }
    let mut claims = Vec::new();
    for (key, ty, roles) in &events {
        if !matches!(*ty, "Consequence" | "Motivation" | "Purpose") {
            continue;
        }
        let role = |r: &str| {
            roles
                .iter()
                .find(|(k, _)| k.trim_end_matches(char::is_numeric) == r)
                .and_then(|(_, t)| spans.get(t).copied())
        };
        let (Some(cause), Some(effect)) = (role("Cause"), role("Effect")) else {
            continue;
        };
        claims.push(GoldClaim {
            cause,
            effect,
            kind: Some(Kind::Causal),
            polarity: None,
            modality: None,
            sign: Some(if inhibit.contains(key) {
                Sign::Inhibit
            } else {
                Sign::Facilitate
            }),
            label: Some(ty.to_string()),
        });
    }
    Ok(GoldDoc {
        id: id.to_string(),
        text: text.to_string(),
        claims,
        causal: None,
        lines_are_paragraphs: lines_are_paragraphs(text),
    })
}

/// The text reader's rule (see `corpus`): long lines, seldom blank, hold one paragraph each.
fn lines_are_paragraphs(text: &str) -> bool {
    use crate::corpus::readers::text::TextReader;
    use crate::corpus::Reader;
    let mut found = false;
    let mut warnings = Vec::new();
    let opts = crate::corpus::ReadOptions::default();
    let read = TextReader.read(
        "gold",
        text.as_bytes(),
        &opts,
        &mut warnings,
        &mut |d: crate::corpus::Document| {
            found = d.lines_are_paragraphs;
        },
    );
    read.is_ok() && found
}

/// Parse a Causal News Corpus CSV. Subtask 2 files (with a `text_w_pairs` column) give one row
/// per cause–effect pair, `<ARG0>` the cause and `<ARG1>` the effect; rows of one sentence are
/// grouped into one document. Subtask 1 files (`index,text,label`) give sentence labels only.
pub fn parse_cnc(path: &str, csv_text: &str) -> Result<Vec<GoldDoc>, InputError> {
    let mut rd =
        csv::ReaderBuilder::new().from_reader(csv_text.trim_start_matches('\u{feff}').as_bytes());
    let headers = rd
        .headers()
        .map_err(|e| InputError::invalid(path, 1, e.to_string()))?
        .clone();
    let col = |name: &str| headers.iter().position(|h| h == name);
    let mut docs: Vec<GoldDoc> = Vec::new();
    let mut by_sentence: BTreeMap<String, usize> = BTreeMap::new();
    if let Some(pairs) = col("text_w_pairs") {
        let (Some(corpus), Some(doc), Some(sent)) = (col("corpus"), col("doc_id"), col("sent_id"))
        else {
            return Err(InputError::invalid(
                path,
                1,
                "expected corpus, doc_id and sent_id columns",
            ));
        };
        for (n, rec) in rd.records().enumerate() {
            let line = n + 2;
            let rec = rec.map_err(|e| InputError::invalid(path, line, e.to_string()))?;
            let field = |i: usize| rec.get(i).unwrap_or("");
            let id = format!("{}_{}_{}", field(corpus), field(doc), field(sent));
            let (text, cause, effect) = strip_cnc_tags(field(pairs))
                .ok_or_else(|| InputError::invalid(path, line, "missing <ARG0>/<ARG1> tags"))?;
            let claim = GoldClaim {
                cause,
                effect,
                kind: Some(Kind::Causal),
                polarity: None,
                modality: None,
                sign: None,
                label: None,
            };
            match by_sentence.get(&id) {
                Some(&i) => docs[i].claims.push(claim),
                None => {
                    by_sentence.insert(id.clone(), docs.len());
                    docs.push(GoldDoc {
                        id,
                        text,
                        claims: vec![claim],
                        causal: None,
                        lines_are_paragraphs: false,
                    });
                }
            }
        }
    } else if let (Some(idx), Some(text), Some(label)) = (col("index"), col("text"), col("label")) {
        for (n, rec) in rd.records().enumerate() {
            let line = n + 2;
            let rec = rec.map_err(|e| InputError::invalid(path, line, e.to_string()))?;
            let causal = match rec.get(label) {
                Some("1") => true,
                Some("0") => false,
                _ => return Err(InputError::invalid(path, line, "label must be 0 or 1")),
            };
            docs.push(GoldDoc {
                id: rec.get(idx).unwrap_or("").to_string(),
                text: rec.get(text).unwrap_or("").to_string(),
                claims: Vec::new(),
                causal: Some(causal),
                lines_are_paragraphs: false,
            });
        }
    } else {
        return Err(InputError::invalid(
            path,
            1,
            "expected a subtask 2 header (text_w_pairs) or a subtask 1 header (index,text,label)",
        ));
    }
    Ok(docs)
}

/// Remove `<ARGn>`/`<SIGn>` tags; return the plain text and the ARG0 (cause) and ARG1 (effect)
/// spans.
fn strip_cnc_tags(s: &str) -> Option<(String, GoldSpan, GoldSpan)> {
    let mut out = String::with_capacity(s.len());
    let (mut a0, mut a1) = ((None, None), (None, None));
    let mut rest = s;
    while let Some(p) = rest.find('<') {
        out.push_str(&rest[..p]);
        let Some(close) = rest[p..].find('>') else {
            out.push_str(&rest[p..]);
            rest = "";
            break;
        };
        let tag = &rest[p + 1..p + close];
        let known = tag.trim_start_matches('/');
        if known.starts_with("ARG") || known.starts_with("SIG") {
            match tag {
                "ARG0" => a0.0 = Some(out.len()),
                "/ARG0" => a0.1 = Some(out.len()),
                "ARG1" => a1.0 = Some(out.len()),
                "/ARG1" => a1.1 = Some(out.len()),
                _ => {}
            }
        } else {
            out.push_str(&rest[p..=p + close]);
        }
        rest = &rest[p + close + 1..];
    }
    out.push_str(rest);
    let span = |(s, e): (Option<usize>, Option<usize>)| Some(GoldSpan { start: s?, end: e? });
    Some((out, span(a0)?, span(a1)?))
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct JsonItem {
    #[serde(default)]
    id: Option<String>,
    sentence: String,
    #[serde(default)]
    claims: Vec<JsonClaim>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct JsonClaim {
    cause: String,
    effect: String,
    #[serde(default)]
    cause_at: Option<usize>,
    #[serde(default)]
    effect_at: Option<usize>,
    #[serde(default)]
    kind: Option<String>,
    #[serde(default)]
    polarity: Option<String>,
    #[serde(default)]
    modality: Option<String>,
}

/// Parse hearsay's JSON Lines gold format (see the module documentation).
pub fn parse_jsonl(path: &str, text: &str) -> Result<Vec<GoldDoc>, InputError> {
    let mut docs = Vec::new();
    for (n, line) in text.lines().enumerate() {
        let l = line.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let bad = |m: String| InputError::invalid(path, n + 1, m);
        let item: JsonItem = serde_json::from_str(l).map_err(|e| bad(e.to_string()))?;
        let mut claims = Vec::new();
        for c in item.claims {
            let find = |what: &str, at: Option<usize>| -> Result<GoldSpan, InputError> {
                let from = at.unwrap_or(0);
                let start = item
                    .sentence
                    .get(from..)
                    .and_then(|s| s.find(what))
                    .map(|p| p + from)
                    .filter(|_| !what.is_empty())
                    .ok_or_else(|| bad(format!("'{what}' is not in the sentence")))?;
                Ok(GoldSpan {
                    start,
                    end: start + what.len(),
                })
            };
            claims.push(GoldClaim {
                cause: find(&c.cause, c.cause_at)?,
                effect: find(&c.effect, c.effect_at)?,
                kind: word(c.kind.as_deref()).map_err(bad)?,
                polarity: word(c.polarity.as_deref()).map_err(bad)?,
                modality: word(c.modality.as_deref()).map_err(bad)?,
                sign: None,
                label: None,
            });
        }
        docs.push(GoldDoc {
            id: item.id.unwrap_or_else(|| format!("line {}", n + 1)),
            text: item.sentence,
            claims,
            causal: None,
            lines_are_paragraphs: false,
        });
    }
    Ok(docs)
}

fn word<T: std::str::FromStr<Err = String>>(v: Option<&str>) -> Result<Option<T>, String> {
    v.map(str::parse).transpose()
}
