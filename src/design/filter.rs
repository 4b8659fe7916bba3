//! The drift model removed from every regressor before diagnosis: a constant plus a
//! discrete cosine basis, K = floor(2·N·TR / cutoff) columns cos(π·k·(2n+1)/(2N)),
//! k = 1..K (the DCT-II set used for high-pass filtering inside the GLM; cutoff 128 s
//! by default is common practice). Projecting these out is the same, for the betas of
//! interest, as keeping them in the model (Frisch–Waugh–Lovell theorem).

use std::collections::HashMap;
use std::sync::{Arc, Mutex};

/// Orthonormal columns spanning the constant and the slow cosines.
#[derive(Debug, Clone)]
pub struct DriftBasis {
    columns: Vec<Vec<f64>>,
}

/// Number of cosine columns for `scans` volumes, `tr` seconds and `cutoff` seconds (0 = off).
pub fn cosine_count(scans: usize, tr: f64, cutoff: f64) -> usize {
    if cutoff <= 0.0 || scans < 2 {
        return 0;
    }
    let count = (2.0 * scans as f64 * tr / cutoff).floor() as usize;
    count.min(scans - 1)
}

impl DriftBasis {
    pub fn new(scans: usize, tr: f64, cutoff: f64) -> Self {
        let n = scans as f64;
        let mut columns = vec![vec![1.0 / n.sqrt(); scans]];
        for k in 1..=cosine_count(scans, tr, cutoff) {
            let column = (0..scans)
                .map(|i| {
                    (2.0 / n).sqrt()
                        * (std::f64::consts::PI * k as f64 * (2 * i + 1) as f64 / (2.0 * n)).cos()
                })
                .collect();
            columns.push(column);
        }
        DriftBasis { columns }
    }

    /// Number of columns, the constant included.
    pub fn len(&self) -> usize {
        self.columns.len()
    }

    pub fn is_empty(&self) -> bool {
        self.columns.is_empty()
    }

    /// x minus its projection on the basis (the columns are orthonormal).
    pub fn residualise(&self, x: &[f64]) -> Vec<f64> {
        let mut residual = x.to_vec();
        for column in &self.columns {
            let weight: f64 = column.iter().zip(x).map(|(c, v)| c * v).sum();
            for (r, c) in residual.iter_mut().zip(column) {
                *r -= weight * c;
            }
        }
        residual
    }
}

/// AR(1) prewhitening, the Prais–Winsten transform (Prais & Winsten 1954) scaled by
/// 1/√(1−ρ²): the first scan is kept, every later one becomes (xₖ − ρ·xₖ₋₁)/√(1−ρ²).
/// Its matrix W has WᵀW = Σ⁻¹ for the AR(1) *correlation* matrix Σᵢⱼ = ρ^|i−j| (unit
/// marginal variance), so Gram matrices of whitened columns are XᵀΣ⁻¹X, the GLS metric,
/// and efficiencies compare across ρ. (Unscaled Prais–Winsten rows give (1 − ρ²)Σ⁻¹:
/// the same VIFs, correlations and partitions.) ρ = 0 leaves every value as it is.
pub fn whiten(x: &[f64], rho: f64) -> Vec<f64> {
    if rho == 0.0 {
        return x.to_vec();
    }
    let scale = 1.0 / (1.0 - rho * rho).sqrt();
    let mut out = Vec::with_capacity(x.len());
    for (k, &value) in x.iter().enumerate() {
        out.push(if k == 0 {
            value
        } else {
            (value - rho * x[k - 1]) * scale
        });
    }
    out
}

impl DriftBasis {
    /// The constant and cosines whitened (AR(1), coefficient `rho`), made orthonormal
    /// again: what is projected out of whitened regressors. `rho = 0` is [`DriftBasis::new`].
    pub fn whitened(scans: usize, tr: f64, cutoff: f64, rho: f64) -> Self {
        let plain = DriftBasis::new(scans, tr, cutoff);
        if rho == 0.0 {
            return plain;
        }
        // Modified Gram–Schmidt, twice, on the whitened columns (they stay independent:
        // W is invertible).
        let mut columns: Vec<Vec<f64>> = Vec::with_capacity(plain.columns.len());
        for column in &plain.columns {
            let mut v = whiten(column, rho);
            for _ in 0..2 {
                for q in &columns {
                    let weight: f64 = q.iter().zip(&v).map(|(a, b)| a * b).sum();
                    for (x, qv) in v.iter_mut().zip(q) {
                        *x -= weight * qv;
                    }
                }
            }
            let norm = v.iter().map(|x| x * x).sum::<f64>().sqrt();
            columns.push(v.iter().map(|x| x / norm).collect());
        }
        DriftBasis { columns }
    }
}

/// The drift bases of a study's runs, made once per scan count: runs of a cohort share
/// a handful of lengths, and the cosines are a tenth of a run's work. Under AR(1)
/// noise the bases are whitened (every run of a study has the same coefficient).
#[derive(Debug, Default)]
pub struct DriftBases {
    by_scans: Mutex<HashMap<usize, Arc<DriftBasis>>>,
}

/// Bases kept at most; runs of other lengths get a basis of their own.
const MAX_KEPT_BASES: usize = 256;

impl DriftBases {
    /// The basis for `scans` volumes (TR, cutoff and AR(1) coefficient `rho` are the
    /// same for every run of a study).
    pub fn get(&self, scans: usize, tr: f64, cutoff: f64, rho: f64) -> Arc<DriftBasis> {
        // A poisoned lock only means another run panicked; the map itself is intact.
        let mut kept = self
            .by_scans
            .lock()
            .unwrap_or_else(|poisoned| poisoned.into_inner());
        if let Some(basis) = kept.get(&scans) {
            return Arc::clone(basis);
        }
        let basis = Arc::new(DriftBasis::whitened(scans, tr, cutoff, rho));
        if kept.len() < MAX_KEPT_BASES {
            kept.insert(scans, Arc::clone(&basis));
        }
        basis
    }
}

/// A copy starts empty: the bases are a memo, not state.
impl Clone for DriftBases {
    fn clone(&self) -> Self {
        DriftBases::default()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn basis_matches_the_published_test_vector() {
        // N = 6, TR = 2, cutoff = 10 → K = floor(2·6·2/10) = 2; the values are
        // √(2/N)·cos(π·k·(2n+1)/(2N)), computed by hand.
        let basis = DriftBasis::new(6, 2.0, 10.0);
        assert_eq!(basis.len(), 3);
        let expected = [
            0.557678, 0.408248, 0.149429, -0.149429, -0.408248, -0.557678,
        ];
        for (got, want) in basis.columns[1].iter().zip(expected) {
            assert_abs_diff_eq!(*got, want, epsilon = 1e-6);
        }
        let expected = [0.5, 0.0, -0.5, -0.5, 0.0, 0.5];
        for (got, want) in basis.columns[2].iter().zip(expected) {
            assert_abs_diff_eq!(*got, want, epsilon = 1e-12);
        }
    }

    #[test]
    fn column_counts_follow_the_cutoff_rule() {
        // K = floor(2·N·TR/128), by hand: (scans, TR) → K at 128 s.
        for (scans, tr, k) in [
            (240, 2.0, 7),
            (300, 2.0, 9),
            (400, 1.5, 9),
            (180, 2.5, 7),
            (1000, 0.72, 11),
        ] {
            assert_eq!(cosine_count(scans, tr, 128.0), k);
        }
        assert_eq!(cosine_count(300, 2.0, 0.0), 0);
    }

    #[test]
    fn whitening_gives_the_inverse_of_the_ar1_correlation_matrix() {
        // WᵀW = Σ⁻¹ with Σᵢⱼ = ρ^|i−j|: for the AR(1) correlation matrix the inverse is
        // tridiagonal, 1/(1−ρ²) × [1, −ρ; −ρ, 1+ρ², …; …, 1] (a textbook closed form).
        let (n, rho) = (5, 0.6);
        let columns: Vec<Vec<f64>> = (0..n)
            .map(|j| {
                whiten(
                    &(0..n)
                        .map(|i| f64::from(u8::from(i == j)))
                        .collect::<Vec<_>>(),
                    rho,
                )
            })
            .collect();
        let factor = 1.0 / (1.0 - rho * rho);
        for i in 0..n {
            for j in 0..n {
                let got: f64 = columns[i].iter().zip(&columns[j]).map(|(a, b)| a * b).sum();
                let want = match (i, j) {
                    _ if i == j && (i == 0 || i == n - 1) => factor,
                    _ if i == j => factor * (1.0 + rho * rho),
                    _ if i.abs_diff(j) == 1 => -factor * rho,
                    _ => 0.0,
                };
                assert_abs_diff_eq!(got, want, epsilon = 1e-12);
            }
        }
        let basis = DriftBasis::whitened(40, 2.0, 40.0, 0.4);
        for a in &basis.columns {
            for b in &basis.columns {
                let dot: f64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
                assert!(dot.abs() < 1e-12 || (dot - 1.0).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn residuals_are_orthogonal_to_the_basis() {
        let basis = DriftBasis::new(50, 2.0, 40.0);
        let x: Vec<f64> = (0..50)
            .map(|i| (i as f64 * 0.37).sin() + i as f64 * 0.1)
            .collect();
        let r = basis.residualise(&x);
        for column in &basis.columns {
            let dot: f64 = column.iter().zip(&r).map(|(a, b)| a * b).sum();
            assert_abs_diff_eq!(dot, 0.0, epsilon = 1e-12);
        }
    }
}
