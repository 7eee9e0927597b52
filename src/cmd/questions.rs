//! `hearsay questions`: the question set for a variable or pair list.

use super::args::pair_list;
use super::{write_rows, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::compare::questions::{self as q, Question};
use hearsay::variables::Normalizer;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Every ordered pair (x, y) is crossed with every wording of patterns/questions.toml \
(directed \"Does x cause y?\", reversed \"Is y an effect of x?\", symmetric \"Is there a causal \
relationship between x and y?\"; sign wordings with --sign). n variables give n·(n−1) pairs.\n\n\
The id is stable: a hash of the family, the wording id and both variable keys. Add an `answer` \
column (yes, no, unsure, or a probability of yes) and a `model` column, then run \
`hearsay compare FILE`."
)]
#[command(group(clap::ArgGroup::new("input").required(true).args(["vars", "pairs"])))]
pub struct QuestionsArgs {
    /// A variable list: one name per line; every ordered pair is asked.
    #[arg(long, value_name = "FILE")]
    pub vars: Option<PathBuf>,
    /// A pair list: `x<TAB>y` per line; only these ordered pairs are asked.
    #[arg(long, value_name = "FILE")]
    pub pairs: Option<PathBuf>,
    /// Use the wordings in FILE (same format as patterns/questions.toml) instead of the built-in ones.
    #[arg(long, value_name = "FILE")]
    pub questions: Option<PathBuf>,
    /// Also write the sign wordings ("Does x increase y?").
    #[arg(long)]
    pub sign: bool,
}

pub const HEADERS: &[&str] = &[
    "id", "x", "y", "x_key", "y_key", "family", "template", "text",
];

pub fn run(g: &Global, a: &QuestionsArgs) -> Result<ExitCode> {
    let set = g.pattern_set()?;
    let n = Normalizer::new(&set.lexicon);
    let Some(list) = pair_list(a.vars.as_deref(), a.pairs.as_deref()) else {
        anyhow::bail!("give --vars FILE or --pairs FILE");
    };
    let pairs = q::read_pairs(&n, list)?;
    let wordings = q::load_wordings(a.questions.as_deref()).context("cannot load the wordings")?;
    let qs = q::questions(&pairs, &wordings, a.sign);
    let mut out = std::io::stdout().lock();
    write_rows(&mut out, g.format(), &qs, csv_row, HEADERS)?;
    Ok(ExitCode::SUCCESS)
}

fn csv_row(q: &Question) -> Vec<String> {
    vec![
        q.id.clone(),
        q.x.clone(),
        q.y.clone(),
        q.x_key.clone(),
        q.y_key.clone(),
        q.family.to_string(),
        q.template.clone(),
        q.text.clone(),
    ]
}
