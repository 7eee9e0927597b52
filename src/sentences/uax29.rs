//! UAX #29 sentence-break candidates for one hard block, with a fast path for ASCII contexts.
//!
//! Inside a hard block (newlines flattened to spaces, other separators ending blocks) the only
//! breaks the UAX #29 rules can give are after a sentence terminator (SB11). Whether a terminator
//! gives one depends on a short window: the character before a full stop (SB7), the character
//! after it (SB6), then `Close* Sp*` and, for a full stop, the look-ahead to the next letter
//! (SB8), and the character after the spaces (SB8a). When that whole window is ASCII, the classes
//! are fixed and the decision is made here in a few byte comparisons. When any character of a
//! window is not ASCII, or a non-ASCII character of the block might itself end a sentence, the
//! whole block goes to `unicode-segmentation`, which stays the reference: a property test and a
//! corpus test check that both give the same breaks.
//!
//! This exists for speed: the reference walks a state machine and a table lookup per character,
//! which was about a fifth of `extract`'s time on scientific text, where most blocks have
//! non-ASCII characters (dashes, Greek letters, units) but almost never next to a full stop.

use unicode_segmentation::UnicodeSegmentation;

/// End offsets (into `flat`) of the UAX #29 sentences of `flat`, the last one being `flat.len()`
/// for a non-empty `flat`: the same list as `split_sentence_bound_indices` gives.
pub(super) fn sentence_ends(flat: &str, out: &mut Vec<usize>) {
    out.clear();
    if !ascii_context_ends(flat, out) {
        out.clear();
        out.extend(
            flat.split_sentence_bound_indices()
                .map(|(off, piece)| off + piece.len()),
        );
    }
}

/// The fast path: `false` when some decision needs the Unicode tables. Only terminators and
/// non-ASCII characters ask for a decision, so the scan jumps from one terminator to the next
/// (memchr) and looks at the characters in between only when they are not all ASCII.
fn ascii_context_ends(flat: &str, out: &mut Vec<usize>) -> bool {
    let b = flat.as_bytes();
    let n = b.len();
    // Paragraph separators (SB4): a flattened block never has them.
    if memchr::memchr2(b'\n', b'\r', b).is_some() {
        return false;
    }
    let mut i = 0;
    while i < n {
        let t = memchr::memchr3(b'.', b'!', b'?', &b[i..]).map_or(n, |k| i + k);
        if !b[i..t].is_ascii()
            && flat[i..t]
                .chars()
                .any(|c| !c.is_ascii() && may_end_sentence(c))
        {
            return false;
        }
        if t == n {
            break;
        }
        match after_terminator(b, t) {
            Some(Next::Break(at)) => {
                out.push(at);
                i = at;
            }
            Some(Next::NoBreak(at)) => i = at,
            None => return false,
        }
    }
    if n > 0 {
        out.push(n);
    }
    true
}

/// What a terminator leads to.
enum Next {
    /// A sentence break at this offset.
    Break(usize),
    /// No break; scanning resumes at this offset.
    NoBreak(usize),
}

/// Apply SB6–SB11 to the terminator at `t`; `None` when the window holds a non-ASCII character.
fn after_terminator(b: &[u8], t: usize) -> Option<Next> {
    let n = b.len();
    let full_stop = b[t] == b'.';
    let j = t + 1;
    let Some(&next) = b.get(j) else {
        return Some(Next::NoBreak(n));
    };
    if next >= 0x80 {
        return None;
    }
    if full_stop {
        // SB6: "3.5".
        if next.is_ascii_digit() {
            return Some(Next::NoBreak(j));
        }
        // SB7: "U.S".
        if next.is_ascii_uppercase() && t > 0 {
            let prev = b[t - 1];
            if prev >= 0x80 {
                return None;
            }
            if prev.is_ascii_alphabetic() {
                return Some(Next::NoBreak(j));
            }
        }
    }
    // SB9, SB10: closing brackets and quotes, then spaces, stay with the sentence.
    let mut m = j;
    while m < n && matches!(b[m], b'"' | b'\'' | b'(' | b')' | b'[' | b']' | b'{' | b'}') {
        m += 1;
    }
    while m < n && matches!(b[m], b' ' | b'\t' | 0x0B | 0x0C) {
        m += 1;
    }
    let Some(&first) = b.get(m) else {
        return Some(Next::NoBreak(n));
    };
    if first >= 0x80 {
        return None;
    }
    // SB8: after a full stop, no break when the next letter is lowercase.
    if full_stop {
        for &x in &b[m..] {
            if x >= 0x80 {
                return None;
            }
            if x.is_ascii_lowercase() {
                return Some(Next::NoBreak(m));
            }
            if x.is_ascii_uppercase() || matches!(x, b'.' | b'!' | b'?' | b'\n' | b'\r') {
                break;
            }
        }
    }
    // SB8a: a comma, dash, colon, semicolon or another terminator continues the sentence.
    if matches!(first, b',' | b'-' | b':' | b';' | b'.' | b'!' | b'?') {
        return Some(Next::NoBreak(m));
    }
    Some(Next::Break(m))
}

/// Whether a non-ASCII character is a sentence terminator or a paragraph separator for UAX #29.
/// Asked of the reference itself: "c A" has a break before "A" exactly in those cases (SB4, SB11;
/// an extending or format character at the start attaches to nothing and breaks nothing).
fn may_end_sentence(c: char) -> bool {
    if c.is_alphabetic() && c.is_lowercase() {
        // Lowercase letters are never terminators (their class is Lower); the common case in
        // scientific text (Greek letters, micro signs) skips the probe.
        return false;
    }
    let mut buf = [0u8; 6];
    let len = c.len_utf8();
    c.encode_utf8(&mut buf[..len]);
    buf[len] = b' ';
    buf[len + 1] = b'A';
    match std::str::from_utf8(&buf[..len + 2]) {
        Ok(s) => s.split_sentence_bounds().nth(1).is_some(),
        Err(_) => true,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn reference(flat: &str) -> Vec<usize> {
        flat.split_sentence_bound_indices()
            .map(|(off, piece)| off + piece.len())
            .collect()
    }

    fn fast(flat: &str) -> Vec<usize> {
        let mut out = Vec::new();
        sentence_ends(flat, &mut out);
        out
    }

    #[test]
    fn agrees_on_hand_picked_windows() {
        for s in [
            "",
            ".",
            "?!",
            "Rain fell. The river rose.",
            "It rose (sharply). Then it fell.",
            "It rose.) Then",
            "It rose. (Then) it fell.",
            "See e.g. the map. Done",
            "The U.S. Army. It",
            "U.S.A",
            "pH 7.4 at 3.5 M.",
            "It rose... and fell... Then.",
            "Stop!Now? yes. no.",
            "Heat. β-cells respond.",
            "Heat.\u{301} Then",
            "Heat.\u{2019} Then",
            "Heat\u{3002} Then",
            "Heat\u{2024} Then",
            "Is it? - yes; no.",
            "End. 5 more. 6 Items",
            "a.\t\u{b}B",
        ] {
            assert_eq!(fast(s), reference(s), "{s:?}");
        }
    }

    #[test]
    fn the_fast_path_takes_ascii_windows() {
        // Non-ASCII away from every terminator stays on the fast path.
        let mut out = Vec::new();
        let s = "The 5 µm β–γ bands rose. Then “it” fell.";
        assert!(ascii_context_ends(s, &mut out));
        assert_eq!(out, vec![s.find("Then").unwrap_or(0), s.len()]);
        assert!(!ascii_context_ends("Heat. β-cells", &mut out));
        assert!(!ascii_context_ends("Heat\u{3002} Then", &mut out));
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(4000))]
        /// Any mix of the characters the rules care about gives the reference's breaks.
        #[test]
        fn agrees_with_unicode_segmentation(s in proptest::string::string_regex(
            "[aAzZ09 .!?,;:\\-\"'()\\[\\]{}\t\u{b}\u{c}µβΣ’“\u{301}\u{ad}\u{3002}\u{2024}\u{ff01}\u{a0}\u{2013}]{0,40}"
        ).expect("valid regex")) {
            prop_assert_eq!(fast(&s), reference(&s));
        }
    }

    /// The same over real scientific text: every line of the eLife articles (990 open-access
    /// articles; ../shared/data/elife-articles/SOURCE.txt), flattened as the splitter does.
    #[test]
    fn agrees_on_elife_lines() {
        let lines = crate::testdata::elife_lines(120);
        if lines.is_empty() {
            return;
        }
        let mut fast_lines = 0usize;
        let mut out = Vec::new();
        for (path, line) in &lines {
            out.clear();
            if ascii_context_ends(line, &mut out) {
                fast_lines += 1;
            }
            assert_eq!(fast(line), reference(line), "{}: {line:?}", path.display());
        }
        assert!(lines.len() > 1000, "too few lines: {}", lines.len());
        eprintln!(
            "eLife: {fast_lines} of {} lines on the fast path",
            lines.len()
        );
    }
}
