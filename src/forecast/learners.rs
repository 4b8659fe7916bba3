//! Learner models (filled in by the learner work).
