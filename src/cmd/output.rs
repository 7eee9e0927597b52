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

/// Replace control characters so that text from the input cannot drive the terminal: ESC (and
/// with it every colour, cursor and OSC 8 hyperlink sequence), BEL, CR, the other C0 and C1
/// controls, and the bidirectional overrides and isolates that reorder what a terminal shows
/// (the "Trojan Source" trick). Each becomes U+FFFD, visibly; line breaks and tabs are kept for
/// the callers that lay them out.
pub fn escape(s: &str) -> String {
    s.chars()
        .map(|c| {
            if (c.is_control() && c != '\n' && c != '\t') || is_bidi_control(c) {
                '\u{FFFD}'
            } else {
                c
            }
        })
        .collect()
}

/// The Unicode bidirectional embedding, override and isolate controls (U+202A–U+202E,
/// U+2066–U+2069).
fn is_bidi_control(c: char) -> bool {
    matches!(c, '\u{202A}'..='\u{202E}' | '\u{2066}'..='\u{2069}')
}

/// A CSV cell that a spreadsheet will not run as a formula. Common practice (OWASP's CSV
/// injection advice, and requirement 1.2.10 of its Application Security Verification Standard):
/// a cell that begins with `=`, `+`, `-`, `@`, a tab, a carriage return or NUL gets a leading
/// apostrophe, which spreadsheets take as "this is text". Plain numbers ("-0.50",
/// "+1") are left alone: they are data, and no spreadsheet reads them as anything else.
pub fn csv_cell(s: &str) -> std::borrow::Cow<'_, str> {
    match s.chars().next() {
        Some('=' | '+' | '-' | '@' | '\t' | '\r' | '\0') if !is_plain_number(s) => {
            std::borrow::Cow::Owned(format!("'{s}"))
        }
        _ => std::borrow::Cow::Borrowed(s),
    }
}

/// A decimal number with an optional sign, fraction and exponent, and nothing else.
fn is_plain_number(s: &str) -> bool {
    let s = s.strip_prefix(['+', '-']).unwrap_or(s);
    let (mantissa, exponent) = match s.split_once(['e', 'E']) {
        Some((m, e)) => (m, Some(e.strip_prefix(['+', '-']).unwrap_or(e))),
        None => (s, None),
    };
    let (int, frac) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let digits = |t: &str| t.bytes().all(|b| b.is_ascii_digit());
    !(int.is_empty() && frac.is_empty())
        && digits(int)
        && digits(frac)
        && exponent.is_none_or(|e| !e.is_empty() && digits(e))
}

/// A CSV writer every command's CSV goes through: each cell passes [`csv_cell`] on its way out.
pub struct CsvOut<W: Write>(csv::Writer<W>);

/// Open a [`CsvOut`] on `out`.
pub fn csv_writer<W: Write>(out: W) -> CsvOut<W> {
    CsvOut(csv::Writer::from_writer(out))
}

impl<W: Write> CsvOut<W> {
    pub fn write_record<I, T>(&mut self, record: I) -> csv::Result<()>
    where
        I: IntoIterator<Item = T>,
        T: AsRef<str>,
    {
        self.0.write_record(
            record
                .into_iter()
                .map(|c| csv_cell(c.as_ref()).into_owned()),
        )
    }

    pub fn flush(&mut self) -> std::io::Result<()> {
        self.0.flush()
    }
}

/// CSV written by a library writer (the graph exports), with its cells passed through
/// [`csv_cell`]: read back with the csv crate and written again.
pub fn neutralise_csv(bytes: &[u8]) -> Result<Vec<u8>> {
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .from_reader(bytes);
    let mut out = Vec::with_capacity(bytes.len());
    {
        let mut w = csv_writer(&mut out);
        let mut rec = csv::StringRecord::new();
        while r.read_record(&mut rec)? {
            w.write_record(rec.iter())?;
        }
        w.flush()?;
    }
    Ok(out)
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
            let mut w = csv_writer(&mut *out);
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

    #[test]
    fn formula_cells_get_an_apostrophe_and_numbers_do_not() {
        // The leading characters of OWASP's CSV-injection advice (common practice).
        for cell in [
            "=1+1", "+cmd", "-2+3", "@SUM(A1)", "\tx", "\rx", "\0x", "-", "+",
        ] {
            assert_eq!(csv_cell(cell), format!("'{cell}"), "{cell:?}");
        }
        for cell in [
            "-0.50", "+1", "-1e-3", "12", "3.", ".5", "smoke", "", "'quoted",
        ] {
            assert_eq!(csv_cell(cell), cell, "{cell:?}");
        }
        for cell in ["-1e", "-e5", "--1", "-1.2.3", "-inf", "-NaN", "+1+1"] {
            assert!(csv_cell(cell).starts_with('\''), "{cell:?}");
        }
    }

    #[test]
    fn graph_csv_round_trip_changes_only_formula_cells() {
        let plain = "id,label,weight\nn1,\"smoke, dust\",-1\nn2,\"say \"\"hi\"\"\",+0.50\n";
        assert_eq!(neutralise_csv(plain.as_bytes()).unwrap(), plain.as_bytes());
        let hostile = "id,label\nn1,=HYPERLINK(\"x\")\n";
        assert_eq!(
            String::from_utf8(neutralise_csv(hostile.as_bytes()).unwrap()).unwrap(),
            "id,label\nn1,\"'=HYPERLINK(\"\"x\"\")\"\n"
        );
    }

    #[test]
    fn escape_replaces_terminal_controls_visibly() {
        let s = "a\x1b[31mb\x07c\rd\u{202E}e\u{9b}f\ng\th";
        assert_eq!(
            escape(s),
            "a\u{FFFD}[31mb\u{FFFD}c\u{FFFD}d\u{FFFD}e\u{FFFD}f\ng\th"
        );
    }
}
