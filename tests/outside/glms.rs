//! GLMs, AR(1) noise and the models' separation against independent routes
//! (tests/reference/make_references.py: statsmodels variance_inflation_factor and GLS,
//! numpy): per-GLM VIFs of the fixture and the demo, the fixture's AR(1) VIFs and GLS
//! efficiencies, the demo's first run under AR(1), the fixture's partial R².

use std::path::Path;

use approx::assert_relative_eq;
use tangle::check::{CheckOptions, check_file};
use tangle::files::MemoryFiles;
use tangle::report::{Report, RunReport};

use crate::checks::{JOINT, json, numbers, strings};
use crate::common::{demo_with_joint_glm, paired};

/// The design fixture's study with `extra` appended (e.g. a GLM or a noise model).
pub fn fixture_with(extra: &str) -> Report {
    let folder = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/design_fixture");
    let study = std::fs::read_to_string(folder.join("study.toml")).unwrap() + extra;
    let trials = std::fs::read_to_string(folder.join("trials.csv")).unwrap();
    let files = MemoryFiles::default()
        .with(folder.join("variant.toml"), study)
        .with(folder.join("trials.csv"), trials);
    check_file(
        &files,
        &folder.join("variant.toml"),
        CheckOptions::default(),
    )
    .unwrap()
}

fn names(run: &RunReport) -> Vec<&str> {
    run.regressors
        .iter()
        .map(|r| r.regressor.name.as_str())
        .collect()
}

#[test]
fn fixture_vifs_per_glm_match_statsmodels() {
    // statsmodels variance_inflation_factor on each GLM's filtered columns (glms.json).
    let expected = json("glms.json");
    let report = fixture_with("");
    let glms = expected["glms"].as_array().unwrap();
    assert_eq!(report.runs.len(), glms.len(), "one entry per GLM");
    for (run, want) in paired(&report.runs, glms, "GLMs") {
        assert_eq!(run.glm, want["glm"].as_str().unwrap());
        assert_eq!(names(run), strings(&want["regressors"]));
        for (got, want) in paired(&run.vif, numbers(&want["vif"]), "a GLM's VIFs") {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-10);
        }
    }
}

#[test]
fn fixture_ar1_vifs_and_efficiencies_match_statsmodels_gls() {
    // statsmodels GLS(sigma = toeplitz(rho^k)).cholsigmainv whitening, drift whitened and
    // projected out; efficiency 1/[(X'S^-1X)^-1]_jj with numpy's inverse of sigma.
    let expected = json("glms.json");
    let cases = expected["ar1"].as_array().unwrap();
    assert_eq!(cases.len(), 2);
    for case in cases {
        let rho = case["ar1"].as_f64().unwrap();
        let report = fixture_with(&format!("{JOINT}[noise]\nmodel = \"ar1\"\nar1 = {rho}\n"));
        let run = &report.runs[0];
        assert_eq!(names(run), strings(&expected["regressors"]));
        for (got, want) in paired(&run.vif, numbers(&case["vif"]), "AR(1) VIFs") {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
        }
        for (got, want) in paired(
            &run.efficiency,
            numbers(&case["efficiency"]),
            "GLS efficiencies",
        ) {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
        }
        assert_eq!(report.settings.noise.ar1, Some(rho));
    }
}

#[test]
fn fixture_partial_r2_matches_statsmodels_ols() {
    // (R²(j ~ C ∪ B) − R²(j ~ C)) / (1 − R²(j ~ C)), statsmodels OLS R² (glms.json).
    let expected = json("glms.json");
    let want = expected["separation"].as_array().unwrap();
    let report = fixture_with("");
    let got: Vec<(String, f64)> = report
        .separations
        .iter()
        .flat_map(|s| {
            s.separation
                .modulators
                .iter()
                .map(|m| (m.regressor.clone(), m.partial_r2.unwrap()))
        })
        .collect();
    for ((regressor, value), want) in paired(&got, want, "separated modulators") {
        assert_eq!(regressor, want["regressor"].as_str().unwrap());
        assert_relative_eq!(
            *value,
            want["partial_r2"].as_f64().unwrap(),
            max_relative = 1e-9
        );
    }
}

#[test]
fn demo_vifs_per_glm_match_statsmodels() {
    // demo-data/ rebuilt with pandas + numpy; each GLM's columns; statsmodels VIFs.
    let expected = json("demo_vif.json");
    let report = tangle::demo::check_demo(CheckOptions::default()).unwrap();
    for glm in expected["glms"].as_array().unwrap() {
        let name = glm["glm"].as_str().unwrap();
        let runs: Vec<&RunReport> = report.runs.iter().filter(|r| r.glm == name).collect();
        let want_runs = glm["runs"].as_array().unwrap();
        for (run, want) in paired(&runs, want_runs, "the demo's runs of one GLM") {
            assert_eq!(run.subject, want["subject"].as_str().unwrap());
            assert_eq!(names(run), strings(&glm["regressors"]));
            for (got, want) in paired(&run.vif, numbers(&want["vif"]), "VIFs") {
                assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
            }
        }
    }
}

#[test]
fn demo_first_run_under_ar1_matches_statsmodels_gls() {
    // Subject 01 run 1 with every model in one design; statsmodels GLS whitening
    // (demo_vif.json ar1_first_run): the onset VIF 1.11 → 1.22 (ρ 0.3) → 1.52 (ρ 0.6).
    let expected = json("demo_vif.json");
    for case in expected["ar1_first_run"].as_array().unwrap() {
        let rho = case["ar1"].as_f64().unwrap();
        let dir = demo_with_joint_glm();
        let text = std::fs::read_to_string(dir.path("study.toml")).unwrap()
            + &format!("[noise]\nmodel = \"ar1\"\nar1 = {rho}\n");
        dir.file("study.toml", &text);
        let options = CheckOptions {
            subjects: Some(vec!["01".into()]),
            ..CheckOptions::default()
        };
        let report =
            check_file(&tangle::files::DiskFiles, &dir.path("study.toml"), options).unwrap();
        let run = &report.runs[0];
        assert_eq!((run.subject.as_str(), run.run.as_str()), ("01", "1"));
        for (got, want) in paired(&run.vif, numbers(&case["vif"]), "AR(1) VIFs") {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
        }
    }
}
