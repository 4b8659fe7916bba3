//! With measured signals: how much of a region's variance each model explains uniquely
//! and how much the models explain only together, beyond the task and nuisance
//! regressors. Commonality analysis over the model groups with task and nuisance always
//! in the model: R²'(S) = R²(base ∪ S) − R²(base), components as in [`super::commonality`].
//!
//! Uncertainty: a moving-block bootstrap of the full model's residuals (Künsch 1989),
//! blocks of ⌈N^(1/3)⌉ scans (common practice) so that serial correlation within a block
//! is kept; the resampled signal is filtered again and the partition recomputed. The
//! interval is the 2.5th–97.5th percentile of the resampled components.

use nalgebra::{Cholesky, DMatrix, DVector, Dyn};
use rand::rngs::Xoshiro256PlusPlus;
use rand::{RngExt, SeedableRng};
use serde::{Deserialize, Serialize};

use crate::design::filter::DriftBasis;
use crate::diagnose::commonality;
use crate::diagnose::partition::Group;
use crate::quantile;

#[derive(Debug, Clone, Copy)]
pub struct BootstrapSettings {
    pub resamples: usize,
    pub seed: u64,
}

impl Default for BootstrapSettings {
    fn default() -> Self {
        BootstrapSettings {
            resamples: 500,
            seed: 1,
        }
    }
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SignalComponent {
    pub groups: Vec<String>,
    /// Share of the region's (filtered) variance.
    pub share: f64,
    /// 95% bootstrap interval.
    pub low: f64,
    pub high: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RegionPartition {
    pub region: String,
    /// R² of the whole design.
    pub r2: f64,
    /// R² of the task and nuisance regressors alone.
    pub r2_base: f64,
    /// The rest, split over the models; sums to r2 − r2_base.
    pub components: Vec<SignalComponent>,
    pub block_length: usize,
    pub resamples: usize,
}

/// Least-squares fits of a signal on fixed predictor sets, factorised once.
struct Fits {
    columns: DMatrix<f64>,
    /// One per mask over the groups.
    sets: Vec<PredictorSet>,
}

/// Predictor positions and the Cholesky factor of their Gram block (`None` if empty or singular).
struct PredictorSet {
    members: Vec<usize>,
    factor: Option<Cholesky<f64, Dyn>>,
}

impl Fits {
    fn new(columns: DMatrix<f64>, base: &[usize], groups: &[Group]) -> Fits {
        let gram = columns.transpose() * &columns;
        let sets = (0..(1u32 << groups.len()))
            .map(|mask| {
                let mut members = base.to_vec();
                for (g, group) in groups.iter().enumerate() {
                    if mask & (1 << g) != 0 {
                        members.extend(&group.members);
                    }
                }
                let block = DMatrix::from_fn(members.len(), members.len(), |i, j| {
                    gram[(members[i], members[j])]
                });
                let factor = if members.is_empty() {
                    None
                } else {
                    block.cholesky()
                };
                PredictorSet { members, factor }
            })
            .collect();
        Fits { columns, sets }
    }

    /// R² of `y` (centred) on the predictor set of every mask.
    fn r_squared(&self, y: &DVector<f64>) -> Vec<f64> {
        let total = y.norm_squared();
        let cross = self.columns.transpose() * y;
        self.sets
            .iter()
            .map(|set| match &set.factor {
                Some(factor) if total > 0.0 => {
                    let c = DVector::from_fn(set.members.len(), |i, _| cross[set.members[i]]);
                    c.dot(&factor.solve(&c)) / total
                }
                _ => 0.0,
            })
            .collect()
    }

    /// Fitted values of the full model.
    fn fitted(&self, y: &DVector<f64>) -> DVector<f64> {
        let full = &self.sets[self.sets.len() - 1];
        let (members, Some(factor)) = (&full.members, &full.factor) else {
            return DVector::zeros(y.len());
        };
        let x = DMatrix::from_fn(self.columns.nrows(), members.len(), |r, c| {
            self.columns[(r, members[c])]
        });
        x.clone() * factor.solve(&(x.transpose() * y))
    }
}

/// Components beyond the base, from the R² of every mask.
fn components(groups: usize, r2: &[f64]) -> Vec<(u32, f64)> {
    commonality::components(groups, |mask| r2[mask as usize] - r2[0])
}

/// Partition of one region's signal `y` (already filtered) on the `columns` of the
/// filtered design, with `base` always included and the model `groups` partitioned.
pub fn partition_region(
    region: &str,
    columns: DMatrix<f64>,
    base: &[usize],
    groups: &[Group],
    y: &[f64],
    drift: &DriftBasis,
    settings: BootstrapSettings,
) -> RegionPartition {
    let scans = y.len();
    // The study parser caps the number of models; keep the subset count bounded regardless.
    let groups = &groups[..groups.len().min(commonality::MAX_GROUPS)];
    let fits = Fits::new(columns, base, groups);
    let observed = DVector::from_column_slice(y);
    let r2 = fits.r_squared(&observed);
    let parts = components(groups.len(), &r2);
    let fitted = fits.fitted(&observed);
    let residual = &observed - &fitted;
    let block = ((scans as f64).cbrt().ceil() as usize).clamp(1, scans.max(1));
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(settings.seed);
    let mut draws: Vec<Vec<f64>> = vec![Vec::with_capacity(settings.resamples); parts.len()];
    for _ in 0..settings.resamples {
        let mut resampled = Vec::with_capacity(scans + block);
        while resampled.len() < scans {
            let start = rng.random_range(0..=scans - block);
            resampled.extend((start..start + block).map(|i| residual[i]));
        }
        resampled.truncate(scans);
        let y_star: Vec<f64> = fitted.iter().zip(&resampled).map(|(f, e)| f + e).collect();
        let y_star = DVector::from_vec(drift.residualise(&y_star));
        let r2_star = fits.r_squared(&y_star);
        for (slot, (_, share)) in draws.iter_mut().zip(components(groups.len(), &r2_star)) {
            slot.push(share);
        }
    }
    let full = r2[r2.len() - 1];
    RegionPartition {
        region: region.to_string(),
        r2: full,
        r2_base: r2[0],
        components: parts
            .iter()
            .zip(draws.iter_mut())
            .map(|((mask, share), draws)| {
                draws.sort_by(f64::total_cmp);
                SignalComponent {
                    groups: crate::diagnose::partition::names_in(groups, *mask),
                    share: *share,
                    low: quantile::nearest_rank(draws, 0.025).unwrap_or(*share),
                    high: quantile::nearest_rank(draws, 0.975).unwrap_or(*share),
                }
            })
            .collect(),
        block_length: block,
        resamples: settings.resamples,
    }
}

/// A stable 64-bit FNV-1a hash, so every run and region gets its own bootstrap stream
/// whatever order the runs are processed in.
fn stream(seed: u64, labels: &[&str]) -> u64 {
    let mut hash = 0xcbf2_9ce4_8422_2325u64 ^ seed;
    for label in labels {
        for byte in label.bytes().chain([0xff]) {
            hash ^= u64::from(byte);
            hash = hash.wrapping_mul(0x0000_0100_0000_01b3);
        }
    }
    hash
}

/// Partitions every region of `table` on the run's analysed design columns; each
/// region is filtered by the design's own drift basis first.
pub fn partition_signals(
    design: &crate::design::Design,
    diagnostics: &crate::diagnose::Diagnostics,
    table: &crate::trials::PerScanTable,
    bootstrap: BootstrapSettings,
) -> Vec<RegionPartition> {
    use crate::design::RegressorKind;
    let drift = &design.drift;
    let analysed = &diagnostics.analysed;
    let columns = DMatrix::from_fn(design.scans, analysed.len(), |r, c| {
        let column = &design.filtered[analysed[c]];
        let norm = column.iter().map(|v| v * v).sum::<f64>().sqrt();
        column[r] / norm
    });
    let mut base = Vec::new();
    let mut groups: Vec<Group> = Vec::new();
    for (position, &index) in analysed.iter().enumerate() {
        let regressor = &design.regressors[index];
        match (&regressor.kind, &regressor.model) {
            (RegressorKind::Modulator, Some(model)) => {
                match groups.iter_mut().find(|g| &g.name == model) {
                    Some(group) => group.members.push(position),
                    None => groups.push(Group {
                        name: model.clone(),
                        members: vec![position],
                    }),
                }
            }
            _ => base.push(position),
        }
    }
    table
        .names
        .iter()
        .zip(&table.columns)
        .map(|(region, values)| {
            let y = drift.residualise(values);
            let seed = stream(bootstrap.seed, &[&design.subject, &design.run, region]);
            let settings = BootstrapSettings { seed, ..bootstrap };
            partition_region(region, columns.clone(), &base, &groups, &y, drift, settings)
        })
        .collect()
}

/// A warning wherever two models' unique shares of a region cannot be told apart: their
/// bootstrap intervals overlap, so "model A explains this region better" is not shown.
pub fn uncertainty_flags(regions: &[RegionPartition]) -> Vec<crate::flags::Flag> {
    use crate::flags::{Flag, FlagCode, Severity};
    let mut flags = Vec::new();
    for region in regions {
        let unique: Vec<&SignalComponent> = region
            .components
            .iter()
            .filter(|c| c.groups.len() == 1)
            .collect();
        for (i, a) in unique.iter().enumerate() {
            for b in &unique[i + 1..] {
                if a.low > b.high || b.low > a.high {
                    continue;
                }
                let (larger, smaller) = if a.share >= b.share { (a, b) } else { (b, a) };
                flags.push(Flag::new(
                    Severity::Warning,
                    FlagCode::UniqueSharesOverlap,
                    Vec::new(),
                    format!(
                        "region {}: the variance unique to {} ({:.4}, 95% interval {:.4} to {:.4}) and unique to {} ({:.4}, {:.4} to {:.4}) overlap within the bootstrap uncertainty, so neither model can be said to explain this region better; the models share {:.4} of it",
                        region.region,
                        larger.groups[0],
                        larger.share,
                        larger.low,
                        larger.high,
                        smaller.groups[0],
                        smaller.share,
                        smaller.low,
                        smaller.high,
                        region.components.iter().filter(|c| c.groups.len() > 1).map(|c| c.share).sum::<f64>()
                    ),
                ));
            }
        }
    }
    flags
}
