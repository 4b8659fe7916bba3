//! The forecast's HTML page, from a real (tiny) forecast: every variant and the
//! verdict are on it, the figures are drawn, no number is printed as NaN or infinity,
//! and a hostile variant name reaches the page only escaped.

use std::sync::OnceLock;

use tangle::files::DiskFiles;
use tangle::forecast::report::ForecastReport;
use tangle::forecast::{read_spec, run_forecast};
use tangle::render::forecast::html::render;

const HOSTILE: &str = "<script>x</script>";

/// Two learners, 2 runs of 30 trials; the planned task and two variants, one of them
/// named like a script tag.
const SPEC: &str = r#"
[forecast]
name = "page test (simulated) & <friends>"
participants = 8
seed = 5

[task]
options = 2
reward_probabilities = [0.8, 0.2]
reversal_every = 10
trials = 30
runs = 2
tr = 1.5
first_cue = 2.0
cue_to_outcome = [2.0, 6.0]
outcome_to_cue = [2.0, 5.0]

[[learner]]
name = "delta"
kind = "delta"
modulators = ["value", "pe"]
[learner.priors]
learning_rate = { beta = [2, 5] }
inverse_temperature = { gamma = [4, 1.25] }

[[learner]]
name = "hybrid"
kind = "hybrid"
modulators = ["value", "pe", "assoc"]
[learner.priors]
learning_rate = { beta = [5, 3] }
associability_rate = { beta = [1.2, 3] }
initial_associability = { uniform = [0.4, 1.0] }
inverse_temperature = { gamma = [4, 1.25] }

[generate]
learner = "hybrid"

[compare]
regressors = ["delta_pe", "hybrid_pe"]
rank_by = "vif"

[[variant]]
name = "outcome 0.5 s after cue"
cue_to_outcome = 0.5

[[variant]]
name = "<script>x</script>"
reward_probabilities = [0.7, 0.3]
"#;

/// The forecast runs once for all tests (it is the slow part).
fn report() -> &'static ForecastReport {
    static REPORT: OnceLock<ForecastReport> = OnceLock::new();
    REPORT.get_or_init(|| {
        let dir = tempfile::tempdir().expect("temporary folder");
        let path = dir.path().join("forecast.toml");
        std::fs::write(&path, SPEC).expect("spec written");
        let spec = read_spec(&DiskFiles, &path, Some(8), None).expect("valid spec");
        run_forecast(&spec, Default::default(), &|| {})
            .expect("the forecast runs")
            .report
    })
}

fn escaped(text: &str) -> String {
    html_escape::encode_text(text).into_owned()
}

#[test]
fn page_shows_every_variant_the_verdict_and_the_cautions() {
    let report = report();
    let page = render(report);
    assert!(page.starts_with("<!doctype html>"));
    assert_eq!(report.variants.len(), 3, "as planned plus two variants");
    for variant in &report.variants {
        assert!(
            page.contains(&escaped(&variant.name)),
            "missing variant {}",
            variant.name
        );
    }
    assert!(
        page.contains(&escaped(&report.verdict)),
        "missing the verdict"
    );
    for caution in &report.cautions {
        assert!(page.contains(&escaped(caution)), "missing a caution");
    }
    assert!(page.matches("<svg").count() >= 2, "both figures");
    assert!(!page.contains("could not be drawn"));
    for id in ["setup", "ranking", "variant-1", "variant-3", "cautions"] {
        assert!(
            page.contains(&format!("<section id=\"{id}\">")),
            "section {id}"
        );
    }
    for focus in &report.forecast.focus {
        assert!(page.contains(focus.as_str()), "focus regressor {focus}");
    }
    assert!(page.contains("rules of thumb"));
    assert!(page.contains("beta(2, 5)"), "the priors are shown");
}

/// Words of letters and digits only, so that "inflation" is not "inf".
fn assert_no_undefined_numbers(page: &str) {
    for token in page.split(|c: char| !c.is_ascii_alphanumeric()) {
        let word = token.to_ascii_lowercase();
        assert!(
            !matches!(word.as_str(), "nan" | "inf" | "infinity"),
            "found {token}"
        );
    }
}

#[test]
fn page_holds_no_undefined_numbers() {
    assert_no_undefined_numbers(&render(report()));
}

#[test]
fn user_strings_reach_the_page_only_escaped() {
    let page = render(report());
    assert!(
        !page.contains(HOSTILE),
        "a raw variant name reached the page"
    );
    assert!(!page.contains("<script"));
    assert!(!page.contains("<friends>"));
    assert!(page.contains("&lt;script&gt;x&lt;/script&gt;"));
    assert!(page.contains("&amp; &lt;friends&gt;"));
    // The figures label the variants too, escaped by the SVG backend.
    let in_figures = page
        .split("<svg")
        .skip(1)
        .filter(|svg| svg.contains("&lt;script&gt;x&lt;/script&gt;"))
        .count();
    assert!(in_figures >= 2, "both figures name the variant, escaped");
}

#[test]
fn undefined_values_render_as_words() {
    // Make every spread of one variant undefined, as if every run had an exact
    // dependency, and check the page says so rather than printing a number.
    let mut report = report().clone();
    let variant = &mut report.variants[0];
    for r in &mut variant.regressors {
        r.vif.median = None;
        r.vif.p10 = None;
        r.vif.p90 = None;
        r.vif.undefined = r.vif.count;
    }
    variant.score = None;
    let page = render(&report);
    assert!(page.contains("undefined"));
    assert!(
        page.contains("median undefined"),
        "the figure names the gap"
    );
    assert_no_undefined_numbers(&page);
}
