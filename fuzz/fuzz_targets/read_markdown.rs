//! Fuzz the markdown reader: any bytes give documents or an error, never a panic, and every
//! sentence span lies inside the text the reader produced.
#![no_main]

use hearsay::corpus::{ReadOptions, Reader};
use hearsay::corpus::readers::markdown::MarkdownReader;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut warnings = Vec::new();
    let mut src: &[u8] = data;
    let _ = MarkdownReader.read_stream("fuzz", &mut src, &ReadOptions::default(), &mut warnings, &mut |d| {
        for s in hearsay::sentences::split(&d.text) {
            assert!(s.start <= s.end && d.text.get(s.start..s.end).is_some());
        }
    });
});
