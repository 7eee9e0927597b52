//! Tokens: the words and punctuation marks of a sentence, with byte offsets. The span finder,
//! the tagger's input, the confidence features and span scoring in `evaluate` all count in these
//! tokens.

use crate::extract::tagger::Tag;
use compact_str::CompactString;
use regex::Regex;
use std::sync::OnceLock;

/// A word or punctuation mark of a sentence; offsets are bytes into the sentence.
#[derive(Debug, Clone)]
pub struct Token {
    pub start: usize,
    pub end: usize,
    /// Lower-cased, with ’ as '. Inline up to 24 bytes: no allocation for almost any word.
    pub lower: CompactString,
    pub word: bool,
    /// The token starts with an upper-case letter.
    pub capital: bool,
    /// Part of speech, filled in for the words of a cue's tagging window (`claims/window.rs`).
    pub tag: Option<Tag>,
}

fn token_regex() -> &'static Regex {
    static RE: OnceLock<Regex> = OnceLock::new();
    RE.get_or_init(|| {
        Regex::new(r"[\p{L}\p{N}]+(?:['’\-.][\p{L}\p{N}]+)*|\S")
            .expect("static token regex is valid")
    })
}

/// A token's lower-case form with the typographic apostrophe made plain (inline: no allocation
/// for a word of up to 24 bytes).
fn lower_word(s: &str) -> CompactString {
    if s.is_ascii() {
        let mut lower = CompactString::from(s);
        lower.make_ascii_lowercase();
        return lower;
    }
    let lower = s.to_lowercase();
    CompactString::from(if lower.contains('’') {
        lower.replace('’', "'")
    } else {
        lower
    })
}

/// Split a sentence into tokens.
pub fn tokenize(sentence: &str) -> Vec<Token> {
    let mut out = Vec::with_capacity(sentence.len() / 5 + 1);
    each_token_span(sentence, |start, end| {
        let s = &sentence[start..end];
        let first = s.chars().next();
        out.push(Token {
            start,
            end,
            lower: lower_word(s),
            word: first.is_some_and(char::is_alphanumeric),
            capital: first.is_some_and(char::is_uppercase),
            tag: None,
        });
        true
    });
    out
}

/// Whether `text` has a word and the lower-case form of each of its words (the tokens
/// [`tokenize`] marks `word`) passes `pred`. Stops at the first word that fails, and builds no
/// tokens: span checks ask this of every claim's slots.
pub fn every_word(text: &str, mut pred: impl FnMut(&str) -> bool) -> bool {
    let (mut any, mut all) = (false, true);
    each_token_span(text, |start, end| {
        let s = &text[start..end];
        if !s.chars().next().is_some_and(char::is_alphanumeric) {
            return true;
        }
        any = true;
        all = pred(&lower_word(s));
        all
    });
    any && all
}

/// Unicode `White_Space` in ASCII: what the token regex's `\S` skips (note: vertical tab too).
fn ascii_space(b: u8) -> bool {
    matches!(b, b'\t' | b'\n' | 0x0B | 0x0C | b'\r' | b' ')
}

/// The byte ranges of the token regex's matches, collected (the tests compare them with the
/// regex's).
#[cfg(test)]
fn token_spans(s: &str) -> Vec<(usize, usize)> {
    let mut out = Vec::with_capacity(s.len() / 5 + 1);
    each_token_span(s, |a, b| {
        out.push((a, b));
        true
    });
    out
}

/// Call `f` with the byte range of each of the token regex's matches, in order, until it
/// returns `false`. Tokenising was
/// a tenth of extraction, most of it the regex stepping through UTF-8: a token made of ASCII is
/// found here by hand, and only a token that starts with, or runs into, a non-ASCII character
/// is left to the regex.
fn each_token_span(s: &str, mut f: impl FnMut(usize, usize) -> bool) {
    let b = s.as_bytes();
    let mut i = 0;
    // The regex's match from `at` (a place where a match may start), or `None` when none is left.
    let by_regex = |at: usize| token_regex().find_at(s, at).map(|m| (m.start(), m.end()));
    while i < b.len() {
        let c = b[i];
        if ascii_space(c) {
            i += 1;
            continue;
        }
        let token = if !c.is_ascii() {
            // Typographic punctuation (quotes, dashes) is a token of its own: a character
            // that is neither alphanumeric (so in neither `\p{L}` nor `\p{N}`) nor a space is
            // what the regex's `\S` alone matches. Anything else the regex decides.
            match s[i..].chars().next() {
                Some(ch) if !ch.is_alphanumeric() && !ch.is_whitespace() => {
                    Some((i, i + ch.len_utf8()))
                }
                _ => by_regex(i),
            }
        } else if !c.is_ascii_alphanumeric() {
            Some((i, i + 1))
        } else {
            let start = i;
            loop {
                while i < b.len() && b[i].is_ascii_alphanumeric() {
                    i += 1;
                }
                match (b.get(i), b.get(i + 1)) {
                    // A joiner and a letter or digit after it: the token goes on.
                    (Some(b'\'' | b'-' | b'.'), Some(n)) if n.is_ascii_alphanumeric() => i += 2,
                    // A non-ASCII character right after the run: the typographic apostrophe
                    // joins like the plain one when a letter or digit in ASCII follows it, and
                    // ends the token before itself when an ASCII character that is none (or
                    // nothing) follows; any other character that is not alphanumeric ends the
                    // token before itself. Anything else may be a letter: the regex decides.
                    (Some(x), _) if !x.is_ascii() => match s[i..].chars().next() {
                        Some('’') => match b.get(i + 3) {
                            Some(n) if n.is_ascii_alphanumeric() => i += 4,
                            Some(n) if n.is_ascii() => break Some((start, i)),
                            None => break Some((start, i)),
                            Some(_) => break by_regex(start),
                        },
                        Some(ch) if !ch.is_alphanumeric() => break Some((start, i)),
                        _ => break by_regex(start),
                    },
                    (Some(b'\'' | b'-' | b'.'), Some(n)) if !n.is_ascii() => break by_regex(start),
                    _ => break Some((start, i)),
                }
            }
        };
        match token {
            Some(m) => {
                if !f(m.0, m.1) {
                    break;
                }
                i = m.1;
            }
            None => break,
        }
    }
}

/// The token range `[a, b)` that covers the byte range `start..end` of the sentence.
pub(super) fn token_range(toks: &[Token], start: usize, end: usize) -> (usize, usize) {
    let a = toks
        .iter()
        .position(|t| t.end > start)
        .unwrap_or(toks.len());
    let b = toks
        .iter()
        .rposition(|t| t.start < end)
        .map(|i| i + 1)
        .unwrap_or(a);
    (a, b.max(a))
}

/// Collapse whitespace runs (line breaks included) to single spaces, and trim: the words of
/// `s.split_whitespace()` joined by one space. Every claim's sentence and span texts go through
/// here, so it works on bytes: only the four lead bytes of the non-ASCII `White_Space`
/// characters (U+0085 and U+00A0; U+1680; U+2000 to U+205F; U+3000) are decoded.
pub fn collapse(s: &str) -> String {
    let b = s.as_bytes();
    let mut out = String::with_capacity(s.len());
    let mut word: Option<usize> = None;
    let mut i = 0;
    while i < b.len() {
        let space = match b[i] {
            b'\t' | b'\n' | 0x0B | 0x0C | b'\r' | b' ' => 1,
            0xC2 | 0xE1 | 0xE2 | 0xE3 => s[i..]
                .chars()
                .next()
                .filter(|c| c.is_whitespace())
                .map_or(0, char::len_utf8),
            _ => 0,
        };
        if space == 0 {
            word.get_or_insert(i);
            i += 1;
            continue;
        }
        if let Some(w) = word.take() {
            if !out.is_empty() {
                out.push(' ');
            }
            out.push_str(&s[w..i]);
        }
        i += space;
    }
    if let Some(w) = word {
        if !out.is_empty() {
            out.push(' ');
        }
        out.push_str(&s[w..]);
    }
    out
}

#[cfg(test)]
mod token_tests {
    use super::*;
    use proptest::prelude::*;

    fn by_regex(s: &str) -> Vec<(usize, usize)> {
        token_regex()
            .find_iter(s)
            .map(|m| (m.start(), m.end()))
            .collect()
    }

    proptest! {
        /// The hand-found tokens are the token regex's, over the characters its rules and the
        /// fast path care about: ASCII letters, digits, joiners, spaces (vertical tab and
        /// no-break space among them), letters and a combining mark outside ASCII, the
        /// typographic apostrophe.
        #[test]
        fn tokens_agree_with_the_regex(s in proptest::string::string_regex(
            "[aZ09 .'\\-,;()\t\u{b}\u{c}\r\n\u{0}\u{7f}µαé\u{301}\u{345}’‘“”—…\u{a0}\u{2009}\u{2013}\u{2160}\u{b2}]{0,30}"
        ).expect("valid regex")) {
            prop_assert_eq!(token_spans(&s), by_regex(&s));
        }
    }

    proptest! {
        /// `every_word` answers what a filter over `tokenize`'s words does.
        #[test]
        fn every_word_agrees_with_the_tokens(s in proptest::string::string_regex(
            "(two|Two|40|°C|%|x|é|,|-| |’s){0,6}"
        ).expect("valid regex")) {
            let pred = |w: &str| w.starts_with(|c: char| c.is_ascii_digit()) || w == "two" || w == "°c";
            let toks = tokenize(&s);
            let mut words = toks.iter().filter(|t| t.word).peekable();
            let expected = words.peek().is_some() && words.all(|t| pred(&t.lower));
            prop_assert_eq!(every_word(&s, pred), expected);
        }
    }

    proptest! {
        /// `collapse` is the words of `split_whitespace` joined by one space, over ASCII and
        /// Unicode spaces (every non-ASCII `White_Space` character, and neighbours of theirs
        /// that share a lead byte and are not spaces), letters and line breaks.
        #[test]
        fn collapse_joins_the_words_split_whitespace_gives(s in proptest::string::string_regex(
            "[a é\t\n\r\u{b}\u{c}\u{1c}\u{85}\u{a0}\u{a9}\u{1680}\u{1681}\u{2000}\u{200a}\u{200b}\u{2028}\u{2029}\u{202f}\u{205f}\u{2060}\u{3000}\u{3001}’]{0,30}"
        ).expect("valid regex")) {
            let words: Vec<&str> = s.split_whitespace().collect();
            prop_assert_eq!(collapse(&s), words.join(" "));
        }
    }

    /// And over real scientific text: every non-empty line of 120 eLife articles (990 open-access
    /// articles; ../shared/data/elife-articles/SOURCE.txt).
    #[test]
    fn tokens_agree_on_elife_lines() {
        let lines = crate::testdata::elife_lines(120);
        if lines.is_empty() {
            return;
        }
        for (path, line) in &lines {
            assert_eq!(
                token_spans(line),
                by_regex(line),
                "{}: {line:?}",
                path.display()
            );
        }
        assert!(lines.len() > 1000, "too few lines: {}", lines.len());
    }
}
