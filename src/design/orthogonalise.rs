//! Serial orthogonalisation of parametric modulators, as users do it to "give" shared
//! variance to one model: in the order the study file lists them (models in order, each
//! model's modulators in order), every modulator's filtered column is replaced by its
//! part orthogonal to all modulators before it.
//!
//! What this changes (Mumford, Poline & Poldrack 2015, PLoS ONE 10:e0126255): the fitted
//! space is the same, so the last modulator's estimate and test are unchanged; its VIF
//! drops only because its column got shorter. Every earlier modulator's estimate now also
//! carries the variance it shares with later ones, so it no longer means what its model
//! alone says.

use super::{Design, RegressorKind};
use crate::flags::{Flag, FlagCode, Severity};

/// A remainder shorter than this fraction of the column means the modulator lay
/// entirely in the span of the modulators before it.
const ABSORBED: f64 = crate::precision::ABSORBED;

pub fn serial(design: &Design) -> Design {
    let mut result = design.clone();
    let mut basis: Vec<Vec<f64>> = Vec::new();
    for index in 0..design.regressors.len() {
        if design.regressors[index].kind != RegressorKind::Modulator || !design.included[index] {
            continue;
        }
        let original = &design.filtered[index];
        let mut remainder = original.clone();
        for _ in 0..2 {
            for q in &basis {
                let weight: f64 = q.iter().zip(&remainder).map(|(a, b)| a * b).sum();
                for (r, qv) in remainder.iter_mut().zip(q) {
                    *r -= weight * qv;
                }
            }
        }
        let length = norm(&remainder);
        if length <= ABSORBED * norm(original) {
            result.included[index] = false;
            let name = &design.regressors[index].name;
            result.flags.push(Flag::new(
                Severity::Severe,
                FlagCode::AbsorbedByOrthogonalisation,
                vec![name.clone()],
                format!("{name} lies entirely in the span of the modulators before it; serial orthogonalisation leaves nothing of it"),
            ));
        } else {
            basis.push(remainder.iter().map(|v| v / length).collect());
            result.filtered[index] = remainder;
        }
    }
    result
}

fn norm(values: &[f64]) -> f64 {
    values.iter().map(|v| v * v).sum::<f64>().sqrt()
}
