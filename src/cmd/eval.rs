//! `hearsay eval --gold FILE --format F`: precision, recall and F1 against labelled data.

use super::{Format, Global, Table};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::eval;
use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(ValueEnum, Debug, Clone, Copy)]
pub enum GoldFormat {
    /// SemEval-2010 Task 8 (numbered sentences with <e1>/<e2> tags and a relation label).
    Semeval2010,
}

#[derive(Args, Debug)]
#[command(
    after_help = "Matching rule (semeval2010): a causal claim matches when its cause span \
contains the gold cause nominal and its effect span contains the gold effect nominal, in the \
right direction, and each span is at most 6 words longer than its nominal. Sentences labelled \
Cause-Effect are positives; every other sentence is a negative for its marked pair. A claim for \
the marked pair on a negative is a false positive; a claim in the wrong direction on a positive \
is both a false positive and a false negative."
)]
pub struct EvalArgs {
    /// The labelled file.
    #[arg(long, value_name = "FILE")]
    pub gold: PathBuf,
    /// Its format.
    #[arg(long = "gold-format", value_enum, default_value = "semeval2010")]
    pub gold_format: GoldFormat,
    /// Also print every false positive and false negative.
    #[arg(long)]
    pub errors: bool,
}

pub fn run(g: &Global, a: &EvalArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let text = std::fs::read_to_string(&a.gold)
        .with_context(|| format!("cannot read {}", a.gold.display()))?;
    let items = match a.gold_format {
        GoldFormat::Semeval2010 => {
            eval::parse_semeval(&text).map_err(|e| anyhow::anyhow!("{}: {e}", a.gold.display()))?
        }
    };
    let (scores, scored) = eval::score_pairs(&ex, &items);
    let mut out = std::io::stdout().lock();
    if g.format() == Format::Json {
        serde_json::to_writer(&mut out, &scores)?;
        out.write_all(b"\n")?;
        if a.errors {
            for s in scored.iter().filter(|s| {
                !matches!(
                    s.outcome,
                    eval::Outcome::TruePositive | eval::Outcome::TrueNegative
                )
            }) {
                serde_json::to_writer(&mut out, s)?;
                out.write_all(b"\n")?;
            }
        }
        return Ok(ExitCode::SUCCESS);
    }
    let mut t = Table::new(&[
        "items",
        "positives",
        "tp",
        "fp",
        "fn",
        "precision",
        "recall",
        "f1",
        "claims on negatives",
    ]);
    t.row(vec![
        scores.items.to_string(),
        scores.positives.to_string(),
        scores.tp.to_string(),
        scores.fp.to_string(),
        scores.fn_.to_string(),
        format!("{:.3}", scores.precision),
        format!("{:.3}", scores.recall),
        format!("{:.3}", scores.f1),
        format!("{:.2}%", scores.negative_claim_rate * 100.0),
    ]);
    t.print(&mut out)?;
    writeln!(out)?;
    let mut c = Table::new(&["cue", "tp", "fp"]);
    let mut cues: Vec<_> = scores.by_cue.iter().collect();
    cues.sort_by_key(|(_, s)| std::cmp::Reverse(s.tp + s.fp));
    for (id, s) in cues {
        c.row(vec![id.clone(), s.tp.to_string(), s.fp.to_string()]);
    }
    c.print(&mut out)?;
    if a.errors {
        for s in scored.iter().filter(|s| {
            !matches!(
                s.outcome,
                eval::Outcome::TruePositive | eval::Outcome::TrueNegative
            )
        }) {
            writeln!(out, "\n{} {:?}: {}", s.id, s.outcome, s.text)?;
            if let Some((c, e)) = &s.gold {
                writeln!(out, "  gold:      {c} -> {e}")?;
            }
            for (c, e, cue) in &s.predicted {
                writeln!(out, "  predicted: {c} -> {e}  [{cue}]")?;
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
