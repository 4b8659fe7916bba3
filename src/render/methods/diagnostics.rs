//! The second paragraph: which diagnostics were computed, and the thresholds.

use super::layout::Layout;
use crate::render::numbers::prose_power_of_ten as tolerance;
use crate::render::words::and_list as list;
use crate::report::Report;

pub(super) fn diagnostics_paragraph(report: &Report, layout: &Layout) -> String {
    let settings = &report.settings;
    let thresholds = &settings.thresholds;
    let mut sentences: Vec<String> = Vec::new();

    let mut tools = vec![
        "variance inflation factors (VIF = 1/(1 − R²))".to_string(),
        "condition indices and variance-decomposition proportions (Belsley, Kuh & Welsch, 1980)"
            .to_string(),
    ];
    if layout.has_modulators() {
        tools.push(
            "the generalized VIF of each model's set of modulators (Fox & Monette, 1992)"
                .to_string(),
        );
        tools.push("commonality analysis of each modulator's unique and shared variance (Mood, 1969; Seibold & McPhee, 1979; Nimon et al., 2008)".to_string());
    }
    sentences.push(format!(
        "Redundancy was quantified per run with {}.",
        list(&tools)
    ));
    sentences.push(format!(
        "A column whose residual on the preceding columns had less than {} of its unit length was treated as exactly dependent (severe).",
        tolerance(settings.dependency_tolerance)
    ));
    sentences.push(format!(
        "Following common-practice rules of thumb, an event or modulator VIF ≥ {} marked caution and ≥ {} severe; a condition index ≥ {} with two or more proportions ≥ 0.5 marked a near-dependency (after Belsley et al., 1980; severe from {}); a participant took the worst status of their runs and GLMs.",
        thresholds.vif_caution,
        thresholds.vif_severe,
        thresholds.condition_index,
        thresholds.condition_index_severe
    ));
    if layout.models.len() > 1 {
        sentences.push("How far the models' regressors can be told apart was measured separately, in a design holding every model's modulators: for each modulator, the partial R² on another model's modulators given the task and nuisance regressors and its own model's other modulators, and the trial-level correlation with that model's corresponding quantity. These numbers describe the models' separability on this task, not a defect of either GLM, and set no status.".to_string());
    }
    match settings.orthogonalisation.as_ref() {
        "serial" => sentences.push("Diagnostics were also computed with the modulators serially orthogonalised, which assigns shared variance rather than removing it (Mumford, Poline & Poldrack, 2015); statuses refer to the design as written.".to_string()),
        "within-event" => sentences.push("Diagnostics were also computed with each modulator orthogonalised, at trial level, against the modulators listed before it on its event, which assigns shared variance rather than removing it (Mumford, Poline & Poldrack, 2015); statuses refer to the design as written.".to_string()),
        _ => {}
    }
    sentences.join(" ")
}
