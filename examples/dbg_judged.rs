use hearsay::claims::Extractor;
use hearsay::patterns::PatternSet;
fn main() {
    let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
    let items = hearsay::eval::parse_semeval(&std::fs::read_to_string("../shared/data/semeval2010-task8/TRAIN_FILE.TXT").unwrap()).unwrap();
    let (_, _, judged) = hearsay::eval::score_pairs_judged(&ex, &items);
    let by_id: std::collections::HashMap<_, _> = items.iter().map(|i| (i.id.clone(), i)).collect();
    for j in &judged {
        let id = j.unit.split('@').next().unwrap();
        let it = by_id[id];
        let g = it.causal.map(|(c, e)| format!("{} -> {}", &it.text[c.start..c.end], &it.text[e.start..e.end])).unwrap_or_default();
        println!("{}\t{}\t{}\t{}\t[{}] -> [{}]\tgold: {}\t{}", j.correct, it.label, j.claim.cue, j.claim.polarity, j.claim.cause.text, j.claim.effect.text, g, it.text);
    }
}
