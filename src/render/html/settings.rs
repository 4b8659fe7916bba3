//! Settings: every choice the design was built with, and whether each threshold is the
//! usual one.

use std::fmt::Write as _;

use super::{esc, plain, section};
use crate::report::Report;

/// "common practice" where a threshold has the field's usual value, else says that the
/// study set its own.
fn practice(value: f64, usual: f64) -> String {
    if (value - usual).abs() < 1e-12 {
        "common practice".to_string()
    } else {
        format!("set by the study; common practice is {}", plain(usual))
    }
}

pub(super) fn settings(report: &Report) -> String {
    let s = &report.settings;
    let t = &s.thresholds;
    let yes_no = |b: bool| if b { "yes" } else { "no" };
    let high_pass = if s.high_pass > 0.0 {
        format!("{} s cutoff (discrete cosine basis)", s.high_pass)
    } else {
        "off (only the constant is removed)".to_string()
    };
    let rows: Vec<(&str, String, String)> = vec![
        ("study file", format!("<code>{}</code>", esc(&report.study.file)), String::new()),
        ("TR", format!("{} s", s.tr), String::new()),
        ("microtime", format!("{} bins per TR", s.microtime), String::new()),
        ("reference", format!("{} (scans sampled at (k + {})·TR)", s.reference, s.reference), String::new()),
        ("high-pass filter", high_pass, String::new()),
        ("haemodynamic response", esc(&s.hrf.shape), String::new()),
        ("HRF scaling", esc(&s.hrf.scaling), String::new()),
        ("temporal derivatives", yes_no(s.hrf.derivative).to_string(), String::new()),
        ("modulators mean-centred", yes_no(s.centring).to_string(), String::new()),
        ("orthogonalisation", esc(&s.orthogonalisation), String::new()),
        ("noise model", esc(&crate::render::table::noise(s)), if s.noise.ar1.is_some() { "common practice: ρ depends strongly on the TR (shorter TR, larger ρ); an assumed value, not one estimated from these data".to_string() } else { String::new() }),
        ("GLMs", esc(&s.glms.iter().map(|g| format!("{}: {}", g.name, crate::render::table::glm_contents(g))).collect::<Vec<_>>().join("; ")), "each run is assessed in each GLM; separation is measured in the design with every model".to_string()),
        ("VIF caution", plain(t.vif_caution), practice(t.vif_caution, 5.0)),
        ("VIF severe", plain(t.vif_severe), practice(t.vif_severe, 10.0)),
        ("condition index", plain(t.condition_index), practice(t.condition_index, 30.0)),
        ("condition index, severe", plain(t.condition_index_severe), practice(t.condition_index_severe, 100.0)),
        ("shared over own", plain(t.shared_over_unique), "a warning against comparing two models on a modulator whose share with the other model exceeds this many times its own share (tangle's default 1)".to_string()),
        ("space of the diagnostics", esc(&s.diagnostics_space), String::new()),
        ("dependency tolerance", format!("{:e} (relative; below it a direction of the design counts as an exact dependency)", s.dependency_tolerance), String::new()),
    ];
    let mut body = String::from(
        "<table class=\"settings\">\n<thead><tr><th>setting</th><th>value</th><th>note</th></tr></thead>\n<tbody>\n",
    );
    for (name, value, note) in rows {
        let _ = writeln!(
            body,
            "<tr><th scope=\"row\">{name}</th><td>{value}</td><td>{note}</td></tr>"
        );
    }
    body.push_str("</tbody>\n</table>\n");
    section("settings", "Settings", &body)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thresholds_are_labelled_by_whether_they_are_the_usual_ones() {
        assert_eq!(practice(5.0, 5.0), "common practice");
        assert!(practice(4.0, 5.0).contains("common practice is 5"));
    }
}
