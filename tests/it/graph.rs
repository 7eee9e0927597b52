//! `hearsay graph` exports, loaded back with networkx (PyPI package `networkx`, installed by
//! `.ci/run`). The demo corpus is invented data.

use crate::common::hearsay;
use std::process::Command;

#[test]
fn graphml_and_node_link_json_round_trip_through_networkx() {
    let dir = tempfile::tempdir().unwrap();
    let store = dir.path().join("store");
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["-q", "scan", "corpora-demo"])
        .assert()
        .success();
    let gml = dir.path().join("g.graphml");
    let js = dir.path().join("g.json");
    for (to, f) in [("graphml", &gml), ("json", &js)] {
        hearsay()
            .arg("--store")
            .arg(&store)
            .args(["graph", "--to", to, "-o"])
            .arg(f)
            .assert()
            .success();
    }
    let script = r#"
import sys, json, networkx as nx
g = nx.read_graphml(sys.argv[1])
h = nx.node_link_graph(json.load(open(sys.argv[2])), edges="edges")
assert g.is_directed() and h.is_directed()
assert g.number_of_edges() >= 5, g.number_of_edges()
assert set(g.nodes()) == set(h.nodes())
assert set(g.edges()) == set(h.edges())
for u, v, d in g.edges(data=True):
    e = h.edges[u, v]
    for k in ("mentions", "documents", "sentences", "asserted", "hedged", "negated", "weight", "net_sign", "direction_ratio"):
        assert d[k] == e[k], (u, v, k, d[k], e[k])
for n, d in g.nodes(data=True):
    assert d["label"] == h.nodes[n]["label"] and d["mentions"] == h.nodes[n]["mentions"]
print("ok", g.number_of_nodes(), g.number_of_edges())
"#;
    let out = Command::new("python3")
        .arg("-c")
        .arg(script)
        .arg(&gml)
        .arg(&js)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}
