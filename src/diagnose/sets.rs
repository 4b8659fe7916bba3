//! Generalized VIF of a set of regressors (Fox & Monette 1992, JASA 87:178–183):
//! GVIF = det(R_set)·det(R_rest)/det(R), with R the correlation matrix. It is how much
//! the set's joint confidence region is inflated; GVIF^(1/(2·df)), df = the set's size,
//! compares sets of different sizes on the scale of a standard error (for one column it
//! is √VIF). Here each model's parametric modulators form a set.

use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

use super::{Spectrum, UnitColumns};

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelSet {
    pub model: String,
    /// The model's modulators that are in the design.
    pub regressors: Vec<String>,
    pub df: usize,
    /// `None` when a member is part of an exact dependency or none is in the design.
    pub gvif: Option<f64>,
    pub gvif_scaled: Option<f64>,
}

/// ln det of the principal sub-matrix on `positions` of R = UᵀU, U the unit columns:
/// det(U_Pᵀ U_P) = Π r_kk² for the triangle of a Householder QR of U_P, which keeps the
/// digits that forming U_Pᵀ U_P (and its Cholesky factor) would lose when U_P is badly
/// conditioned. `None` when the columns are dependent.
fn log_determinant(columns: &DMatrix<f64>, positions: &[usize]) -> Option<f64> {
    if positions.is_empty() {
        return Some(0.0);
    }
    let block = DMatrix::from_fn(columns.nrows(), positions.len(), |row, col| {
        columns[(row, positions[col])]
    });
    if block.nrows() < block.ncols() {
        return None;
    }
    let diagonal = block.qr().r().diagonal();
    let logs: Option<Vec<f64>> = diagonal
        .iter()
        .map(|d| (d.abs() > 0.0).then(|| 2.0 * d.abs().ln()))
        .collect();
    logs.map(|logs| logs.iter().sum())
}

/// GVIF of the kept columns at `set` (positions among `spectrum.kept`).
pub(crate) fn generalized_vif(
    unit: &UnitColumns,
    spectrum: &Spectrum,
    set: &[usize],
) -> Option<f64> {
    let kept = DMatrix::from_fn(unit.matrix.nrows(), spectrum.kept.len(), |row, col| {
        unit.matrix[(row, spectrum.kept[col])]
    });
    let rest: Vec<usize> = (0..spectrum.kept.len())
        .filter(|p| !set.contains(p))
        .collect();
    let log_gvif =
        log_determinant(&kept, set)? + log_determinant(&kept, &rest)? - spectrum.log_determinant();
    let gvif = log_gvif.exp();
    gvif.is_finite().then_some(gvif.max(1.0))
}

/// The scaled form GVIF^(1/(2·df)).
pub fn scaled(gvif: f64, df: usize) -> f64 {
    gvif.powf(1.0 / (2.0 * df as f64))
}
