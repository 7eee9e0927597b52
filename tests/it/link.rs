//! `link`: part stores, each a `scan` of some of the files, joined into one store, answer every
//! query byte for byte as one scan of all the files; a re-scan of the linked store after a file
//! changed and another was deleted answers as a fresh scan; parts that cannot be joined are
//! refused naming them, and nothing is left behind. The documents are eLife articles
//! (../shared/data/elife-articles, see its SOURCE.txt).

use crate::common::*;
use std::path::{Path, PathBuf};

/// `hearsay --store part -q scan FILE...`.
fn scan_part(part: &Path, files: &[PathBuf]) {
    succeeded(
        hearsay()
            .arg("--store")
            .arg(part)
            .args(["-q", "scan"])
            .args(files),
    );
}

/// `hearsay --store out link PART...`, its output.
fn link(out: &Path, parts: &[&Path]) -> std::process::Output {
    hearsay()
        .arg("--store")
        .arg(out)
        .arg("link")
        .args(parts)
        .output()
        .unwrap()
}

/// A folder of `n` eLife articles, and its files in path order.
fn articles_corpus(dir: &Path, n: usize) -> Option<(PathBuf, Vec<PathBuf>)> {
    let articles = shared_data("elife-articles/articles")?;
    let corpus = dir.join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let mut files = Vec::new();
    for p in sorted_files(&articles).iter().take(n) {
        let to = corpus.join(p.file_name().unwrap());
        std::fs::copy(p, &to).unwrap();
        files.push(to);
    }
    Some((corpus, files))
}

/// A strong relation of the store (its first `top` row) and a variable list naming its ends.
fn probe(store: &Path, dir: &Path) -> (String, String, PathBuf) {
    let top = json_lines(&["top", "-n", "1"], store);
    let x = top[0]["cause"].as_str().unwrap().to_string();
    let y = top[0]["effect"].as_str().unwrap().to_string();
    let vars = dir.join("vars.txt");
    std::fs::write(&vars, format!("{x}\n{y}\ncells\n")).unwrap();
    (x, y, vars)
}

fn assert_same_answers(a: &Path, b: &Path, probe: &(String, String, PathBuf)) {
    let (x, y, vars) = probe;
    let (a, b) = (every_answer(a, x, y, vars), every_answer(b, x, y, vars));
    assert!(a.iter().any(|(q, out)| q == "claims" && out.len() > 10_000));
    if let Some(d) = first_different_answer(&a, &b) {
        panic!("{d}");
    }
}

#[test]
fn parts_linked_in_any_order_answer_as_one_scan_and_rescan_as_one() {
    let tmp = tempfile::tempdir().unwrap();
    let Some((corpus, files)) = articles_corpus(tmp.path(), 12) else {
        return;
    };
    let scanned = tmp.path().join("scanned");
    scan_quietly(&scanned, &corpus);
    // Three parts of uneven size, the files interleaved, linked in shuffled order.
    let parts: Vec<PathBuf> = (0..3)
        .map(|i| tmp.path().join(format!("part-{i}")))
        .collect();
    let picks: [Vec<PathBuf>; 3] = [
        files.iter().step_by(3).cloned().collect(),
        files.iter().skip(1).step_by(3).cloned().collect(),
        files.iter().skip(2).step_by(3).cloned().collect(),
    ];
    for (part, files) in parts.iter().zip(&picks) {
        scan_part(part, files);
    }
    let part_claims: Vec<_> = parts.iter().map(|p| json_lines(&["claims"], p)).collect();
    let linked = tmp.path().join("linked");
    let o = link(&linked, &[&parts[2], &parts[0], &parts[1]]);
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(o.status.success(), "{err}");
    assert!(
        err.contains("12 files") && err.contains("3 segments"),
        "{err}"
    );
    let p = probe(&scanned, tmp.path());
    assert_same_answers(&linked, &scanned, &p);
    // A linked store is a part like any other: a reduce in two rounds gives the same store.
    let (round1, round2) = (tmp.path().join("round-1"), tmp.path().join("round-2"));
    let o = link(&round1, &[&parts[1], &parts[0]]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let o = link(&round2, &[&parts[2], &round1]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    assert_same_answers(&round2, &scanned, &p);

    // The linked store is an ordinary store: change the file that states the top relation
    // first, delete another, scan the folder again; a fresh scan must answer the same.
    let claims = json_lines(&["claims", "--cause", &p.0], &linked);
    let changed = PathBuf::from(claims[0]["source"]["path"].as_str().unwrap());
    let gone = files.iter().find(|f| **f != changed).unwrap();
    std::thread::sleep(std::time::Duration::from_millis(20));
    let mut text = std::fs::read_to_string(&changed).unwrap();
    text = text.replacen(&p.0, "the weather", 1);
    text.push_str(&format!(
        "\n\nIn this account {} does not reduce {}.\n",
        p.0, p.1
    ));
    std::fs::write(&changed, text).unwrap();
    std::fs::remove_file(gone).unwrap();
    let again = json_lines(&["scan", corpus.to_str().unwrap()], &linked).remove(0);
    assert_eq!(
        (
            again["files_read"].as_u64(),
            again["files_removed"].as_u64()
        ),
        (Some(1), Some(1)),
        "{again}"
    );
    let fresh = tmp.path().join("fresh");
    scan_quietly(&fresh, &corpus);
    assert_same_answers(&linked, &fresh, &p);
    // The parts are untouched by all this (their files are hard-linked, never rewritten).
    for (part, before) in parts.iter().zip(&part_claims) {
        assert_eq!(&json_lines(&["claims"], part), before, "{}", part.display());
    }
}

#[test]
fn parts_that_cannot_be_joined_are_refused_naming_them() {
    let tmp = tempfile::tempdir().unwrap();
    let Some((_corpus, files)) = articles_corpus(tmp.path(), 4) else {
        return;
    };
    let (a, b, c) = (
        tmp.path().join("a"),
        tmp.path().join("b"),
        tmp.path().join("c"),
    );
    scan_part(&a, &files[0..2]);
    scan_part(&b, &files[1..3]);
    scan_part(&c, &files[3..4]);
    let out = tmp.path().join("out");
    let refused = |parts: &[&Path], out: &Path| -> String {
        let o = link(out, parts);
        assert_eq!(o.status.code(), Some(2), "{parts:?} were linked");
        String::from_utf8_lossy(&o.stderr).into_owned()
    };
    let name = |p: &Path| p.to_str().unwrap().to_string();

    // A file in two parts: both parts and the file are named.
    let err = refused(&[&a, &b], &out);
    assert!(
        err.contains(&format!("part {}", name(&b)))
            && err.contains(&name(&a))
            && err.contains(files[1].file_name().unwrap().to_str().unwrap()),
        "{err}"
    );
    assert!(!out.exists(), "a refused link left {}", out.display());

    // Scanned with other patterns: both parts are named.
    let pats = tmp.path().join("patterns");
    std::fs::create_dir_all(pats.join("cues")).unwrap();
    std::fs::copy(
        root().join("patterns/cues/causal-verbs.toml"),
        pats.join("cues/causal-verbs.toml"),
    )
    .unwrap();
    let other = tmp.path().join("other");
    succeeded(
        hearsay()
            .arg("--store")
            .arg(&other)
            .arg("--patterns")
            .arg(&pats)
            .args(["-q", "scan"])
            .arg(&files[2]),
    );
    let err = refused(&[&a, &other], &out);
    assert!(
        err.contains(&format!("part {}", name(&other)))
            && err.contains(&name(&a))
            && err.contains("patterns"),
        "{err}"
    );

    // Not a store; given twice.
    let empty = tmp.path().join("empty");
    std::fs::create_dir_all(&empty).unwrap();
    let err = refused(&[&a, &empty], &out);
    assert!(
        err.contains(&format!("part {}", name(&empty))) && err.contains("not a store"),
        "{err}"
    );
    let err = refused(&[&a, &c, &a], &out);
    assert!(err.contains("given twice"), "{err}");

    // Locked by a scan that is writing it.
    let held = std::fs::File::create(c.join("lock")).unwrap();
    held.try_lock().unwrap();
    let err = refused(&[&a, &c], &out);
    assert!(
        err.contains(&format!("part {}", name(&c))) && err.contains("locked"),
        "{err}"
    );
    drop(held);
    assert!(!out.exists(), "a refused link left {}", out.display());

    // Into a store that holds files: refused, and that store still answers as before.
    let before = json_lines(&["claims"], &a);
    let err = refused(&[&c], &a);
    assert!(err.contains("new store"), "{err}");
    assert_eq!(json_lines(&["claims"], &a), before);

    // The refusals left nothing behind: the same parts link now.
    let o = link(&out, &[&a, &c]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let scanned = tmp.path().join("scanned");
    scan_part(
        &scanned,
        &[files[0].clone(), files[1].clone(), files[3].clone()],
    );
    let p = probe(&scanned, tmp.path());
    assert_same_answers(&out, &scanned, &p);
}
