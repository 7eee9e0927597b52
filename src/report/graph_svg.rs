//! The claim-graph picture as inline SVG, its legend, and the evidence panels that clicking an
//! edge opens.
//!
//! Each sign has its own colour *and* its own line style, and the hedged-heavy and disputed marks
//! are letters in badges, so nothing is told by colour alone. Every edge is a focusable group
//! with a text label and a `<title>` (the hover text); the panels are plain HTML that the inlined
//! script shows and hides.

use super::data::{PictureEdge, PictureNode, Report};
use super::evidence::evidence_list;
use crate::graph::Sign;
use maud::{html, Markup};

const W: f64 = 960.0;
const H: f64 = 640.0;
const MARGIN: f64 = 90.0;
const ARROW: f64 = 9.0;

/// Colour, dash pattern and CSS class of a sign.
pub fn style(s: Sign) -> (&'static str, &'static str, &'static str) {
    match s {
        Sign::Increase => ("#0b5cad", "none", "increase"),
        Sign::Decrease => ("#b03a00", "11 5", "decrease"),
        Sign::Mixed => ("#7a2e8e", "11 4 2 4", "mixed"),
        Sign::Unsigned => ("#555555", "2 5", "unsigned"),
        Sign::NoEffect => ("#6b5a00", "16 4 2 4 2 4", "noeffect"),
    }
}

const SIGNS: [Sign; 5] = [
    Sign::Increase,
    Sign::Decrease,
    Sign::Mixed,
    Sign::Unsigned,
    Sign::NoEffect,
];

fn radius(n: &PictureNode, max: usize) -> f64 {
    6.0 + 14.0 * (n.mentions as f64 / max.max(1) as f64).sqrt()
}

fn place(n: &PictureNode) -> (f64, f64) {
    (
        MARGIN + n.at.x * (W - 2.0 * MARGIN),
        40.0 + n.at.y * (H - 80.0),
    )
}

fn unit(dx: f64, dy: f64) -> (f64, f64) {
    let d = (dx * dx + dy * dy).sqrt().max(1e-9);
    (dx / d, dy / d)
}

/// The SVG path of an edge (bowed when its reverse is drawn too) and its midpoint.
fn geometry(s: (f64, f64), rs: f64, t: (f64, f64), rt: f64, bow: bool) -> (String, (f64, f64)) {
    let (ux, uy) = unit(t.0 - s.0, t.1 - s.1);
    let c = if bow {
        let len = ((t.0 - s.0).powi(2) + (t.1 - s.1).powi(2)).sqrt();
        let off = (len * 0.18).clamp(14.0, 40.0);
        ((s.0 + t.0) / 2.0 - uy * off, (s.1 + t.1) / 2.0 + ux * off)
    } else {
        ((s.0 + t.0) / 2.0, (s.1 + t.1) / 2.0)
    };
    let (sx, sy) = unit(c.0 - s.0, c.1 - s.1);
    let (tx, ty) = unit(c.0 - t.0, c.1 - t.1);
    let p0 = (s.0 + sx * rs, s.1 + sy * rs);
    let p2 = (t.0 + tx * (rt + 1.0), t.1 + ty * (rt + 1.0));
    let mid = (
        0.25 * p0.0 + 0.5 * c.0 + 0.25 * p2.0,
        0.25 * p0.1 + 0.5 * c.1 + 0.25 * p2.1,
    );
    (
        format!(
            "M{:.1},{:.1} Q{:.1},{:.1} {:.1},{:.1}",
            p0.0, p0.1, c.0, c.1, p2.0, p2.1
        ),
        mid,
    )
}

/// A one-line description of an edge, for its label and hover text.
pub fn describe(r: &Report, e: &PictureEdge) -> String {
    let mut marks = Vec::new();
    if e.hedged_heavy {
        marks.push("mostly hedged");
    }
    if e.disputed {
        marks.push("disputed");
    }
    let marks = if marks.is_empty() {
        String::new()
    } else {
        format!(", {}", marks.join(", "))
    };
    format!(
        "{} → {}: {} claims in {} documents, support {}, sign {}{}",
        r.nodes[e.source].label,
        r.nodes[e.target].label,
        e.claims,
        e.documents,
        e.support,
        e.sign.as_str(),
        marks
    )
}

fn short(label: &str) -> String {
    if label.chars().count() > 28 {
        label.chars().take(27).chain(std::iter::once('…')).collect()
    } else {
        label.to_string()
    }
}

/// The picture.
pub fn picture(r: &Report) -> Markup {
    let max_m = r.nodes.iter().map(|n| n.mentions).max().unwrap_or(1);
    let max_s = r.edges.iter().map(|e| e.support).max().unwrap_or(1).max(1);
    let desc = format!(
        "Directed graph of the {} most weighted causal relations between {} variables. \
         The table of top relations below gives the same information as text.",
        r.edges.len(),
        r.nodes.len()
    );
    html! {
        svg #claim-graph viewBox=(format!("0 0 {W} {H}")) width="100%" role="group"
            aria-labelledby="claim-graph-title claim-graph-desc" {
            title #claim-graph-title { "The claim graph" }
            desc #claim-graph-desc { (desc) }
            defs {
                @for s in SIGNS {
                    @let (colour, _, class) = style(s);
                    marker id=(format!("arrow-{class}")) viewBox="0 0 10 10" refX="10" refY="5"
                        markerUnits="userSpaceOnUse" markerWidth=(ARROW) markerHeight=(ARROW)
                        orient="auto-start-reverse" {
                        path d="M0,0 L10,5 L0,10 z" fill=(colour) {}
                    }
                }
            }
            g.edges {
                @for (i, e) in r.edges.iter().enumerate() {
                    @let (colour, dash, class) = style(e.sign);
                    @let (s, t) = (&r.nodes[e.source], &r.nodes[e.target]);
                    @let (d, mid) = geometry(place(s), radius(s, max_m), place(t), radius(t, max_m) + ARROW * 0.2, e.reciprocal);
                    @let width = 1.5 + 6.5 * (e.support as f64 / max_s as f64).sqrt();
                    @let text = describe(r, e);
                    g.edge #(format!("edge-{i}")) data-edge=(i) data-sign=(class) tabindex="0"
                        role="button" aria-label=(format!("{text}. Press Enter for evidence.")) {
                        title { (text) }
                        path.hit d=(d) {}
                        path.line d=(d) stroke=(colour) stroke-width=(format!("{width:.1}"))
                            stroke-dasharray=(dash) marker-end=(format!("url(#arrow-{class})")) {}
                        @if e.hedged_heavy {
                            g.badge transform=(format!("translate({:.1},{:.1})", mid.0 - 8.0, mid.1)) {
                                circle r="7" {}
                                text y="4" { "?" }
                            }
                        }
                        @if e.disputed {
                            g.badge.disputed transform=(format!("translate({:.1},{:.1})", mid.0 + 8.0, mid.1)) {
                                rect x="-7" y="-7" width="14" height="14" {}
                                text y="4" { "!" }
                            }
                        }
                    }
                }
            }
            g.nodes {
                @for n in &r.nodes {
                    @let (x, y) = place(n);
                    @let rad = radius(n, max_m);
                    @let right = x > W - 2.5 * MARGIN;
                    g.node data-key=(n.key) {
                        title { (format!("{}: {} mentions in {} documents", n.label, n.mentions, n.documents)) }
                        circle cx=(format!("{x:.1}")) cy=(format!("{y:.1}")) r=(format!("{rad:.1}")) {}
                        text x=(format!("{:.1}", if right { x - rad - 4.0 } else { x + rad + 4.0 }))
                            y=(format!("{:.1}", y + 4.0)) text-anchor=(if right { "end" } else { "start" }) {
                            (short(&n.label))
                        }
                    }
                }
            }
        }
    }
}

/// The legend: one sample line per sign, the two badges, and what width and size mean.
pub fn legend() -> Markup {
    html! {
        ul.legend aria-label="Legend of the claim graph" {
            @for s in SIGNS {
                @let (colour, dash, _) = style(s);
                li {
                    svg width="48" height="12" aria-hidden="true" {
                        line x1="2" y1="6" x2="46" y2="6" stroke=(colour) stroke-width="3"
                            stroke-dasharray=(dash) {}
                    }
                    " " (s.as_str())
                    @match s {
                        Sign::Increase => " (solid line)",
                        Sign::Decrease => " (dashed)",
                        Sign::Mixed => " (dash-dot: as many increasing as decreasing claims)",
                        Sign::Unsigned => " (dotted: a cause with no sign)",
                        Sign::NoEffect => " (dash-dot-dot: mostly \"no effect\" claims)",
                    }
                }
            }
            li { span.badge-key { "?" } " at least half the claims hedged, conditional or asked" }
            li { span.badge-key.disputed { "!" } " disputed: stated both ways, with opposite signs, or stated and denied (see Conflicts)" }
            li { "Line width: support (claims not negated). Circle size: mentions of the variable." }
        }
    }
}

/// One hidden panel per edge with its counts and evidence sentences.
pub fn edge_details(r: &Report) -> Markup {
    html! {
        div #edge-details aria-live="polite" {
            p #edge-hint { "Hover over an edge for its counts; click it (or focus it and press Enter) for its evidence sentences." }
            @for (i, e) in r.edges.iter().enumerate() {
                section.edge-detail #(format!("edge-detail-{i}")) hidden {
                    h3 { (r.nodes[e.source].label) " → " (r.nodes[e.target].label) }
                    p {
                        (e.claims) " claims in " (e.documents) " documents; support " (e.support)
                        "; weight " (format!("{:.2}", e.weight)) "; sign " (e.sign.as_str())
                        @if e.hedged_heavy { "; mostly hedged" }
                        @if e.disputed { "; disputed" }
                    }
                    p {
                        "By modality: "
                        (e.modality.iter().map(|(m, n)| format!("{m} {n}")).collect::<Vec<_>>().join(", "))
                        ". By polarity: "
                        (e.polarity.iter().map(|(p, n)| format!("{p} {n}")).collect::<Vec<_>>().join(", "))
                        "."
                    }
                    (evidence_list(&e.evidence))
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edge_ends_at_the_target_circle_and_bows_when_reciprocal() {
        let (d, mid) = geometry((0.0, 0.0), 5.0, (100.0, 0.0), 10.0, false);
        assert_eq!(d, "M5.0,0.0 Q50.0,0.0 89.0,0.0");
        assert!((mid.1).abs() < 1e-9);
        let (_, bowed) = geometry((0.0, 0.0), 5.0, (100.0, 0.0), 10.0, true);
        let (_, back) = geometry((100.0, 0.0), 10.0, (0.0, 0.0), 5.0, true);
        assert!(bowed.1 > 1.0 && back.1 < -1.0, "{bowed:?} {back:?}");
    }

    #[test]
    fn every_sign_has_its_own_line_style() {
        let dashes: std::collections::BTreeSet<&str> = SIGNS.iter().map(|&s| style(s).1).collect();
        assert_eq!(dashes.len(), SIGNS.len());
    }
}
