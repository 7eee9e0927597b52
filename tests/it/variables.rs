//! `hearsay variables` and the helpful misses of `pair` and `claims`, run through the binary.
//! The demo store checks the wiring (ids, forms, sorting, formats, the alias file going back in
//! through `--aliases`); the algorithms themselves are checked against hand-labelled real text in
//! their own modules (`variables::abbrev`, `variables::heads`).

use crate::common::*;
use std::path::{Path, PathBuf};

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

/// The forward claim count and level of `pair X Y` (JSON), with the extra global options.
fn forward(store: &Path, opts: &[&str], x: &str, y: &str) -> (u64, String) {
    let mut args: Vec<&str> = opts.to_vec();
    args.extend(["--format", "json", "pair", x, y]);
    let out = run(store, &args);
    assert!(out.status.success(), "{args:?}: {out:?}");
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let level = v["level"].as_str().unwrap_or("variable").to_string();
    (v["forward"]["claims"].as_u64().unwrap(), level)
}

/// A store of `tests/data/rollup/`: sentences of four eLife articles, copied verbatim (SOURCE:
/// ../shared/data/elife-articles/SOURCE.txt; CC BY, each article's DOI is
/// 10.7554/eLife.NNNNN for its file name; tests/data/rollup/README.md).
fn rollup_store(dir: &Path) -> (PathBuf, PathBuf) {
    let corpus = dir.join("corpus");
    copy_tree(&root().join("tests/data/rollup"), &corpus);
    std::fs::remove_file(corpus.join("README.md")).unwrap();
    let store = dir.join("store");
    scan_quietly(&store, &corpus);
    (corpus, store)
}

/// `pair` answers by abbreviation, by long form and by head at the levels `--roll-up` asks for,
/// and says which. The counts follow from the sentences: three articles define "ROS" as
/// "reactive oxygen species" (so it is an unambiguous corpus-wide short form); elife01293
/// states ROS → MEND, elife01295 ROS → "MEND in BHK cells" (head "MEND"), elife02935 states
/// "reactive oxygen species" → mitochondrial DNA mutations, elife12523 "ROS" (in "increases in
/// ROS") → activation of microglia.
#[test]
fn pair_answers_by_abbreviation_long_form_and_head() {
    let tmp = tempfile::tempdir().unwrap();
    let (_, store) = rollup_store(tmp.path());
    let (abbr, heads) = (
        &["--roll-up", "abbreviations"][..],
        &["--roll-up", "heads"][..],
    );
    // Default: each variable as extracted, and no level field.
    assert_eq!(forward(&store, &[], "ROS", "MEND"), (1, "variable".into()));
    assert_eq!(forward(&store, &[], "reactive oxygen species", "MEND").0, 0);
    assert_eq!(
        forward(&store, &[], "ROS", "mitochondrial DNA mutations").0,
        0
    );
    // elife12523's "increases in ROS did not influence ...": the span walked back from the cue
    // starts after "in" (the tagger reads "increases" as a verb), so the claim is stated with
    // "ROS" itself and counts at the default level too.
    assert_eq!(forward(&store, &[], "ROS", "activation of microglia").0, 1);
    // By abbreviation: "ROS" finds the claim stated with the long form.
    assert_eq!(
        forward(&store, abbr, "ROS", "mitochondrial DNA mutations"),
        (1, "abbreviation".into())
    );
    // By long form: "reactive oxygen species" finds the claims stated with "ROS".
    assert_eq!(
        forward(&store, abbr, "reactive oxygen species", "MEND"),
        (1, "abbreviation".into())
    );
    // By head: "MEND" also counts "MEND in BHK cells", "ROS" also "increases in ROS".
    assert_eq!(forward(&store, heads, "ROS", "MEND"), (2, "head".into()));
    assert_eq!(
        forward(&store, heads, "reactive oxygen species", "MEND"),
        (2, "head".into())
    );
    assert_eq!(
        forward(&store, heads, "ROS", "activation of microglia"),
        (1, "head".into())
    );
    // A qualified name that no article writes ("MEND in HeLa cells") is asked as its head at
    // the head level, as the stored qualified variables are; at the default level it is unknown.
    assert_eq!(
        forward(&store, heads, "ROS", "MEND in HeLa cells"),
        (2, "head".into())
    );
    let out = run(&store, &["pair", "ROS", "MEND in HeLa cells"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(3), "{err}");
    assert!(
        err.to_lowercase()
            .contains("its head \"mend\" is a variable")
            && err.contains("--roll-up heads"),
        "{err}"
    );
    // The table says the level too.
    let out = run(
        &store,
        &[
            "--roll-up",
            "heads",
            "--format",
            "table",
            "pair",
            "ROS",
            "MEND",
        ],
    );
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.starts_with("level: head"), "{text}");
}

/// The `variables --abbreviations` rows as (short, [(long, documents)]).
fn abbreviations(store: &Path) -> Vec<(String, Vec<(String, u64)>)> {
    json_lines(&["variables", "--abbreviations", "-n", "0"], store)
        .iter()
        .map(|r| {
            let longs = r["longs"]
                .as_array()
                .unwrap()
                .iter()
                .map(|l| (l[0].as_str().unwrap().to_string(), l[1].as_u64().unwrap()))
                .collect();
            (r["short"].as_str().unwrap().to_string(), longs)
        })
        .collect()
}

/// Definitions are stored per file at scan time: a re-scan drops those of a changed or deleted
/// file, and a short form defined two ways stays split, is listed with both meanings, and is
/// no longer merged. Sentences as in `pair_answers_by_abbreviation_long_form_and_head`; the
/// second meaning is elife01293's own "reactive oxygen (ROS)" (SOURCE:
/// ../shared/data/elife-articles/SOURCE.txt).
#[test]
fn rescans_keep_stored_abbreviations_per_file() {
    let tmp = tempfile::tempdir().unwrap();
    let (corpus, store) = rollup_store(tmp.path());
    let rescan = || {
        succeeded(
            hearsay()
                .arg("--store")
                .arg(&store)
                .args(["-q", "scan"])
                .arg(&corpus),
        )
    };
    let ros = |store: &Path| {
        abbreviations(store)
            .into_iter()
            .find(|(s, _)| s == "ROS")
            .map(|(_, l)| l)
            .unwrap_or_default()
    };
    assert_eq!(
        ros(&store),
        vec![("reactive oxygen species".to_string(), 3)]
    );
    // A changed file: elife12523 without its defining sentence.
    let f = corpus.join("elife12523.txt");
    let text = std::fs::read_to_string(&f).unwrap();
    let kept: Vec<&str> = text.lines().filter(|l| !l.contains("(ROS)")).collect();
    assert_eq!(kept.len(), 1);
    std::fs::write(&f, kept.join("\n") + "\n").unwrap();
    rescan();
    assert_eq!(
        ros(&store),
        vec![("reactive oxygen species".to_string(), 2)]
    );
    // A deleted file.
    std::fs::remove_file(corpus.join("elife02935.txt")).unwrap();
    rescan();
    assert_eq!(
        ros(&store),
        vec![("reactive oxygen species".to_string(), 1)]
    );
    // Two files defining PD two ways (elife08440, elife02523): both meanings are listed,
    // marked ambiguous, and the short form is not merged.
    std::fs::write(
        corpus.join("elife08440.txt"),
        "Parkinson's disease (PD) is the second most common neurodegenerative illness.\n",
    )
    .unwrap();
    std::fs::write(
        corpus.join("elife02523.txt"),
        "Pharmacodynamic (PD) markers would be useful to determine when cells are responding \
         to system xc\u{2212} inhibition, such as in response to erastin treatment.\n",
    )
    .unwrap();
    rescan();
    let pd = abbreviations(&store)
        .into_iter()
        .find(|(s, _)| s == "PD")
        .map(|(_, l)| l)
        .unwrap_or_default();
    let mut meanings: Vec<&str> = pd.iter().map(|(l, _)| l.as_str()).collect();
    meanings.sort();
    assert_eq!(meanings, ["Parkinson's disease", "Pharmacodynamic"]);
    let csv = run(
        &store,
        &["--format", "csv", "variables", "--abbreviations", "PD"],
    );
    let text = String::from_utf8_lossy(&csv.stdout);
    assert!(
        text.lines().nth(1).is_some_and(|l| l.ends_with(",true")),
        "ambiguous is marked: {text}"
    );
    let out = run(
        &store,
        &[
            "--roll-up",
            "abbreviations",
            "--format",
            "json",
            "pair",
            "PD",
            "ROS",
        ],
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["x"]["key"], "pd", "an ambiguous short form stays itself");
    // ROS is now defined in one document only: no longer a corpus-wide alias.
    assert_eq!(v["y"]["key"], "ros");
    // Each commit replaced the vocabulary file of the generation before.
    let vocabularies: Vec<String> = std::fs::read_dir(&store)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with("vocabulary-"))
        .collect();
    assert_eq!(vocabularies, ["vocabulary-000004.json.zst"]);
}
