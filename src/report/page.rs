//! The page itself: sections, tables and the inlined style sheet and script.
//!
//! maud escapes every string spliced into the markup, so corpus text (labels, sentences, file
//! names, skip reasons) can only ever become text; `evidence::shown` also replaces the control
//! characters in it. The style sheet and script are constants of
//! this crate; the script sorts tables and opens evidence panels, and needs no data of its own.

use super::data::Report;
use super::evidence::shown;
use super::{graph_svg, plots};
use crate::query::{DirectionSummary, PairReport};
use maud::{html, Markup, PreEscaped, DOCTYPE};

const STYLE: &str = include_str!("report.css");
const SCRIPT: &str = include_str!("report.js");

const CAVEAT: &str = "A claim is a statement found in text, not evidence that the causation is \
real, and nothing in this report is advice. Counts say how often something is stated, not \
whether it is true.";

/// The whole page as one HTML string.
pub fn render(r: &Report) -> String {
    html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                title { (shown(&r.title)) }
                style { (PreEscaped(STYLE)) }
            }
            body {
                header {
                    h1 { (shown(&r.title)) }
                    p.caveat role="note" { (CAVEAT) }
                    nav aria-label="Sections" {
                        a href="#summary" { "Summary" } " · "
                        a href="#graph" { "Claim graph" } " · "
                        a href="#plots" { "Plots" } " · "
                        a href="#top" { "Top relations" } " · "
                        a href="#conflicts" { "Conflicts" } " · "
                        a href="#co-mentions" { "Co-mentioned, never stated" }
                        @if r.pair.is_some() { " · " a href="#pair" { "Pair" } }
                        @if r.comparison.is_some() { " · " a href="#compare" { "Model answers" } }
                    }
                }
                main {
                    (summary(r))
                    section #graph {
                        h2 { "The claim graph" }
                        p { "The " (r.edges.len()) " causal relations with the highest weight (distinct documents, each counted with the mean value of its claims: asserted 1, hedged or conditional 0.5, question 0, denied −1) and the variables they join. Arrows point from the stated cause to the stated effect." }
                        (graph_svg::legend())
                        div.graph-wrap { (graph_svg::picture(r)) }
                        (graph_svg::edge_details(r))
                    }
                    section #plots {
                        h2 { "Plots" }
                        (plots::plots(r))
                    }
                    (top_table(r))
                    (conflicts_table(r))
                    (co_mention_table(r))
                    @if let Some(p) = &r.pair { (pair_section(p)) }
                    @if let Some(c) = &r.comparison { (compare_section(c)) }
                }
                footer { p { "Written by hearsay " (r.summary.hearsay_version) ". " (CAVEAT) } }
                script { (PreEscaped(SCRIPT)) }
            }
        }
    }
    .into_string()
}

fn count_list(title: &str, items: Vec<(String, usize)>) -> Markup {
    html! {
        div.counts {
            h3 { (title) }
            table {
                tbody {
                    @for (k, n) in items { tr { th scope="row" { (k) } td.num { (n) } } }
                }
            }
        }
    }
}

fn summary(r: &Report) -> Markup {
    let s = &r.summary;
    html! {
        section #summary {
            h2 { "Corpus summary" }
            p {
                (s.files) " files read into " (s.documents) " documents and " (s.sentences)
                " sentences; " (s.claims_stored) " claims stored, " (s.claims)
                " in the graph between " (s.variables) " variables, with "
                (s.causal_edges) " causal edges."
            }
            div.count-grid {
                (count_list("By kind", s.by_kind.iter().map(|(k, n)| (k.to_string(), *n)).collect()))
                (count_list("By polarity", s.by_polarity.iter().map(|(k, n)| (k.to_string(), *n)).collect()))
                (count_list("By modality", s.by_modality.iter().map(|(k, n)| (k.to_string(), *n)).collect()))
            }
            h3 { "Files not read" }
            @if s.skipped.is_empty() && s.failed.is_empty() {
                p { "None: every file found was read." }
            } @else {
                table.sortable {
                    caption { (s.skipped.len()) " skipped, " (s.failed.len()) " failed" }
                    thead { tr { (th("file", false)) (th("outcome", false)) (th("reason", false)) } }
                    tbody {
                        @for (what, list) in [("skipped", &s.skipped), ("failed", &s.failed)] {
                            @for f in list { tr { td { (shown(&f.path)) } td { (what) } td { (shown(&f.reason)) } } }
                        }
                    }
                }
            }
        }
    }
}

/// A sortable column head; `numeric` columns sort by number.
fn th(label: &str, numeric: bool) -> Markup {
    html! {
        th scope="col" data-type=(if numeric { "num" } else { "text" }) aria-sort="none" {
            button type="button" { (label) }
        }
    }
}

fn top_table(r: &Report) -> Markup {
    html! {
        section #top {
            h2 { "Top relations" }
            p { "Ranked by distinct documents, then claims. Causal relations are directed; association relations are listed once per pair. Click a column head to sort." }
            table.sortable {
                thead { tr {
                    (th("kind", false)) (th("cause", false)) (th("effect", false))
                    (th("documents", true)) (th("claims", true)) (th("asserted", true))
                    (th("hedged", true)) (th("negated", true)) (th("sign", false)) (th("first stated", false))
                } }
                tbody {
                    @for t in &r.top {
                        tr {
                            td { (t.kind) } td { (shown(&t.cause)) } td { (shown(&t.effect)) }
                            td.num { (t.documents) } td.num { (t.claims) } td.num { (t.asserted) }
                            td.num { (t.hedged) } td.num { (t.negated) } td { (t.sign) } td.loc { (shown(&t.first)) }
                        }
                    }
                }
            }
        }
    }
}

fn conflicts_table(r: &Report) -> Markup {
    html! {
        section #conflicts {
            h2 { "Conflicts" }
            p { "Pairs the corpus states inconsistently (as " code { "hearsay conflicts" } " lists them): both directions stated, an increase and a decrease (or prevention) stated, or an effect both stated and denied. Ranked by the claims on both sides. Marked with " span.badge-key.disputed { "!" } " in the graph." }
            @if r.conflicts.is_empty() {
                p { "No conflicting relations." }
            } @else {
                table.sortable {
                    thead { tr {
                        (th("kind", false)) (th("variable", false)) (th("variable", false))
                        (th("one side", false)) (th("claims", true)) (th("documents", true))
                        (th("other side", false)) (th("claims", true)) (th("documents", true))
                        (th("claims in all", true))
                    } }
                    tbody {
                        @for c in &r.conflicts {
                            tr {
                                td { (c.kind.as_str()) } td { (shown(&c.x_label)) } td { (shown(&c.y_label)) }
                                @for s in &c.sides {
                                    @let (from, to) = if s.cause == c.x { (&c.x_label, &c.y_label) } else { (&c.y_label, &c.x_label) };
                                    td { (s.reading) " (" (shown(from)) " → " (shown(to)) ")" }
                                    td.num { (s.claims) } td.num { (s.documents) }
                                }
                                td.num { (c.support) }
                            }
                        }
                    }
                }
            }
        }
    }
}

fn compare_section(rows: &[crate::compare::Summary]) -> Markup {
    let num = |v: Option<f64>| v.map_or_else(|| "–".to_string(), |x| format!("{x:.3}"));
    html! {
        section #compare {
            h2 { "Model answers beside the corpus" }
            p { "Per model and wording family, how closely the answers follow what the corpus states (as " code { "hearsay compare" } " reports it): agreement with the corpus answer, Cohen's kappa, ROC AUC of corpus support as a predictor of a yes, Spearman correlation of support and the probability of yes, yes in both directions, and questions whose wordings got different answers. Agreement means an answer repeats the text, not that it is right." }
            table.sortable {
                thead { tr {
                    (th("model", false)) (th("family", false)) (th("questions", true))
                    (th("yes", true)) (th("corpus yes", true)) (th("agreement", true))
                    (th("kappa", true)) (th("AUC", true)) (th("Spearman", true))
                    (th("yes both ways", true)) (th("corpus states both", true))
                    (th("wordings differ", true))
                } }
                tbody {
                    @for c in rows {
                        tr {
                            td { (c.model) } td { (c.family) } td.num { (c.questions) }
                            td.num { (c.yes) } td.num { (c.corpus_yes) } td.num { (num(c.agreement)) }
                            td.num { (num(c.kappa)) } td.num { (num(c.auc)) } td.num { (num(c.spearman)) }
                            td.num { (c.model_yes_both) } td.num { (c.corpus_states_both) }
                            td.num { (c.wording_differ) }
                        }
                    }
                }
            }
        }
    }
}

fn co_mention_table(r: &Report) -> Markup {
    html! {
        section #co-mentions {
            h2 { "Co-mentioned, never stated causal" }
            p { "Pairs among the most-mentioned variables that are named in the same sentences but never joined by a causal claim in either direction. A co-mention is not a claim: it only says that the corpus talks about both together." }
            @if r.co_mentions.is_empty() {
                p { "No such pairs." }
            } @else {
                table.sortable {
                    thead { tr {
                        (th("variable", false)) (th("variable", false))
                        (th("sentences naming both", true)) (th("association claims", true))
                    } }
                    tbody {
                        @for c in &r.co_mentions {
                            tr { td { (c.a) } td { (c.b) } td.num { (c.sentences) } td.num { (c.associations) } }
                        }
                    }
                }
            }
        }
    }
}

fn direction_row(name: String, d: &DirectionSummary) -> Markup {
    html! {
        tr {
            th scope="row" { (name) }
            td.num { (d.claims) } td.num { (d.documents) } td.num { (d.asserted) }
            td.num { (d.hedged) } td.num { (d.negated) } td.num { (d.conditional) } td.num { (d.question) }
        }
    }
}

fn pair_section(p: &PairReport) -> Markup {
    let name = |v: &crate::query::VarMatch| shown(v.label.as_deref().unwrap_or(&v.query));
    let (x, y) = (name(&p.x), name(&p.y));
    html! {
        section #pair {
            h2 { "Pair: " (x) " and " (y) }
            @for v in [&p.x, &p.y] {
                @if !v.known {
                    p.note { "No variable \"" (shown(&v.query)) "\" in the claims."
                        @if !v.suggestions.is_empty() { " Variables containing it: " (shown(&v.suggestions.join("; "))) "." } }
                }
            }
            table {
                thead { tr { th scope="col" { "relation" } th scope="col" { "claims" } th scope="col" { "documents" }
                    th scope="col" { "asserted" } th scope="col" { "hedged" } th scope="col" { "negated" }
                    th scope="col" { "conditional" } th scope="col" { "questions" } } }
                tbody {
                    (direction_row(format!("{x} → {y}"), &p.forward))
                    (direction_row(format!("{y} → {x}"), &p.backward))
                    (direction_row(format!("{x} ~ {y} (association)"), &p.association))
                }
            }
            p {
                "Sentences naming both with no claim between them: " (p.co_mentions) ". "
                @match p.direction_ratio {
                    Some(d) => { "Direction ratio (" (x) " → " (y) "): " (format!("{d:.2}")) "." }
                    None => { "No causal claim either way." }
                }
            }
            @if !p.evidence.is_empty() {
                h3 { "Evidence sentences" }
                ol.evidence {
                    @for e in &p.evidence {
                        li {
                            span.loc { (shown(&e.location)) } " "
                            span.tag { "[" (e.relation) "; " (e.polarity) ", " (e.modality) "; cue " (e.cue) "]" }
                            blockquote { (shown(&e.sentence)) }
                        }
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::query::CorpusSummary as Summary;

    #[test]
    fn corpus_text_is_escaped() {
        let r = Report {
            title: "<script>alert(1)</script>".into(),
            summary: Summary {
                skipped: vec![crate::corpus::Skipped {
                    path: "a\"<b>.txt".into(),
                    reason: "<img src=x onerror=alert(1)>".into(),
                }],
                ..Summary::default()
            },
            ..Report::default()
        };
        let html = render(&r);
        assert!(!html.contains("<script>alert"));
        assert!(!html.contains("<img src=x"));
        assert!(html.contains("&lt;img src=x onerror=alert(1)&gt;"));
        assert!(html.contains("a&quot;&lt;b&gt;.txt"));
    }

    #[test]
    fn control_characters_in_corpus_text_are_replaced() {
        let r = Report {
            title: "t".into(),
            summary: Summary {
                failed: vec![crate::corpus::Skipped {
                    path: "x\u{1b}[2J.txt".into(),
                    reason: "bell\u{7} and \u{1b}]8;;http://h/\u{7}link".into(),
                }],
                ..Summary::default()
            },
            ..Report::default()
        };
        let html = render(&r);
        assert!(!html.contains(['\u{1b}', '\u{7}']));
        assert!(html.contains("x\u{FFFD}[2J.txt"));
    }
}
