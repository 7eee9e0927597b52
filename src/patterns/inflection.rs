//! Inflection: `word~` expanded into a verb's forms, by regular rules and the irregular verbs of
//! `irregular-verbs.tsv`; `word+` into a noun and its plural.

use super::invalid;
use crate::error::InputError;
use std::collections::{HashMap, HashSet};
use std::path::Path;

pub(super) fn word_forms(word: &str, irregular: &Irregular) -> Result<Vec<String>, String> {
    if let Some(base) = word.strip_suffix('+') {
        // A noun with its plural.
        let forms = word_forms(base, irregular)?;
        let b = base.as_bytes();
        let plural = if base.ends_with('s')
            || base.ends_with('x')
            || base.ends_with("ch")
            || base.ends_with("sh")
        {
            format!("{base}es")
        } else if b.len() > 1 && b[b.len() - 1] == b'y' && !is_vowel(b[b.len() - 2]) {
            format!("{}ies", &base[..base.len() - 1])
        } else {
            format!("{base}s")
        };
        return Ok(forms.into_iter().chain(std::iter::once(plural)).collect());
    }
    let (base, inflect) = match word.strip_suffix('~') {
        Some(b) => (b, true),
        None => (word, false),
    };
    if base.is_empty()
        || !base
            .chars()
            .all(|c| c.is_alphanumeric() || c == '-' || c == '\'')
    {
        return Err(format!(
            "bad literal '{word}': use letters, digits, '-' or '\\''"
        ));
    }
    if base.chars().any(|c| c.is_uppercase()) {
        return Err(format!(
            "literal '{word}' must be lower-case (CAUSE and EFFECT are the only upper-case tokens)"
        ));
    }
    Ok(if inflect {
        inflect_verb(base, irregular)
    } else {
        vec![base.to_string()]
    })
}

/// Irregular verb forms: base → (past, past participle).
pub type Irregular = HashMap<String, (Vec<String>, Vec<String>)>;

/// Parse `irregular-verbs.tsv`: `base<TAB>past<TAB>participle`, with `/` between variants.
pub fn parse_irregular(path: &Path, text: &str) -> Result<Irregular, InputError> {
    let mut map = Irregular::new();
    for (i, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = line.split('\t').map(str::trim).collect();
        if cols.len() != 3 || cols.iter().any(|c| c.is_empty()) {
            return Err(invalid(
                path,
                i + 1,
                "expected three tab-separated columns: base, past, past participle",
            ));
        }
        let split = |s: &str| {
            s.split('/')
                .map(|x| x.trim().to_lowercase())
                .collect::<Vec<_>>()
        };
        map.insert(cols[0].to_lowercase(), (split(cols[1]), split(cols[2])));
    }
    Ok(map)
}

fn is_vowel(c: u8) -> bool {
    matches!(c, b'a' | b'e' | b'i' | b'o' | b'u')
}

/// The inflected forms of a verb: base, third person, past, participle and gerund.
pub fn inflect_verb(base: &str, irregular: &Irregular) -> Vec<String> {
    let b = base.as_bytes();
    let n = b.len();
    let last = b.last().copied().unwrap_or(b'x');
    let mut forms = vec![base.to_string()];
    // The two verbs whose present tense is irregular too.
    match base {
        "have" => forms.push("has".into()),
        "be" => forms.extend(["is", "are", "am", "was", "were", "been", "being"].map(String::from)),
        _ => {}
    }
    // Third person singular.
    if base.ends_with('s')
        || base.ends_with('x')
        || base.ends_with('z')
        || base.ends_with("ch")
        || base.ends_with("sh")
    {
        forms.push(format!("{base}es"));
    } else if last == b'y' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{}ies", &base[..n - 1]));
    } else if last == b'o' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{base}es"));
    } else {
        forms.push(format!("{base}s"));
    }
    // A final consonant after a single vowel may double ("stop" → "stopped"); both spellings are
    // kept, since a wrong one simply never occurs in text.
    let cvc = n >= 3
        && !is_vowel(last)
        && !matches!(last, b'w' | b'x' | b'y')
        && is_vowel(b[n - 2])
        && !is_vowel(b[n - 3]);
    let stems: Vec<String> = if cvc {
        vec![base.to_string(), format!("{base}{}", last as char)]
    } else {
        vec![base.to_string()]
    };
    if let Some((past, part)) = irregular.get(base) {
        forms.extend(past.iter().cloned());
        forms.extend(part.iter().cloned());
    } else if last == b'e' {
        forms.push(format!("{base}d"));
    } else if last == b'y' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{}ied", &base[..n - 1]));
    } else {
        forms.extend(stems.iter().map(|s| format!("{s}ed")));
    }
    // Gerund.
    if base.ends_with("ie") {
        forms.push(format!("{}ying", &base[..n - 2]));
    } else if last == b'e' && !base.ends_with("ee") && n > 2 {
        forms.push(format!("{}ing", &base[..n - 1]));
    } else {
        forms.extend(stems.iter().map(|s| format!("{s}ing")));
    }
    let mut seen = HashSet::new();
    forms.retain(|f| seen.insert(f.clone()));
    forms
}
