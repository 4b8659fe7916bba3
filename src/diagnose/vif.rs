//! Variance inflation factors of the filtered design.
//!
//! With centred, unit-length columns U, the correlation matrix is R = UᵀU and
//! VIF_j = [R⁻¹]_jj = 1/(1 − R²_j) (e.g. Belsley, Kuh & Welsch 1980; Fox 2016). From the
//! SVD U = W·diag(μ)·Vᵀ this is Σ_k v_jk² / μ_k², which avoids forming R⁻¹ and keeps
//! digits when R is badly conditioned. Columns inside an exact dependency get `None`;
//! the others are computed on a set of independent columns that spans the same space,
//! so their VIFs stay finite and correct.

use super::{Dependency, Spectrum, UnitColumns};

pub(crate) fn variance_inflation(
    count: usize,
    unit: &UnitColumns,
    spectrum: &Spectrum,
    dependencies: &[Dependency],
) -> Vec<Option<f64>> {
    let mut vif = vec![None; count];
    for (position, &a) in spectrum.kept.iter().enumerate() {
        let index = unit.indices[a];
        if dependencies.iter().any(|d| d.indices.contains(&index)) {
            continue;
        }
        let value: f64 = (0..spectrum.dimensions())
            .map(|k| spectrum.phi(k, position))
            .sum();
        if value.is_finite() {
            vif[index] = Some(value.max(1.0));
        }
    }
    vif
}
