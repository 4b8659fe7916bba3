//! Simulated learners on a planned task (forecasting before scanning).

pub mod learners;
