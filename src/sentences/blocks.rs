//! Hard blocks: blank lines, Unicode paragraph and line separators, Markdown headings and list
//! items end a sentence whatever the text around them; a single newline is wrapped text.

use super::{ceil_boundary, floor_boundary};

/// A block of text around a position: see [`block_around`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Block {
    pub start: usize,
    pub end: usize,
    /// The block starts (ends) where the length cap cut it, not at a paragraph edge: the
    /// sentence at that edge may be a fragment.
    pub cut_start: bool,
    pub cut_end: bool,
}

/// `text` with every newline and carriage return replaced by a space. Byte for byte: both are
/// ASCII, so every offset stays valid. (Collecting `chars()` was a tenth of splitting.)
pub(super) fn flatten_lines(text: &str) -> String {
    let mut flat = String::with_capacity(text.len());
    let mut from = 0;
    for i in memchr::memchr2_iter(b'\n', b'\r', text.as_bytes()) {
        flat.push_str(&text[from..i]);
        flat.push(' ');
        from = i + 1;
    }
    flat.push_str(&text[from..]);
    flat
}

/// The Unicode separators that end a hard block (line and paragraph separators, next line,
/// vertical tab, form feed) in `text`, as byte ranges. Found by their bytes (0x0B, 0x0C, and the
/// lead bytes 0xC2 and 0xE2), so ASCII text is skipped at memchr speed.
pub(super) fn separators(text: &str) -> impl Iterator<Item = (usize, usize)> + '_ {
    let b = text.as_bytes();
    memchr::memchr3_iter(0x0B, 0x0C, 0xC2, b)
        .chain(memchr::memchr_iter(0xE2, b))
        .filter_map(move |i| match b[i] {
            0x0B | 0x0C => Some((i, i + 1)),
            0xC2 if b.get(i + 1) == Some(&0x85) => Some((i, i + 2)),
            0xE2 if b.get(i + 1) == Some(&0x80) && matches!(b.get(i + 2), Some(0xA8 | 0xA9)) => {
                Some((i, i + 3))
            }
            _ => None,
        })
}

/// The paragraph-like block around byte `pos`: from the previous blank line (or a line break, when
/// `lines_are_paragraphs` is true) to the next one, capped at `max_len` bytes on each side (cut at a
/// char boundary / whitespace). Used to segment only the text around a cue hit.
pub fn block_around(text: &str, pos: usize, lines_are_paragraphs: bool, max_len: usize) -> Block {
    let b = text.as_bytes();
    let pos = floor_boundary(text, pos.min(text.len()));
    let lo = pos.saturating_sub(max_len);
    let hi = pos.saturating_add(max_len).min(text.len());
    // A cut window starts after its first whitespace and ends at its last one.
    let (start, cut_start) = match paragraph_break_before(b, lo, pos, lines_are_paragraphs) {
        Some(i) => (i + 1, false),
        None if lo == 0 => (0, false),
        None => (
            b[lo..pos]
                .iter()
                .position(u8::is_ascii_whitespace)
                .map_or_else(|| ceil_boundary(text, lo), |k| lo + k + 1),
            true,
        ),
    };
    let (end, cut_end) = match paragraph_break_after(b, pos, hi, lines_are_paragraphs) {
        Some(i) => (i, false),
        None if hi == text.len() => (hi, false),
        None => (
            b[pos..hi]
                .iter()
                .rposition(u8::is_ascii_whitespace)
                .map_or_else(|| floor_boundary(text, hi), |k| pos + k),
            true,
        ),
    };
    Block {
        start: start.min(pos),
        end: end.max(pos),
        cut_start,
        cut_end,
    }
}

/// Only spaces, tabs and carriage returns: the bytes a blank line may hold.
fn blank(b: &[u8]) -> bool {
    b.iter().all(|c| matches!(c, b' ' | b'\t' | b'\r'))
}

/// Walking back from `pos` to `lo`, the first newline of the nearest blank line before `pos` (the
/// later of its two newlines; of the nearest line break, when `lines` is true). Newlines are found
/// with memchr: this runs for every block around a cue hit, and byte-by-byte walking was a
/// visible share of splitting on prose with long paragraphs.
pub(super) fn paragraph_break_before(
    b: &[u8],
    lo: usize,
    pos: usize,
    lines: bool,
) -> Option<usize> {
    let mut later: Option<usize> = None;
    for i in memchr::memrchr_iter(b'\n', &b[lo..pos]).map(|k| lo + k) {
        if lines {
            return Some(i);
        }
        match later {
            Some(l) if blank(&b[i + 1..l]) => return Some(l),
            _ => later = Some(i),
        }
    }
    None
}

/// Walking forward from `pos` to `hi`, the first newline of the nearest blank line (of the
/// nearest line break, when `lines` is true).
pub(super) fn paragraph_break_after(b: &[u8], pos: usize, hi: usize, lines: bool) -> Option<usize> {
    let mut earlier: Option<usize> = None;
    for i in memchr::memchr_iter(b'\n', &b[pos..hi]).map(|k| pos + k) {
        if lines {
            return Some(i);
        }
        match earlier {
            Some(e) if blank(&b[e + 1..i]) => return Some(e),
            _ => earlier = Some(i),
        }
    }
    None
}

/// Hard blocks of `text[start..end]`: separated by blank lines and Unicode separators, and
/// started by Markdown list items and headings (a heading is a block of its own).
pub(super) fn blocks(text: &str, start: usize, end: usize) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let region = &text[start..end];
    let mut part_start = start;
    let mut found: Vec<(usize, usize)> = separators(region)
        .map(|(i, j)| (start + i, start + j))
        .collect();
    found.sort_unstable();
    let seps = found.into_iter().chain(std::iter::once((end, end)));
    for (sep_s, sep_e) in seps {
        let part_end = sep_s;
        let mut seg_start = part_start;
        let mut pos = part_start;
        let mut prev_heading = false;
        while pos < part_end {
            let line_end = text[pos..part_end].find('\n').map_or(part_end, |k| pos + k);
            let line = &text[pos..line_end];
            let trimmed = line.trim_start();
            if trimmed.trim_end().is_empty() {
                if seg_start < pos {
                    out.push((seg_start, pos));
                }
                seg_start = line_end;
                prev_heading = false;
            } else {
                let heading = is_heading(trimmed);
                if pos > seg_start && (prev_heading || heading || is_list_item(trimmed)) {
                    out.push((seg_start, pos));
                    seg_start = pos;
                }
                prev_heading = heading;
            }
            pos = line_end + 1;
        }
        if seg_start < part_end {
            out.push((seg_start, part_end));
        }
        part_start = sep_e;
    }
    out
}

/// A Markdown ATX heading: one to six '#' then a space or the line's end.
pub(super) fn is_heading(line: &str) -> bool {
    let hashes = line.bytes().take_while(|&c| c == b'#').count();
    (1..=6).contains(&hashes)
        && line[hashes..]
            .chars()
            .next()
            .is_none_or(char::is_whitespace)
}

/// A Markdown list marker: "- ", "* ", "+ ", "• ", or 1-9 digits then "." or ")" and a space.
pub(super) fn is_list_item(line: &str) -> bool {
    let mut chars = line.chars();
    match chars.next() {
        Some('-' | '*' | '+' | '•') => chars.next().is_some_and(char::is_whitespace),
        Some(c) if c.is_ascii_digit() => {
            let digits = line.bytes().take_while(u8::is_ascii_digit).count();
            let rest = &line.as_bytes()[digits..];
            digits <= 9
                && rest.len() >= 2
                && (rest[0] == b'.' || rest[0] == b')')
                && rest[1].is_ascii_whitespace()
        }
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The byte-by-byte walk the memchr versions replaced: the reference they must agree with.
    fn walk(b: &[u8], idx: impl Iterator<Item = usize>, lines: bool) -> Option<usize> {
        let mut first = None;
        for i in idx {
            match b[i] {
                b'\n' if lines || first.is_some() => return Some(first.unwrap_or(i)),
                b'\n' => first = Some(i),
                b' ' | b'\t' | b'\r' => {}
                _ => first = None,
            }
        }
        None
    }

    /// Every window of texts built from the characters that matter (newline, the blank bytes, a
    /// letter), at every position, in both directions and both modes.
    #[test]
    fn paragraph_breaks_agree_with_the_byte_walk() {
        let alphabet = [b'\n', b' ', b'\t', b'\r', b'a'];
        let mut texts: Vec<Vec<u8>> = vec![Vec::new()];
        for _ in 0..6 {
            texts = texts
                .iter()
                .flat_map(|t| {
                    alphabet.iter().map(move |&c| {
                        let mut t = t.clone();
                        t.push(c);
                        t
                    })
                })
                .collect();
        }
        let mut checked = 0;
        for t in &texts {
            for pos in 0..=t.len() {
                for lo in 0..=pos {
                    for lines in [false, true] {
                        assert_eq!(
                            paragraph_break_before(t, lo, pos, lines),
                            walk(t, (lo..pos).rev(), lines),
                            "{t:?} {lo} {pos} {lines}"
                        );
                    }
                }
                for hi in pos..=t.len() {
                    for lines in [false, true] {
                        assert_eq!(
                            paragraph_break_after(t, pos, hi, lines),
                            walk(t, pos..hi, lines),
                            "{t:?} {pos} {hi} {lines}"
                        );
                        checked += 1;
                    }
                }
            }
        }
        assert!(checked > 100_000, "{checked}");
    }
}
