//! Real documents read against general-purpose references.
//!
//! Source: ../shared/data/real-documents/SOURCE.txt (open-access papers as PDF and saved web
//! pages as HTML, each with its licence). References: poppler's `pdftotext` (Debian
//! poppler-utils) for PDF; Python's `html.parser` (standard library) for HTML.
//!
//! Metric: bag-of-words F1 (`common::bag_of_words_f1`): words are lower-cased runs of letters
//! (numbers are not words, so table cells and axis ticks weigh nothing), and the score is the
//! common word count over the mean of both counts. The 0.95 target is from the issue; files
//! that cannot reach it because of the PDF library have a floor just under what is reached,
//! with the reason beside it.

use crate::common::*;
use std::collections::HashMap;
use std::path::Path;
use std::process::Command;

/// A line that is only a references heading ends the body text (on both sides).
fn is_references_heading(line: &str) -> bool {
    let t = line
        .trim()
        .trim_start_matches(|c: char| c.is_ascii_digit() || c == '.' || c.is_whitespace());
    matches!(t, "References" | "REFERENCES" | "Bibliography")
}

fn masked(line: &str) -> String {
    line.chars()
        .filter(|c| !c.is_whitespace())
        .map(|c| if c.is_ascii_digit() { '#' } else { c })
        .collect()
}

/// The reference body text of a PDF from `pdftotext`: pages are split at form feeds; lines that
/// repeat (digits masked) on at least half of the pages and two are running headers and
/// footers; lines without a word of three letters are not prose (axis ticks, table numbers);
/// the text ends at the references heading. Returns the body, the running lines (one instance
/// each) and the first lines of the reference list.
fn pdftotext_body(pdf: &Path) -> (String, Vec<String>, Vec<String>) {
    let out = Command::new("pdftotext")
        .arg(pdf)
        .arg("-")
        .output()
        .expect("pdftotext runs");
    assert!(
        out.status.success(),
        "pdftotext failed on {}",
        pdf.display()
    );
    let text = String::from_utf8_lossy(&out.stdout).into_owned();
    let pages: Vec<&str> = text
        .split('\u{c}')
        .filter(|p| !p.trim().is_empty())
        .collect();
    // masked line -> (pages it is on, pages it is on within three lines of the top or
    // bottom, one instance)
    let mut seen: HashMap<String, (usize, usize, String)> = HashMap::new();
    for p in &pages {
        let lines: Vec<&str> = p.lines().filter(|l| !l.trim().is_empty()).collect();
        let n = lines.len();
        let mut here: Vec<(String, bool, &str)> = lines
            .iter()
            .enumerate()
            .map(|(i, l)| (masked(l), i < 3 || i + 3 >= n, *l))
            .collect();
        here.sort_by(|a, b| a.0.cmp(&b.0).then(b.1.cmp(&a.1)));
        here.dedup_by(|a, b| a.0 == b.0);
        for (m, edge, l) in here {
            let e = seen.entry(m).or_insert((0, 0, l.trim().to_string()));
            e.0 += 1;
            e.1 += usize::from(edge);
        }
    }
    let need = (pages.len() / 2).max(2);
    // Running headers and footers: repeated lines at page edges (figure labels that repeat
    // inside pages are left out of the reference body but are not furniture).
    let running: Vec<String> = seen
        .values()
        .filter(|(_, edge, _)| *edge >= need)
        .map(|(_, _, l)| l.clone())
        .collect();
    let has_word = |l: &str| {
        l.split(|c: char| !c.is_alphabetic())
            .any(|w| w.chars().count() >= 3)
    };
    let mut body = Vec::new();
    let mut refs = Vec::new();
    let mut in_refs = false;
    for l in pages.iter().flat_map(|p| p.lines()) {
        if in_refs {
            if l.trim().len() > 25 && refs.len() < 3 {
                refs.push(l.trim().to_string());
            }
            continue;
        }
        if is_references_heading(l) {
            in_refs = true;
            continue;
        }
        if l.trim().is_empty() || !has_word(l) || seen[&masked(l)].0 >= need {
            continue;
        }
        body.push(l);
    }
    assert!(
        in_refs,
        "{}: pdftotext shows no references heading",
        pdf.display()
    );
    (body.join("\n"), running, refs)
}

/// Running lines worth checking: at least two words, one of three letters (a bare "ReScience"
/// or an axis title may also be body text).
fn checkable(line: &str) -> bool {
    word_string(line).split(' ').count() >= 2 && words(line).iter().any(|w| w.len() >= 3)
}

fn check_pdf(name: &str, floor: f64) {
    let Some(pdf) = shared_data(&format!("real-documents/pdf/{name}")) else {
        return;
    };
    if !external_tool("pdftotext", "poppler-utils") {
        return;
    }
    let (reference, running, refs) = pdftotext_body(&pdf);
    let ours = sentences_read(&pdf, &[]).join("\n");
    let f1 = bag_of_words_f1(&ours, &reference);
    eprintln!("{name}: bag-of-words F1 against pdftotext body text {f1:.4} (floor {floor})");
    assert!(f1 >= floor, "{name}: agreement {f1:.3} under {floor}");
    let flat = word_string(&ours);
    for l in running.iter().filter(|l| checkable(l)) {
        assert!(
            !flat.contains(&word_string(l)),
            "{name}: running header/footer {l:?} is in the sentences"
        );
    }
    assert!(!refs.is_empty(), "{name}: no reference lines to check");
    for r in &refs {
        assert!(
            !flat.contains(&word_string(r)),
            "{name}: reference list line {r:?} is in the sentences"
        );
    }
}

#[test]
fn pdf_bmc_hsr_agrees_with_pdftotext() {
    // 0.969 reached since word gaps are measured per glyph (0.940 with pdf-extract's own word
    // breaks, which ran this file's table cells together); some table words are still split
    // ("Append ix"), as the table font's widths are off.
    check_pdf("bmc-hsr_quality-improvement-malawi.pdf", 0.95);
}

#[test]
fn pdf_jtmo_agrees_with_pdftotext() {
    check_pdf("jtmo_DVT-prophylaxis-trauma-review.pdf", 0.95);
}

#[test]
fn pdf_mlwa_agrees_with_pdftotext() {
    check_pdf("mlwa_random-forest-interpretation.pdf", 0.95);
}

#[test]
fn pdf_rescience_cooperation_agrees_with_pdftotext() {
    check_pdf("rescience_cooperation-on-graphs.pdf", 0.95);
}

#[test]
fn pdf_rescience_insects_agrees_with_pdftotext() {
    // 0.979 reached since form XObjects' fonts get names of their own (0.925 before: the
    // figures' Helvetica is /F4 inside each figure and the caption font is /F4 on the page, and
    // pdf-extract's per-page font cache decoded the captions with Helvetica, as letter soup
    // that was dropped). What is left over is ours reading figure axis labels that the
    // reference side drops (lines without a three-letter word) and equation subscripts.
    check_pdf("rescience_insect-natural-enemies.pdf", 0.975);
}

/// Reference body text of a saved page with Python's html.parser (standard library): only the
/// main landmark (`<main>` or `role="main"`) when there is one; the elements that are never
/// body text dropped (script, style, head, nav, header, footer, aside, forms, menus and the
/// WAI-ARIA landmarks navigation, banner, contentinfo, complementary, search); the text ends at
/// the first back-matter heading (References, See also, ...). Class names are not looked at.
const HTML_REFERENCE: &str = r#"
import sys, re
from html.parser import HTMLParser
DROP = {"script","style","nav","header","footer","aside","noscript","head","template","form",
        "button","select","svg","iframe","object","menu"}
ROLES = {"navigation","banner","contentinfo","complementary","search"}
VOID = {"br","img","hr","meta","link","input","area","base","col","embed","source","track","wbr","param"}
BACK = {"references","bibliography","works cited","literature cited","references and notes","notes",
        "footnotes","citations","further reading","external links","see also"}
class P(HTMLParser):
    def __init__(s, main_only):
        super().__init__(convert_charrefs=True)
        s.stack=[]; s.skip=0; s.inmain=0; s.main_only=main_only; s.out=[]; s.head=None; s.stop=False
    def handle_starttag(s, tag, attrs):
        if tag in VOID: return
        a=dict(attrs); role=(a.get("role") or "").strip()
        drop = s.skip>0 or tag in DROP or role in ROLES
        main = tag=="main" or role=="main"
        s.stack.append((tag,drop,main))
        if drop: s.skip+=1
        if main: s.inmain+=1
        if re.fullmatch(r"h[1-6]",tag): s.head=[]
    def handle_endtag(s, tag):
        if tag in VOID: return
        for i in range(len(s.stack)-1,-1,-1):
            if s.stack[i][0]==tag:
                for t,d,m in s.stack[i:]:
                    if d: s.skip-=1
                    if m: s.inmain-=1
                del s.stack[i:]
                break
        if re.fullmatch(r"h[1-6]",tag) and s.head is not None:
            h=" ".join(re.findall(r"[^\W\d_]+"," ".join(s.head).lower()))
            h=re.sub(r" edit$","",h)
            if h in BACK and s.skip==0 and (s.inmain or not s.main_only): s.stop=True
            s.head=None
    def handle_data(s, d):
        if s.stop or s.skip or (s.main_only and not s.inmain): return
        if s.head is not None: s.head.append(d)
        s.out.append(d)
src=open(sys.argv[1],encoding="utf-8",errors="replace").read()
has_main = re.search(r"<main[\s>]|role=[\"']main[\"']", src, re.I) is not None
p=P(has_main); p.feed(src); p.close()
sys.stdout.write("\n".join(p.out))
"#;

/// The html.parser reference text of an HTML file.
pub fn html_parser_text(html: &Path) -> String {
    let out = Command::new("python3")
        .args(["-c", HTML_REFERENCE])
        .arg(html)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "html.parser reference failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("utf-8")
}

/// `chrome`: site furniture that is in the saved page (checked) and must not be in the
/// sentences; `after_refs`: text from the reference list, which must be cut off.
fn check_html(name: &str, floor: f64, chrome: &[&str], after_refs: &str) {
    let Some(html) = shared_data(&format!("real-documents/html/{name}")) else {
        return;
    };
    let reference = html_parser_text(&html);
    let ours = sentences_read(&html, &[]).join("\n");
    let f1 = bag_of_words_f1(&ours, &reference);
    eprintln!("{name}: bag-of-words F1 against html.parser body text {f1:.4} (floor {floor})");
    assert!(f1 >= floor, "{name}: agreement {f1:.3} under {floor}");
    let raw = String::from_utf8_lossy(&std::fs::read(&html).unwrap()).into_owned();
    for c in chrome.iter().chain([&after_refs]) {
        assert!(
            raw.contains(c),
            "{name}: {c:?} is not in the page (test data changed?)"
        );
        assert!(!ours.contains(c), "{name}: {c:?} is in the sentences");
    }
}

#[test]
fn html_bmc_public_health_agrees_with_html_parser() {
    check_html(
        "bmc-public-health_children-sedentary-behaviour.html",
        0.95,
        &["Mendeley", "Related articles"],
        "Systematic review of sedentary behaviour and health indicators in school-aged children",
    );
}

#[test]
fn html_plos_one_agrees_with_html_parser() {
    check_html(
        "plos-one_feline-fibrosarcoma-gene-transfer.html",
        0.95,
        &["PowerPoint slide", "Mendeley", "Privacy Policy"],
        "Multicentric Fibrosarcoma in a Cat and a Review of the Literature",
    );
}

#[test]
fn html_wikipedia_agrees_with_html_parser() {
    check_html(
        "wikipedia_New_Zealand.html",
        0.95,
        &[
            "Jump to navigation",
            "Main article",
            "Recent changes",
            "Privacy policy",
        ],
        "New Zealand in World Affairs IV",
    );
}
