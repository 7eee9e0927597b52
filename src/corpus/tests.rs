//! Unit tests of reading: pages, the walk, batches of a stream, sniffing.

use super::batches::read_batched_with;
use super::format::sniff;
use super::walk::IGNORE_FILE;
use super::*;
use std::path::Path;

#[test]
fn pages_are_found_by_offset() {
    let d = Document {
        path: "p".into(),
        record: None,
        text: "a".repeat(30),
        page_starts: vec![10, 20],
        lines_are_paragraphs: false,
    };
    assert_eq!(d.page_of(0), Some(1));
    assert_eq!(d.page_of(10), Some(2));
    assert_eq!(d.page_of(25), Some(3));
}

#[test]
fn walk_skips_hidden_and_ignored_files() {
    let dir = tempfile::tempdir().unwrap();
    let root = dir.path();
    std::fs::write(root.join("a.txt"), "x").unwrap();
    std::fs::write(root.join(".hidden.txt"), "x").unwrap();
    std::fs::write(root.join("b.md"), "x").unwrap();
    std::fs::write(root.join("c.bin"), "x").unwrap();
    std::fs::write(root.join("skip.txt"), "x").unwrap();
    std::fs::write(root.join(IGNORE_FILE), "skip.txt\n").unwrap();
    let (inputs, skipped) = discover(&[root.to_string_lossy().into_owned()]);
    let names: Vec<String> = inputs
        .iter()
        .map(|i| {
            Path::new(&i.label)
                .file_name()
                .unwrap()
                .to_string_lossy()
                .into_owned()
        })
        .collect();
    assert_eq!(names, ["a.txt", "b.md"]);
    assert_eq!(skipped.len(), 1);
    assert!(skipped[0].path.ends_with("c.bin"));
}

/// A JSON Lines file of `n` records, the last one broken, as an input.
fn records(dir: &Path, n: usize) -> Input {
    let mut text = String::new();
    for i in 0..n {
        text.push_str(&format!("{{\"id\": {i}, \"text\": \"record {i} text\"}}\n"));
    }
    text.push_str("{\"id\": broken\n");
    let path = dir.join("d.jsonl");
    std::fs::write(&path, text).unwrap();
    Input {
        label: path.to_string_lossy().into_owned(),
        path,
    }
}

#[test]
fn batches_hold_every_document_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let input = records(dir.path(), 1000);
    let opts = ReadOptions::default();
    assert!(streams(&input, &opts));
    let mut whole = Vec::new();
    let mut w1 = Warnings::new();
    read_input(&input, &opts, &mut w1, &mut |d| whole.push(d)).unwrap();
    assert_eq!(whole.len(), 1000);
    let mut sizes = Vec::new();
    let mut batched = Vec::new();
    let (w2, r) = read_batched_with(&input, &opts, 200, 2, true, |b| {
        sizes.push(b.len());
        batched.extend(b);
        Ok::<_, ()>(())
    })
    .unwrap();
    // The hash taken on the way is the hash of the file's bytes.
    let bytes = std::fs::read(&input.path).unwrap();
    assert_eq!(r.unwrap(), Some(blake3::hash(&bytes)));
    assert_eq!(batched, whole);
    assert_eq!(w2, w1, "the broken record is warned about once");
    assert_eq!(w2.len(), 1);
    // "record N text" is 13 to 15 bytes: 14 documents reach 200 bytes.
    assert!(sizes.len() > 60, "{sizes:?}");
    assert!(sizes[..sizes.len() - 1]
        .iter()
        .all(|&n| (13..=16).contains(&n)));
}

#[test]
fn a_failing_consumer_stops_the_batches() {
    let dir = tempfile::tempdir().unwrap();
    let input = records(dir.path(), 1000);
    let mut seen = 0;
    let r = read_batched_with(&input, &ReadOptions::default(), 200, 1, false, |_| {
        seen += 1;
        if seen == 3 {
            Err("stdout closed")
        } else {
            Ok(())
        }
    });
    assert_eq!(r.err(), Some("stdout closed"));
    assert_eq!(seen, 3);
}

#[test]
fn a_long_first_record_is_sniffed_as_json_lines() {
    let record = format!("{{\"text\": \"{}\"}}\n", "word ".repeat(5000));
    let head = &record.as_bytes()[..8192];
    assert_eq!(sniff(head, Path::new("-")), InputFormat::Jsonl);
    // A short file ending inside its JSON, or a brace that starts no JSON, is text.
    assert_eq!(
        sniff(b"{\"text\": \"open", Path::new("-")),
        InputFormat::Text
    );
    let prose = format!("{{Editor's note}} {}", "word ".repeat(5000));
    assert_eq!(
        sniff(&prose.as_bytes()[..8192], Path::new("-")),
        InputFormat::Text
    );
}
