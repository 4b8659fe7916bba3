//! How much two models' modulator sets overlap once the task and nuisance regressors are
//! partialled out: the canonical correlations between the two sets (Hotelling 1936),
//! and the share of each set's variance that the other set explains (the redundancy
//! index of Stewart & Love 1968: the mean, over one set's standardised columns, of their
//! R² on the other set).

use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelOverlap {
    pub models: [String; 2],
    /// Largest first; as many as the smaller set has dimensions.
    pub canonical_correlations: Vec<f64>,
    /// Share of the first model's set variance the second explains, and the reverse.
    pub explained: [f64; 2],
}

/// Relative size below which a residual direction counts as empty.
const EMPTY: f64 = crate::precision::EMPTY_DIRECTION;

/// Orthonormal basis (as columns) of the span of `matrix`'s columns.
fn basis(matrix: &DMatrix<f64>) -> DMatrix<f64> {
    if matrix.ncols() == 0 {
        return DMatrix::zeros(matrix.nrows(), 0);
    }
    let svd = matrix.clone().svd(true, false);
    let Some(u) = svd.u else {
        return DMatrix::zeros(matrix.nrows(), 0);
    };
    let largest = svd.singular_values.max();
    let keep: Vec<usize> = (0..svd.singular_values.len())
        .filter(|&k| svd.singular_values[k] > EMPTY * largest.max(f64::MIN_POSITIVE))
        .collect();
    DMatrix::from_fn(matrix.nrows(), keep.len(), |r, c| u[(r, keep[c])])
}

fn residualise(matrix: &DMatrix<f64>, controls: &DMatrix<f64>) -> DMatrix<f64> {
    matrix - controls * controls.tr_mul(matrix)
}

fn columns_of(matrix: &DMatrix<f64>, which: &[usize]) -> DMatrix<f64> {
    DMatrix::from_fn(matrix.nrows(), which.len(), |r, c| matrix[(r, which[c])])
}

/// Mean over `set`'s residual columns (each scaled to unit length) of their R² on `other`.
fn explained_by(set: &DMatrix<f64>, other: &DMatrix<f64>) -> f64 {
    let mut total = 0.0;
    let mut count = 0;
    for column in set.column_iter() {
        let norm = column.norm();
        if norm <= EMPTY {
            continue;
        }
        total += (other.tr_mul(&column) / norm).norm_squared();
        count += 1;
    }
    if count == 0 {
        0.0
    } else {
        total / count as f64
    }
}

/// Canonical correlations and shares explained between the columns `a` and `b` of
/// `unit` after projecting out the columns `controls`.
pub fn overlap(
    unit: &DMatrix<f64>,
    a: &[usize],
    b: &[usize],
    controls: &[usize],
) -> (Vec<f64>, [f64; 2]) {
    let mut pairs = overlaps(unit, &[a, b], controls);
    pairs.remove(0)
}

/// [`overlap`] of every pair of `sets` (first with second, first with third, …, second
/// with third, …), the controls' basis and each set's residual basis made once.
pub fn overlaps(
    unit: &DMatrix<f64>,
    sets: &[&[usize]],
    controls: &[usize],
) -> Vec<(Vec<f64>, [f64; 2])> {
    let controls = basis(&columns_of(unit, controls));
    let residuals: Vec<DMatrix<f64>> = sets
        .iter()
        .map(|set| residualise(&columns_of(unit, set), &controls))
        .collect();
    let bases: Vec<DMatrix<f64>> = residuals.iter().map(basis).collect();
    let mut pairs = Vec::new();
    for i in 0..sets.len() {
        for j in i + 1..sets.len() {
            pairs.push(pair((&residuals[i], &bases[i]), (&residuals[j], &bases[j])));
        }
    }
    pairs
}

fn pair(
    (set_a, basis_a): (&DMatrix<f64>, &DMatrix<f64>),
    (set_b, basis_b): (&DMatrix<f64>, &DMatrix<f64>),
) -> (Vec<f64>, [f64; 2]) {
    let cross = basis_a.tr_mul(basis_b);
    let mut correlations: Vec<f64> = if cross.nrows() == 0 || cross.ncols() == 0 {
        Vec::new()
    } else {
        cross
            .singular_values()
            .iter()
            .map(|s| s.clamp(0.0, 1.0))
            .collect()
    };
    correlations.sort_by(|x, y| y.total_cmp(x));
    (
        correlations,
        [explained_by(set_a, basis_b), explained_by(set_b, basis_a)],
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn single_columns_give_their_partial_correlation() {
        // a = c + e1, b = c + e1 + e2 with orthogonal unit c, e1, e2 (6 rows): after
        // partialling out c, a ∝ e1 and b ∝ e1 + e2, so r = 1/√2 and each explains r² = 1/2.
        let c = [1.0, 0.0, 0.0, 0.0, 0.0, 0.0];
        let e1 = [0.0, 1.0, 0.0, 0.0, 0.0, 0.0];
        let e2 = [0.0, 0.0, 1.0, 0.0, 0.0, 0.0];
        let unit = DMatrix::from_fn(6, 3, |r, col| match col {
            0 => c[r],
            1 => c[r] + e1[r],
            _ => c[r] + e1[r] + e2[r],
        });
        let (correlations, explained) = overlap(&unit, &[1], &[2], &[0]);
        assert_abs_diff_eq!(correlations[0], 0.5f64.sqrt(), epsilon = 1e-12);
        assert_abs_diff_eq!(explained[0], 0.5, epsilon = 1e-12);
        assert_abs_diff_eq!(explained[1], 0.5, epsilon = 1e-12);
    }
}
