//! Hostile and broken input, generated here: every bad file gets a warning naming it and the
//! reason, the scan completes, the good files' claims are all stored, and `--strict` turns the
//! failures into exit status 1.

use crate::common::*;
use std::io::Write;
use std::path::Path;

fn gz(data: &[u8]) -> Vec<u8> {
    let mut e = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    e.write_all(data).unwrap();
    e.finish().unwrap()
}

fn is_root() -> bool {
    std::process::Command::new("id")
        .arg("-u")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim() == "0")
        .unwrap_or(false)
}

/// Write the hostile corpus; returns the good files and (bad file, expected reason) pairs.
fn build(dir: &Path) -> (Vec<&'static str>, Vec<(&'static str, &'static str)>) {
    let w = |name: &str, data: &[u8]| std::fs::write(dir.join(name), data).unwrap();
    w("good.txt", b"Heavy rain causes flooding in the valley.\n");
    w(
        "good.md",
        b"---\ntitle: notes\n---\n# Notes\n\nDrought reduces crop yields.\n\n```\nx causes y\n```\n",
    );
    w(
        "good.html",
        b"<!doctype html><html><body><nav>Menu</nav><p>Wind erosion lowers soil depth.</p></body></html>",
    );
    w(
        "good.jsonl.zst",
        &zstd::encode_all(
            &b"{\"id\":\"r1\",\"text\":\"Late frost causes shoot dieback.\"}\n"[..],
            3,
        )
        .unwrap(),
    );
    let mut binary: Vec<u8> = (0..4096u32).map(|i| (i * 7919 % 256) as u8).collect();
    binary[10] = 0;
    w("binary.txt", &binary);
    let full = gz(&b"{\"text\":\"Heat causes drought.\"}\n".repeat(2000));
    w("truncated.jsonl.gz", &full[..full.len() / 2]);
    // 64 MiB of one byte compresses to about 64 KB; the test caps expansion at 8 MiB.
    let mut e = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    let block = vec![b'a'; 1 << 20];
    for _ in 0..64 {
        e.write_all(&block).unwrap();
    }
    w("bomb.jsonl.gz", &e.finish().unwrap());
    // A 50 MB line in a JSON Lines dump: over the record cap, skipped without being held.
    {
        let mut f = std::fs::File::create(dir.join("huge-line.jsonl")).unwrap();
        f.write_all(b"{\"text\":\"").unwrap();
        let chunk = b"word ".repeat(1 << 16);
        for _ in 0..160 {
            f.write_all(&chunk).unwrap();
        }
        f.write_all(
            b"\"}\n{\"id\":\"after\",\"text\":\"Wildfire smoke causes lung irritation.\"}\n",
        )
        .unwrap();
    }
    w(
        "nul-and-bad-utf8.txt",
        b"caf\xe9 \xff\xfe\x00 causes \x00 joy",
    );
    w(
        "broken.pdf",
        b"%PDF-1.7\n1 0 obj << /Type /Pages /Kids [2 0 R\nstartxref\n99999\n%%EOF",
    );
    let depth = 100_000;
    w(
        "deep.html",
        format!(
            "<!doctype html><html><body>{}x{}</body></html>",
            "<div>".repeat(depth),
            "</div>".repeat(depth)
        )
        .as_bytes(),
    );
    std::os::unix::fs::symlink(dir.join("loop-b.txt"), dir.join("loop-a.txt")).unwrap();
    std::os::unix::fs::symlink(dir.join("loop-a.txt"), dir.join("loop-b.txt")).unwrap();
    w("empty.txt", b"");
    w("empty.md", b"");
    w(
        "mixed.jsonl",
        b"{\"id\":1,\"text\":\"Road salt leads to bridge corrosion.\"}\n\nnot json at all\n{\"id\":3,\"body\":\"x\"}\n",
    );
    w("unreadable.txt", b"Noise causes stress.\n");
    let mut bad = vec![
        ("binary.txt", "binary file"),
        ("truncated.jsonl.gz", "corrupt or truncated compressed data"),
        ("bomb.jsonl.gz", "decompresses to more than 8388608 bytes"),
        (
            "huge-line.jsonl",
            "huge-line.jsonl:1: record over 8388608 bytes",
        ),
        ("nul-and-bad-utf8.txt", "binary file"),
        ("broken.pdf", "PDF"),
        ("deep.html", "nested deeper than"),
        ("loop-a.txt", "symbolic link"),
        ("loop-b.txt", "symbolic link"),
        ("empty.txt", "empty file"),
        ("empty.md", "empty file"),
        ("mixed.jsonl", "mixed.jsonl:2: blank line"),
        ("mixed.jsonl", "mixed.jsonl:3: not JSON"),
        ("mixed.jsonl", "mixed.jsonl:4: no string field \"text\""),
    ];
    if !is_root() {
        // Root reads any file whatever its mode, so this case only bites for other users.
        std::fs::set_permissions(
            dir.join("unreadable.txt"),
            std::os::unix::fs::PermissionsExt::from_mode(0o000),
        )
        .unwrap();
        bad.push(("unreadable.txt", "ermission denied"));
    }
    (
        vec!["good.txt", "good.md", "good.html", "good.jsonl.zst"],
        bad,
    )
}

#[test]
fn hostile_corpus_costs_only_its_bad_files() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let (good, bad) = build(&corpus);
    let store = tmp.path().join("store");
    let run = |strict: bool| {
        let mut c = hearsay();
        c.arg("--store")
            .arg(&store)
            .args([
                "--format",
                "json",
                "--max-decompressed",
                "8M",
                "--max-record",
                "8M",
            ])
            .arg("scan")
            .arg(&corpus);
        if strict {
            c.arg("--strict");
        }
        c.output().unwrap()
    };
    let out = run(false);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{stderr}");
    for (file, reason) in &bad {
        assert!(
            stderr
                .lines()
                .any(|l| l.contains(&file.to_string()) && l.contains(reason)),
            "no warning for {file} ({reason}) in:\n{stderr}"
        );
    }
    let summary: serde_json::Value =
        serde_json::from_slice(out.stdout.split(|&b| b == b'\n').next().unwrap()).unwrap();
    let failed: Vec<String> = summary["failed"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["path"].as_str().unwrap().to_string())
        .collect();
    for f in [
        "binary.txt",
        "truncated.jsonl.gz",
        "bomb.jsonl.gz",
        "broken.pdf",
        "deep.html",
    ] {
        assert!(
            failed.iter().any(|p| p.ends_with(f)),
            "{f} not failed: {summary}"
        );
    }
    assert_eq!(summary["files_skipped"], 2, "{summary}");
    assert!(summary["files_read"].as_u64().unwrap() >= 8, "{summary}");

    let claims = json_lines(&["claims"], &store);
    let paths: Vec<String> = claims
        .iter()
        .map(|c| c["source"]["path"].as_str().unwrap().to_string())
        .collect();
    for g in &good {
        assert!(
            paths.iter().any(|p| p.ends_with(g)),
            "no claim from {g}: {paths:?}"
        );
    }
    // Records after a bad line are read, with their ids.
    let records: Vec<&str> = claims
        .iter()
        .filter_map(|c| c["source"]["record"].as_str())
        .collect();
    for r in ["r1", "after", "1"] {
        assert!(records.contains(&r), "record {r} missing: {records:?}");
    }

    // The same corpus under --strict fails (the store was replaced by a fresh one).
    std::fs::remove_dir_all(&store).unwrap();
    assert_eq!(run(true).status.code(), Some(1));
}

/// The issue's "done when": a mixed folder (a groff-built PDF, an encrypted copy of it, HTML,
/// Markdown, text, JSON Lines in zstd, and the hostile cases) scans to completion; the summary
/// names each bad file with its reason; `claims` and `pair` show the page of PDF claims and the
/// record id of JSON Lines claims.
#[test]
fn mixed_folder_keeps_good_files_and_shows_pages_and_record_ids() {
    if !crate::readers_generated::tools() || !external_tool("qpdf", "qpdf") {
        return;
    }
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let (_, bad) = build(&corpus);
    let pdf = crate::readers_generated::build_pdf(tmp.path());
    std::fs::copy(&pdf, corpus.join("lake.pdf")).unwrap();
    let st = std::process::Command::new("qpdf")
        .args(["--encrypt", "reader-pw", "owner-pw", "256", "--"])
        .arg(&pdf)
        .arg(corpus.join("locked.pdf"))
        .status()
        .unwrap();
    assert!(st.success());
    let store = tmp.path().join("store");
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args([
            "--format",
            "json",
            "--max-decompressed",
            "8M",
            "--max-record",
            "8M",
            "scan",
        ])
        .arg(&corpus)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{stderr}");
    let summary: serde_json::Value =
        serde_json::from_slice(out.stdout.split(|&b| b == b'\n').next().unwrap()).unwrap();
    let listed: Vec<(String, String)> = ["failed", "skipped"]
        .iter()
        .flat_map(|k| summary[k].as_array().unwrap().clone())
        .map(|f| {
            (
                f["path"].as_str().unwrap().to_string(),
                f["reason"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    let in_summary = |file: &str, reason: &str| {
        listed
            .iter()
            .any(|(p, r)| p.ends_with(file) && r.contains(reason))
    };
    assert!(in_summary("locked.pdf", "encrypted"), "{summary}");
    for (file, reason) in &bad {
        // Per-record JSON Lines warnings and empty files are warnings, not failed files.
        if file.ends_with(".jsonl") || file.starts_with("empty") || *file == "unreadable.txt" {
            continue;
        }
        assert!(
            in_summary(file, reason),
            "{file} ({reason}) not in the summary: {summary}"
        );
    }

    let claims = json_lines(&["claims"], &store);
    for g in [
        "good.txt",
        "good.md",
        "good.html",
        "good.jsonl.zst",
        "lake.pdf",
    ] {
        assert!(
            claims
                .iter()
                .any(|c| c["source"]["path"].as_str().unwrap().ends_with(g)),
            "no claim from {g}"
        );
    }
    let on_page_2 = claims
        .iter()
        .find(|c| c["source"]["page"] == 2)
        .expect("a PDF claim on page 2");
    let table = String::from_utf8(
        hearsay()
            .arg("--store")
            .arg(&store)
            .args(["--format", "table", "claims"])
            .output()
            .unwrap()
            .stdout,
    )
    .unwrap();
    assert!(
        table
            .lines()
            .any(|l| l.contains("lake.pdf:") && l.contains("(p. 2)")),
        "{table}"
    );
    let pair = |x: &str, y: &str| {
        let out = hearsay()
            .arg("--store")
            .arg(&store)
            .args(["--format", "table", "pair", x, y])
            .output()
            .unwrap();
        assert!(out.status.success());
        String::from_utf8(out.stdout).unwrap()
    };
    let p = pair(
        on_page_2["cause"]["text"].as_str().unwrap(),
        on_page_2["effect"]["text"].as_str().unwrap(),
    );
    assert!(
        p.lines()
            .any(|l| l.contains("lake.pdf:") && l.contains("p. 2")),
        "{p}"
    );
    let p = pair("late frost", "shoot dieback");
    assert!(
        p.lines()
            .any(|l| l.contains("good.jsonl.zst:") && l.contains("[r1]")),
        "{p}"
    );
}

/// Run a scan to its end or fail the test after `limit`: a scan that waits on a named pipe, or
/// works on a long line for ever, must not hang the suite.
fn scan_within(
    args: &[&std::ffi::OsStr],
    limit: std::time::Duration,
) -> (Option<i32>, String, String) {
    use std::io::Read;
    let mut child = std::process::Command::new(assert_cmd::cargo::cargo_bin("hearsay"))
        .current_dir(root())
        .env_remove("HEARSAY_STORE")
        .args(args)
        .stdin(std::process::Stdio::null())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let (mut out, mut err) = (child.stdout.take().unwrap(), child.stderr.take().unwrap());
    let reader = std::thread::spawn(move || {
        let mut s = String::new();
        out.read_to_string(&mut s).unwrap();
        s
    });
    let mut stderr = String::new();
    let started = std::time::Instant::now();
    let status = loop {
        if let Some(s) = child.try_wait().unwrap() {
            break s;
        }
        if started.elapsed() > limit {
            let _ = child.kill();
            let _ = child.wait();
            err.read_to_string(&mut stderr).unwrap();
            panic!("the scan did not finish within {limit:?}; stderr:\n{stderr}");
        }
        std::thread::sleep(std::time::Duration::from_millis(50));
    };
    err.read_to_string(&mut stderr).unwrap();
    (status.code(), reader.join().unwrap(), stderr)
}

/// The bad files the corpus above leaves out, each next to good ones: a 200 MB line, text that
/// is not UTF-8, NUL bytes, a real paper's PDF cut short, a zstd bomb, and named pipes (in the
/// folder and given by name). Each bad file gets a warning naming it and the reason, the good
/// files' claims are stored, nothing panics and nothing hangs.
#[test]
fn more_bad_files_are_each_named_with_their_reason_and_none_hangs() {
    // A real paper (../shared/data/real-documents, see its SOURCE.txt), cut at 60%.
    let Some(pdf) = shared_data("real-documents/pdf/bmc-hsr_quality-improvement-malawi.pdf") else {
        return;
    };
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("corpus");
    std::fs::create_dir_all(&dir).unwrap();
    let w = |name: &str, data: &[u8]| std::fs::write(dir.join(name), data).unwrap();
    w("good.txt", b"Heavy rain causes flooding in the valley.\n");
    // windows-1252 bytes that are not UTF-8: read as Latin-1, with a warning.
    w("latin1.txt", b"Caf\xe9 cr\xe8me causes weight gain.\n");
    // Valid UTF-8 beside invalid bytes: read with replacement characters, with a warning.
    w(
        "bad-utf8.txt",
        "Drought reduces crop yields in Br\u{fc}nn \u{2014} ".as_bytes(),
    );
    std::fs::OpenOptions::new()
        .append(true)
        .open(dir.join("bad-utf8.txt"))
        .unwrap()
        .write_all(b"\xff\xfe and more.\n")
        .unwrap();
    w("nul.txt", b"Smoke causes\x00 coughing.\n");
    let paper = std::fs::read(&pdf).unwrap();
    w("cut.pdf", &paper[..paper.len() * 6 / 10]);
    // 1 GiB of one byte is about 32 KB of zstd; the cap below is 64 MiB.
    {
        let f = std::fs::File::create(dir.join("bomb.txt.zst")).unwrap();
        let mut z = zstd::stream::write::Encoder::new(f, 3).unwrap();
        let block = vec![b'a'; 1 << 20];
        for _ in 0..1024 {
            z.write_all(&block).unwrap();
        }
        z.finish().unwrap();
    }
    assert!(std::fs::metadata(dir.join("bomb.txt.zst")).unwrap().len() < 1 << 20);
    // 200 MB on one line, generated here: longer than the 64 MiB line cap (--max-record).
    {
        let mut f =
            std::io::BufWriter::new(std::fs::File::create(dir.join("one-line.txt")).unwrap());
        let chunk = b"word ".repeat(1 << 18);
        for _ in 0..160 {
            f.write_all(&chunk).unwrap();
        }
        f.write_all(b"Late frost causes shoot dieback.\n").unwrap();
    }
    assert!(std::fs::metadata(dir.join("one-line.txt")).unwrap().len() > 200_000_000);
    for fifo in ["pipe.txt", "named-pipe"] {
        let st = std::process::Command::new("mkfifo")
            .arg(dir.join(fifo))
            .status()
            .unwrap();
        assert!(st.success());
    }
    let store = tmp.path().join("store");
    let named_pipe = dir.join("named-pipe");
    let (code, stdout, stderr) = scan_within(
        &[
            "--store".as_ref(),
            store.as_os_str(),
            "--format".as_ref(),
            "json".as_ref(),
            "scan".as_ref(),
            "--max-decompressed".as_ref(),
            "64M".as_ref(),
            dir.as_os_str(),
            named_pipe.as_os_str(),
        ],
        std::time::Duration::from_secs(300),
    );
    assert_eq!(code, Some(0), "{stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    let warned = |file: &str, reason: &str| {
        assert!(
            stderr.lines().any(|l| l.starts_with("hearsay: warning: ")
                && l.contains(&format!("{file}: "))
                && l.contains(reason)),
            "no warning for {file} ({reason}) in:\n{stderr}"
        )
    };
    warned("latin1.txt", "not UTF-8, decoded as Latin-1 (windows-1252)");
    warned(
        "bad-utf8.txt",
        "invalid UTF-8, decoded with replacement characters",
    );
    warned("nul.txt", "binary file (skipped)");
    warned("nul.txt", "holds NUL or control bytes");
    warned("cut.pdf", "cannot read this PDF");
    warned(
        "bomb.txt.zst",
        "too large: decompresses to more than 67108864 bytes (raise the cap with --max-decompressed)",
    );
    warned(
        "one-line.txt",
        "too large: line 1 is longer than 67108864 bytes (raise the cap with --max-record)",
    );
    let pipe_reason = "a named pipe, not a regular file: not read (to read a stream, pipe it to standard input and pass -)";
    warned("pipe.txt", pipe_reason);
    warned("named-pipe", pipe_reason);

    let summary: serde_json::Value = serde_json::from_str(stdout.lines().next().unwrap()).unwrap();
    let listed = |key: &str| -> Vec<(String, String)> {
        summary[key]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| {
                let p = f["path"].as_str().unwrap();
                let name = Path::new(p).file_name().unwrap().to_string_lossy();
                (name.into_owned(), f["reason"].as_str().unwrap().to_string())
            })
            .collect()
    };
    let failed: Vec<String> = listed("failed").into_iter().map(|(n, _)| n).collect();
    let mut expected = vec!["bomb.txt.zst", "cut.pdf", "nul.txt", "one-line.txt"];
    expected.sort();
    let mut got = failed.clone();
    got.sort();
    assert_eq!(got, expected, "{summary}");
    let skipped = listed("skipped");
    for fifo in ["pipe.txt", "named-pipe"] {
        assert!(
            skipped.iter().any(|(n, r)| n == fifo && r == pipe_reason),
            "{fifo} not skipped: {summary}"
        );
    }
    let claims = json_lines(&["claims"], &store);
    for (file, cause) in [
        ("good.txt", "heavy rain"),
        ("latin1.txt", "café crème"),
        ("bad-utf8.txt", "drought"),
    ] {
        assert!(
            claims
                .iter()
                .any(|c| c["source"]["path"].as_str().unwrap().ends_with(file)
                    && c["cause"]["text"].as_str().unwrap().to_lowercase() == cause),
            "no claim with cause {cause:?} from {file}: {claims:?}"
        );
    }
    assert_eq!(claims.len(), 3, "{claims:?}");
}

/// Sentences, file names, record ids and model names that carry markup, terminal control
/// sequences and spreadsheet formulas. Returns the corpus folder and the files to scan, named
/// from inside it (so a file name opens its location cell).
fn injection_corpus(dir: &Path) -> Vec<String> {
    let sentences = [
        "<script>alert(1)</script> smoke causes coughing in the town.",
        "Dust from <img src=x onerror=alert(2)> quarries causes sneezing.",
        // Colour (CSI) sequences.
        "Red dye causes staining of the river bed \u{1b}[31mtoday\u{1b}[0m.",
        // An OSC 8 hyperlink, terminated by BEL.
        "Loud noise causes stress in workers \u{1b}]8;;http://evil.example/\u{7}here\u{1b}]8;;\u{7}.",
        "Heat causes drought\u{7}\u{7} in the south.",
        // A carriage return that would overwrite the start of the line.
        "Calm water\rSewage spills cause algae blooms.",
        // A C1 control (CSI as one character) and a right-to-left override.
        "Warm \u{9b}2J winters cause tick \u{202e}outbreaks\u{202c} in the hills.",
        "=HYPERLINK(\"http://evil.example\",\"x\") fertiliser causes algae blooms.",
        "+1+1 runoff causes turbidity.",
        "-2+3 cmd salt causes corrosion.",
        "@SUM(1+1) heat causes drought.",
        "Heat raises water temperature.",
        "Heat lowers water temperature.",
    ];
    std::fs::write(dir.join("notes.txt"), sentences.join("\n\n") + "\n").unwrap();
    let records = [
        serde_json::json!({"id": "=HYPERLINK(\"http://evil.example\")", "text": "Frost causes crop losses."}),
        serde_json::json!({"id": "\u{1b}[2Jwipe", "text": "Hail causes roof damage."}),
    ];
    std::fs::write(
        dir.join("records.jsonl"),
        records
            .iter()
            .map(|r| r.to_string() + "\n")
            .collect::<String>(),
    )
    .unwrap();
    // A file that fails, named with an escape sequence: the warning and summary name it.
    std::fs::write(dir.join("bin\u{1b}[2J.txt"), b"\0\0\0 binary").unwrap();
    let mut names = vec![
        "notes.txt".to_string(),
        "records.jsonl".to_string(),
        "bin\u{1b}[2J.txt".to_string(),
    ];
    for (name, text) in [
        ("=calc.txt", "Wind causes erosion."),
        ("@home.txt", "Rain causes mud."),
        ("+plus.txt", "Snow causes delays."),
        ("esc\u{1b}[2J.txt", "Ice causes falls."),
        ("-minus.txt", "Fog causes collisions."),
    ] {
        std::fs::write(dir.join(name), format!("{text}\n")).unwrap();
        names.push(name.to_string());
    }
    names
}

/// Control characters that must not reach a terminal from the input: C0 except line feed and
/// tab, DEL, C1, and the bidirectional overrides and isolates.
fn raw_controls(s: &str) -> Vec<char> {
    s.chars()
        .filter(|&c| {
            (c.is_control() && c != '\n' && c != '\t')
                || matches!(c, '\u{202A}'..='\u{202E}' | '\u{2066}'..='\u{2069}')
        })
        .collect()
}

/// Parse CSV with Python's csv module (the reference reader), returning its rows.
fn python_csv(path: &Path) -> Vec<Vec<String>> {
    let out = std::process::Command::new("python3")
        .args([
            "-c",
            "import csv, json, sys\nprint(json.dumps(list(csv.reader(open(sys.argv[1], newline='', encoding='utf-8'), strict=True))))",
        ])
        .arg(path)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "{} is not valid CSV: {}",
        path.display(),
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// A cell a spreadsheet would run as a formula: it opens with = + - @ tab CR or NUL (common
/// practice: OWASP's CSV-injection advice and its ASVS requirement 1.2.10) and is not a number.
fn formula_cell(c: &str) -> bool {
    c.starts_with(['=', '+', '-', '@', '\t', '\r', '\0']) && c.parse::<f64>().is_err()
}

#[test]
fn markup_escapes_and_formulas_in_the_text_stay_inert_in_every_output() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let names = injection_corpus(&corpus);
    let store = tmp.path().join("store");
    let run = |args: &[&str]| -> std::process::Output {
        let out = hearsay()
            .current_dir(&corpus)
            .arg("--store")
            .arg(&store)
            .args(args)
            .output()
            .unwrap();
        // `pair` exits 3 when a name is no variable (the hostile spans are cut oddly), and still
        // prints its report: that output must be inert too.
        let unknown_name = args.contains(&"pair") && out.status.code() == Some(3);
        assert!(
            out.status.success() || unknown_name,
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        out
    };
    // "-minus.txt" goes after "--", or it would read as an option.
    let mut scan = vec!["--format", "table", "scan"];
    scan.extend(names[..names.len() - 1].iter().map(String::as_str));
    scan.extend(["--", names.last().unwrap()]);
    let out = run(&scan);
    let (stdout, stderr) = (
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    );
    assert!(raw_controls(&stdout).is_empty(), "{stdout:?}");
    assert!(raw_controls(&stderr).is_empty(), "{stderr:?}");
    assert!(
        stderr.contains("hearsay: warning: bin\u{FFFD}[2J.txt: binary file")
            && stdout.contains("failed: bin\u{FFFD}[2J.txt: binary file"),
        "{stdout}\n{stderr}"
    );
    let claims = json_lines(&["claims"], &store);
    let sentences: Vec<String> = claims
        .iter()
        .map(|c| c["sentence"].as_str().unwrap().to_string())
        .collect();
    for needle in [
        "<script>alert(1)</script>",
        "\u{1b}[31mtoday",
        "\u{1b}]8;;http://evil.example/\u{7}here",
        "drought\u{7}",
        "=HYPERLINK(",
        "@SUM(",
        "-2+3",
    ] {
        assert!(
            sentences.iter().any(|s| s.contains(needle)),
            "no stored sentence holds {needle:?}: {sentences:?}"
        );
    }

    // An answers file for compare, with hostile model names and a hostile variable name.
    let answers = tmp.path().join("answers.csv");
    std::fs::write(
        &answers,
        "x,y,family,model,answer\n\
         heat,drought,directed,\"=HYPERLINK(\"\"http://evil.example\"\")\",yes\n\
         smoke,coughing,directed,\u{1b}[31mred\u{1b}[0m,no\n\
         =1+1 frost,crop losses,directed,@model,yes\n",
    )
    .unwrap();
    let ans = answers.to_str().unwrap();
    let question = json_lines(&["compare", ans, "--view", "questions"], &store)[0]["id"]
        .as_str()
        .unwrap()
        .to_string();

    // Terminal tables: no control character from the text reaches stdout, and the text is still
    // shown (the controls replaced visibly).
    let explained = "<script>x</script> Red dye causes staining \u{1b}]8;;http://evil.example/\u{7}now\u{1b}]8;;\u{7}\r\u{7}.";
    let table_runs: Vec<Vec<&str>> = vec![
        vec!["claims"],
        vec!["top"],
        vec!["pair", "red dye", "staining of the river bed"],
        vec!["pair", "loud noise", "stress in workers"],
        vec!["pair", "heat", "drought"],
        vec!["pair", "warm winters", "tick outbreaks"],
        vec!["conflicts"],
        vec!["graph"],
        vec!["explain", explained],
        vec!["compare", ans],
        vec!["compare", ans, "--view", "questions"],
        vec!["compare", ans, "--explain", &question],
    ];
    let mut shown = String::new();
    for args in &table_runs {
        let mut a = vec!["--format", "table"];
        a.extend(args);
        let out = run(&a);
        let text = String::from_utf8(out.stdout).unwrap();
        assert!(
            raw_controls(&text).is_empty(),
            "{args:?} printed control characters {:?}:\n{text}",
            raw_controls(&text)
        );
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(raw_controls(&err).is_empty(), "{args:?} stderr: {err}");
        shown += &text;
    }
    for visible in [
        "<script>alert(1)</script> smoke",
        "river bed \u{FFFD}[31mtoday\u{FFFD}[0m.",
        "workers \u{FFFD}]8;;http://evil.example/\u{FFFD}here",
        "drought\u{FFFD}\u{FFFD} in the south",
        "\u{FFFD}[2J.txt:1",
        "[\u{FFFD}[2Jwipe]",
        "\u{FFFD}[31mred\u{FFFD}[0m",
    ] {
        assert!(
            shown.contains(visible),
            "{visible:?} not shown in:\n{shown}"
        );
    }

    // CSV: valid (Python's csv reader, strict), every row as wide as its header, no cell that a
    // spreadsheet would run as a formula, and the neutralised cells keep their text after the
    // apostrophe.
    let graph_csv = tmp.path().join("edges.csv");
    run(&[
        "--format",
        "csv",
        "graph",
        "-o",
        graph_csv.to_str().unwrap(),
    ]);
    let mut tables = vec![
        python_csv(&graph_csv),
        python_csv(&tmp.path().join("edges.nodes.csv")),
    ];
    let csv_runs: Vec<Vec<&str>> = vec![
        vec!["claims"],
        vec!["top"],
        vec!["conflicts"],
        vec!["pair", "heat", "drought"],
        vec!["compare", ans],
        vec!["compare", ans, "--view", "questions"],
        vec!["compare", ans, "--view", "pairs"],
    ];
    for (i, args) in csv_runs.iter().enumerate() {
        let mut a = vec!["--format", "csv"];
        a.extend(args);
        let file = tmp.path().join(format!("out{i}.csv"));
        std::fs::write(&file, run(&a).stdout).unwrap();
        tables.push(python_csv(&file));
    }
    let mut cells = Vec::new();
    for t in &tables {
        let width = t[0].len();
        for row in t {
            assert_eq!(row.len(), width, "{row:?} in {t:?}");
            for c in row {
                assert!(!formula_cell(c), "formula cell {c:?} in {t:?}");
                cells.push(c.clone());
            }
        }
    }
    let claims_csv = &tables[2];
    let sentence_col = claims_csv[0].iter().position(|h| h == "sentence").unwrap();
    let csv_sentences: Vec<&str> = claims_csv[1..]
        .iter()
        .map(|r| r[sentence_col].as_str())
        .collect();
    for s in &sentences {
        let expected = if formula_cell(s) {
            format!("'{s}")
        } else {
            s.clone()
        };
        assert!(
            csv_sentences.contains(&expected.as_str()),
            "{expected:?} not in the claims CSV: {csv_sentences:?}"
        );
    }
    for neutralised in [
        "'=HYPERLINK(\"http://evil.example\",\"x\") fertiliser causes algae blooms.",
        "'+1+1 runoff causes turbidity.",
        "'-2+3 cmd salt causes corrosion.",
        "'@SUM(1+1) heat causes drought.",
        "'=calc.txt:1",
        "'@home.txt:1",
        "'+plus.txt:1",
        "'-minus.txt:1",
        "'=HYPERLINK(\"http://evil.example\")",
        "'@model",
        "'=1+1 frost",
    ] {
        assert!(
            cells.iter().any(|c| c == neutralised),
            "no cell {neutralised:?}"
        );
    }
}

/// The report, parsed with Python's html.parser (the reference parser): the page's own script is
/// its only script, no element carries an event handler or comes from the text, no control
/// character is left, and the hostile sentences are there as text.
#[test]
fn the_report_shows_hostile_text_as_text() {
    let tmp = tempfile::tempdir().unwrap();
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let names = injection_corpus(&corpus);
    let store = tmp.path().join("store");
    let mut scan = hearsay();
    scan.current_dir(&corpus)
        .arg("--store")
        .arg(&store)
        .args(["-q", "scan"])
        .args(&names[..names.len() - 1])
        .arg("--")
        .arg(names.last().unwrap());
    succeeded(&mut scan);
    let page = tmp.path().join("report.html");
    succeeded(
        hearsay()
            .arg("--store")
            .arg(&store)
            .args([
                "report",
                "--title",
                "<script>alert(3)</script>\u{1b}[2J",
                "--pair",
                "smoke",
                "coughing",
                "-o",
            ])
            .arg(&page),
    );
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(raw_controls(&html).is_empty(), "{:?}", raw_controls(&html));
    const CHECK: &str = r#"
import json, sys
from html.parser import HTMLParser
class Page(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.open, self.tags, self.handlers, self.scripts, self.text = [], [], [], [], []
    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.handlers += [(tag, k) for k, _ in attrs if k.lower().startswith("on")]
        self.open.append(tag)
    def handle_endtag(self, tag):
        while self.open and self.open.pop() != tag:
            pass
    def handle_data(self, data):
        if self.open and self.open[-1] == "script":
            self.scripts.append(data)
        else:
            self.text.append(data)
p = Page()
p.feed(open(sys.argv[1], encoding="utf-8").read())
print(json.dumps({"scripts": p.tags.count("script"), "img": p.tags.count("img"),
                  "handlers": p.handlers, "script_text": "".join(p.scripts),
                  "text": " ".join(p.text)}))
"#;
    let out = std::process::Command::new("python3")
        .args(["-c", CHECK])
        .arg(&page)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["scripts"], 1, "{v}");
    assert_eq!(v["img"], 0, "{v}");
    assert_eq!(v["handlers"], serde_json::json!([]), "{v}");
    assert!(!v["script_text"].as_str().unwrap().contains("alert("));
    let text = v["text"].as_str().unwrap();
    for shown in [
        "<script>alert(1)</script> smoke causes coughing in the town.",
        "Dust from <img src=x onerror=alert(2)> quarries causes sneezing.",
        "<script>alert(3)</script>\u{FFFD}[2J",
        "bin\u{FFFD}[2J.txt",
        "river bed \u{FFFD}[31mtoday\u{FFFD}[0m.",
    ] {
        assert!(text.contains(shown), "{shown:?} not shown as text");
    }
}
