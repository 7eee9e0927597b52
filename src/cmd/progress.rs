//! Progress on stderr for the long-running commands (`scan`, `extract`): files done of all, and
//! while a stream (a JSON Lines dump, standard input) is read, how far into it the run is.

use super::Global;
use indicatif::{ProgressBar, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// A progress bar over `files` inputs, drawn only when stderr is a terminal and the run is not
/// `--quiet`; otherwise every call is a no-op, so output stays clean in pipelines and logs.
pub struct Progress {
    bar: ProgressBar,
}

impl Progress {
    pub fn new(g: &Global, verb: &str, files: usize) -> Progress {
        if g.quiet || !std::io::stderr().is_terminal() {
            return Progress {
                bar: ProgressBar::hidden(),
            };
        }
        let bar = ProgressBar::new(files as u64);
        bar.set_style(
            ProgressStyle::with_template(&format!(
                "{{spinner}} {verb} [{{bar:30}}] {{pos}}/{{len}} files {{msg}} ({{eta}})"
            ))
            .unwrap_or_else(|_| ProgressStyle::default_bar())
            .progress_chars("=> "),
        );
        // A stream can take hours as one "file": the spinner shows the run is alive.
        bar.enable_steady_tick(Duration::from_millis(200));
        Progress { bar }
    }

    /// One more input done.
    pub fn file_done(&self) {
        self.bar.set_message("");
        self.bar.inc(1);
    }

    /// How far into a stream the run is.
    pub fn stream(&self, label: &str, documents: u64, bytes: u64) {
        if !self.bar.is_hidden() {
            self.bar
                .set_message(stream_message(label, documents, bytes));
        }
    }

    /// Print a warning without tearing the bar.
    pub fn warn(&self, g: &Global, msg: &str) {
        self.bar.suspend(|| g.warn(msg));
    }

    pub fn finish(&self) {
        self.bar.finish_and_clear();
    }
}

/// A run that stops early (an error, a closed pipe) clears its bar too.
impl Drop for Progress {
    fn drop(&mut self) {
        self.bar.finish_and_clear();
    }
}

/// "· dump.jsonl: 12040 documents, 1.3 GB": the name cut to its last 40 characters,
/// sizes in decimal units.
fn stream_message(label: &str, documents: u64, bytes: u64) -> String {
    let chars: Vec<char> = label.chars().collect();
    let name: String = if chars.len() > 40 {
        std::iter::once('…')
            .chain(chars[chars.len() - 39..].iter().copied())
            .collect()
    } else {
        label.to_string()
    };
    let name = super::escape(&name);
    let size = match bytes {
        b if b >= 1_000_000_000 => format!("{:.1} GB", b as f64 / 1e9),
        b if b >= 1_000_000 => format!("{:.1} MB", b as f64 / 1e6),
        b => format!("{:.0} kB", b as f64 / 1e3),
    };
    let docs = if documents == 1 {
        "document"
    } else {
        "documents"
    };
    format!("· {name}: {documents} {docs}, {size}")
}

#[cfg(test)]
mod tests {
    use super::stream_message;

    #[test]
    fn a_stream_is_named_with_its_documents_and_size() {
        assert_eq!(stream_message("-", 1, 420), "· -: 1 document, 0 kB");
        assert_eq!(
            stream_message("dump.jsonl", 12_040, 1_302_000_000),
            "· dump.jsonl: 12040 documents, 1.3 GB"
        );
        let long = format!("{}/shard-0001.jsonl.zst", "corpus".repeat(10));
        let m = stream_message(&long, 3, 4_500_000);
        let name = m
            .strip_prefix("· ")
            .and_then(|m| m.strip_suffix(": 3 documents, 4.5 MB"))
            .unwrap();
        assert_eq!(name.chars().count(), 40);
        assert!(
            name.starts_with('…') && long.ends_with(&name[3..]),
            "{name}"
        );
    }
}
