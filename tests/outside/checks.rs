//! Checks of tangle's numbers against sources outside the project. Each reference file
//! is produced by tests/reference/make_references.py (numpy, scipy, statsmodels; CI
//! re-runs it with --check); the source of each value is named beside the check.

use std::path::{Path, PathBuf};

use crate::common::paired;
use approx::assert_relative_eq;
use serde_json::Value;
use tangle::check::read_runs;
use tangle::design::build_design;
use tangle::design::hrf::{canonical, canonical_derivative, sampled};
use tangle::diagnose::{belsley, diagnose, with_intercept};
use tangle::files::{DiskFiles, read_text};
use tangle::settings::{AnalysisOptions, RunSettings};
use tangle::study::parse_study;
use tangle::trials::Table;

/// A GLM holding both of the fixture's models: the design its references describe.
pub const JOINT: &str = "[[glm]]\nname = \"both\"\nmodels = [\"a\", \"b\"]\n";

pub fn reference(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/reference")
        .join(name)
}

pub fn json(name: &str) -> Value {
    let text = std::fs::read_to_string(reference(name)).unwrap();
    serde_json::from_str(&text).unwrap()
}

pub fn numbers(value: &Value) -> Vec<f64> {
    value
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect()
}

pub fn strings(value: &Value) -> Vec<&str> {
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
                .rows()
                .map(|row| row.cell(j).parse().unwrap())
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
    for (got, want) in paired(&result.vif, numbers(&expected["vif"]), "Longley VIFs") {
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
    let t = numbers(&unit["t"]);
    let h = numbers(&unit["h"]);
    let dh = numbers(&unit["dh_dt"]);
    for ((t, h), dh) in paired(paired(&t, h, "t and h(t)"), dh, "h(t) and dh/dt") {
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
    for (got, want) in paired(&kernel.samples, expected, "microtime kernel") {
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
    let (tr, runs) = read_runs(&DiskFiles, &study).unwrap();
    let settings = RunSettings::of_study(&study, tr, AnalysisOptions::default()).unwrap();
    let design = build_design(&settings.design, &runs[0], None).unwrap();
    let names: Vec<&str> = design.regressors.iter().map(|r| r.name.as_str()).collect();
    let expected_names = strings(&expected["regressors"]);
    assert_eq!(names, expected_names);
    for (key, columns) in [("sampled", &design.sampled), ("filtered", &design.filtered)] {
        for (column, want) in paired(columns, expected[key].as_array().unwrap(), key) {
            for (got, want) in paired(column, numbers(want), key) {
                assert_relative_eq!(*got, want, max_relative = 1e-9, epsilon = 1e-12);
            }
        }
    }
    let diagnostics = diagnose(&design);
    for (got, want) in paired(&diagnostics.vif, numbers(&expected["vif"]), "fixture VIFs") {
        assert_relative_eq!(got.unwrap(), want, max_relative = 1e-10);
    }
    for (row, want) in paired(
        &diagnostics.correlation,
        expected["correlation"].as_array().unwrap(),
        "correlation rows",
    ) {
        for (got, want) in paired(row, numbers(want), "a correlation row") {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-10, epsilon = 1e-12);
        }
    }
}

#[test]
fn every_demo_vif_matches_numpy_and_statsmodels() {
    // demo-data/ rebuilt with pandas + numpy (dense convolution) and VIFs from statsmodels'
    // variance_inflation_factor (tests/reference/make_references.py, demo_references).
    let expected = json("demo_vif.json");
    // The reference's runs hold every model in one design: the demo with that GLM.
    let dir = crate::common::demo_with_joint_glm();
    let report =
        tangle::check::check_file(&DiskFiles, &dir.path("study.toml"), Default::default()).unwrap();
    let runs = expected["runs"].as_array().unwrap();
    assert_eq!(report.runs.len(), runs.len());
    for (run, want) in paired(&report.runs, runs, "demo runs") {
        assert_eq!(run.subject, want["subject"].as_str().unwrap());
        assert_eq!(run.run, want["run"].as_str().unwrap());
        let names: Vec<&str> = run
            .regressors
            .iter()
            .map(|r| r.regressor.name.as_str())
            .collect();
        let expected_names = strings(&expected["regressors"]);
        assert_eq!(names, expected_names);
        for (got, want) in paired(&run.vif, numbers(&want["vif"]), "a demo run's VIFs") {
            assert_relative_eq!(got.unwrap(), want, max_relative = 1e-9);
        }
    }
}

fn table_of(value: &Value) -> Vec<Vec<f64>> {
    value.as_array().unwrap().iter().map(numbers).collect()
}

#[test]
fn longley_condition_indices_and_proportions_match_a_numpy_svd() {
    // Belsley, Kuh & Welsch (1980) recipe (intercept kept, unit-length columns, no centring),
    // against numpy.linalg.svd (tests/reference/make_references.py); the shared research
    // notes reproduce the same table with 60-digit arithmetic (η_7 = 43275.0436).
    let expected = &json("longley_vif.json")["bkw"];
    let (headers, columns) = longley();
    let mut design = vec![vec![1.0; 16]];
    for name in &strings(&expected["columns"])[1..] {
        design.push(columns[headers.iter().position(|h| h == name).unwrap()].clone());
    }
    let (indices, proportions) = belsley(&design).unwrap();
    let expected_indices = numbers(&expected["condition_indices"]);
    for (got, want) in paired(&indices, expected_indices, "condition indices") {
        assert_relative_eq!(*got, want, max_relative = 1e-9);
    }
    let expected_proportions = table_of(&expected["proportions"]);
    for (row, want) in paired(&proportions, expected_proportions, "proportion rows") {
        for (got, want) in paired(row, want, "a proportion row") {
            assert_relative_eq!(*got, want, epsilon = 1e-9, max_relative = 1e-7);
        }
    }
    assert_relative_eq!(indices[6], 43275.0436, max_relative = 1e-8);
}

/// Values a named source printed (tests/reference/published.json).
fn published() -> Value {
    json("published.json")
}

/// Values computed for the tests, each entry saying how (tests/reference/computed.json,
/// written and re-checked by make_references.py).
fn computed() -> Value {
    json("computed.json")
}

fn with_ones(data: &Value, names: &[&str], rows: usize) -> Vec<Vec<f64>> {
    let mut columns = vec![vec![1.0; rows]];
    columns.extend(names.iter().map(|name| numbers(&data[*name])));
    columns
}

#[test]
fn bkw_tables_match_the_published_mtcars_and_body_fat_listings() {
    // mtcars, mpg ~ disp + hp + wt + drat: R package olsrr's collinearity snapshot
    // (rsquaredacademy/olsrr tests/testthat/_snaps/collindiag.md), rows = dimensions.
    let case = &published()["bkw_mtcars"];
    let columns = with_ones(&case["data"], &["disp", "hp", "wt", "drat"], 32);
    let (indices, proportions) = belsley(&columns).unwrap();
    let published_indices = numbers(&case["published"]["condition_indices"]);
    for (got, want) in paired(&indices, published_indices, "mtcars condition indices") {
        assert!((got - want).abs() < 5e-7, "{got} vs {want}");
    }
    let published_proportions = table_of(&case["published"]["proportions"]);
    for (row, want) in paired(&proportions, published_proportions, "mtcars rows") {
        for (got, want) in paired(row, want, "an mtcars row") {
            assert!((got - want).abs() < 5e-7, "{got} vs {want}");
        }
    }
    // Body fat (Kutner et al. Table 7.1): SYSTAT listing, proportions printed with
    // rows = variables (the transpose of ours), 6 decimals.
    let case = &published()["bkw_bodyfat"];
    let columns = with_ones(&case["data"], &["triceps", "thigh", "midarm"], 20);
    let (indices, proportions) = belsley(&columns).unwrap();
    let published_indices = numbers(&case["published"]["condition_indices"]);
    for (got, want) in paired(&indices, published_indices, "body fat condition indices") {
        assert!((got - want).abs() < 5e-7, "{got} vs {want}");
    }
    let by_variable =
        table_of(&case["published"]["variance_proportions_rows_variables_cols_components"]);
    for (j, row) in by_variable.iter().enumerate() {
        for (k, want) in row.iter().enumerate() {
            assert!(
                (proportions[k][j] - want).abs() < 5e-7,
                "{} vs {want}",
                proportions[k][j]
            );
        }
    }
}

#[test]
fn gvif_matches_exact_longley_values_and_the_published_duncan_example() {
    // Longley sets, computed: Fox & Monette (1992) formula with exact rational determinants
    // (Python fractions in make_references.py, computed.json gvif_longley); a set and its
    // complement share their GVIF.
    let case = &computed()["gvif_longley"]["expected"];
    let (headers, columns) = longley();
    let predictors: Vec<Vec<f64>> = ["GNPDEFL", "GNP", "UNEMP", "ARMED", "POP", "YEAR"]
        .iter()
        .map(|name| columns[headers.iter().position(|h| h == name).unwrap()].clone())
        .collect();
    for (set, key) in [
        (vec![1, 4], "{GNP,POP}"),
        (vec![2, 3], "{UNEMP,ARMED}"),
        (vec![0, 1, 4, 5], "{GNPDEFL,GNP,POP,YEAR}"),
    ] {
        let gvif = tangle::diagnose::gvif_with_intercept(&predictors, &set).unwrap();
        assert_relative_eq!(
            gvif,
            case[key]["gvif"].as_f64().unwrap(),
            max_relative = 1e-8
        );
        let scaled = tangle::diagnose::scaled_gvif(gvif, set.len());
        assert_relative_eq!(
            scaled,
            case[key]["gvif_pow_1_over_2df"].as_f64().unwrap(),
            max_relative = 1e-8
        );
    }
    // The same sets from numpy determinants (tests/reference/make_references.py).
    let sets = &json("longley_vif.json")["gvif"]["sets"];
    for set in sets.as_object().unwrap().values() {
        let members: Vec<usize> = set["members"]
            .as_array()
            .unwrap()
            .iter()
            .map(|m| m.as_u64().unwrap() as usize)
            .collect();
        let gvif = tangle::diagnose::gvif_with_intercept(&predictors, &members).unwrap();
        assert_relative_eq!(gvif, set["gvif"].as_f64().unwrap(), max_relative = 1e-9);
    }
    // A one-column set is its VIF (statsmodels value for GNP, longley_vif.json).
    let gnp = tangle::diagnose::gvif_with_intercept(&predictors, &[1]).unwrap();
    assert_relative_eq!(
        gnp,
        numbers(&json("longley_vif.json")["vif"])[1],
        max_relative = 1e-9
    );

    // Duncan data, prestige ~ income + education + type (treatment coding, baseline "bc"):
    // printed by the R car documentation's vif() example: 2.209178, 5.297584, 5.098592 (2 df).
    let case = &published()["gvif_duncan"];
    let types: Vec<&str> = strings(&case["data"]["type"]);
    let dummy = |level: &str| {
        types
            .iter()
            .map(|t| if *t == level { 1.0 } else { 0.0 })
            .collect::<Vec<f64>>()
    };
    let columns = vec![
        numbers(&case["data"]["income"]),
        numbers(&case["data"]["education"]),
        dummy("prof"),
        dummy("wc"),
    ];
    let expected = &case["published"]["gvif_with_type"];
    for (set, key) in [
        (vec![0], "income"),
        (vec![1], "education"),
        (vec![2, 3], "type"),
    ] {
        let gvif = tangle::diagnose::gvif_with_intercept(&columns, &set).unwrap();
        let want = numbers(&expected[key]);
        assert!(
            (gvif - want[0]).abs() < 5e-7,
            "{key}: {gvif} vs {}",
            want[0]
        );
        assert!(
            (tangle::diagnose::scaled_gvif(gvif, set.len()) - want[2]).abs() < 5e-6,
            "{key}"
        );
    }
}

#[test]
fn efficiency_of_a_hand_checkable_design() {
    // X = [1, x1, x2], x1 = [1, 1, −1, −1], x2 = [1, 0, 0, −1]; efficiency as defined by
    // Dale (1999). Computed by hand: XᵀX = [[4,0,0],[0,4,2],[0,2,2]],
    // (XᵀX)⁻¹ = [[.25,0,0],[0,.5,−.5],[0,−.5,1]], so efficiency = 1/0.5 = 2 for x1,
    // 1/1 = 1 for x2, and 1/(0.5 + 1 + 2·0.5) = 0.4 for x1 − x2; r = 1/√2, VIF = 2.
    let x1 = vec![1.0, 1.0, -1.0, -1.0];
    let x2 = vec![1.0, 0.0, 0.0, -1.0];
    let result = with_intercept(&["x1", "x2"], &[x1.clone(), x2.clone()]);
    assert_relative_eq!(result.vif[0].unwrap(), 2.0, max_relative = 1e-12);
    assert_relative_eq!(result.efficiency[0].unwrap(), 2.0, max_relative = 1e-12);
    assert_relative_eq!(result.efficiency[1].unwrap(), 1.0, max_relative = 1e-12);
    let (efficiency, inflation) =
        tangle::diagnose::difference_with_intercept(&[x1, x2], 0, 1).unwrap();
    assert_relative_eq!(efficiency, 0.4, max_relative = 1e-12);
    // Uncorrelated columns of the same sizes would give 1/4 + 1/2 = 0.75: 2.5 / 0.75.
    assert_relative_eq!(inflation, 2.5 / 0.75, max_relative = 1e-12);
    // The same numbers computed by exact rational arithmetic (Python fractions in
    // make_references.py, computed.json efficiency_toy).
    let toy = &computed()["efficiency_toy"]["expected"];
    let value = |key: &str| toy["efficiency"][key].as_f64().unwrap();
    assert_relative_eq!(
        result.vif[0].unwrap(),
        toy["vif"].as_f64().unwrap(),
        max_relative = 1e-12
    );
    assert_relative_eq!(
        result.efficiency[0].unwrap(),
        value("c=[0,1,0]"),
        max_relative = 1e-12
    );
    assert_relative_eq!(
        result.efficiency[1].unwrap(),
        value("c=[0,0,1]"),
        max_relative = 1e-12
    );
    assert_relative_eq!(efficiency, value("c=[0,1,-1]"), max_relative = 1e-12);
    let uncorrelated = toy["efficiency_with_no_correlation_same_ss"]["c=[0,1,-1]"]
        .as_f64()
        .unwrap();
    assert_relative_eq!(
        inflation,
        uncorrelated / value("c=[0,1,-1]"),
        max_relative = 1e-12
    );
}

fn assert_components(got: &[tangle::diagnose::Component], want: &Value, tolerance: f64) {
    let want = want.as_array().unwrap();
    assert_eq!(got.len(), want.len());
    for (got, want) in paired(got, want, "components") {
        assert_eq!(got.groups, strings(&want["groups"]));
        let expected = want["share"].as_f64().unwrap();
        assert!(
            (got.share - expected).abs() < tolerance,
            "{:?}: {} vs {expected}",
            got.groups,
            got.share
        );
    }
}

#[test]
fn commonality_components_match_statsmodels_fits_of_every_subset() {
    // Each subset R² refitted by statsmodels OLS (tests/reference/make_references.py); ours
    // come from the triangle of one QR of the unit-length centred columns, as in a run.
    // Longley: TOTEMP on A = {GNPDEFL, GNP}, B = {UNEMP, ARMED}, C = {POP, YEAR}; the full
    // R² is the NIST certified 0.995479004577296.
    let expected = json("commonality.json");
    let (headers, columns) = longley();
    let column = |name: &str| columns[headers.iter().position(|h| h == name).unwrap()].clone();
    let groups = [
        ("A", vec![column("GNPDEFL"), column("GNP")]),
        ("B", vec![column("UNEMP"), column("ARMED")]),
        ("C", vec![column("POP"), column("YEAR")]),
    ];
    let (r2, components) =
        tangle::diagnose::partition::partition_with_intercept(&column("TOTEMP"), &groups).unwrap();
    assert_relative_eq!(r2, 0.995479004577296, max_relative = 1e-10);
    assert_components(&components, &expected["longley"]["components"], 1e-9);
    let total: f64 = components.iter().map(|c| c.share).sum();
    assert_relative_eq!(total, r2, max_relative = 1e-12);
}

#[test]
fn the_design_partition_matches_statsmodels_on_the_fixture() {
    // a:a_pe of the fixture design on groups a (its fellow modulator), b, task.
    let expected = &json("commonality.json")["design_fixture"];
    let report = crate::glms::fixture_with(JOINT);
    let run = &report.runs[0];
    let partition = run
        .partition
        .iter()
        .find(|p| p.regressor == "a:a_pe")
        .unwrap();
    assert_relative_eq!(
        partition.r2.unwrap(),
        expected["r2"].as_f64().unwrap(),
        max_relative = 1e-9
    );
    assert_components(&partition.components, &expected["components"], 1e-10);
    // Identity: unique = 1 − R² = 1/VIF.
    let vif = run.vif[3].unwrap();
    assert_relative_eq!(partition.unique.unwrap(), 1.0 / vif, max_relative = 1e-12);
    assert_relative_eq!(
        partition.unique.unwrap() + partition.r2.unwrap(),
        1.0,
        max_relative = 1e-10
    );
}

#[test]
fn model_overlap_matches_numpy_canonical_correlations() {
    // numpy QR + SVD after projecting out the task columns; shares from statsmodels OLS R².
    let expected = &json("commonality.json")["design_fixture_overlap"];
    let report = crate::glms::fixture_with(JOINT);
    let overlap = &report.runs[0].model_overlap[0];
    assert_eq!(overlap.models, ["a", "b"]);
    for (got, want) in paired(
        &overlap.canonical_correlations,
        numbers(&expected["canonical_correlations"]),
        "canonical correlations",
    ) {
        assert_relative_eq!(*got, want, max_relative = 1e-9);
    }
    for (got, want) in paired(
        &overlap.explained,
        numbers(&expected["explained"]),
        "explained shares",
    ) {
        assert_relative_eq!(*got, want, max_relative = 1e-9);
    }
}

#[test]
fn choice_probabilities_likelihood_and_fitted_temperature_match_scipy() {
    use tangle::forecast::choice::{log_likelihood, log_probability, softmax};
    use tangle::forecast::fit::fit_learner;
    use tangle::forecast::learners::{ChoiceOutcome, DeltaRule, LearnerKind};

    let expected = json("choice_likelihood.json");
    // scipy 1.17.1 scipy.special.softmax and logsumexp of beta * values.
    for case in expected["softmax"].as_array().unwrap() {
        let beta = case["inverse_temperature"].as_f64().unwrap();
        let values = numbers(&case["values"]);
        let p = softmax(beta, &values);
        let probabilities = numbers(&case["probabilities"]);
        for (i, (got, want)) in paired(&p, probabilities, "probabilities").enumerate() {
            assert!(
                (got - want).abs() <= 1e-12,
                "β = {beta}, p[{i}]: {got} vs {want}"
            );
            let lp = log_probability(beta, &values, i);
            let want_lp = numbers(&case["log_probabilities"])[i];
            assert_relative_eq!(lp, want_lp, max_relative = 1e-12, epsilon = 1e-12);
        }
    }

    // The choice log-likelihood of a fixed 20-trial, 3-option sequence under a delta
    // rule, by an independent plain Python loop (math.exp / math.log).
    let sequence = &expected["sequence"];
    let options = sequence["options"].as_u64().unwrap() as usize;
    let initial_value = sequence["initial_value"].as_f64().unwrap();
    let choices = sequence["choices"].as_array().unwrap();
    let run: Vec<ChoiceOutcome> = paired(choices, numbers(&sequence["rewards"]), "the sequence")
        .map(|(c, reward)| ChoiceOutcome {
            choice: c.as_u64().unwrap() as usize,
            reward,
        })
        .collect();
    let runs = vec![run];
    for point in expected["log_likelihood"].as_array().unwrap() {
        let alpha = point["learning_rate"].as_f64().unwrap();
        let beta = point["inverse_temperature"].as_f64().unwrap();
        let learner = DeltaRule {
            learning_rate: alpha,
        };
        let got = log_likelihood(&learner, beta, options, initial_value, &runs);
        let want = point["log_likelihood"].as_f64().unwrap();
        assert!(
            (got - want).abs() <= 1e-10,
            "α = {alpha}, β = {beta}: {got} vs {want}"
        );
    }

    // The ML inverse temperature with the learning rate fixed: scipy 1.17.1
    // minimize_scalar (bounded, xatol 1e-10) against fit_learner's grid + Nelder–Mead.
    let fitted = &expected["fitted_inverse_temperature"];
    let alpha = fitted["learning_rate"].as_f64().unwrap();
    let fit = fit_learner(
        LearnerKind::Delta,
        &[Some(alpha), None],
        options,
        initial_value,
        &runs,
    );
    let beta = fitted["inverse_temperature"].as_f64().unwrap();
    assert_eq!(fit.parameters[0], alpha);
    assert_relative_eq!(fit.parameters[1], beta, max_relative = 1e-4);
    let ll = fitted["log_likelihood"].as_f64().unwrap();
    // At the optimum log L is flat: a 1e-4 relative error in β moves it by far less.
    assert!(
        (fit.log_likelihood - ll).abs() <= 1e-8,
        "{} vs {ll}",
        fit.log_likelihood
    );
    assert_eq!(fit.at_bound, vec![false, false]);
}
