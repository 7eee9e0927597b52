//! Unit tests of the comparison: answers and implied answers.

use super::questions::Family;
use super::*;

#[test]
fn answers_are_words_or_probabilities() {
    assert_eq!(parse_answer(" Yes ").unwrap(), (Label::Yes, 1.0));
    assert_eq!(parse_answer("0.5").unwrap(), (Label::Unsure, 0.5));
    assert_eq!(parse_answer("0.2").unwrap().0, Label::No);
    assert!(parse_answer("1.2").is_err());
    assert!(parse_answer("maybe").is_err());
}

#[test]
fn the_implied_answer_needs_the_threshold_and_the_lead() {
    assert_eq!(implied(Family::Directed, 2, 1, 1), Label::Yes);
    assert_eq!(implied(Family::Directed, 2, 2, 1), Label::No);
    assert_eq!(implied(Family::Directed, 2, 0, 3), Label::No);
    assert_eq!(implied(Family::Symmetric, 2, 0, 2), Label::Yes);
    assert_eq!(implied(Family::Reversed, 0, 0, 0), Label::No);
}
