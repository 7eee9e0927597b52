//! Cleaning page texts into paragraphs: running headers and footers, page numbers, glyph soup
//! and ligatures, hyphenation at line ends, and the cut at the references.

use std::collections::HashMap;

/// How many lines at each end of a page are looked at for running headers and footers.
const EDGE_LINES: usize = 3;

/// Spell out the Latin ligatures of the Alphabetic Presentation Forms block.
fn expand_ligatures(s: &str) -> std::borrow::Cow<'_, str> {
    if !s.chars().any(|c| ('\u{FB00}'..='\u{FB06}').contains(&c)) {
        return s.into();
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '\u{FB00}' => out.push_str("ff"),
            '\u{FB01}' => out.push_str("fi"),
            '\u{FB02}' => out.push_str("fl"),
            '\u{FB03}' => out.push_str("ffi"),
            '\u{FB04}' => out.push_str("ffl"),
            '\u{FB05}' | '\u{FB06}' => out.push_str("st"),
            c => out.push(c),
        }
    }
    out.into()
}

/// A line of at least eight tokens, most of them one character long, or a line that is one
/// fifth control characters (two-byte glyph codes read as bytes): not prose.
fn is_glyph_soup(s: &str) -> bool {
    let control = s.chars().filter(|c| c.is_control()).count();
    if control * 5 >= s.chars().count() && control > 0 {
        return true;
    }
    let (mut n, mut single) = (0usize, 0usize);
    for t in s.split_whitespace() {
        n += 1;
        single += usize::from(t.chars().count() == 1);
    }
    n >= 8 && single * 3 >= n * 2
}

fn mask_digits(s: &str) -> String {
    s.chars()
        .map(|c| if c.is_ascii_digit() { '#' } else { c })
        .filter(|c| !c.is_whitespace())
        .collect()
}

fn is_page_number(s: &str) -> bool {
    let t = s
        .trim()
        .trim_start_matches("Page")
        .trim_start_matches("page")
        .trim();
    !t.is_empty()
        && t.len() <= 12
        && t.chars()
            .all(|c| c.is_ascii_digit() || " /of-–".contains(c))
        && t.chars().any(|c| c.is_ascii_digit())
}

fn is_references_heading(s: &str) -> bool {
    let t = s
        .trim()
        .trim_start_matches(|c: char| c.is_ascii_digit() || c == '.' || c.is_whitespace())
        .trim_end_matches(':')
        .to_lowercase();
    matches!(
        t.as_str(),
        "references" | "bibliography" | "works cited" | "literature cited" | "references and notes"
    )
}

/// Lines (digit-masked) that sit at a page edge on at least half of the pages (and two).
fn running_lines(pages: &[Vec<&str>]) -> HashMap<String, usize> {
    let mut seen: HashMap<String, usize> = HashMap::new();
    for lines in pages {
        let n = lines.len();
        let mut edge: Vec<String> = lines
            .iter()
            .enumerate()
            .filter(|(i, _)| *i < EDGE_LINES || *i + EDGE_LINES >= n)
            .map(|(_, l)| mask_digits(l))
            .filter(|l| !l.is_empty())
            .collect();
        edge.sort();
        edge.dedup();
        for l in edge {
            *seen.entry(l).or_default() += 1;
        }
    }
    let need = (pages.len() / 2).max(2);
    seen.retain(|_, c| *c >= need);
    seen
}

/// Shortest masked line that is matched against running lines by containment.
const MIN_RUNNING: usize = 16;

/// Whether an edge line (digit-masked) is page furniture: a running line itself, a part of one
/// (the first page often carries the running footer without its "Page 1 of 10"), or a running
/// line with a little more on it (a page number glued to the footer).
fn is_running(masked: &str, running: &HashMap<String, usize>) -> bool {
    running.contains_key(masked)
        || (masked.len() >= MIN_RUNNING
            && running.keys().any(|r| {
                r.contains(masked)
                    || (r.len() >= MIN_RUNNING
                        && masked.len() <= r.len() + MIN_RUNNING
                        && masked.contains(r.as_str()))
            }))
}

/// A running line at a page edge, or a long one anywhere (a first page may draw its footer
/// before the text of a box, so that it lands mid-page in content order).
fn is_furniture_line(line: &str, at_edge: bool, running: &HashMap<String, usize>) -> bool {
    let m = mask_digits(line);
    (at_edge || m.len() >= MIN_RUNNING) && is_running(&m, running)
}

/// Clean page texts into one text with the byte offset of each page after the first.
pub(super) fn clean_pages(pages: &[String], cut_references: bool) -> (String, Vec<usize>) {
    let split: Vec<Vec<&str>> = pages
        .iter()
        .map(|p| p.lines().map(str::trim).filter(|l| !l.is_empty()).collect())
        .collect();
    let running = running_lines(&split);
    let mut out = String::new();
    let mut starts = Vec::new();
    'pages: for (pi, lines) in pages.iter().enumerate() {
        let mut pending = pi > 0;
        let n = split[pi].len();
        let mut idx = 0usize;
        let mut para = String::new();
        for raw in lines.lines() {
            let expanded = expand_ligatures(raw.trim());
            let line = expanded.as_ref();
            if line.is_empty() {
                push_para(&mut out, &mut para, &mut pending, &mut starts);
                continue;
            }
            let at_edge = idx < EDGE_LINES || idx + EDGE_LINES >= n;
            idx += 1;
            if is_page_number(line)
                || is_glyph_soup(line)
                || is_furniture_line(line, at_edge, &running)
            {
                continue;
            }
            if cut_references && is_references_heading(line) && !out.is_empty() {
                push_para(&mut out, &mut para, &mut pending, &mut starts);
                break 'pages;
            }
            join_line(&mut para, line);
        }
        push_para(&mut out, &mut para, &mut pending, &mut starts);
        if pending {
            // A page without body text starts where the next text will.
            starts.push(out.len());
        }
    }
    while starts
        .last()
        .is_some_and(|&s| s >= out.len() && !out.is_empty())
    {
        starts.pop();
    }
    (out, starts)
}

fn join_line(para: &mut String, line: &str) {
    if para.is_empty() {
        para.push_str(line);
        return;
    }
    let next_lower = line.chars().next().is_some_and(char::is_lowercase);
    let hyphenated = para.ends_with('-')
        && para[..para.len() - 1]
            .chars()
            .next_back()
            .is_some_and(char::is_alphabetic);
    if hyphenated && next_lower {
        para.pop();
    } else {
        para.push(' ');
    }
    para.push_str(line);
}

fn push_para(out: &mut String, para: &mut String, pending: &mut bool, starts: &mut Vec<usize>) {
    if para.is_empty() {
        return;
    }
    if !out.is_empty() {
        out.push_str("\n\n");
    }
    if *pending {
        starts.push(out.len());
        *pending = false;
    }
    out.push_str(para);
    para.clear();
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headers_numbers_hyphens_and_references() {
        let pages = vec![
            "Journal of Lakes 12\nWarm water raises the regu-\nlation of algae.\n\n1\n".to_string(),
            "Journal of Lakes 13\nRain causes floods.\nReferences\nA. Author 2020.\n2\n"
                .to_string(),
        ];
        let (t, starts) = clean_pages(&pages, true);
        assert_eq!(
            t,
            "Warm water raises the regulation of algae.\n\nRain causes floods."
        );
        assert_eq!(starts, vec![t.find("Rain").unwrap()]);
        let (t, _) = clean_pages(&pages, false);
        assert!(t.contains("A. Author"));
    }

    #[test]
    fn a_part_of_a_running_footer_on_the_first_page_is_dropped() {
        let footer =
            |n: u32| format!("Lake Journal 2014, 14:1 Page {n} of 3\nhttp://lake.example/14/1");
        let pages = vec![
            "Wind moves the water.\nLake Journal 2014, 14:1\nhttp://lake.example/14/1\n"
                .to_string(),
            format!("Rain fills the lake.\n{}\n", footer(2)),
            format!("Sun warms the bay.\n{}\n", footer(3)),
        ];
        assert_eq!(
            clean_pages(&pages, true).0,
            "Wind moves the water.\n\nRain fills the lake.\n\nSun warms the bay."
        );
    }

    #[test]
    fn ligatures_are_spelt_out_and_glyph_soup_dropped() {
        let pages = vec![
            "The \u{FB01}eld \u{FB02}ows.\nU V M / U # V . 2 i 2 ` K\n\0U\0\0V \0M\0/\n"
                .to_string(),
        ];
        assert_eq!(clean_pages(&pages, true).0, "The field flows.");
    }
}
