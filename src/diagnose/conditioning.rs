//! Condition indices and variance-decomposition proportions (Belsley, Kuh & Welsch
//! 1980, ch. 3): columns scaled to unit length, SVD X̃ = U·diag(μ)·Vᵀ, condition index
//! η_k = μ_max/μ_k, φ_kj = v_jk²/μ_k², proportion π_kj = φ_kj / Σ_k φ_kj. A dimension
//! with a high index on which two or more regressors have large proportions is a
//! near-dependency among exactly those regressors — what VIFs and pairwise correlations
//! cannot show (e.g. one regressor close to the sum of two others).
//!
//! On a run's design this is computed on the filtered columns (constant and drift
//! projected out), so the indices describe the space the GLM estimates in; the
//! published recipe keeps the intercept and does not centre, which [`belsley`] does.

use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

use super::{Spectrum, UnitColumns};

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Conditioning {
    /// One per dimension, largest singular value first (so the first is 1).
    pub condition_indices: Vec<f64>,
    /// Dimensions × regressors; `None` for regressors not in the analysed set.
    pub variance_proportions: Vec<Vec<Option<f64>>>,
}

/// Indices and proportions (dimensions × kept columns) of a decomposition.
pub fn table(spectrum: &Spectrum) -> (Vec<f64>, Vec<Vec<f64>>) {
    let dims = spectrum.dimensions();
    let Some(&largest) = spectrum.singular_values.first() else {
        return (Vec::new(), Vec::new());
    };
    let indices = spectrum
        .singular_values
        .iter()
        .map(|&m| largest / m)
        .collect();
    let mut proportions = vec![vec![0.0; spectrum.vectors.nrows()]; dims];
    for column in 0..spectrum.vectors.nrows() {
        let total: f64 = (0..dims).map(|k| spectrum.phi(k, column)).sum();
        for (k, row) in proportions.iter_mut().enumerate() {
            row[column] = spectrum.phi(k, column) / total;
        }
    }
    (indices, proportions)
}

pub(crate) fn of_design(count: usize, unit: &UnitColumns, spectrum: &Spectrum) -> Conditioning {
    let (condition_indices, proportions) = table(spectrum);
    let variance_proportions = proportions
        .iter()
        .map(|row| {
            let mut aligned = vec![None; count];
            for (position, &a) in spectrum.kept.iter().enumerate() {
                aligned[unit.indices[a]] = Some(row[position]);
            }
            aligned
        })
        .collect();
    Conditioning {
        condition_indices,
        variance_proportions,
    }
}

/// The published recipe on raw columns: each scaled to unit length, nothing centred
/// (include a column of ones for the intercept). `None` if a column is all zeros or
/// the columns are exactly dependent.
pub fn belsley(columns: &[Vec<f64>]) -> Option<(Vec<f64>, Vec<Vec<f64>>)> {
    let rows = columns.first()?.len();
    let norms: Vec<f64> = columns
        .iter()
        .map(|c| c.iter().map(|v| v * v).sum::<f64>().sqrt())
        .collect();
    if norms.contains(&0.0) {
        return None;
    }
    let matrix = DMatrix::from_fn(rows, columns.len(), |row, col| {
        columns[col][row] / norms[col]
    });
    let spectrum = Spectrum::of(matrix, (0..columns.len()).collect());
    spectrum.full_rank().then(|| table(&spectrum))
}
