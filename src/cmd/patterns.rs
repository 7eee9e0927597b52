//! `hearsay patterns check|list`: validate pattern files and run their examples, or list cues.

use super::{write_rows, Global};
use anyhow::Result;
use clap::{Args, Subcommand};
use hearsay::extract::{sentence_attempts, Extractor};
use hearsay::patterns::CueSpec;
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
pub struct PatternsArgs {
    #[command(subcommand)]
    pub action: Action,
}

#[derive(Subcommand, Debug)]
pub enum Action {
    /// Validate the pattern files and run every example and counter-example.
    Check,
    /// List the cues.
    List {
        /// Print the prefilter's literal strings instead, one a line (for grep-like tools).
        #[arg(long)]
        literals: bool,
    },
}

/// One failed example.
#[derive(Debug, Serialize)]
pub struct ExampleFailure {
    pub cue: String,
    pub origin: String,
    pub text: String,
    pub problem: String,
}

/// Run every example of every cue; return the failures.
pub fn check_examples(ex: &Extractor) -> (usize, Vec<ExampleFailure>) {
    let mut failures = Vec::new();
    let mut count = 0;
    for cue in ex.cues.cues.iter().map(|c| &c.spec) {
        let origin = format!("{}:{}", cue.origin.0.display(), cue.origin.1);
        let mut fail = |text: &str, problem: String| {
            failures.push(ExampleFailure {
                cue: cue.id.clone(),
                origin: origin.clone(),
                text: text.to_string(),
                problem,
            })
        };
        for e in &cue.examples {
            count += 1;
            let (claims, _) = sentence_attempts(ex, &e.text);
            let (ck, ek) = (ex.normalizer.key(&e.cause), ex.normalizer.key(&e.effect));
            let mine: Vec<_> = claims.iter().filter(|c| c.cue == cue.id).collect();
            let Some(c) = mine
                .iter()
                .find(|c| c.cause.key == ck && c.effect.key == ek)
            else {
                let got: Vec<String> = claims
                    .iter()
                    .map(|c| format!("{} [{}] -> {}", c.cause.text, c.cue, c.effect.text))
                    .collect();
                fail(
                    &e.text,
                    format!(
                        "expected \"{}\" -> \"{}\"; got {}",
                        e.cause,
                        e.effect,
                        if got.is_empty() {
                            "no claim".to_string()
                        } else {
                            got.join("; ")
                        }
                    ),
                );
                continue;
            };
            if let Some(p) = e.polarity {
                if c.polarity != p {
                    fail(
                        &e.text,
                        format!("expected polarity {p}, got {}", c.polarity),
                    );
                }
            }
            if let Some(m) = e.modality {
                if c.modality != m {
                    fail(
                        &e.text,
                        format!("expected modality {m}, got {}", c.modality),
                    );
                }
            }
        }
        for text in &cue.counter_examples {
            count += 1;
            let (claims, _) = sentence_attempts(ex, text);
            if let Some(c) = claims.iter().find(|c| c.cue == cue.id) {
                fail(
                    text,
                    format!(
                        "counter-example gave a claim: \"{}\" -> \"{}\"",
                        c.cause.text, c.effect.text
                    ),
                );
            }
        }
    }
    (count, failures)
}

#[derive(Serialize)]
struct Listed<'a> {
    id: &'a str,
    family: &'a str,
    pattern: &'a str,
    kind: String,
    polarity: String,
    spans: &'static str,
    origin: String,
}

pub fn run(g: &Global, a: &PatternsArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let mut out = std::io::stdout().lock();
    match &a.action {
        Action::Check => {
            let (n, failures) = check_examples(&ex);
            for f in &failures {
                writeln!(
                    out,
                    "{}: cue '{}': {}\n    {}",
                    f.origin, f.cue, f.problem, f.text
                )?;
            }
            writeln!(
                out,
                "{} cues, {} examples: {} passed, {} failed",
                ex.cues.cues.len(),
                n,
                n - failures.len(),
                failures.len()
            )?;
            Ok(if failures.is_empty() {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(1)
            })
        }
        Action::List { literals: true } => {
            for l in ex.cues.literals() {
                writeln!(out, "{l}")?;
            }
            Ok(ExitCode::SUCCESS)
        }
        Action::List { literals: false } => {
            let rows: Vec<Listed> = ex.cues.cues.iter().map(|c| listed(&c.spec)).collect();
            write_rows(
                &mut out,
                g.format(),
                &rows,
                |r| {
                    vec![
                        r.id.into(),
                        r.family.into(),
                        r.pattern.into(),
                        r.kind.clone(),
                        r.polarity.clone(),
                        r.spans.into(),
                    ]
                },
                &["id", "family", "pattern", "kind", "polarity", "spans"],
            )?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

fn listed(c: &CueSpec) -> Listed<'_> {
    Listed {
        id: &c.id,
        family: &c.family,
        pattern: &c.pattern,
        kind: c.kind.to_string(),
        polarity: c.polarity.to_string(),
        spans: if c.clause_spans { "clause" } else { "phrase" },
        origin: format!("{}:{}", c.origin.0.display(), c.origin.1),
    }
}
