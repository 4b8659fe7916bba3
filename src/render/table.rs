//! `--format table` (the default): a compact block per run and a per-participant
//! summary, for reading in a terminal.

use crate::flags::FlagCode;
use comfy_table::{CellAlignment, ContentArrangement, LineStyle, Table, TableStyle};

use super::numbers::{percent_tenths, prose_percent, ratio};
use crate::report::Report;
use crate::report::RunReport;

/// Plain-words cautions printed under every table.
pub const READING_NOTES: &str = "\
How to read these numbers
  - VIF is how many times a regressor's variance is inflated by its overlap with the other
    regressors; its standard error grows by the square root of the VIF (the 'SE x' column).
  - The 5 and 10 thresholds are common-practice rules of thumb, not laws: a high VIF costs
    precision, it does not by itself make an effect undetectable or a design invalid.
  - Redundancy statistics do not tell which model is true. Follow your analysis plan and
    ask a statistician before excluding participants or changing models.";

pub fn render(report: &Report) -> String {
    let mut text = String::new();
    let settings = &report.settings;
    text.push_str(&format!(
        "{} — {} participants, {} runs\nTR {} s, microtime {} bins, reference {}, high-pass {} s, modulators {}, noise {}\n{}.\n\n",
        report.study.name,
        report.cohort.subjects,
        report.cohort.runs,
        settings.tr,
        settings.microtime,
        settings.reference,
        if settings.high_pass > 0.0 { settings.high_pass.to_string() } else { "off".into() },
        if settings.centring { "mean-centred" } else { "not centred" },
        noise(settings),
        settings.diagnostics_space
    ));
    for glm in &settings.glms {
        text.push_str(&format!("GLM \"{}\": {}\n\n", glm.name, glm_contents(glm)));
        for run in report.runs.iter().filter(|r| r.glm == glm.name) {
            text.push_str(&run_block(run));
            text.push('\n');
        }
    }
    text.push_str(&separation_tables(report));
    text.push_str(&subject_table(report));
    text.push_str(&subject_partition(report));
    text.push_str(&cohort_partition(report));
    text.push_str(&format!(
        "\n{} ok, {} caution, {} severe (of {} participants)\n\n{}\n",
        report.cohort.statuses.ok,
        report.cohort.statuses.caution,
        report.cohort.statuses.severe,
        report.cohort.subjects,
        READING_NOTES
    ));
    let comparisons_unsupported = report.runs.iter().any(|r| {
        r.flags
            .iter()
            .any(|f| f.code == FlagCode::SharedExceedsUnique)
    });
    if comparisons_unsupported {
        let note = wrap(&report.claims_note, 90, "  ");
        text.push_str(&format!("\nComparing models\n{note}\n"));
    }
    if let Some(caution) = report.runs.iter().find_map(|r| r.orthogonalised.as_ref()) {
        let note = wrap(&caution.caution, 90, "  ");
        text.push_str(&format!("\nAbout 'VIF {}'\n{note}\n", caution.method));
    }
    if has_suppression(report) {
        let note = wrap(SUPPRESSION_NOTE, 90, "  ");
        text.push_str(&format!("\nNegative components\n{note}\n"));
    }
    text
}

/// Said where a commonality component is negative.
pub const SUPPRESSION_NOTE: &str = "A negative component is suppression: together, those groups explain less of the modulator than their parts alone would (each group's share is counted once in the components, so they still sum to 100% with the own share). It is a property of the design, not an error (Ray-Mukherjee et al. 2014).";

fn has_suppression(report: &Report) -> bool {
    report
        .runs
        .iter()
        .flat_map(|r| &r.partition)
        .flat_map(|p| &p.components)
        .any(|c| c.share < 0.0)
}

/// The noise model in words.
pub(crate) fn noise(settings: &crate::report::Settings) -> String {
    match settings.noise.ar1 {
        Some(rho) => format!("AR(1) with coefficient {rho} (prewhitened)"),
        None => "white".to_string(),
    }
}

/// What a GLM holds, in words.
pub(crate) fn glm_contents(glm: &crate::study::GlmSpec) -> String {
    if glm.models.is_empty() {
        "the events' regressors (no model)".to_string()
    } else {
        format!(
            "the events' regressors and the modulators of {}",
            glm.models.join(", ")
        )
    }
}

/// The models' separation: the cohort's summary, then every run.
fn separation_tables(report: &Report) -> String {
    if report.separation_summary.is_empty() {
        return String::new();
    }
    let mut summary = new_table(&[
        "modulator",
        "against",
        "partial R² median",
        "range",
        "trial r median",
        "range",
        "participants",
    ]);
    for s in &report.separation_summary {
        let range = |r: &crate::cohort::Range| match (r.min, r.max) {
            (Some(low), Some(high)) => format!("{}–{}", prose_percent(low), prose_percent(high)),
            _ => "undefined".to_string(),
        };
        summary.add_row(vec![
            s.regressor.clone(),
            s.models[1].clone(),
            s.partial_r2
                .median
                .map_or("undefined".into(), prose_percent),
            range(&s.partial_r2),
            s.trial_correlation
                .median
                .map_or("—".into(), |r| format!("{r:.2}")),
            match (s.trial_correlation.min, s.trial_correlation.max) {
                (Some(low), Some(high)) => format!("{low:.2} to {high:.2}"),
                _ => "—".to_string(),
            },
            s.participants.to_string(),
        ]);
    }
    let mut runs = new_table(&[
        "subject",
        "run",
        "modulator",
        "against",
        "partial R²",
        "trial r",
        "canonical r",
    ]);
    for entry in &report.separations {
        let canonical: Vec<String> = entry
            .separation
            .canonical_correlations
            .iter()
            .map(|r| format!("{r:.2}"))
            .collect();
        for m in &entry.separation.modulators {
            runs.add_row(vec![
                entry.subject.clone(),
                entry.run.clone(),
                m.regressor.clone(),
                entry.separation.models[1].clone(),
                m.partial_r2.map_or("undefined".into(), prose_percent),
                m.trial_correlation
                    .map_or("n/a".into(), |r| format!("{r:.2}")),
                canonical.join(", "),
            ]);
        }
    }
    format!(
        "Telling the models apart (in the design with every model; sets no status)\n{}\n\n{summary}\n\n{runs}\n\n",
        wrap(SEPARATION_NOTE, 90, "  ")
    )
}

/// What the separation numbers are, said with them.
pub const SEPARATION_NOTE: &str = "Partial R²: the share of what a modulator has left after everything else in its own GLM (task, nuisance, its model's other modulators) that the other model's modulators reproduce. Near 100%, the two models predict nearly the same signal on it, so comparing their GLMs there rests on the small remainder; how often an analysis would still pick the right model depends on scans, participants and effect size, which these numbers do not decide. The trial r is the correlation of the two models' corresponding quantities across trials, before convolution.";

/// Our layout: a rule under the header and one under the last row, nothing else.
const COMPACT: TableStyle = TableStyle::new()
    .header_separator(LineStyle::none().fill('─').junction('─'))
    .bottom_border(LineStyle::none().fill('─').junction('─'));

/// Per participant and modulator (means over runs): its own share, what it shares with
/// the other models, and what it shares with the task's timing.
fn subject_partition(report: &Report) -> String {
    use crate::cohort::partition::UNIQUE;
    use crate::diagnose::partition::TASK;
    let shares = &report.subject_partition;
    if shares.is_empty() {
        return String::new();
    }
    let mut table = new_table(&[
        "subject",
        "modulator",
        "own",
        "shared with other models",
        "shared with task",
    ]);
    let mut seen: Vec<(&str, &str)> = Vec::new();
    for share in shares {
        let key = (share.subject.as_str(), share.regressor.as_str());
        if seen.contains(&key) {
            continue;
        }
        seen.push(key);
        let of = |part: &str| {
            shares
                .iter()
                .find(|s| (s.subject.as_str(), s.regressor.as_str()) == key && s.part == part)
        };
        let own_model = share.model.as_deref().unwrap_or_default();
        let others: Vec<String> = shares
            .iter()
            .filter(|s| (s.subject.as_str(), s.regressor.as_str()) == key)
            .filter(|s| {
                ![
                    UNIQUE,
                    TASK,
                    crate::diagnose::partition::NUISANCE,
                    own_model,
                ]
                .contains(&s.part.as_str())
            })
            .map(|s| format!("{} {}", s.part, percent_tenths(s.mean)))
            .collect();
        table.add_row(vec![
            share.subject.clone(),
            share.regressor.clone(),
            of(UNIQUE).map_or("undefined".into(), |s| percent_tenths(s.mean)),
            others.join(", "),
            of(TASK).map_or(String::new(), |s| percent_tenths(s.mean)),
        ]);
    }
    format!("\nOwn and shared variance per participant (means over runs)\n{table}\n")
}

/// Per modulator: its unique share and what it shares, across participants.
fn cohort_partition(report: &Report) -> String {
    if report.cohort_partition.is_empty() {
        return String::new();
    }
    let mut table = new_table(&["modulator", "part", "median", "range", "participants"]);
    for share in &report.cohort_partition {
        let part = if share.part == "unique" {
            "own (unique)".to_string()
        } else {
            format!("shared with {}", share.part)
        };
        table.add_row(vec![
            share.regressor.clone(),
            part,
            percent_tenths(share.median),
            format!(
                "{}–{}",
                percent_tenths(share.min),
                percent_tenths(share.max)
            ),
            share.participants.to_string(),
        ]);
    }
    format!(
        "\nShared and unique variance of each modulator (participant means over runs)\n{table}\n"
    )
}

/// Greedy word wrap for notes printed in a terminal.
pub(crate) fn wrap(text: &str, width: usize, indent: &str) -> String {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.len() + word.len() + 1 > width {
            lines.push(format!("{indent}{line}"));
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(format!("{indent}{line}"));
    }
    lines.join("\n")
}

pub(crate) fn new_table(header: &[&str]) -> Table {
    let mut table = Table::new();
    table
        .load_style(COMPACT)
        .set_content_arrangement(ContentArrangement::Disabled)
        .set_header(header.to_vec());
    table
}

fn run_block(run: &RunReport) -> String {
    let serial = run.orthogonalised.as_ref();
    let mut header = vec!["regressor", "kind", "model", "VIF", "SE x", "status"];
    let serial_heading = serial.map(|view| format!("VIF {}", view.method));
    if let Some(heading) = &serial_heading {
        header.push(heading);
    }
    let mut table = new_table(&header);
    for (index, entry) in run.regressors.iter().enumerate() {
        let regressor = &entry.regressor;
        let status = if entry.in_design {
            entry.status.label()
        } else {
            "left out"
        };
        let mut row = vec![
            regressor.name.clone(),
            regressor.kind.label().to_string(),
            regressor.model.clone().unwrap_or_default(),
            ratio(run.vif[index]),
            ratio(run.se_inflation[index]),
            status.to_string(),
        ];
        if let Some(view) = serial {
            row.push(ratio(view.vif[index]));
        }
        table.add_row(row);
    }
    for column in [3, 4, 6] {
        if let Some(column) = table.column_mut(column) {
            column.set_cell_alignment(CellAlignment::Right);
        }
    }
    let session = run
        .session
        .as_ref()
        .map_or_else(String::new, |s| format!(" · session {s}"));
    let mut text = format!(
        "subject {}{session} · run {} · GLM {} · {} scans · {} drift columns removed · {}\n{table}\n",
        run.subject,
        run.run,
        run.glm,
        run.scans,
        run.drift_columns,
        run.status.label()
    );
    text.push_str(&entanglement(run));
    // Entangled dimensions are shown above; the other flags follow, most serious first.
    let mut flags: Vec<_> = run
        .flags
        .iter()
        .filter(|f| f.code != FlagCode::NearDependency)
        .collect();
    flags.sort_by_key(|flag| std::cmp::Reverse(flag.severity));
    for flag in flags {
        text.push_str(&format!("  {}: {}\n", flag.severity.label(), flag.message));
    }
    if let Some(view) = serial {
        text.push_str(&format!(
            "  'VIF {}': modulators orthogonalised in the order {} (see the note at the end)\n",
            view.method,
            view.order.join(" → ")
        ));
    }
    text
}

/// The anatomy of a run's redundancy: near-dependencies, model sets, model differences.
fn entanglement(run: &RunReport) -> String {
    let mut text = String::new();
    for (dimension, severity) in run
        .entangled_dimensions
        .iter()
        .zip(&run.views.dimension_severity)
    {
        let severity = severity.label();
        let members: Vec<String> = dimension
            .regressors
            .iter()
            .zip(&dimension.proportions)
            .map(|(name, p)| format!("{name} {p:.2}"))
            .collect();
        text.push_str(&format!(
            "  {severity}: entangled dimension {} (condition index {:.1}): {}\n",
            dimension.dimension,
            dimension.condition_index,
            members.join(", ")
        ));
    }
    let sets: Vec<String> = run
        .model_sets
        .iter()
        .map(|set| {
            format!(
                "{} GVIF {} (scaled {}, {} modulators)",
                set.model,
                ratio(set.gvif),
                ratio(set.gvif_scaled),
                set.df
            )
        })
        .collect();
    if !sets.is_empty() {
        text.push_str(&format!("  model sets: {}\n", sets.join("; ")));
    }
    for partition in &run.partition {
        let Some(unique) = partition.unique else {
            text.push_str(&format!(
                "  variance of {}: undefined (see the flags)\n",
                partition.regressor
            ));
            continue;
        };
        let own_model = partition.model.as_deref().unwrap_or_default();
        let parts: Vec<String> = partition
            .components
            .iter()
            .map(|c| {
                let groups: Vec<String> = c
                    .groups
                    .iter()
                    .map(|g| {
                        if g == own_model {
                            format!("{g} (own model)")
                        } else {
                            g.clone()
                        }
                    })
                    .collect();
                let only = if c.groups.len() == 1 { "only " } else { "" };
                format!("{only}{} {}", groups.join(" & "), percent_tenths(c.share))
            })
            .collect();
        text.push_str(&format!(
            "  variance of {}: own {}; {}\n",
            partition.regressor,
            percent_tenths(unique),
            parts.join("; ")
        ));
    }
    for overlap in &run.model_overlap {
        let correlations: Vec<String> = overlap
            .canonical_correlations
            .iter()
            .map(|r| format!("{r:.2}"))
            .collect();
        text.push_str(&format!(
            "  models {} and {} (task and nuisance partialled out): canonical r {}; {} explains {} of {}'s set, {} explains {} of {}'s\n",
            overlap.models[0],
            overlap.models[1],
            correlations.join(", "),
            overlap.models[1],
            percent_tenths(overlap.explained[0]),
            overlap.models[0],
            overlap.models[0],
            percent_tenths(overlap.explained[1]),
            overlap.models[1]
        ));
    }
    for region in &run.signal {
        let parts: Vec<String> = region
            .components
            .iter()
            .map(|c| {
                let label = if c.groups.len() == 1 {
                    format!("unique to {}", c.groups[0])
                } else {
                    format!("shared by {}", c.groups.join("+"))
                };
                format!(
                    "{label} {} [{} to {}]",
                    percent_tenths(c.share),
                    percent_tenths(c.low),
                    percent_tenths(c.high)
                )
            })
            .collect();
        text.push_str(&format!(
            "  region {}: the design explains {} of its variance (task and nuisance alone {}); {}\n",
            region.region,
            percent_tenths(region.r2),
            percent_tenths(region.r2_base),
            parts.join(", ")
        ));
    }
    for contrast in &run.contrasts {
        text.push_str(&format!(
            "  difference {}: variance {}× that of two uncorrelated regressors\n",
            contrast.name,
            ratio(contrast.variance_inflation)
        ));
    }
    text
}

fn subject_table(report: &Report) -> String {
    let mut table = new_table(&[
        "subject",
        "worst VIF",
        "regressor",
        "run",
        "GLM",
        "worst CI",
        "most shared with another model",
        "status",
        "runs flagged",
    ]);
    for subject in &report.subjects {
        let shared = subject.largest_shared.as_ref().map_or(String::new(), |s| {
            format!(
                "{} {} with {} (run {})",
                s.regressor,
                percent_tenths(s.share),
                s.model,
                s.run
            )
        });
        table.add_row(vec![
            subject.subject.clone(),
            ratio(subject.worst_vif),
            subject.worst_regressor.clone().unwrap_or_default(),
            subject.worst_run.clone().unwrap_or_default(),
            subject.worst_glm.clone().unwrap_or_default(),
            ratio(subject.worst_condition_index),
            shared,
            subject.status.label().to_string(),
            subject.runs_flagged.join(", "),
        ]);
    }
    for column in [1, 5] {
        if let Some(column) = table.column_mut(column) {
            column.set_cell_alignment(CellAlignment::Right);
        }
    }
    format!(
        "Participants (worst over runs and GLMs; CI: largest condition index of the filtered design; shares with other models in the design with every model)\n{table}\n"
    )
}
