//! Subset R² from blocks of a correlation (Gram) matrix, without refitting: for a target
//! t and predictors P, R²_t(P) = r_tPᵀ · R_PP⁻¹ · r_tP (all columns centred, unit length).

use nalgebra::{DMatrix, DVector};

/// R² of column `target` on the columns `predictors` of the Gram matrix `gram`.
/// `None` when R_PP is not positive definite (an exact dependency among the predictors).
pub fn r_squared(gram: &DMatrix<f64>, target: usize, predictors: &[usize]) -> Option<f64> {
    if predictors.is_empty() {
        return Some(0.0);
    }
    let block = DMatrix::from_fn(predictors.len(), predictors.len(), |i, j| {
        gram[(predictors[i], predictors[j])]
    });
    let cross = DVector::from_fn(predictors.len(), |i, _| gram[(predictors[i], target)]);
    let cholesky = block.cholesky()?;
    let solved = cholesky.solve(&cross);
    let r2 = cross.dot(&solved) / gram[(target, target)];
    r2.is_finite().then_some(r2)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn closed_form_with_two_predictors() {
        // r(y,x1) = .6, r(y,x2) = .4, r(x1,x2) = .3: R² = (r1² + r2² − 2·r1·r2·r12)/(1 − r12²)
        // = 0.376/0.91 (shared research notes, commonality.exact_correlations).
        let gram = DMatrix::from_row_slice(3, 3, &[1.0, 0.6, 0.4, 0.6, 1.0, 0.3, 0.4, 0.3, 1.0]);
        assert_abs_diff_eq!(
            r_squared(&gram, 0, &[1, 2]).unwrap(),
            0.376 / 0.91,
            epsilon = 1e-15
        );
        assert_abs_diff_eq!(r_squared(&gram, 0, &[1]).unwrap(), 0.36, epsilon = 1e-15);
        assert_eq!(r_squared(&gram, 0, &[]), Some(0.0));
    }
}
