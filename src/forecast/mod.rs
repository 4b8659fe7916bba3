//! Forecasting before scanning: simulated learners on a planned task, fitted the way a
//! real analysis would fit them, then the full design check on every simulated run.

pub mod choice;
pub mod fit;
pub mod learners;
pub mod simulate;
pub mod spec;
