//! The cohort views: every run reduced to a [`RunDigest`], participants summarised over
//! their runs, participants counted by status, and the partition of shared and unique
//! variance across participants. `check`, `merge` and the forecast all count and
//! summarise here.

mod digest;
pub mod partition;
mod separation;
mod subjects;
mod vifs;

pub use digest::{GlmDigest, RunDigest, SeparationDigest};
pub use partition::{CohortShare, ParticipantShare};
pub use separation::{ParticipantSeparation, Range, SeparationSummary};
pub use subjects::{SharedShare, SubjectSummary, summarise_subjects};
pub use vifs::{ParticipantVifs, RegressorVifs};

use serde::{Deserialize, Serialize};

use crate::screen::Status;

/// Participants (or simulated participants) counted by status.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct StatusCounts {
    pub ok: usize,
    pub caution: usize,
    pub severe: usize,
}

impl StatusCounts {
    pub fn of(statuses: impl IntoIterator<Item = Status>) -> Self {
        let mut counts = StatusCounts::default();
        for status in statuses {
            counts.add(status);
        }
        counts
    }

    pub fn add(&mut self, status: Status) {
        match status {
            Status::Ok => self.ok += 1,
            Status::Caution => self.caution += 1,
            Status::Severe => self.severe += 1,
        }
    }

    /// Those at exactly `status`.
    pub fn at(&self, status: Status) -> usize {
        match status {
            Status::Ok => self.ok,
            Status::Caution => self.caution,
            Status::Severe => self.severe,
        }
    }

    pub fn total(&self) -> usize {
        self.ok + self.caution + self.severe
    }

    /// The share of all (0 when there are none) that `count` is.
    pub fn share(&self, count: usize) -> f64 {
        count as f64 / self.total().max(1) as f64
    }

    /// Those at `status` or worse.
    pub fn at_least(&self, status: Status) -> usize {
        match status {
            Status::Ok => self.total(),
            Status::Caution => self.caution + self.severe,
            Status::Severe => self.severe,
        }
    }
}

/// The cohort's size and its participants by status.
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
pub struct Cohort {
    pub subjects: usize,
    pub runs: usize,
    #[serde(flatten)]
    pub statuses: StatusCounts,
}

/// The cohort views of a report, computed from every run's [`RunDigest`].
#[derive(Debug, Clone)]
pub struct Summaries {
    pub subjects: Vec<SubjectSummary>,
    pub cohort: Cohort,
    pub subject_partition: Vec<ParticipantShare>,
    pub cohort_partition: Vec<CohortShare>,
    /// Each regressor of interest's VIFs over all runs.
    pub regressor_vifs: Vec<RegressorVifs>,
    /// Each regressor of interest's VIFs per participant.
    pub participant_vifs: Vec<ParticipantVifs>,
    /// Each modulator's separation from each other model over the cohort.
    pub separations: Vec<SeparationSummary>,
    /// The same per participant (means over runs).
    pub participant_separations: Vec<ParticipantSeparation>,
}

/// The cohort views of the runs `digests`, in report order.
pub fn summarise(digests: &[RunDigest]) -> Summaries {
    let subjects = summarise_subjects(digests);
    let (separations, participant_separations) = separation::summarise(digests);
    let by_run: Vec<(&str, &[crate::diagnose::RegressorPartition])> = digests
        .iter()
        .map(|r| (r.subject.as_str(), r.partition.as_slice()))
        .collect();
    let subject_partition = partition::participant_means(&by_run);
    Summaries {
        cohort: Cohort {
            subjects: subjects.len(),
            runs: digests.len(),
            statuses: StatusCounts::of(subjects.iter().map(|s| s.status)),
        },
        cohort_partition: partition::summarise(&subject_partition),
        subject_partition,
        subjects,
        regressor_vifs: vifs::over_runs(digests),
        participant_vifs: vifs::per_participant(digests),
        separations,
        participant_separations,
    }
}
