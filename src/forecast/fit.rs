//! Maximum-likelihood fitting of a learner's parameters to observed choices.
