//! Writes `demo-data/bids/`, the demo study in the open BIDS layout, from
//! `demo-data/trials.csv` (the same invented numbers, so `tangle check
//! demo-data/bids-study.toml` gives exactly the results of `demo-data/study.toml`).
//!
//! - `sub-XX/func/sub-XX_task-harbour_run-N_events.tsv`: one row per cue and per
//!   outcome, with `onset`, `duration`, `trial_type`, and the choice and reward;
//! - `sub-XX/func/sub-XX_task-harbour_run-N_bold.nii.gz`: a NIfTI-1 header only (no
//!   voxel data — this is an invented study), giving 330 volumes;
//! - `task-harbour_bold.json` at the root: RepetitionTime and SliceTiming, inherited by
//!   every run;
//! - `derivatives/learners/…_desc-learners_events.tsv`: the two learners' quantities,
//!   one row per events row (joined by row order).
//!
//! Run with `cargo run --example make_demo_bids` after `make_demo`.

use std::io::Write;
use std::path::Path;

const SCANS: u64 = 330;
const TR: f64 = 1.5;
const MODEL_COLUMNS: [&str; 5] = [
    "delta_value",
    "delta_pe",
    "hybrid_value",
    "hybrid_pe",
    "hybrid_assoc",
];
const CUE_COLUMNS: [&str; 2] = ["delta_value", "hybrid_value"];

fn write(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    std::fs::create_dir_all(path.parent().unwrap_or(Path::new(".")))?;
    std::fs::write(path, bytes)
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data");
    let bids = demo.join("bids");
    if bids.exists() {
        std::fs::remove_dir_all(&bids)?;
    }
    let mut reader = csv::Reader::from_path(demo.join("trials.csv"))?;
    let headers = reader.headers()?.clone();
    let column = |name: &str| {
        headers
            .iter()
            .position(|h| h == name)
            .ok_or(format!("no column {name}"))
    };
    let (subject, run) = (column("subject")?, column("run")?);
    let (cue, outcome) = (column("cue_onset")?, column("outcome_onset")?);
    let (choice, reward) = (column("choice")?, column("reward")?);
    let models: Vec<usize> = MODEL_COLUMNS
        .iter()
        .map(|c| column(c))
        .collect::<Result<_, _>>()?;

    // (subject, run) → events rows and derivative rows, in onset order.
    let mut runs: std::collections::BTreeMap<(String, String), (String, String)> =
        Default::default();
    for record in reader.records() {
        let record = record?;
        let key = (record[subject].to_string(), record[run].to_string());
        let (events, outputs) = runs.entry(key).or_insert_with(|| {
            (
                "onset\tduration\ttrial_type\tchoice\treward\n".to_string(),
                format!("{}\n", MODEL_COLUMNS.join("\t")),
            )
        });
        for (onset, kind) in [(cue, "cue"), (outcome, "outcome")] {
            events.push_str(&format!(
                "{}\t0\t{kind}\t{}\t{}\n",
                &record[onset],
                &record[choice],
                if kind == "outcome" {
                    &record[reward]
                } else {
                    "n/a"
                }
            ));
            let cells: Vec<&str> = MODEL_COLUMNS
                .iter()
                .zip(&models)
                .map(|(name, &c)| {
                    if CUE_COLUMNS.contains(name) == (kind == "cue") {
                        &record[c]
                    } else {
                        "n/a"
                    }
                })
                .collect();
            outputs.push_str(&cells.join("\t"));
            outputs.push('\n');
        }
    }
    // Interleaved acquisition of 30 slices over the TR (ascending odd, then even).
    let slices = 30;
    let order: Vec<usize> = (0..slices)
        .step_by(2)
        .chain((1..slices).step_by(2))
        .collect();
    let mut timing = vec![0.0; slices];
    for (k, &slice) in order.iter().enumerate() {
        timing[slice] = (k as f64 * TR / slices as f64 * 1000.0).round() / 1000.0;
    }
    write(
        &bids.join("dataset_description.json"),
        br#"{"Name": "harbour lights (INVENTED demo study, not data)", "BIDSVersion": "1.9.0", "DatasetType": "raw"}"#,
    )?;
    write(
        &bids.join("task-harbour_bold.json"),
        serde_json::to_string_pretty(&serde_json::json!({
            "TaskName": "harbour",
            "RepetitionTime": TR,
            "SliceTiming": timing,
        }))?
        .as_bytes(),
    )?;
    write(
        &bids.join("README"),
        b"The harbour-lights demo study of tangle in the BIDS layout. INVENTED: no volunteers,\n\
          no scanner. The bold images hold a NIfTI-1 header only (no voxel data). Made by\n\
          `cargo run --example make_demo_bids` from ../trials.csv; see ../README.md.\n",
    )?;
    let derivatives = bids.join("derivatives/learners");
    write(
        &derivatives.join("dataset_description.json"),
        br#"{"Name": "harbour lights learners (invented)", "BIDSVersion": "1.9.0", "DatasetType": "derivative", "GeneratedBy": [{"Name": "make_demo"}]}"#,
    )?;
    let header = tangle::bids::nifti::header_bytes(1, &[16, 16, 30, SCANS], TR);
    let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::best());
    gz.write_all(&header)?;
    let image = gz.finish()?;
    for ((subject, run), (events, outputs)) in &runs {
        let stem = format!("sub-{subject}_task-harbour_run-{run}");
        let func = bids.join(format!("sub-{subject}/func"));
        write(&func.join(format!("{stem}_events.tsv")), events.as_bytes())?;
        write(&func.join(format!("{stem}_bold.nii.gz")), &image)?;
        let out = derivatives.join(format!(
            "sub-{subject}/func/{stem}_desc-learners_events.tsv"
        ));
        write(&out, outputs.as_bytes())?;
    }
    println!("wrote demo-data/bids/ ({} runs)", runs.len());
    Ok(())
}
