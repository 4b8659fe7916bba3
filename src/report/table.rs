//! `--format table` (the default): a compact block per run and a per-participant
//! summary, for reading in a terminal.

use comfy_table::{CellAlignment, ContentArrangement, LineStyle, Table, TableStyle};

use super::Report;
use super::format::ratio;
use super::model::RunReport;
use crate::flags::Severity;

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
        super::model::DIAGNOSTICS_SPACE
    ));
    for run in &report.runs {
        text.push_str(&run_block(run));
        text.push('\n');
    }
    text.push_str(&subject_table(report));
    text.push_str(&format!(
        "\n{} ok, {} caution, {} severe (of {} participants)\n\n{}\n",
        report.cohort.ok,
        report.cohort.caution,
        report.cohort.severe,
        report.cohort.subjects,
        READING_NOTES
    ));
    text
}

/// Our layout: a rule under the header and one under the last row, nothing else.
const COMPACT: TableStyle = TableStyle::new()
    .header_separator(LineStyle::none().fill('─').junction('─'))
    .bottom_border(LineStyle::none().fill('─').junction('─'));

fn new_table(header: &[&str]) -> Table {
    let mut table = Table::new();
    table
        .load_style(COMPACT)
        .set_content_arrangement(ContentArrangement::Disabled)
        .set_header(header.to_vec());
    table
}

fn run_block(run: &RunReport) -> String {
    let mut table = new_table(&["regressor", "kind", "model", "VIF", "SE x", "status"]);
    for (index, entry) in run.regressors.iter().enumerate() {
        let regressor = &entry.regressor;
        let status = if !entry.in_design {
            "left out"
        } else {
            entry.status.label()
        };
        table.add_row(vec![
            regressor.name.clone(),
            regressor.kind.label().to_string(),
            regressor.model.clone().unwrap_or_default(),
            ratio(run.vif[index]),
            ratio(run.se_inflation[index]),
            status.to_string(),
        ]);
    }
    for column in [3, 4] {
        if let Some(column) = table.column_mut(column) {
            column.set_cell_alignment(CellAlignment::Right);
        }
    }
    let mut text = format!(
        "subject {} · run {} · {} scans · {} drift columns removed · {}\n{table}\n",
        run.subject,
        run.run,
        run.scans,
        run.drift_columns,
        run.status.label()
    );
    for flag in run.flags.iter().filter(|f| f.severity > Severity::Note) {
        text.push_str(&format!("  {}: {}\n", flag.severity.label(), flag.message));
    }
    let notes = run.flags.iter().filter(|f| f.severity == Severity::Note);
    for flag in notes {
        text.push_str(&format!("  note: {}\n", flag.message));
    }
    text
}

fn subject_table(report: &Report) -> String {
    let mut table = new_table(&[
        "subject",
        "worst VIF",
        "regressor",
        "run",
        "status",
        "runs flagged",
    ]);
    for subject in &report.subjects {
        table.add_row(vec![
            subject.subject.clone(),
            ratio(subject.worst_vif),
            subject.worst_regressor.clone().unwrap_or_default(),
            subject.worst_run.clone().unwrap_or_default(),
            subject.status.label().to_string(),
            subject.runs_flagged.join(", "),
        ]);
    }
    if let Some(column) = table.column_mut(1) {
        column.set_cell_alignment(CellAlignment::Right);
    }
    format!("Participants\n{table}\n")
}
