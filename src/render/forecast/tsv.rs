//! `tangle forecast --format tsv`: tidy tables at full precision, `n/a` where a value
//! is undefined — variants (with rank and score), modulators, model sets, recovery.

use crate::forecast::report::ForecastReport;
use crate::forecast::summary::Spread;
use crate::render::numbers::exact;
use crate::render::tsv::{TsvTable, plain_table};

pub fn render(report: &ForecastReport) -> Vec<TsvTable> {
    vec![
        variants(report),
        regressors(report),
        model_sets(report),
        recovery(report),
    ]
}

/// All tables on one stream, each after a line `# <table>`.
pub fn render_joined(report: &ForecastReport) -> String {
    join(&render(report))
}

/// The tables one after another, each after a line `# <table>`.
pub fn join(tables: &[TsvTable]) -> String {
    tables
        .iter()
        .map(|t| format!("# {}\n{}", t.name, t.text))
        .collect::<Vec<_>>()
        .join("\n")
}

fn spread(s: &Spread) -> [String; 4] {
    [
        exact(s.median),
        exact(s.p10),
        exact(s.p90),
        s.undefined.to_string(),
    ]
}

fn variants(report: &ForecastReport) -> TsvTable {
    let rows = report
        .variants
        .iter()
        .map(|v| {
            let entry = report.ranking.iter().find(|r| r.variant == v.name);
            let rank = entry.map_or(0, |r| r.rank);
            let chance = entry.map_or(0.0, |r| r.chance_best);
            vec![
                v.name.clone(),
                rank.to_string(),
                exact(v.score),
                chance.to_string(),
                v.runs_checked.to_string(),
                v.participants.ok.to_string(),
                v.participants.caution.to_string(),
                v.participants.severe.to_string(),
                v.task.trials.to_string(),
                v.task.runs.to_string(),
                v.task.cue_to_outcome.low.to_string(),
                v.task.cue_to_outcome.high.to_string(),
                v.task.outcome_to_cue.low.to_string(),
                v.task.outcome_to_cue.high.to_string(),
                v.task.rewards.clone(),
            ]
        })
        .collect();
    plain_table(
        &[
            "variant",
            "rank",
            "score",
            "chance_best",
            "runs",
            "ok",
            "caution",
            "severe",
            "trials",
            "runs_per_participant",
            "cue_to_outcome_low",
            "cue_to_outcome_high",
            "outcome_to_cue_low",
            "outcome_to_cue_high",
            "rewards",
        ],
        rows,
        "variants",
    )
}

fn regressors(report: &ForecastReport) -> TsvTable {
    let mut rows = Vec::new();
    for v in &report.variants {
        for m in &v.regressors {
            let mut row = vec![
                v.name.clone(),
                m.glm.clone(),
                m.learner.clone().unwrap_or_else(|| "n/a".into()),
                m.regressor.clone(),
            ];
            row.extend(spread(&m.vif));
            row.push(m.p_caution_or_worse.to_string());
            row.push(m.p_severe.to_string());
            match &m.shared_with_other_models {
                Some(shared) => row.extend(spread(shared).into_iter().take(3)),
                None => row.extend(["n/a".to_string(), "n/a".into(), "n/a".into()]),
            }
            rows.push(row);
        }
    }
    plain_table(
        &[
            "variant",
            "glm",
            "learner",
            "modulator",
            "vif_median",
            "vif_p10",
            "vif_p90",
            "vif_undefined_runs",
            "p_caution_or_worse",
            "p_severe",
            "shared_median",
            "shared_p10",
            "shared_p90",
        ],
        rows,
        "regressors",
    )
}

fn model_sets(report: &ForecastReport) -> TsvTable {
    let mut rows = Vec::new();
    for v in &report.variants {
        for s in &v.model_sets {
            let mut row = vec![v.name.clone(), s.glm.clone(), s.learner.clone()];
            row.extend(spread(&s.gvif));
            row.extend(spread(&s.gvif_scaled).into_iter().take(3));
            rows.push(row);
        }
    }
    plain_table(
        &[
            "variant",
            "glm",
            "learner",
            "gvif_median",
            "gvif_p10",
            "gvif_p90",
            "gvif_undefined_runs",
            "gvif_scaled_median",
            "gvif_scaled_p10",
            "gvif_scaled_p90",
        ],
        rows,
        "model_sets",
    )
}

fn recovery(report: &ForecastReport) -> TsvTable {
    let mut rows = Vec::new();
    for v in &report.variants {
        for r in &v.recovery {
            rows.push(vec![
                v.name.clone(),
                r.learner.clone(),
                r.parameter.clone(),
                r.participants.to_string(),
                exact(r.correlation),
                r.at_bound.to_string(),
            ]);
        }
    }
    plain_table(
        &[
            "variant",
            "learner",
            "parameter",
            "participants",
            "correlation",
            "at_bound",
        ],
        rows,
        "recovery",
    )
}
