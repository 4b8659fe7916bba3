//! Subject and run labels are used in file paths (nuisance templates), so they must be
//! plain names: letters, digits, `-`, `_` and `.`, not `.` or `..`, nothing else.

use crate::error::{Location, Problem};

/// Letters, digits, `-`, `_` and `.`, and not `.` or `..`.
pub fn is_plain_label(label: &str) -> bool {
    !label.is_empty()
        && label != "."
        && label != ".."
        && label
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.'))
}

pub fn check_label(label: &str, what: &str, location: Location) -> Result<(), Problem> {
    if is_plain_label(label) {
        Ok(())
    } else {
        Err(Problem::new(
            location,
            format!("the {what} label \"{label}\" is not a plain name"),
        )
        .with_hint("labels may hold letters, digits, '-', '_' and '.', because they are used in file names"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::Path;

    #[test]
    fn only_plain_names_pass() {
        let at = || Location::file(Path::new("t.csv"));
        for good in ["01", "sub-01", "pilot_3", "r1.2"] {
            assert!(check_label(good, "subject", at()).is_ok(), "{good}");
        }
        for bad in ["", ".", "..", "../x", "a/b", "a b", "a\\b"] {
            assert!(check_label(bad, "subject", at()).is_err(), "{bad:?}");
        }
    }
}
