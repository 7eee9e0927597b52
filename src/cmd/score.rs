//! `hearsay score --truth FILE`: compare the claim graph with a reference diagram.

use super::args::WeightArgs;
use super::{ClaimFilter, Format, Global, Table};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::evaluate::reference::{self, Reference, Scores};
use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "The reference is a CSV edge list (cause,effect per row; a header row \
source,target / cause,effect / from,to is skipped) or a DOT digraph (.dot, .gv). Its names go \
through the same normalisation and aliases as the claims; only claim edges between reference \
variables are scored. An edge is predicted when its weight is at least --threshold; a pair's \
orientation is its heavier direction. SHD counts missing pairs, extra pairs and misoriented pairs \
(a reversal costs 1). See docs/graph.md.\n\nAgreement with a diagram measures what texts state, \
not whether the diagram or the texts are right.\n\nWithout a claim filter or --dedupe, the weights come from the store's aggregate tables \
(docs/store.md) and no claim row is read; with one, every claim row is read."
)]
pub struct ScoreArgs {
    /// The reference diagram (CSV edge list or DOT).
    #[arg(long, value_name = "FILE")]
    pub truth: PathBuf,
    /// Predict an edge when its weight is at least W.
    #[arg(long, default_value_t = 1.0, value_name = "W")]
    pub threshold: f64,
    /// Also write the curve over all thresholds to FILE (CSV).
    #[arg(long, value_name = "FILE")]
    pub curve: Option<PathBuf>,
    #[command(flatten)]
    pub weight: WeightArgs,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

const CURVE_HEADERS: &[&str] = &[
    "threshold",
    "predicted_pairs",
    "shd",
    "missing",
    "extra",
    "misoriented",
    "skeleton_precision",
    "skeleton_recall",
    "skeleton_f1",
    "orientation_precision",
    "orientation_recall",
    "orientation_f1",
    "orientation_accuracy",
];

fn opt(x: Option<f64>) -> String {
    x.map(|v| format!("{v:.4}")).unwrap_or_default()
}

fn curve_row(s: &Scores) -> Vec<String> {
    vec![
        s.threshold.to_string(),
        s.predicted_pairs.to_string(),
        s.shd.to_string(),
        s.missing.to_string(),
        s.extra.to_string(),
        s.misoriented.to_string(),
        opt(s.skeleton.precision),
        opt(s.skeleton.recall),
        opt(s.skeleton.f1),
        opt(s.orientation.precision),
        opt(s.orientation.recall),
        opt(s.orientation.f1),
        opt(s.orientation_accuracy),
    ]
}

fn write_curve(out: &mut impl Write, curve: &[Scores]) -> Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(CURVE_HEADERS)?;
    for s in curve {
        w.write_record(curve_row(s))?;
    }
    w.flush()?;
    Ok(())
}

pub fn run(g: &Global, a: &ScoreArgs) -> Result<ExitCode> {
    let loaded = a.weight.load_counts(g, &a.filter, false)?;
    let reference = Reference::load(&a.truth, &loaded.normalizer, &loaded.aliases)
        .context("cannot read the reference diagram")?;
    let spec = a.weight.spec();
    let weights = reference::candidate_weights(&loaded.graph, &spec, &reference);
    let at = reference::score_at(&weights, &reference, a.threshold);
    let curve = reference::curve(&weights, &reference);
    if let Some(p) = &a.curve {
        let mut buf = Vec::new();
        write_curve(&mut buf, &curve)?;
        std::fs::write(p, &buf).with_context(|| format!("cannot write {}", p.display()))?;
    }
    let mut out = std::io::stdout().lock();
    match g.format() {
        Format::Json => {
            let v = serde_json::json!({
                "reference": a.truth.display().to_string(),
                "variables": reference.names.len(),
                "weight_rule": spec.describe(),
                "at": at,
                "curve": curve,
            });
            serde_json::to_writer(&mut out, &v)?;
            out.write_all(b"\n")?;
        }
        Format::Csv => write_curve(&mut out, &curve)?,
        Format::Table => {
            let mut t = Table::new(&["measure", "value"]);
            for (h, v) in CURVE_HEADERS.iter().zip(curve_row(&at)) {
                t.row(vec![h.to_string(), v]);
            }
            t.print(&mut out)?;
            writeln!(
                out,
                "reference: {} variables, {} edges; {} claim edges between them",
                reference.names.len(),
                reference.edges.len(),
                weights.len()
            )?;
            writeln!(out, "{}", spec.describe())?;
        }
    }
    Ok(ExitCode::SUCCESS)
}
