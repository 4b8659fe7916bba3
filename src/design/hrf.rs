//! The canonical double-gamma haemodynamic response of Friston et al. (1998):
//! h(t) = g(t; 6, 1) − g(t; 16, 1)/6 on 0 ≤ t < 32 s, with g the gamma density
//! (shape, scale 1 s). The sampled kernel is divided by the sum of its samples, so that
//! a sustained unit input plateaus at 1 whatever the microtime step (common practice).

use statrs::distribution::{Continuous, Gamma};

/// Length of the kernel in seconds.
pub const KERNEL_SECONDS: f64 = 32.0;
const PEAK_SHAPE: f64 = 6.0;
const UNDERSHOOT_SHAPE: f64 = 16.0;
const UNDERSHOOT_RATIO: f64 = 6.0;

fn gamma_pdf(shape: f64, t: f64) -> f64 {
    match Gamma::new(shape, 1.0) {
        Ok(gamma) if t > 0.0 => gamma.pdf(t),
        _ => 0.0,
    }
}

/// The unnormalised response at `t` seconds after an impulse.
pub fn canonical(t: f64) -> f64 {
    gamma_pdf(PEAK_SHAPE, t) - gamma_pdf(UNDERSHOOT_SHAPE, t) / UNDERSHOOT_RATIO
}

/// d/dt of [`canonical`]: the temporal derivative, using g'(t; a) = g(t; a)·((a − 1)/t − 1).
pub fn canonical_derivative(t: f64) -> f64 {
    if t <= 0.0 {
        return 0.0;
    }
    let slope = |shape: f64| gamma_pdf(shape, t) * ((shape - 1.0) / t - 1.0);
    slope(PEAK_SHAPE) - slope(UNDERSHOOT_SHAPE) / UNDERSHOOT_RATIO
}

/// A response sampled on the microtime grid, with running sums so that a boxcar of any
/// length costs two look-ups per scan instead of a convolution.
#[derive(Debug, Clone)]
pub struct Kernel {
    pub samples: Vec<f64>,
    /// cumulative[i] = samples[0] + … + samples[i].
    cumulative: Vec<f64>,
}

impl Kernel {
    fn from_samples(samples: Vec<f64>) -> Self {
        let cumulative = samples
            .iter()
            .scan(0.0, |sum, &s| {
                *sum += s;
                Some(*sum)
            })
            .collect();
        Kernel {
            samples,
            cumulative,
        }
    }

    /// Σ samples[0..=i], 0 for i < 0 and the full sum beyond the kernel's end.
    pub fn sum_through(&self, i: i64) -> f64 {
        if i < 0 {
            0.0
        } else {
            let last = self.cumulative.len() - 1;
            self.cumulative[(i as usize).min(last)]
        }
    }

    pub fn len(&self) -> usize {
        self.samples.len()
    }

    pub fn is_empty(&self) -> bool {
        self.samples.is_empty()
    }
}

/// The canonical response and its temporal derivative sampled every `dt` seconds on
/// 0 ≤ t < 32 s; both divided by the sum of the response's samples.
pub fn sampled(dt: f64) -> (Kernel, Kernel) {
    let count = (KERNEL_SECONDS / dt).ceil() as usize;
    let times = (0..count).map(|i| i as f64 * dt);
    let response: Vec<f64> = times.clone().map(canonical).collect();
    let total: f64 = response.iter().sum();
    let response = response.iter().map(|h| h / total).collect();
    let derivative = times.map(|t| canonical_derivative(t) / total).collect();
    (
        Kernel::from_samples(response),
        Kernel::from_samples(derivative),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn landmarks_of_the_canonical_response() {
        // Closed form with unit dispersion: t^5 e^-t / 5! − t^15 e^-t / (6 · 15!)
        // (the double gamma of the README's "Numerical conventions", computed by hand);
        // peak near 5 s.
        let t: f64 = 5.0;
        let closed =
            t.powi(5) * (-t).exp() / 120.0 - t.powi(15) * (-t).exp() / (6.0 * 1_307_674_368_000.0);
        assert_relative_eq!(canonical(t), closed, max_relative = 1e-12);
        assert_relative_eq!(canonical(5.0), 0.175441162, max_relative = 1e-8);
        assert_eq!(canonical(0.0), 0.0);
    }

    #[test]
    fn derivative_matches_a_central_difference() {
        for t in [0.5, 3.0, 7.3, 15.0, 25.0] {
            let h = 1e-5;
            let numeric = (canonical(t + h) - canonical(t - h)) / (2.0 * h);
            assert_relative_eq!(canonical_derivative(t), numeric, max_relative = 1e-6);
        }
    }

    #[test]
    fn sampled_kernel_sums_to_one_and_spans_32_seconds() {
        let (response, derivative) = sampled(2.0 / 16.0);
        assert_eq!(response.len(), 256);
        assert_relative_eq!(response.sum_through(10_000), 1.0, max_relative = 1e-12);
        assert_eq!(response.sum_through(-1), 0.0);
        assert_eq!(derivative.len(), 256);
    }
}
