//! `hearsay claims`: every stored claim that matches the filters.

use super::variables::{no_variable_note, EXIT_NO_VARIABLE};
use super::{write_rows, ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::query;
use hearsay::Claim;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "JSON output is the claim record itself (see the README's \"Output \
schema\"), one per line, as `extract` prints it. A name given to --cause, --effect or --var \
that is no variable of the store is noted on stderr, with the nearest variables (by spelling \
and shared words) and their claim counts; the output is then empty.\n\nExit status: 0 (also \
when no claim matches), 3 when a name given to --cause, --effect or --var is no variable, 2 on an \
error.\n\nA \
claim is a statement found in text, not evidence that the causation is real."
)]
pub struct ClaimsArgs {
    /// Only claims whose cause is this variable (matched through normalisation and aliases).
    #[arg(long, value_name = "X")]
    pub cause: Option<String>,
    /// Only claims whose effect is this variable.
    #[arg(long, value_name = "Y")]
    pub effect: Option<String>,
    /// Only claims that involve this variable on either side.
    #[arg(long, value_name = "X")]
    pub var: Option<String>,
    /// Only claims of this cue id.
    #[arg(long, value_name = "ID")]
    pub cue: Option<String>,
    /// Only claims from documents whose path contains this text.
    #[arg(long, value_name = "TEXT")]
    pub path: Option<String>,
    /// At most this many claims (0 for all).
    #[arg(long, short = 'n', default_value_t = 0)]
    pub limit: usize,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

const HEADERS: &[&str] = &[
    "location", "cause", "effect", "kind", "polarity", "modality", "cue", "sentence",
];

pub fn run(g: &Global, a: &ClaimsArgs) -> Result<ExitCode> {
    let filter = a.filter.to_filter();
    let (store, normalizer, aliases) = g.query_parts()?;
    let key = |s: &Option<String>| s.as_ref().map(|s| aliases.query_key(&normalizer, s));
    let (cause, effect, var) = (key(&a.cause), key(&a.effect), key(&a.var));
    // A claim printed names one of the variables asked for: only their rows are read (through
    // the store's postings), in the same order as the whole graph's rows.
    let named: Vec<String> = [&cause, &effect, &var]
        .into_iter()
        .flatten()
        .cloned()
        .collect();
    let loaded = if named.is_empty() {
        query::load(store, normalizer, aliases, &filter, false)
    } else {
        query::load_naming(store, normalizer, aliases, &filter, &named)
    }
    .context("cannot read the store's claims")?;
    // A misspelt name gives an empty table; say why on stderr, where the data is not, with
    // the nearest variables (from the whole graph, built only then), and exit with the status
    // that says so.
    let mut whole = None;
    let mut missed = false;
    for (flag, name) in [
        ("--cause", &a.cause),
        ("--effect", &a.effect),
        ("--var", &a.var),
    ] {
        if let Some(name) = name {
            if loaded.lookup(name).1.is_some() {
                continue;
            }
            if whole.is_none() {
                whole = Some(g.graph(&filter)?);
            }
            if let Some(w) = whole.as_ref().filter(|w| w.lookup(name).1.is_none()) {
                missed = true;
                if !g.quiet {
                    eprintln!(
                        "hearsay: note: {flag}: {}; no claim can match",
                        no_variable_note(w, name)
                    );
                }
            }
        }
    }
    let mut picked: Vec<Claim> = Vec::new();
    for row in &loaded.graph.rows {
        if cause.as_ref().is_some_and(|k| *k != row.cause)
            || effect.as_ref().is_some_and(|k| *k != row.effect)
            || var
                .as_ref()
                .is_some_and(|k| *k != row.cause && *k != row.effect)
            || a.cue.as_ref().is_some_and(|c| *c != row.cue)
            || a.path
                .as_ref()
                .is_some_and(|p| !row.doc.contains(p.as_str()))
        {
            continue;
        }
        picked.push(
            loaded
                .store
                .claim(row.at)
                .context("cannot read a claim from the store")?,
        );
        if a.limit > 0 && picked.len() >= a.limit {
            break;
        }
    }
    let mut out = std::io::stdout().lock();
    write_rows(&mut out, g.format(), &picked, cells, HEADERS)?;
    if missed {
        return Ok(ExitCode::from(EXIT_NO_VARIABLE));
    }
    Ok(ExitCode::SUCCESS)
}

fn cells(c: &Claim) -> Vec<String> {
    vec![
        c.location(),
        c.cause.text.clone(),
        c.effect.text.clone(),
        c.kind.to_string(),
        c.polarity.to_string(),
        c.modality.to_string(),
        c.cue.clone(),
        c.sentence.clone(),
    ]
}
