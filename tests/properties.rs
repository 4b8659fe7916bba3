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
        for (a, b) in base.vif.iter().zip(&rescaled.vif) {
            prop_assert!((a.unwrap() - b.unwrap()).abs() <= 1e-6 * a.unwrap());
        }
        let mut reversed = columns.clone();
        reversed.reverse();
        let reordered = with_intercept(&names, &reversed);
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
        for (a, b) in indices.iter().zip(&other.conditioning.condition_indices) {
            prop_assert!((a - b).abs() <= 1e-6 * a);
        }
        let count = columns.len();
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
    use tangle::design::{Design, DesignSettings, build_design};
    use tangle::diagnose::diagnose;
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
            model: model.into(),
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
        build_design(&DesignSettings::new(&study, true), &run, None).unwrap()
    }

    /// Projection of `target` onto the span of the design's included filtered columns.
    fn fitted(design: &Design, target: &[f64]) -> Vec<f64> {
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
            for (a, b) in fitted(&written, &target).iter().zip(fitted(&orthogonal, &target)) {
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
