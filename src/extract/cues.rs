//! Cue matching: where in a text a cue entry fires.
//!
//! Two layers, so that text without a cue costs almost nothing. A single Aho-Corasick automaton
//! holds one *anchor* literal per cue (all inflected forms of the cue's longest word that is not a
//! function word); it runs over whole documents and tells which sentences deserve a closer look
//! and which cues to try there.
//! Each cue is then checked with its own regular expression, built from the pattern string, over
//! that sentence alone. The matcher only says where a cue's literal words are and where inner slots
//! lie; choosing the cause and effect spans around it is the `claims` stage's job.

use crate::patterns::{CueSpec, PatternSet, PatternToken, Role};
use aho_corasick::{AhoCorasick, AhoCorasickBuilder, AhoCorasickKind, MatchKind};
use regex_automata::meta::Regex as MetaRegex;
use regex_automata::util::captures::Captures;
use regex_automata::{Anchored, Input, PatternID};
use std::collections::{BTreeSet, HashMap};
use std::sync::Arc;

/// A cue compiled for matching.
#[derive(Debug)]
pub struct CompiledCue {
    pub spec: CueSpec,
    /// The cue's regex with its inner slots unbounded (`\S.*?`): a small automaton, so cheap to
    /// build and to search. Its match is the bounded one's whenever no bounded slot runs past
    /// [`SLOT_CHARS`]; otherwise `exact` decides.
    regex: MetaRegex,
    /// The cue's regex as the pattern means it, each inner slot at most [`SLOT_CHARS`] characters
    /// (`\S.{0,160}?`, about 1 600 automaton states a slot), built on first need. `None` when
    /// no slot is bounded.
    exact: Option<Exact>,
    /// Capture-group indexes (into `groups`) of the bounded inner slots.
    bounded: Vec<usize>,
    /// Where a match starts relative to a prefilter hit of this cue's anchor.
    start: MatchStart,
    /// Capture-group indexes of the inner slots, named `s0`, `s1`, … in the pattern: looked up
    /// once here, since a look-up by name hashes the name at every match. The exact regex is
    /// the same pattern with other slot bodies (no groups in them), so its groups have the
    /// same indexes.
    groups: Vec<usize>,
    /// The slot that lies before the first literal, if any.
    pub left: Option<Role>,
    /// The slot that lies after the last literal, if any.
    pub right: Option<Role>,
    /// Slots captured inside the match, in capture-group order (`s0`, `s1`).
    inner: Vec<Role>,
    /// Shared with every cue of the same rule (see `Rejects`).
    reject_after: Option<Arc<MetaRegex>>,
    reject_before: Option<Arc<MetaRegex>>,
    /// The prefilter literals of this cue.
    pub anchors: Vec<String>,
    /// The cue opens with an inflected verb (`word~`), so a determiner before it means a noun use.
    pub verb_first: bool,
    /// The cue ends with a glued literal ("-induced"): the slot after it is one word.
    pub glued_last: bool,
}

impl CompiledCue {
    /// The exact regex, when one of the fast regex's matches `found` has a bounded slot longer
    /// than [`SLOT_CHARS`]: then the exact regex may match elsewhere or not at all. Where the
    /// fast regex matches with every slot in bounds, both take the same shortest slots, so their
    /// matches agree.
    fn exact_regex(&self, sentence: &str, found: &[Captures]) -> Option<&MetaRegex> {
        let too_long = found.iter().any(|caps| {
            self.bounded.iter().any(|&gi| {
                caps.get_group(self.groups[gi]).is_some_and(|g| {
                    g.len() > SLOT_CHARS && sentence[g.range()].chars().count() > SLOT_CHARS
                })
            })
        });
        if too_long {
            self.exact.as_ref()?.regex()
        } else {
            None
        }
    }
}

/// Bytes of lazy-DFA cache per cue regex and thread.
const CUE_DFA_CACHE: usize = 64 * 1024;

/// The longest inner slot, in characters ("between CAUSE and EFFECT": at most this between
/// "between" and "and").
const SLOT_CHARS: usize = 161;

/// A cue's exact regex, compiled when a match of the fast one has a slot that is too long.
#[derive(Debug)]
struct Exact {
    pattern: String,
    /// Whether it is searched over whole sentences (then a prefilter of its literals helps).
    prefilter: bool,
    /// `None` inside when it does not compile (size limits): the fast match stands.
    regex: std::sync::OnceLock<Option<MetaRegex>>,
}

impl Exact {
    fn regex(&self) -> Option<&MetaRegex> {
        self.regex
            .get_or_init(|| lean_regex(&self.pattern, self.prefilter).ok())
            .as_ref()
    }
}

/// Where a match of a cue can start, given a prefilter hit of its anchor.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum MatchStart {
    /// The anchor is the cue's first word: the match starts at the hit, so one anchored search
    /// there decides it (it fails within a few bytes when the cue does not match).
    AtHit,
    /// The anchor is a glued literal with its slot word first ("CAUSE -induced"): the match
    /// starts at the word right before the hyphen.
    WordBeforeHit,
    /// The anchor lies further in: search the whole sentence.
    Scan,
}

/// Where a slot of a match lies.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SlotPlace {
    /// Find the span by walking back from the cue.
    Before,
    /// Find the span by walking forward from the cue.
    After,
    /// The span is this byte range of the sentence.
    Inside(usize, usize),
}

/// One firing of one cue in a sentence. Offsets are bytes into the sentence.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CueMatch {
    pub cue: usize,
    pub start: usize,
    pub end: usize,
    pub cause: SlotPlace,
    pub effect: SlotPlace,
}

/// A cue to try in a sentence, at the byte offset of its anchor's prefilter hit there.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct Candidate {
    pub cue: usize,
    pub pos: usize,
}

/// A prefilter hit in a document: the byte offset of an anchor literal.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Hit {
    pub pos: usize,
    pub anchor: usize,
}

/// All cues, with the prefilter over them.
#[derive(Debug)]
pub struct CueSet {
    pub cues: Vec<CompiledCue>,
    prefilter: AhoCorasick,
    /// Anchor literal → the cues that use it.
    anchor_cues: Vec<Vec<usize>>,
    anchor_glued: Vec<bool>,
    anchors: Vec<String>,
    /// Cue id → the first cue with that id (every claim asks for its cue's family).
    by_id: rustc_hash::FxHashMap<String, usize>,
    /// Unique per cue set built in this process: names the set in per-thread scratch space.
    id: u64,
}

thread_local! {
    /// Per thread, one `Captures` per cue of the cue set last matched with (by id), so that a
    /// search does not allocate its own: that was a sixth of the cost of matching cues.
    static CAPTURES: std::cell::RefCell<(u64, Vec<Option<Captures>>)> =
        const { std::cell::RefCell::new((0, Vec::new())) };
}

fn alternation(forms: &[String]) -> String {
    let mut f: Vec<&String> = forms.iter().collect();
    f.sort_by_key(|s| std::cmp::Reverse(s.len()));
    let parts: Vec<String> = f
        .iter()
        .map(|s| regex::escape(s).replace("\\-", "-").replace('\'', "['’]"))
        .collect();
    format!("(?:{})", parts.join("|"))
}

/// A regex for one of hundreds of cues: each keeps a lazy-DFA cache per thread, and a small one
/// is plenty for a pattern tried at a few places per sentence, which keeps memory flat. No
/// one-pass DFA: built for every cue they held 10 MB (a tenth of extract's memory) and cost
/// start-up time, and the backtracker finds the slots of a sentence-long search as fast. No
/// full DFA either (a cue's regex is seldom small enough for one). `prefilter`: whether to build
/// a prefilter of its literals; a cue searched only anchored at a prefilter hit never uses one,
/// and extracting and compiling literals for every such cue was a sixth of start-up.
fn lean_regex(re: &str, prefilter: bool) -> Result<MetaRegex, String> {
    MetaRegex::builder()
        .configure(
            MetaRegex::config()
                .hybrid_cache_capacity(CUE_DFA_CACHE)
                .onepass(false)
                .dfa(false)
                .auto_prefilter(prefilter),
        )
        .build(re)
        .map_err(|e| e.to_string())
}

/// A cue's pattern read into a regex: where its literals and slots are.
struct Layout {
    /// The regex, inner slots that run to the next literal written as [`BOUNDED_SLOT`].
    re: String,
    /// Capture-group indexes of the bounded inner slots.
    bounded: Vec<usize>,
    left: Option<Role>,
    right: Option<Role>,
    inner: Vec<Role>,
    /// Token indexes of the first and last literal (the last moved past "SLOT , SLOT").
    first: usize,
    last: usize,
    /// A slot glued to the first literal ("CAUSE -induced") is captured inside the match.
    glued_first: bool,
}

/// Where an inner slot that runs to the next literal stands in [`Layout::re`]: bounded in the
/// exact regex, not in the fast one.
const BOUNDED_SLOT: &str = "\u{0}slot\u{0}";

fn layout(toks: &[PatternToken]) -> Result<Layout, String> {
    let is_lit =
        |t: &PatternToken| matches!(t, PatternToken::Word { .. } | PatternToken::Glued { .. });
    let first = toks.iter().position(is_lit).ok_or("no literal")?;
    let mut last = toks.iter().rposition(is_lit).ok_or("no literal")?;
    // "due to CAUSE , EFFECT": punctuation between two trailing slots separates them like a
    // literal, and is required.
    let mut required_punct = None;
    if let [PatternToken::Slot(_), PatternToken::Punct(_), PatternToken::Slot(_)] =
        &toks[last + 1..]
    {
        last += 2;
        required_punct = Some(last);
    }
    let edge_ok = |from: usize, to: usize| {
        toks[from..to]
            .iter()
            .all(|t| matches!(t, PatternToken::Punct(_)))
    };
    let mut left = None;
    let mut right = None;
    let mut inner = Vec::new();
    let glued_first = matches!(toks[first], PatternToken::Glued { .. });
    let mut re = String::from("(?i)");
    let mut bounded = Vec::new();
    for (i, t) in toks.iter().enumerate() {
        match t {
            PatternToken::Slot(r) if i < first => {
                if glued_first && i + 1 == first {
                    re.push_str(&format!("\\b(?P<s{}>[\\p{{L}}\\p{{N}}]+)", inner.len()));
                    inner.push(*r);
                } else if edge_ok(i + 1, first) {
                    left = Some(*r);
                } else {
                    return Err("a slot before the first literal must be next to it".into());
                }
            }
            PatternToken::Slot(r) if i > last => {
                if !edge_ok(last + 1, i) {
                    return Err("a slot after the last literal must be next to it".into());
                }
                right = Some(*r);
            }
            PatternToken::Slot(r) => {
                if matches!(toks.get(i + 1), Some(PatternToken::Glued { .. })) {
                    re.push_str(&format!("\\s+(?P<s{}>[\\p{{L}}\\p{{N}}]+)", inner.len()));
                } else {
                    re.push_str(&format!("\\s+(?P<s{}>{BOUNDED_SLOT})", inner.len()));
                    bounded.push(inner.len());
                }
                inner.push(*r);
            }
            PatternToken::Word { forms, .. } => {
                if i == first {
                    re.push_str("\\b");
                } else {
                    re.push_str("\\s+");
                }
                re.push_str(&alternation(forms));
            }
            PatternToken::Glued { forms } => {
                re.push('-');
                re.push_str(&alternation(forms));
            }
            PatternToken::Punct(c) if required_punct == Some(i) => {
                re.push_str(&format!("\\s*{}", regex::escape(&c.to_string())));
            }
            PatternToken::Punct(c) if i > first && i < last => {
                re.push_str(&format!("(?:\\s*{})?", regex::escape(&c.to_string())));
            }
            // Punctuation at the edges of a pattern is handled by the span walkers.
            PatternToken::Punct(_) => {}
        }
    }
    if required_punct.is_none() {
        re.push_str("\\b");
    }
    Ok(Layout {
        re,
        bounded,
        left,
        right,
        inner,
        first,
        last,
        glued_first,
    })
}

/// The forms of the literal the prefilter looks for. The rarest literal makes the fewest
/// prefilter hits. Function words ("with", "from", "that", "between") are the commonest words of
/// any English text, so any other word beats them; among the rest the longest is taken, as
/// longer words are rarer.
fn anchor_forms(toks: &[PatternToken], common: &dyn Fn(&str) -> bool) -> Vec<String> {
    toks.iter()
        .filter_map(|t| match t {
            PatternToken::Word { forms, .. } | PatternToken::Glued { forms } => Some(forms),
            _ => None,
        })
        .max_by_key(|forms| {
            let shortest = forms.iter().map(|f| f.len()).min().unwrap_or(0);
            (!forms.iter().any(|f| common(f)), shortest)
        })
        .cloned()
        .unwrap_or_default()
}

/// A reject rule as a regex anchored at the match's edge: its start (`after`) or its end. The
/// configuration the `regex` facade uses, with its syntax and match semantics: a full DFA where
/// the rule is small, and a lazy-DFA cache large enough for the reverse search of a rule
/// anchored at its end (a small one gives up on long sentences, and the slow fallback runs).
fn build_reject(s: &str, after: bool) -> Result<MetaRegex, String> {
    let full = if after {
        format!("(?i)^(?:{s})")
    } else {
        format!("(?i)(?:{s})$")
    };
    MetaRegex::new(&full).map_err(|e| e.to_string())
}

/// The reject rules of a pattern set, each distinct rule built once and shared by the cues that
/// name it (a few dozen distinct rules stand in hundreds of cues): by rule text, those of
/// `reject_after` and of `reject_before`.
#[derive(Default)]
struct Rejects {
    after: HashMap<String, Result<Arc<MetaRegex>, String>>,
    before: HashMap<String, Result<Arc<MetaRegex>, String>>,
}

impl Rejects {
    fn new(specs: &[CueSpec]) -> Rejects {
        use rayon::prelude::*;
        let build = |rules: BTreeSet<&String>, after: bool| {
            rules
                .into_par_iter()
                .map(|r| (r.clone(), build_reject(r, after).map(Arc::new)))
                .collect()
        };
        let after = specs
            .iter()
            .filter_map(|c| c.reject_after.as_ref())
            .collect();
        let before = specs
            .iter()
            .filter_map(|c| c.reject_before.as_ref())
            .collect();
        Rejects {
            after: build(after, true),
            before: build(before, false),
        }
    }

    /// The built rule `r` (`after`: a `reject_after` rule).
    fn get(&self, r: &Option<String>, after: bool) -> Result<Option<Arc<MetaRegex>>, String> {
        let Some(r) = r else { return Ok(None) };
        let built = if after { &self.after } else { &self.before };
        match built.get(r) {
            Some(b) => b.clone().map(Some),
            None => build_reject(r, after).map(|b| Some(Arc::new(b))),
        }
    }
}

fn compile(
    spec: CueSpec,
    common: &dyn Fn(&str) -> bool,
    rejects: &Rejects,
) -> Result<CompiledCue, String> {
    let toks = &spec.tokens;
    let Layout {
        re,
        bounded,
        left,
        right,
        inner,
        first,
        last,
        glued_first,
    } = layout(toks)?;
    let anchor_forms = anchor_forms(toks, common);
    let glued_anchor = toks
        .iter()
        .any(|t| matches!(t, PatternToken::Glued { forms } if *forms == anchor_forms));
    let anchors = anchor_forms
        .iter()
        .map(|f| {
            if glued_anchor {
                format!("-{f}")
            } else {
                f.clone()
            }
        })
        .collect();
    let verb_first = matches!(&toks[first], PatternToken::Word { verb: true, .. });
    let glued_last = matches!(toks[last], PatternToken::Glued { .. });
    let anchor_token = toks.iter().position(|t| match t {
        PatternToken::Word { forms, .. } | PatternToken::Glued { forms } => *forms == anchor_forms,
        _ => false,
    });
    let start = match (anchor_token == Some(first), glued_first) {
        (true, false) => MatchStart::AtHit,
        (true, true) => MatchStart::WordBeforeHit,
        _ => MatchStart::Scan,
    };
    // Only a cue searched over the whole sentence uses a prefilter of its own.
    let scans = start == MatchStart::Scan;
    let regex = lean_regex(&re.replace(BOUNDED_SLOT, "\\S.*?"), scans)
        .map_err(|e| format!("pattern compiles to a bad regex: {e}"))?;
    let exact = (!bounded.is_empty()).then(|| Exact {
        pattern: re.replace(BOUNDED_SLOT, &format!("\\S.{{0,{}}}?", SLOT_CHARS - 1)),
        prefilter: scans,
        regex: std::sync::OnceLock::new(),
    });
    let groups = (0..inner.len())
        .map(|i| {
            regex
                .group_info()
                .to_index(PatternID::ZERO, &format!("s{i}"))
                .unwrap_or(usize::MAX)
        })
        .collect();
    Ok(CompiledCue {
        start,
        groups,
        glued_last,
        verb_first,
        reject_after: rejects.get(&spec.reject_after, true)?,
        reject_before: rejects.get(&spec.reject_before, false)?,
        spec,
        regex,
        exact,
        bounded,
        left,
        right,
        inner,
        anchors,
    })
}

/// The start of the run of letters and digits that ends at byte `pos` (the word a glued literal
/// such as "-induced" hangs on).
fn word_start_before(text: &str, pos: usize) -> usize {
    text[..pos]
        .char_indices()
        .rev()
        .take_while(|(_, c)| c.is_alphanumeric())
        .last()
        .map_or(pos, |(i, _)| i)
}

/// A letter or digit, in any script: a hit next to one is inside a longer word. Dashes and curly
/// quotes are not ("rain—causes", "“causes”").
fn is_word_char(c: Option<char>) -> bool {
    c.is_some_and(char::is_alphanumeric)
}

/// A closed-class word of the lexicon (determiner, relative, auxiliary, preposition, clause
/// break, key stop word): the commonest words of English text, so the worst prefilter anchors.
fn is_function_word(lx: &crate::patterns::Lexicon, w: &str) -> bool {
    let w = w.to_lowercase();
    [
        &lx.determiners,
        &lx.relatives,
        &lx.auxiliaries,
        &lx.prepositions,
        &lx.clause_breaks,
        &lx.stopwords,
    ]
    .iter()
    .any(|s| s.contains(&w))
}

impl CueSet {
    /// Compile every cue of a pattern set.
    pub fn new(set: &PatternSet) -> Result<CueSet, String> {
        use rayon::prelude::*;
        let common = |w: &str| is_function_word(&set.lexicon, w);
        let rejects = Rejects::new(&set.cues);
        // Compiling the regexes is most of the cost of starting up (and of a small re-scan):
        // cues compile in parallel, and the first error in file order is the one reported.
        let compiled: Vec<Result<CompiledCue, String>> = set
            .cues
            .par_iter()
            .map(|spec| {
                compile(spec.clone(), &common, &rejects).map_err(|e| {
                    format!(
                        "{}:{}: cue '{}': {e}",
                        spec.origin.0.display(),
                        spec.origin.1,
                        spec.id
                    )
                })
            })
            .collect();
        let cues = compiled.into_iter().collect::<Result<Vec<_>, _>>()?;
        let mut anchors: Vec<String> = Vec::new();
        let mut anchor_cues: Vec<Vec<usize>> = Vec::new();
        for (ci, c) in cues.iter().enumerate() {
            for a in &c.anchors {
                match anchors.iter().position(|x| x == a) {
                    Some(i) => anchor_cues[i].push(ci),
                    None => {
                        anchors.push(a.clone());
                        anchor_cues.push(vec![ci]);
                    }
                }
            }
        }
        // A full DFA: one table lookup per byte. The default for this many literals is an NFA
        // that follows failure links, about twice the cost per byte on prose.
        let prefilter = AhoCorasickBuilder::new()
            .kind(Some(AhoCorasickKind::DFA))
            .ascii_case_insensitive(true)
            .match_kind(MatchKind::LeftmostLongest)
            .build(&anchors)
            .map_err(|e| format!("cannot build the cue prefilter: {e}"))?;
        let anchor_glued = anchors.iter().map(|a| a.starts_with('-')).collect();
        let mut by_id = rustc_hash::FxHashMap::default();
        for (ci, c) in cues.iter().enumerate() {
            by_id.entry(c.spec.id.clone()).or_insert(ci);
        }
        static NEXT_ID: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(1);
        Ok(CueSet {
            cues,
            prefilter,
            anchor_cues,
            anchor_glued,
            anchors,
            by_id,
            id: NEXT_ID.fetch_add(1, std::sync::atomic::Ordering::Relaxed),
        })
    }

    /// The family of the cue with id `cue` ("" when there is none), for confidence features.
    pub fn family(&self, cue: &str) -> &str {
        self.by_id
            .get(cue)
            .map_or("", |&ci| self.cues[ci].spec.family.as_str())
    }

    /// The prefilter's literal strings (one per line in `patterns list --literals`), without the
    /// leading hyphen of glued literals.
    pub fn literals(&self) -> Vec<String> {
        let set: BTreeSet<String> = self
            .anchors
            .iter()
            .map(|a| a.trim_start_matches('-').to_string())
            .collect();
        set.into_iter().collect()
    }

    /// Every whole-word anchor hit in `text`, in order.
    pub fn hits(&self, text: &str) -> Vec<Hit> {
        self.prefilter
            .find_iter(text)
            .filter(|m| {
                let a = m.pattern().as_usize();
                let left_ok =
                    self.anchor_glued[a] || !is_word_char(text[..m.start()].chars().next_back());
                left_ok && !is_word_char(text[m.end()..].chars().next())
            })
            .map(|m| Hit {
                pos: m.start(),
                anchor: m.pattern().as_usize(),
            })
            .collect()
    }

    /// The cues worth trying for a set of hits in a sentence that starts at byte `offset` of the
    /// text the hits were found in: each cue with the hit's place in the sentence.
    pub fn candidates(&self, hits: &[Hit], offset: usize) -> Vec<Candidate> {
        let set: BTreeSet<Candidate> = hits
            .iter()
            .flat_map(|h| {
                self.anchor_cues[h.anchor]
                    .iter()
                    .map(move |&cue| Candidate {
                        cue,
                        pos: h.pos - offset,
                    })
            })
            .collect();
        set.into_iter().collect()
    }

    /// All cue matches in one sentence, trying only `candidates`. Where two matches overlap, the
    /// longer one wins ("as a result of" over "as a result", "caused by" over "cause").
    pub fn match_sentence(&self, sentence: &str, candidates: &[Candidate]) -> Vec<CueMatch> {
        let mut found = Vec::new();
        let mut scanned: Vec<usize> = Vec::new();
        for c in candidates {
            let cue = &self.cues[c.cue];
            let at = match cue.start {
                MatchStart::AtHit => c.pos,
                MatchStart::WordBeforeHit => word_start_before(sentence, c.pos),
                MatchStart::Scan => {
                    if !scanned.contains(&c.cue) {
                        scanned.push(c.cue);
                        let all: Vec<Captures> = cue.regex.captures_iter(sentence).collect();
                        let all = match cue.exact_regex(sentence, &all) {
                            Some(exact) => exact.captures_iter(sentence).collect(),
                            None => all,
                        };
                        for caps in &all {
                            self.accept(c.cue, sentence, caps, &mut found);
                        }
                    }
                    continue;
                }
            };
            let input = Input::new(sentence)
                .span(at..sentence.len())
                .anchored(Anchored::Yes);
            CAPTURES.with(|scratch| {
                let mut scratch = scratch.borrow_mut();
                if scratch.0 != self.id {
                    *scratch = (self.id, Vec::new());
                    scratch.1.resize_with(self.cues.len(), || None);
                }
                let caps = scratch.1[c.cue].get_or_insert_with(|| cue.regex.create_captures());
                cue.regex.search_captures(&input, caps);
                match cue.exact_regex(sentence, std::slice::from_ref(caps)) {
                    Some(exact) => {
                        let mut exact_caps = exact.create_captures();
                        exact.search_captures(&input, &mut exact_caps);
                        self.accept(c.cue, sentence, &exact_caps, &mut found);
                    }
                    None => self.accept(c.cue, sentence, caps, &mut found),
                }
            });
        }
        // The same match can be reached from two hits.
        found.sort_by_key(|m: &CueMatch| (m.start, m.end, m.cue));
        found.dedup();
        found.sort_by_key(|m| (m.start, std::cmp::Reverse(m.end - m.start), m.cue));
        let mut kept: Vec<CueMatch> = Vec::new();
        // Longest first, then drop anything overlapping a kept match.
        let mut by_len = found.clone();
        by_len.sort_by_key(|m| (std::cmp::Reverse(m.end - m.start), m.start, m.cue));
        for m in by_len {
            if !kept.iter().any(|k| m.start < k.end && k.start < m.end) {
                kept.push(m);
            }
        }
        kept.sort_by_key(|m| m.start);
        kept
    }

    /// Turn one regex match of cue `ci` into a `CueMatch`, unless a reject rule vetoes it.
    fn accept(&self, ci: usize, sentence: &str, caps: &Captures, found: &mut Vec<CueMatch>) {
        let cue = &self.cues[ci];
        let Some(m) = caps.get_match() else { return };
        let group = |gi: usize| caps.get_group(cue.groups[gi]);
        // "After the cue" means after its first run of literal words: for "since CAUSE ,
        // EFFECT" that is right after "since".
        let lit_end = (0..cue.inner.len())
            .filter_map(group)
            .map(|g| g.start)
            .filter(|&s| s > m.start())
            .min()
            .unwrap_or(m.end());
        if let Some(r) = &cue.reject_after {
            if r.is_match(sentence[lit_end..].trim_start()) {
                return;
            }
        }
        let place = |role: Role| -> SlotPlace {
            if cue.left == Some(role) {
                return SlotPlace::Before;
            }
            if cue.right == Some(role) {
                return SlotPlace::After;
            }
            let gi = cue.inner.iter().position(|r| *r == role).unwrap_or(0);
            match group(gi) {
                Some(g) => SlotPlace::Inside(g.start, g.end),
                None => SlotPlace::Inside(m.start(), m.start()),
            }
        };
        let (cause, effect) = (place(Role::Cause), place(Role::Effect));
        // The literal span excludes a glued slot captured at the start.
        let start = match (cause, effect) {
            (SlotPlace::Inside(s, e), _) | (_, SlotPlace::Inside(s, e)) if s == m.start() => e,
            _ => m.start(),
        };
        // Anchored at the cue's own start: for "CAUSE -mediated", right after the glued word.
        if let Some(r) = &cue.reject_before {
            if r.is_match(sentence[..start].trim_end()) {
                return;
            }
        }
        found.push(CueMatch {
            cue: ci,
            start,
            end: m.end(),
            cause,
            effect,
        });
    }

    /// All cue matches in a sentence, using the prefilter on the sentence itself.
    pub fn match_all(&self, sentence: &str) -> Vec<CueMatch> {
        let hits = self.hits(sentence);
        self.match_sentence(sentence, &self.candidates(&hits, 0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn set() -> CueSet {
        CueSet::new(&PatternSet::builtin().unwrap()).unwrap()
    }

    #[test]
    fn every_builtin_cue_compiles_and_has_anchors() {
        let s = set();
        for c in &s.cues {
            assert!(!c.anchors.is_empty(), "{} has no anchor", c.spec.id);
        }
        assert!(s.literals().len() > 100);
    }

    /// A function word anchors a cue only when the cue has no other word ("so", "since"): "link
    /// between" is found by "link", "come~ from" by "come".
    #[test]
    fn anchors_avoid_function_words() {
        let set_ = PatternSet::builtin().unwrap();
        let s = CueSet::new(&set_).unwrap();
        let lx = &set_.lexicon;
        let mut checked = 0;
        for c in &s.cues {
            let words: Vec<&Vec<String>> = c
                .spec
                .tokens
                .iter()
                .filter_map(|t| match t {
                    PatternToken::Word { forms, .. } | PatternToken::Glued { forms } => Some(forms),
                    _ => None,
                })
                .collect();
            let content = words
                .iter()
                .any(|f| !f.iter().any(|w| is_function_word(lx, w)));
            if content {
                checked += 1;
                let bare: Vec<&str> = c
                    .anchors
                    .iter()
                    .map(|a| a.trim_start_matches('-'))
                    .collect();
                assert!(
                    !bare.iter().any(|a| is_function_word(lx, a)),
                    "{}: anchors {bare:?}",
                    c.spec.id
                );
            }
        }
        assert!(checked > 200, "{checked}");
        let lits = s.literals();
        // ("from" stays: "EFFECT from CAUSE" has no other word.)
        for w in [
            "with", "that", "this", "which", "between", "about", "against",
        ] {
            assert!(!lits.iter().any(|l| l == w), "{w} is a literal");
        }
    }

    #[test]
    fn hits_are_whole_words() {
        let s = set();
        let text = "Because it rained. The causeway flooded; rain causes floods.";
        let words: Vec<&str> = s.hits(text).iter().map(|h| &text[h.pos..]).collect();
        assert!(words.iter().any(|w| w.starts_with("Because")));
        assert!(words.iter().any(|w| w.starts_with("causes")));
        assert!(!words.iter().any(|w| w.starts_with("causeway")));
        // Next to a dash or a curly quote a word is whole; next to a letter of any script not.
        let text = "rain—causes floods; “causes”; écauses; causesé";
        let words: Vec<&str> = s.hits(text).iter().map(|h| &text[h.pos..]).collect();
        assert_eq!(
            words.iter().filter(|w| w.starts_with("causes")).count(),
            2,
            "{words:?}"
        );
    }

    #[test]
    fn text_without_cues_has_no_hits() {
        assert!(set()
            .hits("The quick brown fox jumps over the lazy dog.")
            .is_empty());
    }

    /// An inner slot holds at most `SLOT_CHARS` characters, as the exact regex says, although
    /// the regex searched first leaves it unbounded: at the bound and one past it, in ASCII and
    /// in two-byte characters, found from the hit and by scanning the sentence.
    #[test]
    fn inner_slots_stop_at_their_bound() {
        let s = set();
        let ids = |sentence: &str| -> Vec<String> {
            s.match_all(sentence)
                .iter()
                .map(|m| s.cues[m.cue].spec.id.clone())
                .collect()
        };
        for (unit, n) in [("x", SLOT_CHARS), ("é", SLOT_CHARS), ("x", SLOT_CHARS + 1)] {
            let slot = unit.repeat(n);
            let fits = n <= SLOT_CHARS;
            let anchored = format!("A correlation between {slot} and yield was found.");
            assert_eq!(
                ids(&anchored).contains(&"correlation-between".to_string()),
                fits,
                "{n} x {unit}: {:?}",
                ids(&anchored)
            );
            // "no link between" is anchored on "link", not on its first word: it scans.
            let scanned = format!("We saw no link between {slot} and yield.");
            assert_eq!(
                ids(&scanned).iter().any(|id| id.contains("link")),
                fits,
                "{n} x {unit}: {:?}",
                ids(&scanned)
            );
        }
    }

    /// The slot groups are read by the fast regex's indexes from either regex's captures: every
    /// built-in cue's exact regex must number its slot groups as the fast one does.
    #[test]
    fn exact_regexes_number_slot_groups_alike() {
        let s = set();
        let mut checked = 0;
        for c in &s.cues {
            let Some(exact) = c.exact.as_ref().and_then(Exact::regex) else {
                continue;
            };
            for (i, &gi) in c.groups.iter().enumerate() {
                let name = format!("s{i}");
                assert_eq!(
                    exact.group_info().to_index(PatternID::ZERO, &name),
                    Some(gi),
                    "{}",
                    c.spec.id
                );
                checked += 1;
            }
        }
        assert!(checked > 10, "only {checked} slot groups checked");
    }

    #[test]
    fn longer_match_wins() {
        let s = set();
        let sentence = "The fire was caused by a spark.";
        let ms = s.match_all(sentence);
        assert_eq!(ms.len(), 1, "{ms:?}");
        assert_eq!(ms[0].effect, SlotPlace::Before);
        assert_eq!(ms[0].cause, SlotPlace::After);
    }
}
