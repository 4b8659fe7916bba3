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

/// The drift bases of a study's runs, made once per scan count: runs of a cohort share
/// a handful of lengths, and the cosines are a tenth of a run's work.
#[derive(Debug, Default)]
pub struct DriftBases {
    by_scans: Mutex<HashMap<usize, Arc<DriftBasis>>>,
}

/// Bases kept at most; runs of other lengths get a basis of their own.
const MAX_KEPT_BASES: usize = 256;

impl DriftBases {
    /// The basis for `scans` volumes (TR and cutoff are the same for every run of a study).
    pub fn get(&self, scans: usize, tr: f64, cutoff: f64) -> Arc<DriftBasis> {
        // A poisoned lock only means another run panicked; the map itself is intact.
        let mut kept = self
            .by_scans
            .lock()
            .unwrap_or_else(|poisoned| poisoned.into_inner());
        if let Some(basis) = kept.get(&scans) {
            return Arc::clone(basis);
        }
        let basis = Arc::new(DriftBasis::new(scans, tr, cutoff));
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
        // Table of fmri-domain.md §3: (scans, TR) → K at 128 s.
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
