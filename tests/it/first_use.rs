//! What a new user meets first: outputs that say when they leave something out, hints on a miss,
//! one sign for an edge in every command, help texts that fit the command and the demo corpus,
//! and grammar. The demo corpus is invented (corpora-demo/EXPECTED.md lists what it states).

use crate::common::*;
use std::collections::HashMap;

fn stdout(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

fn table(store: &std::path::Path, args: &[&str]) -> std::process::Output {
    succeeded(
        hearsay()
            .arg("--store")
            .arg(store)
            .args(["--format", "table"])
            .args(args),
    )
}

#[test]
fn graph_as_a_table_is_written_to_the_output_file() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let file = tmp.path().join("edges.txt");
    let out = succeeded(
        hearsay()
            .arg("--store")
            .arg(&store)
            .args(["--format", "table", "graph", "--min-docs", "3", "-o"])
            .arg(&file),
    );
    assert!(stdout(&out).is_empty(), "the table went to stdout");
    let written = std::fs::read_to_string(&file).expect("the file is written");
    assert!(written.starts_with("cause "), "{written}");
    assert!(written.contains("fertiliser runoff"), "{written}");
}

#[test]
fn csv_nodes_file_is_named_as_the_help_says() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let help = stdout(&succeeded(hearsay().args(["graph", "--help"])));
    assert!(help.contains("edges.nodes.csv"), "{help}");
    succeeded(
        hearsay()
            .arg("--store")
            .arg(&store)
            .args(["--format", "csv", "graph", "-o"])
            .arg(tmp.path().join("edges.csv")),
    );
    assert!(tmp.path().join("edges.nodes.csv").is_file());
}

#[test]
fn pair_says_how_many_claims_its_evidence_leaves_out() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let json = &json_lines(&["pair", "fertiliser runoff", "algae blooms"], &store)[0];
    let claims = json["forward"]["claims"].as_u64().unwrap();
    let text = stdout(&table(
        &store,
        &[
            "pair",
            "fertiliser runoff",
            "algae blooms",
            "--evidence",
            "2",
        ],
    ));
    let note = format!(
        "+ {} more fertiliser runoff → algae blooms claims not shown ({claims} in all",
        claims - 2
    );
    assert!(text.contains(&note), "no {note:?} in:\n{text}");
    // Everything shown: no note.
    let all = claims.to_string();
    let text = stdout(&table(
        &store,
        &[
            "pair",
            "fertiliser runoff",
            "algae blooms",
            "--evidence",
            &all,
        ],
    ));
    assert!(!text.contains(" more "), "{text}");
}

#[test]
fn claims_notes_a_name_that_is_no_variable() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["--format", "json", "claims", "--var", "fish stoks"])
        .output()
        .unwrap();
    // A name that is no variable has its own exit status (3), so a script can tell it apart.
    assert_eq!(out.status.code(), Some(3));
    assert!(stdout(&out).is_empty(), "JSON output stays data only");
    let err = stderr(&out);
    assert!(err.contains("no variable \"fish stoks\""), "{err}");
    // The nearest variable, with its counts.
    assert!(
        err.contains("did you mean: fish stocks (9 claims, 5 documents)"),
        "{err}"
    );
    // A name that is a variable gives no note.
    let out = table(&store, &["claims", "--var", "fish stocks"]);
    assert!(stderr(&out).is_empty(), "{}", stderr(&out));
}

#[test]
fn top_columns_add_up_to_the_claims() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let rows = json_lines(&["top", "-n", "0"], &store);
    assert!(!rows.is_empty());
    for r in &rows {
        let n = |k: &str| r[k].as_u64().unwrap_or_else(|| panic!("no {k} in {r}"));
        assert_eq!(
            n("claims"),
            n("asserted") + n("hedged") + n("negated") + n("conditional") + n("question"),
            "{r}"
        );
    }
}

/// The edge that read "unsigned" in `top` and "increase" in `paths` (docs/graph.md, "The sign
/// of an edge"): now one sign in both, for every hop of every chain.
#[test]
fn top_and_paths_give_an_edge_the_same_sign() {
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let top: HashMap<(String, String), String> = json_lines(&["top", "-n", "0"], &store)
        .iter()
        .filter(|r| r["kind"] == "causal")
        .map(|r| {
            (
                (r["cause"].to_string(), r["effect"].to_string()),
                r["sign"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    let runoff = &top[&("\"fertiliser runoff\"".into(), "\"algae blooms\"".into())];
    assert_eq!(runoff, "increase");
    let mut hops = 0;
    for (x, y) in [
        ("fertiliser runoff", "tourism revenue"),
        ("boat traffic", "water clarity"),
    ] {
        for chain in json_lines(&["paths", x, y, "--max-hops", "3"], &store) {
            for h in chain["hops"].as_array().unwrap() {
                let key = (h["cause_label"].to_string(), h["effect_label"].to_string());
                assert_eq!(
                    Some(h["sign"].as_str().unwrap()),
                    top.get(&key).map(|s| s.as_str()),
                    "{h}"
                );
                hops += 1;
            }
        }
    }
    assert!(hops >= 2, "the demo corpus has chains");
}

#[test]
fn read_options_show_only_on_the_commands_that_read_files() {
    for cmd in ["scan", "extract"] {
        let help = stdout(&succeeded(hearsay().args([cmd, "--help"])));
        assert!(help.contains("--text-field"), "{cmd}: {help}");
    }
    for cmd in ["top", "pair", "graph", "report", "claims"] {
        let help = stdout(&succeeded(hearsay().args([cmd, "--help"])));
        assert!(!help.contains("--input-format"), "{cmd}: {help}");
    }
    let help = stdout(&succeeded(hearsay().arg("--help")));
    assert!(!help.contains("--text-field"), "{help}");
    // Still accepted before the subcommand, as earlier versions took them, and after it.
    for args in [
        &["--input-format", "text", "extract", "-"][..],
        &["extract", "--input-format", "text", "-"][..],
    ] {
        let out = succeeded(
            hearsay()
                .args(args)
                .write_stdin("Drought reduces crop yields.\n"),
        );
        assert!(stdout(&out).contains("\"crop yields\""), "{args:?}");
    }
}

#[test]
fn one_claim_is_not_written_as_claims() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("c");
    std::fs::create_dir_all(&corpus).unwrap();
    std::fs::write(corpus.join("a.txt"), "Drought reduces crop yields.\n").unwrap();
    let store = tmp.path().join("store");
    succeeded(
        hearsay()
            .arg("--store")
            .arg(&store)
            .arg("-q")
            .arg("scan")
            .arg(&corpus),
    );
    let text = stdout(&table(&store, &["pair", "drought", "crop yields"]));
    assert!(
        text.contains(": 1 claim in 1 document: 1 asserted"),
        "{text}"
    );
    assert!(text.contains("0 claims in 0 documents"), "{text}");
}

#[test]
fn the_typical_use_in_the_main_help_finds_claims_on_the_demo_corpus() {
    let help = stdout(&succeeded(hearsay().arg("--help")));
    let line = help
        .lines()
        .find(|l| l.starts_with("Typical use:"))
        .expect("a typical use line");
    let pair = line.split("hearsay pair ").nth(1).expect("a pair example");
    let names: Vec<&str> = pair.split('"').filter(|s| !s.trim().is_empty()).collect();
    assert_eq!(names.len(), 2, "{line}");
    let tmp = tempfile::tempdir().unwrap();
    let store = demo_store_in(tmp.path());
    let p = &json_lines(&["pair", names[0], names[1]], &store)[0];
    assert_eq!(
        (p["x"]["known"].as_bool(), p["y"]["known"].as_bool()),
        (Some(true), Some(true))
    );
    assert!(p["forward"]["claims"].as_u64().unwrap() > 0, "{p}");
}

#[test]
fn questions_agree_with_their_subject_in_number() {
    let tmp = tempfile::tempdir().unwrap();
    let vars = tmp.path().join("vars.txt");
    std::fs::write(&vars, "boat traffic\nalgae blooms\n").unwrap();
    let out = succeeded(
        hearsay()
            .args(["--format", "json", "questions", "--sign", "--vars"])
            .arg(&vars),
    );
    let texts: Vec<String> = stdout(&out)
        .lines()
        .map(|l| {
            serde_json::from_str::<serde_json::Value>(l).unwrap()["text"]
                .as_str()
                .unwrap()
                .to_string()
        })
        .collect();
    for q in [
        "Does boat traffic cause algae blooms?",
        "Do algae blooms cause boat traffic?",
        "Are algae blooms an effect of boat traffic?",
        "Is boat traffic an effect of algae blooms?",
        "Do algae blooms increase boat traffic?",
    ] {
        assert!(texts.iter().any(|t| t == q), "no {q:?} in {texts:?}");
    }
}
