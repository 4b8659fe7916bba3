//! The forecast end to end: spec → simulated, fitted, checked participants → report.

use std::path::Path;

use tangle::check::{CheckOptions, check_file};
use tangle::files::{DiskFiles, MemoryFiles};
use tangle::forecast::summary::Spread;
use tangle::forecast::{ForecastOptions, read_spec, run_forecast};
use tangle::output::write_trial_folders;

/// A small two-learner spec: 2 runs of 40 trials, two timing variants.
const SPEC: &str = r#"
[forecast]
name = "test forecast (simulated)"
participants = 12
seed = 99

[task]
options = 2
reward_probabilities = [0.8, 0.2]
reversal_every = 10
trials = 40
runs = 2
tr = 2.0
first_cue = 2.0
cue_to_outcome = [2.0, 6.0]
outcome_to_cue = [2.0, 4.0]

[[learner]]
name = "delta"
kind = "delta"
[learner.priors]
learning_rate = { beta = [2, 5] }
inverse_temperature = { gamma = [4, 1.25] }

[[learner]]
name = "hybrid"
kind = "hybrid"
[learner.priors]
learning_rate = { beta = [5, 3] }
associability_rate = { uniform = [0.3, 0.9] }
initial_associability = { uniform = [0.5, 1.0] }
inverse_temperature = { gamma = [4, 1.25] }

[generate]
learner = "hybrid"

[compare]
regressors = ["cue", "outcome"]

[[variant]]
name = "outcome 0.5 s after cue"
cue_to_outcome = 0.5
"#;

fn spec(participants: Option<usize>) -> tangle::forecast::spec::ForecastSpec {
    let files = MemoryFiles::default().with("plan/forecast.toml", SPEC);
    read_spec(&files, Path::new("plan/forecast.toml"), participants, None).expect("valid spec")
}

fn median_vif(
    report: &tangle::forecast::report::ForecastReport,
    variant: usize,
    name: &str,
) -> f64 {
    let v = &report.variants[variant];
    let r = v
        .regressors
        .iter()
        .find(|r| r.regressor == name)
        .expect(name);
    r.vif.median.expect("defined")
}

#[test]
fn fixed_short_delay_entangles_cue_and_outcome_and_jitter_does_not() {
    // Common practice: an outcome 0.5 s after every cue cannot be told apart from the cue
    // (VIF > 10), while a 2–6 s jittered delay keeps the two events apart (VIF < 5).
    let spec = spec(None);
    let report = run_forecast(&spec, ForecastOptions::default(), &|| {})
        .unwrap()
        .report;
    for event in ["cue", "outcome"] {
        let jittered = median_vif(&report, 0, event);
        let fixed = median_vif(&report, 1, event);
        assert!(jittered < 5.0, "{event}: jittered median VIF {jittered}");
        assert!(fixed > 10.0, "{event}: fixed 0.5 s median VIF {fixed}");
    }
    assert_eq!(report.ranking[0].variant, "as planned");
    assert!(
        report
            .verdict
            .contains("\"as planned\" separates the events best"),
        "{}",
        report.verdict
    );
    assert_eq!(report.variants[0].runs_checked, 24);
    assert_eq!(report.variants[0].participants.total(), 12);
    // Both variants are done by the same people: identical behaviour, identical fits.
    assert_eq!(report.variants[0].recovery, report.variants[1].recovery);
}

#[test]
fn result_does_not_depend_on_the_thread_count() {
    let spec = spec(Some(6));
    let run = |threads| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            let report = run_forecast(&spec, ForecastOptions::default(), &|| {})
                .unwrap()
                .report;
            tangle::render::forecast::json(&report)
        })
    };
    let one = run(1);
    assert_eq!(one, run(3));
    assert_eq!(one, run(1), "and the same on a second run");
    assert!(!one.contains("NaN") && !one.contains("inf"));
}

#[test]
fn written_trials_check_to_the_forecast_numbers() {
    let spec = spec(Some(5));
    let options = ForecastOptions {
        keep_participants: true,
    };
    let forecast = run_forecast(&spec, options, &|| {}).unwrap();
    let dir = tempfile::tempdir().unwrap();
    write_trial_folders(dir.path(), &spec, &forecast).unwrap();
    for (v, folder) in ["1-as-planned", "2-outcome-0-5-s-after-cue"]
        .iter()
        .enumerate()
    {
        let study = dir.path().join(folder).join("study.toml");
        let checked = check_file(&DiskFiles, &study, CheckOptions::default())
            .expect("the written study checks");
        assert_eq!(checked.runs.len(), 10 * spec.glms.len());
        for (glm, name) in [
            ("delta", "delta_pe"),
            ("hybrid", "hybrid_pe"),
            ("delta", "cue"),
        ] {
            let vifs: Vec<Option<f64>> = checked
                .runs
                .iter()
                .filter(|run| run.glm == glm)
                .map(|run| {
                    let i = run
                        .regressors
                        .iter()
                        .position(|r| {
                            r.regressor.column.as_deref() == Some(name) || r.regressor.name == name
                        })
                        .expect(name);
                    run.vif[i]
                })
                .collect();
            let forecast_spread = &forecast.report.variants[v]
                .regressors
                .iter()
                .find(|r| r.glm == glm && r.regressor == name)
                .unwrap()
                .vif;
            assert_eq!(&Spread::of(&vifs), forecast_spread, "{folder} {glm} {name}");
        }
    }
    let parameters =
        std::fs::read_to_string(dir.path().join("1-as-planned/parameters.csv")).unwrap();
    assert_eq!(parameters.lines().count(), 6, "header + 5 participants");
    assert!(parameters.starts_with("subject,generator,delta_learning_rate_fitted"));
}

#[test]
fn bad_specs_are_reported_with_their_lines() {
    let broken = SPEC
        .replace("kind = \"hybrid\"", "kind = \"hybird\"")
        .replace(
            "reversal_every = 10",
            "reversal_every = 10\nreversal_probability = 0.2",
        )
        .replace("tr = 2.0", "tr = -2.0")
        .replace("[compare]", "[compare]\nrank_by = \"best\"");
    let files = MemoryFiles::default().with("f.toml", broken);
    let err = read_spec(&files, Path::new("f.toml"), None, None)
        .unwrap_err()
        .to_string();
    for expected in [
        "unknown learner kind \"hybird\"",
        "give `reversal_every` or `reversal_probability`, not both",
        "tr must be between 0 and 100 seconds",
        "rank_by is \"vif\" or \"shared\"",
    ] {
        assert!(err.contains(expected), "missing {expected:?} in:\n{err}");
    }
    assert!(err.contains("f.toml, line"), "{err}");
    // A generating learner needs every prior.
    let no_prior = SPEC.replace("associability_rate = { uniform = [0.3, 0.9] }\n", "");
    let files = MemoryFiles::default().with("f.toml", no_prior);
    let err = read_spec(&files, Path::new("f.toml"), None, None)
        .unwrap_err()
        .to_string();
    assert!(err.contains("has no prior for associability_rate"), "{err}");
}

#[test]
fn the_command_writes_every_format() {
    let dir = tempfile::tempdir().unwrap();
    let spec_path = dir.path().join("forecast.toml");
    std::fs::write(&spec_path, SPEC).unwrap();
    let run = |format: &str| {
        assert_cmd::Command::cargo_bin("tangle")
            .unwrap()
            .args([
                "forecast",
                spec_path.to_str().unwrap(),
                "--participants",
                "4",
                "--format",
                format,
            ])
            .assert()
            .success()
            .get_output()
            .stdout
            .clone()
    };
    let table = String::from_utf8(run("table")).unwrap();
    assert!(
        table.contains("Task variants, best separated first"),
        "{table}"
    );
    assert!(table.contains("How to read this forecast"));
    let json: serde_json::Value = serde_json::from_slice(&run("json")).unwrap();
    assert_eq!(json["forecast"]["participants"], 4);
    assert_eq!(json["variants"].as_array().unwrap().len(), 2);
    let tsv = String::from_utf8(run("tsv")).unwrap();
    assert!(tsv.starts_with("# variants\nvariant\trank\tscore"), "{tsv}");
    assert!(tsv.contains("# recovery\n"));
}

#[test]
fn every_learner_kind_a_mixture_and_a_schedule_file_run_end_to_end() {
    let spec = r#"
[forecast]
participants = 10
seed = 5

[task]
options = 3
schedule = "schedule.csv"
trials = 30
runs = 2
tr = 2.0
cue_to_outcome = [2.0, 4.0]
outcome_to_cue = [2.0, 4.0]
end_after_last_outcome = 12

[[learner]]
name = "kal"
kind = "kalman"
[learner.priors]
initial_variance = 1.0
observation_noise = { lognormal = [-1.0, 0.3] }
drift = { uniform = [0.01, 0.1] }
inverse_temperature = { gamma = [4, 1.25] }

[[learner]]
name = "dual"
kind = "dual_rate"
modulators = ["value", "pe", "rate"]
[learner.priors]
positive_rate = { beta = [3, 3] }
negative_rate = { beta = [2, 5] }
inverse_temperature = { uniform = [2, 8] }

[generate]
weights = { kal = 1, dual = 3 }
"#;
    let mut schedule = String::from("p1,p2,p3\n");
    for t in 0..30 {
        let p = if t < 15 { "0.9,0.5,0.1" } else { "0.1,0.5,0.9" };
        schedule.push_str(p);
        schedule.push('\n');
    }
    let files = MemoryFiles::default()
        .with("plan/forecast.toml", spec)
        .with("plan/schedule.csv", schedule);
    let spec = read_spec(&files, Path::new("plan/forecast.toml"), None, None).expect("valid");
    assert_eq!(spec.generating, vec![(0, 0.25), (1, 0.75)]);
    let options = ForecastOptions {
        keep_participants: true,
    };
    let forecast = run_forecast(&spec, options, &|| {}).unwrap();
    let report = &forecast.report;
    let names: Vec<(&str, &str)> = report.variants[0]
        .regressors
        .iter()
        .map(|r| (r.glm.as_str(), r.regressor.as_str()))
        .collect();
    // One GLM per learner by default; defaults for the Kalman learner; cue quantities
    // come before outcome ones.
    assert_eq!(
        names,
        [
            ("kal", "cue"),
            ("kal", "outcome"),
            ("kal", "kal_value"),
            ("kal", "kal_uncertainty"),
            ("kal", "kal_pe"),
            ("dual", "cue"),
            ("dual", "outcome"),
            ("dual", "dual_value"),
            ("dual", "dual_pe"),
            ("dual", "dual_rate")
        ]
    );
    // Both learners generated someone, and each has a recovery row per fitted parameter
    // (the Kalman's fixed initial variance is not fitted, so it has none).
    let generated: Vec<usize> = spec
        .learners
        .iter()
        .enumerate()
        .map(|(i, _)| {
            forecast.participants[0]
                .iter()
                .filter(|p| p.persona.generator == i)
                .count()
        })
        .collect();
    assert_eq!(generated.iter().sum::<usize>(), 10);
    assert!(generated.iter().all(|&n| n > 0), "{generated:?}");
    let rows: Vec<(&str, &str)> = report.variants[0]
        .recovery
        .iter()
        .map(|r| (r.learner.as_str(), r.parameter.as_str()))
        .collect();
    assert_eq!(
        rows,
        [
            ("kal", "observation_noise"),
            ("kal", "drift"),
            ("kal", "inverse_temperature"),
            ("dual", "positive_rate"),
            ("dual", "negative_rate"),
            ("dual", "inverse_temperature"),
        ]
    );
    // A fixed parameter stays fixed in every fit; the schedule's probabilities are used.
    for p in &forecast.participants[0] {
        assert_eq!(p.fits[0].parameters[0], 1.0);
        assert_eq!(p.plans[0].probabilities[20], vec![0.1, 0.5, 0.9]);
        let last = p.plans[0].outcome_onsets[29];
        assert_eq!(p.plans[0].scans, ((last + 12.0) / 2.0).ceil() as usize);
    }
    let json = tangle::render::forecast::json(report);
    assert!(!json.contains("NaN") && !json.contains("inf"));
}

#[test]
fn the_table_layout_is_stable() {
    let spec = spec(Some(4));
    let report = run_forecast(&spec, ForecastOptions::default(), &|| {})
        .unwrap()
        .report;
    insta::assert_snapshot!(tangle::render::forecast::table::render(&report));
}
