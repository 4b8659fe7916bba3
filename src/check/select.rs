//! Which participants a check covers: `--subjects` (by label) and `--shard K/N`.

use std::collections::HashSet;

use crate::error::{Error, Result};
use crate::trials::RunTrials;

/// Which participants a shard holds: participants sorted by label, participant `i`
/// (0-based) belongs to shard `(i mod count) + 1`. Deterministic and balanced.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// 1-based.
    pub index: usize,
    pub count: usize,
}

impl Shard {
    /// Parses `K/N` (1 ≤ K ≤ N).
    pub fn parse(text: &str) -> std::result::Result<Shard, String> {
        let bad = || format!("--shard: expected K/N with 1 <= K <= N (e.g. 3/10), got \"{text}\"");
        let (k, n) = text.split_once('/').ok_or_else(bad)?;
        let index: usize = k.trim().parse().map_err(|_| bad())?;
        let count: usize = n.trim().parse().map_err(|_| bad())?;
        if index == 0 || count == 0 || index > count {
            return Err(bad());
        }
        Ok(Shard { index, count })
    }

    /// The labels (sorted, distinct) of the participants this shard holds.
    pub fn select<'a>(&self, labels: impl IntoIterator<Item = &'a str>) -> Vec<&'a str> {
        let mut labels: Vec<&str> = labels.into_iter().collect();
        labels.sort_unstable();
        labels.dedup();
        labels
            .into_iter()
            .enumerate()
            .filter(|(i, _)| i % self.count + 1 == self.index)
            .map(|(_, label)| label)
            .collect()
    }

    /// The runs of the participants this shard holds.
    pub fn runs_of(&self, runs: Vec<RunTrials>) -> Vec<RunTrials> {
        let keep: HashSet<String> = self
            .select(runs.iter().map(|r| r.subject.as_str()))
            .into_iter()
            .map(str::to_string)
            .collect();
        runs.into_iter()
            .filter(|r| keep.contains(&r.subject))
            .collect()
    }
}

/// The runs of the participants in `wanted`; a label not among the runs is an error
/// naming `source` (the trial table or dataset).
pub fn subjects(
    runs: Vec<RunTrials>,
    wanted: &[String],
    source: &std::path::Path,
) -> Result<Vec<RunTrials>> {
    let missing: Vec<&String> = wanted
        .iter()
        .filter(|w| !runs.iter().any(|r| &r.subject == *w))
        .collect();
    if !missing.is_empty() {
        let mut known: Vec<&str> = runs.iter().map(|r| r.subject.as_str()).collect();
        known.dedup();
        return Err(Error::Usage(format!(
            "--subjects: no participant {} in {} (participants: {})",
            missing
                .iter()
                .map(|m| format!("\"{m}\""))
                .collect::<Vec<_>>()
                .join(", "),
            source.display(),
            known.join(", ")
        )));
    }
    Ok(runs
        .into_iter()
        .filter(|r| wanted.contains(&r.subject))
        .collect())
}
