//! The forecast-spec parser on arbitrary bytes: a spec or a list of problems, never a
//! panic and never an internal error.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use tangle::forecast::spec::parse_forecast;

fuzz_target!(|bytes: &[u8]| {
    let text = String::from_utf8_lossy(bytes);
    if let Err(err) = parse_forecast(Path::new("forecast.toml"), &text) {
        assert!(!err.to_string().contains("internal error"));
    }
});
