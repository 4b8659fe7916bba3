//! The cohort views: every run reduced to a digest, participants summarised over their
//! runs, and the partition of shared and unique variance across participants.

pub mod partition;

pub use partition::{CohortShare, ParticipantShare};
