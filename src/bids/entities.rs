//! BIDS file names split into entities, suffix and extension.
//!
//! BIDS specification, "Common principles: Entities" and "Filenames": a file name is a
//! chain of `key-value` entities joined by `_`, then a `_suffix`, then an extension that
//! starts at the first `.` (so `.nii.gz` is one extension). Keys and values are
//! alphanumeric; a key appears at most once.

/// A BIDS file name split into its entities, suffix and extension:
/// "sub-01_ses-pre_task-harbour_run-2_bold.nii.gz" → entities
/// [("sub","01"),("ses","pre"),("task","harbour"),("run","2")], suffix "bold",
/// extension ".nii.gz".
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BidsName {
    pub entities: Vec<(String, String)>,
    pub suffix: String,
    pub extension: String,
}

impl BidsName {
    /// None when the name is not of the form key-value_..._suffix.ext (each key and
    /// value alphanumeric; suffix alphanumeric).
    ///
    /// A name with no entities at all (`bold.json`) is accepted: the inheritance
    /// principle allows such a sidecar at the top of a dataset to apply to every file
    /// with that suffix.
    pub fn parse(file_name: &str) -> Option<BidsName> {
        // The extension begins at the first dot (specification, "Filenames"), so
        // compound extensions such as `.nii.gz` stay whole.
        let dot = file_name.find('.')?;
        let (stem, extension) = file_name.split_at(dot);
        if !extension[1..].split('.').all(is_alphanumeric) {
            return None;
        }
        let mut parts: Vec<&str> = stem.split('_').collect();
        let suffix = parts.pop()?;
        if !is_alphanumeric(suffix) {
            return None;
        }
        let mut entities: Vec<(String, String)> = Vec::with_capacity(parts.len());
        for part in parts {
            let (key, value) = part.split_once('-')?;
            if !is_alphanumeric(key) || !is_alphanumeric(value) {
                return None;
            }
            // Each entity may appear only once in a name; a repeated key would make
            // `get` and inheritance matching ambiguous.
            if entities.iter().any(|(k, _)| k == key) {
                return None;
            }
            entities.push((key.to_string(), value.to_string()));
        }
        Some(BidsName {
            entities,
            suffix: suffix.to_string(),
            extension: extension.to_string(),
        })
    }

    /// The value of entity `key` (e.g. "sub" → "01"), if the name has it.
    pub fn get(&self, key: &str) -> Option<&str> {
        self.entities
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, v)| v.as_str())
    }

    /// True when every entity of `self` appears in `other` with the same value (used
    /// for inheritance: specification, "The Inheritance Principle", a metadata file
    /// applies only if all its entities are present in the data file's name with the
    /// same values).
    pub fn entities_within(&self, other: &BidsName) -> bool {
        self.entities
            .iter()
            .all(|(key, value)| other.get(key) == Some(value.as_str()))
    }
}

/// Non-empty and only ASCII letters and digits, as the specification's labels and
/// indices are.
fn is_alphanumeric(text: &str) -> bool {
    !text.is_empty() && text.bytes().all(|b| b.is_ascii_alphanumeric())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn pairs(name: &BidsName) -> Vec<(&str, &str)> {
        name.entities
            .iter()
            .map(|(k, v)| (k.as_str(), v.as_str()))
            .collect()
    }

    // Specification, "Common principles: Entities": key-value pairs, suffix, extension.
    #[test]
    fn full_names_split_into_entities_suffix_and_compound_extension() {
        let name = BidsName::parse("sub-01_ses-pre_task-harbour_run-2_bold.nii.gz").unwrap();
        assert_eq!(
            pairs(&name),
            [
                ("sub", "01"),
                ("ses", "pre"),
                ("task", "harbour"),
                ("run", "2")
            ]
        );
        assert_eq!(name.suffix, "bold");
        assert_eq!(name.extension, ".nii.gz");
        assert_eq!(name.get("run"), Some("2"));
        assert_eq!(name.get("acq"), None);
    }

    #[test]
    fn names_without_session_or_run_and_other_extensions() {
        let nii = BidsName::parse("sub-01_task-x_bold.nii").unwrap();
        assert_eq!(pairs(&nii), [("sub", "01"), ("task", "x")]);
        assert_eq!(nii.extension, ".nii");

        let events = BidsName::parse("sub-01_task-x_run-1_events.tsv").unwrap();
        assert_eq!(events.suffix, "events");
        assert_eq!(events.extension, ".tsv");

        // A top-level sidecar (specification, "The Inheritance Principle").
        let top = BidsName::parse("task-x_bold.json").unwrap();
        assert_eq!(pairs(&top), [("task", "x")]);
        assert_eq!(
            (top.suffix.as_str(), top.extension.as_str()),
            ("bold", ".json")
        );

        let bare = BidsName::parse("bold.json").unwrap();
        assert!(bare.entities.is_empty());
        assert_eq!(bare.suffix, "bold");
    }

    #[test]
    fn malformed_names_are_rejected() {
        for bad in [
            "sub-01_task-x.nii.gz",       // missing suffix: last part is an entity
            "sub-01_task-x_.nii.gz",      // empty suffix
            "sub01_task-x_bold.nii",      // entity without a hyphen
            "sub-0-1_task-x_bold.nii",    // value with a hyphen
            "sub-_task-x_bold.nii",       // empty value
            "-01_task-x_bold.nii",        // empty key
            "sub-01__bold.nii",           // empty entity
            "sub-01_task-x y_bold.nii",   // space in a value
            "sub-01_sub-02_bold.nii",     // repeated key
            "sub-01_task-x_bold",         // no extension
            "sub-01_task-x_bold.",        // empty extension
            "sub-01_task-x_bold.nii..gz", // empty extension part
            "dataset_description.json",   // not key-value
            "sub-01/func/sub-01_bold.nii",
            "",
        ] {
            assert_eq!(BidsName::parse(bad), None, "{bad:?} should not parse");
        }
    }

    // Specification, "The Inheritance Principle": every entity of the metadata file
    // must be in the data file with the same value.
    #[test]
    fn entity_subsets_decide_applicability() {
        let data = BidsName::parse("sub-01_ses-pre_task-x_run-1_bold.nii.gz").unwrap();
        let applies = |name: &str| BidsName::parse(name).unwrap().entities_within(&data);
        assert!(applies("task-x_bold.json"));
        assert!(applies("bold.json"));
        assert!(applies("run-1_task-x_sub-01_bold.json"));
        assert!(!applies("task-y_bold.json"));
        assert!(!applies("sub-01_task-x_run-2_bold.json"));
        assert!(!applies("sub-01_task-x_acq-fast_bold.json"));
    }

    proptest! {
        #[test]
        fn parsing_never_panics_and_round_trips(text in "[a-z0-9_.\\-é ]{0,40}") {
            if let Some(name) = BidsName::parse(&text) {
                let mut rebuilt: Vec<String> =
                    name.entities.iter().map(|(k, v)| format!("{k}-{v}")).collect();
                rebuilt.push(name.suffix.clone());
                prop_assert_eq!(rebuilt.join("_") + &name.extension, text);
            }
        }
    }
}
