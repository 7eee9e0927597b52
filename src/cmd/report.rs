//! `hearsay report`: one self-contained HTML page with the corpus summary, the claim graph,
//! plots, tables and evidence.

use super::{ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::compare::questions as q;
use hearsay::compare::{self as cmp, AnswerSet, AnswerSource, Corpus, Summary};
use hearsay::query::{self, Loaded};
use hearsay::report::{self, Options, Sources};
use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "The page has no external resources (styles, script and figures are inlined), \
so it opens offline and can be sent as one file. Sections: corpus summary, the claim graph \
(heaviest causal edges; click an edge for its evidence), plots, top relations, conflicts, and \
pairs named together but never stated causal; --pair adds a section for two variables, and \
--compare ANSWERS (with --vars or --pairs) the model-comparison summary of `hearsay compare`.\n\n\
Every number counts statements found in text; none is evidence that a causation is real."
)]
pub struct ReportArgs {
    /// Write the page to FILE (default: stdout).
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// The page title.
    #[arg(long, default_value = "Claim report", value_name = "TEXT")]
    pub title: String,
    /// Causal edges drawn in the graph picture.
    #[arg(long, default_value_t = 40, value_name = "N")]
    pub edges: usize,
    /// Evidence sentences per edge (and per direction in the pair section).
    #[arg(long, default_value_t = 3, value_name = "N")]
    pub evidence: usize,
    /// Rows per table.
    #[arg(long, default_value_t = 50, value_name = "N")]
    pub rows: usize,
    /// How many of the most-mentioned variables the co-mention table pairs up.
    #[arg(long, default_value_t = 25, value_name = "N")]
    pub co_mention_vars: usize,
    /// Add a section on what the corpus says about two variables.
    #[arg(long, num_args = 2, value_names = ["X", "Y"])]
    pub pair: Option<Vec<String>>,
    /// Add the model-comparison summary of `hearsay compare` for this answers file.
    #[arg(long, value_name = "ANSWERS")]
    pub compare: Option<PathBuf>,
    /// With --compare: the variable list the questions were made from (to look up ids).
    #[arg(
        long,
        value_name = "FILE",
        requires = "compare",
        conflicts_with = "pairs"
    )]
    pub vars: Option<PathBuf>,
    /// With --compare: the pair list the questions were made from (to look up ids).
    #[arg(long, value_name = "FILE", requires = "compare")]
    pub pairs: Option<PathBuf>,
    /// With --compare: support a question needs for the corpus answer to be yes.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub threshold: usize,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

pub fn run(g: &Global, a: &ReportArgs) -> Result<ExitCode> {
    let filter = a.filter.to_filter();
    // Without a filter or --compare, the page is gathered from the store's aggregate tables
    // and the rows of what it shows sentences of; otherwise from every claim row.
    let (mut loaded, aggregated) = if filter.is_empty() && a.compare.is_none() {
        let (store, normalizer, aliases) = g.query_parts()?;
        let (loaded, agg) = query::load_aggregated(store, normalizer, aliases)
            .context("cannot read the store's aggregates")?;
        (loaded, Some(agg))
    } else {
        (g.graph(&filter)?, None)
    };
    let families: HashMap<String, String> = g
        .pattern_set()?
        .cues
        .into_iter()
        .map(|c| (c.id, c.family))
        .collect();
    let opts = Options {
        title: a.title.clone(),
        edges: a.edges,
        evidence: a.evidence,
        rows: a.rows,
        co_mention_vars: a.co_mention_vars,
    };
    let comparison = match &a.compare {
        Some(path) => Some(comparison(&mut loaded, a, path)?),
        None => None,
    };
    let pair = match a.pair.as_deref() {
        Some([x, y]) => Some((x.as_str(), y.as_str())),
        _ => None,
    };
    let data = report::collect(
        &mut loaded,
        Sources {
            families: &families,
            pair,
            comparison,
            aggregated: aggregated.as_ref(),
        },
        &opts,
    )
    .context("cannot gather the report's data from the store")?;
    let page = report::render(&data);
    match &a.output {
        Some(p) => {
            std::fs::write(p, page).with_context(|| format!("cannot write {}", p.display()))?
        }
        None => std::io::stdout().lock().write_all(page.as_bytes())?,
    }
    Ok(ExitCode::SUCCESS)
}

/// `--compare ANSWERS`: the per-model, per-family summaries of `hearsay compare`, read with the
/// built-in wordings.
fn comparison(loaded: &mut Loaded, a: &ReportArgs, answers: &Path) -> Result<Vec<Summary>> {
    let wordings = q::load_wordings(None).context("cannot load the wordings")?;
    let set = AnswerSet::read(
        &loaded.normalizer,
        &AnswerSource {
            answers,
            list: super::args::pair_list(a.vars.as_deref(), a.pairs.as_deref()),
            wordings: &wordings,
        },
    )?;
    let mentions = set
        .mentions(loaded)
        .context("cannot search the sentence index")?;
    let profiles = cmp::profiles(
        &Corpus::of(loaded, &mentions),
        &set.asked,
        a.threshold.max(1),
    );
    Ok(cmp::summarise(&set.answers, &profiles).summaries)
}
