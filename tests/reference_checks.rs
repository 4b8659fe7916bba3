//! Checks of tangle's numbers against sources outside the project. Each reference file
//! is produced by tests/reference/make_references.py (numpy, scipy, statsmodels; CI
//! re-runs it with --check); the source of each value is named beside the check.

use std::path::{Path, PathBuf};

use approx::assert_relative_eq;
use serde_json::Value;
use tangle::design::hrf::{canonical, canonical_derivative, sampled};
use tangle::design::{DesignSettings, build_design};
use tangle::diagnose::{diagnose, with_intercept};
use tangle::files::{DiskFiles, read_text};
use tangle::study::parse_study;
use tangle::trials::{ScanTable, Table, collect_runs};

fn reference(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/reference")
        .join(name)
}

fn json(name: &str) -> Value {
    let text = std::fs::read_to_string(reference(name)).unwrap();
    serde_json::from_str(&text).unwrap()
}

fn numbers(value: &Value) -> Vec<f64> {
    value
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect()
}

fn strings(value: &Value) -> Vec<&str> {
    value
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect()
}

fn longley() -> (Vec<String>, Vec<Vec<f64>>) {
    let table = Table::read(&DiskFiles, &reference("longley.csv")).unwrap();
    let columns = (0..table.headers.len())
        .map(|j| {
            table
                .rows
                .iter()
                .map(|row| row.cells[j].parse().unwrap())
                .collect()
        })
        .collect();
    (table.headers.clone(), columns)
}

#[test]
fn longley_vifs_match_statsmodels() {
    // statsmodels 0.15.0 variance_inflation_factor(add_constant(X), j, standardize=False)
    // on the Longley (1967) data; the same values are printed by Faraway (2002, ch. 9):
    // 135.5324 1788.5135 33.6189 3.5889 399.1510 758.9806.
    let expected = json("longley_vif.json");
    let (headers, columns) = longley();
    let predictors = strings(&expected["predictors"]);
    let chosen: Vec<Vec<f64>> = predictors
        .iter()
        .map(|name| columns[headers.iter().position(|h| h == name).unwrap()].clone())
        .collect();
    let result = with_intercept(&predictors, &chosen);
    assert!(result.dependencies.is_empty());
    for (got, want) in result.vif.iter().zip(numbers(&expected["vif"])) {
        // The data's raw XᵀX has condition number ≈ 1e19; 1e-9 relative is far inside
        // what the routes agree to (stats-references.md §1).
        assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
    }
    assert_relative_eq!(result.vif[1].unwrap(), 1788.5135, max_relative = 1e-7);
}

#[test]
fn hrf_samples_match_scipy_gamma() {
    // scipy.stats.gamma.pdf(t, 6) - gamma.pdf(t, 16)/6 at t = 0..32 s, and its derivative.
    let hrf = json("hrf.json");
    let unit = &hrf["unit_grid"];
    for ((t, h), dh) in numbers(&unit["t"])
        .iter()
        .zip(numbers(&unit["h"]))
        .zip(numbers(&unit["dh_dt"]))
    {
        // Absolute 1e-15 where the two gamma terms nearly cancel (zero crossing near 12 s).
        assert_relative_eq!(canonical(*t), h, max_relative = 1e-12, epsilon = 1e-15);
        assert_relative_eq!(
            canonical_derivative(*t),
            dh,
            max_relative = 1e-10,
            epsilon = 1e-15
        );
    }
    // The microtime kernel (dt = 0.125 s) divided by the sum of its samples.
    let micro = &hrf["microtime_grid"];
    let (kernel, _) = sampled(micro["dt"].as_f64().unwrap());
    let expected = numbers(&micro["h_over_sum"]);
    assert_eq!(kernel.samples.len(), expected.len());
    for (got, want) in kernel.samples.iter().zip(expected) {
        assert_relative_eq!(*got, want, max_relative = 1e-12, epsilon = 1e-15);
    }
}

#[test]
fn design_columns_match_an_independent_numpy_build() {
    // numpy: dense microtime grid, np.convolve, lstsq projection on [1, cosines]
    // (tests/reference/make_references.py), versus tangle's running-sum construction.
    let expected = json("design_fixture/expected.json");
    let path = reference("design_fixture/study.toml");
    let study = parse_study(&path, &read_text(&DiskFiles, &path).unwrap()).unwrap();
    let scans = ScanTable::load(&DiskFiles, &study.acquisition.scans).unwrap();
    let table = Table::read(&DiskFiles, &study.trials.file).unwrap();
    let runs = collect_runs(&study, &table, &scans).unwrap();
    let design = build_design(&DesignSettings::new(&study, true), &runs[0], None).unwrap();
    let names: Vec<&str> = design.regressors.iter().map(|r| r.name.as_str()).collect();
    let expected_names = strings(&expected["regressors"]);
    assert_eq!(names, expected_names);
    for (key, columns) in [("sampled", &design.sampled), ("filtered", &design.filtered)] {
        for (column, want) in columns.iter().zip(expected[key].as_array().unwrap()) {
            for (got, want) in column.iter().zip(numbers(want)) {
                assert_relative_eq!(*got, want, max_relative = 1e-9, epsilon = 1e-12);
            }
        }
    }
    let diagnostics = diagnose(&design);
    for (got, want) in diagnostics.vif.iter().zip(numbers(&expected["vif"])) {
        assert_relative_eq!(got.unwrap(), want, max_relative = 1e-10);
    }
    for (row, want) in diagnostics
        .correlation
        .iter()
        .zip(expected["correlation"].as_array().unwrap())
    {
        for (got, want) in row.iter().zip(numbers(want)) {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-10, epsilon = 1e-12);
        }
    }
}

#[test]
fn every_demo_vif_matches_numpy_and_statsmodels() {
    // demo-data/ rebuilt with pandas + numpy (dense convolution) and VIFs from statsmodels'
    // variance_inflation_factor (tests/reference/make_references.py, demo_references).
    let expected = json("demo_vif.json");
    let report = tangle::demo::check_demo(Default::default()).unwrap();
    let runs = expected["runs"].as_array().unwrap();
    assert_eq!(report.runs.len(), runs.len());
    for (run, want) in report.runs.iter().zip(runs) {
        assert_eq!(run.subject, want["subject"].as_str().unwrap());
        assert_eq!(run.run, want["run"].as_str().unwrap());
        let names: Vec<&str> = run
            .regressors
            .iter()
            .map(|r| r.regressor.name.as_str())
            .collect();
        let expected_names = strings(&expected["regressors"]);
        assert_eq!(names, expected_names);
        for (got, want) in run.vif.iter().zip(numbers(&want["vif"])) {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
        }
    }
}
