//! Fuzz format sniffing and decompression (gzip, zstd, with a small cap) in front of every
//! reader, as a folder scan reads a file.
#![no_main]

use hearsay::corpus::{read_from, ReadOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let opts = ReadOptions {
        max_decompressed: 1 << 20,
        max_record: 1 << 16,
        ..ReadOptions::default()
    };
    let mut warnings = Vec::new();
    let mut src: &[u8] = data;
    let path = std::path::Path::new("fuzz.jsonl.gz");
    let _ = read_from("fuzz", path, &mut src, &opts, &mut warnings, &mut |_| {});
});
