//! Exports of the claim graph that network tools load: node-link JSON (the layout networkx's
//! `node_link_graph` reads), GraphML and CSV edge and node lists.
//!
//! The export is a wire type ([`Export`]) built from the internal [`ClaimGraph`], so the
//! aggregation can change without changing the files. XML is written with quick-xml, which
//! escapes every attribute value and text node.

use crate::graph::{ClaimGraph, Relation};
use crate::model::{Modality, Polarity};
use quick_xml::events::{BytesDecl, Event};
use quick_xml::Writer;
use serde::Serialize;
use std::io::Write;

/// One variable in an export.
#[derive(Debug, Clone, Serialize)]
pub struct ExportNode {
    pub id: String,
    pub label: String,
    pub mentions: usize,
    pub documents: usize,
}

/// One causal edge in an export, with its counts flattened into attributes.
#[derive(Debug, Clone, Serialize)]
pub struct ExportEdge {
    pub source: String,
    pub target: String,
    pub mentions: usize,
    pub documents: usize,
    pub sentences: usize,
    pub asserted: usize,
    pub hedged: usize,
    pub negated: usize,
    pub question: usize,
    pub conditional: usize,
    pub increase: usize,
    pub decrease: usize,
    pub unsigned: usize,
    pub prevent: usize,
    pub no_effect: usize,
    /// (increase + prevent-as-decrease difference) / signed claims, in [-1, 1]; 0 when unsigned.
    pub net_sign: f64,
    /// Distinct documents, hedged-only documents at half weight, denying documents at -1.
    pub weight: f64,
    /// support(this) / (support(this) + support(reverse)).
    pub direction_ratio: f64,
}

/// The selected part of the graph.
#[derive(Debug, Clone, Serialize)]
pub struct Export {
    pub nodes: Vec<ExportNode>,
    pub edges: Vec<ExportEdge>,
}

/// Which edges to export.
#[derive(Debug, Clone, Default)]
pub struct Selection {
    pub min_docs: usize,
    pub min_claims: usize,
    /// Keep the N heaviest edges (0: all).
    pub top: usize,
}

/// The default weight: each distinct document counts once, with the mean value of its claims
/// (asserted 1, hedged 0.5, conditional 0.5, question 0, negated or "no effect" -1).
pub fn default_weight(g: &ClaimGraph, rel: &Relation) -> f64 {
    let mut per_doc: std::collections::BTreeMap<&str, (f64, usize)> = Default::default();
    for &r in &rel.rows {
        let row = &g.rows[r];
        let v = if row.polarity == Polarity::None || row.modality == Modality::Negated {
            -1.0
        } else {
            match row.modality {
                Modality::Asserted => 1.0,
                Modality::Hedged | Modality::Conditional => 0.5,
                _ => 0.0,
            }
        };
        let e = per_doc.entry(row.doc.as_str()).or_default();
        e.0 += v;
        e.1 += 1;
    }
    per_doc.values().map(|(s, n)| s / *n as f64).sum()
}

fn edge_of(
    g: &ClaimGraph,
    a: petgraph::graph::NodeIndex,
    b: petgraph::graph::NodeIndex,
    rel: &Relation,
) -> ExportEdge {
    let c = &rel.counts;
    let inc = c.polarity(Polarity::Increase);
    let dec = c.polarity(Polarity::Decrease) + c.polarity(Polarity::Prevent);
    let fwd = rel.support();
    let back = g.edge(b, a).map(|r| r.support()).unwrap_or(0);
    ExportEdge {
        source: g.graph[a].key.clone(),
        target: g.graph[b].key.clone(),
        mentions: c.total,
        documents: rel.docs.len(),
        sentences: rel.sentences.len(),
        asserted: c.modality(Modality::Asserted),
        hedged: c.modality(Modality::Hedged),
        negated: c.modality(Modality::Negated),
        question: c.modality(Modality::Question),
        conditional: c.modality(Modality::Conditional),
        increase: inc,
        decrease: c.polarity(Polarity::Decrease),
        unsigned: c.polarity(Polarity::Unsigned),
        prevent: c.polarity(Polarity::Prevent),
        no_effect: c.polarity(Polarity::None),
        net_sign: if inc + dec > 0 {
            (inc as f64 - dec as f64) / (inc + dec) as f64
        } else {
            0.0
        },
        weight: default_weight(g, rel),
        direction_ratio: if fwd + back > 0 {
            fwd as f64 / (fwd + back) as f64
        } else {
            0.0
        },
    }
}

/// Select edges and the nodes they touch.
pub fn select(g: &ClaimGraph, s: &Selection) -> Export {
    let mut edges: Vec<ExportEdge> = g
        .edges()
        .filter(|(_, _, r)| r.docs.len() >= s.min_docs && r.counts.total >= s.min_claims)
        .map(|(a, b, r)| edge_of(g, a, b, r))
        .collect();
    edges.sort_by(|x, y| {
        y.weight
            .total_cmp(&x.weight)
            .then_with(|| (&x.source, &x.target).cmp(&(&y.source, &y.target)))
    });
    if s.top > 0 {
        edges.truncate(s.top);
    }
    let keys: std::collections::BTreeSet<&str> = edges
        .iter()
        .flat_map(|e| [e.source.as_str(), e.target.as_str()])
        .collect();
    let nodes = keys
        .into_iter()
        .filter_map(|k| g.index.get(k).map(|&n| &g.graph[n]))
        .map(|v| ExportNode {
            id: v.key.clone(),
            label: v.label.clone(),
            mentions: v.mentions,
            documents: v.docs,
        })
        .collect();
    Export { nodes, edges }
}

/// Node-link JSON as networkx's `node_link_graph(data, edges="edges")` reads it.
pub fn write_json(out: &mut impl Write, e: &Export) -> std::io::Result<()> {
    let v = serde_json::json!({
        "directed": true, "multigraph": false, "graph": {},
        "nodes": e.nodes, "edges": e.edges,
    });
    serde_json::to_writer_pretty(&mut *out, &v)?;
    out.write_all(b"\n")
}

const NODE_ATTRS: &[(&str, &str)] = &[
    ("label", "string"),
    ("mentions", "int"),
    ("documents", "int"),
];

fn edge_attrs(e: &ExportEdge) -> Vec<(String, &'static str, String)> {
    let v = serde_json::to_value(e).unwrap_or_default();
    let mut out = Vec::new();
    if let serde_json::Value::Object(m) = v {
        for (k, val) in m {
            if k == "source" || k == "target" {
                continue;
            }
            let ty = if val.is_f64() { "double" } else { "int" };
            out.push((k, ty, val.to_string()));
        }
    }
    out
}

/// GraphML, with one `<key>` per attribute.
pub fn write_graphml(out: &mut impl Write, e: &Export) -> quick_xml::Result<()> {
    let mut w = Writer::new_with_indent(out, b' ', 2);
    w.write_event(Event::Decl(BytesDecl::new("1.0", Some("UTF-8"), None)))?;
    let sample = e.edges.first().map(edge_attrs).unwrap_or_default();
    w.create_element("graphml")
        .with_attribute(("xmlns", "http://graphml.graphdrawing.org/xmlns"))
        .write_inner_content(|w| {
            for (name, ty) in NODE_ATTRS {
                w.create_element("key")
                    .with_attributes([
                        ("id", *name),
                        ("for", "node"),
                        ("attr.name", *name),
                        ("attr.type", *ty),
                    ])
                    .write_empty()?;
            }
            for (name, ty, _) in &sample {
                w.create_element("key")
                    .with_attributes([
                        ("id", name.as_str()),
                        ("for", "edge"),
                        ("attr.name", name.as_str()),
                        ("attr.type", *ty),
                    ])
                    .write_empty()?;
            }
            w.create_element("graph")
                .with_attributes([("id", "G"), ("edgedefault", "directed")])
                .write_inner_content(|w| {
                    for n in &e.nodes {
                        let vals = [
                            n.label.clone(),
                            n.mentions.to_string(),
                            n.documents.to_string(),
                        ];
                        w.create_element("node")
                            .with_attribute(("id", n.id.as_str()))
                            .write_inner_content(|w| {
                                for ((name, _), v) in NODE_ATTRS.iter().zip(vals.iter()) {
                                    w.create_element("data")
                                        .with_attribute(("key", *name))
                                        .write_text_content(quick_xml::events::BytesText::new(v))?;
                                }
                                Ok(())
                            })?;
                    }
                    for ed in &e.edges {
                        w.create_element("edge")
                            .with_attributes([
                                ("source", ed.source.as_str()),
                                ("target", ed.target.as_str()),
                            ])
                            .write_inner_content(|w| {
                                for (name, _, v) in edge_attrs(ed) {
                                    w.create_element("data")
                                        .with_attribute(("key", name.as_str()))
                                        .write_text_content(quick_xml::events::BytesText::new(
                                            &v,
                                        ))?;
                                }
                                Ok(())
                            })?;
                    }
                    Ok(())
                })?;
            Ok(())
        })?;
    Ok(())
}
