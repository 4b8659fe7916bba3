//! The binary on small fixtures: outputs, exit codes and the behaviour promised in the README.

use crate::common::{
    Lcg, StudyDir, demo_with_joint_glm, paired, regressor_names, study_toml, trials_csv,
};
use predicates::prelude::*;
use serde_json::Value;

fn vif(run: &Value, name: &str) -> Option<f64> {
    let index = run["regressors"]
        .as_array()
        .unwrap()
        .iter()
        .position(|r| r["name"] == name)
        .unwrap();
    run["vif"][index].as_f64()
}

fn has_code(run: &Value, code: &str) -> bool {
    codes(run).iter().any(|c| c == code)
}

fn codes(run: &Value) -> Vec<String> {
    run["flags"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["code"].as_str().unwrap().to_string())
        .collect()
}

fn timing_study(gap: impl FnMut(&mut Lcg) -> f64) -> StudyDir {
    let (trials, end) = trials_csv(&["01"], 40, gap, &[], |_, _| vec![]);
    let dir = StudyDir::new();
    let scans = (end / 2.0).ceil() as usize + 10;
    dir.file("study.toml", &study_toml(2.0, scans, ""))
        .file("trials.csv", &trials);
    dir
}

#[test]
fn events_half_a_second_apart_cannot_be_separated() {
    // Common practice: two events 0.5 s apart on every trial give VIF > 10.
    let report = timing_study(|_| 0.5).json(&[]);
    let run = &report["runs"][0];
    assert!(vif(run, "cue").unwrap() > 10.0, "{:?}", vif(run, "cue"));
    assert!(vif(run, "outcome").unwrap() > 10.0);
    assert_eq!(report["subjects"][0]["status"], "severe");
}

#[test]
fn jittered_gaps_of_two_to_six_seconds_separate_the_events() {
    // Common practice: the same events 2–6 s apart, jittered, give VIF < 5.
    let report = timing_study(|rng| rng.uniform(2.0, 6.0)).json(&[]);
    let run = &report["runs"][0];
    assert!(vif(run, "cue").unwrap() < 5.0, "{:?}", vif(run, "cue"));
    assert!(vif(run, "outcome").unwrap() < 5.0);
    assert_eq!(report["subjects"][0]["status"], "ok");
}

fn modulator_study(
    columns: &[&str],
    models: &str,
    values: impl FnMut(usize, &mut Lcg) -> Vec<String>,
) -> StudyDir {
    let (trials, end) = trials_csv(
        &["01", "02"],
        40,
        |rng| rng.uniform(2.0, 6.0),
        columns,
        values,
    );
    let dir = StudyDir::new();
    let scans = (end / 2.0).ceil() as usize + 10;
    dir.file("study.toml", &study_toml(2.0, scans, models))
        .file("trials.csv", &trials);
    dir
}

/// Two models: one with modulators a and b, one with their total.
const PARTS_AND_WHOLE: &str = r#"
[[model]]
name = "parts"
modulators = [ { event = "outcome", column = "a" }, { event = "outcome", column = "b" } ]
[[model]]
name = "whole"
modulators = [ { event = "outcome", column = "total" } ]
[[glm]]
name = "parts and whole"
models = ["parts", "whole"]
"#;

#[test]
fn a_modulator_equal_to_the_sum_of_two_others_is_an_exact_dependency() {
    let dir = modulator_study(&["a", "b", "total"], PARTS_AND_WHOLE, |_, rng| {
        // The sum of the values as written, so that the table itself holds total = a + b.
        let a = (rng.uniform(-1.0, 1.0) * 1e4).round() / 1e4;
        let b = (rng.uniform(-1.0, 1.0) * 1e4).round() / 1e4;
        vec![
            format!("{a:.4}"),
            format!("{b:.4}"),
            format!("{:.4}", a + b),
        ]
    });
    let report = dir.json(&[]);
    let run = &report["runs"][0];
    let dependency = &run["dependencies"][0];
    assert_eq!(
        dependency["regressors"],
        serde_json::json!(["whole:total", "parts:a", "parts:b"])
    );
    let coefficients = dependency["coefficients"].as_array().unwrap();
    for (got, want) in paired(coefficients, [1.0, -1.0, -1.0], "coefficients") {
        assert!((got.as_f64().unwrap() - want).abs() < 1e-6, "{dependency}");
    }
    // Inside the dependency: undefined. Outside it: finite.
    for name in ["parts:a", "parts:b", "whole:total"] {
        assert_eq!(vif(run, name), None, "{name}");
    }
    assert!(vif(run, "cue").unwrap() < 5.0);
    assert!(vif(run, "outcome").unwrap() < 5.0);
    assert!(has_code(run, "exact_dependency"));
    let table = dir.check(&[]).success().get_output().stdout.clone();
    let table = String::from_utf8(table).unwrap();
    assert!(
        table.contains("whole:total ≈ 1.00·parts:a + 1.00·parts:b"),
        "{table}"
    );
    dir.check(&["--fail-on", "severe"]).code(3);
}

#[test]
fn a_constant_modulator_is_left_out_with_a_flag() {
    let models = r#"
[[model]]
name = "m"
modulators = [ { event = "outcome", column = "flat" }, { event = "outcome", column = "pe" } ]
"#;
    let report = modulator_study(&["flat", "pe"], models, |_, rng| {
        vec!["0.7".into(), format!("{:.3}", rng.uniform(-1.0, 1.0))]
    })
    .json(&[]);
    let run = &report["runs"][0];
    assert_eq!(vif(run, "m:flat"), None);
    assert!(vif(run, "m:pe").unwrap() < 5.0);
    assert_eq!(run["regressors"][2]["in_design"], false);
    assert!(has_code(run, "constant_modulator"));
    assert_eq!(run["correlation"][2][2], Value::Null);
}

#[test]
fn centring_keeps_a_modulator_off_its_onset_regressor() {
    let models =
        "[[model]]\nname = \"m\"\nmodulators = [ { event = \"outcome\", column = \"v\" } ]\n";
    let dir = modulator_study(&["v"], models, |_, rng| {
        vec![format!("{:.3}", rng.uniform(4.0, 6.0))]
    });
    let centred = dir.json(&[]);
    let raw = dir.json(&["--no-centring"]);
    let (centred, raw) = (&centred["runs"][0], &raw["runs"][0]);
    assert!(vif(centred, "outcome").unwrap() < 2.0);
    // Values far from zero make the uncentred modulator almost a copy of the onset regressor.
    assert!(vif(raw, "outcome").unwrap() > 10.0 * vif(centred, "outcome").unwrap());
    assert_eq!(raw["status"], "severe");
}

#[test]
fn missing_values_contribute_nothing_and_are_counted() {
    let models =
        "[[model]]\nname = \"m\"\nmodulators = [ { event = \"outcome\", column = \"v\" } ]\n";
    let report = modulator_study(&["v"], models, |trial, rng| {
        let value = rng.uniform(-1.0, 1.0);
        vec![if trial % 10 == 3 {
            "n/a".into()
        } else {
            format!("{value:.3}")
        }]
    })
    .json(&[]);
    let run = &report["runs"][0];
    let flag = run["flags"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["code"] == "missing_values")
        .unwrap();
    assert!(
        flag["message"]
            .as_str()
            .unwrap()
            .starts_with("4 of 40 trials"),
        "{flag}"
    );
    assert!(vif(run, "m:v").is_some());
}

#[test]
fn late_onsets_are_ignored_and_early_ones_kept() {
    let dir = StudyDir::new();
    let mut trials = String::from("subject,run,cue_onset,outcome_onset\n");
    for i in 0..30 {
        let t = -1.0 + 9.0 * i as f64;
        trials.push_str(&format!("01,1,{t},{}\n", t + 3.0 + (i % 4) as f64));
    }
    trials.push_str("01,1,400,404\n");
    dir.file("study.toml", &study_toml(2.0, 150, ""))
        .file("trials.csv", &trials);
    let report = dir.json(&[]);
    let codes = codes(&report["runs"][0]);
    assert!(
        has_code(&report["runs"][0], "onset_after_run_end"),
        "{codes:?}"
    );
    assert!(has_code(&report["runs"][0], "negative_onset"), "{codes:?}");
}

#[test]
fn nuisance_regressors_enter_the_design_and_wrong_lengths_are_errors() {
    let (trials, _) = trials_csv(&["01"], 20, |rng| rng.uniform(2.0, 6.0), &[], |_, _| vec![]);
    let scans = 100;
    let extra =
        "[nuisance]\nfile = \"confounds/sub-{subject}_run-{run}.tsv\"\ncolumns = [\"tx\"]\n";
    let dir = StudyDir::new();
    let mut motion = String::from("tx\tty\n");
    let mut rng = Lcg(3);
    for _ in 0..scans {
        motion.push_str(&format!(
            "{:.4}\t{:.4}\n",
            rng.uniform(-0.1, 0.1),
            rng.uniform(-0.1, 0.1)
        ));
    }
    dir.file("study.toml", &study_toml(2.0, scans, extra))
        .file("trials.csv", &trials)
        .file("confounds/sub-01_run-1.tsv", &motion);
    let report = dir.json(&[]);
    let run = &report["runs"][0];
    assert_eq!(run["regressors"][2]["kind"], "nuisance");
    assert!(vif(run, "tx").is_some());

    dir.file(
        "confounds/sub-01_run-1.tsv",
        &motion.lines().take(50).collect::<Vec<_>>().join("\n"),
    );
    dir.check(&[])
        .code(1)
        .stderr(
            predicate::str::contains("sub-01_run-1.tsv").and(predicate::str::contains(
                "49 rows but subject 01 run 1 has 100 scans",
            )),
        );
}

#[test]
fn temporal_derivatives_are_added_on_request() {
    let (trials, _) = trials_csv(&["01"], 20, |rng| rng.uniform(2.0, 6.0), &[], |_, _| vec![]);
    let dir = StudyDir::new();
    let text = study_toml(2.0, 120, "").replace("[trials]", "[hrf]\nderivative = true\n[trials]");
    dir.file("study.toml", &text).file("trials.csv", &trials);
    let report = dir.json(&[]);
    let names = regressor_names(&report["runs"][0]);
    assert_eq!(names, ["cue", "outcome", "cue:deriv", "outcome:deriv"]);
    assert_eq!(report["settings"]["hrf"]["derivative"], true);
}

#[test]
fn long_form_tables_select_rows_by_type() {
    let dir = StudyDir::new();
    let mut trials = String::from("subject\trun\tonset\tduration\ttrial_type\tpe\n");
    let mut rng = Lcg(9);
    let mut t = 1.0;
    for _ in 0..25 {
        trials.push_str(&format!("01\t1\t{t:.2}\t0\tcue\tn/a\n"));
        t += rng.uniform(2.0, 6.0);
        trials.push_str(&format!(
            "01\t1\t{t:.2}\t1\tfeedback\t{:.3}\n",
            rng.uniform(-1.0, 1.0)
        ));
        t += rng.uniform(3.0, 6.0);
    }
    let text = r#"[acquisition]
tr = 2.0
scans = 200
[trials]
file = "events.tsv"
[[event]]
name = "cue"
type_column = "trial_type"
type = "cue"
[[event]]
name = "feedback"
type_column = "trial_type"
type = "feedback"
duration = "duration"
[[model]]
name = "m"
modulators = [ { event = "feedback", column = "pe" } ]
"#;
    dir.file("study.toml", text).file("events.tsv", &trials);
    let report = dir.json(&[]);
    let run = &report["runs"][0];
    assert_eq!(run["regressors"].as_array().unwrap().len(), 3);
    assert!(vif(run, "m:pe").unwrap() < 2.0);
    assert!(codes(run).is_empty(), "{:?}", codes(run));
}

#[test]
fn tsv_tables_go_to_stdout_in_sections_or_to_sibling_files() {
    let dir = timing_study(|rng| rng.uniform(2.0, 6.0));
    let output = dir
        .check(&["--format", "tsv"])
        .success()
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8(output).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    // Every per-run table names the GLM after the run (a study without models has one
    // GLM of its events, named "events").
    assert!(lines[0].starts_with("subject\trun\tglm\tregressor\tkind"));
    assert!(lines[1].starts_with("01\t1\tevents\tcue\tonset\tcue\tn/a\tn/a\ttrue\t"));
    assert_eq!(lines[3], "");
    for section in [
        "# dimensions",
        "# model_sets",
        "# contrasts",
        "# dependencies",
        "# flags",
    ] {
        assert!(lines.contains(&section), "{section}");
    }
    dir.check(&["--format", "tsv", "--out", "out/run.tsv"])
        .success();
    let regressors = std::fs::read_to_string(dir.path("out/run.tsv")).unwrap();
    assert_eq!(regressors.lines().count(), 3);
    let dimensions = std::fs::read_to_string(dir.path("out/run.dimensions.tsv")).unwrap();
    assert!(dimensions.starts_with(
        "subject\trun\tglm\tdimension\tcondition_index\tregressor\tproportion\tentangled\n"
    ));
    assert_eq!(
        dimensions.lines().count(),
        1 + 2 * 2,
        "2 dimensions x 2 regressors"
    );
    for name in ["model_sets", "contrasts", "dependencies", "flags"] {
        assert!(dir.path(&format!("out/run.{name}.tsv")).exists(), "{name}");
    }
}

#[test]
fn out_writes_whole_files_and_a_failed_run_leaves_them_alone() {
    let dir = timing_study(|rng| rng.uniform(2.0, 6.0));
    dir.check(&["--format", "json", "--out", "results/report.json"])
        .success()
        .stdout("");
    let written = std::fs::read_to_string(dir.path("results/report.json")).unwrap();
    assert!(written.contains("\"tool\""));
    dir.file(
        "trials.csv",
        "subject,run,cue_onset,outcome_onset\n01,1,abc,2\n",
    );
    dir.check(&["--format", "json", "--out", "results/report.json"])
        .code(1);
    assert_eq!(
        std::fs::read_to_string(dir.path("results/report.json")).unwrap(),
        written
    );
    let leftovers = std::fs::read_dir(dir.path("results")).unwrap().count();
    assert_eq!(leftovers, 1, "no temporary files are left behind");
}

#[test]
fn fail_on_sets_exit_code_three_only_when_reached() {
    let severe = timing_study(|_| 0.5);
    severe.check(&["--fail-on", "severe"]).code(3);
    severe.check(&["--fail-on", "caution"]).code(3);
    severe.check(&[]).code(0);
    let fine = timing_study(|rng| rng.uniform(2.0, 6.0));
    fine.check(&["--fail-on", "caution"]).code(0);
}

#[test]
fn json_holds_the_documented_fields() {
    let report = timing_study(|rng| rng.uniform(2.0, 6.0)).json(&[]);
    for key in ["tool", "settings", "runs", "subjects"] {
        assert!(report.get(key).is_some(), "{key}");
    }
    assert_eq!(report["tool"]["name"], "tangle");
    let run = &report["runs"][0];
    for key in [
        "subject",
        "run",
        "scans",
        "regressors",
        "vif",
        "correlation",
        "dependencies",
        "flags",
    ] {
        assert!(run.get(key).is_some(), "{key}");
    }
    let regressor = &run["regressors"][0];
    for key in ["name", "kind", "event", "model", "column"] {
        assert!(regressor.get(key).is_some(), "{key}");
    }
    let subject = &report["subjects"][0];
    for key in ["subject", "worst_vif", "worst_regressor", "status"] {
        assert!(subject.get(key).is_some(), "{key}");
    }
    assert_eq!(report["settings"]["microtime"], 16);
    assert_eq!(report["settings"]["reference"], 0.5);
    assert_eq!(report["settings"]["high_pass"], 128.0);
}

#[test]
fn a_regressor_near_the_sum_of_two_others_is_named_by_its_dimension() {
    // Pairwise correlations stay moderate, yet one direction of the design ties all three.
    let dir = modulator_study(&["a", "b", "total"], PARTS_AND_WHOLE, |_, rng| {
        let (a, b) = (rng.uniform(-1.0, 1.0), rng.uniform(-1.0, 1.0));
        vec![
            format!("{a:.4}"),
            format!("{b:.4}"),
            format!("{:.4}", a + b + rng.uniform(-0.03, 0.03)),
        ]
    });
    let report = dir.json(&[]);
    let run = &report["runs"][0];
    assert!(run["dependencies"].as_array().unwrap().is_empty());
    let names = regressor_names(run);
    let [a, b] = [2, 3];
    let r_ab = run["correlation"][a][b].as_f64().unwrap();
    assert!(r_ab.abs() < 0.5, "a and b are nearly unrelated: {r_ab}");
    let dimension = &run["entangled_dimensions"][0];
    assert_eq!(
        dimension["regressors"],
        serde_json::json!(["parts:a", "parts:b", "whole:total"]),
        "{names:?} {dimension}"
    );
    assert!(dimension["condition_index"].as_f64().unwrap() >= 30.0);
    assert!(has_code(run, "near_dependency"));
    // Two modulators of one model as a set: the GVIF is large too.
    let parts = &run["model_sets"][0];
    assert_eq!(parts["model"], "parts");
    assert!(parts["gvif"].as_f64().unwrap() > 10.0);
    // Condition indices start at 1 and grow; proportions of each regressor sum to 1.
    let indices: Vec<f64> = run["condition_indices"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    assert!((indices[0] - 1.0).abs() < 1e-12 && indices.windows(2).all(|w| w[1] >= w[0]));
    for j in 0..names.len() {
        let total: f64 = run["variance_proportions"]
            .as_array()
            .unwrap()
            .iter()
            .map(|row| row[j].as_f64().unwrap())
            .sum();
        assert!((total - 1.0).abs() < 1e-9);
    }
}

#[test]
fn exact_dependencies_leave_conditioning_defined_for_the_rest() {
    let models = "[[model]]\nname = \"m\"\nmodulators = [ { event = \"outcome\", column = \"a\" }, { event = \"outcome\", column = \"a2\" } ]\n";
    let dir = modulator_study(&["a", "a2"], models, |_, rng| {
        let a = (rng.uniform(-1.0, 1.0) * 1e3).round() / 1e3;
        vec![format!("{a:.3}"), format!("{:.3}", 2.0 * a)]
    });
    let report = dir.json(&[]);
    let run = &report["runs"][0];
    assert_eq!(
        run["dependencies"][0]["regressors"],
        serde_json::json!(["m:a2", "m:a"])
    );
    let indices = run["condition_indices"].as_array().unwrap();
    assert_eq!(
        indices.len(),
        3,
        "the dependent column is left out of the decomposition"
    );
    assert!(run["variance_proportions"][0][3].is_null());
    assert!(run["model_sets"][0]["gvif"].is_null());
}

#[test]
fn the_demo_names_the_entangled_regressors_of_its_most_entangled_volunteer() {
    // Volunteer 04's fitted hybrid barely changes associability (η ≈ 0.002), so both
    // learners are delta rules in all but name (make_demo prints r(pe) = 1.000): in
    // the GLM with both learners their prediction errors are entangled.
    let report = demo_with_joint_glm().json(&[]);
    let runs: Vec<&Value> = report["runs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["subject"] == "04")
        .collect();
    assert_eq!(runs.len(), 3);
    for run in runs {
        let dims = run["entangled_dimensions"].as_array().unwrap();
        let pe = dims
            .iter()
            .find(|d| d["regressors"] == serde_json::json!(["delta:delta_pe", "hybrid:hybrid_pe"]));
        assert!(pe.is_some(), "{dims:?}");
        for set in run["model_sets"].as_array().unwrap() {
            assert!(set["gvif"].as_f64().unwrap() > 100.0, "{set}");
        }
        let contrast = &run["contrasts"][1];
        assert_eq!(contrast["name"], "delta:delta_pe - hybrid:hybrid_pe");
        assert!(contrast["variance_inflation"].as_f64().unwrap() > 100.0);
    }
}

#[test]
fn serial_orthogonalisation_is_shown_beside_the_design_as_written() {
    let models = "[[model]]\nname = \"a\"\nmodulators = [ { event = \"outcome\", column = \"x\" } ]\n[[model]]\nname = \"b\"\nmodulators = [ { event = \"outcome\", column = \"y\" } ]\n[[glm]]\nname = \"both\"\nmodels = [\"a\", \"b\"]\n";
    let dir = modulator_study(&["x", "y"], models, |_, rng| {
        let x = rng.uniform(-1.0, 1.0);
        vec![
            format!("{x:.4}"),
            format!("{:.4}", 0.9 * x + 0.3 * rng.uniform(-1.0, 1.0)),
        ]
    });
    let plain = dir.json(&[]);
    assert!(plain["runs"][0].get("orthogonalised").is_none());
    let report = dir.json(&["--orthogonalise", "serial"]);
    assert_eq!(report["settings"]["orthogonalisation"], "serial");
    let run = &report["runs"][0];
    let view = &run["orthogonalised"];
    assert_eq!(view["order"], serde_json::json!(["a:x", "b:y"]));
    // b:y's VIF drops, its precision (and so its test) is the same.
    assert!(view["vif"][3].as_f64().unwrap() < run["vif"][3].as_f64().unwrap() / 2.0);
    let (before, after) = (
        run["efficiency"][3].as_f64().unwrap(),
        view["efficiency"][3].as_f64().unwrap(),
    );
    assert!((before - after).abs() < 1e-9 * before);
    // The status still describes the design as written.
    assert_eq!(run["status"], plain["runs"][0]["status"]);
    let table = String::from_utf8(
        dir.check(&["--orthogonalise", "serial"])
            .success()
            .get_output()
            .stdout
            .clone(),
    )
    .unwrap();
    assert!(table.contains("VIF serial") && table.contains("About 'VIF serial'"));
}

#[test]
fn demo_claim_warnings_appear_exactly_where_the_shared_share_dominates() {
    let report = demo_with_joint_glm().json(&[]);
    let mut warned = 0;
    for run in report["runs"].as_array().unwrap() {
        for partition in run["partition"].as_array().unwrap() {
            let name = partition["regressor"].as_str().unwrap();
            let own = partition["model"].as_str().unwrap();
            let unique = partition["unique"].as_f64().unwrap();
            // Components sum to R², and R² + unique = 1.
            let total: f64 = partition["components"]
                .as_array()
                .unwrap()
                .iter()
                .map(|c| c["share"].as_f64().unwrap())
                .sum();
            assert!((total - partition["r2"].as_f64().unwrap()).abs() < 1e-9);
            assert!((partition["r2"].as_f64().unwrap() + unique - 1.0).abs() < 1e-9);
            let dominated = partition["shared_with"]
                .as_array()
                .unwrap()
                .iter()
                .any(|g| {
                    g["group"] != own
                        && g["group"] != "task"
                        && g["group"] != "nuisance"
                        && g["share"].as_f64().unwrap() > unique
                });
            let flagged = run["flags"]
                .as_array()
                .unwrap()
                .iter()
                .any(|f| f["code"] == "shared_exceeds_unique" && f["regressors"][0] == name);
            assert_eq!(
                dominated, flagged,
                "subject {} run {} {name}",
                run["subject"], run["run"]
            );
            warned += usize::from(flagged);
        }
    }
    assert!(warned > 0);
    assert!(
        report["claims_note"]
            .as_str()
            .unwrap()
            .contains("held-out data")
    );
    let cohort = report["cohort_partition"].as_array().unwrap();
    assert!(
        cohort
            .iter()
            .any(|c| c["regressor"] == "delta:delta_pe" && c["part"] == "hybrid")
    );
}

#[test]
fn signal_option_partitions_each_region_from_the_command_line() {
    let dir = timing_study(|rng| rng.uniform(2.0, 6.0));
    let study = std::fs::read_to_string(dir.path("study.toml")).unwrap();
    let scans: usize = study
        .lines()
        .find_map(|l| l.strip_prefix("scans = "))
        .unwrap()
        .parse()
        .unwrap();
    let mut rng = Lcg(11);
    let mut text = String::from("left\tright\n");
    for _ in 0..scans {
        text.push_str(&format!(
            "{}\t{}\n",
            rng.uniform(-1.0, 1.0),
            rng.uniform(-1.0, 1.0)
        ));
    }
    dir.file("roi/sub-01_run-1.tsv", &text);
    let report = dir.json(&[
        "--signal",
        "roi/sub-{subject}_run-{run}.tsv",
        "--resamples",
        "50",
    ]);
    let regions: Vec<&str> = report["runs"][0]["signal"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["region"].as_str().unwrap())
        .collect();
    assert_eq!(regions, ["left", "right"]);
    // The bootstrap is seeded per run: the same numbers with 1 and 2 threads, every time.
    let with_threads = |threads: &str| {
        std::process::Command::new(env!("CARGO_BIN_EXE_tangle"))
            .current_dir(dir.path("."))
            .env("RAYON_NUM_THREADS", threads)
            .args([
                "check",
                "study.toml",
                "--format",
                "json",
                "--resamples",
                "50",
            ])
            .args(["--signal", "roi/sub-{subject}_run-{run}.tsv"])
            .output()
            .unwrap()
            .stdout
    };
    let once = with_threads("1");
    assert!(String::from_utf8_lossy(&once).contains("\"signal\""));
    assert_eq!(once, with_threads("2"));
    assert_eq!(once, with_threads("2"));
    dir.check(&["--signal", "roi/missing-{run}.tsv"])
        .code(1)
        .stderr(predicate::str::contains(
            "missing-1.tsv: cannot read the file",
        ));
}

#[test]
fn subjects_restricts_the_check_and_unknown_labels_are_errors() {
    let report = demo_with_joint_glm().json(&["--subjects", "04,17"]);
    let subjects: Vec<&str> = report["subjects"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["subject"].as_str().unwrap())
        .collect();
    assert_eq!(subjects, ["04", "17"]);
    assert_eq!(report["runs"].as_array().unwrap().len(), 6);
    assert!(
        report["subjects"][0]["worst_condition_index"]
            .as_f64()
            .unwrap()
            > 100.0
    );
    assert_eq!(report["subjects"][0]["largest_shared"]["model"], "hybrid");
    assert_cmd::Command::cargo_bin("tangle")
        .unwrap()
        .args(["demo", "--subjects", "03,99"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "--subjects: no participant \"99\"",
        ));
}

#[test]
fn trials_after_the_run_are_not_counted_as_missing_values() {
    let dir = StudyDir::new();
    let mut trials = String::from("subject,run,cue_onset,outcome_onset,v\n");
    let mut rng = Lcg(5);
    for i in 0..30 {
        let t = 2.0 + 9.0 * i as f64;
        trials.push_str(&format!(
            "01,1,{t},{},{:.3}\n",
            t + 3.0 + (i % 4) as f64,
            rng.uniform(-1.0, 1.0)
        ));
    }
    let models =
        "[[model]]\nname = \"m\"\nmodulators = [ { event = \"outcome\", column = \"v\" } ]\n";
    // 120 scans of 2 s: the trials from 240 s on are after the run.
    dir.file("study.toml", &study_toml(2.0, 120, models))
        .file("trials.csv", &trials);
    let report = dir.json(&[]);
    let codes = codes(&report["runs"][0]);
    assert!(
        has_code(&report["runs"][0], "onset_after_run_end"),
        "{codes:?}"
    );
    assert!(!has_code(&report["runs"][0], "missing_values"), "{codes:?}");
}
