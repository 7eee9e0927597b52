//! The layering of `src/`, checked from the source itself: each top-level module (a pipeline
//! stage folder, or one of the shared modules) may use only modules of a lower layer. The table
//! below is the architecture of DEVELOPERS.md's code map; a change that needs an upward import
//! belongs in a lower layer (or the table is wrong, and the guide with it).
//!
//! A reference is any `crate::NAME` path in the library (or `hearsay::NAME` in the binary),
//! including grouped `use crate::{a, b}` imports. Comments are left out, so a doc link to a
//! higher layer is fine; code, tests included, is not.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Layers from the bottom up. A module may use modules of a strictly lower layer and itself.
const LAYERS: &[(&str, u8)] = &[
    // Shared by every stage: the claim record, the error types, test data helpers.
    ("claim", 0),
    ("error", 0),
    ("testdata", 0),
    // The data files the stages read.
    ("patterns", 1),
    // The pipeline, in order.
    ("corpus", 2),
    ("sentences", 2),
    ("variables", 2),
    ("extract", 3),
    ("store", 4),
    ("graph", 5),
    ("query", 6),
    // Beside the pipeline: scoring against gold data and diagrams, model answers.
    ("evaluate", 7),
    ("compare", 7),
    ("report", 8),
    // The binary.
    ("cmd", 9),
];

fn rank(module: &str) -> Option<u8> {
    LAYERS.iter().find(|(m, _)| *m == module).map(|(_, r)| *r)
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<_> = std::fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .flatten()
        .map(|e| e.path())
        .collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|e| e == "rs") {
            out.push(p);
        }
    }
}

/// The top-level module a file belongs to: `src/extract/claims/spans.rs` → `extract`,
/// `src/claim.rs` → `claim`, the binary (`main.rs`, `cmd/`) → `cmd`; `lib.rs` → none.
fn owner(src: &Path, file: &Path) -> Option<String> {
    let rel = file.strip_prefix(src).ok()?;
    let first = rel.components().next()?.as_os_str().to_str()?.to_string();
    match first.as_str() {
        "lib.rs" => None,
        "main.rs" => Some("cmd".into()),
        f => Some(f.trim_end_matches(".rs").to_string()),
    }
}

/// The code of a file without its comments (line comments and doc comments; block comments
/// are not used in this crate).
fn code_of(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for line in text.lines() {
        let code = match line.find("//") {
            // `//` inside a string literal ("https://…") is rare enough to accept: such a
            // line keeps everything up to it, which can only drop references, never add them.
            Some(i) => &line[..i],
            None => line,
        };
        out.push_str(code);
        out.push('\n');
    }
    out
}

/// The top-level modules a piece of code names through `root::` (`crate` or `hearsay`).
fn referenced(code: &str, root: &str) -> BTreeSet<String> {
    let mut found = BTreeSet::new();
    let pat = format!("{root}::");
    let bytes = code.as_bytes();
    let mut from = 0;
    while let Some(i) = code[from..].find(&pat) {
        let at = from + i;
        from = at + pat.len();
        // A whole path segment: not `xcrate::` or `a::crate::`.
        if at > 0
            && (bytes[at - 1].is_ascii_alphanumeric()
                || bytes[at - 1] == b'_'
                || bytes[at - 1] == b':')
        {
            continue;
        }
        let rest = &code[from..];
        if let Some(group) = rest.strip_prefix('{') {
            // `use crate::{a, b::c, d::{e, f}}`: the first segment of each top-level item.
            let mut depth = 0;
            let mut item = String::new();
            for c in group.chars() {
                match c {
                    '{' => depth += 1,
                    '}' if depth == 0 => break,
                    '}' => depth -= 1,
                    ',' if depth == 0 => {
                        push_first_segment(&item, &mut found);
                        item.clear();
                        continue;
                    }
                    _ => {}
                }
                item.push(c);
            }
            push_first_segment(&item, &mut found);
        } else {
            push_first_segment(rest, &mut found);
        }
    }
    found
}

fn push_first_segment(path: &str, found: &mut BTreeSet<String>) {
    let name: String = path
        .trim_start()
        .chars()
        .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
        .collect();
    // Lower-case names are modules; `crate::Claim` (a re-exported type) names the claim layer.
    if name.chars().next().is_some_and(|c| c.is_ascii_lowercase()) && name != "self" {
        found.insert(name);
    } else if !name.is_empty() && name != "self" {
        found.insert("claim".into());
    }
}

/// Top-level module → the top-level modules its files reference.
fn import_graph() -> BTreeMap<String, BTreeSet<String>> {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    let mut graph: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    for f in files {
        let Some(module) = owner(&src, &f) else {
            continue;
        };
        let text = std::fs::read_to_string(&f).unwrap_or_else(|e| panic!("{}: {e}", f.display()));
        let code = code_of(&text);
        let root = if module == "cmd" { "hearsay" } else { "crate" };
        let refs = graph.entry(module.clone()).or_default();
        for r in referenced(&code, root) {
            if r != module {
                refs.insert(r);
            }
        }
    }
    graph
}

#[test]
fn every_module_uses_only_lower_layers() {
    let graph = import_graph();
    let mut problems = Vec::new();
    for (module, refs) in &graph {
        let Some(own) = rank(module) else {
            problems.push(format!(
                "src/{module}: not in the layer table (tests/it/layering.rs)"
            ));
            continue;
        };
        for r in refs {
            match rank(r) {
                None => problems.push(format!(
                    "{module} uses {r}, which is not in the layer table"
                )),
                Some(theirs) if theirs >= own => problems.push(format!(
                    "{module} (layer {own}) uses {r} (layer {theirs}): move the shared part down"
                )),
                Some(_) => {}
            }
        }
    }
    // Printed so that `cargo test layering -- --nocapture` shows the import graph.
    for (module, refs) in &graph {
        let refs: Vec<&str> = refs.iter().map(String::as_str).collect();
        println!("{module:>10} → {}", refs.join(", "));
    }
    assert!(
        problems.is_empty(),
        "layering broken:\n{}",
        problems.join("\n")
    );
}

#[test]
fn the_layer_check_sees_grouped_and_plain_imports() {
    // The parser itself, on code shaped like the crate's: a check that cannot fail is no check.
    let code = code_of(
        "use crate::store::{Store, ClaimRow};\nuse crate::{graph::Filter, query};\n\
         // use crate::report::x;  (a comment)\nlet x = crate::extract::claims::tokenize(s);\n\
         let c: crate::Claim = todo!();\nuse notcrate::x;",
    );
    let found: Vec<String> = referenced(&code, "crate").into_iter().collect();
    assert_eq!(found, ["claim", "extract", "graph", "query", "store"]);
    assert!(rank("extract") < rank("store") && rank("store") < rank("graph"));
    assert!(rank("corpus") < rank("extract") && rank("query") < rank("report"));
}
