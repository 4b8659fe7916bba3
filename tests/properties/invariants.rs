//! Properties that must hold for any input: VIFs are at least 1 and do not depend on
//! the units or the order of the columns; the readers never panic.

use std::path::Path;

use proptest::prelude::*;
use tangle::diagnose::with_intercept;
use tangle::study::parse_study;
use tangle::trials::Table;

fn columns() -> impl Strategy<Value = Vec<Vec<f64>>> {
    (2usize..5).prop_flat_map(|count| {
        prop::collection::vec(prop::collection::vec(-10.0f64..10.0, 12), count)
    })
}

proptest! {
    #[test]
    fn vifs_are_at_least_one_and_invariant_to_scale_and_order(columns in columns(), scale in 1e-3f64..1e3) {
        let names: Vec<String> = (0..columns.len()).map(|i| format!("x{i}")).collect();
        let names: Vec<&str> = names.iter().map(String::as_str).collect();
        let base = with_intercept(&names, &columns);
        prop_assume!(base.dependencies.is_empty() && base.vif.iter().all(|v| v.is_some_and(|v| v < 1e8)));
        for vif in &base.vif {
            prop_assert!(vif.unwrap() >= 1.0);
        }
        let mut scaled = columns.clone();
        for value in &mut scaled[0] {
            *value *= scale;
        }
        let rescaled = with_intercept(&names, &scaled);
        prop_assert_eq!(base.vif.len(), rescaled.vif.len());
        for (a, b) in base.vif.iter().zip(&rescaled.vif) {
            prop_assert!((a.unwrap() - b.unwrap()).abs() <= 1e-6 * a.unwrap());
        }
        let mut reversed = columns.clone();
        reversed.reverse();
        let reordered = with_intercept(&names, &reversed);
        prop_assert_eq!(base.vif.len(), reordered.vif.len());
        for (a, b) in base.vif.iter().zip(reordered.vif.iter().rev()) {
            prop_assert!((a.unwrap() - b.unwrap()).abs() <= 1e-6 * a.unwrap());
        }
    }

    #[test]
    fn table_reader_never_panics(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        let text = String::from_utf8_lossy(&bytes);
        let _ = Table::parse(Path::new("t.csv"), &text);
        let _ = Table::parse(Path::new("t.tsv"), &text);
    }

    #[test]
    fn study_parser_never_panics(text in "[\\[\\]a-z_=\"{}, .0-9\\n-]{0,300}") {
        let _ = parse_study(Path::new("s.toml"), &text);
    }
}

#[test]
fn an_exactly_duplicated_column_leaves_the_others_finite() {
    let a: Vec<f64> = (0..20).map(|i| (i as f64 * 0.7).sin()).collect();
    let b: Vec<f64> = (0..20).map(|i| (i as f64 * 1.3).cos()).collect();
    let c: Vec<f64> = (0..20).map(|i| ((i * i) % 7) as f64).collect();
    let result = with_intercept(&["a", "b", "a_again", "c"], &[a.clone(), b, a, c]);
    assert_eq!(result.vif[0], None);
    assert_eq!(result.vif[2], None);
    assert!(result.vif[1].is_some() && result.vif[3].is_some());
    assert_eq!(result.dependencies[0].regressors, ["a_again", "a"]);
}

proptest! {
    #[test]
    fn conditioning_is_well_formed_and_invariant_to_scale_and_order(columns in columns(), scale in 1e-3f64..1e3) {
        let names: Vec<String> = (0..columns.len()).map(|i| format!("x{i}")).collect();
        let names: Vec<&str> = names.iter().map(String::as_str).collect();
        let base = with_intercept(&names, &columns);
        prop_assume!(base.dependencies.is_empty());
        let indices = &base.conditioning.condition_indices;
        prop_assert!((indices[0] - 1.0).abs() < 1e-12);
        prop_assert!(indices.iter().all(|&i| i >= 1.0 - 1e-12));
        prop_assert!(indices.windows(2).all(|w| w[1] >= w[0] - 1e-9));
        for j in 0..columns.len() {
            let total: f64 = base.conditioning.variance_proportions.iter().map(|row| row[j].unwrap()).sum();
            prop_assert!((total - 1.0).abs() < 1e-9);
        }
        prop_assume!(indices.last().is_some_and(|&i| i < 1e4));
        let mut scaled = columns.clone();
        for value in &mut scaled[1] {
            *value *= scale;
        }
        let mut reversed = scaled.clone();
        reversed.reverse();
        let other = with_intercept(&names, &reversed);
        prop_assert_eq!(indices.len(), other.conditioning.condition_indices.len());
        for (a, b) in indices.iter().zip(&other.conditioning.condition_indices) {
            prop_assert!((a - b).abs() <= 1e-6 * a);
        }
        let count = columns.len();
        prop_assert_eq!(
            base.conditioning.variance_proportions.len(),
            other.conditioning.variance_proportions.len()
        );
        for (row_a, row_b) in base.conditioning.variance_proportions.iter().zip(&other.conditioning.variance_proportions) {
            for j in 0..count {
                prop_assert!((row_a[j].unwrap() - row_b[count - 1 - j].unwrap()).abs() < 1e-6);
            }
        }
    }
}

mod orthogonalisation {
    use super::*;
    use tangle::design::orthogonalise::serial;
    use tangle::design::{Design, build_design};
    use tangle::diagnose::diagnose;
    use tangle::settings::{AnalysisOptions, RunSettings};
    use tangle::trials::{EventTrials, ModulatorValues, RunTrials};

    const STUDY: &str = r#"
[acquisition]
tr = 2.0
scans = 160
[trials]
file = "t.csv"
[[event]]
name = "outcome"
onset = "o"
[[model]]
name = "a"
modulators = [ { event = "outcome", column = "x" } ]
[[model]]
name = "b"
modulators = [ { event = "outcome", column = "y" }, { event = "outcome", column = "z" } ]
"#;

    fn design(values: &[(f64, f64, f64)]) -> Design {
        let study = parse_study(Path::new("s.toml"), STUDY).unwrap();
        let column = |model: &str, name: &str, pick: fn(&(f64, f64, f64)) -> f64| ModulatorValues {
            model: Some(model.into()),
            column: name.into(),
            values: values.iter().map(|v| Some(pick(v))).collect(),
        };
        let run = RunTrials {
            subject: "01".into(),
            run: "1".into(),
            session: None,
            flags: Vec::new(),
            scans: 160,
            events: vec![EventTrials {
                name: "outcome".into(),
                onsets: (0..values.len()).map(|i| 3.0 + 7.3 * i as f64).collect(),
                durations: vec![0.0; values.len()],
                lines: (0..values.len()).collect(),
                missing_durations: 0,
                modulators: vec![
                    column("a", "x", |v| v.0),
                    column("b", "y", |v| v.1),
                    column("b", "z", |v| v.2),
                ],
            }],
        };
        let settings = RunSettings::of_study(&study, 2.0, AnalysisOptions::default()).unwrap();
        build_design(&settings.design, &run, None).unwrap()
    }

    /// Projection of `target` onto the span of the design's included filtered columns.
    fn fitted(design: &Design, target: &[f64]) -> Vec<f64> {
        assert_eq!(design.filtered.len(), design.included.len());
        let columns: Vec<&Vec<f64>> = design
            .filtered
            .iter()
            .zip(&design.included)
            .filter(|(_, i)| **i)
            .map(|(c, _)| c)
            .collect();
        let x = nalgebra::DMatrix::from_fn(target.len(), columns.len(), |r, c| columns[c][r]);
        let y = nalgebra::DVector::from_column_slice(target);
        let beta = x.clone().svd(true, true).solve(&y, 1e-12).unwrap();
        (x * beta).iter().copied().collect()
    }

    proptest! {
        #[test]
        fn serial_orthogonalisation_keeps_the_fitted_space_and_the_last_test(
            values in prop::collection::vec((-1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0), 20),
            mixing in 0.3f64..0.95,
        ) {
            // Make the later modulators overlap the earlier one.
            let values: Vec<(f64, f64, f64)> = values.iter().map(|&(x, y, z)| (x, mixing * x + (1.0 - mixing) * y, z)).collect();
            let written = design(&values);
            let orthogonal = serial(&written);
            let target: Vec<f64> = (0..160).map(|i| ((i * 37) % 11) as f64 - 5.0).collect();
            let (fit_written, fit_orthogonal) = (fitted(&written, &target), fitted(&orthogonal, &target));
            prop_assert_eq!(fit_written.len(), fit_orthogonal.len());
            for (a, b) in fit_written.iter().zip(fit_orthogonal) {
                prop_assert!((a - b).abs() < 1e-8);
            }
            let (before, after) = (diagnose(&written), diagnose(&orthogonal));
            prop_assume!(before.dependencies.is_empty());
            // The last modulator: same precision (its test is unchanged), smaller or equal VIF.
            let last = written.regressors.len() - 1;
            let (e0, e1) = (before.efficiency[last].unwrap(), after.efficiency[last].unwrap());
            prop_assert!((e0 - e1).abs() <= 1e-8 * e0, "{e0} vs {e1}");
            prop_assert!(after.vif[last].unwrap() <= before.vif[last].unwrap() + 1e-9);
            // The modulators are now mutually orthogonal.
            let r = after.correlation[1][2].unwrap();
            prop_assert!(r.abs() < 1e-9);
        }
    }
}

/// No reader panics on any input, and the diagnostics never give NaN or infinity.
mod robustness {
    use super::*;
    use tangle::bids::entities::BidsName;
    use tangle::bids::nifti::parse_header;
    use tangle::diagnose::{difference_with_intercept, gvif_with_intercept};
    use tangle::forecast::spec::parse_forecast;

    /// TOML-looking text built from the keys and values the readers know.
    fn tomlish() -> impl Strategy<Value = String> {
        let line = prop_oneof![
            Just("[study]".to_string()),
            Just("[acquisition]".to_string()),
            Just("[trials]".to_string()),
            Just("[[event]]".to_string()),
            Just("[[model]]".to_string()),
            Just("[nuisance]".to_string()),
            Just("[bids]".to_string()),
            Just("[thresholds]".to_string()),
            Just("[forecast]".to_string()),
            Just("[task]".to_string()),
            Just("[[learner]]".to_string()),
            Just("[learner.priors]".to_string()),
            Just("[generate]".to_string()),
            Just("[compare]".to_string()),
            Just("[[variant]]".to_string()),
            Just("[design]".to_string()),
            (
                prop::sample::select(vec![
                    "tr",
                    "scans",
                    "scans_file",
                    "microtime",
                    "reference",
                    "high_pass",
                    "file",
                    "name",
                    "onset",
                    "duration",
                    "type",
                    "type_column",
                    "modulators",
                    "columns",
                    "root",
                    "task",
                    "sessions",
                    "runs",
                    "derivatives",
                    "join_column",
                    "vif_caution",
                    "vif_severe",
                    "participants",
                    "seed",
                    "options",
                    "reward_probabilities",
                    "reversal_every",
                    "reversal_probability",
                    "trials",
                    "first_cue",
                    "cue_to_outcome",
                    "outcome_to_cue",
                    "kind",
                    "learner",
                    "weights",
                    "learning_rate",
                    "inverse_temperature",
                    "regressors",
                    "rank_by",
                    "schedule",
                    "end_after_last_outcome",
                    "subject",
                    "run",
                    "event",
                    "column",
                ]),
                prop::sample::select(vec![
                    "0",
                    "1",
                    "-1",
                    "2.0",
                    "1e308",
                    "-1e308",
                    "nan",
                    "inf",
                    "-inf",
                    "0.5",
                    "300",
                    "9223372036854775807",
                    "\"\"",
                    "\"x\"",
                    "\"..\"",
                    "\"a/b\"",
                    "\"trials.csv\"",
                    "\"delta\"",
                    "\"outcome\"",
                    "true",
                    "[]",
                    "[1, 2]",
                    "[0.8, 0.2]",
                    "[\"a\", 1]",
                    "{ beta = [2, 5] }",
                    "{ gamma = [0, 0] }",
                    "{ uniform = [1, 0] }",
                    "[ { event = \"outcome\", column = \"pe\" } ]",
                    "{ x = 1 }",
                    "1979-05-27",
                ]),
            )
                .prop_map(|(key, value)| format!("{key} = {value}")),
        ];
        prop::collection::vec(line, 0..40).prop_map(|lines| lines.join("\n"))
    }

    proptest! {
        #[test]
        fn study_and_forecast_readers_never_panic_on_bytes(bytes in prop::collection::vec(any::<u8>(), 0..600)) {
            let text = String::from_utf8_lossy(&bytes);
            let _ = parse_study(Path::new("s.toml"), &text);
            let _ = parse_forecast(Path::new("f.toml"), &text);
        }

        #[test]
        fn study_and_forecast_readers_never_panic_on_toml(text in tomlish()) {
            if let Err(err) = parse_study(Path::new("s.toml"), &text) {
                let message = err.to_string();
                prop_assert!(!message.contains("internal error"), "{message}");
                prop_assert!(message.contains("s.toml"), "{message}");
            }
            if let Err(err) = parse_forecast(Path::new("f.toml"), &text) {
                let message = err.to_string();
                prop_assert!(!message.contains("internal error"), "{message}");
                prop_assert!(message.contains("f.toml"), "{message}");
            }
        }

        #[test]
        fn table_reader_never_panics_on_table_like_text(
            cells in prop::collection::vec(
                prop::collection::vec(
                    prop::sample::select(vec![
                        "", "n/a", "N/A", "0", "-1", "1e308", "1e309", "NaN", "inf", "-inf",
                        "2.5", "2,5", "\"", "\"a,b\"", "subject", "run", "onset", "\u{feff}",
                        " ", "é", "\r", "a\tb", ";",
                    ]),
                    0..6,
                ),
                0..8,
            ),
            tabs in any::<bool>(),
        ) {
            let delimiter = if tabs { "\t" } else { "," };
            let text: String = cells.iter().map(|row| row.join(delimiter) + "\n").collect();
            let path = if tabs { "t.tsv" } else { "t.csv" };
            if let Ok(table) = Table::parse(Path::new(path), &text) {
                for row in table.rows() {
                    for column in 0..table.headers.len() {
                        if let Ok(Some(value)) = table.number(row, column) {
                            prop_assert!(value.is_finite());
                        }
                    }
                }
            }
        }

        #[test]
        fn bids_names_and_image_headers_never_panic(
            name in "[a-z0-9_.\\-]{0,60}",
            bytes in prop::collection::vec(any::<u8>(), 0..700),
        ) {
            let _ = BidsName::parse(&name);
            let _ = BidsName::parse(&String::from_utf8_lossy(&bytes));
            if let Ok(header) = parse_header(Path::new("x.nii"), &bytes) {
                prop_assert!(header.volumes >= 1);
            }
        }
    }

    /// A column of an adversarial design: random, rescaled by 1e-12 … 1e12, a copy or a
    /// near copy of an earlier column, all zero, or constant.
    #[derive(Debug, Clone)]
    enum Kind {
        Random(Vec<f64>),
        Scaled(Vec<f64>, i32),
        Copy(usize),
        NearCopy(usize, f64),
        Zero,
        Constant(f64),
    }

    fn kind(rows: usize) -> impl Strategy<Value = Kind> {
        prop_oneof![
            4 => prop::collection::vec(-10.0f64..10.0, rows).prop_map(Kind::Random),
            2 => (prop::collection::vec(-10.0f64..10.0, rows), -12i32..=12).prop_map(|(v, e)| Kind::Scaled(v, e)),
            1 => (0usize..8).prop_map(Kind::Copy),
            1 => (0usize..8, -12i32..-4).prop_map(|(j, e)| Kind::NearCopy(j, 10f64.powi(e))),
            1 => Just(Kind::Zero),
            1 => (-1e6f64..1e6).prop_map(Kind::Constant),
        ]
    }

    fn matrix(kinds: &[Kind], rows: usize) -> Vec<Vec<f64>> {
        let mut columns: Vec<Vec<f64>> = Vec::new();
        for kind in kinds {
            let column = match kind {
                Kind::Random(v) => v.clone(),
                Kind::Scaled(v, e) => v.iter().map(|x| x * 10f64.powi(*e)).collect(),
                Kind::Copy(j) if !columns.is_empty() => columns[j % columns.len()].clone(),
                Kind::NearCopy(j, eps) if !columns.is_empty() => columns[j % columns.len()]
                    .iter()
                    .enumerate()
                    .map(|(i, x)| x + eps * ((i * 7919 % 13) as f64 - 6.0))
                    .collect(),
                Kind::Constant(c) => vec![*c; rows],
                _ => vec![0.0; rows],
            };
            columns.push(column);
        }
        columns
    }

    /// Debug text of a value holds a NaN or an infinity.
    fn non_finite(text: &str) -> bool {
        text.contains("NaN")
            || [
                ": inf", "(inf", "[inf", ", inf", ": -inf", "(-inf", "[-inf", ", -inf",
            ]
            .iter()
            .any(|p| text.contains(p))
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(200))]
        #[test]
        fn column_diagnostics_are_finite_or_none(
            (rows, kinds) in (3usize..30).prop_flat_map(|rows| (Just(rows), prop::collection::vec(kind(rows), 1..7))),
        ) {
            let columns = matrix(&kinds, rows);
            let names: Vec<String> = (0..columns.len()).map(|i| format!("x{i}")).collect();
            let names: Vec<&str> = names.iter().map(String::as_str).collect();
            let result = with_intercept(&names, &columns);
            let text = format!("{result:?}");
            prop_assert!(!non_finite(&text), "{text}");
            for vif in result.vif.iter().flatten() {
                prop_assert!(*vif >= 1.0 - 1e-9, "VIF {vif}");
            }
            for row in &result.correlation {
                for r in row.iter().flatten() {
                    prop_assert!(r.abs() <= 1.0 + 1e-9, "r {r}");
                }
            }
            let all: Vec<usize> = (0..columns.len()).collect();
            if let Some(g) = gvif_with_intercept(&columns, &all[..all.len().min(2)]) {
                prop_assert!(g.is_finite() && g >= 1.0 - 1e-6, "GVIF {g}");
            }
            if columns.len() >= 2 {
                if let Some((e, inflation)) = difference_with_intercept(&columns, 0, 1) {
                    prop_assert!(e.is_finite() && inflation.is_finite(), "{e} {inflation}");
                }
            }
        }
    }
}

/// Badly conditioned designs against values known in closed form.
mod conditioning_reference {
    use tangle::diagnose::with_intercept;

    /// Two centred, orthogonal, unit-length columns of length `n`.
    fn orthonormal_pair(n: usize) -> (Vec<f64>, Vec<f64>) {
        let centre = |v: Vec<f64>| {
            let mean = v.iter().sum::<f64>() / n as f64;
            v.into_iter().map(|x| x - mean).collect::<Vec<f64>>()
        };
        let unit = |v: Vec<f64>| {
            let norm = v.iter().map(|x| x * x).sum::<f64>().sqrt();
            v.into_iter().map(|x| x / norm).collect::<Vec<f64>>()
        };
        let a = unit(centre((0..n).map(|i| (i as f64 * 0.37).cos()).collect()));
        let b = centre((0..n).map(|i| (i as f64 * 1.91).sin()).collect());
        let along: f64 = a.iter().zip(&b).map(|(x, y)| x * y).sum();
        let b = unit(b.iter().zip(&a).map(|(y, x)| y - along * x).collect());
        (a, b)
    }

    /// x₂ = x₁ + ε·z with x₁ ⟂ z, both unit length: r = 1/√(1+ε²), so
    /// VIF = 1/(1 − r²) = (1 + ε²)/ε² (exact algebra) and the condition number of the
    /// unit-scaled pair is √((1+r)/(1−r)) ≈ 2/ε. Up to 1e10 (ε = 1e-5, condition ≈ 2e5
    /// on the correlation scale, 4e10 on the Gram matrix) the VIF must be right to 1e-6;
    /// at ε = 1e-7 (VIF 1e14) the pair is an exact dependency: `None`, and named.
    #[test]
    fn near_collinear_pairs_match_the_closed_form_or_are_dependencies() {
        let (a, z) = orthonormal_pair(200);
        for epsilon in [1e-1, 1e-2, 1e-3, 1e-4, 1e-5] {
            let b: Vec<f64> = a.iter().zip(&z).map(|(x, y)| x + epsilon * y).collect();
            for scale in [1e-12, 1.0, 1e12] {
                let scaled: Vec<f64> = b.iter().map(|x| x * scale).collect();
                let result = with_intercept(&["a", "b"], &[a.clone(), scaled]);
                let expected = (1.0 + epsilon * epsilon) / (epsilon * epsilon);
                for vif in &result.vif {
                    let vif = vif.expect("a finite VIF");
                    assert!(
                        ((vif - expected) / expected).abs() < 1e-6,
                        "ε {epsilon}, scale {scale}: VIF {vif}, expected {expected}"
                    );
                }
                assert!(result.dependencies.is_empty());
            }
        }
        let b: Vec<f64> = a.iter().zip(&z).map(|(x, y)| x + 1e-7 * y).collect();
        let result = with_intercept(&["a", "b"], &[a.clone(), b]);
        assert_eq!(result.vif, [None, None]);
        assert_eq!(result.dependencies.len(), 1);
        assert_eq!(result.dependencies[0].regressors, ["b", "a"]);
    }

    /// An all-zero column and a constant one (zero after centring) take no part: their
    /// VIF is `None` and the other columns keep theirs (VIF 1 for orthogonal columns).
    #[test]
    fn zero_and_constant_columns_are_left_out_and_the_rest_is_exact() {
        let (a, z) = orthonormal_pair(50);
        let result = with_intercept(
            &["a", "zero", "z", "constant"],
            &[a, vec![0.0; 50], z, vec![3.5; 50]],
        );
        assert_eq!(result.vif[1], None);
        assert_eq!(result.vif[3], None);
        for j in [0, 2] {
            let vif = result.vif[j].unwrap();
            assert!((vif - 1.0).abs() < 1e-12, "{vif}");
        }
        assert_eq!(result.correlation[0][1], None);
    }
}

/// A set whose two columns nearly coincide, orthogonal to the rest: its GVIF is exactly 1
/// however badly conditioned the set is inside (det R = det R_set · det R_rest). With
/// δ = 1e-5 the set's correlation matrix has condition number ~4e10: determinants of
/// correlation blocks lose about that many digits' worth; the triangle of a QR keeps them.
#[test]
fn gvif_of_a_set_orthogonal_to_the_rest_is_one_even_when_the_set_is_nearly_collinear() {
    use tangle::diagnose::gvif_with_intercept;
    let n = 60;
    // Cosines of the DCT-II basis: orthogonal and zero-mean for k ≥ 1.
    let cosine = |k: usize| -> Vec<f64> {
        (0..n)
            .map(|i| (std::f64::consts::PI * k as f64 * (2 * i + 1) as f64 / (2 * n) as f64).cos())
            .collect()
    };
    let (u1, u2, u3, u4) = (cosine(1), cosine(2), cosine(3), cosine(4));
    let delta = 1e-5;
    let near: Vec<f64> = u1.iter().zip(&u2).map(|(a, b)| a + delta * b).collect();
    let other: Vec<f64> = u3.iter().zip(&u4).map(|(a, b)| a + 0.5 * b).collect();
    let columns = vec![u1, near, u3, other];
    let gvif = gvif_with_intercept(&columns, &[0, 1]).expect("defined");
    assert!((gvif - 1.0).abs() < 1e-9, "GVIF {gvif}");
}
