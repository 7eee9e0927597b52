//! Fuzz the pdf reader: any bytes give documents or an error, never a panic that escapes the
//! reader, and every sentence span lies inside the text the reader produced.
//!
//! The PDF extraction library panics on many malformed pages (a missing object, a short
//! MediaBox); the reader contains that per page (`catch_unwind`, a warning, an empty page), as
//! it does in a real run. libFuzzer's panic hook would abort on the contained panic too, so this
//! target installs a silent hook: a panic that escapes the reader still aborts the run.
#![no_main]

use hearsay::corpus::{ReadOptions, Reader};
use hearsay::corpus::readers::pdf::PdfReader;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    static QUIET: std::sync::Once = std::sync::Once::new();
    QUIET.call_once(|| std::panic::set_hook(Box::new(|_| {})));
    let mut warnings = Vec::new();
    let mut src: &[u8] = data;
    let _ = PdfReader.read_stream("fuzz", &mut src, &ReadOptions::default(), &mut warnings, &mut |d| {
        for s in hearsay::sentences::split(&d.text) {
            assert!(s.start <= s.end && d.text.get(s.start..s.end).is_some());
        }
    });
});
