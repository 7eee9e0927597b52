//! Subcommands, one file each, and the setup they share: `Cli` and the global options here
//! (output formats, loading the patterns, opening the store and building its graph through
//! `query::load`), the argument groups several commands flatten in `args.rs`, and what they print
//! with in `output.rs`. Every command file parses and prints; what it computes is library code.

mod args;
mod claims;
mod compare;
mod conflicts;
mod cycles;
mod eval;
mod explain;
mod extract;
mod graph;
mod link;
mod matrix;
mod merge;
mod output;
mod pair;
mod paths;
mod patterns;
mod progress;
mod questions;
mod report;
mod scan;
mod score;
mod top;
mod train_confidence;
mod train_tagger;
mod variables;

use anyhow::{Context, Result};
use clap::{ArgMatches, Args, FromArgMatches, Parser, Subcommand, ValueEnum};
use hearsay::extract::{Extractor, ExtractorError};
use hearsay::graph::Filter;
use hearsay::patterns::{self as pat, PatternSet};
use hearsay::query::{self, Loaded};
use hearsay::store::Store;
use hearsay::variables::rollup::{roll_up, Level};
use hearsay::variables::{Aliases, Normalizer};
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

pub use args::ClaimFilter;
pub use output::{escape, write_rows, Table};

const ABOUT: &str = "Find what a body of text states about cause and effect.

hearsay reads text files, finds explicit causal statements (\"X raises Y\", \"Y is due to X\",
\"X has no effect on Y\"), keeps each with its sentence and location, and aggregates them into
a weighted claim graph you can query.

A claim is a statement found in text, not evidence that the causation is real, and nothing
hearsay prints is advice. Check the primary literature and ask qualified practitioners.";

const AFTER: &str =
    "Exit status: 0 on success (warnings about single files included), 1 when a check fails
(scan or extract --strict with an unreadable file, a failing `patterns check`), 2 on an error,
3 when `pair` or `claims` is given a name that is no variable (the nearest ones are suggested).
Output: a table on a terminal, JSON Lines otherwise; choose with --format.
Typical use:  hearsay scan corpora-demo  &&  hearsay pair \"fertiliser runoff\" \"algae blooms\"";

#[derive(Parser, Debug)]
#[command(name = "hearsay", version, about = ABOUT, after_help = AFTER, max_term_width = 100)]
pub struct Cli {
    #[command(flatten)]
    pub global: Global,
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Args, Debug, Clone)]
pub struct Global {
    /// The store directory that `scan` writes and queries read.
    #[arg(
        long,
        global = true,
        value_name = "DIR",
        default_value = ".hearsay",
        env = "HEARSAY_STORE"
    )]
    pub store: PathBuf,
    /// Use the pattern folder DIR (same layout as the shipped `patterns/`) instead of the built-in cues.
    #[arg(long, global = true, value_name = "DIR")]
    pub patterns: Option<PathBuf>,
    /// Map surface forms onto variables: a file of `surface form<TAB>variable name` lines.
    #[arg(long, global = true, value_name = "FILE")]
    pub aliases: Option<PathBuf>,
    /// Count variables at a coarser level in queries and exports (off by default):
    /// `abbreviations` makes a short form and its long form one variable where at least two
    /// documents define the short form, all the same way; `heads` also counts every qualified
    /// variable as its head ("increased nitrogen runoff from fields" as "nitrogen runoff").
    /// Applied after --aliases, from what the scan stored; `pair` says the level it answered at.
    /// A node's label stays its most frequent surface form.
    #[arg(long, global = true, value_enum, value_name = "LEVEL")]
    pub roll_up: Option<RollUpArg>,
    /// Output format (default: table on a terminal, JSON Lines otherwise). `graph` also writes
    /// graphml (its default), gexf and dot.
    #[arg(long, global = true, value_enum)]
    pub format: Option<FormatArg>,
    /// Print no progress or warnings on stderr.
    #[arg(long, short, global = true)]
    pub quiet: bool,
    /// Worker threads (default: all cores).
    #[arg(long, short = 'j', global = true, value_name = "N")]
    pub threads: Option<usize>,
    /// The read options, also accepted before the subcommand name; only `scan` and `extract`
    /// read files, so only their help shows them.
    #[command(flatten)]
    pub read: ReadArgsBefore,
}

#[derive(Subcommand, Debug)]
pub enum Command {
    /// Read files and folders into the claim store (re-reading only what changed).
    Scan(scan::ScanArgs),
    /// Print the claims of files or stdin as JSON Lines, without a store (the map step for pipelines).
    Extract(extract::ExtractArgs),
    /// Build a store from `extract` JSON Lines shards (the reduce step for pipelines and clusters).
    Merge(merge::MergeArgs),
    /// Join part stores written by `scan` into one store, without reading their claims (the
    /// reduce step when each partition of a cluster job scans its own files).
    Link(link::LinkArgs),
    /// What the corpus says about two variables, in each direction, with evidence.
    Pair(pair::PairArgs),
    /// The most-stated relations.
    Top(top::TopArgs),
    /// Every stored claim that matches the filters.
    Claims(claims::ClaimsArgs),
    /// Show which cues fire on a sentence, which spans are chosen and why.
    Explain(explain::ExplainArgs),
    /// Score extraction against labelled data: precision, recall and F1.
    Eval(eval::EvalArgs),
    /// Train the part-of-speech tagger from CoNLL-U treebanks (writes patterns/tagger.model).
    TrainTagger(train_tagger::TrainTaggerArgs),
    /// Train the claim confidence model from labelled data (writes patterns/confidence.toml).
    TrainConfidence(train_confidence::TrainConfidenceArgs),
    /// Export the claim graph (GraphML, GEXF, DOT, node-link JSON, CSV) for network tools.
    Graph(graph::GraphArgs),
    /// Indirect chains of stated edges from X to Y, ranked, with the sign of each chain.
    Paths(paths::PathsArgs),
    /// Pairs stated in both directions, with opposite signs, or both asserted and denied.
    Conflicts(conflicts::ConflictsArgs),
    /// Directed cycles among edges above a weight threshold.
    Cycles(cycles::CyclesArgs),
    /// The edge-weight matrix over a variable list, as CSV (causes on the rows).
    Matrix(matrix::MatrixArgs),
    /// Compare the claim graph with a reference diagram: SHD, precision, recall, F1.
    Score(score::ScoreArgs),
    /// Check or list cue patterns.
    Patterns(patterns::PatternsArgs),
    /// Write the question set for a variable list: every ordered pair in every wording.
    Questions(questions::QuestionsArgs),
    /// Set a model's answers to the question set beside what the corpus states.
    Compare(compare::CompareArgs),
    /// Write one self-contained HTML page: summary, claim graph, plots, tables and evidence.
    Report(report::ReportArgs),
    /// The variables: surface forms, heads and qualifiers, abbreviations, merge suggestions.
    Variables(variables::VariablesArgs),
}

/// What `--roll-up` accepts.
#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum RollUpArg {
    Abbreviations,
    Heads,
}

#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    Table,
    Json,
    Csv,
}

/// What `--format` accepts: the output formats every command has, plus the graph file formats
/// that only `graph` writes (one flag, so `hearsay graph --format gexf` reads naturally).
#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum FormatArg {
    Table,
    Json,
    Csv,
    Graphml,
    Gexf,
    Dot,
}

pub fn run(cli: Cli) -> Result<ExitCode> {
    // A reader's library that panics on a hostile file is reported as a warning naming the
    // file; its raw panic message would only add noise.
    hearsay::corpus::quiet_contained_panics();
    if let Some(n) = cli.global.threads {
        rayon::ThreadPoolBuilder::new()
            .num_threads(n.max(1))
            .build_global()
            .context("cannot set up worker threads")?;
    }
    let g = &cli.global;
    if let (Some(f @ (FormatArg::Graphml | FormatArg::Gexf | FormatArg::Dot)), false) =
        (g.format, matches!(cli.command, Command::Graph(_)))
    {
        anyhow::bail!(
            "--format {} is a graph file format: use it with `hearsay graph` (this command writes table, json or csv)",
            f.to_possible_value().map(|v| v.get_name().to_string()).unwrap_or_default()
        );
    }
    match &cli.command {
        Command::Scan(a) => scan::run(g, a),
        Command::Extract(a) => extract::run(g, a),
        Command::Pair(a) => pair::run(g, a),
        Command::Top(a) => top::run(g, a),
        Command::Claims(a) => claims::run(g, a),
        Command::Explain(a) => explain::run(g, a),
        Command::Eval(a) => eval::run(g, a),
        Command::TrainTagger(a) => train_tagger::run(g, a),
        Command::TrainConfidence(a) => train_confidence::run(g, a),
        Command::Patterns(a) => patterns::run(g, a),
        Command::Questions(a) => questions::run(g, a),
        Command::Graph(a) => graph::run(g, a),
        Command::Merge(a) => merge::run(g, a),
        Command::Link(a) => link::run(g, a),
        Command::Paths(a) => paths::run(g, a),
        Command::Conflicts(a) => conflicts::run(g, a),
        Command::Cycles(a) => cycles::run(g, a),
        Command::Matrix(a) => matrix::run(g, a),
        Command::Score(a) => score::run(g, a),
        Command::Compare(a) => compare::run(g, a),
        Command::Report(a) => report::run(g, a),
        Command::Variables(a) => variables::run(g, a),
    }
}

impl Global {
    pub fn format(&self) -> Format {
        match self.format {
            Some(FormatArg::Table) => Format::Table,
            Some(FormatArg::Csv) => Format::Csv,
            // The graph file formats are rejected in `run` for every command but `graph`.
            Some(_) => Format::Json,
            None if std::io::stdout().is_terminal() => Format::Table,
            None => Format::Json,
        }
    }

    pub fn pattern_set(&self) -> Result<PatternSet> {
        let set =
            PatternSet::load(self.patterns.as_deref()).context("cannot load the cue patterns")?;
        Ok(set)
    }

    pub fn extractor(&self) -> Result<Extractor> {
        self.extractor_for(&self.pattern_set()?)
    }

    /// The extractor for a pattern set already loaded by [`Global::pattern_set`].
    pub fn extractor_for(&self, set: &PatternSet) -> Result<Extractor> {
        // A pattern folder may carry its own confidence model (read with the set); the
        // extractor scores with it. Its error names the file, as the cue patterns' do.
        Extractor::new(set).map_err(|e| match e {
            ExtractorError::Confidence(e) => e.into(),
            ExtractorError::Cues(e) => {
                anyhow::anyhow!(e).context("cannot compile the cue patterns")
            }
        })
    }

    pub fn open_store(&self) -> Result<Store> {
        Store::open(&self.store)
            .with_context(|| format!("cannot open the store {}", self.store.display()))
    }

    /// Alias pairs in force: the `--aliases` file, else the one the store was scanned with, then
    /// the pattern folder's own.
    pub fn alias_pairs(&self, set: &PatternSet) -> Result<Vec<(String, String)>> {
        let mut pairs = Vec::new();
        let stored = self.store.join("aliases.tsv");
        if let Some(f) = &self.aliases {
            pairs = pat::load_aliases(f)
                .with_context(|| format!("cannot load aliases {}", f.display()))?;
        } else if stored.exists() {
            pairs = pat::load_aliases(&stored)
                .with_context(|| format!("cannot load aliases {}", stored.display()))?;
        }
        pairs.extend(set.aliases.iter().cloned());
        Ok(pairs)
    }

    /// The store with what a query resolves names with: the normaliser, and the aliases in
    /// force. Queries need only the normaliser: compiling the cues would cost more than the
    /// query.
    pub fn query_parts(&self) -> Result<(Store, Normalizer, Aliases)> {
        let store = self.open_store()?;
        let set = self.pattern_set()?;
        let normalizer = Normalizer::new(&set.lexicon);
        let mut aliases = Aliases::new(&normalizer, &self.alias_pairs(&set)?);
        if let Some(r) = self.roll_up {
            let level = match r {
                RollUpArg::Abbreviations => Level::Abbreviation,
                RollUpArg::Heads => Level::Head,
            };
            let vocabulary = store
                .vocabulary()
                .context("cannot read the store's vocabulary (abbreviations and heads)")?;
            let abbreviations = vocabulary.abbreviations(|k| aliases.resolve(k).to_string());
            aliases = roll_up(
                &aliases,
                level,
                &vocabulary.heads(),
                &abbreviations,
                &normalizer,
            );
        }
        Ok((store, normalizer, aliases))
    }

    /// Open the store and build its graph.
    pub fn graph(&self, filter: &Filter) -> Result<Loaded> {
        let (store, normalizer, aliases) = self.query_parts()?;
        query::load(store, normalizer, aliases, filter, false)
            .context("cannot read the store's claims")
    }

    /// Open the store and build its graph; with `dedupe`, near-duplicate sentences of the same
    /// claim count once, and stderr says how many rows that dropped.
    pub fn load(&self, filter: &Filter, dedupe: bool) -> Result<Loaded> {
        let (store, normalizer, aliases) = self.query_parts()?;
        let loaded = query::load(store, normalizer, aliases, filter, dedupe)
            .context("cannot read the store's claims")?;
        if dedupe && !self.quiet {
            eprintln!(
                "hearsay: --dedupe removed {} near-duplicate mentions",
                loaded.duplicates_removed
            );
        }
        Ok(loaded)
    }

    pub fn warn(&self, msg: &str) {
        if !self.quiet {
            eprintln!("hearsay: warning: {}", escape(msg));
        }
    }
}

/// True when a path is given that does not exist: a friendlier message than the walk's.
pub fn check_paths(paths: &[String]) -> Result<()> {
    for p in paths {
        if p != "-" && !Path::new(p).exists() {
            anyhow::bail!("{p}: no such file or directory");
        }
    }
    Ok(())
}

/// How input files are read (the corpus stage's options): flattened into `scan` and `extract`,
/// the commands that read files. Every value is optional so that one given after the subcommand
/// name can be told from one given before it ([`ReadArgsBefore`]); the defaults are applied in
/// [`ReadArgs::options`] and written into each help line.
#[derive(Args, Debug, Clone, Default)]
pub struct ReadArgs {
    /// Read every input as this format instead of sniffing content and extension [default: auto].
    #[arg(long, value_enum, value_name = "FORMAT")]
    pub input_format: Option<InputFormatArg>,
    /// JSON Lines: the field that holds a record's text [default: text].
    #[arg(long, value_name = "FIELD")]
    pub text_field: Option<String>,
    /// JSON Lines: the field that holds a record's id (records without it use the line number)
    /// [default: id].
    #[arg(long, value_name = "FIELD")]
    pub id_field: Option<String>,
    /// Most bytes a .gz or .zst file may expand to (suffixes K, M, G: powers of 1024)
    /// [default: 4G].
    #[arg(long, value_parser = parse_size, value_name = "SIZE")]
    pub max_decompressed: Option<u64>,
    /// Longest JSON Lines record read (longer records are skipped with a warning), and longest
    /// line of a plain text file (a longer line fails its file) [default: 64M].
    #[arg(long, value_parser = parse_size, value_name = "SIZE")]
    pub max_record: Option<u64>,
    /// PDF: keep the text after a "References" or "Bibliography" heading.
    #[arg(long)]
    pub keep_references: bool,
}

/// The ids of [`ReadArgs`]' options, hidden where [`ReadArgsBefore`] adds them.
const READ_IDS: &[&str] = &[
    "input_format",
    "text_field",
    "id_field",
    "max_decompressed",
    "max_record",
    "keep_references",
];

/// The read options given before the subcommand name (`hearsay --max-record 8M scan DIR`), as
/// earlier versions took them. Still accepted there, but hidden: on every command's help they
/// only said how files are read to commands that read none.
#[derive(Debug, Clone, Default)]
pub struct ReadArgsBefore(pub ReadArgs);

impl FromArgMatches for ReadArgsBefore {
    fn from_arg_matches(m: &ArgMatches) -> Result<Self, clap::Error> {
        ReadArgs::from_arg_matches(m).map(ReadArgsBefore)
    }
    fn update_from_arg_matches(&mut self, m: &ArgMatches) -> Result<(), clap::Error> {
        self.0.update_from_arg_matches(m)
    }
}

impl Args for ReadArgsBefore {
    fn augment_args(cmd: clap::Command) -> clap::Command {
        hide_read_args(ReadArgs::augment_args(cmd))
    }
    fn augment_args_for_update(cmd: clap::Command) -> clap::Command {
        hide_read_args(ReadArgs::augment_args_for_update(cmd))
    }
}

fn hide_read_args(cmd: clap::Command) -> clap::Command {
    cmd.mut_args(|a| {
        if READ_IDS.contains(&a.get_id().as_str()) {
            a.hide(true)
        } else {
            a
        }
    })
}

#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum InputFormatArg {
    Auto,
    Text,
    Markdown,
    Html,
    Pdf,
    Jsonl,
}

impl ReadArgs {
    /// The options in force: a value given after the subcommand name, else one given before it
    /// (`before`), else the default.
    pub fn options(&self, before: &ReadArgsBefore) -> hearsay::corpus::ReadOptions {
        use hearsay::corpus::InputFormat as F;
        let b = &before.0;
        let max_record = self.max_record.or(b.max_record).unwrap_or(64 << 20);
        hearsay::corpus::ReadOptions {
            format: match self
                .input_format
                .or(b.input_format)
                .unwrap_or(InputFormatArg::Auto)
            {
                InputFormatArg::Auto => F::Auto,
                InputFormatArg::Text => F::Text,
                InputFormatArg::Markdown => F::Markdown,
                InputFormatArg::Html => F::Html,
                InputFormatArg::Pdf => F::Pdf,
                InputFormatArg::Jsonl => F::Jsonl,
            },
            text_field: (self.text_field.as_ref().or(b.text_field.as_ref()))
                .map_or_else(|| "text".to_string(), String::clone),
            id_field: (self.id_field.as_ref().or(b.id_field.as_ref()))
                .map_or_else(|| "id".to_string(), String::clone),
            max_decompressed: self
                .max_decompressed
                .or(b.max_decompressed)
                .unwrap_or(4 << 30),
            max_record: usize::try_from(max_record).unwrap_or(usize::MAX),
            cut_references: !(self.keep_references || b.keep_references),
        }
    }
}

/// A byte count with an optional K, M or G suffix (powers of 1024).
fn parse_size(s: &str) -> Result<u64, String> {
    let t = s.trim();
    let (num, mult) = match t.char_indices().last() {
        Some((i, 'k' | 'K')) => (&t[..i], 1u64 << 10),
        Some((i, 'm' | 'M')) => (&t[..i], 1 << 20),
        Some((i, 'g' | 'G')) => (&t[..i], 1 << 30),
        _ => (t, 1),
    };
    num.trim()
        .parse::<u64>()
        .ok()
        .and_then(|n| n.checked_mul(mult))
        .ok_or_else(|| format!("not a size: {s:?} (use e.g. 4096, 64K, 500M, 4G)"))
}
