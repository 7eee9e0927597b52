//! The wire types: what a claim looks like to the outside world.
//!
//! These structs are the documented, versioned JSON schema that `extract`, `claims` and the store
//! emit (see the README's "Output schema"). They are kept apart from the graph's internal types so
//! that the aggregation can change without breaking anyone's pipeline. Any change to a field here
//! bumps [`SCHEMA_VERSION`].

use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// Version of the claim record. Bump on any change to [`Claim`] or its parts. 3: each slot
/// carries its head, the head's key and its qualifiers.
pub const SCHEMA_VERSION: u32 = 3;

/// Whether a statement asserts causation or only co-variation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Kind {
    Causal,
    Association,
}

/// The sign a statement gives the effect of the cause.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Polarity {
    Increase,
    Decrease,
    Unsigned,
    Prevent,
    /// "X has no effect on Y": the statement denies any effect.
    None,
}

/// How the statement is put: plainly, hedged, denied, asked, or under a condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Modality {
    Asserted,
    Hedged,
    Negated,
    Question,
    Conditional,
}

macro_rules! word_enum {
    ($ty:ident { $($variant:ident => $word:literal),+ $(,)? }) => {
        impl $ty {
            /// Every value, in declaration order.
            pub const ALL: &'static [$ty] = &[$($ty::$variant),+];
            /// The lower-case word used in files and on the command line.
            pub fn as_str(self) -> &'static str {
                match self { $($ty::$variant => $word),+ }
            }
        }
        impl fmt::Display for $ty {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str(self.as_str())
            }
        }
        impl FromStr for $ty {
            type Err = String;
            fn from_str(s: &str) -> Result<Self, Self::Err> {
                match s.trim().to_ascii_lowercase().as_str() {
                    $($word => Ok($ty::$variant),)+
                    other => Err(format!(
                        "unknown {} '{}' (expected one of: {})",
                        stringify!($ty).to_lowercase(),
                        other,
                        [$($word),+].join(", ")
                    )),
                }
            }
        }
    };
}

word_enum!(Kind { Causal => "causal", Association => "association" });
word_enum!(Polarity {
    Increase => "increase",
    Decrease => "decrease",
    Unsigned => "unsigned",
    Prevent => "prevent",
    None => "none",
});
word_enum!(Modality {
    Asserted => "asserted",
    Hedged => "hedged",
    Negated => "negated",
    Question => "question",
    Conditional => "conditional",
});

/// One side of a claim: the words as written, their variable key and where they are.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Slot {
    /// The surface text of the span.
    pub text: String,
    /// The normalised variable key (see `normalize`).
    pub key: String,
    /// Byte offset of the span in the document.
    pub start: usize,
    /// Byte offset one past the span's end in the document.
    pub end: usize,
    /// When the sentence has a pronoun here ("they", "it", "this"), the pronoun as written; the
    /// text, key and offsets are then those of its antecedent (see `Claim::cross_sentence` for
    /// one in the previous sentence). Absent otherwise.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pronoun: Option<String>,
    /// The head of the phrase the key was made from, as written: the phrase without its
    /// qualifiers ("nitrogen runoff" of "increased nitrogen runoff from fertilised fields"; see
    /// `crate::variables::heads`). Schema 3.
    #[serde(default)]
    pub head: String,
    /// The head's variable key, made as `key` is; the variable a head-level query counts the
    /// claim under. Schema 3.
    #[serde(default)]
    pub head_key: String,
    /// The qualifiers the head leaves out, in text order ("increased", "from fertilised
    /// fields"). Absent when there are none. Schema 3.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub qualifiers: Vec<String>,
}

/// Where a claim was found.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Source {
    /// The path as the user gave it (`-` for standard input).
    pub path: String,
    /// 1-based line of the sentence start.
    pub line: usize,
    /// 1-based column (in characters) of the sentence start.
    pub column: usize,
    /// Byte offset of the sentence in the document.
    pub start: usize,
    /// Byte offset one past the sentence's end.
    pub end: usize,
    /// Page number, for paged formats such as PDF.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub page: Option<u32>,
    /// Record id, for formats holding many documents per file (JSON Lines).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub record: Option<String>,
}

/// One causal or associational statement found in text. A claim is a statement, not evidence
/// that the causation is real.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Claim {
    pub schema: u32,
    pub cause: Slot,
    pub effect: Slot,
    pub kind: Kind,
    pub polarity: Polarity,
    pub modality: Modality,
    /// The id of the cue entry that matched.
    pub cue: String,
    /// The sentence, as it appears in the document (whitespace runs collapsed).
    pub sentence: String,
    pub source: Source,
    /// True when a slot was taken from the previous sentence (a sentence-opening connective).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub cross_sentence: bool,
    /// Who the sentence says made the statement, as written ("officials", "the survey"): the
    /// subject of a reporting verb whose clause holds the claim, or the phrase after "according
    /// to". Absent when the sentence names no one, so records without it are unchanged.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub attribution: Option<String>,
    /// How likely the spans agree with a human reading, in [0, 1] (schema 2; see
    /// `crate::extract::confidence`). It rates the extraction, not whether the causation is real.
    pub confidence: f64,
}

impl Claim {
    /// `file:line`, with the record id or page when there is one.
    pub fn location(&self) -> String {
        let mut s = format!("{}:{}", self.source.path, self.source.line);
        if let Some(p) = self.source.page {
            s.push_str(&format!(" (p. {p})"));
        }
        if let Some(r) = &self.source.record {
            s.push_str(&format!(" [{r}]"));
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_round_trip() {
        for p in Polarity::ALL {
            assert_eq!(p.as_str().parse::<Polarity>().unwrap(), *p);
        }
        for m in Modality::ALL {
            assert_eq!(m.as_str().parse::<Modality>().unwrap(), *m);
        }
        assert!("sideways".parse::<Kind>().is_err());
    }

    #[test]
    fn claim_serialises_with_schema_field_first() {
        let slot = Slot {
            text: "rain".into(),
            key: "rain".into(),
            start: 0,
            end: 4,
            pronoun: None,
            head: "rain".into(),
            head_key: "rain".into(),
            qualifiers: Vec::new(),
        };
        let c = Claim {
            schema: SCHEMA_VERSION,
            cause: slot.clone(),
            effect: slot,
            kind: Kind::Causal,
            polarity: Polarity::Increase,
            modality: Modality::Asserted,
            cue: "cause".into(),
            sentence: "rain causes rain".into(),
            source: Source {
                path: "a.txt".into(),
                line: 1,
                column: 1,
                start: 0,
                end: 16,
                page: None,
                record: None,
            },
            cross_sentence: false,
            attribution: None,
            confidence: 0.5,
        };
        let json = serde_json::to_string(&c).unwrap();
        assert!(json.starts_with("{\"schema\":3,"), "{json}");
        assert!(
            json.contains("\"head\":\"rain\",\"head_key\":\"rain\""),
            "{json}"
        );
        assert!(
            !json.contains("qualifiers"),
            "no qualifiers, no field: {json}"
        );
        assert!(!json.contains("page"));
        assert!(
            !json.contains("attribution"),
            "absent attribution is not written"
        );
        let back: Claim = serde_json::from_str(&json).unwrap();
        assert_eq!(back, c);
    }
}
