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
use std::collections::BTreeMap;
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

/// Build `dir/name.pdf` from the source with groff and ps2pdf.
fn build_pdf(dir: &Path) -> std::path::PathBuf {
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

fn tools() -> bool {
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
