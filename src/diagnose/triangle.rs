//! Subset R² without refitting, from the triangle of one QR of the columns, which keeps
//! the digits the Gram (correlation) matrix loses in badly conditioned designs.

use nalgebra::DMatrix;

/// The R of a Householder QR of the columns, X = QR. Q has orthonormal columns, so any
/// regression among X's columns is the same regression among R's columns, in as many
/// dimensions as there are columns rather than scans; solving each one by QR again keeps
/// the error at the order of κ(X)·ε instead of the κ(X)²·ε of the normal equations
/// (Golub & Van Loan, *Matrix Computations*, 4th ed., §5.3.7–5.3.8).
pub struct Triangle(DMatrix<f64>);

/// Relative size of a diagonal of R below which predictors count as dependent.
const DEPENDENT: f64 = crate::precision::TRIANGLE_DEPENDENT;

impl Triangle {
    pub fn of(columns: &DMatrix<f64>) -> Self {
        if columns.nrows() > columns.ncols() {
            Triangle(columns.clone().qr().r())
        } else {
            Triangle(columns.clone())
        }
    }
}

impl Triangle {
    /// ln det(X_Pᵀ X_P) of the columns `positions`: Π r_kk² of a QR of R's columns
    /// there (X_Pᵀ X_P = R_Pᵀ R_P). `None` when they are dependent.
    pub fn log_determinant(&self, positions: &[usize]) -> Option<f64> {
        if positions.is_empty() {
            return Some(0.0);
        }
        if positions.len() > self.0.nrows() {
            return None;
        }
        let block = DMatrix::from_fn(self.0.nrows(), positions.len(), |i, j| {
            self.0[(i, positions[j])]
        });
        let diagonal = block.qr().r().diagonal().abs();
        (diagonal.min() > 0.0).then(|| diagonal.iter().map(|d| 2.0 * d.ln()).sum())
    }
}

impl Triangle {
    /// R² of column `target` on the columns `predictors`; `None` when the predictors are
    /// (numerically) dependent.
    pub fn r_squared(&self, target: usize, predictors: &[usize]) -> Option<f64> {
        if predictors.is_empty() {
            return Some(0.0);
        }
        let t = self.0.column(target);
        let total = t.norm_squared();
        if total == 0.0 || predictors.len() > self.0.nrows() {
            return None;
        }
        let block = DMatrix::from_fn(self.0.nrows(), predictors.len(), |i, j| {
            self.0[(i, predictors[j])]
        });
        let qr = block.qr();
        let diagonal = qr.r().diagonal().abs();
        if diagonal.min() <= DEPENDENT * diagonal.max() {
            return None;
        }
        // Qᵀt without forming Q: its first k entries are the coordinates of the fit.
        let mut rotated = t.clone_owned();
        qr.q_tr_mul(&mut rotated);
        let fitted = rotated.rows(0, predictors.len()).norm_squared();
        let r2 = fitted / total;
        r2.is_finite().then_some(r2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use nalgebra::DVector;

    /// R² by the normal equations on the Gram matrix, r_tPᵀ · R_PP⁻¹ · r_tP: the route
    /// the triangle replaces, kept here only to show the digits it loses.
    fn by_normal_equations(columns: &DMatrix<f64>, target: usize, predictors: &[usize]) -> f64 {
        let gram = columns.tr_mul(columns);
        let block = DMatrix::from_fn(predictors.len(), predictors.len(), |i, j| {
            gram[(predictors[i], predictors[j])]
        });
        let cross = DVector::from_fn(predictors.len(), |i, _| gram[(predictors[i], target)]);
        let solved = block.cholesky().unwrap().solve(&cross);
        cross.dot(&solved) / gram[(target, target)]
    }

    #[test]
    fn closed_form_with_two_predictors() {
        // r(y,x1) = .6, r(y,x2) = .4, r(x1,x2) = .3: R² = (r1² + r2² − 2·r1·r2·r12)/(1 − r12²)
        // = 0.376/0.91 (shared research notes, commonality.exact_correlations). Columns with
        // these correlations: a Cholesky factor of the correlation matrix is one set of them.
        let gram = DMatrix::from_row_slice(3, 3, &[1.0, 0.6, 0.4, 0.6, 1.0, 0.3, 0.4, 0.3, 1.0]);
        let columns = gram.clone().cholesky().unwrap().l().transpose();
        let triangle = Triangle::of(&columns);
        let two = triangle.r_squared(0, &[1, 2]).unwrap();
        assert_abs_diff_eq!(two, 0.376 / 0.91, epsilon = 1e-15);
        assert_abs_diff_eq!(triangle.r_squared(0, &[1]).unwrap(), 0.36, epsilon = 1e-15);
        assert_eq!(triangle.r_squared(0, &[]), Some(0.0));
    }

    #[test]
    fn the_triangle_keeps_digits_the_normal_equations_lose_when_nearly_collinear() {
        // x1 = u1 and x2 = (u1 + δ·u2)/√(1 + δ²) span the plane of u1, u2; y = (u2 + u3)/√2
        // has R² = 1/2 on them exactly, with r(y, x1) = 0. At δ = 1e-5 the predictors'
        // correlation matrix has condition number ~4e10, which the normal equations pay
        // in full and the triangle only as its square root.
        let delta: f64 = 1e-5;
        let norm = (1.0 + delta * delta).sqrt();
        let columns = DMatrix::from_row_slice(
            4,
            3,
            &[
                0.0,
                1.0,
                1.0 / norm,
                0.5f64.sqrt(),
                0.0,
                delta / norm,
                0.5f64.sqrt(),
                0.0,
                0.0,
                0.0,
                0.0,
                0.0,
            ],
        );
        let by_triangle = Triangle::of(&columns).r_squared(0, &[1, 2]).unwrap();
        let by_gram = by_normal_equations(&columns, 0, &[1, 2]);
        assert!((by_triangle - 0.5).abs() < 1e-10, "{by_triangle}");
        assert!(
            (by_gram - 0.5).abs() > 100.0 * (by_triangle - 0.5).abs(),
            "Gram {by_gram}, triangle {by_triangle}"
        );
    }
}
