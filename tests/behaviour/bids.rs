//! Studies in the BIDS layout: a tiny invented dataset written by the tests (image
//! headers laid out per the NIfTI-1 standard by `tangle::bids::nifti::header_bytes`)
//! must give the same numbers as the same study as one flat trial table, and bad
//! layouts must be clear errors naming the file.

use std::io::Write;
use std::path::Path;

use tangle::check::{CheckOptions, check_file};
use tangle::files::DiskFiles;

const TR: f64 = 2.0;
const SCANS: u64 = 120;

/// Onsets and model values of one run, from a fixed rule (so the flat and BIDS copies
/// hold the same numbers).
fn trials(subject: usize, run: usize) -> Vec<(f64, f64, f64, f64)> {
    (0..20)
        .map(|t| {
            let cue = 4.0 + 11.0 * t as f64 + ((t * 7 + subject * 3 + run) % 5) as f64 * 0.4;
            let outcome = cue + 2.0 + ((t * 3 + subject + run * 2) % 4) as f64;
            let value = ((t * 13 + subject * 5 + run * 7) % 17) as f64 / 17.0;
            let pe = ((t * 11 + subject * 7 + run * 3) % 19) as f64 / 19.0 - 0.5;
            (cue, outcome, value, pe)
        })
        .collect()
}

const MODELS: &str = r#"
[[model]]
name = "learner"
modulators = [ { event = "cue", column = "value" }, { event = "outcome", column = "pe" } ]
"#;

fn write(path: &Path, bytes: &[u8]) {
    std::fs::create_dir_all(path.parent().unwrap()).unwrap();
    std::fs::write(path, bytes).unwrap();
}

fn gzip(bytes: &[u8]) -> Vec<u8> {
    let mut encoder = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::default());
    encoder.write_all(bytes).unwrap();
    encoder.finish().unwrap()
}

/// A two-subject, two-run dataset; model outputs as extra events columns (`inline`) or
/// in a derivatives folder. Returns the BIDS study file's path.
fn dataset(dir: &Path, inline: bool) -> std::path::PathBuf {
    let root = dir.join("ds");
    write(
        &root.join("dataset_description.json"),
        br#"{"Name": "invented", "BIDSVersion": "1.9.0"}"#,
    );
    write(
        &root.join("task-lights_bold.json"),
        format!(r#"{{"RepetitionTime": {TR}}}"#).as_bytes(),
    );
    for subject in 1..=2 {
        for run in 1..=2 {
            let func = root.join(format!("sub-0{subject}/func"));
            let stem = format!("sub-0{subject}_task-lights_run-{run}");
            let header = tangle::bids::nifti::header_bytes(1, &[8, 8, 4, SCANS], TR);
            write(&func.join(format!("{stem}_bold.nii.gz")), &gzip(&header));
            let mut events = String::from("onset\tduration\ttrial_type");
            let mut outputs = String::from("value\tpe\n");
            if inline {
                events.push_str("\tvalue\tpe");
            }
            events.push('\n');
            for (cue, outcome, value, pe) in trials(subject, run) {
                let (cue_extra, outcome_extra) =
                    (format!("\t{value}\tn/a"), format!("\tn/a\t{pe}"));
                events.push_str(&format!(
                    "{cue}\t0\tcue{}\n",
                    if inline { &cue_extra } else { "" }
                ));
                events.push_str(&format!(
                    "{outcome}\t0\toutcome{}\n",
                    if inline { &outcome_extra } else { "" }
                ));
                outputs.push_str(&format!("{value}\tn/a\nn/a\t{pe}\n"));
            }
            write(&func.join(format!("{stem}_events.tsv")), events.as_bytes());
            if !inline {
                let derivatives = dir.join(format!("ds/derivatives/fits/sub-0{subject}/func"));
                write(
                    &derivatives.join(format!("{stem}_desc-fits_events.tsv")),
                    outputs.as_bytes(),
                );
            }
        }
    }
    let derivatives = if inline {
        ""
    } else {
        "derivatives = \"ds/derivatives/fits\"\n"
    };
    let study = format!(
        "[bids]\nroot = \"ds\"\ntask = \"lights\"\n{derivatives}\n\
         [[event]]\nname = \"cue\"\ntype = \"cue\"\n\n[[event]]\nname = \"outcome\"\ntype = \"outcome\"\n{MODELS}"
    );
    let path = dir.join("bids-study.toml");
    write(&path, study.as_bytes());
    path
}

/// The same study as one flat trial table.
fn flat(dir: &Path) -> std::path::PathBuf {
    let mut table = String::from("subject,run,cue_onset,outcome_onset,value,pe\n");
    for subject in 1..=2 {
        for run in 1..=2 {
            for (cue, outcome, value, pe) in trials(subject, run) {
                table.push_str(&format!("0{subject},{run},{cue},{outcome},{value},{pe}\n"));
            }
        }
    }
    write(&dir.join("trials.csv"), table.as_bytes());
    let study = format!(
        "[acquisition]\ntr = {TR}\nscans = {SCANS}\n[trials]\nfile = \"trials.csv\"\n\
         [[event]]\nname = \"cue\"\nonset = \"cue_onset\"\n[[event]]\nname = \"outcome\"\nonset = \"outcome_onset\"\n{MODELS}"
    );
    let path = dir.join("flat-study.toml");
    write(&path, study.as_bytes());
    path
}

fn vifs(report: &tangle::report::Report) -> Vec<(String, String, Vec<Option<f64>>)> {
    report
        .runs
        .iter()
        .map(|r| (r.subject.clone(), r.run.clone(), r.vif.clone()))
        .collect()
}

#[test]
fn a_bids_dataset_gives_the_numbers_of_the_flat_table() {
    let dir = tempfile::tempdir().unwrap();
    let flat =
        check_file(&DiskFiles, &flat(dir.path()), CheckOptions::default()).expect("flat study");
    for inline in [true, false] {
        let bids = check_file(
            &DiskFiles,
            &dataset(dir.path(), inline),
            CheckOptions::default(),
        )
        .unwrap_or_else(|e| panic!("BIDS study (inline = {inline}): {e}"));
        assert_eq!(bids.settings.tr, TR);
        assert_eq!(bids.runs.len(), 4);
        assert!(bids.runs.iter().all(|r| r.scans == SCANS as usize));
        assert_eq!(vifs(&bids), vifs(&flat), "inline = {inline}");
    }
}

fn error_of(study: &Path) -> String {
    check_file(&DiskFiles, study, CheckOptions::default())
        .map(|_| ())
        .unwrap_err()
        .to_string()
}

#[test]
fn bad_layouts_are_errors_naming_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let study = dataset(dir.path(), true);
    let func = dir.path().join("ds/sub-01/func");
    let image = func.join("sub-01_task-lights_run-1_bold.nii.gz");

    // Not gzip, though the name says so.
    let header = tangle::bids::nifti::header_bytes(1, &[8, 8, 4, SCANS], TR);
    write(&image, &header);
    let err = error_of(&study);
    assert!(
        err.contains("sub-01_task-lights_run-1_bold.nii.gz") && err.contains("gzip"),
        "{err}"
    );

    // Gzip, but the wrong magic (NIfTI-1 keeps it at byte 344).
    let mut wrong = header.clone();
    wrong[344..348].copy_from_slice(b"abc\0");
    write(&image, &gzip(&wrong));
    let err = error_of(&study);
    assert!(
        err.contains("sub-01_task-lights_run-1_bold.nii.gz") && err.contains("magic"),
        "{err}"
    );
    write(&image, &gzip(&header));

    // An events file without an onset column.
    let events = func.join("sub-01_task-lights_run-2_events.tsv");
    let good = std::fs::read_to_string(&events).unwrap();
    write(&events, good.replacen("onset", "start", 1).as_bytes());
    let err = error_of(&study);
    assert!(
        err.contains("sub-01_task-lights_run-2_events.tsv") && err.contains("no column \"onset\""),
        "{err}"
    );
    write(&events, good.as_bytes());

    // No sidecar gives a RepetitionTime.
    let sidecar = dir.path().join("ds/task-lights_bold.json");
    std::fs::remove_file(&sidecar).unwrap();
    let err = error_of(&study);
    assert!(
        err.contains("RepetitionTime") && err.contains("_bold.nii.gz"),
        "{err}"
    );
    write(
        &sidecar,
        format!(r#"{{"RepetitionTime": {TR}}}"#).as_bytes(),
    );

    // A subject-level sidecar overrides the dataset's (BIDS inheritance): runs disagree.
    write(
        &func.join("sub-01_task-lights_bold.json"),
        br#"{"RepetitionTime": 2.5}"#,
    );
    let err = error_of(&study);
    assert!(
        err.contains("RepetitionTime 2") && err.contains("differs"),
        "{err}"
    );
    std::fs::remove_file(func.join("sub-01_task-lights_bold.json")).unwrap();
}

#[test]
fn the_study_file_overrides_the_data_with_a_flag() {
    let dir = tempfile::tempdir().unwrap();
    let study = dataset(dir.path(), false);
    let text = std::fs::read_to_string(&study).unwrap();
    write(
        &study,
        format!("[acquisition]\ntr = 2.5\nscans = 100\n{text}").as_bytes(),
    );
    let report = check_file(&DiskFiles, &study, CheckOptions::default()).expect("valid");
    assert_eq!(report.settings.tr, 2.5);
    let codes: Vec<&str> = report.runs[0]
        .flags
        .iter()
        .map(|f| f.code.as_str())
        .collect();
    assert!(codes.contains(&"tr_disagrees_with_data"), "{codes:?}");
    assert!(codes.contains(&"scans_disagree_with_data"), "{codes:?}");
    // A derivative table with a row too many is an error naming both files.
    let outputs = dir
        .path()
        .join("ds/derivatives/fits/sub-02/func/sub-02_task-lights_run-1_desc-fits_events.tsv");
    let mut rows = std::fs::read_to_string(&outputs).unwrap();
    rows.push_str("0.5\tn/a\n");
    write(&outputs, rows.as_bytes());
    let err = error_of(&study);
    assert!(
        err.contains("sub-02_task-lights_run-1_desc-fits_events.tsv")
            && err.contains("sub-02_task-lights_run-1_events.tsv"),
        "{err}"
    );
}

#[test]
fn the_demo_bids_copy_checks_exactly_like_the_flat_demo() {
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data");
    let flat = check_file(
        &DiskFiles,
        &demo.join("study.toml"),
        CheckOptions::default(),
    )
    .unwrap();
    let bids = check_file(
        &DiskFiles,
        &demo.join("bids-study.toml"),
        CheckOptions::default(),
    )
    .unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(
        bids.runs.len(),
        120,
        "60 runs, each in the GLM of each learner"
    );
    assert_eq!(bids.separations, flat.separations);
    assert_eq!(vifs(&bids), vifs(&flat));
    assert_eq!(
        bids.runs.len(),
        flat.runs.len(),
        "runs of the BIDS and flat demos"
    );
    for (b, f) in bids.runs.iter().zip(&flat.runs) {
        fn codes(r: &tangle::report::RunReport) -> Vec<&str> {
            r.flags.iter().map(|f| f.code.as_str()).collect()
        }
        assert_eq!(codes(b), codes(f), "subject {} run {}", b.subject, b.run);
        assert_eq!(b.status, f.status);
    }
    assert_eq!(bids.settings.tr, 1.5, "from bids/task-harbour_bold.json");
}

#[test]
fn sessions_are_kept_in_every_output_and_fill_nuisance_templates() {
    let dir = tempfile::tempdir().unwrap();
    let root = dir.path().join("ds");
    // Slices over 0–1.2 s of a 2 s TR: the middle (0.6 s) is 0.30 of the TR.
    write(
        &root.join("task-lights_bold.json"),
        br#"{"RepetitionTime": 2.0, "SliceTiming": [0.0, 0.4, 0.8, 1.2]}"#,
    );
    for session in ["pre", "post"] {
        let func = root.join(format!("sub-01/ses-{session}/func"));
        let stem = format!("sub-01_ses-{session}_task-lights_run-1");
        let header = tangle::bids::nifti::header_bytes(2, &[8, 8, 4, SCANS], TR);
        write(&func.join(format!("{stem}_bold.nii")), &header);
        let mut events = String::from("onset\tduration\ttrial_type\tvalue\tpe\n");
        for (cue, outcome, value, pe) in trials(1, if session == "pre" { 1 } else { 2 }) {
            events.push_str(&format!(
                "{cue}\t0\tcue\t{value}\tn/a\n{outcome}\t0.5\toutcome\tn/a\t{pe}\n"
            ));
        }
        write(&func.join(format!("{stem}_events.tsv")), events.as_bytes());
        let mut motion = String::from("tx\n");
        for i in 0..SCANS {
            motion.push_str(&format!(
                "{}\n",
                ((i * 37 + session.len() as u64) % 11) as f64 / 10.0
            ));
        }
        write(
            &dir.path().join(format!("conf/{session}-lights-01.tsv")),
            motion.as_bytes(),
        );
    }
    let study = dir.path().join("study.toml");
    write(
        &study,
        format!(
            "[acquisition]\nreference = 0.5\n[bids]\nroot = \"ds\"\ntask = \"lights\"\n\
             [nuisance]\nfile = \"conf/{{session}}-{{task}}-{{subject}}.tsv\"\ncolumns = [\"tx\"]\n\
             [[event]]\nname = \"cue\"\ntype = \"cue\"\n[[event]]\nname = \"outcome\"\ntype = \"outcome\"\n{MODELS}"
        )
        .as_bytes(),
    );
    let report =
        check_file(&DiskFiles, &study, CheckOptions::default()).unwrap_or_else(|e| panic!("{e}"));
    let sessions: Vec<Option<&str>> = report.runs.iter().map(|r| r.session.as_deref()).collect();
    assert_eq!(
        sessions,
        [Some("post"), Some("pre")],
        "sessions in label order"
    );
    assert!(
        report
            .runs
            .iter()
            .all(|r| r.regressors.iter().any(|g| g.regressor.name == "tx"))
    );
    let note = report.runs[0]
        .flags
        .iter()
        .find(|f| f.code.as_str() == "slice_timing_reference")
        .expect("a note");
    assert!(note.message.contains("0.30 of the TR"), "{}", note.message);
    let json = tangle::render::json::render(&report);
    assert!(json.contains("\"session\": \"pre\""));
    let tsv = tangle::render::tsv::render_joined(&report);
    assert!(
        tsv.starts_with("subject\trun\tsession\tglm\tregressor"),
        "{}",
        &tsv[..80]
    );
    // The outcome's durations come from the events' duration column (0.5 s).
    assert_eq!(report.runs[0].events[1].max_duration, Some(0.5));
    // Filters: only the pre session.
    let text = std::fs::read_to_string(&study).unwrap().replace(
        "task = \"lights\"",
        "task = \"lights\"\nsessions = [\"pre\"]",
    );
    write(&study, text.as_bytes());
    let report = check_file(&DiskFiles, &study, CheckOptions::default()).unwrap();
    assert_eq!(report.runs.len(), 1);
}
