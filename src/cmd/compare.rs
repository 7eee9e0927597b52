//! `hearsay compare ANSWERS`: a model's answers to the question set beside the corpus's support.

use super::args::pair_list;
use super::{escape, write_rows, Format, Global};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::compare::questions as q;
use hearsay::compare::{
    self as cmp, AnswerSet, AnswerSource, CalibrationBin, Corpus, PairView, Profile, Summary,
    WordingRow,
};
use hearsay::graph::Filter;
use hearsay::query::Loaded;
use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "ANSWERS is CSV or JSON Lines: an `answer` (yes, no, unsure, or a \
probability of yes) per row, an optional `model`, and the question as `id` (with --vars or --pairs, \
to look ids up) or as `x`, `y`, `family` (and `template`). The file `hearsay questions` writes, with \
an answer column added, is read as it is.\n\n\
Support of a question: non-negated causal claims x → y (directed, reversed), both directions \
(symmetric), or x → y of the asked sign (sign). The corpus answer is yes when support reaches \
--threshold and exceeds the reverse direction (sign: the opposite sign); symmetric needs only the \
threshold. Views: summary (per model and family: agreement, Cohen's kappa, ROC AUC of support \
for a yes, Spearman of support and P(yes), asymmetry, wording sensitivity), questions (support \
profile per question), calibration (support bins), wording (answers per pair across wordings), \
pairs (PMI of co-mention beside the causal claim rate).\n\n\
Agreement means an answer follows what the text states, not that it is right: a claim is a \
statement in text, not evidence that the causation is real."
)]
pub struct CompareArgs {
    /// The answers file (CSV or JSON Lines).
    pub answers: PathBuf,
    /// The variable list the questions were made from (to look up rows that give only an id).
    #[arg(long, value_name = "FILE", conflicts_with = "pairs")]
    pub vars: Option<PathBuf>,
    /// The pair list the questions were made from (to look up rows that give only an id).
    #[arg(long, value_name = "FILE")]
    pub pairs: Option<PathBuf>,
    /// The wordings the questions were made with (default: the built-in ones).
    #[arg(long, value_name = "FILE")]
    pub questions: Option<PathBuf>,
    /// Support a question needs for the corpus answer to be yes.
    #[arg(long, default_value_t = 1, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub threshold: u64,
    /// What to print.
    #[arg(long, value_enum, default_value_t = View::Summary)]
    pub view: View,
    /// Show the support profile of one question and the evidence behind it.
    #[arg(long, value_name = "ID")]
    pub explain: Option<String>,
    /// With --explain: evidence sentences per relation.
    #[arg(long, default_value_t = 3, value_name = "N")]
    pub evidence: usize,
}

#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum View {
    Summary,
    Questions,
    Calibration,
    Wording,
    Pairs,
}

pub fn run(g: &Global, a: &CompareArgs) -> Result<ExitCode> {
    let mut loaded = g.graph(&Filter::default())?;
    let wordings = q::load_wordings(a.questions.as_deref()).context("cannot load the wordings")?;
    let set = AnswerSet::read(
        &loaded.normalizer,
        &AnswerSource {
            answers: &a.answers,
            list: pair_list(a.vars.as_deref(), a.pairs.as_deref()),
            wordings: &wordings,
        },
    )?;
    let mentions = set
        .mentions(&mut loaded)
        .context("cannot search the sentence index")?;
    let corpus = Corpus::of(&loaded, &mentions);
    let threshold = usize::try_from(a.threshold).unwrap_or(usize::MAX);
    let profiles = cmp::profiles(&corpus, &set.asked, threshold);
    let mut out = std::io::stdout().lock();
    let format = g.format();
    let full = format == Format::Csv;
    if let Some(id) = &a.explain {
        let Some(p) = profiles.iter().find(|p| p.question.id == *id) else {
            anyhow::bail!("{}: no answer to question {id}", a.answers.display());
        };
        return explain(&mut out, format, &loaded, p, threshold, a.evidence);
    }
    match a.view {
        View::Questions => write_rows(
            &mut out,
            format,
            &profiles,
            |r| profile_row(full, r),
            PROFILE,
        )?,
        View::Pairs => {
            let views = cmp::pair_views(&corpus, &set.asked);
            write_rows(&mut out, format, &views, |r| pair_row(full, r), PAIRS)?;
        }
        view => {
            let c = cmp::summarise(&set.answers, &profiles);
            match view {
                View::Calibration => write_rows(
                    &mut out,
                    format,
                    &c.calibration,
                    |r| calibration_row(full, r),
                    CALIBRATION,
                )?,
                View::Wording => write_rows(&mut out, format, &c.wording, wording_row, WORDING)?,
                _ => write_rows(
                    &mut out,
                    format,
                    &c.summaries,
                    |r| summary_row(full, r),
                    SUMMARY,
                )?,
            }
        }
    }
    if format == Format::Table {
        writeln!(
            out,
            "\n(agreement with statements found in text, not with evidence that the causation is real)"
        )?;
    }
    Ok(ExitCode::SUCCESS)
}

/// `--explain ID`: one question's support profile beside the pair report of its variables.
fn explain(
    out: &mut impl Write,
    format: Format,
    loaded: &Loaded,
    p: &Profile,
    threshold: usize,
    evidence: usize,
) -> Result<ExitCode> {
    let rep = loaded.pair_report(
        loaded.lookup(&p.question.x),
        loaded.lookup(&p.question.y),
        p.co_mentions,
        evidence,
    );
    match format {
        Format::Json => {
            serde_json::to_writer(&mut *out, &serde_json::json!({"profile": p, "pair": rep}))?;
            out.write_all(b"\n")?;
        }
        Format::Csv => write_rows(out, format, &[p], |p| profile_row(true, p), PROFILE)?,
        Format::Table => {
            writeln!(
                out,
                "question {}: {}",
                p.question.id,
                escape(&question_text(p))
            )?;
            writeln!(
                out,
                "support {} ({}), threshold {threshold}: corpus answer {}\n",
                p.support,
                support_source(p),
                p.corpus_answer
            )?;
            super::pair::print_table(out, &rep)?;
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn question_text(p: &Profile) -> String {
    let q = &p.question;
    format!("{} → {} ({}, {})", q.x, q.y, q.family, q.template)
}

fn support_source(p: &Profile) -> &'static str {
    match p.question.family {
        q::Family::Symmetric => "claims either way",
        q::Family::Sign => "claims x → y of the asked sign",
        _ => "claims x → y; reverse must be lower",
    }
}

/// A number for a cell: three decimals in a table, in full in CSV.
fn num(x: f64, full: bool) -> String {
    if full {
        x.to_string()
    } else {
        format!("{x:.3}")
    }
}

fn opt(v: Option<f64>, full: bool) -> String {
    v.map(|x| num(x, full)).unwrap_or_default()
}

const PROFILE: &[&str] = &[
    "id",
    "x",
    "y",
    "family",
    "template",
    "forward",
    "backward",
    "forward_claims",
    "hedged",
    "negated",
    "hedged_or_negated_share",
    "association",
    "co_mentions",
    "signed",
    "support",
    "corpus_answer",
];

fn profile_row(full: bool, p: &Profile) -> Vec<String> {
    let q = &p.question;
    vec![
        q.id.clone(),
        q.x.clone(),
        q.y.clone(),
        q.family.to_string(),
        q.template.clone(),
        p.forward.to_string(),
        p.backward.to_string(),
        p.forward_claims.to_string(),
        p.hedged.to_string(),
        p.negated.to_string(),
        opt(p.hedged_or_negated_share, full),
        p.association.to_string(),
        p.co_mentions.to_string(),
        p.signed.map(|s| s.to_string()).unwrap_or_default(),
        p.support.to_string(),
        p.corpus_answer.to_string(),
    ]
}

const SUMMARY: &[&str] = &[
    "model",
    "family",
    "questions",
    "yes",
    "no",
    "unsure",
    "corpus_yes",
    "agreement",
    "kappa",
    "auc",
    "spearman",
    "both_ways",
    "model_yes_both",
    "corpus_states_both",
    "wording_groups",
    "wording_differ",
];

fn summary_row(full: bool, s: &Summary) -> Vec<String> {
    let n = |v: usize| v.to_string();
    vec![
        s.model.clone(),
        s.family.clone(),
        n(s.questions),
        n(s.yes),
        n(s.no),
        n(s.unsure),
        n(s.corpus_yes),
        opt(s.agreement, full),
        opt(s.kappa, full),
        opt(s.auc, full),
        opt(s.spearman, full),
        n(s.both_ways),
        n(s.model_yes_both),
        n(s.corpus_states_both),
        n(s.wording_groups),
        n(s.wording_differ),
    ]
}

const CALIBRATION: &[&str] = &[
    "model",
    "family",
    "support",
    "questions",
    "mean_p_yes",
    "yes_share",
    "corpus_yes_share",
];

fn calibration_row(full: bool, c: &CalibrationBin) -> Vec<String> {
    vec![
        c.model.clone(),
        c.family.clone(),
        c.support.clone(),
        c.questions.to_string(),
        num(c.mean_p_yes, full),
        num(c.yes_share, full),
        num(c.corpus_yes_share, full),
    ]
}

const WORDING: &[&str] = &[
    "model",
    "x",
    "y",
    "answers",
    "same_question_differs",
    "families_differ",
];

fn wording_row(w: &WordingRow) -> Vec<String> {
    let answers: Vec<String> = w.answers.iter().map(|(t, l)| format!("{t}={l}")).collect();
    vec![
        w.model.clone(),
        w.x.clone(),
        w.y.clone(),
        answers.join(" "),
        w.same_question_differs.to_string(),
        w.families_differ.to_string(),
    ]
}

const PAIRS: &[&str] = &[
    "x",
    "y",
    "sentences_x",
    "sentences_y",
    "sentences_both",
    "pmi",
    "causal_sentences",
    "association_sentences",
    "co_mentions",
    "causal_rate",
];

fn pair_row(full: bool, v: &PairView) -> Vec<String> {
    vec![
        v.x.clone(),
        v.y.clone(),
        v.sentences_x.to_string(),
        v.sentences_y.to_string(),
        v.sentences_both.to_string(),
        opt(v.pmi, full),
        v.causal_sentences.to_string(),
        v.association_sentences.to_string(),
        v.co_mentions.to_string(),
        opt(v.causal_rate, full),
    ]
}
