//! Argument groups that several query commands flatten into their own, and the reading of the
//! files they name.

use super::Global;
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::compare::questions::PairList;
use hearsay::graph::{Filter, Unit, WeightSpec};
use hearsay::query::{self, Loaded};
use hearsay::{Kind, Modality, Polarity};
use std::path::Path;

/// Filters on claims, shared by the query commands.
#[derive(Args, Debug, Clone, Default)]
pub struct ClaimFilter {
    /// Only claims of this kind.
    #[arg(long, value_parser = parse_word::<Kind>)]
    pub kind: Option<Kind>,
    /// Only claims with this polarity (increase, decrease, unsigned, prevent, none).
    #[arg(long, value_parser = parse_word::<Polarity>)]
    pub polarity: Option<Polarity>,
    /// Only claims with this modality (asserted, hedged, negated, question, conditional).
    #[arg(long, value_parser = parse_word::<Modality>)]
    pub modality: Option<Modality>,
    /// Only claims whose confidence (0 to 1, see docs/confidence.md) is at least this.
    #[arg(long, value_name = "P", value_parser = parse_confidence)]
    pub min_confidence: Option<f32>,
}

impl ClaimFilter {
    pub fn to_filter(&self) -> Filter {
        Filter {
            kind: self.kind,
            polarity: self.polarity,
            modality: self.modality,
            min_confidence: self.min_confidence,
        }
    }
}

/// A confidence threshold: a number from 0 to 1.
fn parse_confidence(s: &str) -> Result<f32, String> {
    match s.trim().parse::<f32>() {
        Ok(x) if (0.0..=1.0).contains(&x) => Ok(x),
        _ => Err(format!(
            "not a confidence: {s:?} (use a number from 0 to 1)"
        )),
    }
}

fn parse_word<T: std::str::FromStr<Err = String>>(s: &str) -> Result<T, String> {
    s.parse()
}

#[derive(ValueEnum, Debug, Clone, Copy, Default)]
pub enum UnitArg {
    #[default]
    Documents,
    Sentences,
    Mentions,
}

/// How edges are weighted and whether repeated sentences count once (shared by the analyses).
#[derive(Args, Debug, Clone)]
pub struct WeightArgs {
    /// What one unit of edge weight is.
    #[arg(long, value_enum, default_value = "documents", value_name = "UNIT")]
    pub weight_by: UnitArg,
    /// Value of a hedged claim ("may raise").
    #[arg(
        long,
        default_value_t = 0.5,
        value_name = "X",
        allow_negative_numbers = true
    )]
    pub hedged_weight: f64,
    /// Value of a conditional claim ("if ..., X raises Y").
    #[arg(
        long,
        default_value_t = 0.5,
        value_name = "X",
        allow_negative_numbers = true
    )]
    pub conditional_weight: f64,
    /// Value of a question ("does X raise Y?").
    #[arg(
        long,
        default_value_t = 0.0,
        value_name = "X",
        allow_negative_numbers = true
    )]
    pub question_weight: f64,
    /// Value of a negated or "no effect" claim (negative: it counts against the edge).
    #[arg(long, default_value_t = -1.0, value_name = "X", allow_negative_numbers = true)]
    pub negated_weight: f64,
    /// Count near-duplicate sentences of the same claim once (word-3-shingle Jaccard >= 0.8).
    #[arg(long)]
    pub dedupe: bool,
}

impl WeightArgs {
    pub fn spec(&self) -> WeightSpec {
        WeightSpec {
            unit: match self.weight_by {
                UnitArg::Documents => Unit::Documents,
                UnitArg::Sentences => Unit::Sentences,
                UnitArg::Mentions => Unit::Mentions,
            },
            hedged: self.hedged_weight,
            conditional: self.conditional_weight,
            question: self.question_weight,
            negated: self.negated_weight,
            ..WeightSpec::default()
        }
    }

    /// Build the graph with these options.
    pub fn load(&self, g: &Global, filter: &ClaimFilter) -> Result<Loaded> {
        g.load(&filter.to_filter(), self.dedupe)
    }

    /// Build the graph for a command that reads counts and weights only (no row of the graph
    /// unless `rows` says so): without a filter and --dedupe, from the store's aggregate
    /// tables, which reads no claim row; otherwise from every row, as [`Self::load`].
    pub fn load_counts(&self, g: &Global, filter: &ClaimFilter, rows: bool) -> Result<Loaded> {
        let f = filter.to_filter();
        if rows || self.dedupe || !f.is_empty() {
            return self.load(g, filter);
        }
        let (store, normalizer, aliases) = g.query_parts()?;
        let (loaded, _) = query::load_aggregated(store, normalizer, aliases)
            .context("cannot read the store's aggregates")?;
        Ok(loaded)
    }
}

/// Read a variable list (one name per line, `#` comments) into keys, through aliases.
pub fn read_vars(loaded: &Loaded, path: &Path) -> Result<Vec<(String, String)>> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
    let vars = loaded.variable_list(path, &text)?;
    if vars.is_empty() {
        anyhow::bail!("{}: no variables in the file", path.display());
    }
    Ok(vars)
}

/// The question list of `--vars` or `--pairs`, as the library reads it.
pub fn pair_list<'a>(vars: Option<&'a Path>, pairs: Option<&'a Path>) -> Option<PairList<'a>> {
    match (vars, pairs) {
        (Some(v), _) => Some(PairList::Vars(v)),
        (None, Some(p)) => Some(PairList::Pairs(p)),
        (None, None) => None,
    }
}
