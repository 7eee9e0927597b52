//! Fuzz the sentence splitter: spans are ordered, do not overlap, and lie on character
//! boundaries of the input.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let mut last = 0;
    for s in hearsay::sentences::split(text) {
        assert!(last <= s.start && s.start <= s.end && text.get(s.start..s.end).is_some());
        last = s.end;
    }
});
