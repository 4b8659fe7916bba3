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
    "glm",
    "noise",
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
        "event" => &[
            "name",
            "onset",
            "duration",
            "type_column",
            "type",
            "modulators",
        ],
        "glm" => &["name", "models"],
        "noise" => &["model", "ar1"],
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::error::closest_name;

    #[test]
    fn typos_find_their_key() {
        assert_eq!(
            closest_name("hig_pass", keys_of("filter")),
            Some("high_pass")
        );
        assert_eq!(closest_name("scan", keys_of("acquisition")), Some("scans"));
        assert_eq!(
            closest_name("modulator", keys_of("model")),
            Some("modulators")
        );
        assert_eq!(closest_name("zzzz", keys_of("model")), None);
    }
}
