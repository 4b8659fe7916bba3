use super::*;
use crate::error::Error;

const MINIMAL: &str = r#"
[acquisition]
tr = 2
scans = 100

[trials]
file = "trials.csv"

[[event]]
name = "outcome"
onset = "outcome_onset"

[[model]]
name = "delta"
modulators = [ { event = "outcome", column = "pe" } ]
"#;

fn parse(text: &str) -> Result<Study> {
    parse_study(Path::new("lab/study.toml"), text)
}

fn messages(text: &str) -> Vec<String> {
    match parse(text) {
        Err(Error::Input(problems)) => problems.iter().map(|p| p.to_string()).collect(),
        other => panic!("expected input problems, got {other:?}"),
    }
}

#[test]
fn minimal_study_gets_the_documented_defaults() {
    let study = parse(MINIMAL).unwrap();
    assert_eq!(study.name, "study");
    assert_eq!(study.acquisition.tr, Some(2.0));
    assert_eq!(study.acquisition.scans, Some(ScanCounts::Fixed(100)));
    assert_eq!(study.acquisition.microtime, 16);
    assert_eq!(study.acquisition.reference, 0.5);
    assert_eq!(study.high_pass, 128.0);
    assert!(!study.hrf.derivative);
    let TrialSource::Table(table) = &study.source else {
        panic!("a trial table study");
    };
    assert_eq!(table.file, Path::new("lab/trials.csv"));
    assert_eq!(table.labels.subject, "subject");
    assert_eq!(study.events[0].duration, Duration::Seconds(0.0));
    assert_eq!(study.models[0].modulators[0].column, "pe");
    assert_eq!(study.thresholds, Thresholds::default());
}

#[test]
fn misspelt_key_names_line_and_suggests_the_right_one() {
    let text = MINIMAL.replace("[trials]", "[filter]\nhig_pass = 100\n\n[trials]");
    let found = messages(&text);
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(found[0].contains("line 7, column 1"), "{}", found[0]);
    assert!(found[0].contains("unknown key `hig_pass` in [filter]"));
    assert!(found[0].contains("did you mean `high_pass`?"));
}

#[test]
fn all_problems_are_reported_together() {
    let text = MINIMAL
        .replace("tr = 2", "tr = -2")
        .replace("scans = 100", "scans = 0")
        .replace("event = \"outcome\"", "event = \"outcom\"");
    let found = messages(&text);
    assert_eq!(found.len(), 3, "{found:?}");
    assert!(found[0].contains("tr must be a positive number"));
    assert!(found[1].contains("`scans` must be a positive whole number"));
    assert!(found[2].contains("unknown event \"outcom\""));
    assert!(found[2].contains("did you mean \"outcome\"?"));
}

#[test]
fn wrong_types_and_duplicates_are_named() {
    let text = MINIMAL.replace("tr = 2", "tr = \"2\"")
        + "\n[[model]]\nname = \"delta\"\nmodulators = [ { event = \"outcome\", column = \"x\" } ]\n";
    let found = messages(&text);
    assert!(
        found
            .iter()
            .any(|m| m.contains("`tr` must be a number, not a string")),
        "{found:?}"
    );
    assert!(
        found
            .iter()
            .any(|m| m.contains("two [[model]] entries are named \"delta\"")),
        "{found:?}"
    );
}

#[test]
fn long_form_events_default_their_onset_column() {
    let text = MINIMAL.replace(
        "onset = \"outcome_onset\"",
        "type_column = \"trial_type\"\ntype = \"feedback\"\nduration = \"dur\"",
    );
    let study = parse(&text).unwrap();
    let event = &study.events[0];
    assert_eq!(event.onset_column, "onset");
    assert_eq!(event.duration, Duration::Column("dur".into()));
    assert_eq!(
        event.selector,
        Some(RowSelector {
            column: "trial_type".into(),
            value: "feedback".into()
        })
    );
}

#[test]
fn broken_toml_points_at_the_spot() {
    let found = messages("[acquisition]\ntr = = 2\n");
    assert!(
        found[0].starts_with("lab/study.toml, line 2"),
        "{}",
        found[0]
    );
    assert!(found[0].contains("not valid TOML"));
}

#[test]
fn negative_duration_and_both_scan_keys_are_errors() {
    let text = MINIMAL
        .replace(
            "onset = \"outcome_onset\"",
            "onset = \"outcome_onset\"\nduration = -1",
        )
        .replace("scans = 100", "scans = 100\nscans_file = \"scans.csv\"");
    let found = messages(&text);
    assert!(
        found
            .iter()
            .any(|m| m.contains("either scans or scans_file")),
        "{found:?}"
    );
    assert!(
        found
            .iter()
            .any(|m| m.contains("duration cannot be negative")),
        "{found:?}"
    );
}

#[test]
fn too_many_models_and_reserved_names_are_rejected() {
    let mut text = MINIMAL.replace("name = \"delta\"", "name = \"m0\"");
    for i in 1..15 {
        text.push_str(&format!("[[model]]\nname = \"m{i}\"\nmodulators = [ {{ event = \"outcome\", column = \"pe\" }} ]\n"));
    }
    let found = messages(&text);
    assert!(
        found
            .iter()
            .any(|m| m.contains("declares 15 models; at most 14")),
        "{found:?}"
    );
    let found = messages(&MINIMAL.replace("name = \"delta\"", "name = \"task\""));
    assert!(
        found[0].contains("\"task\" cannot name a model"),
        "{found:?}"
    );
}

#[test]
fn every_threshold_can_be_set() {
    let text = format!(
        "{MINIMAL}\n[thresholds]\nvif_caution = 4\nvif_severe = 8\ncondition_index = 20\n\
         condition_index_severe = 50\nshared_over_unique = 2\n"
    );
    let study = parse(&text).expect("valid");
    assert_eq!(
        study.thresholds,
        Thresholds {
            vif_caution: 4.0,
            vif_severe: 8.0,
            condition_index: 20.0,
            condition_index_severe: 50.0,
            shared_over_unique: 2.0,
        }
    );
}
