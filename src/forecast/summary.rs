//! From checked simulated runs to the forecast's numbers: per variant and modulator the
//! spread of VIFs and of the share held with other models, per learner the spread of
//! the model-set GVIF, the participants' statuses, and parameter recovery.
//!
//! Quantiles are Hyndman & Fan's (1996) type 8 ([`crate::quantile::type8`]). Where a run has an
//! exact dependency its VIF is undefined; such runs count as above every defined value,
//! so a quantile that falls among them is `null` and the `undefined_runs` count says
//! why.

use serde::Serialize;

use crate::assess::AssessedRun;
use crate::design::RegressorKind;
use crate::diagnose::partition::{NUISANCE, TASK};
use crate::quantile;
use crate::report::RunReport;
use crate::screen::Status;
use crate::study::GlmSpec;
use crate::study::Thresholds;

/// The spread of one quantity over simulated runs (or participants).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Spread {
    pub median: Option<f64>,
    pub p10: Option<f64>,
    pub p90: Option<f64>,
    /// Values that exist (defined or undefined) — runs, or participants.
    pub count: usize,
    /// Of those, how many are undefined (exact dependency).
    pub undefined: usize,
}

impl Spread {
    /// Undefined values sort above every defined one.
    pub fn of(values: &[Option<f64>]) -> Spread {
        let numbers = quantile::sorted(values.iter().map(|v| v.unwrap_or(f64::INFINITY)));
        let quantile = |tau: f64| quantile::type8(&numbers, tau).filter(|q| q.is_finite());
        Spread {
            median: quantile(0.5),
            p10: quantile(0.1),
            p90: quantile(0.9),
            count: values.len(),
            undefined: values.iter().filter(|v| v.is_none()).count(),
        }
    }
}

/// What one simulated run contributes, kept small so that thousands fit in memory.
#[derive(Debug, Clone, PartialEq)]
pub struct RunDigest {
    /// The worst status over the run's GLMs.
    pub status: Status,
    /// Per slot (a GLM and a tracked regressor it holds, see [`Slots`]): the VIF.
    pub vif: Vec<Option<f64>>,
    /// Per tracked regressor: the share held with the learners' models other than its
    /// own, in the design with every learner.
    pub shared: Vec<Option<f64>>,
    /// Per slot of a GLM and a learner it holds: GVIF of the learner's set of modulators,
    /// plain and scaled.
    pub gvif: Vec<(Option<f64>, Option<f64>)>,
}

/// A regressor the forecast follows: an event's onset regressor, or a learner's
/// modulator (by its column).
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Tracked {
    Event(String),
    Modulator { learner: String, column: String },
}

impl Tracked {
    /// The name reports use: the event, or the modulator's column.
    pub fn name(&self) -> &str {
        match self {
            Tracked::Event(name) => name,
            Tracked::Modulator { column, .. } => column,
        }
    }

    pub fn learner(&self) -> Option<&str> {
        match self {
            Tracked::Event(_) => None,
            Tracked::Modulator { learner, .. } => Some(learner),
        }
    }
}

/// What the forecast follows in each GLM: (GLM, tracked regressor) and (GLM, learner)
/// pairs, for the GLMs that hold them.
#[derive(Debug, Clone, PartialEq)]
pub struct Slots {
    pub glms: Vec<GlmSpec>,
    pub tracked: Vec<Tracked>,
    pub learners: Vec<String>,
    /// (GLM index, tracked index), GLM by GLM.
    pub regressors: Vec<(usize, usize)>,
    /// (GLM index, learner index), GLM by GLM.
    pub model_sets: Vec<(usize, usize)>,
}

impl Slots {
    pub fn new(glms: &[GlmSpec], tracked: Vec<Tracked>, learners: Vec<String>) -> Self {
        let mut regressors = Vec::new();
        let mut model_sets = Vec::new();
        for (g, glm) in glms.iter().enumerate() {
            for (t, key) in tracked.iter().enumerate() {
                if key.learner().is_none_or(|l| glm.holds(l)) {
                    regressors.push((g, t));
                }
            }
            for (l, learner) in learners.iter().enumerate() {
                if glm.holds(learner) {
                    model_sets.push((g, l));
                }
            }
        }
        Slots {
            glms: glms.to_vec(),
            tracked,
            learners,
            regressors,
            model_sets,
        }
    }
}

impl RunDigest {
    pub fn of(run: &AssessedRun, slots: &Slots) -> RunDigest {
        let position = |report: &RunReport, key: &Tracked| {
            report.regressors.iter().position(|r| match key {
                Tracked::Event(name) => {
                    r.regressor.kind == RegressorKind::Onset && &r.regressor.name == name
                }
                Tracked::Modulator { learner, column } => {
                    r.regressor.kind == RegressorKind::Modulator
                        && r.regressor.model.as_deref() == Some(learner.as_str())
                        && r.regressor.column.as_deref() == Some(column.as_str())
                }
            })
        };
        let vif = slots
            .regressors
            .iter()
            .map(|&(g, t)| {
                let report = &run.glms[g];
                position(report, &slots.tracked[t]).and_then(|i| report.vif[i])
            })
            .collect();
        let shared = slots
            .tracked
            .iter()
            .map(|key| {
                let Tracked::Modulator { learner, column } = key else {
                    return None;
                };
                let part = run.shares.iter().map(|s| &s.partition).find(|p| {
                    p.model.as_deref() == Some(learner.as_str())
                        && p.regressor.ends_with(&format!(":{column}"))
                })?;
                part.r2?;
                let own = part.model.as_deref();
                let share = part
                    .components
                    .iter()
                    .filter(|c| {
                        c.groups
                            .iter()
                            .any(|g| Some(g.as_str()) != own && g != TASK && g != NUISANCE)
                    })
                    .map(|c| c.share)
                    .sum::<f64>();
                Some(share)
            })
            .collect();
        let gvif = slots
            .model_sets
            .iter()
            .map(|&(g, l)| {
                run.glms[g]
                    .model_sets
                    .iter()
                    .find(|s| s.model == slots.learners[l])
                    .map_or((None, None), |s| (s.gvif, s.gvif_scaled))
            })
            .collect();
        RunDigest {
            status: run
                .glms
                .iter()
                .map(|r| r.status)
                .max()
                .unwrap_or(Status::Ok),
            vif,
            shared,
            gvif,
        }
    }
}

/// The forecast of one regressor (an event or a modulator) in one GLM on one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RegressorForecast {
    pub glm: String,
    /// The event's name, or the modulator's column `<learner>_<quantity>`.
    pub regressor: String,
    /// The modulator's learner; `null` for an event's onset regressor.
    pub learner: Option<String>,
    pub vif: Spread,
    /// Share of runs with VIF ≥ the caution threshold (an undefined VIF counts).
    pub p_caution_or_worse: f64,
    /// Share of runs with VIF ≥ the severe threshold (an undefined VIF counts).
    pub p_severe: f64,
    /// Share of the regressor's variance held jointly with the modulators of learners
    /// other than its own (commonality components that include another model), in the
    /// design with every learner, whatever the GLM. `null` for an event's onset
    /// regressor: the partition is computed for modulators.
    pub shared_with_other_models: Option<Spread>,
}

/// The forecast of slot `index` of `slots.regressors`.
pub fn regressor_forecast(
    index: usize,
    slots: &Slots,
    runs: &[&RunDigest],
    thresholds: &Thresholds,
) -> RegressorForecast {
    let (g, t) = slots.regressors[index];
    let key = &slots.tracked[t];
    let vifs: Vec<Option<f64>> = runs.iter().map(|r| r.vif[index]).collect();
    let share_at_least = |threshold: f64| {
        let hits = vifs
            .iter()
            .filter(|v| v.is_none_or(|v| v >= threshold))
            .count();
        hits as f64 / vifs.len().max(1) as f64
    };
    let shared: Vec<Option<f64>> = runs.iter().map(|r| r.shared[t]).collect();
    RegressorForecast {
        glm: slots.glms[g].name.clone(),
        regressor: key.name().to_string(),
        learner: key.learner().map(str::to_string),
        p_caution_or_worse: share_at_least(thresholds.vif_caution),
        p_severe: share_at_least(thresholds.vif_severe),
        vif: Spread::of(&vifs),
        shared_with_other_models: key.learner().map(|_| Spread::of(&shared)),
    }
}

/// The GVIF of one learner's set of modulators in one GLM on one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModelSetForecast {
    pub glm: String,
    pub learner: String,
    pub gvif: Spread,
    /// GVIF^(1/(2·df)), comparable across set sizes (Fox & Monette 1992).
    pub gvif_scaled: Spread,
}

/// The forecast of slot `index` of `slots.model_sets`.
pub fn model_set_forecast(index: usize, slots: &Slots, runs: &[&RunDigest]) -> ModelSetForecast {
    let (g, l) = slots.model_sets[index];
    let plain: Vec<Option<f64>> = runs.iter().map(|r| r.gvif[index].0).collect();
    let scaled: Vec<Option<f64>> = runs.iter().map(|r| r.gvif[index].1).collect();
    ModelSetForecast {
        glm: slots.glms[g].name.clone(),
        learner: slots.learners[l].clone(),
        gvif: Spread::of(&plain),
        gvif_scaled: Spread::of(&scaled),
    }
}

/// How well one parameter of a generating learner is recovered by fitting that
/// learner to the simulated choices (common practice before trusting fits).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Recovery {
    pub learner: String,
    pub parameter: String,
    /// Participants generated by this learner.
    pub participants: usize,
    /// Pearson correlation of true and fitted values; `null` with `note` when it is
    /// undefined (fewer than 3 participants, or no spread in either).
    pub correlation: Option<f64>,
    /// Share of fits that ended within 1e-3 of a bound of this parameter.
    pub at_bound: f64,
    pub note: Option<&'static str>,
}

/// Pearson's r, or `None` when a variance is zero or there are fewer than 3 pairs.
pub fn pearson(x: &[f64], y: &[f64]) -> Option<f64> {
    let n = x.len();
    if n < 3 || y.len() != n {
        return None;
    }
    let (mx, my) = (
        x.iter().sum::<f64>() / n as f64,
        y.iter().sum::<f64>() / n as f64,
    );
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (a, b) in x.iter().zip(y) {
        sxy += (a - mx) * (b - my);
        sxx += (a - mx) * (a - mx);
        syy += (b - my) * (b - my);
    }
    let r = sxy / (sxx * syy).sqrt();
    r.is_finite().then_some(r)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spreads_use_the_type_8_quantile_and_keep_undefined_values_on_top() {
        // numpy 2.4.6 quantile(arange(1, 11), q, method="median_unbiased") (type 8):
        // 0.1 → 1.36666667, 0.5 → 5.5, 0.9 → 9.63333333 (h = (n + 1/3)·q + 1/3).
        let values: Vec<Option<f64>> = (1..=10).map(|v| Some(v as f64)).collect();
        let spread = Spread::of(&values);
        assert!((spread.median.unwrap() - 5.5).abs() < 1e-12);
        assert!((spread.p10.unwrap() - 1.366_666_666_666_666_7).abs() < 1e-12);
        assert!((spread.p90.unwrap() - 9.633_333_333_333_333).abs() < 1e-12);
        let mut with_gaps = values.clone();
        with_gaps[0] = None;
        with_gaps[1] = None;
        let spread = Spread::of(&with_gaps);
        assert_eq!(spread.undefined, 2);
        assert_eq!(spread.p90, None, "the top 20 % are undefined");
        assert!(spread.median.is_some());
        assert_eq!(Spread::of(&[]).median, None);
    }

    #[test]
    fn a_median_on_a_defined_value_stays_defined_beside_undefined_runs() {
        // Type 8 at n = 3 puts the median exactly on the 2nd value; the undefined run
        // above it must not make it null (0·∞ was NaN).
        assert_eq!(Spread::of(&[Some(1.0), Some(2.0), None]).median, Some(2.0));
        let five = [Some(1.0), Some(2.0), Some(3.0), None, None];
        assert_eq!(Spread::of(&five).median, Some(3.0));
        assert_eq!(Spread::of(&five).p90, None);
    }

    #[test]
    fn pearson_is_undefined_without_spread() {
        assert_eq!(pearson(&[1.0, 1.0, 1.0], &[1.0, 2.0, 3.0]), None);
        assert_eq!(pearson(&[1.0, 2.0], &[1.0, 2.0]), None);
        let r = pearson(&[1.0, 2.0, 3.0, 4.0], &[2.0, 4.0, 5.0, 9.0]).unwrap();
        // By hand: sxy = 11, sxx = 5, syy = 26 → r = 11/√130 = 0.96476…
        assert!((r - 11.0 / 130f64.sqrt()).abs() < 1e-15);
    }
}
