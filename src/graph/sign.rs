//! The sign of an edge: whether its claims say the cause raises or lowers the effect.
//!
//! One rule, [`Sign::of`], names the sign of an edge everywhere it is shown: the `sign` column
//! of `top`, each hop of `paths` and `cycles` (and so every chain's sign, through
//! [`Sign::then`]), and the colour and line style of the report's graph picture. It used to be
//! three rules that gave three answers on the same edge (the most frequent polarity, unsigned
//! included; the majority of signed claims; which signed polarities occur at all), so that one
//! edge read "unsigned" in `top` and "increase" in `paths`; a user comparing outputs could not
//! tell which to believe.
//!
//! The rule reads only claims that state a sign: negated claims deny a statement rather than
//! make one, and unsigned claims ("X causes Y") say nothing about the direction of the change,
//! so an edge stated as "X causes Y" ten times and "X raises Y" once is an increasing edge.
//! Prevent counts as decrease. Equal numbers on both sides is *mixed*. An edge with no signed
//! claim is *no effect* when its "has no effect" claims outnumber its unsigned ones, else
//! *unsigned*. docs/graph.md states the rule for users.

use crate::claim::Polarity;
use crate::graph::{Counts, Relation};
use serde::Serialize;
use std::fmt;

/// The sign an edge or a chain states.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Sign {
    Increase,
    Decrease,
    /// As many increasing as decreasing (or preventing) non-negated claims.
    Mixed,
    Unsigned,
    /// No signed claim, and more "has no effect" claims than unsigned ones.
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

    /// The sign of an edge: the majority of its non-negated signed claims (increase against
    /// decrease and prevent), mixed when they tie; without any, no effect when "has no effect"
    /// claims outnumber unsigned ones, else unsigned.
    pub fn of(rel: &Relation) -> Sign {
        Sign::of_counts(&rel.counts)
    }

    /// [`Sign::of`] from an edge's counts alone.
    pub fn of_counts(c: &Counts) -> Sign {
        let inc = c.stated(Polarity::Increase);
        let dec = c.stated(Polarity::Decrease) + c.stated(Polarity::Prevent);
        match inc.cmp(&dec) {
            std::cmp::Ordering::Greater => Sign::Increase,
            std::cmp::Ordering::Less => Sign::Decrease,
            std::cmp::Ordering::Equal if inc > 0 => Sign::Mixed,
            _ if c.polarity(Polarity::None) > c.stated(Polarity::Unsigned) => Sign::NoEffect,
            _ => Sign::Unsigned,
        }
    }
}

impl fmt::Display for Sign {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::claim::Modality;
    use crate::graph::{ClaimGraph, Filter};
    use crate::store::test_row as row;
    use crate::variables::Aliases;

    fn sign(rows: Vec<crate::store::ClaimRow>) -> Sign {
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        Sign::of(g.edge(g.index["a"], g.index["b"]).unwrap())
    }

    #[test]
    fn unsigned_claims_do_not_outvote_a_signed_one() {
        use Modality::*;
        use Polarity::*;
        // The edge that read "unsigned" in `top` and "increase" in `paths` before the rules
        // were one.
        let rows = vec![
            row("a", "b", Unsigned, Asserted, "d1"),
            row("a", "b", Unsigned, Asserted, "d2"),
            row("a", "b", Increase, Hedged, "d3"),
        ];
        assert_eq!(sign(rows), Sign::Increase);
    }

    #[test]
    fn negated_claims_state_no_sign_and_prevent_is_decrease() {
        use Modality::*;
        use Polarity::*;
        let rows = vec![
            row("a", "b", Increase, Negated, "d1"),
            row("a", "b", Increase, Negated, "d2"),
            row("a", "b", Prevent, Asserted, "d3"),
        ];
        assert_eq!(sign(rows), Sign::Decrease);
    }

    #[test]
    fn a_tie_is_mixed_and_no_signed_claim_is_unsigned_or_no_effect() {
        use Modality::*;
        use Polarity::*;
        let tie = vec![
            row("a", "b", Increase, Asserted, "d1"),
            row("a", "b", Decrease, Question, "d2"),
        ];
        assert_eq!(sign(tie), Sign::Mixed);
        let no_effect = vec![
            row("a", "b", None, Negated, "d1"),
            row("a", "b", None, Negated, "d2"),
            row("a", "b", Unsigned, Asserted, "d3"),
        ];
        assert_eq!(sign(no_effect), Sign::NoEffect);
        let unsigned = vec![
            row("a", "b", None, Negated, "d1"),
            row("a", "b", Unsigned, Asserted, "d2"),
        ];
        assert_eq!(sign(unsigned), Sign::Unsigned);
    }

    #[test]
    fn chain_signs_multiply_and_unsigned_spreads() {
        use Sign::*;
        assert_eq!(Increase.then(Increase), Increase);
        assert_eq!(Decrease.then(Decrease), Increase);
        assert_eq!(Increase.then(Decrease), Decrease);
        assert_eq!(Unsigned.then(Increase), Unsigned);
        assert_eq!(Decrease.then(Unsigned), Unsigned);
        assert_eq!(Mixed.then(Increase), Unsigned);
    }
}
