//! Exact linear dependencies among the filtered regressors.
//!
//! Columns are taken in design order and orthogonalised against the independent ones
//! before them (modified Gram–Schmidt, done twice for stability). A unit-length column
//! whose remainder is shorter than [`crate::precision::DEPENDENCY`] is a combination of earlier
//! columns — its VIF would exceed 1/tolerance² = 1e12 — and is reported with the
//! combination found by least squares, so users see e.g. `total ≈ 1.00·a + 1.00·b`.

use nalgebra::{DMatrix, DVector};
use serde::{Deserialize, Serialize};

use super::UnitColumns;
use crate::flags::{Flag, FlagCode, Severity};
use crate::precision;

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Dependency {
    /// The dependent regressor first, then those it is a combination of.
    pub regressors: Vec<String>,
    /// Null-space coefficients in the filtered design's own units, aligned with
    /// `regressors`, scaled so the largest magnitude is 1: Σ coefficient·column ≈ 0.
    pub coefficients: Vec<f64>,
    /// Design indices of `regressors`.
    #[serde(skip)]
    pub indices: Vec<usize>,
    /// `dependent ≈ Σ weight·other`, for messages.
    #[serde(skip)]
    pub weights: Vec<f64>,
}

impl Dependency {
    pub fn expression(&self) -> String {
        let terms: Vec<String> = self.regressors[1..]
            .iter()
            .zip(&self.weights)
            .enumerate()
            .map(|(i, (name, w))| {
                let sign = match (i, *w < 0.0) {
                    (0, true) => "-",
                    (0, false) => "",
                    (_, true) => " - ",
                    (_, false) => " + ",
                };
                format!("{sign}{:.2}·{name}", w.abs())
            })
            .collect();
        format!("{} ≈ {}", self.regressors[0], terms.concat())
    }

    pub fn flag(&self) -> Flag {
        Flag::new(
            Severity::Severe,
            FlagCode::ExactDependency,
            self.regressors.clone(),
            format!(
                "exact linear dependency in the filtered design: {}; these regressors cannot be estimated separately and their VIFs are undefined",
                self.expression()
            ),
        )
    }
}

pub(crate) fn find(names: &[&str], unit: &UnitColumns) -> Vec<Dependency> {
    let count = unit.indices.len();
    let mut basis: Vec<DVector<f64>> = Vec::new();
    let mut independent: Vec<usize> = Vec::new();
    let mut dependent: Vec<usize> = Vec::new();
    for a in 0..count {
        let mut remainder = unit.matrix.column(a).into_owned();
        for _ in 0..2 {
            for q in &basis {
                let weight = q.dot(&remainder);
                remainder.axpy(-weight, q, 1.0);
            }
        }
        let length = remainder.norm();
        if length < precision::DEPENDENCY {
            dependent.push(a);
        } else {
            basis.push(remainder / length);
            independent.push(a);
        }
    }
    if dependent.is_empty() {
        return Vec::new();
    }
    let kept = DMatrix::from_fn(unit.matrix.nrows(), independent.len(), |row, col| {
        unit.matrix[(row, independent[col])]
    });
    let solver = kept.clone().svd(true, true);
    dependent
        .into_iter()
        .filter_map(|a| {
            let target = unit.matrix.column(a).into_owned();
            let unit_weights = solver.solve(&target, precision::SINGULAR_VALUE).ok()?;
            let largest = unit_weights.amax();
            let mut dependency = Dependency {
                regressors: vec![names[unit.indices[a]].to_string()],
                coefficients: vec![1.0],
                indices: vec![unit.indices[a]],
                weights: Vec::new(),
            };
            for (k, &b) in independent.iter().enumerate() {
                if unit_weights[k].abs() <= precision::NEGLIGIBLE_COEFFICIENT * largest {
                    continue;
                }
                // Back to the filtered columns' own units: f_a = Σ w_k · (n_a / n_k) · f_k.
                let weight = unit_weights[k] * unit.norms[a] / unit.norms[b];
                dependency
                    .regressors
                    .push(names[unit.indices[b]].to_string());
                dependency.indices.push(unit.indices[b]);
                dependency.weights.push(weight);
                dependency.coefficients.push(-weight);
            }
            let scale = dependency
                .coefficients
                .iter()
                .fold(0.0f64, |m, c| m.max(c.abs()));
            for c in &mut dependency.coefficients {
                *c /= scale;
            }
            Some(dependency)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use crate::diagnose::analyse_columns;
    use crate::precision::DEPENDENCY;

    /// Three centred, equally long columns: a, b and (a + b)/√2 plus `t` times a third
    /// orthogonal one c, so that the last column's unit-length remainder is t/√(1+t²).
    fn columns(t: f64) -> Vec<Vec<f64>> {
        let a = [1.0, -1.0, 1.0, -1.0, 1.0, -1.0, 1.0, -1.0];
        let b = [1.0, 1.0, -1.0, -1.0, 1.0, 1.0, -1.0, -1.0];
        let c = [1.0, 1.0, 1.0, 1.0, -1.0, -1.0, -1.0, -1.0];
        let third = (0..8)
            .map(|i| (a[i] + b[i]) / 2f64.sqrt() + t * c[i])
            .collect();
        vec![a.to_vec(), b.to_vec(), third]
    }

    #[test]
    fn the_dependency_tolerance_separates_exact_from_near_dependencies() {
        let names = ["a", "b", "sum"];
        // Remainder a tenth of the tolerance: an exact dependency, VIFs of its members null.
        let exact = analyse_columns(&names, &columns(0.1 * DEPENDENCY), &[0, 1, 2]);
        assert_eq!(exact.dependencies.len(), 1);
        assert_eq!(exact.vif[2], None);
        // Ten times the tolerance: a near-dependency with a finite (huge) VIF.
        let near = analyse_columns(&names, &columns(10.0 * DEPENDENCY), &[0, 1, 2]);
        assert!(near.dependencies.is_empty());
        let vif = near.vif[2].expect("finite");
        // VIF = 1/(1 − R²) = (1 + t²)/t² with t the remainder's coefficient.
        let t = 10.0 * DEPENDENCY;
        assert!(
            (vif / ((1.0 + t * t) / (t * t)) - 1.0).abs() < 1e-6,
            "VIF {vif}"
        );
    }
}
