//! Diagnostics of one run's filtered design. All of them work on the filtered columns
//! scaled to unit length: because the constant has been projected out, these columns
//! are centred, and their Gram matrix is the correlation matrix of the design.

pub mod commonality;
mod conditioning;
mod correlation;
mod dependencies;
mod efficiency;
pub mod overlap;
pub mod partition;
mod separation;
mod sets;
mod spectrum;
pub mod triangle;
mod vif;

pub use conditioning::{Conditioning, belsley};
pub use correlation::{TrialCorrelation, most_correlated, trial_correlations};
pub use dependencies::Dependency;
pub use efficiency::Contrast;
pub use overlap::ModelOverlap;
pub use partition::{Component, GroupShare, RegressorPartition};
pub use separation::{ModelSeparation, SeparatedModulator};
pub use sets::{ModelSet, scaled as scaled_gvif};
pub use spectrum::Spectrum;

use nalgebra::DMatrix;

use crate::design::{Design, RegressorKind};
use crate::flags::{Flag, FlagCode, Severity};
use partition::Group;
use triangle::Triangle;

#[derive(Debug, Clone)]
pub struct Diagnostics {
    /// Aligned with the design's regressors; `None` where undefined (see the flags).
    pub vif: Vec<Option<f64>>,
    /// Correlations of the filtered columns; `None` for columns left out.
    pub correlation: Vec<Vec<Option<f64>>>,
    /// Correlations of modulators of the same event across its trials, before convolution.
    pub trial_correlation: Vec<TrialCorrelation>,
    pub dependencies: Vec<Dependency>,
    pub conditioning: Conditioning,
    pub model_sets: Vec<ModelSet>,
    /// Own-contrast efficiency 1/(cᵀ(XᵀX)⁻¹c) of each regressor, in the design's own units.
    pub efficiency: Vec<Option<f64>>,
    /// Differences between corresponding modulators of two models.
    pub contrasts: Vec<Contrast>,
    /// Each modulator's R² split into unique and shared parts (commonality analysis).
    pub partition: Vec<RegressorPartition>,
    /// Overlap of every pair of models after task and nuisance are partialled out.
    pub model_overlap: Vec<ModelOverlap>,
    /// Every ordered pair of models: how far A's modulators can be told from B's.
    pub separations: Vec<ModelSeparation>,
    /// Design indices of the independent columns every number above is computed on.
    pub analysed: Vec<usize>,
    pub flags: Vec<Flag>,
}

/// Filtered columns that take part in the diagnostics, scaled to unit length.
pub(crate) struct UnitColumns {
    /// Index in the design of each active column.
    pub indices: Vec<usize>,
    /// Euclidean norm of each active filtered column.
    pub norms: Vec<f64>,
    /// scans × active, unit-length columns.
    pub matrix: DMatrix<f64>,
}

/// What every diagnostic is derived from.
pub(crate) struct Core {
    unit: UnitColumns,
    dependencies: Vec<Dependency>,
    spectrum: Spectrum,
    vif: Vec<Option<f64>>,
    /// The triangle of a QR of the kept unit columns: subset R² and block determinants.
    triangle: Triangle,
}

fn core(names: &[&str], columns: &[Vec<f64>], active: &[usize]) -> Core {
    let unit = UnitColumns::new(columns, active);
    let dependencies = dependencies::find(names, &unit);
    let spectrum = Spectrum::new(&unit, &dependencies);
    let vif = vif::variance_inflation(columns.len(), &unit, &spectrum, &dependencies);
    let kept = DMatrix::from_fn(unit.matrix.nrows(), spectrum.kept.len(), |row, col| {
        unit.matrix[(row, spectrum.kept[col])]
    });
    Core {
        triangle: Triangle::of(&kept),
        unit,
        dependencies,
        spectrum,
        vif,
    }
}

pub fn diagnose(design: &Design) -> Diagnostics {
    let mut flags = Vec::new();
    let active = active_columns(design, &mut flags);
    let names: Vec<&str> = design.regressors.iter().map(|r| r.name.as_str()).collect();
    let count = names.len();
    let core = core(&names, &design.filtered, &active);
    flags.extend(core.dependencies.iter().map(Dependency::flag));
    let trial_correlation = trial_correlations(design);
    let partition = design_partition(design, &core);
    let model_overlap = model_overlaps(design, &core);
    let separations = separation::separations(design, &core, &model_overlap, &trial_correlation);
    Diagnostics {
        correlation: correlation::filtered_correlation(count, &core.unit),
        trial_correlation,
        conditioning: conditioning::of_design(count, &core.unit, &core.spectrum),
        model_sets: model_sets(design, &core),
        efficiency: efficiency::own(count, &core.unit, &core.spectrum, &core.vif),
        contrasts: contrasts(design, &core),
        partition,
        model_overlap,
        separations,
        analysed: core
            .spectrum
            .kept
            .iter()
            .map(|&a| core.unit.indices[a])
            .collect(),
        dependencies: core.dependencies,
        vif: core.vif,
        flags,
    }
}

/// The numbers that depend only on the columns themselves.
#[derive(Debug, Clone)]
pub struct ColumnDiagnostics {
    pub vif: Vec<Option<f64>>,
    pub correlation: Vec<Vec<Option<f64>>>,
    pub dependencies: Vec<Dependency>,
    pub conditioning: Conditioning,
    /// Own-contrast efficiency ‖x_j‖²/VIF_j of each column.
    pub efficiency: Vec<Option<f64>>,
}

/// VIFs, correlations, exact dependencies and conditioning of already-centred columns
/// (e.g. a filtered design); `active` lists the columns taking part, the others get `None`.
pub fn analyse_columns(
    names: &[&str],
    columns: &[Vec<f64>],
    active: &[usize],
) -> ColumnDiagnostics {
    let core = core(names, columns, active);
    ColumnDiagnostics {
        correlation: correlation::filtered_correlation(columns.len(), &core.unit),
        conditioning: conditioning::of_design(columns.len(), &core.unit, &core.spectrum),
        efficiency: efficiency::own(columns.len(), &core.unit, &core.spectrum, &core.vif),
        dependencies: core.dependencies,
        vif: core.vif,
    }
}

fn centred(columns: &[Vec<f64>]) -> Vec<Vec<f64>> {
    columns
        .iter()
        .map(|column| {
            let mean = column.iter().sum::<f64>() / column.len() as f64;
            column.iter().map(|v| v - mean).collect()
        })
        .collect()
}

fn nonzero(columns: &[Vec<f64>]) -> Vec<usize> {
    (0..columns.len())
        .filter(|&j| euclidean(&columns[j]) > 0.0)
        .collect()
}

/// Diagnostics of a regression with an intercept on raw predictors (e.g. the Longley
/// data): each column is centred first, which is projecting out the constant.
pub fn with_intercept(names: &[&str], columns: &[Vec<f64>]) -> ColumnDiagnostics {
    let centred = centred(columns);
    analyse_columns(names, &centred, &nonzero(&centred))
}

/// GVIF of the columns at `set` in a regression with an intercept on raw predictors.
pub fn gvif_with_intercept(columns: &[Vec<f64>], set: &[usize]) -> Option<f64> {
    let centred = centred(columns);
    let names = vec![""; columns.len()];
    let core = core(&names, &centred, &nonzero(&centred));
    if !core.dependencies.is_empty() {
        return None;
    }
    let positions: Vec<usize> = set
        .iter()
        .map(|&j| core.unit.indices.iter().position(|&i| i == j))
        .collect::<Option<_>>()?;
    sets::generalized_vif(&core.triangle, &core.spectrum, &positions)
}

/// Efficiency and variance inflation of the difference of columns `a` and `b` in a
/// regression with an intercept on raw predictors.
pub fn difference_with_intercept(columns: &[Vec<f64>], a: usize, b: usize) -> Option<(f64, f64)> {
    let centred = centred(columns);
    let names = vec![""; columns.len()];
    let core = core(&names, &centred, &nonzero(&centred));
    let pa = core.unit.indices.iter().position(|&i| i == a)?;
    let pb = core.unit.indices.iter().position(|&i| i == b)?;
    efficiency::difference(&core.unit, &core.spectrum, pa, pb)
}

/// Position among the kept (independent) columns of design regressor `index`.
fn kept_position(core: &Core, index: usize) -> Option<usize> {
    let a = core.unit.indices.iter().position(|&i| i == index)?;
    core.spectrum.kept.iter().position(|&k| k == a)
}

fn model_names(design: &Design) -> Vec<&str> {
    let mut models: Vec<&str> = Vec::new();
    for regressor in &design.regressors {
        if let Some(model) = regressor.model.as_deref() {
            if !models.contains(&model) {
                models.push(model);
            }
        }
    }
    models
}

fn modulators_of<'d>(design: &'d Design, model: &str) -> impl Iterator<Item = usize> + 'd {
    let model = model.to_string();
    design
        .regressors
        .iter()
        .enumerate()
        .filter(move |(_, r)| {
            r.kind == RegressorKind::Modulator && r.model.as_deref() == Some(model.as_str())
        })
        .map(|(index, _)| index)
}

fn model_sets(design: &Design, core: &Core) -> Vec<ModelSet> {
    model_names(design)
        .into_iter()
        .map(|model| {
            let members: Vec<usize> = modulators_of(design, model)
                .filter(|&i| core.unit.indices.contains(&i))
                .collect();
            let undefined = members.iter().any(|&i| core.vif[i].is_none());
            let positions: Option<Vec<usize>> =
                members.iter().map(|&i| kept_position(core, i)).collect();
            let gvif = match positions {
                Some(positions) if !undefined && !positions.is_empty() => {
                    sets::generalized_vif(&core.triangle, &core.spectrum, &positions)
                }
                _ => None,
            };
            ModelSet {
                model: model.to_string(),
                regressors: members
                    .iter()
                    .map(|&i| design.regressors[i].name.clone())
                    .collect(),
                df: members.len(),
                gvif,
                gvif_scaled: gvif.map(|g| sets::scaled(g, members.len())),
            }
        })
        .collect()
}

/// Corresponding modulators of two models: the same event, the same position among
/// that model's modulators of the event, in the order written.
fn contrasts(design: &Design, core: &Core) -> Vec<Contrast> {
    let models = model_names(design);
    let mut result = Vec::new();
    for (i, first) in models.iter().enumerate() {
        for second in &models[i + 1..] {
            let first_mods: Vec<usize> = modulators_of(design, first).collect();
            let second_mods: Vec<usize> = modulators_of(design, second).collect();
            for &a in &first_mods {
                let event = &design.regressors[a].event;
                let rank = first_mods
                    .iter()
                    .filter(|&&x| x < a && &design.regressors[x].event == event)
                    .count();
                let Some(&b) = second_mods
                    .iter()
                    .filter(|&&x| &design.regressors[x].event == event)
                    .nth(rank)
                else {
                    continue;
                };
                let positions = (
                    core.unit.indices.iter().position(|&x| x == a),
                    core.unit.indices.iter().position(|&x| x == b),
                );
                let defined = core.vif[a].is_some() && core.vif[b].is_some();
                let numbers = match positions {
                    (Some(pa), Some(pb)) if defined => {
                        efficiency::difference(&core.unit, &core.spectrum, pa, pb)
                    }
                    _ => None,
                };
                let (name_a, name_b) = (&design.regressors[a].name, &design.regressors[b].name);
                result.push(Contrast {
                    name: format!("{name_a} - {name_b}"),
                    regressors: [name_a.clone(), name_b.clone()],
                    efficiency: numbers.map(|n| n.0),
                    variance_inflation: numbers.map(|n| n.1),
                });
            }
        }
    }
    result
}

/// The kept (independent) unit columns as a matrix.
fn kept_matrix(core: &Core) -> DMatrix<f64> {
    let kept = &core.spectrum.kept;
    DMatrix::from_fn(core.unit.matrix.nrows(), kept.len(), |row, col| {
        core.unit.matrix[(row, kept[col])]
    })
}

/// The group a regressor belongs to in the partition: its model, the task, or nuisance.
fn group_of(regressor: &crate::design::Regressor) -> String {
    match (regressor.kind, &regressor.model) {
        (RegressorKind::Modulator, Some(model)) => model.clone(),
        (RegressorKind::Nuisance, _) => partition::NUISANCE.to_string(),
        _ => partition::TASK.to_string(),
    }
}

/// Groups of kept columns (positions among the kept), in the order models, task, nuisance.
fn groups_without(design: &Design, core: &Core, left_out: Option<usize>) -> Vec<Group> {
    let mut names: Vec<String> = model_names(design).iter().map(|m| m.to_string()).collect();
    names.push(partition::TASK.into());
    names.push(partition::NUISANCE.into());
    names
        .into_iter()
        .map(|name| {
            let members = core
                .spectrum
                .kept
                .iter()
                .enumerate()
                .filter(|(_, a)| {
                    let index = core.unit.indices[**a];
                    Some(index) != left_out && group_of(&design.regressors[index]) == name
                })
                .map(|(position, _)| position)
                .collect();
            Group { name, members }
        })
        .filter(|group| !group.members.is_empty())
        .collect()
}

fn design_partition(design: &Design, core: &Core) -> Vec<RegressorPartition> {
    design
        .regressors
        .iter()
        .enumerate()
        .filter(|(_, r)| r.kind == RegressorKind::Modulator)
        .map(|(index, regressor)| {
            let (Some(position), Some(vif)) = (kept_position(core, index), core.vif[index]) else {
                return RegressorPartition::undefined(&regressor.name, regressor.model.clone());
            };
            let groups = groups_without(design, core, Some(index));
            match partition::partition(&core.triangle, position, &groups) {
                Some((r2, components)) => RegressorPartition {
                    regressor: regressor.name.clone(),
                    model: regressor.model.clone(),
                    r2: Some(r2),
                    unique: Some(1.0 / vif),
                    shared_with: partition::shares_by_group(&groups, &components),
                    components,
                },
                None => RegressorPartition::undefined(&regressor.name, regressor.model.clone()),
            }
        })
        .collect()
}

fn model_overlaps(design: &Design, core: &Core) -> Vec<ModelOverlap> {
    let kept = kept_matrix(core);
    let groups = groups_without(design, core, None);
    let controls: Vec<usize> = groups
        .iter()
        .filter(|g| g.name == partition::TASK || g.name == partition::NUISANCE)
        .flat_map(|g| g.members.iter().copied())
        .collect();
    let models: Vec<&Group> = groups
        .iter()
        .filter(|g| g.name != partition::TASK && g.name != partition::NUISANCE)
        .collect();
    let sets: Vec<&[usize]> = models.iter().map(|g| g.members.as_slice()).collect();
    let mut pairs = overlap::overlaps(&kept, &sets, &controls).into_iter();
    let mut result = Vec::new();
    for (i, first) in models.iter().enumerate() {
        for second in &models[i + 1..] {
            let Some((canonical_correlations, explained)) = pairs.next() else {
                break;
            };
            result.push(ModelOverlap {
                models: [first.name.clone(), second.name.clone()],
                canonical_correlations,
                explained,
            });
        }
    }
    result
}

impl UnitColumns {
    fn new(columns: &[Vec<f64>], active: &[usize]) -> Self {
        let norms: Vec<f64> = active.iter().map(|&j| euclidean(&columns[j])).collect();
        let rows = active.first().map_or(0, |&j| columns[j].len());
        let matrix = DMatrix::from_fn(rows, active.len(), |row, col| {
            columns[active[col]][row] / norms[col]
        });
        UnitColumns {
            indices: active.to_vec(),
            norms,
            matrix,
        }
    }
}

/// Columns in the design whose filtered part carries information.
fn active_columns(design: &Design, flags: &mut Vec<Flag>) -> Vec<usize> {
    let mut active = Vec::new();
    for (index, (filtered, sampled)) in design.filtered.iter().zip(&design.sampled).enumerate() {
        if !design.included[index] {
            continue;
        }
        let norm = euclidean(filtered);
        if norm <= crate::precision::VANISHING * euclidean(sampled) || norm == 0.0 {
            let name = &design.regressors[index].name;
            flags.push(Flag::new(
                Severity::Severe,
                FlagCode::VanishesAfterFiltering,
                vec![name.clone()],
                format!(
                    "{name} is (numerically) constant or a slow drift: the constant and the high-pass filter remove all of it, so it cannot be estimated"
                ),
            ));
            continue;
        }
        active.push(index);
    }
    active
}

fn euclidean(values: &[f64]) -> f64 {
    values.iter().map(|v| v * v).sum::<f64>().sqrt()
}
