//! Precision of contrasts. For a contrast c on the filtered design X, Var(cᵀβ̂) = σ²·cᵀ(XᵀX)⁻¹c,
//! and efficiency = 1/(cᵀ(XᵀX)⁻¹c) (Dale 1999; σ² dropped, so only comparisons within a
//! design and its variants are meaningful). With X = U·D, D the column norms and U the
//! unit columns, (XᵀX)⁻¹ = D⁻¹R⁻¹D⁻¹: a regressor's own efficiency is ‖x_j‖²/VIF_j.
//!
//! Users often test one model's modulator against the corresponding one of another
//! model (e.g. model A's prediction error − model B's). Its variance inflation is
//! cᵀ(XᵀX)⁻¹c divided by 1/‖x_a‖² + 1/‖x_b‖², the variance the same contrast would have if
//! the two regressors were uncorrelated with each other and with everything else.

use serde::{Deserialize, Serialize};

use super::{Spectrum, UnitColumns};

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Contrast {
    /// e.g. "delta:delta_pe - hybrid:hybrid_pe".
    pub name: String,
    pub regressors: [String; 2],
    pub efficiency: Option<f64>,
    /// Variance of the difference relative to uncorrelated regressors of the same size.
    pub variance_inflation: Option<f64>,
}

/// Own-contrast efficiency of every kept column (aligned with the design).
pub(crate) fn own(
    count: usize,
    unit: &UnitColumns,
    spectrum: &Spectrum,
    vif: &[Option<f64>],
) -> Vec<Option<f64>> {
    let mut efficiency = vec![None; count];
    for &a in &spectrum.kept {
        let index = unit.indices[a];
        efficiency[index] = vif[index].map(|v| unit.norms[a].powi(2) / v);
    }
    efficiency
}

/// Efficiency and variance inflation of x_a − x_b, for positions a, b among the unit columns.
/// `None` unless both are among the independent columns.
pub(crate) fn difference(
    unit: &UnitColumns,
    spectrum: &Spectrum,
    a: usize,
    b: usize,
) -> Option<(f64, f64)> {
    let pa = spectrum.kept.iter().position(|&k| k == a)?;
    let pb = spectrum.kept.iter().position(|&k| k == b)?;
    let (na, nb) = (unit.norms[a], unit.norms[b]);
    let variance = spectrum.inverse(pa, pa) / (na * na) + spectrum.inverse(pb, pb) / (nb * nb)
        - 2.0 * spectrum.inverse(pa, pb) / (na * nb);
    let uncorrelated = 1.0 / (na * na) + 1.0 / (nb * nb);
    (variance > 0.0 && variance.is_finite())
        .then(|| (1.0 / variance, (variance / uncorrelated).max(0.0)))
}
