//! The trial-table reader on arbitrary bytes, as a comma- and a tab-separated file; every
//! number it hands out must be finite.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use tangle::trials::Table;

fuzz_target!(|bytes: &[u8]| {
    let text = String::from_utf8_lossy(bytes);
    for name in ["t.csv", "t.tsv"] {
        if let Ok(table) = Table::parse(Path::new(name), &text) {
            for row in table.rows() {
                for column in 0..table.headers.len() {
                    if let Ok(Some(value)) = table.number(row, column) {
                        assert!(value.is_finite());
                    }
                }
            }
        }
    }
});
