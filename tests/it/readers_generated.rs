//! Documents built here with general-purpose tools, read back against their source.
//!
//! PDF: groff (`-ms`, PostScript) and ghostscript's `ps2pdf` (Debian groff, ghostscript) typeset
//! a source text written here (invented prose, a behaviour guard); the text hearsay reads must
//! agree with the source (bag-of-words F1, `common::bag_of_words_f1`, at least 0.98 as the
//! issue asks), give the same claims as the same text in a `.txt` file, and put each claim on
//! the page its section was set on (each section starts a new page with `.bp`). An encrypted
//! copy made with `qpdf --encrypt` (Debian qpdf) must fail with a warning naming the file and
//! the reason while the rest of the scan goes on.
//!
//! HTML: a page with site chrome (header, nav, a menu list, script, footer) around an article;
//! our text must agree with Python's html.parser text of the article element alone (at least
//! 0.98) and hold no menu words.

use crate::common::*;
use std::path::Path;
use std::process::Command;

/// Invented source text: three sections, each set on its own page.
const SECTIONS: [&[&str]; 3] = [
    &[
        "The northern basin of the lake fills slowly during the cold months. Heavy spring rain raises the water level of the northern basin. Surveyors measure the depth at twelve fixed posts along the shore and record each value in a bound ledger.",
        "Along the eastern shore the reed beds grow thick in summer. Shade from the reeds lowers the temperature of the shallow water. Small fish gather among the stems, where the current is weak and the light is soft.",
        "Farmers on the slopes above the lake plough their fields in autumn. Ploughing on steep ground causes soil erosion on the upper terraces. The loose soil drifts downhill with every storm and settles in the quiet bays below.",
        "A ferry crosses the lake twice a day between the two harbour towns. Passengers watch the gulls follow the boat until it reaches the middle of the water, where the birds turn back towards the cliffs.",
    ],
    &[
        "The southern harbour was rebuilt after a long dispute about its cost. Dredging of the channel increases the turbidity of the harbour water for several weeks. Divers reported that the visibility returned to normal before the first festival of the season.",
        "Winter storms bring cold air from the mountains to the west. Strong wind leads to higher waves on the open water. The harbour master closes the outer pier whenever the flags on the signal mast stand straight out.",
        "The town council keeps a careful record of visitors in the warm months. Crowds on the beach are associated with more litter along the promenade. Volunteers collect the litter each morning and sort it into separate bins.",
        "Old maps of the region show a second island that no longer exists. Historians believe the island was a sand bar that moved with the currents over many decades, and the maps simply recorded its position at one moment.",
    ],
    &[
        "In the western marshes the water is brown and still. Decaying leaves reduce the oxygen content of the marsh water in late summer. Frogs call from the banks at dusk, and herons wait motionless at the edge of the channels.",
        "The fishing cooperative sets strict limits on the size of nets. Overfishing in the deep water causes a decline in the trout population. Inspectors visit the boats at random and measure the mesh of every net they find.",
        "A small observatory stands on the hill above the eastern harbour. On clear nights the staff open the dome to the public, and children line up to look at the rings of the distant planets through the old brass telescope.",
    ],
];

fn groff_source() -> String {
    let mut s = String::from(".nr PS 11\n.nr VS 13\n");
    for (i, paras) in SECTIONS.iter().enumerate() {
        if i > 0 {
            s.push_str(".bp\n");
        }
        for p in *paras {
            s.push_str(".PP\n");
            s.push_str(p);
            s.push('\n');
        }
    }
    s
}

fn plain_text() -> String {
    SECTIONS
        .iter()
        .flat_map(|s| s.iter())
        .copied()
        .collect::<Vec<_>>()
        .join("\n\n")
}

/// The 1-based section (page) whose source holds `sentence`.
fn section_of(sentence: &str) -> usize {
    let w = word_string(sentence);
    SECTIONS
        .iter()
        .position(|s| word_string(&s.join(" ")).contains(&w))
        .unwrap_or_else(|| panic!("sentence {sentence:?} is in no section"))
        + 1
}

/// Build `dir/lake.pdf` from the source with groff and ps2pdf.
pub(crate) fn build_pdf(dir: &Path) -> std::path::PathBuf {
    let ms = dir.join("lake.ms");
    std::fs::write(&ms, groff_source()).unwrap();
    let ps = dir.join("lake.ps");
    let out = Command::new("groff")
        .args(["-ms", "-Tps"])
        .arg(&ms)
        .output()
        .expect("groff runs");
    assert!(
        out.status.success(),
        "groff: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    std::fs::write(&ps, &out.stdout).unwrap();
    let pdf = dir.join("lake.pdf");
    let st = Command::new("ps2pdf")
        .arg(&ps)
        .arg(&pdf)
        .status()
        .expect("ps2pdf runs");
    assert!(st.success());
    std::fs::remove_file(&ps).unwrap();
    pdf
}

type ClaimKey = (String, String, String, String, String);

/// Claims of one file as (cause, effect, cue, polarity, modality) with the sentence and page.
fn claims_of(path: &Path) -> Vec<(ClaimKey, String, Option<u64>)> {
    let out = hearsay()
        .args(["-q", "extract"])
        .arg(path)
        .output()
        .expect("runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| {
            let c: serde_json::Value = serde_json::from_str(l).unwrap();
            let s = |v: &serde_json::Value| v.as_str().unwrap_or_default().to_string();
            (
                (
                    s(&c["cause"]["text"]),
                    s(&c["effect"]["text"]),
                    s(&c["cue"]),
                    s(&c["polarity"]),
                    s(&c["modality"]),
                ),
                s(&c["sentence"]),
                c["source"]["page"].as_u64(),
            )
        })
        .collect()
}

pub(crate) fn tools() -> bool {
    external_tool("groff", "groff") && external_tool("ps2pdf", "ghostscript")
}

#[test]
fn groff_pdf_text_claims_and_pages_match_the_source() {
    if !tools() {
        return;
    }
    let tmp = tempfile::tempdir().unwrap();
    let pdf = build_pdf(tmp.path());
    let txt = tmp.path().join("lake.txt");
    std::fs::write(&txt, plain_text()).unwrap();

    let ours = sentences_read(&pdf, &[]).join("\n");
    let f1 = bag_of_words_f1(&ours, &plain_text());
    eprintln!("groff PDF: bag-of-words F1 against the source text {f1:.4}");
    assert!(f1 >= 0.98, "agreement {f1:.3} under 0.98:\n{ours}");
    // groff's page numbers ("- 2 -") are furniture, not text.
    assert!(!ours.contains("- 2 -"), "{ours}");

    let from_pdf = claims_of(&pdf);
    let from_txt = claims_of(&txt);
    let keys = |v: &[(ClaimKey, String, Option<u64>)]| {
        let mut k: Vec<ClaimKey> = v.iter().map(|c| c.0.clone()).collect();
        k.sort();
        k
    };
    assert!(
        from_txt.len() >= 8,
        "the source states at least eight claims: {from_txt:?}"
    );
    assert_eq!(keys(&from_pdf), keys(&from_txt));
    let mut later = 0;
    for (key, sentence, page) in &from_pdf {
        let want = section_of(sentence) as u64;
        later += usize::from(want > 1);
        assert_eq!(*page, Some(want), "{key:?} in {sentence:?}");
    }
    assert!(later >= 4, "claims on pages 2 and 3 are checked");
}

#[test]
fn encrypted_pdf_is_a_warning_and_the_scan_goes_on() {
    if !tools() || !external_tool("qpdf", "qpdf") {
        return;
    }
    let tmp = tempfile::tempdir().unwrap();
    let built = build_pdf(tmp.path());
    let corpus = tmp.path().join("corpus");
    std::fs::create_dir_all(&corpus).unwrap();
    let locked = corpus.join("locked.pdf");
    let st = Command::new("qpdf")
        .args(["--encrypt", "reader-pw", "owner-pw", "256", "--"])
        .arg(&built)
        .arg(&locked)
        .status()
        .expect("qpdf runs");
    assert!(st.success());
    std::fs::write(
        corpus.join("note.txt"),
        "Strong wind leads to higher waves on the lake.\n",
    )
    .unwrap();
    let store = tmp.path().join("store");
    let out = hearsay()
        .arg("--store")
        .arg(&store)
        .args(["--format", "json", "scan"])
        .arg(&corpus)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{stderr}");
    assert!(
        stderr
            .lines()
            .any(|l| l.contains("locked.pdf") && l.contains("encrypted")),
        "no warning naming locked.pdf as encrypted:\n{stderr}"
    );
    let claims = json_lines(&["claims"], &store);
    assert!(
        claims
            .iter()
            .any(|c| c["source"]["path"].as_str().unwrap().ends_with("note.txt")),
        "{claims:?}"
    );
}

/// Invented page (a behaviour guard): site chrome around one article.
const PAGE: &str = r#"<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>Harbour notes</title>
<style>body { font-family: serif }</style>
<script>var tracker = "Subscribe now";</script></head>
<body>
<header><a href="/">Quorvin Weekly</a> <span>Timetables and Tickets</span></header>
<nav><ul><li><a href="/a">Archive</a></li><li><a href="/b">Careers</a></li></ul></nav>
<div class="menu"><a href="/c">Horoscopes</a> <a href="/d">Crosswords</a></div>
<ul><li><a href="/e">Classifieds</a></li><li><a href="/f">Obituaries</a></li></ul>
<article>
<h1>Notes from the southern harbour</h1>
<p>The southern harbour was rebuilt after a long dispute about its cost. Dredging of the
channel increases the turbidity of the harbour water for several weeks.</p>
<p>Winter storms bring cold air from the mountains. Strong wind leads to higher waves on the
open water, and the harbour master closes the outer pier when the flags stand straight out.</p>
<h2>Along the shore</h2>
<ul><li>Shade from the reeds lowers the temperature of the shallow water.</li>
<li>Crowds on the beach are associated with more litter along the promenade.</li></ul>
<p>Volunteers collect the litter each morning &amp; sort it into separate bins.</p>
<script>document.write("Advertisement");</script>
</article>
<aside>Weather widget: Sunshine</aside>
<footer>Copyright Quorvin Weekly. Contact the newsroom.</footer>
</body></html>
"#;

/// Words of the site chrome: none may reach the sentences.
const MENU_WORDS: &[&str] = &[
    "Quorvin",
    "Timetables",
    "Archive",
    "Careers",
    "Horoscopes",
    "Crosswords",
    "Classifieds",
    "Obituaries",
    "Subscribe",
    "Advertisement",
    "Sunshine",
    "Copyright",
    "newsroom",
];

/// The text of the `<article>` element by Python's html.parser (standard library), without
/// its scripts and styles.
const ARTICLE_TEXT: &str = r#"
import sys
from html.parser import HTMLParser
class P(HTMLParser):
    def __init__(s):
        super().__init__(convert_charrefs=True); s.depth=0; s.skip=0; s.out=[]
    def handle_starttag(s, t, a):
        if t=="article": s.depth+=1
        if t in ("script","style"): s.skip+=1
    def handle_endtag(s, t):
        if t=="article": s.depth-=1
        if t in ("script","style"): s.skip-=1
    def handle_data(s, d):
        if s.depth and not s.skip: s.out.append(d)
p=P(); p.feed(open(sys.argv[1],encoding="utf-8").read()); print(" ".join(p.out))
"#;

#[test]
fn generated_html_page_agrees_with_html_parser_article_text() {
    let tmp = tempfile::tempdir().unwrap();
    let page = tmp.path().join("harbour.html");
    std::fs::write(&page, PAGE).unwrap();
    let out = Command::new("python3")
        .args(["-c", ARTICLE_TEXT])
        .arg(&page)
        .output()
        .expect("python3 runs");
    assert!(out.status.success());
    let reference = String::from_utf8(out.stdout).unwrap();
    let ours = sentences_read(&page, &[]).join("\n");
    let f1 = bag_of_words_f1(&ours, &reference);
    eprintln!("generated HTML: bag-of-words F1 against html.parser article text {f1:.4}");
    assert!(f1 >= 0.98, "agreement {f1:.3} under 0.98:\n{ours}");
    for w in MENU_WORDS {
        assert!(PAGE.contains(w));
        assert!(!ours.contains(w), "menu word {w:?} in:\n{ours}");
    }
    // Blocks are sentence boundaries: the heading and each list item stand alone.
    let sentences = sentences_read(&page, &[]);
    assert!(
        sentences.contains(&"Along the shore".to_string()),
        "{sentences:?}"
    );
    assert!(
        sentences.contains(
            &"Volunteers collect the litter each morning & sort it into separate bins.".to_string()
        ),
        "{sentences:?}"
    );
}
