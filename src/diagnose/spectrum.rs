//! The singular value decomposition of the independent, unit-length filtered columns:
//! one decomposition from which VIFs, condition indices, variance-decomposition
//! proportions, the inverse correlation matrix and contrast variances all follow.

use nalgebra::DMatrix;

use super::{Dependency, UnitColumns};

#[derive(Debug, Clone)]
pub struct Spectrum {
    /// Positions, among the unit columns, of the independent columns analysed.
    pub kept: Vec<usize>,
    /// Singular values μ_1 ≥ μ_2 ≥ … > 0.
    pub singular_values: Vec<f64>,
    /// Right singular vectors: row = kept column, column = dimension (same order as μ).
    pub vectors: DMatrix<f64>,
}

impl Spectrum {
    /// The decomposition of the unit columns without each dependency's dependent column.
    pub(crate) fn new(unit: &UnitColumns, dependencies: &[Dependency]) -> Spectrum {
        let dependent: Vec<usize> = dependencies.iter().map(|d| d.indices[0]).collect();
        let kept: Vec<usize> = (0..unit.indices.len())
            .filter(|&a| !dependent.contains(&unit.indices[a]))
            .collect();
        let matrix = DMatrix::from_fn(unit.matrix.nrows(), kept.len(), |row, col| {
            unit.matrix[(row, kept[col])]
        });
        Spectrum::of(matrix, kept)
    }

    /// The decomposition of any matrix whose columns already have unit length.
    pub fn of(matrix: DMatrix<f64>, kept: Vec<usize>) -> Spectrum {
        let columns = matrix.ncols();
        if columns == 0 || matrix.nrows() == 0 {
            return Spectrum {
                kept,
                singular_values: Vec::new(),
                vectors: DMatrix::zeros(columns, 0),
            };
        }
        let svd = matrix.svd(false, true);
        let v_t = svd.v_t.unwrap_or_else(|| DMatrix::zeros(0, columns));
        let mut order: Vec<usize> = (0..svd.singular_values.len()).collect();
        order.sort_by(|&a, &b| svd.singular_values[b].total_cmp(&svd.singular_values[a]));
        let singular_values = order.iter().map(|&k| svd.singular_values[k]).collect();
        let vectors = DMatrix::from_fn(columns, order.len(), |row, dim| v_t[(order[dim], row)]);
        Spectrum {
            kept,
            singular_values,
            vectors,
        }
    }

    pub fn dimensions(&self) -> usize {
        self.singular_values.len()
    }

    /// True when every dimension carries variance (no exact dependency left).
    pub fn full_rank(&self) -> bool {
        self.dimensions() == self.vectors.nrows() && self.singular_values.iter().all(|&m| m > 0.0)
    }

    /// φ_ka = v_ak² / μ_k²: the part of column a's variance that dimension k carries
    /// (Belsley, Kuh & Welsch 1980, ch. 3).
    pub fn phi(&self, dimension: usize, column: usize) -> f64 {
        (self.vectors[(column, dimension)] / self.singular_values[dimension]).powi(2)
    }

    /// [R⁻¹]_ab = Σ_k v_ak·v_bk / μ_k², for positions a, b among the kept columns.
    pub fn inverse(&self, a: usize, b: usize) -> f64 {
        (0..self.dimensions())
            .map(|k| self.vectors[(a, k)] * self.vectors[(b, k)] / self.singular_values[k].powi(2))
            .sum()
    }

    /// ln det R = 2 Σ ln μ_k.
    pub fn log_determinant(&self) -> f64 {
        self.singular_values.iter().map(|m| 2.0 * m.ln()).sum()
    }
}
