//! Bad input: every case exits with 1, names the file and the line/column or key, and
//! never shows a panic.

use crate::common::{StudyDir, regressor_names, study_toml};

const TRIALS: &str = "subject,run,cue_onset,outcome_onset,pe\n01,1,2.0,5.5,0.3\n01,1,12.0,16.0,-0.2\n01,1,22.0,24.5,0.5\n01,1,31.0,36.0,0.1\n";
const MODEL: &str =
    "[[model]]\nname = \"m\"\nmodulators = [ { event = \"outcome\", column = \"pe\" } ]\n";

/// Runs `check` and returns standard error, asserting exit code 1 and no panic.
fn fails(study: &str, trials: &str) -> String {
    let dir = StudyDir::new();
    dir.file("study.toml", study).file("trials.csv", trials);
    fails_in(&dir)
}

fn fails_in(dir: &StudyDir) -> String {
    let output = dir.check(&[]).code(1).get_output().stderr.clone();
    let text = String::from_utf8(output).unwrap();
    assert!(!text.contains("panicked"), "{text}");
    text
}

fn good_study() -> String {
    study_toml(2.0, 40, MODEL)
}

#[test]
fn misspelt_key_is_named_with_a_suggestion() {
    let err = fails(&good_study().replace("scans = 40", "scan = 40"), TRIALS);
    assert!(
        err.contains("study.toml, line 5, column 1: unknown key `scan` in [acquisition]"),
        "{err}"
    );
    assert!(err.contains("did you mean `scans`?"), "{err}");
}

#[test]
fn wrong_type_names_the_key() {
    let err = fails(&good_study().replace("tr = 2", "tr = \"fast\""), TRIALS);
    assert!(
        err.contains("line 4") && err.contains("`tr` must be a number, not a string"),
        "{err}"
    );
}

#[test]
fn non_positive_acquisition_values_are_rejected() {
    let err = fails(
        &good_study()
            .replace("tr = 2", "tr = 0")
            .replace("scans = 40", "scans = -3"),
        TRIALS,
    );
    assert!(err.contains("tr must be a positive number"), "{err}");
    assert!(
        err.contains("`scans` must be a positive whole number"),
        "{err}"
    );
    let err = fails(
        &good_study().replace("[trials]", "[acquisition.x]\n[trials]"),
        TRIALS,
    );
    assert!(err.contains("unknown key `x` in [acquisition]"), "{err}");
    let err = fails(
        &good_study().replace("scans = 40", "scans = 40\nmicrotime = 0"),
        TRIALS,
    );
    assert!(
        err.contains("`microtime` must be a positive whole number"),
        "{err}"
    );
}

#[test]
fn missing_trial_file_is_named() {
    let dir = StudyDir::new();
    dir.file("study.toml", &good_study());
    let err = fails_in(&dir);
    assert!(err.contains("trials.csv: cannot read the file"), "{err}");
}

#[test]
fn missing_study_file_is_named() {
    let dir = StudyDir::new();
    let err = fails_in(&dir);
    assert!(err.contains("study.toml: cannot read the file"), "{err}");
}

#[test]
fn unknown_columns_and_events_are_named() {
    let err = fails(
        &good_study().replace("column = \"pe\"", "column = \"p_e\""),
        TRIALS,
    );
    assert!(
        err.contains("no column \"p_e\" (needed by model \"m\")")
            && err.contains("did you mean \"pe\"?"),
        "{err}"
    );
    let err = fails(
        &good_study().replace("event = \"outcome\"", "event = \"feedback\""),
        TRIALS,
    );
    assert!(err.contains("unknown event \"feedback\""), "{err}");
}

#[test]
fn duplicate_model_names_are_rejected() {
    let err = fails(&(good_study() + MODEL), TRIALS);
    assert!(
        err.contains("two [[model]] entries are named \"m\""),
        "{err}"
    );
}

#[test]
fn non_numeric_cells_name_line_and_column() {
    let err = fails(&good_study(), &TRIALS.replace("0.5\n", "half\n"));
    assert!(
        err.contains("trials.csv, line 4, column 5 (\"pe\"): \"half\" is not a number"),
        "{err}"
    );
    let err = fails(&good_study(), &TRIALS.replace("12.0", "12,5"));
    assert!(err.contains("line 3"), "{err}");
}

#[test]
fn ragged_rows_are_reported_all_together() {
    let trials = TRIALS
        .replace("01,1,12.0,16.0,-0.2", "01,1,12.0,16.0")
        .replace("01,1,31.0,36.0,0.1", "01,1,31.0");
    let err = fails(&good_study(), &trials);
    assert!(err.contains("2 problems"), "{err}");
    assert!(
        err.contains("line 3: this row has 4 cells but the header has 5"),
        "{err}"
    );
    assert!(err.contains("line 5: this row has 3 cells"), "{err}");
}

#[test]
fn empty_and_header_only_tables_are_rejected() {
    assert!(fails(&good_study(), "").contains("the table is empty"));
    assert!(
        fails(&good_study(), "subject,run,cue_onset,outcome_onset,pe\n")
            .contains("header but no rows")
    );
}

#[test]
fn negative_durations_are_errors() {
    let study = good_study().replace(
        "onset = \"outcome_onset\"",
        "onset = \"outcome_onset\"\nduration = \"d\"",
    );
    let trials = "subject,run,cue_onset,outcome_onset,pe,d\n01,1,2,5,0.1,1\n01,1,12,15,0.2,-1\n";
    let err = fails(&study, trials);
    assert!(
        err.contains("line 3, column 6 (\"d\"): negative duration -1"),
        "{err}"
    );
}

#[test]
fn path_like_labels_are_rejected() {
    let err = fails(&good_study(), &TRIALS.replace("01,1,22.0", "../x,1,22.0"));
    assert!(
        err.contains("line 4") && err.contains("the subject label \"../x\" is not a plain name"),
        "{err}"
    );
}

#[test]
fn more_regressors_than_scans_is_an_error_naming_the_run() {
    // 8 s of scanning keeps one cue and one outcome; with derivatives that is 4 regressors
    // plus the constant for 4 scans.
    let study = study_toml(2.0, 4, "").replace("[trials]", "[hrf]\nderivative = true\n[trials]");
    let err = fails(&study, TRIALS);
    assert!(err.contains("subject 01 run 1: the design has 5 columns (4 regressors + 1 drift and constant) but only 4 scans"), "{err}");
}

#[test]
fn scans_file_must_list_every_run() {
    let study = good_study().replace("scans = 40", "scans_file = \"scans.tsv\"");
    let dir = StudyDir::new();
    dir.file("study.toml", &study)
        .file("trials.csv", TRIALS)
        .file("scans.tsv", "subject\trun\tscans\n02\t1\t40\n");
    let err = fails_in(&dir);
    assert!(
        err.contains("scans.tsv: no scan count for subject 01 run 1"),
        "{err}"
    );
}

#[test]
fn binary_garbage_is_rejected_cleanly() {
    let dir = StudyDir::new();
    dir.file("study.toml", &good_study());
    std::fs::write(dir.path("trials.csv"), [0x80, 0xfe, 0x00, 0x41, 0x0a, 0x80]).unwrap();
    let err = fails_in(&dir);
    assert!(
        err.contains("trials.csv, line 1: the file is not UTF-8 text"),
        "{err}"
    );
}

#[test]
fn utf16_and_latin1_tables_are_named_as_such() {
    let dir = StudyDir::new();
    dir.file("study.toml", &good_study());
    let utf16: Vec<u8> = [0xff, 0xfe]
        .into_iter()
        .chain(TRIALS.encode_utf16().flat_map(u16::to_le_bytes))
        .collect();
    std::fs::write(dir.path("trials.csv"), utf16).unwrap();
    let err = fails_in(&dir);
    assert!(
        err.contains("trials.csv, line 1: the file is UTF-16 text (little-endian), not UTF-8"),
        "{err}"
    );
    // "é" in Latin-1 is the single byte 0xE9, which is not UTF-8, on the third line.
    let mut latin1 = TRIALS.as_bytes().to_vec();
    let third_line = latin1
        .iter()
        .enumerate()
        .filter(|(_, b)| **b == b'\n')
        .nth(1)
        .map(|(i, _)| i + 1)
        .unwrap();
    latin1.splice(third_line..third_line, *b"caf\xE9,");
    std::fs::write(dir.path("trials.csv"), latin1).unwrap();
    let err = fails_in(&dir);
    assert!(
        err.contains("trials.csv, line 3: the file is not UTF-8 text") && err.contains("Latin-1"),
        "{err}"
    );
}

#[test]
fn two_trials_at_one_onset_with_different_values_get_a_caution_naming_both_lines() {
    // Line 3 and a copy of it with another prediction error, appended as line 6.
    let trials = format!("{TRIALS}01,1,12.0,16.0,0.9\n");
    let dir = StudyDir::new();
    dir.file("study.toml", &good_study())
        .file("trials.csv", &trials);
    let report = dir.json(&[]);
    let flags = report["runs"][0]["flags"].as_array().expect("flags");
    let same: Vec<&serde_json::Value> =
        flags.iter().filter(|f| f["code"] == "same_onset").collect();
    assert_eq!(same.len(), 2, "one per event (cue and outcome): {flags:?}");
    let message = same[0]["message"].as_str().expect("message");
    assert!(
        message.contains("start at 12 s (trial table lines 3 and 6)"),
        "{message}"
    );
    assert_eq!(same[0]["severity"], "caution");
}

#[test]
fn a_run_with_a_single_trial_gives_nulls_with_flags_never_nan() {
    let dir = StudyDir::new();
    dir.file("study.toml", &good_study()).file(
        "trials.csv",
        "subject,run,cue_onset,outcome_onset,pe\n01,1,2.0,5.5,0.3\n",
    );
    let output = dir.check(&["--format", "json"]).get_output().clone();
    let text = String::from_utf8(output.stdout).unwrap();
    assert!(
        !text.contains("NaN") && !text.contains("Infinity"),
        "{text}"
    );
    let report: serde_json::Value = serde_json::from_str(&text).expect("JSON");
    let run = &report["runs"][0];
    let pe = regressor_names(run)
        .iter()
        .position(|n| n.ends_with("pe"))
        .expect("the modulator");
    // One trial: the centred modulator is all zero, so it has no VIF, and a flag says why.
    assert!(run["vif"][pe].is_null(), "{}", run["vif"]);
    let codes: Vec<&str> = run["flags"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["code"].as_str().unwrap())
        .collect();
    assert!(!codes.is_empty(), "the null VIF needs a flag saying why");
    // The two onsets are defined: two impulses 3.5 s apart, correlated but not collinear.
    for event in 0..2 {
        let vif = run["vif"][event].as_f64().expect("an onset VIF");
        assert!(vif >= 1.0 && vif.is_finite(), "{vif}");
    }
}
