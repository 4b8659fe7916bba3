//! Commonality analysis (Newton & Spurrell 1967; Mood 1969; Seibold & McPhee 1979;
//! Nimon et al. 2008): the variance of a target that a set of predictor groups explains,
//! R²(K), split into 2^k − 1 components, one per non-empty set S of groups: the part
//! explained by exactly the groups in S together,
//!
//!   C(S) = Σ_{B ⊆ S} (−1)^{|S|−|B|+1} · R²(K \ B),   R²(∅) = 0.
//!
//! For two groups this gives unique_A = R²(AB) − R²(B) and common = R²(A) + R²(B) − R²(AB).
//! The components sum to R²(K). Negative components are real (suppression) and are
//! reported as they are.

pub const MAX_GROUPS: usize = 16;

// Every model a study may declare, plus the task and nuisance groups, fits the limit.
const _: () = assert!(crate::study::MAX_MODELS + 2 <= MAX_GROUPS);

/// Components for every non-empty group set, as (bit mask, share), masks in increasing
/// order. `r2(mask)` is the R² of the union of the groups in `mask`; it is called once
/// per mask. At most [`MAX_GROUPS`] groups (2^16 subsets); beyond that nothing is returned.
pub fn components(count: usize, r2: impl Fn(u32) -> f64) -> Vec<(u32, f64)> {
    if count > MAX_GROUPS {
        return Vec::new();
    }
    let all: u32 = (1u32 << count) - 1;
    let table: Vec<f64> = (0..=all)
        .map(|mask| if mask == 0 { 0.0 } else { r2(mask) })
        .collect();
    (1..=all)
        .map(|set| {
            let size = set.count_ones() as i32;
            let mut share = 0.0;
            // Every subset B of `set`, the empty set included.
            let mut subset = set;
            loop {
                let sign = if (size - subset.count_ones() as i32 + 1) % 2 == 0 {
                    1.0
                } else {
                    -1.0
                };
                share += sign * table[(all & !subset) as usize];
                if subset == 0 {
                    break;
                }
                subset = (subset - 1) & set;
            }
            (set, share)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn two_groups_follow_the_classic_formulas() {
        // Published heuristic example (SAGE Encyclopedia of Social Science Research Methods,
        // "Commonality analysis"): r²(Y,X1) = .25, r²(Y,X2) = .5625, R² = .6875, which the
        // two-group formulas turn into U1 = .125, U2 = .4375, C = .125.
        let r2 = |mask: u32| match mask {
            1 => 0.25,
            2 => 0.5625,
            _ => 0.6875,
        };
        let parts = components(2, r2);
        assert_eq!(parts.len(), 3);
        assert_abs_diff_eq!(parts[0].1, 0.6875 - 0.5625, epsilon = 1e-15);
        assert_abs_diff_eq!(parts[1].1, 0.6875 - 0.25, epsilon = 1e-15);
        assert_abs_diff_eq!(parts[2].1, 0.25 + 0.5625 - 0.6875, epsilon = 1e-15);
    }

    #[test]
    fn three_groups_reproduce_the_longley_table_and_keep_negative_parts() {
        // TOTEMP on GNP (1), UNEMP (2), ARMED (4): subset R² and components computed with
        // statsmodels OLS (shared research notes, commonality.longley.3pred).
        let r2 = |mask: u32| match mask {
            1 => 0.9673737718541233,
            2 => 0.2525043242990451,
            4 => 0.20913005807324925,
            3 => 0.9806546258011052,
            5 => 0.9677880892900022,
            6 => 0.5608293480090889,
            _ => 0.9850995666071026,
        };
        let parts = components(3, r2);
        let expected = [
            (1, 0.4242702185980137),
            (2, 0.017311477317100477),
            (3, 0.3343878126187392),
            (4, 0.004444940805997444),
            (5, 0.30388008290404633),
            (6, -0.004030623370118613),
            (7, -0.09516434226667614),
        ];
        for ((mask, share), (want_mask, want)) in parts.iter().zip(expected) {
            assert_eq!(*mask, want_mask);
            assert_abs_diff_eq!(*share, want, epsilon = 1e-12);
        }
        let total: f64 = parts.iter().map(|p| p.1).sum();
        assert_abs_diff_eq!(total, 0.9850995666071026, epsilon = 1e-12);
    }
}
