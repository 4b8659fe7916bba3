//! Variance inflation factors of the filtered design.
//!
//! With centred, unit-length columns U, the correlation matrix is R = UᵀU and
//! VIF_j = [R⁻¹]_jj = 1/(1 − R²_j) (e.g. Belsley, Kuh & Welsch 1980; Fox 2016). From the
//! SVD U = W·diag(μ)·Vᵀ this is Σ_k v_jk² / μ_k², which avoids forming R⁻¹ and keeps
//! digits when R is badly conditioned. Columns inside an exact dependency get `None`;
//! the others are computed on a set of independent columns that spans the same space,
//! so their VIFs stay finite and correct.

use nalgebra::DMatrix;

use super::{Dependency, UnitColumns};

pub(crate) fn variance_inflation(
    count: usize,
    unit: &UnitColumns,
    dependencies: &[Dependency],
) -> Vec<Option<f64>> {
    let mut vif = vec![None; count];
    let undefined = |index: usize| dependencies.iter().any(|d| d.indices.contains(&index));
    // Drop each dependency's dependent column: what remains is independent and spans the same space.
    let dependent: Vec<usize> = dependencies.iter().map(|d| d.indices[0]).collect();
    let kept: Vec<usize> = (0..unit.indices.len())
        .filter(|&a| !dependent.contains(&unit.indices[a]))
        .collect();
    if kept.is_empty() {
        return vif;
    }
    let matrix = DMatrix::from_fn(unit.matrix.nrows(), kept.len(), |row, col| {
        unit.matrix[(row, kept[col])]
    });
    let svd = matrix.svd(false, true);
    let Some(v_t) = svd.v_t else {
        return vif;
    };
    for (col, &a) in kept.iter().enumerate() {
        let index = unit.indices[a];
        if undefined(index) {
            continue;
        }
        let value: f64 = (0..svd.singular_values.len())
            .map(|k| (v_t[(k, col)] / svd.singular_values[k]).powi(2))
            .sum();
        if value.is_finite() {
            vif[index] = Some(value.max(1.0));
        }
    }
    vif
}
