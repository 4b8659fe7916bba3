//! The correlation matrix of the most affected run.

use super::{esc, figure, section};
use crate::render::plots;
use crate::report::Report;

pub(super) fn correlations(report: &Report) -> String {
    let Some(run) = plots::worst_run(report) else {
        return section(
            "correlations",
            "Correlations in the most affected design",
            "<p class=\"note\">No runs were checked.</p>\n",
        );
    };
    let caption = format!(
        "Correlations between all regressors of participant {}, run {} (the participant with the \
         highest VIF, in the run where it occurred), after the constant and the drift basis were \
         projected out. Slate blue: negative, amber: positive, white: none; hatched grey cells \
         marked n/a have no value (a regressor left out of the design). Pairwise correlations \
         show only part of the story: a VIF can be high when no single correlation is.",
        esc(&run.subject),
        esc(&run.run)
    );
    let body = figure(plots::correlation_map(run), &caption);
    section(
        "correlations",
        "Correlations in the most affected design",
        &body,
    )
}
