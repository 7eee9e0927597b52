//! Usable-claim precision and recall on real papers, and whether confidence ranks usable claims
//! above the rest.
//!
//! Data: tests/data/usable/test.jsonl, 130 sentences drawn at random from claims hearsay found in
//! the eLife articles (../shared/data/elife-articles, SOURCE.txt there: eLife Sciences
//! Publications, CC BY 4.0 / CC BY 3.0 / CC0 per article), each labelled by hand with the usable
//! claims it states (tests/data/usable/README.md: how it was drawn, the labelling rules). The
//! sentences are stored in the file, so the test runs without the shared data.
//!
//! Matching (`hearsay::evaluate::usable`): a claim is usable when its cause and its effect each
//! share a stemmed content word with a gold claim's cause and effect, at least half of each
//! predicted side's key words are in the gold side, and the direction agrees (either order for
//! an association). ROC AUC is the Mann–Whitney statistic of confidence with usable claims as
//! positives (the common definition). Run with `--nocapture` to see the figures.

use crate::common::root;
use hearsay::evaluate::usable::{parse_usable, roc_auc, score_usable};
use hearsay::extract::Extractor;
use hearsay::patterns::PatternSet;
use hearsay::variables::Normalizer;

/// Floors a little under the figures measured on this sample (see docs/confidence.md), so that
/// a change that loses usable claims or ranks them worse fails here.
const PRECISION_FLOOR: f64 = 0.37;
const RECALL_FLOOR: f64 = 0.45;
const AUC_FLOOR: f64 = 0.70;

#[test]
fn usable_claims_and_confidence_ranking_on_labelled_elife_sentences() {
    let path = root().join("tests/data/usable/test.jsonl");
    let items = parse_usable(
        &path.display().to_string(),
        &std::fs::read_to_string(&path).unwrap(),
    )
    .unwrap();
    assert!(items.len() >= 120, "{} sentences", items.len());
    // HEARSAY_USABLE_PATTERNS=DIR measures a pattern folder (a retrained confidence.toml, say)
    // before it is shipped; the floors hold for the built-in set.
    let set = match std::env::var_os("HEARSAY_USABLE_PATTERNS") {
        Some(dir) => PatternSet::load_dir(std::path::Path::new(&dir)).unwrap(),
        None => PatternSet::builtin().unwrap(),
    };
    let ex = Extractor::new(&set).unwrap();
    let norm = Normalizer::new(&set.lexicon);
    let (s, judged) = score_usable(&ex, &norm, &items);
    let scored: Vec<(f64, bool)> = judged
        .iter()
        .map(|j| (j.claim.confidence, j.correct))
        .collect();
    let auc = roc_auc(&scored).unwrap_or(0.5);
    eprintln!(
        "usable sample: {} sentences, {} claims found, {} usable: precision {:.3}; {} gold claims, {} found: recall {:.3}; confidence ROC AUC {auc:.3}; on usable claims polarity agrees {}/{}, modality {}/{}",
        s.sentences,
        s.predicted,
        s.usable,
        s.precision(),
        s.gold,
        s.found,
        s.recall(),
        s.polarity_agrees,
        s.usable,
        s.modality_agrees,
        s.usable,
    );
    if std::env::var_os("HEARSAY_SHOW_USABLE").is_some() {
        for j in &judged {
            eprintln!(
                "{}\t{:.3}\t{}\t{} -> {}\t[{}]\t{}",
                if j.correct { "USABLE" } else { "no" },
                j.claim.confidence,
                j.unit,
                j.claim.cause.text,
                j.claim.effect.text,
                j.claim.cue,
                j.sentence
            );
        }
    }
    assert!(s.predicted >= 100, "{} claims", s.predicted);
    assert!(
        s.precision() >= PRECISION_FLOOR,
        "precision {:.3}",
        s.precision()
    );
    assert!(s.recall() >= RECALL_FLOOR, "recall {:.3}", s.recall());
    assert!(auc >= AUC_FLOOR, "confidence ROC AUC {auc:.3}");
}
