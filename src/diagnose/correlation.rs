//! Pairwise correlations: of the filtered design's columns (what the GLM sees), and of
//! the modulators' raw trial-level values (what the models produce, before the HRF).

use serde::{Deserialize, Serialize};

use super::UnitColumns;
use crate::design::Design;

pub(crate) fn filtered_correlation(count: usize, unit: &UnitColumns) -> Vec<Vec<Option<f64>>> {
    let mut matrix = vec![vec![None; count]; count];
    let gram = unit.matrix.tr_mul(&unit.matrix);
    for (a, &i) in unit.indices.iter().enumerate() {
        for (b, &j) in unit.indices.iter().enumerate() {
            let r = if a == b {
                1.0
            } else {
                gram[(a, b)].clamp(-1.0, 1.0)
            };
            matrix[i][j] = Some(r);
        }
    }
    matrix
}

/// Pearson correlation of two modulators of the same event over the trials where both
/// have a value.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TrialCorrelation {
    pub event: String,
    pub regressors: [String; 2],
    /// `None` when fewer than 3 trials have both values or one of them does not vary.
    pub r: Option<f64>,
    pub trials: usize,
}

/// The regressor most correlated with regressor `index` (largest |r|; of equals, the
/// last) and that correlation; `None` when no other correlation is defined.
pub fn most_correlated(correlation: &[Vec<Option<f64>>], index: usize) -> Option<(usize, f64)> {
    correlation[index]
        .iter()
        .enumerate()
        .filter(|(other, _)| *other != index)
        .filter_map(|(other, r)| r.map(|r| (other, r)))
        .max_by(|a, b| a.1.abs().total_cmp(&b.1.abs()))
}
pub fn trial_correlations(design: &Design) -> Vec<TrialCorrelation> {
    let mut result = Vec::new();
    for (a, first) in design.trial_values.iter().enumerate() {
        for second in &design.trial_values[a + 1..] {
            if first.event != second.event {
                continue;
            }
            let pairs: Vec<(f64, f64)> = first
                .values
                .iter()
                .zip(&second.values)
                .filter_map(|(x, y)| Some(((*x)?, (*y)?)))
                .collect();
            result.push(TrialCorrelation {
                event: first.event.clone(),
                regressors: [
                    design.regressors[first.regressor].name.clone(),
                    design.regressors[second.regressor].name.clone(),
                ],
                r: pearson(&pairs),
                trials: pairs.len(),
            });
        }
    }
    result
}

fn pearson(pairs: &[(f64, f64)]) -> Option<f64> {
    if pairs.len() < 3 {
        return None;
    }
    let n = pairs.len() as f64;
    let (mx, my) = pairs
        .iter()
        .fold((0.0, 0.0), |(sx, sy), (x, y)| (sx + x / n, sy + y / n));
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    let denominator = (sxx * syy).sqrt();
    let scale = pairs
        .iter()
        .map(|(x, y)| x.abs().max(y.abs()))
        .fold(0.0, f64::max);
    if denominator <= crate::precision::NO_COVARIANCE * scale * scale * n || denominator == 0.0 {
        return None;
    }
    Some((sxy / denominator).clamp(-1.0, 1.0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn pearson_on_a_hand_example() {
        // x = 1..5, y = 2, 4, 5, 4, 5: r = 6 / √(10 · 6) = 0.7745967 (hand arithmetic).
        let pairs = [(1.0, 2.0), (2.0, 4.0), (3.0, 5.0), (4.0, 4.0), (5.0, 5.0)];
        assert_relative_eq!(
            pearson(&pairs).unwrap(),
            6.0 / 60f64.sqrt(),
            max_relative = 1e-12
        );
        assert_eq!(pearson(&[(1.0, 1.0), (2.0, 1.0), (3.0, 1.0)]), None);
        assert_eq!(pearson(&[(1.0, 1.0), (2.0, 2.0)]), None);
    }
}
