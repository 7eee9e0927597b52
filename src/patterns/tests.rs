//! Pattern files: loading, inflection and the errors that name file and line.

use super::cues::{parse_cue_file, parse_pattern};
use super::inflection::{inflect_verb, parse_irregular, Irregular};
use super::lexicon::{parse_aliases, parse_lexicon};
use super::set::BUILTIN_CUE_FILES;
use super::*;

fn irr() -> Irregular {
    parse_irregular(Path::new("t"), "lead\tled\tled\ngive\tgave\tgiven\n").unwrap()
}

#[test]
fn inflects_regular_and_irregular_verbs() {
    let i = irr();
    assert_eq!(
        inflect_verb("cause", &i),
        ["cause", "causes", "caused", "causing"]
    );
    assert_eq!(
        inflect_verb("lead", &i),
        ["lead", "leads", "led", "leading"]
    );
    assert!(inflect_verb("stop", &i).contains(&"stopped".to_string()));
    assert!(inflect_verb("worry", &i).contains(&"worries".to_string()));
    assert!(inflect_verb("worry", &i).contains(&"worried".to_string()));
    assert!(inflect_verb("reduce", &i).contains(&"reducing".to_string()));
    assert!(inflect_verb("give", &i).contains(&"given".to_string()));
    assert!(inflect_verb("increase", &i).contains(&"increases".to_string()));
}

#[test]
fn malformed_cue_file_names_file_and_line() {
    let text = "[[cue]]\nid = \"ok\"\npattern = \"CAUSE cause~ EFFECT\"\nkind = \"causal\"\npolarity = \"unsigned\"\nexamples = [{text=\"a causes b\", cause=\"a\", effect=\"b\"}]\n\n[[cue]]\nid = \"bad\"\npattern = \"CAUSE raise~ EFFECT\"\nkind = \"causal\"\npolarity = \"upward\"\nexamples = [{text=\"a raises b\", cause=\"a\", effect=\"b\"}]\n";
    let err = parse_cue_file(Path::new("x.toml"), text, &irr())
        .unwrap_err()
        .to_string();
    assert!(
        err.starts_with("x.toml:8: cue 'bad': unknown polarity 'upward'"),
        "{err}"
    );
}

#[test]
fn a_fixed_term_without_a_hyphenated_word_names_its_line() {
    let lexicon = include_str!("../../patterns/lexicon.toml");
    let bad = lexicon.replacen("fixed = [", "fixed = [\"protein kinase\", ", 1);
    let err = parse_lexicon(Path::new("lexicon.toml"), &bad)
        .unwrap_err()
        .to_string();
    let line = bad
        .lines()
        .position(|l| l.contains("\"protein kinase\""))
        .unwrap()
        + 1;
    assert!(
        err.starts_with(&format!(
            "lexicon.toml:{line}: fixed term \"protein kinase\""
        )),
        "{err}"
    );
    assert!(parse_lexicon(Path::new("lexicon.toml"), lexicon).is_ok());
}

#[test]
fn toml_syntax_error_has_line() {
    let err = parse_cue_file(
        Path::new("y.toml"),
        "[[cue]]\nid = \"a\"\npattern = \n",
        &irr(),
    )
    .unwrap_err()
    .to_string();
    assert!(err.starts_with("y.toml:3:"), "{err}");
}

/// A reject rule that is not a regex is an error naming the file, the cue's line and the
/// key, found when the file loads (before anything is compiled).
#[test]
fn bad_reject_regex_names_file_line_and_key() {
    let file = "[[cue]]\nid = \"a\"\nfamily = \"causal-verb\"\npattern = \"CAUSE cause~ EFFECT\"\n\
kind = \"causal\"\npolarity = \"unsigned\"\nreject_before = '(?:the'\n\
examples = [{ text = \"Rain causes floods.\", cause = \"rain\", effect = \"floods\" }]\n";
    let err = parse_cue_file(Path::new("z.toml"), file, &irr())
        .unwrap_err()
        .to_string();
    assert!(err.starts_with("z.toml:1:"), "{err}");
    assert!(err.contains("reject_before: invalid regex"), "{err}");
    let fixed = file.replace("'(?:the'", "'(?:the)$'");
    assert!(parse_cue_file(Path::new("z.toml"), &fixed, &irr()).is_ok());
}

#[test]
fn pattern_shape_is_checked() {
    let i = irr();
    assert!(parse_pattern("CAUSE cause~ EFFECT", &i).is_ok());
    assert!(parse_pattern("CAUSE EFFECT", &i).is_err());
    assert!(parse_pattern("CAUSE cause~", &i).is_err());
    assert!(parse_pattern("cause~ -induced CAUSE EFFECT", &i).is_err());
    assert!(parse_pattern("CAUSE Cause EFFECT", &i).is_err());
    assert!(parse_pattern("CAUSE -induced EFFECT", &i).is_ok());
}

#[test]
fn builtin_patterns_load() {
    let set = PatternSet::builtin().expect("built-in patterns are valid");
    assert!(set.cues.len() >= 120, "only {} cues", set.cues.len());
}

#[test]
fn every_cue_file_is_builtin() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("patterns/cues");
    for e in std::fs::read_dir(dir).unwrap() {
        let name = format!("cues/{}", e.unwrap().file_name().to_string_lossy());
        assert!(
            BUILTIN_CUE_FILES.iter().any(|(n, _)| *n == name),
            "{name} is not listed in BUILTIN_CUE_FILES"
        );
    }
}

#[test]
fn aliases_need_two_columns() {
    assert!(parse_aliases(Path::new("a.tsv"), "# c\nsea rise\tsea level rise\n").is_ok());
    let e = parse_aliases(Path::new("a.tsv"), "ok\tfine\nbroken line\n")
        .unwrap_err()
        .to_string();
    assert!(e.starts_with("a.tsv:2:"), "{e}");
}
