//! The GLMs a lab fits: one per model by default, declared ones, `--glm`, task
//! modulators in every GLM, orthogonalisation within events, and notes on how a table's
//! columns are read.

use serde_json::Value;

use crate::common::{Lcg, StudyDir, trials_csv};

/// Two models on the outcome (x, y) and a task modulator (reward) of the outcome.
fn study(glms: &str, values: impl FnMut(usize, &mut Lcg) -> Vec<String>) -> StudyDir {
    let (trials, end) = trials_csv(
        &["01"],
        48,
        |rng| rng.uniform(2.0, 6.0),
        &["x", "y", "reward"],
        values,
    );
    let scans = (end / 2.0).ceil() as usize + 10;
    let text = format!(
        r#"[study]
name = "GLM fixture (invented)"
[acquisition]
tr = 2.0
scans = {scans}
[trials]
file = "trials.csv"
[[event]]
name = "cue"
onset = "cue_onset"
[[event]]
name = "outcome"
onset = "outcome_onset"
modulators = ["reward"]
[[model]]
name = "a"
modulators = [ {{ event = "outcome", column = "x" }} ]
[[model]]
name = "b"
modulators = [ {{ event = "outcome", column = "y" }} ]
{glms}"#
    );
    let dir = StudyDir::new();
    dir.file("study.toml", &text).file("trials.csv", &trials);
    dir
}

/// x, y = 0.8·x + noise, reward = 0.5·x + noise: values with some overlap.
fn related(_: usize, rng: &mut Lcg) -> Vec<String> {
    let x = rng.uniform(-1.0, 1.0);
    vec![
        format!("{x:.4}"),
        format!("{:.4}", 0.8 * x + 0.6 * rng.uniform(-1.0, 1.0)),
        format!("{:.4}", 0.5 * x + rng.uniform(-1.0, 1.0)),
    ]
}

fn names(run: &Value) -> Vec<&str> {
    run["regressors"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["name"].as_str().unwrap())
        .collect()
}

fn vif(run: &Value, name: &str) -> f64 {
    let index = names(run).iter().position(|n| *n == name).unwrap();
    run["vif"][index].as_f64().unwrap()
}

#[test]
fn one_glm_per_model_by_default_each_with_the_task_modulator() {
    let report = study("", related).json(&[]);
    let runs = report["runs"].as_array().unwrap();
    assert_eq!(runs.len(), 2, "one run × two GLMs");
    assert_eq!(runs[0]["glm"], "a");
    assert_eq!(runs[1]["glm"], "b");
    // The task modulator is in every GLM, named event:column, with no model.
    assert_eq!(names(&runs[0]), ["cue", "outcome", "outcome:reward", "a:x"]);
    assert_eq!(names(&runs[1]), ["cue", "outcome", "outcome:reward", "b:y"]);
    let reward = &runs[0]["regressors"][2];
    assert_eq!(reward["kind"], "modulator");
    assert!(reward["model"].is_null());
    // In the partition, the reward belongs to the task group.
    let x = &runs[0]["partition"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["regressor"] == "a:x")
        .unwrap()["shared_with"];
    let groups: Vec<&str> = x
        .as_array()
        .unwrap()
        .iter()
        .map(|g| g["group"].as_str().unwrap())
        .collect();
    // (Its model has no other modulator, so the only other group is the task's.)
    assert_eq!(groups, ["task"]);
    // The separation of the two models is its own section, in the design with both.
    let separations = report["separations"].as_array().unwrap();
    assert_eq!(separations.len(), 2, "a against b, b against a");
    assert_eq!(separations[0]["models"], serde_json::json!(["a", "b"]));
    let a_on_b = separations[0]["modulators"][0]["partial_r2"]
        .as_f64()
        .unwrap();
    assert!(a_on_b > 0.2 && a_on_b < 1.0, "{a_on_b}");
    assert_eq!(separations[0]["modulators"][0]["corresponding"], "b:y");
    assert!(report["subjects"][0]["worst_glm"].as_str().is_some());
}

#[test]
fn a_declared_glm_with_both_models_is_the_design_every_model_shares() {
    let joint = study(
        "[[glm]]\nname = \"both\"\nmodels = [\"b\", \"a\"]\n",
        related,
    )
    .json(&[]);
    let runs = joint["runs"].as_array().unwrap();
    assert_eq!(runs.len(), 1);
    // Columns keep the study's order of models whatever order the GLM lists.
    assert_eq!(
        names(&runs[0]),
        ["cue", "outcome", "outcome:reward", "a:x", "b:y"]
    );
    // Its partition is the one reported as the models' shares.
    let shares = joint["model_shares"].as_array().unwrap();
    let in_run = runs[0]["partition"].as_array().unwrap();
    assert_eq!(shares.len(), in_run.len());
    for (share, partition) in shares.iter().zip(in_run) {
        assert_eq!(share["regressor"], partition["regressor"]);
        assert_eq!(share["unique"], partition["unique"]);
    }
    // A model's own GLM has lower VIFs than the joint one (the other model is absent).
    let own = study("", related).json(&[]);
    assert!(vif(&own["runs"][0], "a:x") < vif(&runs[0], "a:x"));
}

#[test]
fn the_glm_option_checks_only_the_glms_named() {
    let dir = study("", related);
    let report = dir.json(&["--glm", "b"]);
    let glms: Vec<&str> = report["runs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["glm"].as_str().unwrap())
        .collect();
    assert_eq!(glms, ["b"]);
    assert_eq!(report["settings"]["glms"].as_array().unwrap().len(), 1);
}

#[test]
fn within_event_orthogonalisation_leaves_an_orthogonal_modulator_alone_and_absorbs_a_copy() {
    // x, y and reward mutually orthogonal at trial level (±1 patterns of periods 2, 4
    // and 8 over 48 trials, each summing to 0): orthogonalising within the event changes
    // no modulator, so every number of the view is the design's as written.
    let orthogonal = |trial: usize, _: &mut Lcg| {
        let sign = |period: usize| if (trial / period) % 2 == 0 { "1" } else { "-1" };
        vec![sign(1).into(), sign(2).into(), sign(4).into()]
    };
    let joint = "[[glm]]\nname = \"both\"\nmodels = [\"a\", \"b\"]\n";
    let dir = study(joint, orthogonal);
    let report = dir.json(&["--orthogonalise", "within-event"]);
    assert_eq!(report["settings"]["orthogonalisation"], "within-event");
    let run = &report["runs"][0];
    let view = &run["orthogonalised"];
    assert_eq!(view["method"], "within-event");
    assert_eq!(
        view["order"],
        serde_json::json!(["outcome:reward", "a:x", "b:y"])
    );
    for name in ["outcome:reward", "a:x", "b:y"] {
        let index = names(run).iter().position(|n| *n == name).unwrap();
        let (before, after) = (
            run["vif"][index].as_f64().unwrap(),
            view["vif"][index].as_f64().unwrap(),
        );
        assert!(
            (before - after).abs() < 1e-9 * before,
            "{name}: {before} {after}"
        );
    }
    // A modulator that copies an earlier one on its event is absorbed, with a flag.
    let copy = |_: usize, rng: &mut Lcg| {
        let x = rng.uniform(-1.0, 1.0);
        vec![
            format!("{x:.4}"),
            format!("{x:.4}"),
            format!("{:.4}", rng.uniform(-1.0, 1.0)),
        ]
    };
    let report = study(joint, copy).json(&["--orthogonalise", "within-event"]);
    let flags = report["runs"][0]["flags"].as_array().unwrap();
    assert!(
        flags
            .iter()
            .any(|f| f["code"] == "absorbed_by_orthogonalisation" && f["regressors"][0] == "b:y"),
        "{flags:?}"
    );
}

#[test]
fn a_long_form_table_with_an_unused_duration_column_gets_a_note() {
    let dir = StudyDir::new();
    let mut rows = String::from("subject,run,trial_type,onset,duration\n");
    let mut t = 2.0;
    for _ in 0..20 {
        rows.push_str(&format!("01,1,cue,{t},0.5\n01,1,outcome,{},1.0\n", t + 3.0));
        t += 10.0;
    }
    let study = r#"[study]
name = "long form (invented)"
[acquisition]
tr = 2.0
scans = 110
[trials]
file = "events.csv"
[[event]]
name = "cue"
type_column = "trial_type"
type = "cue"
[[event]]
name = "outcome"
type_column = "trial_type"
type = "outcome"
"#;
    dir.file("study.toml", study).file("events.csv", &rows);
    let report = dir.json(&[]);
    let flags = report["runs"][0]["flags"].as_array().unwrap();
    let note = flags
        .iter()
        .find(|f| f["code"] == "unused_duration_column")
        .expect("a note");
    assert_eq!(note["severity"], "note");
    assert_eq!(note["regressors"], serde_json::json!(["cue", "outcome"]));
    assert!(
        note["message"]
            .as_str()
            .unwrap()
            .contains("duration = \"duration\"")
    );
}
