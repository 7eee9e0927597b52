//! Test helpers: the shared datasets (`../shared/data` beside the repository, or
//! `$HEARSAY_SHARED_DATA`), each described by its SOURCE file there.

use std::path::PathBuf;

/// A path under the shared datasets folder, or `None` (with a note on stderr) when it is missing,
/// in which case the calling test skips its check.
pub fn shared(rel: &str) -> Option<PathBuf> {
    let base = std::env::var_os("HEARSAY_SHARED_DATA")
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../shared/data"));
    let p = base.join(rel);
    if p.exists() {
        Some(p)
    } else {
        eprintln!("skipped: {} not found", p.display());
        None
    }
}

/// The first `n` eLife articles by file name (990 open-access articles;
/// elife-articles/SOURCE.txt), as (path, text).
pub fn elife_articles(n: usize) -> Vec<(PathBuf, String)> {
    let Some(dir) = shared("elife-articles/articles") else {
        return Vec::new();
    };
    let mut paths: Vec<PathBuf> = std::fs::read_dir(&dir)
        .map(|rd| rd.flatten().map(|e| e.path()).collect())
        .unwrap_or_default();
    paths.sort();
    paths
        .into_iter()
        .take(n)
        .filter_map(|p| std::fs::read_to_string(&p).ok().map(|t| (p, t)))
        .collect()
}

/// Every non-empty line of the first `n` eLife articles, with its article's path: the real
/// text that fast paths are checked against their reference on.
pub fn elife_lines(n: usize) -> Vec<(PathBuf, String)> {
    elife_articles(n)
        .into_iter()
        .flat_map(|(path, text)| {
            text.lines()
                .filter(|l| !l.trim().is_empty())
                .map(|l| (path.clone(), l.to_string()))
                .collect::<Vec<_>>()
        })
        .collect()
}
