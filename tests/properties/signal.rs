//! The signal partition on simulated regions built from known unique and shared parts:
//! the partition must recover them within its stated (bootstrap) uncertainty.

use crate::common::{Lcg, StudyDir, paired, study_toml, trials_csv};
use tangle::check::read_runs;
use tangle::check::{CheckOptions, check_file};
use tangle::design::build_design;
use tangle::files::{DiskFiles, read_text};
use tangle::settings::{AnalysisOptions, RunSettings};
use tangle::signal::BootstrapSettings;
use tangle::study::parse_study;

const MODELS: &str = r#"
[[model]]
name = "a"
modulators = [ { event = "outcome", column = "x" } ]
[[model]]
name = "b"
modulators = [ { event = "outcome", column = "y" } ]
[[glm]]
name = "both"
models = ["a", "b"]
"#;

/// A one-run study whose two models' modulators correlate about 0.7 across trials.
fn study() -> (StudyDir, usize) {
    let (trials, end) = trials_csv(
        &["01"],
        60,
        |rng| rng.uniform(2.0, 6.0),
        &["x", "y"],
        |_, rng| {
            let x = rng.uniform(-1.0, 1.0);
            vec![
                format!("{x:.4}"),
                format!("{:.4}", 0.7 * x + 0.7 * rng.uniform(-1.0, 1.0)),
            ]
        },
    );
    let scans = (end / 2.0).ceil() as usize + 10;
    let dir = StudyDir::new();
    dir.file("study.toml", &study_toml(2.0, scans, MODELS))
        .file("trials.csv", &trials);
    (dir, scans)
}

/// The run's sampled regressors, by name.
fn regressors(dir: &StudyDir) -> Vec<(String, Vec<f64>)> {
    let path = dir.path("study.toml");
    let study = parse_study(&path, &read_text(&DiskFiles, &path).unwrap()).unwrap();
    let (tr, runs) = read_runs(&DiskFiles, &study).unwrap();
    let settings = RunSettings::of_study(&study, tr, AnalysisOptions::default()).unwrap();
    let design = build_design(&settings.design, &runs[0], None).unwrap();
    let names = design.regressors.iter().map(|r| r.name.clone());
    paired(names, design.sampled, "regressor names and columns").collect()
}

/// Writes one region: 1·cue + 2·a:x + 1.5·b:y + a slow cosine drift (inside the high-pass
/// filter's basis) + a constant + noise of the given size.
fn write_signal(dir: &StudyDir, scans: usize, noise: f64, seed: u64) {
    let columns = regressors(dir);
    let get = |name: &str| &columns.iter().find(|(n, _)| n == name).unwrap().1;
    let mut rng = Lcg(seed);
    let mut text = String::from("roi\n");
    for k in 0..scans {
        let drift =
            3.0 + 0.5 * (std::f64::consts::PI * (2 * k + 1) as f64 / (2 * scans) as f64).cos();
        let value = get("cue")[k]
            + 2.0 * get("a:x")[k]
            + 1.5 * get("b:y")[k]
            + drift
            + noise * (rng.uniform(-1.0, 1.0) + rng.uniform(-1.0, 1.0));
        text.push_str(&format!("{value}\n"));
    }
    dir.file("signal/run-1.tsv", &text);
}

fn options(dir: &StudyDir, resamples: usize, seed: u64) -> CheckOptions {
    CheckOptions {
        signal: Some(dir.path("signal/run-{run}.tsv").display().to_string()),
        analysis: AnalysisOptions {
            bootstrap: BootstrapSettings { resamples, seed },
            ..AnalysisOptions::default()
        },
        ..CheckOptions::default()
    }
}

fn components(dir: &StudyDir, resamples: usize, seed: u64) -> Vec<(Vec<String>, f64, f64, f64)> {
    let report = check_file(
        &DiskFiles,
        &dir.path("study.toml"),
        options(dir, resamples, seed),
    )
    .unwrap();
    let region = &report.runs[0].signal[0];
    region
        .components
        .iter()
        .map(|c| (c.groups.clone(), c.share, c.low, c.high))
        .collect()
}

#[test]
fn without_noise_the_partition_is_exact_and_certain() {
    let (dir, scans) = study();
    write_signal(&dir, scans, 0.0, 1);
    let report = check_file(&DiskFiles, &dir.path("study.toml"), options(&dir, 50, 1)).unwrap();
    let region = &report.runs[0].signal[0];
    assert_eq!(region.region, "roi");
    // The signal lies in the design's span (the drift is filtered out): R² = 1.
    assert!((region.r2 - 1.0).abs() < 1e-9, "{}", region.r2);
    let parts = &region.components;
    assert_eq!(
        parts.iter().map(|c| c.groups.join("+")).collect::<Vec<_>>(),
        ["a", "b", "a+b"]
    );
    let total: f64 = parts.iter().map(|c| c.share).sum();
    assert!((total - (region.r2 - region.r2_base)).abs() < 1e-12);
    for part in parts {
        assert!(
            (part.high - part.low).abs() < 1e-9,
            "no residual, no uncertainty: {part:?}"
        );
        assert!(part.share > 0.0);
    }
}

#[test]
fn with_noise_the_intervals_cover_the_noiseless_shares_scaled_by_the_signal_fraction() {
    // Truth for a noisy region: the noiseless components times the share of the filtered
    // variance that is signal, ‖s‖² / (‖s‖² + ‖e‖²) (noise and signal nearly orthogonal).
    let (dir, scans) = study();
    write_signal(&dir, scans, 0.0, 1);
    let noiseless = components(&dir, 10, 1);
    let signal_variance = {
        let report = check_file(&DiskFiles, &dir.path("study.toml"), options(&dir, 10, 1)).unwrap();
        report.runs[0].signal[0].r2
    };
    assert!((signal_variance - 1.0).abs() < 1e-9);
    let mut covered = [0usize; 3];
    let replications = 20;
    for replication in 0..replications {
        write_signal(&dir, scans, 0.25, 100 + replication);
        let report = check_file(
            &DiskFiles,
            &dir.path("study.toml"),
            options(&dir, 300, replication),
        )
        .unwrap();
        let region = &report.runs[0].signal[0];
        // The fitted share of variance estimates the signal fraction.
        let fraction = region.r2;
        for (i, part) in region.components.iter().enumerate() {
            let truth = noiseless[i].1 * fraction;
            if part.low <= truth && truth <= part.high {
                covered[i] += 1;
            }
        }
    }
    eprintln!("coverage of the a, b, a+b components in {replications} replications: {covered:?}");
    for (i, count) in covered.iter().enumerate() {
        assert!(
            *count >= 14,
            "component {:?} covered in {count} of {replications}",
            noiseless[i].0
        );
    }
}

#[test]
fn the_same_seed_gives_the_same_intervals_and_bad_signal_files_are_errors() {
    let (dir, scans) = study();
    write_signal(&dir, scans, 0.3, 5);
    assert_eq!(components(&dir, 100, 7), components(&dir, 100, 7));
    dir.file("signal/run-1.tsv", "roi\n1\n2\n");
    let err = check_file(&DiskFiles, &dir.path("study.toml"), options(&dir, 10, 1))
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("run-1.tsv")
            && err.contains(&format!(
                "the signal table has 2 rows but subject 01 run 1 has {scans} scans"
            )),
        "{err}"
    );
}
