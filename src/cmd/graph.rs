//! `hearsay graph`: export the claim graph for network tools.

use super::args::{read_vars, WeightArgs};
use super::output::find_var;
use super::{ClaimFilter, FormatArg, Global, Table};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::graph::export::{self, Export, Selection};
use std::collections::BTreeSet;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(ValueEnum, Debug, Clone, Copy)]
pub enum To {
    Graphml,
    Gexf,
    Dot,
    Json,
    Csv,
}

#[derive(Args, Debug)]
#[command(
    after_help = "Exports causal edges (cause → effect) with their counts. The default \
weight is distinct documents, each counted with the mean value of its claims: asserted 1, hedged \
and conditional 0.5, question 0, negated or \"no effect\" -1 (see docs/graph.md; change it with \
--weight-by and --*-weight). The rule is written into every file. json is node-link JSON for \
networkx.node_link_graph(data, edges=\"edges\"); csv writes the edges to FILE and the nodes \
beside it, to FILE's name with .nodes.csv for its extension (-o edges.csv also writes \
edges.nodes.csv). table prints the edges as a table. Choose the file format with the global \
--format (graphml by default here); every format goes to -o FILE when given, else to stdout.\n\n\
Without a filter, --dedupe or --evidence, the counts and weights come from the store's \
aggregate tables (docs/store.md); with one, from every claim row.\n\n\
Exit status: 0 on success, 2 on an error.\n\nAn edge is a count \
of statements in text, not evidence that the causation is real."
)]
pub struct GraphArgs {
    /// Older spelling of --format for this command.
    #[arg(long, value_enum, hide = true)]
    pub to: Option<To>,
    /// Write to FILE instead of stdout (required for csv, which writes two files).
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Only edges stated in at least N documents.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_docs: usize,
    /// Only edges with at least N claims.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_claims: usize,
    /// Only the N heaviest edges (0: all).
    #[arg(long, default_value_t = 0, value_name = "N")]
    pub top: usize,
    /// Only edges between the variables listed in FILE (one name a line).
    #[arg(long, value_name = "FILE")]
    pub vars: Option<PathBuf>,
    /// Only the neighbourhood of variable X (edges in either direction, see --hops).
    #[arg(long, value_name = "X")]
    pub around: Option<String>,
    /// With --around: how many edges away from X.
    #[arg(long, default_value_t = 1, value_name = "K")]
    pub hops: usize,
    /// Attach the evidence sentence ids (document:line@byte) to each edge.
    #[arg(long)]
    pub evidence: bool,
    #[command(flatten)]
    pub weight: WeightArgs,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

fn file_format(g: &Global, a: &GraphArgs) -> To {
    match (a.to, g.format) {
        (Some(t), _) => t,
        (None, Some(FormatArg::Gexf)) => To::Gexf,
        (None, Some(FormatArg::Dot)) => To::Dot,
        (None, Some(FormatArg::Json)) => To::Json,
        (None, Some(FormatArg::Csv)) => To::Csv,
        (None, Some(FormatArg::Graphml | FormatArg::Table) | None) => To::Graphml,
    }
}

pub fn run(g: &Global, a: &GraphArgs) -> Result<ExitCode> {
    let loaded = a.weight.load_counts(g, &a.filter, a.evidence)?;
    let vars = match &a.vars {
        Some(p) => Some(
            read_vars(&loaded, p)?
                .into_iter()
                .map(|v| v.1)
                .collect::<BTreeSet<String>>(),
        ),
        None => None,
    };
    let around = match &a.around {
        Some(x) => Some(loaded.graph.graph[find_var(&loaded, x)?].key.clone()),
        None => None,
    };
    let sel = Selection {
        min_docs: a.min_docs,
        min_claims: a.min_claims,
        top: a.top,
        vars,
        around,
        hops: a.hops,
        evidence: a.evidence,
        weight: a.weight.spec(),
        duplicates_removed: loaded.duplicates_removed,
    };
    let e = export::select(&loaded.graph, &sel);
    let to = file_format(g, a);
    if g.format == Some(FormatArg::Table) && a.to.is_none() {
        // The table goes where -o says, as every other format does.
        match &a.output {
            Some(p) => {
                let mut buf = Vec::new();
                print_table(&mut buf, &e)?;
                std::fs::write(p, &buf).with_context(|| format!("cannot write {}", p.display()))?;
            }
            None => print_table(&mut std::io::stdout().lock(), &e)?,
        }
        return Ok(ExitCode::SUCCESS);
    }
    let summary = || {
        if !g.quiet {
            eprintln!(
                "hearsay: {} nodes, {} edges; {}",
                e.nodes.len(),
                e.edges.len(),
                e.weight_rule
            );
        }
    };
    if let To::Csv = to {
        let Some(p) = &a.output else {
            anyhow::bail!("--format csv writes an edge list and a node list: give -o FILE (the nodes go beside it: -o edges.csv also writes edges.nodes.csv)");
        };
        let (mut edges, mut nodes) = (Vec::new(), Vec::new());
        export::write_edges_csv(&mut edges, &e)?;
        export::write_nodes_csv(&mut nodes, &e)?;
        let edges = super::output::neutralise_csv(&edges)?;
        let nodes = super::output::neutralise_csv(&nodes)?;
        let np = nodes_path(p);
        std::fs::write(&np, &nodes).with_context(|| format!("cannot write {}", np.display()))?;
        summary();
        std::fs::write(p, &edges).with_context(|| format!("cannot write {}", p.display()))?;
        return Ok(ExitCode::SUCCESS);
    }
    summary();
    // The other formats are written as they are made, never held whole: a graph of a large
    // store is tens of megabytes of XML.
    let (mut out, name): (Box<dyn Write>, String) = match &a.output {
        Some(p) => (
            Box::new(
                std::fs::File::create(p)
                    .with_context(|| format!("cannot write {}", p.display()))?,
            ),
            p.display().to_string(),
        ),
        None => (Box::new(std::io::stdout().lock()), "standard output".into()),
    };
    let mut out = std::io::BufWriter::with_capacity(1 << 16, &mut out);
    let written: Result<()> = match to {
        To::Json => export::write_json(&mut out, &e).map_err(Into::into),
        To::Graphml => export::write_graphml(&mut out, &e).map_err(xml_error),
        To::Gexf => export::write_gexf(&mut out, &e).map_err(xml_error),
        To::Dot => export::write_dot(&mut out, &e).map_err(Into::into),
        To::Csv => Ok(()),
    };
    written
        .and_then(|()| out.flush().map_err(Into::into))
        .with_context(|| format!("cannot write {name}"))?;
    Ok(ExitCode::SUCCESS)
}

/// An XML writer's error, its I/O error kept as one (so a closed pipe still ends quietly).
fn xml_error(e: quick_xml::Error) -> anyhow::Error {
    match e {
        quick_xml::Error::Io(io) => std::io::Error::new(io.kind(), io.to_string()).into(),
        other => anyhow::anyhow!(other),
    }
}

/// `edges.csv` → `edges.nodes.csv`.
fn nodes_path(p: &Path) -> PathBuf {
    let stem = p
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "graph".into());
    p.with_file_name(format!("{stem}.nodes.csv"))
}

fn print_table(out: &mut impl Write, e: &Export) -> Result<()> {
    let mut t = Table::new(&[
        "cause", "effect", "weight", "docs", "sents", "claims", "neg", "sign", "dir",
    ]);
    let labels: std::collections::HashMap<&str, &str> = e
        .nodes
        .iter()
        .map(|n| (n.id.as_str(), n.label.as_str()))
        .collect();
    let label = |k: &str| labels.get(k).copied().unwrap_or(k).to_string();
    for ed in &e.edges {
        t.row(vec![
            label(&ed.source),
            label(&ed.target),
            format!("{}", ed.weight),
            ed.documents.to_string(),
            ed.sentences.to_string(),
            ed.mentions.to_string(),
            ed.negated.to_string(),
            format!("{:+.2}", ed.net_sign),
            format!("{:.2}", ed.direction_ratio),
        ]);
    }
    t.print(out)?;
    writeln!(out, "{}", e.weight_rule)?;
    if e.duplicates_removed > 0 {
        writeln!(
            out,
            "near-duplicate mentions removed: {}",
            e.duplicates_removed
        )?;
    }
    Ok(())
}
