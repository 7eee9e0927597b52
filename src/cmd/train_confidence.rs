//! `hearsay train-confidence`: fit the claim confidence model on labelled data, reproducibly, and
//! report its calibration on held-out sentences.

use super::eval::{load_gold, print_reliability, Gold, GoldFormat};
use super::Global;
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::evaluate::usable::{parse_usable, score_usable};
use hearsay::evaluate::{self, Judged, Reliability};
use hearsay::extract::{
    confidence_features, is_held_out, train_confidence, unit_key, ConfidenceExample as Example,
    ConfidenceTrainOptions as TrainOptions, Extractor, TaggedSentence,
};
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Defaults reproduce patterns/confidence.toml from the shared training data: \
SemEval-2010 Task 8 train, BECAUSE CongressionalHearings and the Causal News Corpus subtask 2 \
train split, under ../shared/data, and the hand-labelled eLife training sample in \
tests/data/usable/train.jsonl (every claim found in a labelled sentence is right when it matches a \
usable claim of the label, wrong otherwise). Each claim the extractor finds is labelled right or wrong by \
the matching rule of `hearsay eval`; sentences whose hash falls in the held-out share are left \
out of training and used to print the reliability table. Training is Newton's method on the \
L2-penalised log loss; the same data and options give the same file, byte for byte.

Run it after any change to the cue patterns or the span logic:  hearsay train-confidence"
)]
pub struct TrainConfidenceArgs {
    /// Where to write the model.
    #[arg(long, value_name = "FILE", default_value = "patterns/confidence.toml")]
    pub out: PathBuf,
    /// Labelled data as FORMAT=PATH (formats as in `eval --gold-format`); repeat for several.
    #[arg(
        long = "gold",
        value_name = "FORMAT=PATH",
        value_parser = parse_gold,
        default_values = [
            "semeval2010=../shared/data/semeval2010-task8/TRAIN_FILE.TXT",
            "because=../shared/data/because/CongressionalHearings",
            "cnc=../shared/data/causal-news-corpus/train_subtask2.csv",
        ]
    )]
    pub gold: Vec<(GoldFormat, PathBuf)>,
    /// Sentences labelled with their usable claims (the format of tests/data/usable/); every
    /// claim found there is judged, right when it matches a labelled claim. Repeatable.
    #[arg(
        long = "usable",
        value_name = "FILE",
        default_values = ["tests/data/usable/train.jsonl"]
    )]
    pub usable: Vec<PathBuf>,
    /// Each claim of a --usable file counts this many times in training (those sentences are
    /// few but of the genre the model is used on).
    #[arg(long, default_value_t = 3, value_name = "N")]
    pub usable_weight: usize,
    /// One sentence in N is held out (chosen by a hash of document and sentence offset).
    #[arg(long, default_value_t = 5, value_name = "N")]
    pub hold_out: u8,
    /// The L2 penalty on the weights.
    #[arg(long, default_value_t = 5.0)]
    pub l2: f64,
    /// Features seen in fewer training claims than this get no weight.
    #[arg(long, default_value_t = 5, value_name = "N")]
    pub min_count: usize,
}

fn parse_gold(s: &str) -> Result<(GoldFormat, PathBuf), String> {
    let (f, p) = s
        .split_once('=')
        .ok_or_else(|| format!("expected FORMAT=PATH, got {s:?}"))?;
    let format = GoldFormat::from_str(f, true).map_err(|e| format!("{f:?}: {e}"))?;
    Ok((format, PathBuf::from(p)))
}

fn format_name(f: GoldFormat) -> String {
    f.to_possible_value()
        .map_or_else(String::new, |v| v.get_name().to_string())
}

pub fn run(g: &Global, a: &TrainConfidenceArgs) -> Result<ExitCode> {
    let ex = g.extractor()?;
    let (mut judged, mut sources) = judge_all(&ex, &a.gold)?;
    for path in &a.usable {
        let text = std::fs::read_to_string(path)
            .with_context(|| format!("cannot read {}", path.display()))?;
        let items = parse_usable(&path.display().to_string(), &text)?;
        let found = score_usable(&ex, &ex.normalizer, &items).1;
        let right = found.iter().filter(|j| j.correct).count();
        let file = path.file_name().map_or_else(
            || path.display().to_string(),
            |f| f.to_string_lossy().into_owned(),
        );
        let line = format!(
            "usable {file}: {} judged claims, {right} right",
            found.len()
        );
        eprintln!("{line}");
        sources.push(line);
        judged.extend(found.into_iter().map(|j| ("usable".to_string(), j)));
    }
    let (train, dev, dev_names) = examples(&ex, &judged, a.hold_out, a.usable_weight);
    if train.is_empty() {
        anyhow::bail!("no judged claims to train on");
    }
    let opts = TrainOptions {
        l2: a.l2,
        min_count: a.min_count,
        ..TrainOptions::default()
    };
    let model = train_confidence(&train, opts);
    let rel = Reliability::from_outcomes(
        dev.iter()
            .map(|e| (model.probability(&e.features), e.correct)),
    );
    let base = train.iter().filter(|e| e.correct).count() as f64 / train.len() as f64;
    let baseline = Reliability::from_outcomes(dev.iter().map(|e| (base, e.correct)));
    let mut per_set = Vec::new();
    let names = a.gold.iter().map(|(f, _)| format_name(*f));
    for s in names.chain((!a.usable.is_empty()).then(|| "usable".to_string())) {
        if per_set.iter().any(|(n, _)| n == &s) {
            continue;
        }
        let r = Reliability::from_outcomes(
            dev.iter()
                .zip(&dev_names)
                .filter(|(_, n)| **n == s)
                .map(|(e, _)| (model.probability(&e.features), e.correct)),
        );
        per_set.push((s, r));
    }
    let held = HeldOut {
        rel,
        base,
        baseline,
        per_set,
    };
    let header = file_header(a, &sources, train.len(), dev.len(), &held);
    std::fs::write(&a.out, model.to_toml(&header))
        .with_context(|| format!("cannot write {}", a.out.display()))?;
    let mut err = std::io::stderr().lock();
    eprintln!(
        "wrote {} ({} weights); {} training claims, {} held out",
        a.out.display(),
        model.weights.len(),
        train.len(),
        dev.len()
    );
    eprintln!("held-out reliability:");
    print_reliability(&mut err, &held.rel)?;
    eprintln!(
        "a constant {base:.3} on the same claims: ECE {:.3}, Brier {:.3}",
        held.baseline.expected_calibration_error, held.baseline.brier
    );
    for (n, r) in &held.per_set {
        eprintln!(
            "held out, {n}: {} claims ({} right), ECE {:.3}, Brier {:.3}",
            r.claims, r.correct, r.expected_calibration_error, r.brier
        );
    }
    Ok(ExitCode::SUCCESS)
}

/// The claims the extractor finds in each labelled data set, judged right or wrong and named by
/// their data set; and a line per data set for the model file's header.
fn judge_all(ex: &Extractor, gold: &[(GoldFormat, PathBuf)]) -> Result<(Vec<Named>, Vec<String>)> {
    let mut judged: Vec<Named> = Vec::new();
    let mut sources = Vec::new();
    for (format, path) in gold {
        let name = format_name(*format);
        let found = match load_gold(*format, path)? {
            Gold::Pairs(items) => evaluate::score_pairs_judged(ex, &items).2,
            Gold::Docs(docs) => evaluate::score_spans_judged(ex, &docs).2,
        };
        let file = path.file_name().map_or_else(
            || path.display().to_string(),
            |f| f.to_string_lossy().into_owned(),
        );
        let right = found.iter().filter(|j| j.correct).count();
        sources.push(format!(
            "{name} {file}: {} judged claims, {right} right",
            found.len()
        ));
        eprintln!(
            "{name} {}: {} judged claims, {right} right",
            path.display(),
            found.len()
        );
        judged.extend(found.into_iter().map(|j| (name.clone(), j)));
    }
    Ok((judged, sources))
}

/// A judged claim with the name of its data set.
type Named = (String, Judged);

/// The judged claims as training examples, split into training and held-out ones (one sentence
/// in `hold_out`); with the data set of each held-out example, for a reliability line per set.
fn examples<'j>(
    ex: &Extractor,
    judged: &'j [Named],
    hold_out: u8,
    usable_weight: usize,
) -> (Vec<Example>, Vec<Example>, Vec<&'j str>) {
    let (mut train, mut dev) = (Vec::new(), Vec::new());
    let mut dev_names: Vec<&str> = Vec::new();
    for (name, j) in judged {
        // The tags the pipeline gives this sentence (its cue matches' windows).
        let s = TaggedSentence::from_tokens(
            &j.sentence,
            j.claim.source.start,
            ex.sentence_tokens(&j.sentence),
        );
        let features =
            confidence_features(&j.claim, ex.cues.family(&j.claim.cue), &s, j.claims_here);
        let e = Example {
            features,
            correct: j.correct,
        };
        if is_held_out(&unit_key(name, &j.unit), hold_out) {
            dev.push(e);
            dev_names.push(name);
        } else {
            let copies = if name == "usable" {
                usable_weight.max(1)
            } else {
                1
            };
            train.extend(std::iter::repeat_n(e, copies));
        }
    }
    (train, dev, dev_names)
}

/// How the trained model does on the held-out claims: overall, against a constant guess of the
/// base rate, and per data set.
struct HeldOut {
    rel: Reliability,
    base: f64,
    baseline: Reliability,
    per_set: Vec<(String, Reliability)>,
}

/// The comment lines at the top of the model file: what it is, the data, the options, and how it
/// does on the held-out claims.
fn file_header(
    a: &TrainConfidenceArgs,
    sources: &[String],
    trained: usize,
    held_out: usize,
    h: &HeldOut,
) -> Vec<String> {
    let mut header = vec![
        "hearsay claim confidence model: logistic regression over named features of a claim."
            .to_string(),
        "confidence = 1 / (1 + exp(-(bias + sum of the weights of the claim's features)))."
            .to_string(),
        "Trained by `hearsay train-confidence` (see docs/confidence.md); licences of the data in"
            .to_string(),
        "patterns/confidence.NOTICE. Data:".to_string(),
    ];
    header.extend(sources.iter().map(|s| format!("  {s}")));
    header.push(format!(
        "Options: hold-out 1 in {}, l2 {}, min-count {}, usable weight {}. {} training claims, {} held out.",
        a.hold_out, a.l2, a.min_count, a.usable_weight, trained, held_out
    ));
    let (rel, baseline) = (&h.rel, &h.baseline);
    header.push(format!(
        "Held out: expected calibration error {:.3}, Brier score {:.3} (constant {:.3}: ECE {:.3}, Brier {:.3}).",
        rel.expected_calibration_error, rel.brier, h.base, baseline.expected_calibration_error, baseline.brier
    ));
    for (n, r) in &h.per_set {
        header.push(format!(
            "  held out, {n}: {} claims ({} right), ECE {:.3}, Brier {:.3}.",
            r.claims, r.correct, r.expected_calibration_error, r.brier
        ));
    }
    header
}
