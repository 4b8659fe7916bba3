//! Snapshots of the table, TSV and JSON outputs on the small reference fixture, so any
//! change to what users see is reviewed; and the JSON read back into typed structures.

use std::path::Path;

use serde::Deserialize;
use tangle::check::{CheckOptions, check_file};
use tangle::files::{DiskFiles, MemoryFiles};
use tangle::render;
use tangle::report::Report;

/// Relative to the package root (the folder tests run in), so no machine path enters a snapshot.
fn fixture() -> Report {
    let path = Path::new("tests/reference/design_fixture/study.toml");
    check_file(&DiskFiles, path, CheckOptions::default()).unwrap()
}

/// The fixture with one GLM holding both models: the design the reference values
/// (tests/reference/design_fixture/expected.json) describe.
fn joint_fixture() -> Report {
    let folder = Path::new("tests/reference/design_fixture");
    let study = std::fs::read_to_string(folder.join("study.toml")).unwrap()
        + "[[glm]]\nname = \"both\"\nmodels = [\"a\", \"b\"]\n";
    let trials = std::fs::read_to_string(folder.join("trials.csv")).unwrap();
    let files = MemoryFiles::default()
        .with(folder.join("joint.toml"), study)
        .with(folder.join("trials.csv"), trials);
    check_file(&files, &folder.join("joint.toml"), CheckOptions::default()).unwrap()
}

#[test]
fn table_output() {
    insta::assert_snapshot!(render::table::render(&fixture()));
}

#[test]
fn tsv_output() {
    insta::assert_snapshot!(render::tsv::render_joined(&fixture()));
}

#[test]
fn json_output() {
    insta::assert_snapshot!(render::json::render(&fixture()));
}

/// The documented JSON fields, as a script would read them.
#[derive(Deserialize)]
struct Output {
    tool: Tool,
    settings: SettingsOut,
    runs: Vec<Run>,
    subjects: Vec<Subject>,
}

#[derive(Deserialize)]
struct Tool {
    name: String,
    version: String,
}

#[derive(Deserialize)]
struct SettingsOut {
    tr: f64,
    microtime: usize,
    reference: f64,
    high_pass: f64,
    centring: bool,
}

#[derive(Deserialize)]
struct Run {
    subject: String,
    run: String,
    scans: usize,
    regressors: Vec<RegressorOut>,
    vif: Vec<Option<f64>>,
    correlation: Vec<Vec<Option<f64>>>,
    condition_indices: Vec<f64>,
    variance_proportions: Vec<Vec<Option<f64>>>,
    model_sets: Vec<ModelSetOut>,
    dependencies: Vec<DependencyOut>,
    partition: Vec<PartitionOut>,
    flags: Vec<FlagOut>,
    status: String,
}

#[derive(Deserialize)]
struct RegressorOut {
    name: String,
    kind: String,
    event: Option<String>,
    model: Option<String>,
    column: Option<String>,
}

#[derive(Deserialize)]
struct ModelSetOut {
    model: String,
    gvif: Option<f64>,
    gvif_scaled: Option<f64>,
}

#[derive(Deserialize)]
struct DependencyOut {
    regressors: Vec<String>,
    coefficients: Vec<f64>,
}

#[derive(Deserialize)]
struct PartitionOut {
    regressor: String,
    r2: Option<f64>,
    unique: Option<f64>,
    components: Vec<ComponentOut>,
}

#[derive(Deserialize)]
struct ComponentOut {
    groups: Vec<String>,
    share: f64,
}

#[derive(Deserialize)]
struct FlagOut {
    severity: String,
    code: String,
    regressors: Vec<String>,
    message: String,
}

#[derive(Deserialize)]
struct Subject {
    subject: String,
    worst_vif: Option<f64>,
    worst_regressor: Option<String>,
    status: String,
}

#[test]
fn json_reads_back_into_typed_structures() {
    let text = render::json::render(&joint_fixture());
    let output: Output = serde_json::from_str(&text).unwrap();
    assert_eq!(output.tool.name, "tangle");
    assert_eq!(output.tool.version, env!("CARGO_PKG_VERSION"));
    assert_eq!(
        (
            output.settings.tr,
            output.settings.microtime,
            output.settings.reference
        ),
        (2.0, 16, 0.5)
    );
    assert_eq!(output.settings.high_pass, 100.0);
    assert!(output.settings.centring);
    let run = &output.runs[0];
    assert_eq!(
        (run.subject.as_str(), run.run.as_str(), run.scans),
        ("01", "1", 90)
    );
    let names: Vec<&str> = run.regressors.iter().map(|r| r.name.as_str()).collect();
    assert_eq!(names, ["cue", "outcome", "a:a_value", "a:a_pe", "b:b_pe"]);
    assert_eq!(run.regressors[2].kind, "modulator");
    assert_eq!(run.regressors[2].event.as_deref(), Some("cue"));
    assert_eq!(run.regressors[2].model.as_deref(), Some("a"));
    assert_eq!(run.regressors[2].column.as_deref(), Some("a_value"));
    assert_eq!(run.vif.len(), 5);
    assert_eq!(run.correlation.len(), 5);
    assert_eq!(run.variance_proportions.len(), run.condition_indices.len());
    assert_eq!(run.model_sets[0].model, "a");
    assert!(run.model_sets[0].gvif.is_some() && run.model_sets[0].gvif_scaled.is_some());
    assert!(
        run.dependencies
            .iter()
            .all(|d| d.regressors.len() == d.coefficients.len())
    );
    let pe = run
        .partition
        .iter()
        .find(|p| p.regressor == "a:a_pe")
        .unwrap();
    let total: f64 = pe.components.iter().map(|c| c.share).sum();
    assert!((total - pe.r2.unwrap()).abs() < 1e-12 && pe.unique.is_some());
    assert!(pe.components.iter().all(|c| !c.groups.is_empty()));
    assert!(
        run.flags
            .iter()
            .all(|f| !f.code.is_empty() && !f.message.is_empty() && !f.severity.is_empty())
    );
    assert!(
        run.flags
            .iter()
            .any(|f| f.code == "shared_exceeds_unique" && f.regressors == ["a:a_pe"])
    );
    assert_eq!(run.status, "ok");
    let subject = &output.subjects[0];
    assert_eq!(subject.subject, "01");
    assert_eq!(subject.worst_regressor.as_deref(), Some("a:a_pe"));
    assert!((subject.worst_vif.unwrap() - 3.801147689120947).abs() < 1e-9);
    assert_eq!(subject.status, "ok");
}
