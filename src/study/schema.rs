//! The keys a study file may use, so that a misspelt key is caught and the closest
//! valid one suggested instead of being silently ignored.

pub const TOP_LEVEL: &[&str] = &[
    "study",
    "acquisition",
    "filter",
    "hrf",
    "trials",
    "event",
    "model",
    "nuisance",
    "thresholds",
    "bids",
];

/// Group names of the variance partition, which a model may not take.
pub const RESERVED_MODEL_NAMES: &[&str] = &["task", "nuisance", "unique"];

/// Keys of a `[thresholds]` section (study file and forecast spec).
pub const THRESHOLD_KEYS: &[&str] = &[
    "vif_caution",
    "vif_severe",
    "condition_index",
    "condition_index_severe",
    "shared_over_unique",
];

/// Keys allowed inside each section (arrays of tables use the same list for every entry).
pub fn keys_of(section: &str) -> &'static [&'static str] {
    match section {
        "study" => &["name"],
        "acquisition" => &["tr", "scans", "scans_file", "microtime", "reference"],
        "filter" => &["high_pass"],
        "hrf" => &["derivative"],
        "trials" => &["file", "subject", "run"],
        "event" => &["name", "onset", "duration", "type_column", "type"],
        "model" => &["name", "modulators"],
        "modulators" => &["event", "column"],
        "nuisance" => &["file", "columns"],
        "thresholds" => THRESHOLD_KEYS,
        "bids" => &[
            "root",
            "task",
            "sessions",
            "runs",
            "type_column",
            "derivatives",
            "join_column",
        ],
        _ => &[],
    }
}

/// The valid key most like `key`, if any is close enough to be a plausible typo.
pub fn closest<'a>(key: &str, valid: &[&'a str]) -> Option<&'a str> {
    valid
        .iter()
        .map(|candidate| (strsim::jaro_winkler(key, candidate), *candidate))
        // Short names score low on Jaro–Winkler; one edit away is close enough for them.
        .filter(|(score, candidate)| {
            *score >= 0.75 || strsim::damerau_levenshtein(key, candidate) <= 1
        })
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, candidate)| candidate)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn typos_find_their_key() {
        assert_eq!(closest("hig_pass", keys_of("filter")), Some("high_pass"));
        assert_eq!(closest("scan", keys_of("acquisition")), Some("scans"));
        assert_eq!(closest("modulator", keys_of("model")), Some("modulators"));
        assert_eq!(closest("zzzz", keys_of("model")), None);
        assert_eq!(closest("p_e", &["pe", "value"]), Some("pe"));
    }
}
