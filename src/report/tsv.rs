//! `--format tsv`: one tidy row per run × regressor, full precision, `n/a` = undefined.

use super::Report;
use super::format::exact;

const HEADER: [&str; 14] = [
    "subject",
    "run",
    "regressor",
    "kind",
    "event",
    "model",
    "column",
    "in_design",
    "vif",
    "se_inflation",
    "status",
    "most_correlated",
    "r",
    "run_status",
];

pub fn render(report: &Report) -> String {
    let mut text = HEADER.join("\t");
    text.push('\n');
    for run in &report.runs {
        for (index, entry) in run.regressors.iter().enumerate() {
            let regressor = &entry.regressor;
            let partner = run.correlation[index]
                .iter()
                .enumerate()
                .filter(|(other, r)| *other != index && r.is_some())
                .max_by(|a, b| {
                    a.1.unwrap_or(0.0)
                        .abs()
                        .total_cmp(&b.1.unwrap_or(0.0).abs())
                });
            let cells = [
                run.subject.clone(),
                run.run.clone(),
                regressor.name.clone(),
                regressor.kind.label().to_string(),
                regressor.event.clone().unwrap_or_else(|| "n/a".into()),
                regressor.model.clone().unwrap_or_else(|| "n/a".into()),
                regressor.column.clone().unwrap_or_else(|| "n/a".into()),
                entry.in_design.to_string(),
                exact(run.vif[index]),
                exact(run.se_inflation[index]),
                entry.status.label().to_string(),
                partner.map_or("n/a".into(), |(other, _)| {
                    run.regressors[other].regressor.name.clone()
                }),
                exact(partner.and_then(|(_, r)| *r)),
                run.status.label().to_string(),
            ];
            let cells: Vec<String> = cells.iter().map(|c| clean(c)).collect();
            text.push_str(&cells.join("\t"));
            text.push('\n');
        }
    }
    text
}

/// Tabs and line breaks inside a cell would break the table.
fn clean(cell: &str) -> String {
    cell.replace(['\t', '\n', '\r'], " ")
}
