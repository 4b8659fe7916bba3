//! Priors over learner parameters: the population the simulated participants are
//! drawn from. Sampling uses rand_distr's distributions; a draw outside the parameter's
//! range (e.g. a gamma draw of the inverse temperature above its fit bound) is clamped
//! to the range, so the truth is always something a fit could return.

use rand::{Rng, RngExt};
use rand_distr::{Beta, Distribution, Gamma, LogNormal};

use crate::forecast::learners::ParameterInfo;

#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Prior {
    /// Held at this value in the simulation and in every fit (not estimated).
    Fixed(f64),
    Uniform {
        low: f64,
        high: f64,
    },
    /// Beta(a, b) on [0, 1].
    Beta {
        a: f64,
        b: f64,
    },
    /// Gamma with shape k and scale θ (mean k·θ).
    Gamma {
        shape: f64,
        scale: f64,
    },
    /// exp of a normal with mean μ and standard deviation σ.
    LogNormal {
        mu: f64,
        sigma: f64,
    },
}

impl Prior {
    /// The spec's name of each family and the two numbers it takes.
    pub const FAMILIES: [(&'static str, &'static str); 5] = [
        ("fixed", "value"),
        ("uniform", "[low, high]"),
        ("beta", "[a, b]"),
        ("gamma", "[shape, scale]"),
        ("lognormal", "[mu, sigma]"),
    ];

    /// Builds the prior `family` from its numbers, or says what is wrong with them.
    pub fn new(family: &str, numbers: &[f64]) -> Result<Prior, String> {
        let pair = || match numbers {
            [a, b] => Ok((*a, *b)),
            _ => Err(format!(
                "a {family} prior takes two numbers, e.g. {family} = [2, 5]"
            )),
        };
        let prior = match family {
            "fixed" => match numbers {
                [value] => Prior::Fixed(*value),
                _ => return Err("fixed takes one number, e.g. fixed = 0.5".into()),
            },
            "uniform" => {
                let (low, high) = pair()?;
                if low > high {
                    return Err(format!("uniform [{low}, {high}]: low is above high"));
                }
                Prior::Uniform { low, high }
            }
            "beta" => {
                let (a, b) = pair()?;
                Beta::new(a, b).map_err(|_| format!("beta [{a}, {b}]: both must be > 0"))?;
                Prior::Beta { a, b }
            }
            "gamma" => {
                let (shape, scale) = pair()?;
                if !(shape > 0.0 && scale > 0.0) {
                    return Err(format!(
                        "gamma [{shape}, {scale}]: shape and scale must be > 0"
                    ));
                }
                Prior::Gamma { shape, scale }
            }
            "lognormal" => {
                let (mu, sigma) = pair()?;
                if sigma.is_nan() || sigma < 0.0 {
                    return Err(format!("lognormal [{mu}, {sigma}]: sigma must be ≥ 0"));
                }
                Prior::LogNormal { mu, sigma }
            }
            other => {
                let names: Vec<&str> = Prior::FAMILIES.iter().map(|f| f.0).collect();
                return Err(format!(
                    "unknown prior `{other}` (use one of: {})",
                    names.join(", ")
                ));
            }
        };
        Ok(prior)
    }

    /// A value that lies outside `info`'s range, if this prior can only give such values.
    pub fn outside(&self, info: &ParameterInfo) -> Option<f64> {
        let inside = |x: f64| x >= info.low && x <= info.high;
        match *self {
            Prior::Fixed(v) if !inside(v) => Some(v),
            Prior::Uniform { low, high } if !inside(low) || !inside(high) => {
                Some(if inside(low) { high } else { low })
            }
            _ => None,
        }
    }

    pub fn fixed_value(&self) -> Option<f64> {
        match *self {
            Prior::Fixed(v) => Some(v),
            _ => None,
        }
    }

    /// One draw, clamped to the parameter's range.
    pub fn draw<R: Rng + ?Sized>(&self, info: &ParameterInfo, rng: &mut R) -> f64 {
        let value = match *self {
            Prior::Fixed(v) => v,
            Prior::Uniform { low, high } if low == high => low,
            Prior::Uniform { low, high } => rng.random_range(low..=high),
            Prior::Beta { a, b } => Beta::new(a, b).map_or(0.5, |d| d.sample(rng)),
            Prior::Gamma { shape, scale } => {
                Gamma::new(shape, scale).map_or(shape * scale, |d| d.sample(rng))
            }
            Prior::LogNormal { mu, sigma } => {
                LogNormal::new(mu, sigma).map_or(mu.exp(), |d| d.sample(rng))
            }
        };
        value.clamp(info.low, info.high)
    }

    /// How the prior is written in a report, e.g. "beta(2, 5)".
    pub fn describe(&self) -> String {
        match *self {
            Prior::Fixed(v) => format!("fixed {v}"),
            Prior::Uniform { low, high } => format!("uniform({low}, {high})"),
            Prior::Beta { a, b } => format!("beta({a}, {b})"),
            Prior::Gamma { shape, scale } => format!("gamma(shape {shape}, scale {scale})"),
            Prior::LogNormal { mu, sigma } => format!("lognormal(μ {mu}, σ {sigma})"),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::forecast::learners::kind::INVERSE_TEMPERATURE;
    use rand::SeedableRng;
    use rand::rngs::Xoshiro256PlusPlus;

    #[test]
    fn draws_have_the_family_mean_and_stay_in_range() {
        let rate = crate::forecast::learners::LearnerKind::Delta.parameters()[0];
        let mut rng = Xoshiro256PlusPlus::seed_from_u64(5);
        let mean = |prior: Prior, info: &ParameterInfo, rng: &mut Xoshiro256PlusPlus| {
            (0..20_000).map(|_| prior.draw(info, rng)).sum::<f64>() / 20_000.0
        };
        // Beta(2, 5) has mean 2/7 = 0.2857; gamma(2, 1.5) has mean 3 (standard results).
        let beta = mean(Prior::Beta { a: 2.0, b: 5.0 }, &rate, &mut rng);
        assert!((beta - 2.0 / 7.0).abs() < 0.005, "{beta}");
        let gamma = mean(
            Prior::Gamma {
                shape: 2.0,
                scale: 1.5,
            },
            &INVERSE_TEMPERATURE,
            &mut rng,
        );
        assert!((gamma - 3.0).abs() < 0.05, "{gamma}");
        // lognormal(0, 0.5) has mean e^{0.125} = 1.1331.
        let lognormal = mean(
            Prior::LogNormal {
                mu: 0.0,
                sigma: 0.5,
            },
            &INVERSE_TEMPERATURE,
            &mut rng,
        );
        assert!((lognormal - 0.125f64.exp()).abs() < 0.02, "{lognormal}");
        let wide = Prior::Gamma {
            shape: 50.0,
            scale: 10.0,
        };
        assert_eq!(
            wide.draw(&INVERSE_TEMPERATURE, &mut rng),
            50.0,
            "clamped to the fit bound"
        );
    }

    #[test]
    fn bad_numbers_are_explained() {
        assert!(Prior::new("beta", &[0.0, 1.0]).unwrap_err().contains("> 0"));
        assert!(
            Prior::new("uniform", &[0.9, 0.1])
                .unwrap_err()
                .contains("above")
        );
        assert!(
            Prior::new("gamma", &[1.0])
                .unwrap_err()
                .contains("two numbers")
        );
        assert!(
            Prior::new("normal", &[0.0, 1.0])
                .unwrap_err()
                .contains("lognormal")
        );
        assert_eq!(Prior::new("fixed", &[0.3]), Ok(Prior::Fixed(0.3)));
    }
}
