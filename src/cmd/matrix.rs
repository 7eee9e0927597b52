//! `hearsay matrix --vars FILE`: the edge-weight matrix over a variable list, as CSV.

use super::args::{read_vars, WeightArgs};
use super::{ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::graph::{self, Cell};
use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(ValueEnum, Debug, Clone, Copy)]
pub enum CellArg {
    Weight,
    Documents,
    Mentions,
}

#[derive(Args, Debug)]
#[command(
    after_help = "Row = cause, column = effect: the cell in row A, column B is the edge \
A → B (0 when no claim states it). The first column names the causes; the header names the \
effects, in the order of FILE. Always CSV. Counts of statements in text, not evidence.\n\nWithout a claim filter or --dedupe, the weights come from the store's aggregate tables \
(docs/store.md) and no claim row is read; with one, every claim row is read."
)]
pub struct MatrixArgs {
    /// The variables, one name a line (`#` comments and blank lines skipped).
    #[arg(long, value_name = "FILE")]
    pub vars: PathBuf,
    /// What a cell holds.
    #[arg(long, value_enum, default_value = "weight")]
    pub cell: CellArg,
    /// Write to FILE instead of stdout.
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<PathBuf>,
    #[command(flatten)]
    pub weight: WeightArgs,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

pub fn run(g: &Global, a: &MatrixArgs) -> Result<ExitCode> {
    let loaded = a.weight.load_counts(g, &a.filter, false)?;
    let vars = read_vars(&loaded, &a.vars)?;
    for (name, key) in &vars {
        if !loaded.graph.index.contains_key(key) {
            g.warn(&format!(
                "{}: \"{name}\" is in no claim (its row and column are 0)",
                a.vars.display()
            ));
        }
    }
    let keys: Vec<String> = vars.iter().map(|v| v.1.clone()).collect();
    let cell = match a.cell {
        CellArg::Weight => Cell::Weight,
        CellArg::Documents => Cell::Documents,
        CellArg::Mentions => Cell::Mentions,
    };
    let spec = a.weight.spec();
    let m = graph::matrix(&loaded.graph, &spec, &keys, cell);
    let mut buf = Vec::new();
    {
        let mut w = super::output::csv_writer(&mut buf);
        let mut header = vec!["cause \\ effect".to_string()];
        header.extend(vars.iter().map(|v| v.0.clone()));
        w.write_record(&header)?;
        for ((name, _), row) in vars.iter().zip(m.iter()) {
            let mut rec = vec![name.clone()];
            rec.extend(row.iter().map(|x| x.to_string()));
            w.write_record(&rec)?;
        }
        w.flush()?;
    }
    if !g.quiet && matches!(a.cell, CellArg::Weight) {
        eprintln!("hearsay: {}", spec.describe());
    }
    match &a.output {
        Some(p) => {
            std::fs::write(p, &buf).with_context(|| format!("cannot write {}", p.display()))?
        }
        None => std::io::stdout().lock().write_all(&buf)?,
    }
    Ok(ExitCode::SUCCESS)
}
