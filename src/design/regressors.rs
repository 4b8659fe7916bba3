//! Event regressors: sticks and boxcars on a microtime grid, convolved with the
//! response and sampled at the scan times.
//!
//! Conventions (README, "Numerical conventions"): time zero is the start of the first volume; dt = TR/microtime;
//! an event with onset o and duration d covers bins round(o/dt) .. round((o+d)/dt) − 1
//! (at least one bin); scan k is read at the bin nearest (k + reference)·TR; the grid
//! starts 32 s before time zero. Rounding is half away from zero.
//!
//! Instead of convolving a dense grid, each event adds its response directly to the
//! scans it reaches: for a boxcar over bins [b0, b1) the convolution at bin m is
//! Σ_{b=b0}^{b1−1} h[m − b] = H[m − b0] − H[m − b1], with H the running sum of h.

use super::hrf::{KERNEL_SECONDS, Kernel};

#[derive(Debug, Clone, Copy)]
pub struct Grid {
    pub scans: usize,
    pub microtime: usize,
    /// Seconds per microtime bin.
    pub dt: f64,
    /// Bin of scan 0's sample; scan k is read at `first_sample + k·microtime`.
    pub first_sample: i64,
    /// First bin of the grid (32 s before time zero).
    pub start: i64,
}

impl Grid {
    pub fn new(tr: f64, scans: usize, microtime: usize, reference: f64) -> Self {
        let dt = tr / microtime as f64;
        Grid {
            scans,
            microtime,
            dt,
            first_sample: (reference * microtime as f64).round() as i64,
            start: -(KERNEL_SECONDS / dt).round() as i64,
        }
    }

    /// The bins an event covers: [first, end).
    pub fn event_bins(&self, onset: f64, duration: f64) -> (i64, i64) {
        let first = (onset / self.dt).round() as i64;
        let end = ((onset + duration) / self.dt).round() as i64;
        // `as i64` saturates on huge times; saturating sums keep the bins ordered there too
        // (the readers refuse such times, but this function must not overflow on its own).
        (first, end.max(first.saturating_add(1)))
    }

    fn sample_bin(&self, scan: usize) -> i64 {
        self.first_sample + (scan * self.microtime) as i64
    }
}

/// One sampled regressor: Σ over events of height × (response to its boxcar).
pub fn event_regressor(
    grid: &Grid,
    kernel: &Kernel,
    onsets: &[f64],
    durations: &[f64],
    heights: &[f64],
) -> Vec<f64> {
    let mut column = vec![0.0; grid.scans];
    let reach = kernel.len() as i64;
    for ((&onset, &duration), &height) in onsets.iter().zip(durations).zip(heights) {
        if height == 0.0 {
            continue;
        }
        let (first, end) = grid.event_bins(onset, duration);
        let first = first.max(grid.start);
        if end <= first {
            continue;
        }
        // Scans whose sample bin m satisfies first ≤ m < end − 1 + reach.
        let mt = grid.microtime as i64;
        let from = first
            .saturating_sub(grid.first_sample)
            .div_euclid(mt)
            .max(0);
        for (scan, value) in column.iter_mut().enumerate().skip(from as usize) {
            let m = grid.sample_bin(scan);
            if m >= end.saturating_sub(1).saturating_add(reach) {
                break;
            }
            if m < first {
                continue;
            }
            *value += height * (kernel.sum_through(m - first) - kernel.sum_through(m - end));
        }
    }
    column
}

#[cfg(test)]
mod tests {
    use super::super::hrf::{canonical, sampled};
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn absurd_times_neither_overflow_nor_leave_the_run() {
        let grid = Grid::new(1.0, 40, 16, 0.0);
        let (kernel, _) = sampled(grid.dt);
        let times = [1e300, -1e300, f64::MAX, 5.0];
        let durations = [1e300, 1e300, 0.0, f64::MAX];
        let column = event_regressor(&grid, &kernel, &times, &durations, &[1.0; 4]);
        assert_eq!(column.len(), 40);
        assert!(column.iter().all(|v| v.is_finite()));
    }

    #[test]
    fn a_stick_reproduces_the_sampled_response() {
        // TR 1 s, 16 bins, reference 0: scan k is read at t = k s; a stick at 0 s
        // gives h(k)/Σh at every scan.
        let grid = Grid::new(1.0, 40, 16, 0.0);
        let (kernel, _) = sampled(grid.dt);
        let column = event_regressor(&grid, &kernel, &[0.0], &[0.0], &[1.0]);
        let raw_total: f64 = (0..512).map(|i| canonical(i as f64 / 16.0)).sum();
        for (k, value) in column.iter().enumerate().take(32) {
            assert_relative_eq!(
                *value,
                canonical(k as f64) / raw_total,
                max_relative = 1e-12,
                epsilon = 1e-15
            );
        }
        assert_eq!(column[33], 0.0);
    }

    #[test]
    fn a_long_boxcar_plateaus_at_one() {
        let grid = Grid::new(2.0, 100, 16, 0.5);
        let (kernel, _) = sampled(grid.dt);
        let column = event_regressor(&grid, &kernel, &[0.0], &[150.0], &[1.0]);
        assert_relative_eq!(column[40], 1.0, max_relative = 1e-12);
    }

    #[test]
    fn an_event_before_time_zero_contributes_its_tail() {
        let grid = Grid::new(2.0, 20, 16, 0.5);
        let (kernel, _) = sampled(grid.dt);
        let column = event_regressor(&grid, &kernel, &[-4.0], &[0.0], &[1.0]);
        // Scan 0 is read at 1 s, i.e. 5 s after the event: near the response's peak.
        let expected = kernel.samples[(5.0 / grid.dt) as usize];
        assert_relative_eq!(column[0], expected, max_relative = 1e-12);
        let too_early = event_regressor(&grid, &kernel, &[-40.0], &[0.0], &[1.0]);
        assert!(too_early.iter().all(|v| *v == 0.0));
    }
}
