//! `hearsay variables` and the helpful misses of `pair` and `claims`, run through the binary.
//! The demo store checks the wiring (ids, forms, sorting, formats, the alias file going back in
//! through `--aliases`); the algorithms themselves are checked against hand-labelled real text in
//! their own modules (`variables::abbrev`, `variables::heads`).

use crate::common::*;
use std::path::Path;

fn run(store: &Path, args: &[&str]) -> std::process::Output {
    hearsay()
        .arg("--store")
        .arg(store)
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn variables_lists_forms_heads_and_readable_ids() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let rows = json_lines(&["variables", "-n", "0"], &store);
    assert!(rows.len() >= 10, "{rows:?}");
    let algae = rows.iter().find(|r| r["id"] == "algae-blooms").unwrap();
    assert_eq!(algae["label"], "algae blooms");
    assert_eq!(algae["head"], "algae blooms");
    // Forms that differ only in case are one form; their counts add up to the mentions.
    let forms = algae["forms"].as_array().unwrap();
    let total: u64 = forms.iter().map(|f| f[1].as_u64().unwrap()).sum();
    assert_eq!(total, algae["mentions"].as_u64().unwrap());
    // Sorted by mentions by default, by degree when asked.
    let m: Vec<u64> = rows
        .iter()
        .map(|r| r["mentions"].as_u64().unwrap())
        .collect();
    assert!(m.windows(2).all(|w| w[0] >= w[1]), "{m:?}");
    let by_degree = json_lines(&["variables", "--sort", "degree", "-n", "0"], &store);
    let d: Vec<u64> = by_degree
        .iter()
        .map(|r| r["degree"].as_u64().unwrap())
        .collect();
    assert!(d.windows(2).all(|w| w[0] >= w[1]), "{d:?}");
    // Ids are unique.
    let ids: std::collections::BTreeSet<&str> =
        rows.iter().map(|r| r["id"].as_str().unwrap()).collect();
    assert_eq!(ids.len(), rows.len());
    // A text filter keeps the variables that mention it.
    let some = json_lines(&["variables", "oxygen"], &store);
    assert!(!some.is_empty());
    assert!(some
        .iter()
        .all(|r| r["label"].as_str().unwrap().contains("oxygen")));
    // CSV has the documented header.
    let csv = run(&store, &["--format", "csv", "variables", "-n", "2"]);
    let text = String::from_utf8_lossy(&csv.stdout);
    assert!(
        text.starts_with(
            "id,label,mentions,documents,degree,head,qualifiers,forms,abbreviations\n"
        ),
        "{text}"
    );
}

#[test]
fn suggested_aliases_go_back_in_through_aliases() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let merges = json_lines(&["variables", "--merges", "-n", "0"], &store);
    // The demo's near duplicate: a clause-long variable and its shorter form.
    let m = merges
        .iter()
        .find(|m| m["reason"] == "near-duplicate")
        .unwrap_or_else(|| panic!("no near-duplicate suggestion in {merges:?}"));
    let (from, into) = (m["from"].as_str().unwrap(), m["into"].as_str().unwrap());
    let (from_label, into_label) = (
        m["from_label"].as_str().unwrap(),
        m["into_label"].as_str().unwrap(),
    );
    let file = tmp.path().join("aliases.tsv");
    let out = run(
        &store,
        &["-q", "variables", "--write-aliases", file.to_str().unwrap()],
    );
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = std::fs::read_to_string(&file).unwrap();
    // Near duplicates lose words, so they are written commented out; accept one by uncommenting.
    let commented = format!("\n# {from_label}\t{into_label}\n");
    assert!(text.contains(&commented), "{text}");
    std::fs::write(
        &file,
        text.replace(&commented, &format!("\n{from_label}\t{into_label}\n")),
    )
    .unwrap();
    let word = into_label.split_whitespace().next().unwrap();
    let before = json_lines(&["variables", word, "-n", "0"], &store);
    let after = json_lines(
        &[
            "--aliases",
            file.to_str().unwrap(),
            "variables",
            word,
            "-n",
            "0",
        ],
        &store,
    );
    let mentions = |rows: &[serde_json::Value], key: &str| {
        rows.iter()
            .find(|r| r["key"] == key)
            .map(|r| r["mentions"].as_u64().unwrap())
    };
    assert!(mentions(&after, from).is_none(), "{after:?}");
    assert_eq!(
        mentions(&after, into),
        Some(mentions(&before, into).unwrap() + mentions(&before, from).unwrap())
    );
}

#[test]
fn pair_with_an_unknown_name_suggests_the_nearest_and_exits_3() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let out = run(
        &store,
        &["--format", "json", "pair", "fish stoks", "algae blooms"],
    );
    assert_eq!(out.status.code(), Some(3));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("did you mean: fish stocks (9 claims, 5 documents)"),
        "{err}"
    );
    // The report is still printed, and says the name is unknown.
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["x"]["known"], false);
    // Known names exit 0.
    let ok = run(
        &store,
        &["--format", "json", "pair", "fish stocks", "algae blooms"],
    );
    assert_eq!(ok.status.code(), Some(0));
    let out = run(&store, &["claims", "--cause", "algal bloom"]);
    assert_eq!(out.status.code(), Some(3));
    assert!(String::from_utf8_lossy(&out.stderr).contains("algae blooms (32 claims"));
}
