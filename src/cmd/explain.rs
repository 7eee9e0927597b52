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
    let rows = explained(&ex, &a.text);
    let mut out = std::io::stdout().lock();
    if a.tags {
        write_tags(&mut out, &ex, &a.text)?;
    }
    if g.format() == Format::Json {
        for r in &rows {
            serde_json::to_writer(&mut out, r)?;
            out.write_all(b"\n")?;
        }
        return Ok(ExitCode::SUCCESS);
    }
    if rows.is_empty() {
        write_no_match(&mut out, &ex, &a.text)?;
        return Ok(ExitCode::SUCCESS);
    }
    for r in &rows {
        write_row(&mut out, &ex, r)?;
    }
    Ok(ExitCode::SUCCESS)
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
                cue: t.cue,
                matched: t.matched,
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

/// Why no cue matched: no cue word at all, or cue words no pattern matched around.
fn write_no_match(out: &mut impl Write, ex: &Extractor, text: &str) -> Result<()> {
    let hits = ex.cues.hits(text);
    if hits.is_empty() {
        writeln!(
            out,
            "no cue word found: none of the {} cue literals occurs in the text",
            ex.cues.literals().len()
        )?;
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
        writeln!(
            out,
            "cue words found ({}), but no cue pattern matched around them",
            escape(&words.join(", "))
        )?;
    }
    Ok(())
}

/// One cue attempt as a table: the claim and its confidence, or why there is none; the notes.
fn write_row(out: &mut impl Write, ex: &Extractor, r: &Explained) -> Result<()> {
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
