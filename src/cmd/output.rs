//! What the commands print with: escaping, the terminal table, the machine formats, and the
//! shapes several commands share (evidence lines, a variable that is not there).

use super::Format;
use anyhow::Result;
use hearsay::query::{EvidenceLine, Loaded};
use std::io::Write;

/// `n` with its noun, singular for one: "1 claim", "2 claims" (every noun the commands count
/// takes a plain -s).
pub fn count(n: usize, noun: &str) -> String {
    if n == 1 {
        format!("1 {noun}")
    } else {
        format!("{n} {noun}s")
    }
}

/// Replace control characters so that text from the input cannot drive the terminal.
pub fn escape(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_control() && c != '\n' && c != '\t' {
                '\u{FFFD}'
            } else {
                c
            }
        })
        .collect()
}

/// A simple aligned table for terminals.
pub struct Table {
    headers: Vec<String>,
    rows: Vec<Vec<String>>,
}

impl Table {
    pub fn new(headers: &[&str]) -> Self {
        Table {
            headers: headers.iter().map(|s| s.to_string()).collect(),
            rows: Vec::new(),
        }
    }
    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(
            cells
                .into_iter()
                .map(|c| escape(&c).replace(['\n', '\t'], " "))
                .collect(),
        );
    }
    pub fn print(&self, out: &mut impl Write) -> std::io::Result<()> {
        let n = self.headers.len();
        let mut w: Vec<usize> = self.headers.iter().map(|h| h.chars().count()).collect();
        for r in &self.rows {
            for (i, c) in r.iter().enumerate().take(n) {
                w[i] = w[i].max(c.chars().count().min(60));
            }
        }
        let line = |cells: &[String], out: &mut dyn Write| -> std::io::Result<()> {
            let mut s = String::new();
            for (i, c) in cells.iter().enumerate().take(n) {
                let c: String = if c.chars().count() > 60 {
                    c.chars().take(59).chain(std::iter::once('…')).collect()
                } else {
                    c.clone()
                };
                let pad = w[i].saturating_sub(c.chars().count());
                if i + 1 == n {
                    s.push_str(&c);
                } else {
                    s.push_str(&c);
                    s.push_str(&" ".repeat(pad + 2));
                }
            }
            writeln!(out, "{}", s.trim_end())
        };
        line(&self.headers, out)?;
        line(&w.iter().map(|&x| "-".repeat(x)).collect::<Vec<_>>(), out)?;
        for r in &self.rows {
            line(r, out)?;
        }
        Ok(())
    }
}

/// Write serialisable rows in the chosen machine format (JSON Lines or CSV with `headers`).
pub fn write_rows<T: serde::Serialize>(
    out: &mut impl Write,
    format: Format,
    rows: &[T],
    csv_row: impl Fn(&T) -> Vec<String>,
    headers: &[&str],
) -> Result<()> {
    match format {
        Format::Json => {
            for r in rows {
                serde_json::to_writer(&mut *out, r)?;
                out.write_all(b"\n")?;
            }
        }
        Format::Csv => {
            let mut w = csv::Writer::from_writer(&mut *out);
            w.write_record(headers)?;
            for r in rows {
                w.write_record(csv_row(r))?;
            }
            w.flush()?;
        }
        Format::Table => {
            let mut t = Table::new(headers);
            for r in rows {
                t.row(csv_row(r));
            }
            t.print(out)?;
        }
    }
    Ok(())
}

/// Print evidence lines for a terminal, each behind `indent`.
pub fn print_evidence(out: &mut impl Write, indent: &str, ev: &[EvidenceLine]) -> Result<()> {
    for e in ev {
        writeln!(
            out,
            "{indent}{}  [{} {}]  {}",
            escape(&e.location),
            e.polarity,
            e.modality,
            escape(&e.sentence)
        )?;
    }
    Ok(())
}

/// Find a variable the user named, or fail with suggestions: the variables that contain its
/// words, else those spelt within a few letters of it ("fish stoks" → "fish stocks").
pub fn find_var(loaded: &Loaded, name: &str) -> Result<petgraph::graph::NodeIndex> {
    let (m, n) = loaded.lookup(name);
    n.ok_or_else(|| {
        let mut suggestions = m.suggestions.clone();
        if suggestions.is_empty() {
            suggestions = loaded.near_spellings(&m.key);
        }
        anyhow::anyhow!(
            "no variable \"{}\" in the claims (key \"{}\"){}",
            escape(name),
            m.key,
            if suggestions.is_empty() {
                String::new()
            } else {
                format!("; did you mean: {}", escape(&suggestions.join(", ")))
            }
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn count_is_singular_for_one() {
        assert_eq!(count(1, "claim"), "1 claim");
        assert_eq!(count(0, "claim"), "0 claims");
        assert_eq!(count(4, "document"), "4 documents");
    }
}
