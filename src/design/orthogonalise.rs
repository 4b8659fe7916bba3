//! Orthogonalisation of parametric modulators, as users do it to "give" shared variance
//! to one model. Two ways:
//!
//! - [`serial`]: in the order the design lists them (task modulators, then the models
//!   in order, each model's modulators in order), every modulator's filtered column is
//!   replaced by its part orthogonal to all modulators before it.
//! - [`within_events`]: at trial level, before convolution, within each event: each
//!   modulator's trial heights are replaced by their part orthogonal to the heights of
//!   the modulators listed before it on that event — the common default of analysis
//!   packages (described by Mumford, Poline & Poldrack 2015).
//!
//! What this changes (Mumford, Poline & Poldrack 2015, PLoS ONE 10:e0126255): the fitted
//! space is the same, so the last modulator's estimate and test are unchanged; its VIF
//! drops only because its column got shorter. Every earlier modulator's estimate now also
//! carries the variance it shares with later ones, so it no longer means what its model
//! alone says.

use super::trials::Pending;
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

/// Orthogonalises, within each event and in order, every modulator's trial heights
/// against those of the modulators before it on the event (modified Gram–Schmidt, twice).
/// A modulator left with nothing is taken out of the design, with a flag.
pub(super) fn within_events(pending: &mut [Pending]) -> Vec<Flag> {
    let mut flags = Vec::new();
    let events: Vec<usize> = pending.iter().map(|p| p.event).collect();
    for event in events
        .iter()
        .copied()
        .collect::<std::collections::BTreeSet<_>>()
    {
        let mut basis: Vec<Vec<f64>> = Vec::new();
        for item in pending
            .iter_mut()
            .filter(|p| p.event == event && p.regressor.kind == RegressorKind::Modulator)
        {
            if !item.included {
                continue;
            }
            let original = item.heights.clone();
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
            if length <= ABSORBED * norm(&original) {
                item.included = false;
                let name = &item.regressor.name;
                flags.push(Flag::new(
                    Severity::Severe,
                    FlagCode::AbsorbedByOrthogonalisation,
                    vec![name.clone()],
                    format!("{name}'s trial values lie entirely in the span of the modulators before it on its event; orthogonalisation within the event leaves nothing of it"),
                ));
            } else {
                basis.push(remainder.iter().map(|v| v / length).collect());
                item.heights = remainder;
            }
        }
    }
    flags
}

fn norm(values: &[f64]) -> f64 {
    values.iter().map(|v| v * v).sum::<f64>().sqrt()
}
