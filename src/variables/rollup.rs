//! Rolling variables up: the short and long forms of an abbreviation as one variable, and every
//! qualified variable as its head ("increased nitrogen runoff from fertilised fields" counted
//! as "nitrogen runoff").
//!
//! A roll-up is an alias map, composed after the user's aliases, so every query and export
//! gets it through the path aliases already take (keys are resolved when the graph is built and
//! when a name is looked up). It is built from what the store keeps per file: the head key of
//! each variable key (the claims' `head_key`) and the corpus's abbreviation definitions.
//!
//! For each variable key `k` of the store (and each alias source and short form, so that a name
//! typed in a query resolves as the variables do), in this order:
//! 1. the user's aliases: `u = aliases(k)`;
//! 2. at the head level, `u`'s head key (the one most of its claim slots have; a key the store
//!    has no head for is its own head);
//! 3. abbreviations: a key that is a short form's key becomes its long form's key ("soc" →
//!    "soil organ carbon") when the corpus defines the short form one way only, in at least
//!    [`MIN_DOCUMENTS`] documents, and it is one word with a capital letter. A short form
//!    defined two ways is left alone, and so is a word of the language in parentheses ("(or
//!    more)"). Only whole keys: "IL" defined as "infralimbic cortex" must not turn "IL-6 level"
//!    into anything; a wrong merge joins two concepts, a missed one leaves two nodes apart;
//! 4. the user's aliases again, so a head or long form the user named goes where the user said.

use super::abbrev::Abbreviations;
use super::{Aliases, Normalizer};
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet, HashMap};

/// The level at which queries and exports count variables.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Level {
    /// Each variable key as extracted (after the user's aliases): the default.
    #[default]
    Variable,
    /// Short and long forms of an unambiguous abbreviation as one variable.
    Abbreviation,
    /// Also every qualified variable as its head.
    Head,
}

impl Level {
    pub fn as_str(self) -> &'static str {
        match self {
            Level::Variable => "variable",
            Level::Abbreviation => "abbreviation",
            Level::Head => "head",
        }
    }
    pub fn is_variable(&self) -> bool {
        *self == Level::Variable
    }
}

/// A short form that may stand for its long form anywhere in the corpus: one word with a
/// capital letter ("SOC", "IL-6", "mRNA"). Lower-case words in parentheses ("(or more)",
/// "(light)") pass the published test in the "long form (SHORT)" order, but are words of the
/// language that turning into a long form everywhere would corrupt.
fn looks_like_short_form(short: &str) -> bool {
    short.chars().any(char::is_uppercase) && !short.contains(char::is_whitespace)
}

/// Short-form key → long-form key, for short forms every defining document gave one meaning
/// (by key: "CO2" and "co2" are one short form) and at least [`MIN_DOCUMENTS`] documents define.
fn unambiguous(abbreviations: &Abbreviations, normalizer: &Normalizer) -> HashMap<String, String> {
    let mut longs: HashMap<String, BTreeMap<String, usize>> = HashMap::new();
    for (short, long_key, documents) in abbreviations.meanings() {
        if !looks_like_short_form(short) {
            continue;
        }
        let sk = normalizer.key(short);
        if !sk.is_empty() && sk != long_key {
            *longs
                .entry(sk)
                .or_default()
                .entry(long_key.to_string())
                .or_default() += documents;
        }
    }
    longs
        .into_iter()
        .filter(|(_, l)| l.len() == 1)
        .filter_map(|(s, l)| l.into_iter().next().map(|l| (s, l)))
        .filter(|(_, (_, docs))| *docs >= MIN_DOCUMENTS)
        .map(|(s, (l, _))| (s, l))
        .collect()
}

/// A short form becomes a corpus-wide alias only when this many documents define it (the same
/// way): one document's "DO (dorsal organ)" must not rename every other document's "DO".
pub const MIN_DOCUMENTS: usize = 2;

/// The aliases that count variables at `level`: `user` (the aliases in force) composed with the
/// roll-up (see the module notes). `heads` maps variable keys to head keys, as the store keeps
/// them; `abbreviations` are the corpus's definitions. At [`Level::Variable`] it is `user`.
pub fn roll_up(
    user: &Aliases,
    level: Level,
    heads: &HashMap<String, String>,
    abbreviations: &Abbreviations,
    normalizer: &Normalizer,
) -> Aliases {
    if level == Level::Variable {
        return user.clone();
    }
    let shorts = unambiguous(abbreviations, normalizer);
    let fold = |k: &str| -> String {
        let u = user.resolve(k);
        let h = match level {
            Level::Head => heads.get(u).map(String::as_str).unwrap_or(u),
            _ => u,
        };
        let e = shorts.get(h).map(String::as_str).unwrap_or(h);
        user.resolve(e).to_string()
    };
    let mut universe: BTreeSet<&str> = heads.keys().map(String::as_str).collect();
    universe.extend(user.map.keys().map(String::as_str));
    universe.extend(shorts.keys().map(String::as_str));
    let mut map = HashMap::new();
    for k in universe {
        let to = fold(k);
        if !to.is_empty() && to != k {
            map.insert(k.to_string(), to);
        }
    }
    Aliases { map, level }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn norm() -> Normalizer {
        Normalizer::new(&PatternSet::builtin().unwrap().lexicon)
    }

    fn pool(n: &Normalizer, defs: &[(&str, &str, &str)]) -> Abbreviations {
        let mut a = Abbreviations::default();
        for (doc, short, long) in defs {
            a.add_form(doc, short, long, &n.key(long));
        }
        a
    }

    #[test]
    fn variable_level_is_the_users_aliases() {
        let n = norm();
        let user = Aliases::new(&n, &[("algal blooms".into(), "algae bloom".into())]);
        let heads = HashMap::from([("increas nitrogen runoff".into(), "nitrogen runoff".into())]);
        let a = roll_up(
            &user,
            Level::Variable,
            &heads,
            &Abbreviations::default(),
            &n,
        );
        assert_eq!(
            a.resolve("increas nitrogen runoff"),
            "increas nitrogen runoff"
        );
        assert_eq!(a.resolve(&n.key("algal blooms")), n.key("algae bloom"));
        assert_eq!(a.level(), Level::Variable);
    }

    #[test]
    fn heads_and_abbreviations_compose_after_user_aliases() {
        let n = norm();
        let k = |s: &str| n.key(s);
        let heads = HashMap::from([
            (k("increased SOC"), k("SOC")),
            (k("SOC"), k("SOC")),
            (k("nitrogen runoff from fields"), k("nitrogen runoff")),
            (k("rainfall in spring"), k("rainfall")),
        ]);
        let abbr = pool(
            &n,
            &[
                ("a", "SOC", "soil organic carbon"),
                ("b", "SOC", "soil organic carbon"),
                // Defined two ways: stays apart.
                ("a", "PD", "Parkinson's disease"),
                ("b", "PD", "pharmacodynamics"),
            ],
        );
        // The user says the spring rainfall is its own variable, "spring rain".
        let user = Aliases::new(&n, &[("rainfall in spring".into(), "spring rain".into())]);
        let a = roll_up(&user, Level::Head, &heads, &abbr, &n);
        assert_eq!(a.level(), Level::Head);
        // The head first, then its long form.
        assert_eq!(a.resolve(&k("increased SOC")), k("soil organic carbon"));
        assert_eq!(a.resolve(&k("SOC")), k("soil organic carbon"));
        assert_eq!(a.resolve(&k("PD")), k("PD"));
        assert_eq!(
            a.resolve(&k("nitrogen runoff from fields")),
            k("nitrogen runoff")
        );
        // The user's alias decides first; its target is its own head.
        assert_eq!(a.resolve(&k("rainfall in spring")), k("spring rain"));
        // At the abbreviation level, qualifiers stay.
        let b = roll_up(&user, Level::Abbreviation, &heads, &abbr, &n);
        assert_eq!(b.resolve(&k("increased SOC")), k("increased SOC"));
        assert_eq!(b.resolve(&k("SOC")), k("soil organic carbon"));
        assert_eq!(
            b.resolve(&k("nitrogen runoff from fields")),
            k("nitrogen runoff from fields")
        );
        // A lower-case word in parentheses is never taken for a short form.
        let words = pool(
            &n,
            &[
                ("a", "or more", "of a body in each of three"),
                ("b", "or more", "of a body in each of three"),
            ],
        );
        let c = roll_up(&user, Level::Abbreviation, &heads, &words, &n);
        assert_eq!(c.resolve("more"), "more");
    }

    #[test]
    fn a_short_form_needs_two_documents_and_stays_a_whole_key() {
        let n = norm();
        let k = |s: &str| n.key(s);
        let abbr = pool(
            &n,
            &[
                ("a", "DO", "dorsal organ"),
                ("a", "IL", "infralimbic cortex"),
                ("b", "IL", "infralimbic cortex"),
            ],
        );
        let heads = HashMap::from([(k("IL-6 level"), k("IL-6 level"))]);
        let a = roll_up(&Aliases::default(), Level::Abbreviation, &heads, &abbr, &n);
        assert_eq!(a.resolve(&k("DO")), k("DO"), "one defining document");
        assert_eq!(a.resolve(&k("IL")), k("infralimbic cortex"));
        assert_eq!(a.resolve(&k("IL-6 level")), k("IL-6 level"));
    }
}
