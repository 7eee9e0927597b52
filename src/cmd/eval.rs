//! `hearsay eval --gold FILE --format F`: precision, recall and F1 against labelled data.

use super::{escape, Format, Global, Table};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::evaluate as eval;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(ValueEnum, Debug, Clone, Copy)]
pub enum GoldFormat {
    /// SemEval-2010 Task 8 (numbered sentences with <e1>/<e2> tags and a relation label).
    Semeval2010,
    /// BECAUSE brat standoff: `.txt` + `.ann` pairs (FILE is one `.ann`/`.txt` or a folder).
    Because,
    /// Causal News Corpus CSV: subtask 2 (text_w_pairs with <ARG0>/<ARG1>) or subtask 1 (label).
    Cnc,
    /// hearsay's JSON Lines gold format (see docs/quality.md).
    Jsonl,
}

#[derive(Args, Debug)]
#[command(
    after_help = "Matching rule (semeval2010): a causal claim matches when its cause span \
contains the gold cause nominal and its effect span contains the gold effect nominal, in the \
right direction, and each span is at most 6 words longer than its nominal. Sentences labelled \
Cause-Effect are positives; every other sentence is a negative for its marked pair. A claim for \
the marked pair on a negative is a false positive; a claim in the wrong direction on a positive \
is both a false positive and a false negative.

Matching rule (because, cnc, jsonl): a claim matches a gold claim when the token-overlap F1 of the spans is at least 0.5 on both the cause and the effect (words only, compared by position); matching is one-to-one, best first. Unmatched claims are false positives, unmatched gold claims false negatives. Polarity, modality and kind accuracy are counted on matched claims whose gold gives them; BECAUSE sign accuracy counts Facilitate = increase/unsigned, Inhibit = decrease/prevent. CNC subtask 1 files are scored per sentence: a sentence is predicted causal when a causal claim is found in it."
)]
pub struct EvalArgs {
    /// The labelled file (for `because`, a folder of .txt/.ann pairs is also accepted).
    #[arg(long, value_name = "FILE")]
    pub gold: PathBuf,
    /// Its format.
    #[arg(long = "gold-format", value_enum, default_value = "semeval2010")]
    pub gold_format: GoldFormat,
    /// Also print every false positive and false negative.
    #[arg(long)]
    pub errors: bool,
}

/// Labelled data as read: single marked pairs (SemEval) or span-annotated documents.
pub(super) enum Gold {
    Pairs(Vec<eval::GoldItem>),
    Docs(Vec<eval::GoldDoc>),
}

/// Read a gold file (or BECAUSE folder) in the given format.
pub(super) fn load_gold(format: GoldFormat, path: &Path) -> Result<Gold> {
    let name = path.display().to_string();
    Ok(match format {
        GoldFormat::Semeval2010 => Gold::Pairs(
            eval::parse_semeval(&read(path)?).map_err(|e| anyhow::anyhow!("{name}: {e}"))?,
        ),
        GoldFormat::Because => Gold::Docs(read_because(path)?),
        GoldFormat::Cnc => Gold::Docs(eval::parse_cnc(&name, &read(path)?)?),
        GoldFormat::Jsonl => Gold::Docs(eval::parse_jsonl(&name, &read(path)?)?),
    })
}

pub fn run(g: &Global, a: &EvalArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let docs = match load_gold(a.gold_format, &a.gold)? {
        Gold::Pairs(items) => return run_semeval(g, a, &ex, &items),
        Gold::Docs(docs) => docs,
    };
    let (report, errors) = eval::score_spans(&ex, &docs);
    let mut out = std::io::stdout().lock();
    if g.format() == Format::Json {
        writeln!(out, "{}", serde_json::to_string(&report)?)?;
        if a.errors {
            for e in &errors {
                writeln!(out, "{}", serde_json::to_string(e)?)?;
            }
        }
        return Ok(ExitCode::SUCCESS);
    }
    print_span_report(&mut out, &report)?;
    if a.errors {
        for e in &errors {
            writeln!(
                out,
                "\n{} {}: {}",
                escape(&e.id),
                e.outcome,
                escape(&e.sentence)
            )?;
            let side = if e.outcome == "false_negative" {
                "gold:     "
            } else {
                "predicted:"
            };
            writeln!(out, "  {side} {}", pair(&e.pair))?;
            let other = if e.outcome == "false_negative" {
                "predicted:"
            } else {
                "gold:     "
            };
            for p in &e.nearby {
                writeln!(out, "  {other} {}", pair(p))?;
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn pair(p: &eval::PairText) -> String {
    let mut s = format!("{} -> {}", escape(&p.cause), escape(&p.effect));
    if let Some(c) = &p.cue {
        s.push_str(&format!("  [{}]", escape(c)));
    }
    s
}

pub(super) fn read(p: &Path) -> Result<String> {
    std::fs::read_to_string(p).with_context(|| format!("cannot read {}", p.display()))
}

/// A BECAUSE folder (every `.ann` with its `.txt`) or one document given by either file.
pub(super) fn read_because(p: &Path) -> Result<Vec<eval::GoldDoc>> {
    let mut anns: Vec<PathBuf> = if p.is_dir() {
        std::fs::read_dir(p)
            .with_context(|| format!("cannot read {}", p.display()))?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|q| q.extension().is_some_and(|x| x == "ann"))
            .collect()
    } else {
        vec![p.with_extension("ann")]
    };
    anns.sort();
    if anns.is_empty() {
        anyhow::bail!("{}: no .ann files", p.display());
    }
    let mut docs = Vec::new();
    for ann in anns {
        let txt = ann.with_extension("txt");
        let id = ann
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default();
        docs.push(eval::parse_because(&id, &read(&txt)?, &read(&ann)?)?);
    }
    Ok(docs)
}

fn ratio3(x: f64) -> String {
    format!("{x:.3}")
}

fn print_span_report(out: &mut impl Write, r: &eval::SpanReport) -> Result<()> {
    if let Some(s) = &r.sentence_level {
        return summary_table(
            out,
            &[
                ("sentences", s.sentences.to_string()),
                ("causal", s.causal.to_string()),
            ],
            &s.prf,
            &[("accuracy", ratio3(s.accuracy))],
        );
    }
    summary_table(
        out,
        &[
            ("documents", r.documents.to_string()),
            ("gold", r.gold_claims.to_string()),
            ("predicted", r.predicted_claims.to_string()),
        ],
        &r.prf,
        &[],
    )?;
    writeln!(out)?;
    let mut acc = Table::new(&["on matched claims", "correct", "labelled", "accuracy"]);
    for (name, a) in [
        ("kind", &r.kind_accuracy),
        ("polarity", &r.polarity_accuracy),
        ("modality", &r.modality_accuracy),
        ("sign (BECAUSE)", &r.sign_accuracy),
    ] {
        if a.labelled > 0 {
            acc.row(vec![
                name.to_string(),
                a.correct.to_string(),
                a.labelled.to_string(),
                ratio3(a.accuracy),
            ]);
        }
    }
    acc.print(out)?;
    for (name, m) in [
        ("cue", &r.by_cue),
        ("kind", &r.by_kind),
        ("polarity", &r.by_polarity),
        ("modality", &r.by_modality),
    ] {
        writeln!(out)?;
        // A missed claim has no cue, so the cue table has no false negatives or recall.
        let by_cue = name == "cue";
        let heads: &[&str] = if by_cue {
            &[name, "tp", "fp", "precision"]
        } else {
            &[name, "tp", "fp", "fn (by gold label)", "precision"]
        };
        let mut t = Table::new(heads);
        let mut rows: Vec<_> = m.iter().collect();
        rows.sort_by_key(|(_, p)| std::cmp::Reverse(p.tp + p.fp + p.fn_));
        for (k, p) in rows {
            let mut row = vec![escape(k), p.tp.to_string(), p.fp.to_string()];
            if !by_cue {
                row.push(p.fn_.to_string());
            }
            row.push(ratio3(p.precision));
            t.row(row);
        }
        t.print(out)?;
    }
    writeln!(out)?;
    print_reliability(out, &r.reliability)?;
    Ok(())
}

/// The one-row summary both gold kinds print: leading counts, tp/fp/fn with precision, recall
/// and F1, then trailing columns.
fn summary_table(
    out: &mut impl Write,
    lead: &[(&str, String)],
    prf: &eval::Prf,
    tail: &[(&str, String)],
) -> Result<()> {
    let counts = [
        ("tp", prf.tp.to_string()),
        ("fp", prf.fp.to_string()),
        ("fn", prf.fn_.to_string()),
        ("precision", ratio3(prf.precision)),
        ("recall", ratio3(prf.recall)),
        ("f1", ratio3(prf.f1)),
    ];
    let cells: Vec<&(&str, String)> = lead.iter().chain(&counts).chain(tail).collect();
    let heads: Vec<&str> = cells.iter().map(|c| c.0).collect();
    let mut t = Table::new(&heads);
    t.row(cells.iter().map(|c| c.1.clone()).collect());
    t.print(out)?;
    Ok(())
}

/// The reliability table: confidence bins against observed precision, then ECE and Brier score.
pub(super) fn print_reliability(out: &mut impl Write, r: &eval::Reliability) -> Result<()> {
    let mut t = Table::new(&[
        "confidence",
        "claims",
        "mean confidence",
        "observed precision",
    ]);
    for b in r.bins.iter().filter(|b| b.claims > 0) {
        t.row(vec![
            format!("{:.1}-{:.1}", b.low, b.high),
            b.claims.to_string(),
            ratio3(b.mean_confidence),
            ratio3(b.observed_precision),
        ]);
    }
    t.print(out)?;
    writeln!(
        out,
        "judged claims {}, correct {}; expected calibration error {:.3}; Brier score {:.3}",
        r.claims, r.correct, r.expected_calibration_error, r.brier
    )?;
    Ok(())
}

/// Items that `--errors` lists.
fn is_error(s: &&eval::Scored) -> bool {
    !matches!(
        s.outcome,
        eval::Outcome::TruePositive | eval::Outcome::TrueNegative
    )
}

fn run_semeval(
    g: &Global,
    a: &EvalArgs,
    ex: &hearsay::extract::Extractor,
    items: &[eval::GoldItem],
) -> Result<ExitCode> {
    let (scores, scored) = eval::score_pairs(ex, items);
    let mut out = std::io::stdout().lock();
    if g.format() == Format::Json {
        writeln!(out, "{}", serde_json::to_string(&scores)?)?;
        if a.errors {
            for s in scored.iter().filter(is_error) {
                writeln!(out, "{}", serde_json::to_string(s)?)?;
            }
        }
        return Ok(ExitCode::SUCCESS);
    }
    let prf = eval::Prf {
        tp: scores.tp,
        fp: scores.fp,
        fn_: scores.fn_,
        precision: scores.precision,
        recall: scores.recall,
        f1: scores.f1,
    };
    summary_table(
        &mut out,
        &[
            ("items", scores.items.to_string()),
            ("positives", scores.positives.to_string()),
        ],
        &prf,
        &[(
            "claims on negatives",
            format!("{:.2}%", scores.negative_claim_rate * 100.0),
        )],
    )?;
    writeln!(out)?;
    let mut c = Table::new(&["cue", "tp", "fp"]);
    let mut cues: Vec<_> = scores.by_cue.iter().collect();
    cues.sort_by_key(|(_, s)| std::cmp::Reverse(s.tp + s.fp));
    for (id, s) in cues {
        c.row(vec![id.clone(), s.tp.to_string(), s.fp.to_string()]);
    }
    c.print(&mut out)?;
    writeln!(out)?;
    print_reliability(&mut out, &scores.reliability)?;
    if a.errors {
        for s in scored.iter().filter(is_error) {
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
