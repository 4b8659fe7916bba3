//! `--format tsv`: tidy tables, one per kind of result, full precision, `n/a` where a
//! value is undefined. With `--out FILE.tsv` each table is its own file
//! (FILE.tsv for the regressors, FILE.<table>.tsv for the others); on standard output
//! they follow each other, each after a line `# <table>`.

use crate::render::numbers::exact;
use crate::report::Report;
use crate::report::RunReport;

pub struct TsvTable {
    pub name: &'static str,
    pub text: String,
}

struct Builder {
    text: String,
    /// A `session` column after `run`, when any run has a BIDS session.
    sessions: bool,
}

impl Builder {
    /// A table of GLM entries: `header` starts with "subject", "run"; a `session`
    /// column follows when the study has sessions, then `glm`.
    fn new(report: &Report, header: &[&str]) -> Self {
        Builder::with_key(report, header, true)
    }

    /// A table of a run's entries that belong to no one GLM (no `glm` column).
    fn per_run(report: &Report, header: &[&str]) -> Self {
        Builder::with_key(report, header, false)
    }

    fn with_key(report: &Report, header: &[&str], glm: bool) -> Self {
        let sessions = report.runs.iter().any(|r| r.session.is_some());
        let mut header = header.to_vec();
        let mut at = 2;
        if sessions {
            header.insert(at, "session");
            at += 1;
        }
        if glm {
            header.insert(at, "glm");
        }
        Builder {
            text: format!("{}\n", header.join("\t")),
            sessions,
        }
    }

    fn row(&mut self, run: &RunReport, cells: Vec<String>) {
        let mut key = vec![run.glm.as_str()];
        key.extend(cells.iter().map(String::as_str));
        let cells: Vec<String> = key.into_iter().map(str::to_string).collect();
        self.row_of(&run.subject, &run.run, run.session.as_deref(), cells);
    }

    fn row_of(&mut self, subject: &str, run: &str, session: Option<&str>, cells: Vec<String>) {
        let mut all = vec![clean(subject), clean(run)];
        if self.sessions {
            all.push(session.map_or_else(|| "n/a".into(), clean));
        }
        all.extend(cells.iter().map(|c| clean(c)));
        self.text.push_str(&all.join("\t"));
        self.text.push('\n');
    }

    fn done(self, name: &'static str) -> TsvTable {
        TsvTable {
            name,
            text: self.text,
        }
    }
}

fn text(value: &Option<String>) -> String {
    value.clone().unwrap_or_else(|| "n/a".into())
}

pub fn render(report: &Report) -> Vec<TsvTable> {
    vec![
        regressors(report),
        dimensions(report),
        model_sets(report),
        contrasts(report),
        dependencies(report),
        partition(report),
        model_overlap(report),
        signal(report),
        flags(report),
        separations(report),
        model_shares(report),
        subjects(report),
        cohort_partition(report),
        separation_summary(report),
    ]
}

/// Everything on standard output, one table after another.
pub fn render_joined(report: &Report) -> String {
    join(&render(report))
}

/// The tables one after another, each after the first under a line `# <table>`.
pub fn join(tables: &[TsvTable]) -> String {
    let mut text = String::new();
    for (i, table) in tables.iter().enumerate() {
        if i > 0 {
            text.push_str(&format!("\n# {}\n", table.name));
        }
        text.push_str(&table.text);
    }
    text
}

fn regressors(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
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
            "efficiency",
            "status",
            "most_correlated",
            "r",
            "vif_serial",
            "run_status",
        ],
    );
    for run in &report.runs {
        for (index, entry) in run.regressors.iter().enumerate() {
            let regressor = &entry.regressor;
            let partner = run.views.partners[index];
            table.row(
                run,
                vec![
                    regressor.name.clone(),
                    regressor.kind.label().to_string(),
                    text(&regressor.event),
                    text(&regressor.model),
                    text(&regressor.column),
                    entry.in_design.to_string(),
                    exact(run.vif[index]),
                    exact(run.se_inflation[index]),
                    exact(run.efficiency[index]),
                    entry.status.label().to_string(),
                    partner.map_or("n/a".into(), |(other, _)| {
                        run.regressors[other].regressor.name.clone()
                    }),
                    exact(partner.map(|(_, r)| r)),
                    exact(run.orthogonalised.as_ref().and_then(|view| view.vif[index])),
                    run.status.label().to_string(),
                ],
            );
        }
    }
    table.done("regressors")
}

fn dimensions(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "dimension",
            "condition_index",
            "regressor",
            "proportion",
            "entangled",
        ],
    );
    for run in &report.runs {
        for (k, (index, row)) in run
            .condition_indices
            .iter()
            .zip(&run.variance_proportions)
            .enumerate()
        {
            let entangled = run
                .entangled_dimensions
                .iter()
                .find(|d| d.dimension == k + 1);
            for (j, proportion) in row.iter().enumerate() {
                let Some(proportion) = proportion else {
                    continue;
                };
                let name = &run.regressors[j].regressor.name;
                let loads = entangled.is_some_and(|d| d.regressors.contains(name));
                table.row(
                    run,
                    vec![
                        (k + 1).to_string(),
                        index.to_string(),
                        name.clone(),
                        proportion.to_string(),
                        loads.to_string(),
                    ],
                );
            }
        }
    }
    table.done("dimensions")
}

fn model_sets(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "model",
            "df",
            "gvif",
            "gvif_scaled",
            "regressors",
        ],
    );
    for run in &report.runs {
        for set in &run.model_sets {
            table.row(
                run,
                vec![
                    set.model.clone(),
                    set.df.to_string(),
                    exact(set.gvif),
                    exact(set.gvif_scaled),
                    set.regressors.join(","),
                ],
            );
        }
    }
    table.done("model_sets")
}

fn contrasts(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "contrast",
            "first",
            "second",
            "efficiency",
            "variance_inflation",
        ],
    );
    for run in &report.runs {
        for contrast in &run.contrasts {
            table.row(
                run,
                vec![
                    contrast.name.clone(),
                    contrast.regressors[0].clone(),
                    contrast.regressors[1].clone(),
                    exact(contrast.efficiency),
                    exact(contrast.variance_inflation),
                ],
            );
        }
    }
    table.done("contrasts")
}

fn dependencies(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &["subject", "run", "dependency", "regressor", "coefficient"],
    );
    for run in &report.runs {
        for (number, dependency) in run.dependencies.iter().enumerate() {
            for (name, coefficient) in dependency.regressors.iter().zip(&dependency.coefficients) {
                table.row(
                    run,
                    vec![
                        (number + 1).to_string(),
                        name.clone(),
                        coefficient.to_string(),
                    ],
                );
            }
        }
    }
    table.done("dependencies")
}

fn flags(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "severity",
            "code",
            "regressors",
            "message",
        ],
    );
    for run in &report.runs {
        for flag in &run.flags {
            table.row(
                run,
                vec![
                    flag.severity.label().to_string(),
                    flag.code.to_string(),
                    flag.regressors.join(","),
                    flag.message.clone(),
                ],
            );
        }
    }
    table.done("flags")
}

fn partition(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "regressor",
            "r2",
            "unique",
            "groups",
            "share",
        ],
    );
    for run in &report.runs {
        for partition in &run.partition {
            for component in &partition.components {
                table.row(
                    run,
                    vec![
                        partition.regressor.clone(),
                        exact(partition.r2),
                        exact(partition.unique),
                        component.groups.join("+"),
                        component.share.to_string(),
                    ],
                );
            }
        }
    }
    table.done("partition")
}

fn model_overlap(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject",
            "run",
            "first",
            "second",
            "canonical_correlations",
            "first_explained_by_second",
            "second_explained_by_first",
        ],
    );
    for run in &report.runs {
        for overlap in &run.model_overlap {
            let correlations: Vec<String> = overlap
                .canonical_correlations
                .iter()
                .map(f64::to_string)
                .collect();
            table.row(
                run,
                vec![
                    overlap.models[0].clone(),
                    overlap.models[1].clone(),
                    correlations.join(","),
                    overlap.explained[0].to_string(),
                    overlap.explained[1].to_string(),
                ],
            );
        }
    }
    table.done("model_overlap")
}

fn signal(report: &Report) -> TsvTable {
    let mut table = Builder::new(
        report,
        &[
            "subject", "run", "region", "r2", "r2_base", "groups", "share", "low", "high",
        ],
    );
    for run in &report.runs {
        for region in &run.signal {
            for c in &region.components {
                table.row(
                    run,
                    vec![
                        region.region.clone(),
                        region.r2.to_string(),
                        region.r2_base.to_string(),
                        c.groups.join("+"),
                        c.share.to_string(),
                        c.low.to_string(),
                        c.high.to_string(),
                    ],
                );
            }
        }
    }
    table.done("signal")
}

/// Tables of the whole cohort have no run columns.
pub(crate) fn plain_table(header: &[&str], rows: Vec<Vec<String>>, name: &'static str) -> TsvTable {
    let mut text = format!("{}\n", header.join("\t"));
    for row in rows {
        let cells: Vec<String> = row.iter().map(|c| clean(c)).collect();
        text.push_str(&cells.join("\t"));
        text.push('\n');
    }
    TsvTable { name, text }
}

fn subjects(report: &Report) -> TsvTable {
    let rows = report
        .subjects
        .iter()
        .map(|s| {
            vec![
                s.subject.clone(),
                exact(s.worst_vif),
                text(&s.worst_regressor),
                text(&s.worst_run),
                text(&s.worst_glm),
                exact(s.worst_condition_index),
                text(&s.largest_shared.as_ref().map(|l| l.regressor.clone())),
                text(&s.largest_shared.as_ref().map(|l| l.model.clone())),
                exact(s.largest_shared.as_ref().map(|l| l.share)),
                s.status.label().to_string(),
                s.runs_flagged.join(","),
            ]
        })
        .collect();
    plain_table(
        &[
            "subject",
            "worst_vif",
            "worst_regressor",
            "worst_run",
            "worst_glm",
            "worst_condition_index",
            "largest_shared_regressor",
            "largest_shared_model",
            "largest_shared",
            "status",
            "runs_flagged",
        ],
        rows,
        "subjects",
    )
}

fn cohort_partition(report: &Report) -> TsvTable {
    let rows = report
        .cohort_partition
        .iter()
        .map(|c| {
            vec![
                c.regressor.clone(),
                c.part.clone(),
                c.participants.to_string(),
                c.median.to_string(),
                c.min.to_string(),
                c.max.to_string(),
            ]
        })
        .collect();
    plain_table(
        &["regressor", "part", "participants", "median", "min", "max"],
        rows,
        "cohort_partition",
    )
}

fn separations(report: &Report) -> TsvTable {
    let mut table = Builder::per_run(
        report,
        &[
            "subject",
            "run",
            "model",
            "other_model",
            "regressor",
            "partial_r2",
            "corresponding",
            "trial_correlation",
            "canonical_correlations",
        ],
    );
    for entry in &report.separations {
        let s = &entry.separation;
        let canonical: Vec<String> = s
            .canonical_correlations
            .iter()
            .map(f64::to_string)
            .collect();
        for m in &s.modulators {
            table.row_of(
                &entry.subject,
                &entry.run,
                entry.session.as_deref(),
                vec![
                    s.models[0].clone(),
                    s.models[1].clone(),
                    m.regressor.clone(),
                    exact(m.partial_r2),
                    text(&m.corresponding),
                    exact(m.trial_correlation),
                    canonical.join(","),
                ],
            );
        }
    }
    table.done("separations")
}

fn model_shares(report: &Report) -> TsvTable {
    let mut table = Builder::per_run(
        report,
        &[
            "subject",
            "run",
            "regressor",
            "r2",
            "unique",
            "groups",
            "share",
        ],
    );
    for entry in &report.model_shares {
        let p = &entry.partition;
        for component in &p.components {
            table.row_of(
                &entry.subject,
                &entry.run,
                entry.session.as_deref(),
                vec![
                    p.regressor.clone(),
                    exact(p.r2),
                    exact(p.unique),
                    component.groups.join("+"),
                    component.share.to_string(),
                ],
            );
        }
    }
    table.done("model_shares")
}

fn separation_summary(report: &Report) -> TsvTable {
    let rows = report
        .separation_summary
        .iter()
        .map(|s| {
            vec![
                s.models[0].clone(),
                s.models[1].clone(),
                s.regressor.clone(),
                s.participants.to_string(),
                exact(s.partial_r2.median),
                exact(s.partial_r2.min),
                exact(s.partial_r2.max),
                exact(s.trial_correlation.median),
                exact(s.trial_correlation.min),
                exact(s.trial_correlation.max),
            ]
        })
        .collect();
    plain_table(
        &[
            "model",
            "other_model",
            "regressor",
            "participants",
            "partial_r2_median",
            "partial_r2_min",
            "partial_r2_max",
            "trial_correlation_median",
            "trial_correlation_min",
            "trial_correlation_max",
        ],
        rows,
        "separation_summary",
    )
}

/// Tabs and line breaks inside a cell would break the table.
pub(crate) fn clean(cell: &str) -> String {
    cell.replace(['\t', '\n', '\r'], " ")
}
