//! Edge weight: how much the corpus states one causal edge.
//!
//! The weight counts *units* (distinct documents by default; distinct sentences or raw mentions
//! on request). Each unit contributes the mean value of its claims on the edge:
//!
//! | claim                                        | default value |
//! |----------------------------------------------|---------------|
//! | asserted                                     | 1             |
//! | hedged                                       | 0.5           |
//! | conditional                                  | 0.5           |
//! | question                                     | 0             |
//! | negated, or polarity "none" ("has no effect") | -1            |
//!
//! So a document that asserts the edge adds 1, one that only hedges adds 0.5, and one that denies
//! it subtracts 1: denials count against the edge, not for it. A document with one assertion and
//! one denial adds 0. Every value is configurable ([`WeightSpec`]); [`WeightSpec::describe`] gives
//! the rule in words, and every export and analysis prints it.

use crate::claim::{Modality, Polarity};
use crate::graph::{ClaimGraph, Relation};
use crate::store::ClaimRow;
use serde::Serialize;
use std::collections::BTreeMap;

/// What one unit of weight is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Unit {
    /// Distinct documents (the default).
    #[default]
    Documents,
    /// Distinct sentences.
    Sentences,
    /// Every claim counts on its own.
    Mentions,
}

impl Unit {
    pub fn as_str(self) -> &'static str {
        match self {
            Unit::Documents => "documents",
            Unit::Sentences => "sentences",
            Unit::Mentions => "mentions",
        }
    }
}

/// The edge-weight rule.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WeightSpec {
    pub unit: Unit,
    pub asserted: f64,
    pub hedged: f64,
    pub conditional: f64,
    pub question: f64,
    /// Value of a negated claim or a "no effect" claim (negative: counts against the edge).
    pub negated: f64,
}

impl Default for WeightSpec {
    fn default() -> Self {
        WeightSpec {
            unit: Unit::Documents,
            asserted: 1.0,
            hedged: 0.5,
            conditional: 0.5,
            question: 0.0,
            negated: -1.0,
        }
    }
}

impl WeightSpec {
    /// The value one claim gives its unit.
    pub fn value(&self, r: &ClaimRow) -> f64 {
        if r.polarity == Polarity::None || r.modality == Modality::Negated {
            return self.negated;
        }
        match r.modality {
            Modality::Asserted => self.asserted,
            Modality::Hedged => self.hedged,
            Modality::Conditional => self.conditional,
            Modality::Question => self.question,
            Modality::Negated => self.negated,
        }
    }

    /// The weight of a relation: the sum over its units of the mean value of the unit's claims.
    pub fn weight(&self, g: &ClaimGraph, rel: &Relation) -> f64 {
        if let Some(t) = &rel.totals {
            return self.weight_of_profiles(&t.doc_profiles, &t.sentence_profiles, t.classes);
        }
        let mut units: BTreeMap<(&str, u64, usize), (f64, usize)> = BTreeMap::new();
        for &i in &rel.rows {
            let r = &g.rows[i];
            let k = match self.unit {
                Unit::Documents => (r.doc.as_str(), 0, 0),
                Unit::Sentences => (r.doc.as_str(), r.sentence, 0),
                Unit::Mentions => (r.doc.as_str(), r.sentence, i),
            };
            let e = units.entry(k).or_default();
            e.0 += self.value(r);
            e.1 += 1;
        }
        let w: f64 = units.values().map(|(s, n)| s / *n as f64).sum();
        // Keep exports stable: no "-0" and no float noise past 6 decimals.
        let w = (w * 1e6).round() / 1e6;
        if w == 0.0 {
            0.0
        } else {
            w
        }
    }

    /// The weight from a relation's units by profile: how many units (documents or sentences,
    /// as `self.unit` says) have each count of claims by weight class (asserted, hedged,
    /// conditional, question, negated or "no effect"). For `Unit::Mentions`, the profiles
    /// are not read: `classes` (claims by weight class) give it. The same value as
    /// [`WeightSpec::weight`] on the relation's rows.
    pub fn weight_of_profiles(
        &self,
        docs: &[([u32; 5], u32)],
        sentences: &[([u32; 5], u32)],
        classes: [u64; 5],
    ) -> f64 {
        let values = [
            self.asserted,
            self.hedged,
            self.conditional,
            self.question,
            self.negated,
        ];
        let w: f64 = match self.unit {
            Unit::Mentions => classes.iter().zip(values).map(|(&n, v)| n as f64 * v).sum(),
            Unit::Documents | Unit::Sentences => {
                let units = if self.unit == Unit::Documents {
                    docs
                } else {
                    sentences
                };
                units
                    .iter()
                    .map(|(p, count)| {
                        let n: u32 = p.iter().sum();
                        let s: f64 = p.iter().zip(values).map(|(&k, v)| k as f64 * v).sum();
                        *count as f64 * (s / n.max(1) as f64)
                    })
                    .sum()
            }
        };
        let w = (w * 1e6).round() / 1e6;
        if w == 0.0 {
            0.0
        } else {
            w
        }
    }

    /// The rule in words, for output headers.
    pub fn describe(&self) -> String {
        format!(
            "weight = sum over distinct {} of the mean claim value (asserted {}, hedged {}, \
             conditional {}, question {}, negated or no-effect {})",
            self.unit.as_str(),
            self.asserted,
            self.hedged,
            self.conditional,
            self.question,
            self.negated
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::graph::Filter;
    use crate::store::test_row;

    fn row(m: Modality, p: Polarity, doc: &str, sentence: u64) -> ClaimRow {
        ClaimRow {
            sentence,
            cue: "x".into(),
            ..test_row("a", "b", p, m, doc)
        }
    }

    use crate::variables::Aliases;

    #[test]
    fn documents_hedges_and_denials() {
        use Modality::*;
        let rows = vec![
            row(Asserted, Polarity::Increase, "d1", 0),
            row(Asserted, Polarity::Increase, "d1", 9),
            row(Hedged, Polarity::Increase, "d2", 0),
            row(Negated, Polarity::Increase, "d3", 0),
            row(Asserted, Polarity::None, "d4", 0),
            row(Asserted, Polarity::Increase, "d5", 0),
            row(Negated, Polarity::Increase, "d5", 4),
        ];
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        let rel = g.edges().next().unwrap().2;
        // d1 1, d2 0.5, d3 -1, d4 -1, d5 (1 - 1)/2 = 0.
        assert_eq!(WeightSpec::default().weight(&g, rel), -0.5);
        let by_sentence = WeightSpec {
            unit: Unit::Sentences,
            ..WeightSpec::default()
        };
        // 1 + 1 + 0.5 - 1 - 1 + 1 - 1
        assert_eq!(by_sentence.weight(&g, rel), 0.5);
        let lenient = WeightSpec {
            negated: 0.0,
            hedged: 1.0,
            ..WeightSpec::default()
        };
        assert_eq!(lenient.weight(&g, rel), 1.0 + 1.0 + 0.5);
        assert!(WeightSpec::default().describe().contains("hedged 0.5"));
    }
}
