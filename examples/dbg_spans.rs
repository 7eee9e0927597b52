use hearsay::claims::Extractor;
use hearsay::patterns::PatternSet;
fn main() {
    let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
    let p = "../shared/data/causal-news-corpus/train_subtask2.csv";
    let docs = hearsay::gold::parse_cnc(p, &std::fs::read_to_string(p).unwrap()).unwrap();
    let (_, _, judged) = hearsay::spaneval::score_spans_judged(&ex, &docs);
    let by_id: std::collections::HashMap<_, _> = docs.iter().map(|d| (d.id.clone(), d)).collect();
    for j in &judged {
        let id = j.unit.rsplit_once('@').unwrap().0;
        let d = by_id[id];
        let g: Vec<String> = d.claims.iter().map(|g| format!("{} -> {}", &d.text[g.cause.start..g.cause.end], &d.text[g.effect.start..g.effect.end])).collect();
        println!("{}\t{}\t{}\t[{}] -> [{}]\tgold: {}\t{}", j.correct, j.claim.cue, j.claim.polarity, j.claim.cause.text, j.claim.effect.text, g.join(" | "), j.sentence);
    }
}
