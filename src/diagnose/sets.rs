//! Generalized VIF of a set of regressors (Fox & Monette 1992, JASA 87:178–183):
//! GVIF = det(R_set)·det(R_rest)/det(R), with R the correlation matrix. It is how much
//! the set's joint confidence region is inflated; GVIF^(1/(2·df)), df = the set's size,
//! compares sets of different sizes on the scale of a standard error (for one column it
//! is √VIF). Here each model's parametric modulators form a set.

use serde::{Deserialize, Serialize};

use super::Spectrum;
use super::triangle::Triangle;

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

/// GVIF of the kept columns at `set` (positions among `spectrum.kept`). Each block
/// determinant comes from the triangle of a QR (Π r_kk²), which keeps the digits that
/// factorising blocks of the correlation matrix would lose in badly conditioned designs.
pub(crate) fn generalized_vif(
    triangle: &Triangle,
    spectrum: &Spectrum,
    set: &[usize],
) -> Option<f64> {
    let rest: Vec<usize> = (0..spectrum.kept.len())
        .filter(|p| !set.contains(p))
        .collect();
    let log_gvif = triangle.log_determinant(set)? + triangle.log_determinant(&rest)?
        - spectrum.log_determinant();
    let gvif = log_gvif.exp();
    gvif.is_finite().then_some(gvif.max(1.0))
}

/// The scaled form GVIF^(1/(2·df)).
pub fn scaled(gvif: f64, df: usize) -> f64 {
    gvif.powf(1.0 / (2.0 * df as f64))
}
