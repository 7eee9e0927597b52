//! `hearsay explain "a sentence"`: which cues fired, which spans were chosen and why.

use super::{escape, Format, Global};
use anyhow::Result;
use clap::Args;
use hearsay::pipeline;
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "The debugging tool for pattern authors: for every cue that matched, the \
spans chosen, the sign and modality and the reasons; when no claim results, why not. Several \
sentences may be given in one string; a connective that opens a sentence looks at the one before."
)]
pub struct ExplainArgs {
    /// The text to explain (one or more sentences).
    pub text: String,
}

#[derive(Serialize)]
struct Explained {
    cue: String,
    matched: String,
    claim: Option<hearsay::Claim>,
    rejected: Option<String>,
    notes: Vec<String>,
}

pub fn run(g: &Global, a: &ExplainArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let (_, attempts) = pipeline::sentence_attempts(&ex, &a.text);
    let rows: Vec<Explained> = attempts
        .into_iter()
        .map(|t| {
            let (claim, rejected) = match t.result {
                Ok(c) => (Some(c), None),
                Err(e) => (None, Some(e)),
            };
            Explained {
                cue: t.cue,
                matched: t.matched,
                claim,
                rejected,
                notes: t.notes,
            }
        })
        .collect();
    let mut out = std::io::stdout().lock();
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
