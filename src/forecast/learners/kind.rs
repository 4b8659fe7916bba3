//! The learner kinds a forecast spec can name, their parameters (with the bounds a fit
//! searches within) and the trial-wise quantities each one offers as modulators.

/// How a fitted parameter is searched: on a logistic scale between its bounds, or on a
/// log scale for positive parameters spanning orders of magnitude.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ParameterScale {
    Bounded,
    Log,
}

/// One parameter of a learner or of the choice rule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ParameterInfo {
    /// The key in a forecast spec's `[learner.<name>.priors]` table.
    pub name: &'static str,
    /// Smallest value a fit may return.
    pub low: f64,
    /// Largest value a fit may return.
    pub high: f64,
    pub scale: ParameterScale,
}

const fn rate(name: &'static str) -> ParameterInfo {
    ParameterInfo {
        name,
        low: 0.0,
        high: 1.0,
        scale: ParameterScale::Bounded,
    }
}

const fn variance(name: &'static str) -> ParameterInfo {
    ParameterInfo {
        name,
        low: 1e-4,
        high: 1e2,
        scale: ParameterScale::Log,
    }
}

/// The softmax inverse temperature every learner chooses with. Its upper bound keeps a
/// fit of an almost deterministic chooser finite (common practice: a few tens).
pub const INVERSE_TEMPERATURE: ParameterInfo = ParameterInfo {
    name: "inverse_temperature",
    low: 0.0,
    high: 50.0,
    scale: ParameterScale::Bounded,
};

const DELTA: &[ParameterInfo] = &[rate("learning_rate")];
const DUAL_RATE: &[ParameterInfo] = &[rate("positive_rate"), rate("negative_rate")];
const HYBRID: &[ParameterInfo] = &[
    rate("learning_rate"),
    rate("associability_rate"),
    rate("initial_associability"),
];
const KALMAN: &[ParameterInfo] = &[
    variance("initial_variance"),
    variance("observation_noise"),
    variance("drift"),
];

/// A trial-wise quantity a learner can hand to the GLM.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Quantity {
    /// Chosen option's value, at the cue.
    Value,
    /// Its uncertainty (prior variance), at the cue.
    Uncertainty,
    /// Reward prediction error, at the outcome.
    PredictionError,
    /// The step size of the update, at the outcome.
    LearningRate,
    /// The associability that scaled the update, at the outcome.
    Associability,
}

impl Quantity {
    pub const ALL: [Quantity; 5] = [
        Quantity::Value,
        Quantity::Uncertainty,
        Quantity::PredictionError,
        Quantity::LearningRate,
        Quantity::Associability,
    ];

    /// The spec's name of the quantity, also the suffix of its column and regressor
    /// (`<learner>_<suffix>`).
    pub fn key(self) -> &'static str {
        match self {
            Quantity::Value => "value",
            Quantity::Uncertainty => "uncertainty",
            Quantity::PredictionError => "pe",
            Quantity::LearningRate => "rate",
            Quantity::Associability => "assoc",
        }
    }

    pub fn from_key(key: &str) -> Option<Quantity> {
        Quantity::ALL.into_iter().find(|q| q.key() == key)
    }

    /// True for quantities that belong to the cue; the rest belong to the outcome.
    pub fn at_cue(self) -> bool {
        matches!(self, Quantity::Value | Quantity::Uncertainty)
    }
}

/// The learners a forecast can simulate and fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum LearnerKind {
    /// Delta rule with one learning rate (Rescorla & Wagner 1972).
    Delta,
    /// Delta rule with separate rates for positive and negative prediction errors.
    DualRate,
    /// Associability-weighted delta rule (Pearce & Hall 1980, hybrid form).
    Hybrid,
    /// Kalman filter over each option's mean reward.
    Kalman,
}

impl LearnerKind {
    pub const ALL: [LearnerKind; 4] = [
        LearnerKind::Delta,
        LearnerKind::DualRate,
        LearnerKind::Hybrid,
        LearnerKind::Kalman,
    ];

    /// The spec's name of the kind (`kind = "..."`).
    pub fn key(self) -> &'static str {
        match self {
            LearnerKind::Delta => "delta",
            LearnerKind::DualRate => "dual_rate",
            LearnerKind::Hybrid => "hybrid",
            LearnerKind::Kalman => "kalman",
        }
    }

    pub fn from_key(key: &str) -> Option<LearnerKind> {
        LearnerKind::ALL.into_iter().find(|k| k.key() == key)
    }

    /// The learning parameters, in the order [`super::LearnerModel::new`] takes them.
    pub fn parameters(self) -> &'static [ParameterInfo] {
        match self {
            LearnerKind::Delta => DELTA,
            LearnerKind::DualRate => DUAL_RATE,
            LearnerKind::Hybrid => HYBRID,
            LearnerKind::Kalman => KALMAN,
        }
    }

    /// Learning parameters followed by the inverse temperature: what a fit estimates.
    pub fn all_parameters(self) -> Vec<ParameterInfo> {
        let mut all = self.parameters().to_vec();
        all.push(INVERSE_TEMPERATURE);
        all
    }

    /// Quantities this learner has.
    pub fn quantities(self) -> &'static [Quantity] {
        use Quantity::*;
        match self {
            LearnerKind::Delta | LearnerKind::DualRate => &[Value, PredictionError, LearningRate],
            LearnerKind::Hybrid => &[Value, PredictionError, LearningRate, Associability],
            LearnerKind::Kalman => &[Value, Uncertainty, PredictionError, LearningRate],
        }
    }

    /// The modulators used when the spec does not list any (common practice: value at
    /// the cue and prediction error at the outcome, plus the model's distinctive term).
    /// A delta rule's learning rate is constant, so it is never a default.
    pub fn default_quantities(self) -> &'static [Quantity] {
        use Quantity::*;
        match self {
            LearnerKind::Delta | LearnerKind::DualRate => &[Value, PredictionError],
            LearnerKind::Hybrid => &[Value, PredictionError, Associability],
            LearnerKind::Kalman => &[Value, PredictionError, Uncertainty],
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys_round_trip() {
        for kind in LearnerKind::ALL {
            assert_eq!(LearnerKind::from_key(kind.key()), Some(kind));
            for q in kind.default_quantities() {
                assert!(kind.quantities().contains(q));
            }
        }
        for q in Quantity::ALL {
            assert_eq!(Quantity::from_key(q.key()), Some(q));
        }
        assert_eq!(LearnerKind::Hybrid.all_parameters().len(), 4);
    }
}
