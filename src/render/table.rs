//! `--format table` (the default): a compact block per run and a per-participant
//! summary, for reading in a terminal.

use crate::flags::FlagCode;
use comfy_table::{CellAlignment, ContentArrangement, LineStyle, Table, TableStyle};

use super::numbers::{percent_tenths, ratio};
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
        "{} — {} participants, {} runs\nTR {} s, microtime {} bins, reference {}, high-pass {} s, modulators {}\n{}.\n\n",
        report.study.name,
        report.cohort.subjects,
        report.cohort.runs,
        settings.tr,
        settings.microtime,
        settings.reference,
        if settings.high_pass > 0.0 { settings.high_pass.to_string() } else { "off".into() },
        if settings.centring { "mean-centred" } else { "not centred" },
        crate::report::DIAGNOSTICS_SPACE
    ));
    for run in &report.runs {
        text.push_str(&run_block(run));
        text.push('\n');
    }
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
    if report.settings.orthogonalisation != "none" {
        let note = wrap(crate::report::ORTHOGONALISATION_CAUTION, 90, "  ");
        text.push_str(&format!("\nAbout 'VIF serial'\n{note}\n"));
    }
    text
}

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
    if serial.is_some() {
        header.push("VIF serial");
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
        "subject {}{session} · run {} · {} scans · {} drift columns removed · {}\n{table}\n",
        run.subject,
        run.run,
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
            "  'VIF serial': modulators orthogonalised in the order {} (see the note at the end)\n",
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
        let shared: Vec<String> = partition
            .shared_with
            .iter()
            .map(|g| {
                let own = if g.group == own_model {
                    " (own model)"
                } else {
                    ""
                };
                format!("with {}{own} {}", g.group, percent_tenths(g.share))
            })
            .collect();
        text.push_str(&format!(
            "  variance of {}: {} its own; shared {}\n",
            partition.regressor,
            percent_tenths(unique),
            shared.join(", ")
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
            ratio(subject.worst_condition_index),
            shared,
            subject.status.label().to_string(),
            subject.runs_flagged.join(", "),
        ]);
    }
    for column in [1, 4] {
        if let Some(column) = table.column_mut(column) {
            column.set_cell_alignment(CellAlignment::Right);
        }
    }
    format!("Participants (CI: largest condition index of the filtered design)\n{table}\n")
}
