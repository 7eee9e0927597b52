//! Repairs: each candidate break is kept, moved or dropped by cheap checks of its surroundings
//! (abbreviations, initials, decimals and numbered items, citation brackets), and mixed-case
//! sentence starts ("mRNA levels fell") are added as candidates.

/// How far (bytes) the bracket checks look around a break.
pub(super) const BRACKET_WINDOW: usize = 300;

/// When an abbreviation before a break means the break is wrong.
#[derive(Clone, Copy)]
pub(super) enum Cond {
    /// Never ends a sentence in practice.
    Always,
    /// Merge only when the next word starts lowercase or with a digit.
    LowerOrDigit,
    /// Merge only when the next word is a number.
    Digit,
}

/// Abbreviations ending in '.', grouped by when they cancel a break; matched
/// case-insensitively, starting at a word boundary.
pub(super) const ABBREVIATIONS: &[(Cond, &[&str])] = &[
    (
        Cond::Always,
        &[
            "e.g.", "i.e.", "fig.", "figs.", "eq.", "eqs.", "ref.", "refs.", "sec.", "dr.", "mr.",
            "mrs.", "ms.", "prof.", "st.", "vs.", "cf.", "approx.", "ca.", "u.s.", "u.k.",
        ],
    ),
    (
        Cond::LowerOrDigit,
        &[
            "et al.", "etc.", "jan.", "feb.", "mar.", "apr.", "jun.", "jul.", "aug.", "sep.",
            "sept.", "oct.", "nov.", "dec.", "inc.", "ltd.", "co.", "ph.d.", "a.m.", "p.m.",
        ],
    ),
    (Cond::Digit, &["no.", "nos.", "vol.", "pp."]),
];

/// What to do with one candidate break.
pub(super) enum Decision {
    Keep,
    Merge,
    /// Keep a break, but at this offset instead (after a citation bracket).
    MoveTo(usize),
}

/// Add candidate breaks before a sentence that opens with a word written lower-case first and
/// upper-case inside ("mRNA levels fell.", "mTOR", "iPSCs", "pH"), after a terminator, closing
/// brackets or quotes, and whitespace. UAX #29 never breaks before a lower-case letter, so in
/// biomedical text such sentences were glued to the one before. The candidates then go through
/// [`decide`] like any other ("e.g. mRNA" stays one sentence). `ends` stays sorted.
pub(super) fn mixed_case_starts(flat: &str, ends: &mut Vec<usize>) {
    let b = flat.as_bytes();
    let mut added = false;
    for t in memchr::memchr3_iter(b'.', b'?', b'!', b) {
        let mut i = t + 1;
        while i < b.len() && matches!(b[i], b')' | b']' | b'"' | b'\'') {
            i += 1;
        }
        let gap = b[i..]
            .iter()
            .take_while(|c| c.is_ascii_whitespace())
            .count();
        if gap == 0 {
            continue;
        }
        let w = i + gap;
        let len = b[w..]
            .iter()
            .take(16)
            .take_while(|c| c.is_ascii_alphanumeric())
            .count();
        let word = &b[w..w + len];
        let mixed = word.first().is_some_and(u8::is_ascii_lowercase)
            && word[1..].iter().any(u8::is_ascii_uppercase);
        if mixed {
            ends.push(w);
            added = true;
        }
    }
    if added {
        ends.sort_unstable();
        ends.dedup();
    }
}

/// Decide whether the candidate break at `b` (current sentence starts at `cur`) stands.
pub(super) fn decide(text: &str, cur: usize, b: usize, e: usize) -> Decision {
    let left = text[cur..b].trim_end();
    let lend = cur + left.len();
    let rstart = b + (text[b..e].len() - text[b..e].trim_start().len());
    let right = &text[rstart..e];
    if left.is_empty() || right.is_empty() {
        return Decision::Keep;
    }
    let bytes = text.as_bytes();
    // A break inside a bracket: merge, or move the break past a citation that follows a stop.
    if let Some(open) = unclosed_open(bytes, cur.max(lend.saturating_sub(BRACKET_WINDOW)), lend) {
        let close_ch = if bytes[open] == b'(' { b')' } else { b']' };
        let limit = (open + BRACKET_WINDOW).min(e).max(b);
        if let Some(k) = bytes[b..limit].iter().position(|&c| c == close_ch) {
            let close = b + k;
            if ends_with_stop(text[cur..open].trim_end())
                && is_citation(bytes[open], &text[open + 1..close])
            {
                return Decision::MoveTo(citation_run(text, close + 1, e).unwrap_or(close + 1));
            }
            return Decision::Merge;
        }
    }
    // "... rises. [4] The next": the citation belongs to the sentence before.
    if ends_with_stop(left) {
        if let Some(after) = citation_run(text, rstart, e) {
            return Decision::MoveTo(after);
        }
    }
    if !left.ends_with('.') {
        return Decision::Keep;
    }
    let next = next_word_char(right);
    let lower_or_digit = next.is_some_and(|c| c.is_lowercase() || c.is_numeric());
    for &(cond, list) in ABBREVIATIONS {
        if list.iter().any(|abbr| ends_with_word_ci(left, abbr)) {
            let ok = match cond {
                Cond::Always => true,
                Cond::LowerOrDigit => lower_or_digit,
                Cond::Digit => next.is_some_and(char::is_numeric),
            };
            if ok {
                return Decision::Merge;
            }
        }
    }
    let token = left
        .rsplit(|c: char| c.is_whitespace() || "([\"'“‘".contains(c))
        .next()
        .unwrap_or("");
    // Initials: "J. R. Smith", "A. Author", "J.R. Smith".
    if is_initials(token) && right.chars().next().is_some_and(char::is_uppercase) {
        return Decision::Merge;
    }
    // A numbered item's marker alone ("1. Mix ...") or a number split at its dot ("2.1").
    let num = left[..left.len() - 1]
        .bytes()
        .rev()
        .take_while(u8::is_ascii_digit)
        .count();
    let marker = (1..=3).contains(&num) && left.len() == num + 1;
    let decimal = num >= 1 && b == lend && right.starts_with(|c: char| c.is_ascii_digit());
    if marker || decimal {
        return Decision::Merge;
    }
    Decision::Keep
}

/// If `text[pos..e]` starts (after whitespace) with one or more citation brackets, the offset
/// just past the last of them.
pub(super) fn citation_run(text: &str, mut pos: usize, e: usize) -> Option<usize> {
    let mut found = None;
    loop {
        let rest = &text[pos..e];
        let skipped = rest.len() - rest.trim_start().len();
        let rest = &rest[skipped..];
        let close_ch = match rest.as_bytes().first() {
            Some(b'(') => ')',
            Some(b'[') => ']',
            _ => return found,
        };
        let window = &rest.as_bytes()[..rest.len().min(BRACKET_WINDOW)];
        match window.iter().position(|&c| c == close_ch as u8) {
            Some(k) if is_citation(window[0], &rest[1..k]) => {
                pos += skipped + k + 1;
                found = Some(pos);
            }
            _ => return found,
        }
    }
}

/// The last '(' or '[' in `bytes[from..to]` that is not closed before `to`. The two kinds of
/// bracket are counted apart, so each is found with a reverse memchr over its own two bytes
/// and the later of the two is the answer; most windows hold no bracket at all.
pub(super) fn unclosed_open(bytes: &[u8], from: usize, to: usize) -> Option<usize> {
    let window = &bytes[from..to];
    let last = |open: u8, close: u8| {
        let mut depth = 0usize;
        for k in memchr::memrchr2_iter(open, close, window) {
            if window[k] == close {
                depth += 1;
            } else if depth == 0 {
                return Some(from + k);
            } else {
                depth -= 1;
            }
        }
        None
    };
    last(b'(', b')').max(last(b'[', b']'))
}

/// Whether `s` ends with a sentence-final stop, possibly followed by closing quotes.
pub(super) fn ends_with_stop(s: &str) -> bool {
    s.trim_end_matches(['"', '\'', '”', '’'])
        .ends_with(['.', '!', '?'])
}

/// Whether bracket content looks like a citation: "4", "4, 5", "4–6" in either bracket, or
/// "(Author et al., 2019)" / "(2019a)" in parentheses.
pub(super) fn is_citation(open: u8, content: &str) -> bool {
    let c = content.trim();
    if c.is_empty() || c.len() > 120 {
        return false;
    }
    let numeric = c
        .chars()
        .all(|ch| ch.is_ascii_digit() || " ,;-–—".contains(ch))
        && c.bytes().any(|ch| ch.is_ascii_digit());
    if numeric || open == b'[' {
        return numeric;
    }
    let c = c.trim_end_matches(|ch: char| ch.is_ascii_lowercase());
    let year = c.len() - c.trim_end_matches(|ch: char| ch.is_ascii_digit()).len();
    year == 4
}

/// `s` ends with `word` (ASCII case-insensitive), and `word` starts at a word boundary.
pub(super) fn ends_with_word_ci(s: &str, word: &str) -> bool {
    let (sb, wb) = (s.as_bytes(), word.as_bytes());
    if sb.len() < wb.len() || !sb[sb.len() - wb.len()..].eq_ignore_ascii_case(wb) {
        return false;
    }
    let before = &s[..s.len() - wb.len()];
    !before
        .chars()
        .next_back()
        .is_some_and(|c| c.is_alphanumeric() || c == '.')
}

/// One or more "X." with X an uppercase letter: "J.", "J.R.".
pub(super) fn is_initials(token: &str) -> bool {
    let mut chars = token.chars();
    let mut count = 0;
    while let Some(c) = chars.next() {
        if !c.is_uppercase() || chars.next() != Some('.') {
            return false;
        }
        count += 1;
    }
    count > 0
}

/// The first alphanumeric char of `s`, skipping opening brackets and quotes.
pub(super) fn next_word_char(s: &str) -> Option<char> {
    s.chars()
        .find(|c| !"([{\"'“‘".contains(*c))
        .filter(|c| c.is_alphanumeric())
}
