//! Medians, quantiles and percentiles: one home, each convention a named function.
//!
//! - [`median`]: the middle value, or the mean of the two middle values.
//! - [`type8`]: Hyndman & Fan's (1996, *Am. Stat.* 50:361–365) type 8 quantile,
//!   approximately median-unbiased whatever the distribution; the forecast's spreads use
//!   it (numpy's `method="median_unbiased"`).
//! - [`nearest_rank`]: the smallest value with at least a share p of the values at or
//!   below it (the measured signals' bootstrap intervals).
//!
//! Every function takes values sorted in ascending order.

/// Median of sorted values; `None` when there are none.
pub fn median(sorted: &[f64]) -> Option<f64> {
    let n = sorted.len();
    match n {
        0 => None,
        _ if n % 2 == 1 => Some(sorted[n / 2]),
        _ => Some((sorted[n / 2 - 1] + sorted[n / 2]) / 2.0),
    }
}

/// The type 8 quantile at `tau` (0 ≤ tau ≤ 1) of sorted values: with
/// h = (n + 1/3)·tau + 1/3, the order statistic x₍ₕ₎ when h is whole, otherwise
/// x₍⌊h⌋₎ + (h − ⌊h⌋)(x₍⌊h⌋₊₁₎ − x₍⌊h⌋₎), clamped to the smallest and largest value.
/// Values may be +∞ (undefined values sorted above every defined one): a quantile that
/// falls on a finite order statistic is that statistic, never ∞·0. `None` when there are
/// no values or `tau` is outside [0, 1].
pub fn type8(sorted: &[f64], tau: f64) -> Option<f64> {
    let n = sorted.len();
    if n == 0 || !(0.0..=1.0).contains(&tau) {
        return None;
    }
    // The arithmetic of statrs 0.19's `quantile`, so that finite data give the same bits.
    let h = (n as f64 + 1.0 / 3.0) * tau + 1.0 / 3.0;
    let whole = h as i64;
    if whole <= 0 || tau == 0.0 {
        return Some(sorted[0]);
    }
    if whole >= n as i64 || tau == 1.0 {
        return Some(sorted[n - 1]);
    }
    let (a, b) = (sorted[whole as usize - 1], sorted[whole as usize]);
    let fraction = h - whole as f64;
    if fraction == 0.0 {
        return Some(a);
    }
    Some(a + fraction * (b - a))
}

/// [`type8`] of values in any order, found by selection (linear time) rather than a
/// sort; the values are reordered. The same result as [`type8`] of the sorted values.
pub fn type8_unsorted(values: &mut [f64], tau: f64) -> Option<f64> {
    let n = values.len();
    if n == 0 || !(0.0..=1.0).contains(&tau) {
        return None;
    }
    let h = (n as f64 + 1.0 / 3.0) * tau + 1.0 / 3.0;
    let whole = h as i64;
    let smallest = |values: &[f64]| values.iter().copied().min_by(f64::total_cmp);
    let largest = |values: &[f64]| values.iter().copied().max_by(f64::total_cmp);
    if whole <= 0 || tau == 0.0 {
        return smallest(values);
    }
    if whole >= n as i64 || tau == 1.0 {
        return largest(values);
    }
    let (_, &mut a, above) = values.select_nth_unstable_by(whole as usize - 1, f64::total_cmp);
    let fraction = h - whole as f64;
    if fraction == 0.0 {
        return Some(a);
    }
    let b = smallest(above)?;
    Some(a + fraction * (b - a))
}

/// Nearest-rank percentile: the value of rank ⌈p·n⌉ (at least 1) of sorted values.
pub fn nearest_rank(sorted: &[f64], p: f64) -> Option<f64> {
    if sorted.is_empty() {
        return None;
    }
    let rank = ((p * sorted.len() as f64).ceil() as usize).clamp(1, sorted.len());
    Some(sorted[rank - 1])
}

/// `values` sorted in ascending order (a total order: −0 before +0, NaN last).
pub fn sorted(values: impl IntoIterator<Item = f64>) -> Vec<f64> {
    let mut values: Vec<f64> = values.into_iter().collect();
    values.sort_by(f64::total_cmp);
    values
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn type8_matches_numpy_median_unbiased() {
        // numpy 2.4.6 quantile(arange(1, 11), q, method="median_unbiased") (type 8):
        // 0.1 → 1.36666667, 0.5 → 5.5, 0.9 → 9.63333333 (computed reference).
        let values: Vec<f64> = (1..=10).map(f64::from).collect();
        assert!((type8(&values, 0.5).unwrap() - 5.5).abs() < 1e-12);
        assert!((type8(&values, 0.1).unwrap() - 1.366_666_666_666_666_7).abs() < 1e-12);
        assert!((type8(&values, 0.9).unwrap() - 9.633_333_333_333_333).abs() < 1e-12);
        assert_eq!(type8(&[], 0.5), None);
        assert_eq!(type8(&values, 1.5), None);
    }

    #[test]
    fn a_whole_position_gives_the_order_statistic_even_below_infinity() {
        // n = 3, tau = 0.5: h = 2 exactly, so the median is the 2nd value; the 3rd (an
        // undefined run, +∞) must not turn it into 0·∞ = NaN.
        assert_eq!(type8(&[1.0, 2.0, f64::INFINITY], 0.5), Some(2.0));
        // n = 5: h = 3, the 3rd value.
        let five = [1.0, 2.0, 3.0, f64::INFINITY, f64::INFINITY];
        assert_eq!(type8(&five, 0.5), Some(3.0));
        // A fraction between a finite and an infinite value is infinite (undefined).
        assert_eq!(type8(&[1.0, f64::INFINITY], 0.5), Some(f64::INFINITY));
    }

    #[test]
    fn type8_agrees_with_statrs_on_finite_data() {
        use statrs::statistics::{Data, OrderStatistics};
        for n in 1..40 {
            let values: Vec<f64> = (0..n)
                .map(|i| ((i * 37) % 11) as f64 * 0.3 + i as f64)
                .collect();
            let values = sorted(values);
            for tau in [0.0, 0.1, 0.25, 0.5, 0.75, 0.9, 1.0] {
                let theirs = Data::new(values.clone()).quantile(tau);
                assert_eq!(
                    type8(&values, tau).unwrap().to_bits(),
                    theirs.to_bits(),
                    "n {n} tau {tau}"
                );
            }
        }
    }

    #[test]
    fn selection_gives_the_sorted_answer() {
        for n in 1..30 {
            let values: Vec<f64> = (0..n)
                .map(|i| ((i * 7919) % 13) as f64 - 0.5 * i as f64)
                .collect();
            let mut with_infinity = values.clone();
            with_infinity.push(f64::INFINITY);
            for data in [values, with_infinity] {
                let sorted = sorted(data.clone());
                for tau in [0.0, 0.1, 0.5, 0.9, 1.0] {
                    let mut scratch = data.clone();
                    let got = type8_unsorted(&mut scratch, tau).map(f64::to_bits);
                    assert_eq!(
                        got,
                        type8(&sorted, tau).map(f64::to_bits),
                        "n {n} tau {tau}"
                    );
                }
            }
        }
    }

    #[test]
    fn medians_and_nearest_ranks() {
        assert_eq!(median(&[1.0, 2.0, 4.0]), Some(2.0));
        assert_eq!(median(&[1.0, 2.0, 4.0, 8.0]), Some(3.0));
        assert_eq!(median(&[]), None);
        let values: Vec<f64> = (1..=200).map(f64::from).collect();
        assert_eq!(nearest_rank(&values, 0.025), Some(5.0));
        assert_eq!(nearest_rank(&values, 0.975), Some(195.0));
        assert_eq!(nearest_rank(&[], 0.5), None);
    }
}
