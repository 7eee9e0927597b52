//! `hearsay explain "a sentence"`: which cues fired, which spans were chosen and why.

use super::{escape, Format, Global};
use anyhow::Result;
use clap::Args;
use hearsay::extract::confidence::{self, Contribution};
use hearsay::extract::pipeline;
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
    cue: String,
    matched: String,
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
    let (claims, attempts) = pipeline::sentence_attempts(&ex, &a.text);
    let rows: Vec<Explained> = attempts
        .into_iter()
        .map(|t| {
            let (mut claim, rejected) = match t.result {
                Ok(c) => (Some(c), None),
                Err(e) => (None, Some(e)),
            };
            // Attempts are recorded before scoring: score each claim as the pipeline does.
            let mut confidence_features = Vec::new();
            if let Some(c) = claim.as_mut() {
                let (p, why) = confidence::explain(&ex, c, &a.text, &claims);
                c.confidence = p;
                confidence_features = why;
            }
            Explained {
                cue: t.cue,
                matched: t.matched,
                claim,
                rejected,
                notes: t.notes,
                confidence_features,
            }
        })
        .collect();
    let mut out = std::io::stdout().lock();
    if a.tags {
        for s in hearsay::sentences::split(&a.text) {
            let sentence = &a.text[s.start..s.end];
            let mut toks = hearsay::extract::claims::tokenize(sentence);
            ex.tag_tokens(sentence, &mut toks);
            let tagged: Vec<String> = toks
                .iter()
                .map(|t| {
                    let tag = t.tag.map_or("?", |t| t.as_str());
                    format!("{}/{tag}", &sentence[t.start..t.end])
                })
                .collect();
            writeln!(out, "tags: {}", escape(&tagged.join(" ")))?;
        }
    }
    if g.format() == Format::Json {
        for r in &rows {
            serde_json::to_writer(&mut out, r)?;
            out.write_all(b"\n")?;
        }
        return Ok(ExitCode::SUCCESS);
    }
    if rows.is_empty() {
        let hits = ex.cues.hits(&a.text);
        if hits.is_empty() {
            writeln!(
                out,
                "no cue word found: none of the {} cue literals occurs in the text",
                ex.cues.literals().len()
            )?;
        } else {
            let words: Vec<&str> = hits
                .iter()
                .map(|h| &a.text[h.pos..])
                .map(|s| {
                    s.split(|c: char| !c.is_alphanumeric() && c != '-')
                        .next()
                        .unwrap_or("")
                })
                .collect();
            writeln!(
                out,
                "cue words found ({}), but no cue pattern matched around them",
                escape(&words.join(", "))
            )?;
        }
        return Ok(ExitCode::SUCCESS);
    }
    for r in &rows {
        writeln!(out, "cue {} matched \"{}\"", r.cue, escape(&r.matched))?;
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
                    confidence::model().bias,
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
    }
    Ok(ExitCode::SUCCESS)
}
