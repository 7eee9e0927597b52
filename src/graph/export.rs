//! Exports of the claim graph that network tools load: node-link JSON (the layout networkx's
//! `node_link_graph` reads), GraphML, GEXF 1.2, Graphviz DOT, and CSV edge and node lists.
//!
//! The export is a wire type ([`Export`]) built from the internal [`ClaimGraph`], so the
//! aggregation can change without changing the files.
//!
//! Node ids in every file are readable: the slug of the variable's label ("fertiliser runoff" →
//! `fertiliser-runoff`), made unique over the whole graph (not only the exported part) by
//! [`crate::variables::merge::unique_slugs`], so a variable has the same id in every export of
//! one store. The variable key is kept as the node attribute `key`. Inside the program, nodes and
//! edge ends are still named by key ([`ExportNode::id`], [`ExportEdge::source`]); the writers
//! translate. XML is written with quick-xml, which
//! escapes every attribute value and text node; DOT with petgraph's `dot` module, which escapes
//! labels, plus [`dot_quote`] for the other string attributes; CSV with the csv crate.

use crate::claim::{Modality, Polarity};
use crate::graph::weight::WeightSpec;
use crate::graph::{ClaimGraph, Relation};
use petgraph::graph::NodeIndex;
use quick_xml::events::{BytesDecl, BytesText, Event};
use quick_xml::Writer;
use serde::Serialize;
use std::collections::{BTreeSet, HashMap, HashSet, VecDeque};
use std::io::Write;

/// One variable in an export.
#[derive(Debug, Clone, Serialize)]
pub struct ExportNode {
    /// The variable key, which edges name their ends by.
    pub id: String,
    /// The readable id files use.
    pub slug: String,
    pub label: String,
    pub mentions: usize,
    pub documents: usize,
}

/// One causal edge in an export, with its counts flattened into attributes.
#[derive(Debug, Clone, Serialize)]
pub struct ExportEdge {
    pub source: String,
    pub target: String,
    /// Raw causal claims (mentions) on this edge.
    pub mentions: usize,
    pub documents: usize,
    pub sentences: usize,
    /// Association claims between the same two variables (either order): the other kind.
    pub association: usize,
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
    /// (increase − decrease − prevent) / signed claims, over non-negated claims, in [-1, 1];
    /// 0 when none is signed.
    pub net_sign: f64,
    /// See [`WeightSpec`]; the rule is in [`Export::weight_rule`].
    pub weight: f64,
    /// The weight of the reverse edge (effect → cause), 0 when there is none.
    pub reverse_weight: f64,
    /// support(this) / (support(this) + support(reverse)), support = non-negated claims.
    pub direction_ratio: f64,
    /// Evidence sentence ids (`document:line@byte`), only with `Selection::evidence`.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub evidence: Vec<String>,
}

/// The selected part of the graph.
#[derive(Debug, Clone, Serialize)]
pub struct Export {
    pub nodes: Vec<ExportNode>,
    pub edges: Vec<ExportEdge>,
    pub weight_rule: String,
    /// Mentions that `--dedupe` dropped as near-duplicates (0 without it).
    pub duplicates_removed: usize,
}

/// Which edges to export.
#[derive(Debug, Clone, Default)]
pub struct Selection {
    pub min_docs: usize,
    pub min_claims: usize,
    /// Keep the N heaviest edges (0: all).
    pub top: usize,
    /// Only edges between these variable keys.
    pub vars: Option<BTreeSet<String>>,
    /// Only the neighbourhood of this variable key, within `hops` edges (either direction).
    pub around: Option<String>,
    pub hops: usize,
    /// Attach evidence sentence ids.
    pub evidence: bool,
    pub weight: WeightSpec,
    /// Passed through to [`Export::duplicates_removed`].
    pub duplicates_removed: usize,
}

/// The sentence id used as evidence: `document:line@byte offset of the sentence`.
pub fn sentence_id(g: &ClaimGraph, row: usize) -> String {
    let r = &g.rows[row];
    format!("{}:{}@{}", r.doc, r.line, r.sentence)
}

fn edge_of(
    g: &ClaimGraph,
    a: NodeIndex,
    b: NodeIndex,
    rel: &Relation,
    s: &Selection,
) -> ExportEdge {
    let c = &rel.counts;
    let inc = c.stated(Polarity::Increase);
    let dec = c.stated(Polarity::Decrease) + c.stated(Polarity::Prevent);
    let fwd = rel.support();
    let back_rel = g.edge(b, a);
    let back = back_rel.map(|r| r.support()).unwrap_or(0);
    let mut evidence = Vec::new();
    if s.evidence {
        let mut seen = HashSet::new();
        for &r in &rel.rows {
            let id = sentence_id(g, r);
            if seen.insert(id.clone()) {
                evidence.push(id);
            }
        }
    }
    ExportEdge {
        source: g.graph[a].key.clone(),
        target: g.graph[b].key.clone(),
        mentions: c.total,
        documents: rel.documents(),
        sentences: rel.sentence_count(),
        association: g.association(a, b).map(|r| r.counts.total).unwrap_or(0),
        asserted: c.modality(Modality::Asserted),
        hedged: c.modality(Modality::Hedged),
        negated: c.modality(Modality::Negated),
        question: c.modality(Modality::Question),
        conditional: c.modality(Modality::Conditional),
        increase: c.polarity(Polarity::Increase),
        decrease: c.polarity(Polarity::Decrease),
        unsigned: c.polarity(Polarity::Unsigned),
        prevent: c.polarity(Polarity::Prevent),
        no_effect: c.polarity(Polarity::None),
        net_sign: if inc + dec > 0 {
            (inc as f64 - dec as f64) / (inc + dec) as f64
        } else {
            0.0
        },
        weight: s.weight.weight(g, rel),
        reverse_weight: back_rel.map(|r| s.weight.weight(g, r)).unwrap_or(0.0),
        direction_ratio: if fwd + back > 0 {
            fwd as f64 / (fwd + back) as f64
        } else {
            0.0
        },
        evidence,
    }
}

/// The edges that pass the count and variable filters, then the neighbourhood filter.
pub fn selected_edges(g: &ClaimGraph, s: &Selection) -> Vec<(NodeIndex, NodeIndex)> {
    let in_vars = |n: NodeIndex| s.vars.as_ref().is_none_or(|v| v.contains(&g.graph[n].key));
    let mut edges: Vec<(NodeIndex, NodeIndex)> = g
        .edges()
        .filter(|(a, b, r)| {
            r.documents() >= s.min_docs
                && r.counts.total >= s.min_claims
                && in_vars(*a)
                && in_vars(*b)
        })
        .map(|(a, b, _)| (a, b))
        .collect();
    if let Some(center) = &s.around {
        let Some(&c) = g.index.get(center) else {
            return Vec::new();
        };
        let mut adj: std::collections::HashMap<NodeIndex, Vec<NodeIndex>> = Default::default();
        for &(a, b) in &edges {
            adj.entry(a).or_default().push(b);
            adj.entry(b).or_default().push(a);
        }
        let mut dist: std::collections::HashMap<NodeIndex, usize> = Default::default();
        dist.insert(c, 0);
        let mut queue = VecDeque::from([c]);
        while let Some(n) = queue.pop_front() {
            let d = dist[&n];
            if d >= s.hops {
                continue;
            }
            for &m in adj.get(&n).into_iter().flatten() {
                if let std::collections::hash_map::Entry::Vacant(v) = dist.entry(m) {
                    v.insert(d + 1);
                    queue.push_back(m);
                }
            }
        }
        // An edge is in the neighbourhood when it leaves a node closer than `hops`.
        edges.retain(|(a, b)| {
            let (da, db) = (dist.get(a), dist.get(b));
            matches!((da, db), (Some(x), Some(y)) if x.min(y) < &s.hops)
        });
    }
    edges
}

/// Select edges and the nodes they touch.
pub fn select(g: &ClaimGraph, s: &Selection) -> Export {
    let mut edges: Vec<ExportEdge> = selected_edges(g, s)
        .into_iter()
        .filter_map(|(a, b)| g.edge(a, b).map(|r| edge_of(g, a, b, r, s)))
        .collect();
    edges.sort_by(|x, y| {
        y.weight
            .total_cmp(&x.weight)
            .then_with(|| (&x.source, &x.target).cmp(&(&y.source, &y.target)))
    });
    if s.top > 0 {
        edges.truncate(s.top);
    }
    let keys: BTreeSet<&str> = edges
        .iter()
        .flat_map(|e| [e.source.as_str(), e.target.as_str()])
        .chain(s.around.as_deref().filter(|k| g.index.contains_key(*k)))
        .collect();
    let slugs = node_slugs(g);
    let nodes = keys
        .into_iter()
        .filter_map(|k| g.index.get(k).map(|&n| (n, &g.graph[n])))
        .map(|(n, v)| ExportNode {
            id: v.key.clone(),
            slug: slugs[n.index()].clone(),
            label: v.label.clone(),
            mentions: v.mentions,
            documents: v.docs,
        })
        .collect();
    Export {
        nodes,
        edges,
        weight_rule: s.weight.describe(),
        duplicates_removed: s.duplicates_removed,
    }
}

/// The readable id of every node of the graph, by node index: the slugs of the labels, unique.
pub fn node_slugs(g: &ClaimGraph) -> Vec<String> {
    let vars: Vec<(&str, &str)> = g
        .graph
        .node_weights()
        .map(|v| (v.key.as_str(), v.label.as_str()))
        .collect();
    crate::variables::merge::unique_slugs(&vars)
}

/// Key → readable id, for the edge ends of an export.
fn file_ids(e: &Export) -> HashMap<&str, &str> {
    e.nodes
        .iter()
        .map(|n| (n.id.as_str(), n.slug.as_str()))
        .collect()
}

/// The readable id of the node keyed `key` (the key itself if the export lacks the node).
fn file_id<'a>(ids: &HashMap<&str, &'a str>, key: &'a str) -> &'a str {
    ids.get(key).copied().unwrap_or(key)
}

/// Node-link JSON as networkx's `node_link_graph(data, edges="edges")` reads it.
pub fn write_json(out: &mut impl Write, e: &Export) -> std::io::Result<()> {
    let ids = file_ids(e);
    let nodes: Vec<serde_json::Value> = e
        .nodes
        .iter()
        .map(|n| {
            serde_json::json!({
                "id": n.slug, "key": n.id, "label": n.label,
                "mentions": n.mentions, "documents": n.documents,
            })
        })
        .collect();
    let mut edges: Vec<serde_json::Value> = Vec::with_capacity(e.edges.len());
    for ed in &e.edges {
        let mut v = serde_json::to_value(ed)?;
        v["source"] = file_id(&ids, &ed.source).into();
        v["target"] = file_id(&ids, &ed.target).into();
        edges.push(v);
    }
    let v = serde_json::json!({
        "directed": true, "multigraph": false,
        "graph": {"weight_rule": e.weight_rule, "duplicates_removed": e.duplicates_removed},
        "nodes": nodes, "edges": edges,
    });
    serde_json::to_writer_pretty(&mut *out, &v)?;
    out.write_all(b"\n")
}

/// An attribute's type, as the XML formats name it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AttrType {
    Int,
    Double,
    Text,
}

impl AttrType {
    fn graphml(self) -> &'static str {
        match self {
            AttrType::Int => "int",
            AttrType::Double => "double",
            AttrType::Text => "string",
        }
    }
    fn gexf(self) -> &'static str {
        match self {
            AttrType::Int => "integer",
            AttrType::Double => "double",
            AttrType::Text => "string",
        }
    }
}

/// Separator of the evidence ids in the flat formats (GraphML, GEXF, DOT, CSV).
pub const EVIDENCE_SEPARATOR: &str = " | ";

/// An edge's attributes (all but source and target) as (name, type, value), by name (the order
/// every format has written them in: that of the fields serialised into a sorted map); the
/// evidence only when there is some.
pub fn edge_attrs(e: &ExportEdge) -> Vec<(&'static str, AttrType, String)> {
    let int = |name: &'static str, n: usize| (name, AttrType::Int, n.to_string());
    // A number as JSON writes it (the shortest text that reads back as the same double); a
    // value that is not finite is JSON's `null`, typed as a plain value.
    let float = |name: &'static str, x: f64| match serde_json::Number::from_f64(x) {
        Some(n) => (name, AttrType::Double, n.to_string()),
        None => (name, AttrType::Int, "null".to_string()),
    };
    let mut out = Vec::with_capacity(19);
    out.extend([
        int("asserted", e.asserted),
        int("association", e.association),
        int("conditional", e.conditional),
        int("decrease", e.decrease),
        float("direction_ratio", e.direction_ratio),
        int("documents", e.documents),
    ]);
    if !e.evidence.is_empty() {
        out.push((
            "evidence",
            AttrType::Text,
            e.evidence.join(EVIDENCE_SEPARATOR),
        ));
    }
    out.extend([
        int("hedged", e.hedged),
        int("increase", e.increase),
        int("mentions", e.mentions),
        int("negated", e.negated),
        float("net_sign", e.net_sign),
        int("no_effect", e.no_effect),
        int("prevent", e.prevent),
        int("question", e.question),
        float("reverse_weight", e.reverse_weight),
        int("sentences", e.sentences),
        int("unsigned", e.unsigned),
        float("weight", e.weight),
    ]);
    out
}

/// The GraphML key id of an edge attribute: `edge_` and its name.
fn edge_key_id(name: &str) -> std::borrow::Cow<'static, str> {
    const IDS: [&str; 19] = [
        "edge_asserted",
        "edge_association",
        "edge_conditional",
        "edge_decrease",
        "edge_direction_ratio",
        "edge_documents",
        "edge_evidence",
        "edge_hedged",
        "edge_increase",
        "edge_mentions",
        "edge_negated",
        "edge_net_sign",
        "edge_no_effect",
        "edge_prevent",
        "edge_question",
        "edge_reverse_weight",
        "edge_sentences",
        "edge_unsigned",
        "edge_weight",
    ];
    match IDS.iter().find(|id| &id[5..] == name) {
        Some(id) => std::borrow::Cow::Borrowed(id),
        None => std::borrow::Cow::Owned(format!("edge_{name}")),
    }
}

const NODE_ATTRS: &[(&str, AttrType)] = &[
    ("label", AttrType::Text),
    ("mentions", AttrType::Int),
    ("documents", AttrType::Int),
    ("key", AttrType::Text),
];

fn node_values(n: &ExportNode) -> [String; 4] {
    [
        n.label.clone(),
        n.mentions.to_string(),
        n.documents.to_string(),
        n.id.clone(),
    ]
}

type XmlResult = quick_xml::Result<()>;

/// GraphML, with one `<key>` per attribute and the weight rule as graph data. Written directly
/// (a graph of a large store is tens of megabytes of it), in the layout of an XML writer
/// indenting by two spaces, every attribute value and text escaped by [`xml_escaped`].
pub fn write_graphml(out: &mut impl Write, e: &Export) -> XmlResult {
    let ids = file_ids(e);
    let sample = e.edges.first().map(edge_attrs).unwrap_or_default();
    let graph_data = [
        ("weight_rule", AttrType::Text, e.weight_rule.clone()),
        (
            "duplicates_removed",
            AttrType::Int,
            e.duplicates_removed.to_string(),
        ),
    ];
    let o = out;
    o.write_all(b"<?xml version=\"1.0\" encoding=\"UTF-8\"?>")?;
    o.write_all(b"\n<graphml xmlns=\"http://graphml.graphdrawing.org/xmlns\">")?;
    let keys = graph_data
        .iter()
        .map(|(n, t, _)| ("graph", *n, *t))
        .chain(NODE_ATTRS.iter().map(|(n, t)| ("node", *n, *t)))
        .chain(sample.iter().map(|(n, t, _)| ("edge", *n, *t)));
    for (class, name, ty) in keys {
        // Ids are unique per class (an edge and a node attribute may share a name).
        let id = format!("{class}_{name}");
        o.write_all(b"\n  <key id=\"")?;
        xml_escaped(o, &id, true)?;
        o.write_all(b"\" for=\"")?;
        xml_escaped(o, class, true)?;
        o.write_all(b"\" attr.name=\"")?;
        xml_escaped(o, name, true)?;
        o.write_all(b"\" attr.type=\"")?;
        xml_escaped(o, ty.graphml(), true)?;
        o.write_all(b"\"/>")?;
    }
    o.write_all(b"\n  <graph id=\"G\" edgedefault=\"directed\">")?;
    for (name, _, v) in &graph_data {
        graphml_data(o, 4, &format!("graph_{name}"), v)?;
    }
    for n in &e.nodes {
        o.write_all(b"\n    <node id=\"")?;
        xml_escaped(o, &n.slug, true)?;
        o.write_all(b"\">")?;
        let vals = node_values(n);
        for ((name, _), v) in NODE_ATTRS.iter().zip(vals.iter()) {
            graphml_data(o, 6, &format!("node_{name}"), v)?;
        }
        o.write_all(b"\n    </node>")?;
    }
    for ed in &e.edges {
        o.write_all(b"\n    <edge source=\"")?;
        xml_escaped(o, file_id(&ids, &ed.source), true)?;
        o.write_all(b"\" target=\"")?;
        xml_escaped(o, file_id(&ids, &ed.target), true)?;
        o.write_all(b"\">")?;
        for (name, _, v) in edge_attrs(ed) {
            graphml_data(o, 6, &edge_key_id(name), &v)?;
        }
        o.write_all(b"\n    </edge>")?;
    }
    o.write_all(b"\n  </graph>\n</graphml>")?;
    Ok(())
}

/// One `<data>` element of GraphML on a line of its own, indented by `indent` spaces.
fn graphml_data(o: &mut impl Write, indent: usize, key: &str, v: &str) -> std::io::Result<()> {
    const SPACES: &[u8; 8] = b"        ";
    o.write_all(b"\n")?;
    o.write_all(&SPACES[..indent.min(SPACES.len())])?;
    o.write_all(b"<data key=\"")?;
    xml_escaped(o, key, true)?;
    o.write_all(b"\">")?;
    xml_escaped(o, v, false)?;
    o.write_all(b"</data>")
}

/// `s` escaped for XML as quick-xml escapes it: in text `<`, `>`, `&`, `'`, `"` and CR; in an
/// attribute value also LF and tab (which attribute-value normalisation would turn into spaces).
fn xml_escaped(o: &mut impl Write, s: &str, attribute: bool) -> std::io::Result<()> {
    let special = |b: u8| {
        matches!(b, b'<' | b'>' | b'&' | b'\'' | b'"' | b'\r')
            || (attribute && matches!(b, b'\n' | b'\t'))
    };
    let bytes = s.as_bytes();
    let mut from = 0;
    for (i, &b) in bytes.iter().enumerate() {
        if !special(b) {
            continue;
        }
        o.write_all(&bytes[from..i])?;
        o.write_all(match b {
            b'<' => b"&lt;",
            b'>' => b"&gt;",
            b'&' => b"&amp;",
            b'\'' => b"&apos;",
            b'"' => b"&quot;",
            b'\r' => b"&#13;",
            b'\n' => b"&#10;",
            _ => b"&#9;",
        })?;
        from = i + 1;
    }
    o.write_all(&bytes[from..])
}

/// GEXF 1.2 (the version networkx reads and writes by default). The edge weight is GEXF's own
/// `weight` attribute; the other counts are declared attributes; the weight rule is the
/// `<meta><description>`.
pub fn write_gexf(out: &mut impl Write, e: &Export) -> XmlResult {
    let ids = file_ids(e);
    let mut w = Writer::new_with_indent(out, b' ', 2);
    w.write_event(Event::Decl(BytesDecl::new("1.0", Some("UTF-8"), None)))?;
    let sample: Vec<(&str, AttrType)> = e
        .edges
        .first()
        .map(edge_attrs)
        .unwrap_or_default()
        .into_iter()
        .filter(|(n, _, _)| *n != "weight")
        .map(|(n, t, _)| (n, t))
        .collect();
    let node_attrs = &NODE_ATTRS[1..];
    w.create_element("gexf")
        .with_attributes([
            ("xmlns", "http://www.gexf.net/1.2draft"),
            ("version", "1.2"),
        ])
        .write_inner_content(|w| {
            w.create_element("meta").write_inner_content(|w| {
                w.create_element("creator")
                    .write_text_content(BytesText::new("hearsay"))?;
                w.create_element("description")
                    .write_text_content(BytesText::new(&format!(
                        "{}; duplicates removed: {}",
                        e.weight_rule, e.duplicates_removed
                    )))?;
                Ok(())
            })?;
            w.create_element("graph")
                .with_attributes([("defaultedgetype", "directed"), ("mode", "static")])
                .write_inner_content(|w| {
                    let classes: [(&str, Vec<(&str, AttrType)>); 2] =
                        [("node", node_attrs.to_vec()), ("edge", sample.clone())];
                    for (class, attrs) in &classes {
                        w.create_element("attributes")
                            .with_attributes([("class", *class), ("mode", "static")])
                            .write_inner_content(|w| {
                                for (name, ty) in attrs {
                                    w.create_element("attribute")
                                        .with_attributes([
                                            ("id", *name),
                                            ("title", *name),
                                            ("type", ty.gexf()),
                                        ])
                                        .write_empty()?;
                                }
                                Ok(())
                            })?;
                    }
                    w.create_element("nodes").write_inner_content(|w| {
                        for n in &e.nodes {
                            let vals = node_values(n);
                            w.create_element("node")
                                .with_attributes([
                                    ("id", n.slug.as_str()),
                                    ("label", n.label.as_str()),
                                ])
                                .write_inner_content(|w| {
                                    let pairs =
                                        node_attrs.iter().map(|(n, _)| *n).zip(vals[1..].iter());
                                    attvalues(w, pairs)
                                })?;
                        }
                        Ok(())
                    })?;
                    w.create_element("edges").write_inner_content(|w| {
                        for (i, ed) in e.edges.iter().enumerate() {
                            let id = i.to_string();
                            let weight = ed.weight.to_string();
                            let attrs: Vec<(&str, AttrType, String)> = edge_attrs(ed)
                                .into_iter()
                                .filter(|(n, _, _)| *n != "weight")
                                .collect();
                            w.create_element("edge")
                                .with_attributes([
                                    ("id", id.as_str()),
                                    ("source", file_id(&ids, &ed.source)),
                                    ("target", file_id(&ids, &ed.target)),
                                    ("weight", weight.as_str()),
                                ])
                                .write_inner_content(|w| {
                                    attvalues(w, attrs.iter().map(|(n, _, v)| (*n, v)))
                                })?;
                        }
                        Ok(())
                    })?;
                    Ok(())
                })?;
            Ok(())
        })?;
    Ok(())
}

fn attvalues<'a, W: Write>(
    w: &mut Writer<W>,
    pairs: impl Iterator<Item = (&'a str, &'a String)>,
) -> std::io::Result<()> {
    w.create_element("attvalues").write_inner_content(|w| {
        for (name, v) in pairs {
            w.create_element("attvalue")
                .with_attributes([("for", name), ("value", v.as_str())])
                .write_empty()?;
        }
        Ok(())
    })?;
    Ok(())
}

/// A DOT double-quoted string: backslashes and quotes escaped, line breaks as `\n`.
pub fn dot_quote(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => {}
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// Graphviz DOT: node ids are the readable ids, node labels the variable labels, edge labels
/// the weights; the key and every count are attributes; the weight rule is the graph's `comment`.
/// Every id and text value is a quoted DOT string ([`dot_quote`]).
pub fn write_dot(out: &mut impl Write, e: &Export) -> std::io::Result<()> {
    let ids = file_ids(e);
    writeln!(out, "digraph claims {{")?;
    writeln!(
        out,
        "    graph [ comment = {} ]",
        dot_quote(&format!(
            "{}; duplicates removed: {}",
            e.weight_rule, e.duplicates_removed
        ))
    )?;
    for n in &e.nodes {
        writeln!(
            out,
            "    {} [ label = {} key = {} mentions = {} documents = {} ]",
            dot_quote(&n.slug),
            dot_quote(&n.label),
            dot_quote(&n.id),
            n.mentions,
            n.documents
        )?;
    }
    for ed in &e.edges {
        let mut attrs = format!("label = {} ", dot_quote(&ed.weight.to_string()));
        for (name, ty, v) in edge_attrs(ed) {
            let v = if ty == AttrType::Text {
                dot_quote(&v)
            } else {
                v
            };
            attrs.push_str(&format!("{name} = {v} "));
        }
        writeln!(
            out,
            "    {} -> {} [ {attrs}]",
            dot_quote(file_id(&ids, &ed.source)),
            dot_quote(file_id(&ids, &ed.target))
        )?;
    }
    writeln!(out, "}}")
}

/// The CSV edge list: `source,target` and every edge attribute, one edge a row.
pub fn write_edges_csv(out: &mut impl Write, e: &Export) -> Result<(), csv::Error> {
    let mut w = csv::Writer::from_writer(out);
    let names: Vec<String> = e
        .edges
        .first()
        .map(|x| edge_attrs(x).into_iter().map(|a| a.0.to_string()).collect())
        .unwrap_or_default();
    let mut header = vec!["source".to_string(), "target".to_string()];
    header.extend(names);
    w.write_record(&header)?;
    let ids = file_ids(e);
    for ed in &e.edges {
        let mut row = vec![
            file_id(&ids, &ed.source).to_string(),
            file_id(&ids, &ed.target).to_string(),
        ];
        row.extend(edge_attrs(ed).into_iter().map(|a| a.2));
        w.write_record(&row)?;
    }
    w.flush()?;
    Ok(())
}

/// The CSV node list: `id,label,mentions,documents,key`.
pub fn write_nodes_csv(out: &mut impl Write, e: &Export) -> Result<(), csv::Error> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(["id", "label", "mentions", "documents", "key"])?;
    for n in &e.nodes {
        let [label, m, d, key] = node_values(n);
        w.write_record([n.slug.clone(), label, m, d, key])?;
    }
    w.flush()?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dot_strings_are_escaped() {
        assert_eq!(dot_quote(r#"a "b" \c"#), r#""a \"b\" \\c""#);
        assert_eq!(dot_quote("x\ny"), r#""x\ny""#);
    }
}
