//! Diagnostics of one run's filtered design. All of them work on the filtered columns
//! scaled to unit length: because the constant has been projected out, these columns
//! are centred, and their Gram matrix is the correlation matrix of the design.

mod correlation;
mod dependencies;
mod vif;

pub use correlation::{TrialCorrelation, trial_correlations};
pub use dependencies::{DEPENDENCY_TOLERANCE, Dependency};

use nalgebra::DMatrix;

use crate::design::Design;
use crate::flags::{Flag, Severity};

/// A column whose filtered norm is below this fraction of its sampled norm lies
/// (numerically) inside the drift space and carries no information.
pub const VANISHING_TOLERANCE: f64 = 1e-10;

#[derive(Debug, Clone)]
pub struct Diagnostics {
    /// Aligned with the design's regressors; `None` where undefined (see the flags).
    pub vif: Vec<Option<f64>>,
    /// Correlations of the filtered columns; `None` for columns left out.
    pub correlation: Vec<Vec<Option<f64>>>,
    /// Correlations of modulators of the same event across its trials, before convolution.
    pub trial_correlation: Vec<TrialCorrelation>,
    pub dependencies: Vec<Dependency>,
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

pub fn diagnose(design: &Design) -> Diagnostics {
    let mut flags = Vec::new();
    let active = active_columns(design, &mut flags);
    let names: Vec<&str> = design.regressors.iter().map(|r| r.name.as_str()).collect();
    let columns = analyse_columns(&names, &design.filtered, &active);
    flags.extend(columns.dependencies.iter().map(Dependency::flag));
    Diagnostics {
        vif: columns.vif,
        correlation: columns.correlation,
        trial_correlation: trial_correlations(design),
        dependencies: columns.dependencies,
        flags,
    }
}

/// The numbers that depend only on the columns themselves.
#[derive(Debug, Clone)]
pub struct ColumnDiagnostics {
    pub vif: Vec<Option<f64>>,
    pub correlation: Vec<Vec<Option<f64>>>,
    pub dependencies: Vec<Dependency>,
}

/// VIFs, correlations and exact dependencies of already-centred columns (e.g. a
/// filtered design); `active` lists the columns taking part, the others get `None`.
pub fn analyse_columns(
    names: &[&str],
    columns: &[Vec<f64>],
    active: &[usize],
) -> ColumnDiagnostics {
    let unit = UnitColumns::new(columns, active);
    let dependencies = dependencies::find(names, &unit);
    ColumnDiagnostics {
        vif: vif::variance_inflation(columns.len(), &unit, &dependencies),
        correlation: correlation::filtered_correlation(columns.len(), &unit),
        dependencies,
    }
}

/// Diagnostics of a regression with an intercept on raw predictors (e.g. the Longley
/// data): each column is centred first, which is projecting out the constant.
pub fn with_intercept(names: &[&str], columns: &[Vec<f64>]) -> ColumnDiagnostics {
    let centred: Vec<Vec<f64>> = columns
        .iter()
        .map(|column| {
            let mean = column.iter().sum::<f64>() / column.len() as f64;
            column.iter().map(|v| v - mean).collect()
        })
        .collect();
    let active: Vec<usize> = (0..columns.len())
        .filter(|&j| euclidean(&centred[j]) > 0.0)
        .collect();
    analyse_columns(names, &centred, &active)
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
        if norm <= VANISHING_TOLERANCE * euclidean(sampled) || norm == 0.0 {
            let name = &design.regressors[index].name;
            flags.push(Flag::new(
                Severity::Severe,
                "vanishes_after_filtering",
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
