//! `hearsay report`: the page is parsed with a real HTML5 parser (html5ever, through the scraper
//! crate) and rendered in headless Chromium (Debian package `chromium`, installed by `.ci/run`).
//! The demo corpus and every count expected from it are invented data (corpora-demo/EXPECTED.md).

use crate::common::{demo_store_in, hearsay, json_lines};
use scraper::{Html, Selector};
use std::path::{Path, PathBuf};
use std::process::Command;

/// Causal edges and variables of the demo corpus's graph (invented data; every causal edge fits
/// in the default 40-edge picture). "detection limit 0.01 mg" is no longer read as a claim (an
/// amount is no variable), so "detect" and "0.01 mg" are not nodes; "oxygen levels fell" after
/// "because" is now a decrease of "oxygen levels", a node the corpus already had.
const DEMO_EDGES: usize = 14;
const DEMO_NODES: usize = 15;

fn write_report(store: &Path, out: &Path, extra: &[&str]) -> String {
    hearsay()
        .arg("--store")
        .arg(store)
        .arg("report")
        .arg("-o")
        .arg(out)
        .args(extra)
        .assert()
        .success();
    std::fs::read_to_string(out).expect("report written")
}

fn count(doc: &Html, css: &str) -> usize {
    doc.select(&Selector::parse(css).expect("selector")).count()
}

/// Every URL-bearing attribute and every text of the page, checked for outside references.
fn assert_self_contained(doc: &Html, text: &str) {
    assert!(!text.contains("http://") && !text.contains("https://"));
    assert!(!text.contains("//cdn") && !text.contains("@import"));
    let any = Selector::parse("*").expect("selector");
    for el in doc.select(&any) {
        for attr in ["src", "href", "xlink:href", "action", "srcset", "data"] {
            if let Some(v) = el.value().attr(attr) {
                assert!(
                    v.starts_with('#'),
                    "<{} {attr}=\"{v}\"> points outside the page",
                    el.value().name()
                );
            }
        }
    }
    assert_eq!(count(doc, "link"), 0, "no linked style sheets or icons");
    assert_eq!(count(doc, "script[src]"), 0, "no external scripts");
}

#[test]
fn report_page_is_well_formed_self_contained_and_escaped() {
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let out = dir.path().join("report.html");
    let text = write_report(
        &store,
        &out,
        &[
            "--pair",
            "fertiliser runoff",
            "algae blooms",
            "--title",
            "Quorvin <demo> & \"co\"",
        ],
    );
    let doc = Html::parse_document(&text);
    assert!(
        doc.errors.is_empty(),
        "HTML5 parse errors: {:?}",
        doc.errors
    );
    assert_eq!(
        format!("{:?}", doc.quirks_mode),
        "NoQuirks",
        "the doctype is missing"
    );
    assert_self_contained(&doc, &text);
    // The title is user text: it must arrive escaped and read back verbatim.
    assert!(text.contains("Quorvin &lt;demo&gt; &amp; &quot;co&quot;"));
    let title = doc
        .select(&Selector::parse("title").unwrap())
        .next()
        .map(|t| t.text().collect::<String>());
    assert_eq!(title.as_deref(), Some("Quorvin <demo> & \"co\""));

    assert_eq!(count(&doc, "svg#claim-graph g.edge"), DEMO_EDGES);
    assert_eq!(count(&doc, "svg#claim-graph g.node"), DEMO_NODES);
    // One evidence panel per edge, each edge with hover text and a text label.
    assert_eq!(count(&doc, "section.edge-detail"), DEMO_EDGES);
    assert_eq!(count(&doc, "svg#claim-graph g.edge > title"), DEMO_EDGES);
    assert_eq!(
        count(&doc, "svg#claim-graph g.edge[aria-label]"),
        DEMO_EDGES
    );
    // Each panel quotes evidence with file:line locations from the demo corpus.
    let loc = Selector::parse("section.edge-detail .loc").unwrap();
    let locs: Vec<String> = doc.select(&loc).map(|e| e.text().collect()).collect();
    assert!(locs.len() >= DEMO_EDGES);
    let line_ref = regex::Regex::new(r"^corpora-demo/\S+\.(txt|md):\d+").unwrap();
    assert!(locs.iter().all(|l| line_ref.is_match(l)), "{locs:?}");
    // Every figure has a text alternative: a title and a description.
    for id in [
        "claim-graph",
        "plot-support",
        "plot-direction",
        "plot-families",
    ] {
        assert_eq!(count(&doc, &format!("svg#{id} > title")), 1, "{id}");
        assert_eq!(count(&doc, &format!("svg#{id} > desc")), 1, "{id}");
    }
    assert!(count(&doc, "table.sortable th[aria-sort] button") >= 10);
    assert_eq!(count(&doc, "section#pair"), 1);
    assert!(count(&doc, "section#pair ol.evidence li") >= 3);
}

#[test]
fn report_graph_keeps_the_heaviest_edges_of_the_graph_export() {
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let text = write_report(&store, &dir.path().join("r.html"), &["--edges", "5"]);
    let doc = Html::parse_document(&text);
    // The same selection through the node-link export (`hearsay graph --top 5`).
    let js = dir.path().join("g.json");
    hearsay()
        .arg("--store")
        .arg(&store)
        .args(["graph", "--to", "json", "--top", "5", "-o"])
        .arg(&js)
        .assert()
        .success();
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&js).unwrap()).unwrap();
    let keys: Vec<&str> = v["nodes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n["key"].as_str().unwrap())
        .collect();
    assert_eq!(count(&doc, "svg#claim-graph g.edge"), 5);
    let sel = Selector::parse("svg#claim-graph g.node").unwrap();
    let mut drawn: Vec<&str> = doc
        .select(&sel)
        .filter_map(|n| n.value().attr("data-key"))
        .collect();
    drawn.sort();
    let mut want = keys.clone();
    want.sort();
    assert_eq!(drawn, want);
}

fn chromium() -> Option<PathBuf> {
    let found = ["chromium", "chromium-browser"].iter().find_map(|name| {
        Command::new(name)
            .arg("--version")
            .output()
            .ok()
            .filter(|o| o.status.success())
            .map(|_| PathBuf::from(name))
    });
    if found.is_none() {
        if std::env::var("HEARSAY_SKIP_EXTERNAL").is_ok_and(|v| v == "1") {
            eprintln!("SKIPPED: chromium is not installed");
            return None;
        }
        panic!("chromium not found (install the Debian package chromium, or set HEARSAY_SKIP_EXTERNAL=1 to skip)");
    }
    found
}

fn headless(browser: &Path, profile: &Path) -> Command {
    let mut c = Command::new(browser);
    c.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--hide-scrollbars",
    ])
    .arg(format!("--user-data-dir={}", profile.display()))
    .args(["--window-size=1200,2400", "--virtual-time-budget=3000"]);
    c
}

#[test]
fn report_renders_in_headless_chromium_with_the_expected_graph() {
    let Some(browser) = chromium() else { return };
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let page = dir.path().join("report.html");
    write_report(&store, &page, &[]);
    let url = format!("file://{}", page.display());

    let out = headless(&browser, &dir.path().join("profile-dom"))
        .arg("--dump-dom")
        .arg(&url)
        .output()
        .expect("chromium runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let dom = Html::parse_document(&String::from_utf8_lossy(&out.stdout));
    assert_eq!(count(&dom, "svg#claim-graph g.edge"), DEMO_EDGES);
    assert_eq!(count(&dom, "svg#claim-graph g.node"), DEMO_NODES);
    assert_eq!(
        count(&dom, "svg#claim-graph g.edge path.line[marker-end]"),
        DEMO_EDGES
    );
    // The inlined script ran to its last line without an error.
    assert_eq!(count(&dom, "body[data-script=ready]"), 1);

    let shot = dir.path().join("report.png");
    let out = headless(&browser, &dir.path().join("profile-shot"))
        .arg(format!("--screenshot={}", shot.display()))
        .arg(&url)
        .output()
        .expect("chromium runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let png = std::fs::read(&shot).expect("screenshot written");
    // PNG signature (ISO/IEC 15948), and more than a blank page's worth of bytes.
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
    assert!(png.len() > 50_000, "screenshot only {} bytes", png.len());
}

/// `--compare` adds the summary `hearsay compare` prints. The answers are INVENTED (one made-up
/// model); the check is that the page shows, row for row, what the compare command reports.
#[test]
fn report_compare_and_conflicts_sections_match_the_commands() {
    let dir = tempfile::tempdir().unwrap();
    let store = demo_store_in(dir.path());
    let answers = dir.path().join("answers.csv");
    let mut csv = String::from("x,y,family,answer,model\n");
    for (x, y) in [
        ("fertiliser runoff", "algae blooms"),
        ("algae blooms", "fertiliser runoff"),
        ("boat traffic", "algae blooms"),
        ("algae blooms", "boat traffic"),
    ] {
        for family in ["directed", "reversed", "symmetric"] {
            let yes = x == "fertiliser runoff" || family == "symmetric";
            csv.push_str(&format!(
                "{x},{y},{family},{},invented-model\n",
                if yes { "yes" } else { "no" }
            ));
        }
    }
    std::fs::write(&answers, csv).unwrap();
    let a = answers.to_str().unwrap();
    let want = json_lines(&["compare", a], &store);
    assert!(!want.is_empty());
    let text = write_report(&store, &dir.path().join("r.html"), &["--compare", a]);
    // The conflicts table lists what `hearsay conflicts` lists (fewer than the 50-row cap here).
    let listed = json_lines(&["conflicts"], &store);
    assert!(!listed.is_empty());
    let conflict_rows = Selector::parse("section#conflicts tbody tr").unwrap();
    assert_eq!(
        Html::parse_document(&text).select(&conflict_rows).count(),
        listed.len()
    );
    let doc = Html::parse_document(&text);
    assert_self_contained(&doc, &text);
    let row_sel = Selector::parse("section#compare tbody tr").unwrap();
    let td = Selector::parse("td").unwrap();
    let rows: Vec<Vec<String>> = doc
        .select(&row_sel)
        .map(|r| {
            r.select(&td)
                .map(|c| c.text().collect::<String>())
                .collect()
        })
        .collect();
    assert_eq!(rows.len(), want.len());
    for (row, w) in rows.iter().zip(&want) {
        assert_eq!(row[0], w["model"].as_str().unwrap());
        assert_eq!(row[1], w["family"].as_str().unwrap());
        assert_eq!(row[2], w["questions"].to_string());
        assert_eq!(row[3], w["yes"].to_string());
        assert_eq!(row[4], w["corpus_yes"].to_string());
        let f = |k: &str| w[k].as_f64().map_or("–".to_string(), |x| format!("{x:.3}"));
        assert_eq!(row[5], f("agreement"));
        assert_eq!(row[6], f("kappa"));
    }
    // The directed family: fertiliser runoff → algae blooms is stated (15 claims in the invented
    // demo), so the corpus says yes there and the model's yes agrees.
    assert!(rows.iter().any(|r| r[1] == "directed" && r[4] != "0"));
}
