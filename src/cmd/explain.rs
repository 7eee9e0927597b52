//! `hearsay explain "a sentence"`: which cues fired, which spans were chosen and why.

use super::{escape, Format, Global};
use anyhow::Result;
use clap::Args;
use hearsay::extract::{
    explain_confidence, sentence_attempts, Contribution, Extractor, TaggedSentence,
};
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "The debugging tool for pattern authors: for every cue that matched, the \
spans chosen, the sign and modality, the confidence with the features that weigh most in it, \
and the reasons; when no claim results, why not. Several \
sentences may be given in one string; a connective that opens a sentence looks at the one before."
)]
pub struct ExplainArgs {
    /// The text to explain (one or more sentences).
    pub text: String,
    /// Also print the part-of-speech tag (Penn Treebank) the span finder sees for each word of
    /// each sentence, as `word/TAG`.
    #[arg(long)]
    pub tags: bool,
}

#[derive(Serialize)]
struct Explained {
    /// Where the sentence stopped or ended: `claim` (a claim was made), `rejected` (a cue
    /// matched and a rule dropped it), `no-pattern` (cue words, but no pattern around them),
    /// `no-cue` (no cue word at all).
    stage: &'static str,
    /// The cue entry, absent for `no-cue` and `no-pattern`.
    cue: Option<String>,
    matched: Option<String>,
    claim: Option<hearsay::Claim>,
    rejected: Option<String>,
    notes: Vec<String>,
    /// The features behind the claim's confidence, largest effect first.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    confidence_features: Vec<Contribution>,
}

/// How many features the table output lists under a claim's confidence.
const TOP_FEATURES: usize = 6;

pub fn run(g: &Global, a: &ExplainArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let rows = explained(&ex, &a.text);
    let mut out = std::io::stdout().lock();
    if a.tags {
        write_tags(&mut out, &ex, &a.text)?;
    }
    // A text with no cue attempt still gets an answer, in every format: why nothing matched.
    let rows = if rows.is_empty() {
        vec![no_match(&ex, &a.text)]
    } else {
        rows
    };
    match g.format() {
        Format::Json => {
            for r in &rows {
                serde_json::to_writer(&mut out, r)?;
                out.write_all(b"\n")?;
            }
        }
        Format::Csv => write_csv(&mut out, &rows)?,
        Format::Table => {
            for r in &rows {
                write_row(&mut out, &ex, r)?;
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

/// A cue whose anchor word occurs in the text but whose `reject_before` or `reject_after` rule
/// fires there ("The sharp increase", "a pay raise"): the cue and the rule that dropped it.
fn rejected_by_rule(
    ex: &Extractor,
    text: &str,
    hits: &[hearsay::extract::Hit],
) -> Option<Explained> {
    for h in hits {
        let word: String = text[h.pos..]
            .split(|c: char| !c.is_alphanumeric() && c != '-')
            .next()
            .unwrap_or("")
            .to_lowercase();
        let end = h.pos + word.len();
        for c in &ex.cues.cues {
            if !c.anchors.iter().any(|a| a.trim_start_matches('-') == word) {
                continue;
            }
            let rules = [
                ("reject_before", &c.spec.reject_before, &text[..h.pos]),
                ("reject_after", &c.spec.reject_after, &text[end..]),
            ];
            for (name, rule, around) in rules {
                let Some(rule) = rule else { continue };
                // The rules compiled when the extractor was built, so this one compiles too.
                let Ok(re) = regex::Regex::new(rule) else {
                    continue;
                };
                if re.is_match(around) {
                    return Some(Explained {
                        stage: "rejected",
                        cue: Some(c.spec.id.clone()),
                        matched: Some(word.clone()),
                        claim: None,
                        rejected: Some(format!(
                            "the cue's {name} rule fired: \"{word}\" is read in another sense \
                             here (a noun use, a name or a fixed phrase)"
                        )),
                        notes: vec![format!("{name} = '{rule}'")],
                        confidence_features: Vec::new(),
                    });
                }
            }
        }
    }
    None
}

/// One CSV row per attempt: the stage, the cue, the claim's parts or the reason for none.
fn write_csv(out: &mut impl Write, rows: &[Explained]) -> Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record([
        "stage",
        "cue",
        "matched",
        "cause",
        "effect",
        "kind",
        "polarity",
        "modality",
        "attribution",
        "confidence",
        "reason",
    ])?;
    for r in rows {
        let c = r.claim.as_ref();
        w.write_record([
            r.stage.to_string(),
            r.cue.clone().unwrap_or_default(),
            r.matched.clone().unwrap_or_default(),
            c.map(|c| c.cause.text.clone()).unwrap_or_default(),
            c.map(|c| c.effect.text.clone()).unwrap_or_default(),
            c.map(|c| c.kind.to_string()).unwrap_or_default(),
            c.map(|c| c.polarity.to_string()).unwrap_or_default(),
            c.map(|c| c.modality.to_string()).unwrap_or_default(),
            c.and_then(|c| c.attribution.clone()).unwrap_or_default(),
            c.map(|c| format!("{:.3}", c.confidence))
                .unwrap_or_default(),
            r.rejected.clone().unwrap_or_default(),
        ])?;
    }
    w.flush()?;
    Ok(())
}

/// Every cue attempt of the text, each claim scored as the pipeline scores it.
fn explained(ex: &Extractor, text: &str) -> Vec<Explained> {
    let (claims, attempts) = sentence_attempts(ex, text);
    attempts
        .into_iter()
        .map(|t| {
            let (mut claim, rejected) = match t.result {
                Ok(c) => (Some(c), None),
                Err(e) => (None, Some(e)),
            };
            // Attempts are recorded before scoring: score each claim as the pipeline does.
            let mut confidence_features = Vec::new();
            if let Some(c) = claim.as_mut() {
                let sentence = text.get(c.source.start..c.source.end).unwrap_or("");
                let tagged = TaggedSentence::from_tokens(
                    sentence,
                    c.source.start,
                    ex.sentence_tokens(sentence),
                );
                let (p, why) = explain_confidence(&ex.confidence, &ex.cues, c, &tagged, &claims);
                c.confidence = p;
                confidence_features = why;
            }
            Explained {
                stage: if claim.is_some() { "claim" } else { "rejected" },
                cue: Some(t.cue),
                matched: Some(t.matched),
                claim,
                rejected,
                notes: t.notes,
                confidence_features,
            }
        })
        .collect()
}

/// `--tags`: each sentence's words with the part-of-speech tags the span finder sees ("?" for a
/// word outside every cue's tagging window).
fn write_tags(out: &mut impl Write, ex: &Extractor, text: &str) -> Result<()> {
    for s in hearsay::sentences::split(text) {
        let sentence = &text[s.start..s.end];
        let toks = ex.sentence_tokens(sentence);
        let tagged: Vec<String> = toks
            .iter()
            .map(|t| {
                let tag = t.tag.map_or("?", |t| t.as_str());
                format!("{}/{tag}", &sentence[t.start..t.end])
            })
            .collect();
        writeln!(out, "tags: {}", escape(&tagged.join(" ")))?;
    }
    Ok(())
}

/// Why no cue matched: no cue word at all, or cue words no pattern matched around (a cue's
/// `reject_before`/`reject_after` rule, or no slot where the pattern needs one).
fn no_match(ex: &Extractor, text: &str) -> Explained {
    let hits = ex.cues.hits(text);
    if let Some(r) = rejected_by_rule(ex, text, &hits) {
        return r;
    }
    let (stage, why) = if hits.is_empty() {
        (
            "no-cue",
            format!(
                "no cue word found: none of the {} cue literals occurs in the text",
                ex.cues.literals().len()
            ),
        )
    } else {
        let words: Vec<&str> = hits
            .iter()
            .map(|h| &text[h.pos..])
            .map(|s| {
                s.split(|c: char| !c.is_alphanumeric() && c != '-')
                    .next()
                    .unwrap_or("")
            })
            .collect();
        (
            "no-pattern",
            format!(
                "cue words found ({}), but no cue pattern matched around them: a slot is \
                 pattern needs is missing",
                words.join(", ")
            ),
        )
    };
    Explained {
        stage,
        cue: None,
        matched: None,
        claim: None,
        rejected: Some(why),
        notes: Vec::new(),
        confidence_features: Vec::new(),
    }
}

/// One cue attempt as a table: the claim and its confidence, or why there is none; the notes.
fn write_row(out: &mut impl Write, ex: &Extractor, r: &Explained) -> Result<()> {
    match (&r.cue, &r.matched) {
        (Some(cue), Some(m)) => writeln!(out, "cue {cue} matched \"{}\"", escape(m))?,
        _ => {
            writeln!(out, "{}", escape(r.rejected.as_deref().unwrap_or_default()))?;
            return Ok(());
        }
    }
    match (&r.claim, &r.rejected) {
        (Some(c), _) => {
            writeln!(
                out,
                "  cause:    \"{}\"  (key \"{}\")",
                escape(&c.cause.text),
                c.cause.key
            )?;
            writeln!(
                out,
                "  effect:   \"{}\"  (key \"{}\")",
                escape(&c.effect.text),
                c.effect.key
            )?;
            writeln!(
                out,
                "  kind:     {}\n  polarity: {}\n  modality: {}",
                c.kind, c.polarity, c.modality
            )?;
            if let Some(by) = &c.attribution {
                writeln!(out, "  said by:  \"{}\"", escape(by))?;
            }
            if c.cross_sentence {
                writeln!(out, "  (a slot was taken from the previous sentence)")?;
            }
            let top: Vec<String> = r
                .confidence_features
                .iter()
                .take(TOP_FEATURES)
                .map(|f| format!("{} {:+.2}", f.feature, f.weight))
                .collect();
            writeln!(
                out,
                "  confidence: {:.3}  (bias {:+.2}; largest weights: {})",
                c.confidence,
                ex.confidence.bias,
                if top.is_empty() {
                    "none".to_string()
                } else {
                    escape(&top.join(", "))
                }
            )?;
        }
        (None, Some(why)) => writeln!(out, "  no claim: {}", escape(why))?,
        (None, None) => {}
    }
    for n in &r.notes {
        writeln!(out, "  - {}", escape(n))?;
    }
    Ok(())
}
