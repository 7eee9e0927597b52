//! `hearsay variables`: the store's variables with their surface forms, heads, qualifiers and
//! abbreviations; merge suggestions; an alias file to edit and pass back with `--aliases`.

use super::{write_rows, ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::query::{self, SortBy, VariableRow};
use hearsay::variables::abbrev::AbbreviationUse;
use hearsay::variables::merge::MergeSuggestion;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "A variable is every claim span with the same key (lower-cased content words, \
stemmed, through the aliases in force); its label is its most frequent surface form and its id, \
the one graph exports use, a slug of the label. Each row shows the surface forms with their claim \
counts, the label's head and qualifiers (\"groundwater recharge\" + \"in the northern basin\"), and \
the abbreviations the corpus defines for it (found in the sentences of the stored claims with the \
Schwartz & Hearst algorithm; \"?\" marks a short form defined two ways, which is never merged).\n\n\
--merges lists merge suggestions instead: abbreviation (evidence: defining documents), spelling \
(British/American), hyphen, plural, same head and near duplicate (evidence: claims that would \
move). --write-aliases FILE writes them as an alias file: the first four kinds as lines in force, \
the last two commented out; edit it and pass it back with --aliases FILE.\n\n\
Exit status: 0 (also when no variable matches), 2 on an error.\n\nThese are names found in text; \
a suggested merge is a guess about wording, not a finding."
)]
pub struct VariablesArgs {
    /// Only variables whose label, key or a surface form contains this text (any case).
    pub filter: Option<String>,
    /// Order by claims (mentions), distinct documents or causal degree; most first.
    #[arg(long, value_enum, default_value_t = SortArg::Mentions)]
    pub sort: SortArg,
    /// How many rows to show (0 for all).
    #[arg(long, short = 'n', default_value_t = 30)]
    pub limit: usize,
    /// List merge suggestions instead of variables.
    #[arg(long, conflicts_with = "abbreviations")]
    pub merges: bool,
    /// List the abbreviations the corpus defines instead of variables (ambiguous ones too).
    #[arg(long)]
    pub abbreviations: bool,
    /// Write every merge suggestion as an alias file (surface form<TAB>variable name) to FILE.
    #[arg(long, value_name = "FILE")]
    pub write_aliases: Option<PathBuf>,
    #[command(flatten)]
    pub filter_claims: ClaimFilter,
}

#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum SortArg {
    Mentions,
    Documents,
    Degree,
}

const HEADERS: &[&str] = &[
    "id",
    "label",
    "mentions",
    "documents",
    "degree",
    "head",
    "qualifiers",
    "forms",
    "abbreviations",
];

const MERGE_HEADERS: &[&str] = &["from", "into", "reason", "evidence", "from_key", "into_key"];

const ABBREVIATION_HEADERS: &[&str] = &["short", "long", "documents", "ambiguous"];

pub fn run(g: &Global, a: &VariablesArgs) -> Result<ExitCode> {
    let loaded = g.graph(&a.filter_claims.to_filter())?;
    let abbreviations = loaded
        .abbreviations()
        .context("cannot read the abbreviations the scan stored")?;
    let mut out = std::io::stdout().lock();
    let needs_merges = a.merges || a.write_aliases.is_some();
    let merges = if needs_merges {
        loaded.merge_suggestions(&abbreviations)
    } else {
        Vec::new()
    };
    if let Some(path) = &a.write_aliases {
        std::fs::write(path, query::alias_file(&merges))
            .with_context(|| format!("cannot write {}", path.display()))?;
        if !g.quiet {
            eprintln!(
                "hearsay: wrote {} merge suggestions to {}",
                merges.len(),
                path.display()
            );
        }
    }
    let limit = |n: usize| if a.limit == 0 { n } else { a.limit.min(n) };
    if a.merges {
        let picked: Vec<&MergeSuggestion> = merges
            .iter()
            .filter(|m| a.filter.as_deref().is_none_or(|f| mentions(m, f)))
            .collect();
        let picked = &picked[..limit(picked.len())];
        write_rows(&mut out, g.format(), picked, merge_cells, MERGE_HEADERS)?;
    } else if a.abbreviations {
        let uses: Vec<AbbreviationUse> = query::abbreviation_list(&abbreviations)
            .into_iter()
            .filter(|u| {
                a.filter.as_deref().is_none_or(|f| {
                    let f = f.to_lowercase();
                    u.short.to_lowercase().contains(&f)
                        || u.longs.iter().any(|(l, _)| l.to_lowercase().contains(&f))
                })
            })
            .collect();
        let uses = &uses[..limit(uses.len())];
        write_rows(
            &mut out,
            g.format(),
            uses,
            abbreviation_cells,
            ABBREVIATION_HEADERS,
        )?;
    } else if a.write_aliases.is_none() || a.filter.is_some() {
        let sort = match a.sort {
            SortArg::Mentions => SortBy::Mentions,
            SortArg::Documents => SortBy::Documents,
            SortArg::Degree => SortBy::Degree,
        };
        let mut rows = loaded.variable_rows(&abbreviations, a.filter.as_deref(), sort);
        rows.truncate(limit(rows.len()));
        write_rows(&mut out, g.format(), &rows, cells, HEADERS)?;
    }
    Ok(ExitCode::SUCCESS)
}

fn mentions(m: &MergeSuggestion, f: &str) -> bool {
    let f = f.to_lowercase();
    m.from_label.to_lowercase().contains(&f) || m.into_label.to_lowercase().contains(&f)
}

fn forms(r: &VariableRow) -> String {
    r.forms
        .iter()
        .take(5)
        .map(|(s, n)| format!("{s} ({n})"))
        .collect::<Vec<_>>()
        .join("; ")
}

fn cells(r: &VariableRow) -> Vec<String> {
    vec![
        r.id.clone(),
        r.label.clone(),
        r.mentions.to_string(),
        r.documents.to_string(),
        r.degree.to_string(),
        r.head.clone(),
        r.qualifiers.join("; "),
        forms(r),
        r.abbreviations.join("; "),
    ]
}

fn merge_cells(m: &&MergeSuggestion) -> Vec<String> {
    vec![
        m.from_label.clone(),
        m.into_label.clone(),
        m.reason.as_str().to_string(),
        m.evidence.to_string(),
        m.from.clone(),
        m.into.clone(),
    ]
}

fn abbreviation_cells(u: &AbbreviationUse) -> Vec<String> {
    vec![
        u.short.clone(),
        u.longs
            .iter()
            .map(|(l, _)| l.clone())
            .collect::<Vec<_>>()
            .join("; "),
        u.longs
            .iter()
            .map(|(_, d)| d.to_string())
            .collect::<Vec<_>>()
            .join("; "),
        (!u.is_unambiguous()).to_string(),
    ]
}

/// The exit status of `pair` and `claims` when a name they are given is no variable: distinct
/// from 0 (an answer, maybe empty) and 2 (an error), so scripts can tell a typo from "no claim".
pub const EXIT_NO_VARIABLE: u8 = 3;

/// The note for a name that is no variable: its key, and the nearest variables with their
/// counts ("did you mean: fish stocks (9 claims, 5 documents)").
pub fn no_variable_note(loaded: &hearsay::query::Loaded, name: &str) -> String {
    let (m, _) = loaded.lookup(name);
    let near = loaded.nearest_variables(name, 5);
    let list: Vec<String> = near
        .iter()
        .map(|v| {
            format!(
                "{} ({}, {})",
                v.label,
                super::output::count(v.mentions, "claim"),
                super::output::count(v.documents, "document")
            )
        })
        .collect();
    super::escape(&format!(
        "no variable \"{name}\" in the claims (key \"{}\"){}{}",
        m.key,
        if list.is_empty() {
            String::new()
        } else {
            format!("; did you mean: {}", list.join(", "))
        },
        head_level_hint(loaded, name)
    ))
}

/// At the variable level, a qualified name whose head is a variable ("nitrogen runoff from
/// fields" when only "nitrogen runoff" is stated) is answered by `--roll-up heads`: say so, with
/// the head's counts, rather than leave the user to guess the option.
fn head_level_hint(loaded: &hearsay::query::Loaded, name: &str) -> String {
    if loaded.aliases.level() != hearsay::variables::rollup::Level::Variable {
        return String::new();
    }
    let split = hearsay::variables::heads::split(name);
    if split.is_bare() {
        return String::new();
    }
    match loaded.lookup(&split.head) {
        (_, Some(n)) => {
            let v = &loaded.graph.graph[n];
            format!(
                "; its head \"{}\" is a variable ({}, {}): --roll-up heads counts at that level",
                v.label,
                super::output::count(v.mentions, "claim"),
                super::output::count(v.docs, "document")
            )
        }
        _ => String::new(),
    }
}
