//! Shared versus unique variance: each modulator's R² on the rest of the design split
//! by commonality analysis over groups of regressors (models, task timing, nuisance),
//! the overlap of whole models, and (with measured signals) each model's unique and
//! shared share of a region's explained variance.

use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

use super::commonality;
use super::triangle::Triangle;

/// Group of the onset and derivative regressors: the task's timing.
pub const TASK: &str = "task";
pub const NUISANCE: &str = "nuisance";

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Component {
    pub groups: Vec<String>,
    pub share: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GroupShare {
    pub group: String,
    /// Sum of the components that include this group (parts also shared with other
    /// groups are counted for each of them).
    pub share: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RegressorPartition {
    pub regressor: String,
    /// The regressor's own model (its fellow modulators form the group of that name).
    pub model: Option<String>,
    /// Share of the regressor's variance explained by all the other regressors.
    pub r2: Option<f64>,
    /// 1 − r2 = 1/VIF: the regressor's own share.
    pub unique: Option<f64>,
    /// Sum to `r2`; may be negative (suppression).
    pub components: Vec<Component>,
    pub shared_with: Vec<GroupShare>,
}

impl RegressorPartition {
    pub fn undefined(regressor: &str, model: Option<String>) -> Self {
        RegressorPartition {
            regressor: regressor.to_string(),
            model,
            r2: None,
            unique: None,
            components: Vec::new(),
            shared_with: Vec::new(),
        }
    }

    /// The shares held with another model: every group but the regressor's own model,
    /// the task and nuisance.
    pub fn shared_with_other_models(&self) -> impl Iterator<Item = &GroupShare> {
        self.shared_with.iter().filter(move |g| {
            Some(&g.group) != self.model.as_ref() && g.group != TASK && g.group != NUISANCE
        })
    }

    pub fn shared_with(&self, group: &str) -> Option<f64> {
        self.shared_with
            .iter()
            .find(|g| g.group == group)
            .map(|g| g.share)
    }
}

/// A named group of predictors: positions of columns in the fitted matrix.
#[derive(Debug, Clone)]
pub struct Group {
    pub name: String,
    pub members: Vec<usize>,
}

/// Commonality components of column `target`'s R² on the union of `groups`, all subset
/// R² taken from `fit` (the triangle of a QR). `None` if predictors are dependent.
pub fn partition(fit: &Triangle, target: usize, groups: &[Group]) -> Option<(f64, Vec<Component>)> {
    let union = |mask: u32| -> Vec<usize> {
        groups
            .iter()
            .enumerate()
            .filter(|(g, _)| mask & (1 << g) != 0)
            .flat_map(|(_, group)| group.members.iter().copied())
            .collect()
    };
    if groups.len() > commonality::MAX_GROUPS {
        return None;
    }
    let all: u32 = (1u32 << groups.len()) - 1;
    let mut r2_cache = vec![None; all as usize + 1];
    for mask in 1..=all {
        r2_cache[mask as usize] = Some(fit.r_squared(target, &union(mask))?);
    }
    let full = if groups.is_empty() {
        0.0
    } else {
        r2_cache[all as usize]?
    };
    let parts =
        commonality::components(groups.len(), |mask| r2_cache[mask as usize].unwrap_or(0.0));
    let components = parts
        .into_iter()
        .map(|(mask, share)| Component {
            groups: names_in(groups, mask),
            share,
        })
        .collect();
    Some((full, components))
}

/// Names of the groups whose bits are set in `mask`.
pub fn names_in(groups: &[Group], mask: u32) -> Vec<String> {
    groups
        .iter()
        .enumerate()
        .filter(|(g, _)| mask & (1 << g) != 0)
        .map(|(_, group)| group.name.clone())
        .collect()
}

/// Per group, the sum of the components that include it.
pub fn shares_by_group(groups: &[Group], components: &[Component]) -> Vec<GroupShare> {
    groups
        .iter()
        .map(|group| GroupShare {
            group: group.name.clone(),
            share: components
                .iter()
                .filter(|c| c.groups.contains(&group.name))
                .map(|c| c.share)
                .sum(),
        })
        .collect()
}

/// Commonality partition of `target`'s R² on named groups of raw predictor columns, in a
/// regression with an intercept (every column is centred first), with subset R² from the
/// triangle of one QR of the unit-length columns, as for a run's design.
pub fn partition_with_intercept(
    target: &[f64],
    groups: &[(&str, Vec<Vec<f64>>)],
) -> Option<(f64, Vec<Component>)> {
    let mut columns = vec![target.to_vec()];
    let mut named = Vec::new();
    for (name, members) in groups {
        let start = columns.len();
        columns.extend(members.iter().cloned());
        named.push(Group {
            name: name.to_string(),
            members: (start..columns.len()).collect(),
        });
    }
    let rows = target.len();
    let unit: Vec<Vec<f64>> = columns
        .iter()
        .map(|column| {
            let mean = column.iter().sum::<f64>() / rows as f64;
            let centred: Vec<f64> = column.iter().map(|v| v - mean).collect();
            let norm = centred.iter().map(|v| v * v).sum::<f64>().sqrt();
            centred.iter().map(|v| v / norm).collect()
        })
        .collect();
    let matrix = DMatrix::from_fn(rows, unit.len(), |r, c| unit[c][r]);
    partition(&Triangle::of(&matrix), 0, &named)
}
