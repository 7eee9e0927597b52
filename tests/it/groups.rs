//! Construction sets: one file per group of causal constructions in `tests/data/groups/`, each
//! sentence with the claims a careful reader takes from it (cause, effect, sign, modality and,
//! where the sentence names one, who said it), or "none". The sentences are invented test data
//! (tests/data/README.md) in several domains; they check that whole constructions work, not
//! single sentences, and are not an external measure of quality (that is `hearsay eval` on the
//! shared datasets, tests/it/quality.rs).
//!
//! An item is right when the extractor gives exactly the expected claims: the same number, each
//! with the same cause and effect keys (compared after the ordinary key normalisation), sign,
//! modality and attribution. Run with `--nocapture` to see the table and every miss.

use crate::common::*;
use hearsay::extract::{sentence_attempts, Extractor};
use hearsay::patterns::PatternSet;
use hearsay::Claim;
use std::collections::BTreeMap;

#[derive(Debug)]
struct Expected {
    cause: String,
    effect: String,
    polarity: String,
    modality: String,
    by: Option<String>,
}

struct Item {
    line: usize,
    sentence: String,
    claims: Vec<Expected>,
}

fn parse_group(path: &std::path::Path) -> Vec<Item> {
    let text = std::fs::read_to_string(path).unwrap();
    let mut items = Vec::new();
    for (n, line) in text.lines().enumerate() {
        if line.trim().is_empty() || line.starts_with('#') {
            continue;
        }
        let (sentence, want) = line
            .split_once('\t')
            .unwrap_or_else(|| panic!("{}:{}: no tab", path.display(), n + 1));
        let claims = if want.trim() == "none" {
            Vec::new()
        } else {
            want.split(" | ")
                .map(|c| {
                    let parts: Vec<&str> = c.split(" ; ").map(str::trim).collect();
                    assert!(
                        parts.len() >= 3,
                        "{}:{}: want 'cause > effect ; sign ; modality'",
                        path.display(),
                        n + 1
                    );
                    let (cause, effect) = parts[0]
                        .split_once(" > ")
                        .unwrap_or_else(|| panic!("{}:{}: no ' > '", path.display(), n + 1));
                    Expected {
                        cause: cause.into(),
                        effect: effect.into(),
                        polarity: parts[1].into(),
                        modality: parts[2].into(),
                        by: parts
                            .get(3)
                            .and_then(|p| p.strip_prefix("by="))
                            .map(str::to_string),
                    }
                })
                .collect()
        };
        items.push(Item {
            line: n + 1,
            sentence: sentence.into(),
            claims,
        });
    }
    items
}

/// Whether the claims found are exactly the expected ones; else what differs.
fn judge(ex: &Extractor, item: &Item, found: &[Claim]) -> Result<(), String> {
    let show = |c: &Claim| {
        format!(
            "{} > {} ; {} ; {}{}",
            c.cause.key,
            c.effect.key,
            c.polarity,
            c.modality,
            c.attribution
                .as_deref()
                .map(|a| format!(" ; by={a}"))
                .unwrap_or_default()
        )
    };
    let all = || found.iter().map(show).collect::<Vec<_>>().join(" | ");
    if found.len() != item.claims.len() {
        return Err(format!(
            "{} claim(s) found, {} expected: [{}]",
            found.len(),
            item.claims.len(),
            all()
        ));
    }
    for e in &item.claims {
        let (ck, ek) = (ex.normalizer.key(&e.cause), ex.normalizer.key(&e.effect));
        let hit = found
            .iter()
            .find(|c| c.cause.key == ck && c.effect.key == ek);
        let Some(c) = hit else {
            return Err(format!("no claim {ck} > {ek}: [{}]", all()));
        };
        let by = c.attribution.as_deref().map(str::to_lowercase);
        if c.polarity.as_str() != e.polarity
            || c.modality.as_str() != e.modality
            || by != e.by.as_ref().map(|b| b.to_lowercase())
        {
            return Err(format!(
                "{ck} > {ek}: want {} ; {}{}, found [{}]",
                e.polarity,
                e.modality,
                e.by.as_deref()
                    .map(|b| format!(" ; by={b}"))
                    .unwrap_or_default(),
                show(c)
            ));
        }
    }
    Ok(())
}

/// Each group's least share of items right: 0.9 in every group (the lowest measured, groups 4
/// and 8, are at 0.90 and 0.91); the overall share must be 0.9 or more as well.
const FLOORS: &[(&str, f64)] = &[
    ("01-directional-verbs", 0.9),
    ("02-hedged", 0.9),
    ("03-questions", 0.9),
    ("04-coordination", 0.9),
    ("05-attribution", 0.9),
    ("06-signed-connectives", 0.9),
    ("07-other-senses", 0.9),
    ("08-causal-questions", 0.9),
    ("09-slots", 0.9),
    ("10-no-effect", 0.9),
];

#[test]
fn construction_groups_give_the_expected_claims() {
    let set = PatternSet::load(None).unwrap();
    let ex = Extractor::new(&set).unwrap();
    let dir = root().join("tests/data/groups");
    let mut scores: BTreeMap<String, (usize, usize)> = BTreeMap::new();
    let mut misses = Vec::new();
    for (name, _) in FLOORS {
        let path = dir.join(format!("{name}.tsv"));
        let items = parse_group(&path);
        assert!(items.len() >= 20, "{name}: {} items", items.len());
        let s = scores.entry(name.to_string()).or_default();
        for item in &items {
            let (claims, _) = sentence_attempts(&ex, &item.sentence);
            s.1 += 1;
            match judge(&ex, item, &claims) {
                Ok(()) => s.0 += 1,
                Err(why) => misses.push(format!(
                    "{name}.tsv:{}: {}\n    {why}",
                    item.line, item.sentence
                )),
            }
        }
    }
    let (mut right, mut total) = (0, 0);
    eprintln!("group                      right  items  accuracy");
    for (name, (r, t)) in &scores {
        eprintln!("{name:<26} {r:>5}  {t:>5}  {:.3}", *r as f64 / *t as f64);
        right += r;
        total += t;
    }
    let overall = right as f64 / total as f64;
    eprintln!("{:<26} {right:>5}  {total:>5}  {overall:.3}", "all");
    for m in &misses {
        eprintln!("{m}");
    }
    for (name, floor) in FLOORS {
        let (r, t) = scores[*name];
        let acc = r as f64 / t as f64;
        assert!(acc >= *floor, "{name}: {acc:.3} < {floor}");
    }
    assert!(overall >= 0.9, "all groups: {overall:.3} < 0.9");
}

/// `hearsay explain` answers for a sentence with no claim in every output format, and names the
/// stage that stopped it: no cue word, cue words with no pattern around them, or a cue that
/// matched and the rule that dropped it.
#[test]
fn explain_answers_for_every_sentence_without_a_claim() {
    let path = root().join("tests/data/groups/11-explain.tsv");
    let text = std::fs::read_to_string(&path).unwrap();
    let items: Vec<(usize, &str, &str)> = text
        .lines()
        .enumerate()
        .filter(|(_, l)| !l.starts_with('#') && !l.trim().is_empty())
        .map(|(n, l)| {
            let (s, w) = l.split_once('\t').unwrap();
            (n + 1, s, w.trim())
        })
        .collect();
    assert!(items.len() >= 20);
    let mut right = 0;
    for (n, sentence, want) in &items {
        let out = succeeded(hearsay().args(["--format", "json", "explain", sentence]));
        let rows: Vec<serde_json::Value> = String::from_utf8_lossy(&out.stdout)
            .lines()
            .map(|l| serde_json::from_str(l).unwrap())
            .collect();
        assert!(!rows.is_empty(), "11-explain.tsv:{n}: JSON printed nothing");
        assert!(
            rows.iter().all(|r| r["claim"].is_null()),
            "11-explain.tsv:{n}: {sentence} gave a claim: {rows:?}"
        );
        // Every row says why in words.
        assert!(rows
            .iter()
            .all(|r| r["rejected"].as_str().is_some_and(|w| !w.is_empty())));
        let stage = rows[0]["stage"].as_str().unwrap_or_default();
        if stage == *want {
            right += 1;
        } else {
            eprintln!("11-explain.tsv:{n}: {sentence}: stage {stage}, expected {want}: {rows:?}");
        }
    }
    eprintln!("11-explain: {right} of {} stages as expected", items.len());
    assert!(right as f64 / items.len() as f64 >= 0.9);
    // The other formats answer too: one sentence of each stage.
    for stage in ["no-cue", "no-pattern", "rejected"] {
        let (_, sentence, _) = items.iter().find(|(_, _, w)| *w == stage).unwrap();
        let csv = succeeded(hearsay().args(["--format", "csv", "explain", sentence]));
        let csv = String::from_utf8_lossy(&csv.stdout);
        let mut reader = csv::Reader::from_reader(csv.as_bytes());
        let rec = reader.records().next().expect("a CSV row").unwrap();
        assert_eq!(&rec[0], stage, "{csv}");
        assert!(!rec[10].is_empty(), "{csv}");
        let table = succeeded(hearsay().args(["--format", "table", "explain", sentence]));
        assert!(!table.stdout.is_empty(), "table output for {sentence}");
    }
}
