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
