//! The sign of an edge: whether its claims say the cause raises or lowers the effect.
//!
//! Every consumer reads an edge's sign here, with the one [`Sign`] type. Three rules are in use
//! and they give different answers on the same edge; each consumer keeps the rule it has always
//! had, so that no output changes, and unifying them is a separate decision:
//!
//! - [`Sign::majority`] (`paths`, `cycles`, and so every chain's sign): the majority of the
//!   edge's non-negated signed claims, increase against decrease and prevent; unsigned when
//!   there are none or they tie. It never answers mixed or no effect.
//! - [`Sign::presence`] (the report's graph picture): which signed polarities occur at all,
//!   negated claims included; mixed when both increase and decrease (or prevent) occur; without
//!   either, no effect when "has no effect" claims outnumber unsigned ones, else unsigned.
//! - [`dominant_polarity`] (`top`): the polarity most non-negated claims give, among all five
//!   (prevent and none included), so it is a [`Polarity`] rather than a [`Sign`]; ties go to the
//!   first in the order increase, decrease, prevent, unsigned, none.

use crate::claim::{Modality, Polarity};
use crate::graph::Relation;
use serde::Serialize;

/// The sign an edge or a chain states.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Sign {
    Increase,
    Decrease,
    /// Both increasing and decreasing claims (only [`Sign::presence`] answers it).
    Mixed,
    Unsigned,
    /// Mostly "has no effect" claims (only [`Sign::presence`] answers it).
    NoEffect,
}

impl Sign {
    pub fn as_str(self) -> &'static str {
        match self {
            Sign::Increase => "increase",
            Sign::Decrease => "decrease",
            Sign::Mixed => "mixed",
            Sign::Unsigned => "unsigned",
            Sign::NoEffect => "no effect",
        }
    }

    /// The sign of two links in a row: like signs increase, unlike decrease, and a link with
    /// no single sign (unsigned, mixed or no effect) makes the whole chain unsigned.
    pub fn then(self, next: Sign) -> Sign {
        match (self, next) {
            (Sign::Increase | Sign::Decrease, Sign::Increase | Sign::Decrease) if self == next => {
                Sign::Increase
            }
            (Sign::Increase | Sign::Decrease, Sign::Increase | Sign::Decrease) => Sign::Decrease,
            _ => Sign::Unsigned,
        }
    }

    /// The rule of `paths` and `cycles`: the majority of the non-negated signed claims
    /// (increase against decrease and prevent); unsigned when there are none or they tie.
    pub fn majority(rel: &Relation) -> Sign {
        let inc = rel.counts.stated(Polarity::Increase);
        let dec = rel.counts.stated(Polarity::Decrease) + rel.counts.stated(Polarity::Prevent);
        match inc.cmp(&dec) {
            std::cmp::Ordering::Greater => Sign::Increase,
            std::cmp::Ordering::Less => Sign::Decrease,
            std::cmp::Ordering::Equal => Sign::Unsigned,
        }
    }

    /// The rule of the report's picture: which signed polarities occur at all (negated claims
    /// included), mixed when both do; without either, no effect when "has no effect" claims
    /// outnumber unsigned ones.
    pub fn presence(rel: &Relation) -> Sign {
        let c = &rel.counts;
        let inc = c.polarity(Polarity::Increase);
        let dec = c.polarity(Polarity::Decrease) + c.polarity(Polarity::Prevent);
        match (inc > 0, dec > 0) {
            (true, true) => Sign::Mixed,
            (true, false) => Sign::Increase,
            (false, true) => Sign::Decrease,
            _ if c.polarity(Polarity::None) > c.polarity(Polarity::Unsigned) => Sign::NoEffect,
            _ => Sign::Unsigned,
        }
    }
}

/// The rule of `top`: the polarity most non-negated claims give (none when every claim is
/// negated); ties go to the first in the order increase, decrease, prevent, unsigned, none.
pub fn dominant_polarity(rel: &Relation) -> Polarity {
    let mut best = (0usize, Polarity::Unsigned);
    for p in [
        Polarity::Increase,
        Polarity::Decrease,
        Polarity::Prevent,
        Polarity::Unsigned,
        Polarity::None,
    ] {
        let n: usize = rel
            .counts
            .by
            .get(&p)
            .map(|m| {
                m.iter()
                    .filter(|(k, _)| **k != Modality::Negated)
                    .map(|(_, v)| v)
                    .sum()
            })
            .unwrap_or(0);
        if n > best.0 {
            best = (n, p);
        }
    }
    if best.0 == 0 {
        Polarity::None
    } else {
        best.1
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::graph::{ClaimGraph, Filter};
    use crate::store::test_row as row;
    use crate::variables::Aliases;

    #[test]
    fn the_three_rules_differ_on_one_edge() {
        use Modality::*;
        use Polarity::*;
        // Two increases, one decrease, one denied increase.
        let rows = vec![
            row("a", "b", Increase, Asserted, "d1"),
            row("a", "b", Increase, Hedged, "d2"),
            row("a", "b", Decrease, Asserted, "d3"),
            row("a", "b", Increase, Negated, "d4"),
        ];
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        let ab = g.edge(g.index["a"], g.index["b"]).unwrap();
        assert_eq!(Sign::majority(ab), Sign::Increase);
        assert_eq!(Sign::presence(ab), Sign::Mixed);
        assert_eq!(dominant_polarity(ab), Increase);
    }

    #[test]
    fn chain_signs_multiply_and_unsigned_spreads() {
        use Sign::*;
        assert_eq!(Increase.then(Increase), Increase);
        assert_eq!(Decrease.then(Decrease), Increase);
        assert_eq!(Increase.then(Decrease), Decrease);
        assert_eq!(Unsigned.then(Increase), Unsigned);
        assert_eq!(Decrease.then(Unsigned), Unsigned);
    }
}
