//! The study-file parser on arbitrary bytes: a study or a list of problems, never a panic
//! and never an internal error.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use tangle::study::parse_study;

fuzz_target!(|bytes: &[u8]| {
    let text = String::from_utf8_lossy(bytes);
    if let Err(err) = parse_study(Path::new("study.toml"), &text) {
        assert!(!err.to_string().contains("internal error"));
    }
});
