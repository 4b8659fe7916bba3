//! Tests of sidecar inheritance on in-memory datasets; each cites the section of the
//! BIDS specification it checks.

use super::*;
use crate::files::MemoryFiles;

const RUN1: &str = "ds/sub-01/func/sub-01_task-x_run-1_bold.nii.gz";

fn resolve(files: &MemoryFiles, data_file: &str) -> Result<Sidecar> {
    resolve_sidecar(files, Path::new("ds"), Path::new(data_file))
}

fn tr(sidecar: &Sidecar) -> (f64, PathBuf) {
    sidecar.positive_number("RepetitionTime").unwrap().unwrap()
}

fn message(result: Result<Sidecar>) -> String {
    result.expect_err("an error").to_string()
}

// Specification, "The Inheritance Principle": values from the top level are
// inherited below unless a file nearer the data file overrides them.
#[test]
fn subject_level_overrides_the_dataset_root() {
    let files = MemoryFiles::default()
        .with(
            "ds/task-x_bold.json",
            r#"{"RepetitionTime": 2.0, "TaskName": "x"}"#,
        )
        .with(
            "ds/sub-01/sub-01_task-x_bold.json",
            r#"{"RepetitionTime": 1.5}"#,
        )
        .with(RUN1, "")
        .with("ds/sub-02/func/sub-02_task-x_run-1_bold.nii.gz", "");
    let one = resolve(&files, RUN1).unwrap();
    assert_eq!(tr(&one), (1.5, "ds/sub-01/sub-01_task-x_bold.json".into()));
    assert_eq!(one.values["TaskName"], "x");
    assert_eq!(one.sources["TaskName"], Path::new("ds/task-x_bold.json"));
    let two = resolve(&files, "ds/sub-02/func/sub-02_task-x_run-1_bold.nii.gz").unwrap();
    assert_eq!(tr(&two), (2.0, "ds/task-x_bold.json".into()));
}

// Same principle, with a session folder between subject and data type.
#[test]
fn session_level_applies_only_to_its_session() {
    let files = MemoryFiles::default()
        .with("ds/task-x_bold.json", r#"{"RepetitionTime": 2.0}"#)
        .with(
            "ds/sub-01/ses-pre/sub-01_ses-pre_task-x_bold.json",
            r#"{"RepetitionTime": 0.8}"#,
        );
    let pre = resolve(
        &files,
        "ds/sub-01/ses-pre/func/sub-01_ses-pre_task-x_bold.nii",
    )
    .unwrap();
    assert_eq!(tr(&pre).0, 0.8);
    let post = resolve(
        &files,
        "ds/sub-01/ses-post/func/sub-01_ses-post_task-x_bold.nii",
    );
    assert_eq!(tr(&post.unwrap()).0, 2.0);
}

// Within one folder, the file with more entities comes later and overrides;
// sidecars for another task, run or suffix do not apply (their entities or
// suffix do not match the data file's).
#[test]
fn more_entities_override_and_other_tasks_runs_and_suffixes_do_not_apply() {
    let func = "ds/sub-01/func";
    let files = MemoryFiles::default()
        .with(
            format!("{func}/sub-01_task-x_bold.json"),
            r#"{"RepetitionTime": 2.0}"#,
        )
        .with(
            format!("{func}/sub-01_task-x_run-1_bold.json"),
            r#"{"RepetitionTime": 1.0}"#,
        )
        .with(
            format!("{func}/sub-01_task-y_run-2_bold.json"),
            r#"{"RepetitionTime": 9.0}"#,
        )
        .with("ds/task-y_bold.json", r#"{"RepetitionTime": 7.0}"#)
        .with("ds/task-x_events.json", r#"{"onset": {}}"#)
        .with("ds/task-x_bold.tsv", "x");
    assert_eq!(tr(&resolve(&files, RUN1).unwrap()).0, 1.0);
    let run2 = resolve(&files, &format!("{func}/sub-01_task-x_run-2_bold.nii.gz")).unwrap();
    assert_eq!(tr(&run2).0, 2.0);
    assert!(!run2.values.contains_key("onset"));
    // A sidecar without entities at the root applies to every file with its suffix.
    let bare = MemoryFiles::default().with("ds/bold.json", r#"{"RepetitionTime": 3.0}"#);
    assert_eq!(tr(&resolve(&bare, RUN1).unwrap()).0, 3.0);
}

// "No more than one applicable file" per level with the same number of entities:
// neither could override the other, so the error names both.
#[test]
fn two_equally_specific_files_in_one_folder_are_an_error() {
    let files = MemoryFiles::default()
        .with("ds/task-x_run-1_bold.json", r#"{"RepetitionTime": 2.0}"#)
        .with("ds/sub-01_task-x_bold.json", r#"{"RepetitionTime": 1.0}"#);
    let text = message(resolve(&files, RUN1));
    assert!(text.contains("ds/sub-01_task-x_bold.json"), "{text}");
    assert!(text.contains("ds/task-x_run-1_bold.json"), "{text}");
    assert!(text.contains("same number of entities"), "{text}");
}

// Sidecars are JSON objects ("Key-value files (dictionaries)").
#[test]
fn bad_json_is_an_error_with_its_line() {
    let broken = "{\n  \"RepetitionTime\": 2.0,\n  \"TaskName\" \"x\"\n}\n";
    let files = MemoryFiles::default().with("ds/task-x_bold.json", broken);
    let text = message(resolve(&files, RUN1));
    assert!(
        text.starts_with("ds/task-x_bold.json, line 3, column"),
        "{text}"
    );
    assert!(!text.contains(" at line "), "{text}");
    let list = MemoryFiles::default().with("ds/task-x_bold.json", "[2.0]");
    assert!(message(resolve(&list, RUN1)).contains("not an object"));
    let binary = MemoryFiles::default().with("ds/task-x_bold.json", b"{\n\xff}".to_vec());
    assert!(message(resolve(&binary, RUN1)).starts_with("ds/task-x_bold.json, line 2"));
}

#[test]
fn repetition_time_must_be_a_positive_number() {
    for bad in [r#""2.0""#, "0", "-1.5", "null", "[2]"] {
        let json = format!(r#"{{"RepetitionTime": {bad}}}"#);
        let files = MemoryFiles::default().with("ds/sub-01/sub-01_bold.json", json);
        let sidecar = resolve(&files, RUN1).unwrap();
        let err = sidecar
            .positive_number("RepetitionTime")
            .unwrap_err()
            .to_string();
        assert!(
            err.starts_with("ds/sub-01/sub-01_bold.json: \"RepetitionTime\""),
            "{err}"
        );
    }
    let empty = MemoryFiles::default().with("ds/task-x_bold.json", "{}");
    let sidecar = resolve(&empty, RUN1).unwrap();
    assert_eq!(sidecar.positive_number("RepetitionTime").unwrap(), None);
}

// SliceTiming: "the time at which each slice was acquired", seconds from the
// start of each volume (specification, "Magnetic Resonance Imaging: Timing").
#[test]
fn slice_timing_is_a_list_of_non_negative_numbers() {
    let json = r#"{"SliceTiming": [0, 0.5, 1.0, 1.5], "Bad": [0, -0.5], "Word": "0"}"#;
    let files = MemoryFiles::default().with("ds/task-x_bold.json", json);
    let sidecar = resolve(&files, RUN1).unwrap();
    let (times, source) = sidecar.numbers("SliceTiming").unwrap().unwrap();
    assert_eq!(
        (times, source),
        (vec![0.0, 0.5, 1.0, 1.5], "ds/task-x_bold.json".into())
    );
    let err = sidecar.numbers("Bad").unwrap_err().to_string();
    assert!(err.contains("entry 2 of \"Bad\""), "{err}");
    assert!(sidecar.numbers("Word").is_err());
    assert_eq!(sidecar.numbers("Missing").unwrap(), None);
}

#[test]
fn no_sidecar_gives_empty_metadata_and_bad_data_paths_are_errors() {
    let files = MemoryFiles::default().with(RUN1, "");
    let sidecar = resolve(&files, RUN1).unwrap();
    assert!(sidecar.values.is_empty() && sidecar.sources.is_empty());
    assert!(
        resolve(&MemoryFiles::default(), RUN1)
            .unwrap()
            .values
            .is_empty()
    );
    let outside = message(resolve(&files, "other/sub-01_task-x_bold.nii"));
    assert!(
        outside.starts_with("other/sub-01_task-x_bold.nii: "),
        "{outside}"
    );
    assert!(message(resolve(&files, "ds/../sub-01_task-x_bold.nii")).contains("not inside"));
    assert!(message(resolve(&files, "ds/sub-01/func/scan_1.nii")).contains("not a BIDS name"));
}
