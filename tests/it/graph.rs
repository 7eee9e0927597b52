//! `hearsay graph` exports, loaded back with networkx (PyPI package `networkx`; DOT through
//! `pydot`, both installed by `.ci/run`) and rendered with Graphviz `dot` (Debian package
//! `graphviz`). The demo corpus and the hostile labels below are invented data.

use crate::common::{demo_store_in, hearsay};
use hearsay::graph::export::{self, Export, ExportEdge, ExportNode};
use std::path::Path;
use std::process::Command;

fn python(script: &str, args: &[&Path]) -> String {
    let out = Command::new("python3")
        .arg("-c")
        .arg(script)
        .args(args)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Every export of the demo graph, written by the binary.
fn write_all(store: &Path, dir: &Path, extra: &[&str]) -> Vec<std::path::PathBuf> {
    let mut files = Vec::new();
    for (fmt, name) in [
        ("graphml", "g.graphml"),
        ("json", "g.json"),
        ("gexf", "g.gexf"),
        ("dot", "g.dot"),
        ("csv", "g.csv"),
    ] {
        let f = dir.join(name);
        hearsay()
            .arg("--store")
            .arg(store)
            .args(["-q", "--format", fmt, "graph", "-o"])
            .arg(&f)
            .args(extra)
            .assert()
            .success();
        files.push(f);
    }
    files
}

/// Loads every format and checks that nodes, edges and attributes agree with GraphML.
const ROUND_TRIP: &str = r#"
import sys, json, csv, networkx as nx
gml, js, gexf, dot, edges_csv = sys.argv[1:6]
g = nx.read_graphml(gml)
h = nx.node_link_graph(json.load(open(js)), edges="edges")
x = nx.read_gexf(gexf)
d0 = nx.nx_pydot.read_dot(dot)
def unq(s):
    s = str(s)
    if len(s) >= 2 and s[0] == '"' and s[-1] == '"':
        s = s[1:-1].replace('\\"', '"').replace('\\\\', '\\')
    return s
d = nx.DiGraph()
for n, a in d0.nodes(data=True):
    if "key" in a:
        d.add_node(unq(n), **{k: unq(v) for k, v in a.items()})
for u, v, a in d0.edges(data=True):
    d.add_edge(unq(u), unq(v), **{k: unq(val) for k, val in a.items()})
c = nx.DiGraph()
rows = list(csv.DictReader(open(edges_csv, newline="")))
for r in rows:
    c.add_edge(r["source"], r["target"], **r)
for n in csv.DictReader(open(edges_csv[:-4] + ".nodes.csv", newline="")):
    c.add_node(n["id"], **n)
for other in (h, x, d, c):
    assert other.is_directed()
    assert set(g.nodes()) == set(other.nodes()), (set(g.nodes()) ^ set(other.nodes()))
    assert set(g.edges()) == set(other.edges())
ints = ("mentions", "documents", "sentences", "asserted", "hedged", "negated", "question",
        "conditional", "increase", "decrease", "unsigned", "prevent", "no_effect", "association")
floats = ("weight", "net_sign", "direction_ratio", "reverse_weight")
for u, v, a in g.edges(data=True):
    for other in (h, x, d, c):
        b = other.edges[u, v]
        for k in ints:
            assert int(b[k]) == a[k], (u, v, k, a[k], b[k])
        for k in floats:
            assert abs(float(b[k]) - a[k]) < 1e-9, (u, v, k, a[k], b[k])
        if "evidence" in a:
            assert b["evidence"] == a["evidence"] or list(b["evidence"]) == a["evidence"].split(" | ")
for n, a in g.nodes(data=True):
    for other in (h, x, d, c):
        b = other.nodes[n]
        assert b["label"] == a["label"], (n, a["label"], b["label"])
        assert b["key"] == a["key"], (n, a["key"], b["key"])
        assert int(b["mentions"]) == a["mentions"] and int(b["documents"]) == a["documents"]
assert "weight = sum over distinct documents" in g.graph["weight_rule"]
assert "weight = sum" in h.graph["weight_rule"]
print(g.number_of_nodes(), g.number_of_edges())
"#;

#[test]
fn every_export_round_trips_through_networkx() {
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let files = write_all(&store, dir.path(), &["--evidence"]);
    let refs: Vec<&Path> = files.iter().map(|p| p.as_path()).collect();
    let out = python(ROUND_TRIP, &refs);
    let edges: usize = out.split_whitespace().nth(1).unwrap().parse().unwrap();
    assert!(edges >= 10, "{out}");
    // Graphviz renders the DOT file without complaint.
    let r = Command::new("dot")
        .arg("-Tsvg")
        .arg(&files[3])
        .output()
        .expect("graphviz dot runs");
    assert!(
        r.status.success() && r.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&r.stderr)
    );
    // The old spelling still works.
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["graph", "--to", "json"])
        .assert()
        .success();
}

/// Node ids are readable: networkx reads the GraphML export and finds each variable under the
/// slug of its label, with the variable key kept as an attribute.
const READABLE_IDS: &str = r#"
import sys, re, networkx as nx
g = nx.read_graphml(sys.argv[1])
ids = set(g.nodes())
assert "fertiliser-runoff" in ids and "algae-blooms" in ids, sorted(ids)
assert all(re.fullmatch(r"[a-z0-9]+(-[a-z0-9]+)*", n) for n in ids), sorted(ids)
a = g.nodes["fertiliser-runoff"]
assert a["label"] == "fertiliser runoff" and a["key"] == "fertilis runoff", a
assert g.has_edge("fertiliser-runoff", "algae-blooms")
print(len(ids))
"#;

#[test]
fn graphml_node_ids_are_readable() {
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let files = write_all(&store, dir.path(), &[]);
    let out = python(READABLE_IDS, &[files[0].as_path()]);
    assert!(out.trim().parse::<usize>().unwrap() >= 5, "{out}");
}

#[test]
fn hostile_labels_survive_every_format() {
    // Invented labels with every character the formats treat specially.
    let nasty = "a \"quoted\" <tag> & back\\slash\nnew line ü";
    let e = Export {
        nodes: vec![
            ExportNode {
                id: "k1 & <x>".into(),
                slug: "a-quoted-tag-back-slash-new-line-ü".into(),
                label: nasty.into(),
                mentions: 2,
                documents: 1,
            },
            ExportNode {
                id: "k2 \"q\"".into(),
                slug: "plain".into(),
                label: "plain".into(),
                mentions: 2,
                documents: 1,
            },
        ],
        edges: vec![ExportEdge {
            source: "k1 & <x>".into(),
            target: "k2 \"q\"".into(),
            mentions: 2,
            documents: 1,
            sentences: 2,
            association: 0,
            asserted: 2,
            hedged: 0,
            negated: 0,
            question: 0,
            conditional: 0,
            increase: 2,
            decrease: 0,
            unsigned: 0,
            prevent: 0,
            no_effect: 0,
            net_sign: 1.0,
            weight: 1.0,
            reverse_weight: 0.0,
            direction_ratio: 1.0,
            evidence: vec!["d \"1\".txt:3@0".into(), "d<2>.txt:1@9".into()],
        }],
        weight_rule: "rule with \"quotes\" & <angles>".into(),
        duplicates_removed: 0,
    };
    let dir = tempfile::tempdir().unwrap();
    let p = |n: &str| dir.path().join(n);
    let mut b = Vec::new();
    export::write_graphml(&mut b, &e).unwrap();
    std::fs::write(p("g.graphml"), &b).unwrap();
    b.clear();
    export::write_json(&mut b, &e).unwrap();
    std::fs::write(p("g.json"), &b).unwrap();
    b.clear();
    export::write_gexf(&mut b, &e).unwrap();
    std::fs::write(p("g.gexf"), &b).unwrap();
    b.clear();
    export::write_dot(&mut b, &e).unwrap();
    std::fs::write(p("g.dot"), &b).unwrap();
    b.clear();
    export::write_edges_csv(&mut b, &e).unwrap();
    std::fs::write(p("g.csv"), &b).unwrap();
    b.clear();
    export::write_nodes_csv(&mut b, &e).unwrap();
    std::fs::write(p("g.nodes.csv"), &b).unwrap();
    let files = [
        p("g.graphml"),
        p("g.json"),
        p("g.gexf"),
        p("g.dot"),
        p("g.csv"),
    ];
    let refs: Vec<&Path> = files.iter().map(|x| x.as_path()).collect();
    // DOT writes a line break in a label as the escape `\n`, which pydot hands back as written.
    let script = ROUND_TRIP.replace(
        "assert b[\"label\"] == a[\"label\"], (n, a[\"label\"], b[\"label\"])",
        "assert b[\"label\"].replace('\\\\n', '\\n') == a[\"label\"], (n, a[\"label\"], b[\"label\"])",
    );
    let script = script.replace(
        "assert \"weight = sum over distinct documents\" in g.graph[\"weight_rule\"]\nassert \"weight = sum\" in h.graph[\"weight_rule\"]",
        "assert g.graph[\"weight_rule\"] == h.graph[\"weight_rule\"] == 'rule with \"quotes\" & <angles>'",
    );
    assert_eq!(python(&script, &refs).trim(), "2 1");
    let r = Command::new("dot")
        .arg("-Tsvg")
        .arg(&files[3])
        .output()
        .expect("graphviz dot runs");
    assert!(r.status.success(), "{}", String::from_utf8_lossy(&r.stderr));
}

fn edges_of(store: &Path, args: &[&str]) -> Vec<serde_json::Value> {
    let out = hearsay()
        .arg("--store")
        .arg(store)
        .args(["-q", "--format", "json", "graph"])
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    v["edges"].as_array().unwrap().clone()
}

#[test]
fn filters_select_the_asked_part() {
    // Behaviour guards on the invented demo corpus.
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let all = edges_of(&store, &[]);
    let three = edges_of(&store, &["--min-docs", "3"]);
    assert!(!three.is_empty() && three.len() < all.len());
    assert!(three.iter().all(|e| e["documents"].as_u64().unwrap() >= 3));
    let top = edges_of(&store, &["--top", "2"]);
    assert_eq!(top.len(), 2);
    assert!(top[0]["weight"].as_f64() >= top[1]["weight"].as_f64());
    let vars = dir.path().join("vars.txt");
    std::fs::write(&vars, "# two variables\nboat traffic\ntourism revenue\n").unwrap();
    let within = edges_of(&store, &["--vars", vars.to_str().unwrap()]);
    assert_eq!(within.len(), 2, "{within:?}"); // both directions are stated
    let around = edges_of(&store, &["--around", "boat traffic", "--hops", "1"]);
    assert!(around
        .iter()
        .all(|e| e["source"] == "boat-traffic" || e["target"] == "boat-traffic"));
    let two_hops = edges_of(&store, &["--around", "boat traffic", "--hops", "2"]);
    assert!(two_hops.len() > around.len());
    let neg = edges_of(&store, &["--modality", "negated"]);
    assert!(neg.iter().all(|e| e["negated"] == e["mentions"]));
    let ev = edges_of(&store, &["--evidence", "--top", "1"]);
    assert_eq!(
        ev[0]["evidence"].as_array().unwrap().len() as u64,
        ev[0]["sentences"].as_u64().unwrap()
    );
    // The weight rule is configurable: counting every mention changes the heaviest edge's weight
    // to at least its document weight.
    let by_mention = edges_of(&store, &["--weight-by", "mentions", "--top", "1"]);
    assert!(by_mention[0]["weight"].as_f64() >= top[0]["weight"].as_f64());
    // An unknown --around variable is an error that names it.
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["graph", "--around", "zebra mussels"])
        .assert()
        .failure()
        .stderr(predicates::str::contains("zebra mussels"));
    // Graph file formats are for `graph` only.
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["--format", "gexf", "top"])
        .assert()
        .failure()
        .stderr(predicates::str::contains("hearsay graph"));
}

#[test]
fn dedupe_counts_copied_boilerplate_once() {
    // The demo corpus repeats "Fertiliser runoff causes algae blooms." in seven files
    // (corpora-demo/EXPECTED.md, rows 1-7): with --dedupe they count as one mention.
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["--format", "json", "graph", "--dedupe"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let removed = v["graph"]["duplicates_removed"].as_u64().unwrap();
    assert!(removed >= 6, "{removed}");
    assert!(String::from_utf8_lossy(&out.stderr).contains(&format!("removed {removed}")));
    let find = |edges: &[serde_json::Value]| {
        edges
            .iter()
            .find(|e| {
                e["target"]
                    .as_str()
                    .is_some_and(|t| t.starts_with("algae-bloom"))
                    && e["source"]
                        .as_str()
                        .is_some_and(|s| s.starts_with("fertilis"))
            })
            .cloned()
            .unwrap()
    };
    let plain = find(&edges_of(&store, &[]));
    let dd = find(v["edges"].as_array().unwrap());
    assert!(dd["mentions"].as_u64().unwrap() + 6 <= plain["mentions"].as_u64().unwrap());
}
