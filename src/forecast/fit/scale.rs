//! The unbounded search coordinate of each fitted parameter.
//!
//! A `Bounded` parameter x ∈ [low, high] is searched as u with
//! x = low + (high − low)·σ(u), σ the logistic function, so every real u is a legal
//! value and the optimiser needs no constraints (the usual logistic reparameterisation of
//! bounded parameters in learning-model fits, e.g. Daw 2011). A `Log` parameter is
//! searched as u = ln x and clamped to [low, high] on the way back, which keeps positive
//! parameters spanning orders of magnitude evenly spaced in the search.

use crate::forecast::learners::{ParameterInfo, ParameterScale};

/// Fraction of a parameter's range (on its search scale) within which an estimate counts
/// as lying on a bound.
pub const AT_BOUND_FRACTION: f64 = 1e-3;

/// σ(u) = 1 / (1 + e^−u), written so that neither branch overflows for large |u|.
fn logistic(u: f64) -> f64 {
    if u >= 0.0 {
        1.0 / (1.0 + (-u).exp())
    } else {
        let e = u.exp();
        e / (1.0 + e)
    }
}

/// The parameter value of search coordinate `u`; always finite and within [low, high]
/// for a finite `u`.
pub fn to_value(info: &ParameterInfo, u: f64) -> f64 {
    let value = match info.scale {
        ParameterScale::Bounded => info.low + (info.high - info.low) * logistic(u),
        ParameterScale::Log => u.exp(),
    };
    // The clamp is the Log scale's bound; for Bounded it only removes rounding overshoot.
    value.clamp(info.low, info.high)
}

/// The search coordinate at fraction `q` ∈ (0, 1) of the range: the logit of `q` for
/// `Bounded`, the log of the geometric interpolation between the bounds for `Log`.
pub fn coordinate_at(info: &ParameterInfo, q: f64) -> f64 {
    match info.scale {
        ParameterScale::Bounded => (q / (1.0 - q)).ln(),
        ParameterScale::Log => {
            let (a, b) = (info.low.ln(), info.high.ln());
            a + q * (b - a)
        }
    }
}

/// The value in the middle of the range on the parameter's search scale (arithmetic
/// midpoint for `Bounded`, geometric for `Log`): what an empty data set returns.
pub fn midpoint(info: &ParameterInfo) -> f64 {
    to_value(info, coordinate_at(info, 0.5))
}

/// True when `value` lies within [`AT_BOUND_FRACTION`] of the range's width from either
/// end, the width measured on the search scale (linear for `Bounded`, log for `Log`).
pub fn at_bound(info: &ParameterInfo, value: f64) -> bool {
    let (low, high, x) = match info.scale {
        ParameterScale::Bounded => (info.low, info.high, value),
        ParameterScale::Log => (info.low.ln(), info.high.ln(), value.ln()),
    };
    let margin = AT_BOUND_FRACTION * (high - low);
    x - low <= margin || high - x <= margin
}

#[cfg(test)]
mod tests {
    use super::*;

    const RATE: ParameterInfo = ParameterInfo {
        name: "rate",
        low: 0.0,
        high: 1.0,
        scale: ParameterScale::Bounded,
    };
    const VARIANCE: ParameterInfo = ParameterInfo {
        name: "variance",
        low: 1e-4,
        high: 1e2,
        scale: ParameterScale::Log,
    };

    #[test]
    fn coordinates_round_trip_and_stay_in_range() {
        for q in [0.05, 0.2, 0.5, 0.8, 0.95] {
            // Bounded: σ(logit q) = q, so the value is low + q·(high − low).
            let x = to_value(&RATE, coordinate_at(&RATE, q));
            assert!((x - q).abs() < 1e-15, "{q}: {x}");
            // Log: the value is low^(1−q)·high^q (by hand: q = 0.5 gives 0.1).
            let y = to_value(&VARIANCE, coordinate_at(&VARIANCE, q));
            let expected = 1e-4f64.powf(1.0 - q) * 1e2f64.powf(q);
            assert!((y / expected - 1.0).abs() < 1e-12, "{q}: {y} vs {expected}");
        }
        assert!((midpoint(&VARIANCE) - 0.1).abs() < 1e-15);
        assert_eq!(midpoint(&RATE), 0.5);
        // Far outside the usual search region the value sits on the bounds, finite.
        assert_eq!(to_value(&RATE, -1e6), 0.0);
        assert_eq!(to_value(&RATE, 1e6), 1.0);
        assert_eq!(to_value(&VARIANCE, -1e6), 1e-4);
        assert_eq!(to_value(&VARIANCE, 1e6), 1e2);
    }

    #[test]
    fn bounds_are_flagged_within_a_thousandth_of_the_range() {
        assert!(at_bound(&RATE, 0.0009) && at_bound(&RATE, 0.9995));
        assert!(!at_bound(&RATE, 0.0011) && !at_bound(&RATE, 0.5));
        // Log range: ln(1e2) − ln(1e-4) = 6·ln 10 ≈ 13.8; a thousandth is ≈ 0.0138 in
        // ln units, i.e. within a factor e^0.0138 ≈ 1.0139 of a bound.
        assert!(at_bound(&VARIANCE, 1.01e-4) && !at_bound(&VARIANCE, 1.02e-4));
        assert!(at_bound(&VARIANCE, 99.0) && !at_bound(&VARIANCE, 98.0));
    }
}
