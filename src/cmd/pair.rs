//! `hearsay pair X Y`: what the corpus says about two variables, in each direction.

use super::output::count;
use super::variables::{no_variable_note, EXIT_NO_VARIABLE};
use super::{escape, ClaimFilter, Format, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::query::{DirectionSummary, PairQuery, PairReport, VarMatch};
use hearsay::variables::rollup::Level;
use hearsay::Modality;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "X and Y go through the same normalisation (and aliases) as the variables \
in the store, so \"the algae bloom\" finds \"algae blooms\". Counts: causal claims X → Y \
and Y → X by modality and polarity, distinct documents, association claims (either order), and \
co-mentions: sentences naming both with no claim between them. With --roll-up the \
counts are at that level (the first line and the JSON field \"level\" say which): with \
--roll-up heads, X may be a head (\"nitrogen runoff\" counts \"increased nitrogen runoff from \
fields\"), an abbreviation or its long form. The direction ratio is the share \
of non-negated causal claims that go X → Y. When a relation has more claims than --evidence \
shows, a line under the evidence says how many are left out (the table only; JSON has the \
counts and the evidence list).\n\nExit status: 0 on an answer (also when no claim links the \
two), 3 when a name is no variable (the table notes it, and stderr lists the nearest variables \
with their claim counts), 2 on an error.\n\nThese are counts of statements in text, not \
evidence that either causation is real."
)]
pub struct PairArgs {
    /// The first variable.
    pub x: String,
    /// The second variable.
    pub y: String,
    /// Evidence sentences to show per relation.
    #[arg(long, default_value_t = 3, value_name = "N")]
    pub evidence: usize,
    /// Benchmark: answer the query N times in this process (the store is opened once, each
    /// query selects its rows and builds its graph anew) and print the median and fastest wall
    /// time on stderr; the report is printed once.
    #[arg(long, default_value_t = 1, value_name = "N", hide_short_help = true)]
    pub repeat: usize,
    /// Check: build the graph from every row, as other queries do, instead of from the rows that
    /// name X or Y. The report is the same; this is slower.
    #[arg(long, hide = true)]
    pub whole_graph: bool,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

pub fn run(g: &Global, a: &PairArgs) -> Result<ExitCode> {
    let (store, normalizer, aliases) = g.query_parts()?;
    let mut q =
        PairQuery::open(store, normalizer, aliases).context("cannot read the store's claims")?;
    if a.repeat <= 1 {
        return answer(g, a, &mut q, true);
    }
    let mut times = Vec::with_capacity(a.repeat);
    for i in 0..a.repeat {
        let t = std::time::Instant::now();
        answer(g, a, &mut q, i == 0)?;
        times.push(t.elapsed().as_secs_f64() * 1000.0);
    }
    times.sort_by(f64::total_cmp);
    eprintln!(
        "hearsay: pair x{}: median {:.3} ms, fastest {:.3} ms",
        a.repeat,
        times[times.len() / 2],
        times[0]
    );
    Ok(ExitCode::SUCCESS)
}

/// One query (the plan is [`PairQuery`]'s), printed only when `print`.
fn answer(g: &Global, a: &PairArgs, q: &mut PairQuery, print: bool) -> Result<ExitCode> {
    let graph = q
        .graph(&a.x, &a.y, &a.filter.to_filter(), a.whole_graph)
        .context("cannot read the store's claims")?;
    let rep = q
        .report(graph, a.evidence)
        .context("cannot search the sentence index")?;
    if !print {
        return Ok(ExitCode::SUCCESS);
    }
    let mut out = std::io::stdout().lock();
    match g.format() {
        Format::Json => {
            serde_json::to_writer(&mut out, &rep)?;
            out.write_all(b"\n")?;
        }
        Format::Csv => print_csv(&mut out, &rep)?,
        Format::Table => print_table(&mut out, &rep)?,
    }
    // A name that is no variable: the nearest ones, from the whole graph, on stderr (where the
    // data is not), and the exit status that says so.
    let unknown: Vec<&VarMatch> = [&rep.x, &rep.y].into_iter().filter(|v| !v.known).collect();
    if !unknown.is_empty() {
        if !g.quiet {
            let loaded = g.graph(&a.filter.to_filter())?;
            for v in unknown {
                eprintln!("hearsay: note: {}", no_variable_note(&loaded, &v.query));
            }
        }
        return Ok(ExitCode::from(EXIT_NO_VARIABLE));
    }
    Ok(ExitCode::SUCCESS)
}

fn name(v: &VarMatch) -> String {
    v.label.clone().unwrap_or_else(|| v.query.clone())
}

fn line(d: &DirectionSummary) -> String {
    let mut pol = Vec::new();
    for (p, m) in &d.by_polarity {
        let n: usize = m.values().sum();
        pol.push(format!("{p} {n}"));
    }
    format!(
        "{} in {}: {} asserted, {} hedged, {} negated, {} conditional, {}{}",
        count(d.claims, "claim"),
        count(d.documents, "document"),
        d.asserted,
        d.hedged,
        d.negated,
        d.conditional,
        count(d.question, "question"),
        if pol.is_empty() {
            String::new()
        } else {
            format!("  [{}]", pol.join(", "))
        }
    )
}

pub(super) fn print_table(out: &mut impl Write, r: &PairReport) -> Result<()> {
    let (x, y) = (escape(&name(&r.x)), escape(&name(&r.y)));
    match r.level {
        Level::Variable => {}
        Level::Abbreviation => writeln!(
            out,
            "level: abbreviation (--roll-up abbreviations: a short form and its long form count as one variable)"
        )?,
        Level::Head => writeln!(
            out,
            "level: head (--roll-up heads: qualified variables count as their head; short and long forms as one)"
        )?,
    }
    for v in [&r.x, &r.y] {
        if !v.known {
            writeln!(
                out,
                "note: no variable \"{}\" in the claims (key \"{}\")",
                escape(&v.query),
                v.key
            )?;
            if !v.suggestions.is_empty() {
                writeln!(
                    out,
                    "      variables containing it: {}",
                    escape(&v.suggestions.join("; "))
                )?;
            }
        }
    }
    writeln!(out, "{x} → {y}: {}", line(&r.forward))?;
    writeln!(out, "{y} → {x}: {}", line(&r.backward))?;
    writeln!(
        out,
        "associated: {} in {}",
        count(r.association.claims, "claim"),
        count(r.association.documents, "document")
    )?;
    writeln!(
        out,
        "co-mentioned without a claim: {}",
        count(r.co_mentions, "sentence")
    )?;
    match r.direction_ratio {
        Some(d) => writeln!(out, "direction ratio ({x} → {y}): {d:.2}")?,
        None => writeln!(out, "direction ratio: – (no causal claim either way)")?,
    }
    if !r.evidence.is_empty() {
        writeln!(out, "\nevidence:")?;
        for e in &r.evidence {
            let arrow = match e.relation {
                "forward" => format!("{x} → {y}"),
                "backward" => format!("{y} → {x}"),
                _ => format!("{x} ~ {y}"),
            };
            let tag = if e.modality == Modality::Asserted {
                e.polarity.to_string()
            } else {
                format!("{}, {}", e.polarity, e.modality)
            };
            writeln!(
                out,
                "  [{arrow}; {tag}] {}\n      {}",
                escape(&e.location),
                escape(&e.sentence)
            )?;
        }
    }
    for note in unshown(r, &x, &y) {
        writeln!(out, "{note}")?;
    }
    writeln!(
        out,
        "\n(statements found in text, not evidence that the causation is real)"
    )?;
    Ok(())
}

/// One line for each relation with more claims than evidence lines shown, so that "4 claims"
/// above three sentences is not read as the whole evidence.
fn unshown(r: &PairReport, x: &str, y: &str) -> Vec<String> {
    let mut notes = Vec::new();
    for (name, d, arrow) in [
        ("forward", &r.forward, format!("{x} → {y}")),
        ("backward", &r.backward, format!("{y} → {x}")),
        ("association", &r.association, format!("{x} ~ {y}")),
    ] {
        let shown = r.evidence.iter().filter(|e| e.relation == name).count();
        if d.claims > shown {
            let more = d.claims - shown;
            notes.push(format!(
                "  + {more} more {arrow} {} not shown ({} in all; --evidence N shows up to N a relation)",
                if more == 1 { "claim" } else { "claims" },
                d.claims,
            ));
        }
    }
    notes
}

fn print_csv(out: &mut impl Write, r: &PairReport) -> Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record([
        "relation",
        "claims",
        "documents",
        "asserted",
        "hedged",
        "negated",
        "conditional",
        "question",
    ])?;
    for (n, d) in [
        ("forward", &r.forward),
        ("backward", &r.backward),
        ("association", &r.association),
    ] {
        w.write_record([
            n.to_string(),
            d.claims.to_string(),
            d.documents.to_string(),
            d.asserted.to_string(),
            d.hedged.to_string(),
            d.negated.to_string(),
            d.conditional.to_string(),
            d.question.to_string(),
        ])?;
    }
    w.write_record([
        "co_mention".to_string(),
        r.co_mentions.to_string(),
        String::new(),
        String::new(),
        String::new(),
        String::new(),
        String::new(),
        String::new(),
    ])?;
    w.flush()?;
    Ok(())
}
