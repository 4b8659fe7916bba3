//! The methods paragraphs: a snapshot of the demo's text, its numbers checked against the
//! JSON output computed independently here, and studies unlike the demo (no models, no
//! high-pass filter, temporal derivatives, nuisance regressors, one model uncentred).

use assert_cmd::Command;
use serde_json::Value;
use tangle::check::CheckOptions;
use tangle::render::methods;

use crate::common::{StudyDir, regressor_names, study_toml, trials_csv};

fn demo_output(format: &str) -> Vec<u8> {
    let output = Command::cargo_bin("tangle")
        .unwrap()
        .args(["demo", "--format", format])
        .output()
        .unwrap();
    assert!(
        output.status.success() || output.status.code() == Some(3),
        "tangle demo --format {format} failed: {}",
        String::from_utf8_lossy(&output.stderr)
    );
    output.stdout
}

fn demo_text() -> String {
    String::from_utf8(demo_output("methods")).unwrap()
}

fn demo_json() -> Value {
    serde_json::from_slice(&demo_output("json")).unwrap()
}

/// The documented rounding, written again here: two significant digits below 10,
/// whole numbers from 10 on.
fn round_vif(value: f64) -> String {
    if value < 9.95 {
        format!("{value:.1}")
    } else {
        format!("{value:.0}")
    }
}

/// Whole percent between 1% and 99%.
fn round_share(share: f64) -> String {
    let p = share * 100.0;
    assert!((1.0..=99.0).contains(&p), "outside the whole-percent band");
    format!("{p:.0}%")
}

fn median(sorted: &[f64]) -> f64 {
    let n = sorted.len();
    if n % 2 == 1 {
        sorted[n / 2]
    } else {
        (sorted[n / 2 - 1] + sorted[n / 2]) / 2.0
    }
}

/// The VIFs of one regressor over all runs, sorted, and how many runs had none.
fn vifs_over_runs(json: &Value, regressor: &str) -> (Vec<f64>, usize) {
    let mut values = Vec::new();
    let mut undefined = 0;
    for run in json["runs"].as_array().unwrap() {
        let names = regressor_names(run);
        let Some(index) = names.iter().position(|n| *n == regressor) else {
            continue;
        };
        match run["vif"][index].as_f64() {
            Some(v) => values.push(v),
            None => undefined += 1,
        }
    }
    values.sort_by(f64::total_cmp);
    (values, undefined)
}

#[test]
fn demo_methods_text() {
    let report = tangle::demo::check_demo(CheckOptions::default()).unwrap();
    let text = methods::render(&report);
    // The binary prints what the library renders.
    assert_eq!(text, demo_text());
    insta::assert_snapshot!(text);
}

#[test]
fn demo_text_is_pasteable_paragraphs() {
    let text = demo_text();
    assert!(text.ends_with('\n') && !text.ends_with("\n\n"));
    let paragraphs: Vec<&str> = text.trim_end().split("\n\n").collect();
    assert!(
        (2..=4).contains(&paragraphs.len()),
        "{} paragraphs",
        paragraphs.len()
    );
    for paragraph in &paragraphs {
        assert!(!paragraph.contains('\n'), "one paragraph per line");
        assert!(!paragraph.trim().is_empty());
    }
    let words = text.split(|c: char| !c.is_alphanumeric());
    assert!(words.clone().all(|w| w != "NaN" && w != "inf"));
}

#[test]
fn demo_text_states_settings_citations_and_placeholder() {
    let text = demo_text();
    let json = demo_json();
    let settings = &json["settings"];
    let tr = settings["tr"].as_f64().unwrap();
    let cutoff = settings["high_pass"].as_f64().unwrap();
    let microtime = settings["microtime"].as_u64().unwrap();
    assert!(text.contains(&format!("TR = {tr} s")), "TR missing");
    assert!(
        text.contains(&format!("{cutoff} s high-pass filter")),
        "cutoff missing"
    );
    assert!(text.contains(&format!("{microtime} bins per TR")));
    assert!(text.contains("mean-centred within run and event type"));
    for citation in [
        "Friston et al., 1998",
        "Belsley, Kuh & Welsch, 1980",
        "Fox & Monette, 1992",
        "Mood, 1969",
        "Seibold & McPhee, 1979",
        "Nimon et al., 2008",
    ] {
        assert!(text.contains(citation), "{citation} missing");
    }
    assert!(text.contains("10^-6"), "dependency tolerance missing");
    assert!(text.contains("rules of thumb"));
    assert!(text.contains("do not show which model is true"));
    assert!(text.contains(methods::PLACEHOLDER_START));
    // The placeholder asks about flagged participants only when there are some: in
    // the demo's GLMs (one per learner) every participant is ok.
    let cohort = &json["cohort"];
    let flagged = cohort["caution"].as_u64().unwrap() + cohort["severe"].as_u64().unwrap();
    assert_eq!(flagged, 0);
    assert!(text.contains("no participant was flagged"));
    assert!(text.contains("2 GLMs") && text.contains("treated as white"));
    assert!(text.contains("not a defect of either GLM"));

    let thresholds = &settings["thresholds"];
    for (key, prefix) in [
        ("vif_caution", "VIF ≥ "),
        ("vif_severe", "and ≥ "),
        ("condition_index", "condition index ≥ "),
    ] {
        let value = thresholds[key].as_f64().unwrap();
        assert!(text.contains(&format!("{prefix}{value}")), "{key} missing");
    }

    let cohort = &json["cohort"];
    let n = |key: &str| cohort[key].as_u64().unwrap();
    assert!(text.contains(&format!("of {} participants", n("subjects"))));
    assert!(text.contains(&format!("{} runs", n("runs"))));
    assert!(text.contains(&format!(
        "None of the {} participants reached caution or severe status",
        n("ok")
    )));
}

#[test]
fn demo_vif_summary_matches_the_json() {
    let text = demo_text();
    let json = demo_json();
    // One modulator, every number recomputed from the per-run VIFs.
    let (values, undefined) = vifs_over_runs(&json, "delta:delta_pe");
    assert_eq!(undefined, 0);
    assert_eq!(values.len(), 60);
    let expected = format!(
        "delta_pe {} ({}–{})",
        round_vif(median(&values)),
        round_vif(values[0]),
        round_vif(values[values.len() - 1])
    );
    assert!(text.contains(&expected), "expected {expected:?} in\n{text}");
    // And every modulator is listed, in the order of the design.
    let first_run = &json["runs"][0]["regressors"];
    let mut last = 0;
    for regressor in first_run.as_array().unwrap() {
        if regressor["kind"] != "modulator" {
            continue;
        }
        let column = regressor["column"].as_str().unwrap();
        let (values, _) = vifs_over_runs(&json, regressor["name"].as_str().unwrap());
        let item = format!("{column} {} (", round_vif(median(&values)));
        let at = text
            .find(&item)
            .unwrap_or_else(|| panic!("{item:?} missing"));
        assert!(at > last, "{column} out of order");
        last = at;
    }
}

#[test]
fn demo_shares_match_the_cohort_partition() {
    let text = demo_text();
    let json = demo_json();
    let find = |part: &str| {
        json["cohort_partition"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["regressor"] == "delta:delta_pe" && c["part"] == part)
            .unwrap()
            .clone()
    };
    let shared = find("hybrid");
    let own = find("unique");
    let expected = format!(
        "delta_pe shared {} ({}–",
        round_share(shared["median"].as_f64().unwrap()),
        round_share(shared["min"].as_f64().unwrap()).trim_end_matches('%')
    );
    assert!(text.contains(&expected), "expected {expected:?}");
    let kept = format!(
        "with hybrid and kept {}",
        round_share(own["median"].as_f64().unwrap())
    );
    assert!(text.contains(&kept), "expected {kept:?}");
    assert!(text.contains("each participant's mean over runs"));
}

#[test]
fn study_without_models_filter_or_centring_renders() {
    let study = StudyDir::new();
    let extra = r#"
[filter]
high_pass = 0
[hrf]
derivative = true
[nuisance]
file = "confounds/{subject}_run-{run}.tsv"
columns = ["tx", "ty"]
"#;
    study.file("study.toml", &study_toml(2.0, 120, extra));
    let (trials, _) = trials_csv(
        &["01", "02"],
        16,
        |rng| rng.uniform(2.0, 4.0),
        &[],
        |_, _| Vec::new(),
    );
    study.file("trials.csv", &trials);
    let mut rng = crate::common::Lcg(7);
    for subject in ["01", "02"] {
        let mut table = String::from("tx\tty\n");
        for _ in 0..120 {
            table.push_str(&format!(
                "{:.4}\t{:.4}\n",
                rng.uniform(-1.0, 1.0),
                rng.uniform(-1.0, 1.0)
            ));
        }
        study.file(&format!("confounds/{subject}_run-1.tsv"), &table);
    }
    let output = study.check(&["--format", "methods"]).get_output().clone();
    assert!(
        output.status.success() || output.status.code() == Some(3),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    let text = String::from_utf8(output.stdout).unwrap();
    assert!(text.contains("no high-pass filter"), "{text}");
    assert!(text.contains("temporal derivative"));
    assert!(text.contains("no parametric modulators"));
    assert!(text.contains("2 nuisance regressors (tx and ty)"));
    assert!(text.contains("TR = 2 s"));
    assert!(text.contains("event-regressor VIFs"));
    assert!(text.contains(methods::PLACEHOLDER_START));
    // No model-level statistics without models.
    assert!(!text.contains("Fox & Monette"));
    assert!(!text.contains("commonality"));
    assert!(!text.contains("NaN"));
}

#[test]
fn one_uncentred_model_serially_orthogonalised_renders() {
    let study = StudyDir::new();
    let extra = r#"
[[model]]
name = "learner"
modulators = [ { event = "outcome", column = "pe" }, { event = "cue", column = "value" } ]
"#;
    study.file("study.toml", &study_toml(1.0, 300, extra));
    let (trials, _) = trials_csv(
        &["a", "b", "c"],
        30,
        |rng| rng.uniform(2.0, 5.0),
        &["pe", "value"],
        |_, rng| {
            vec![
                format!("{:.3}", rng.uniform(-1.0, 1.0)),
                format!("{:.3}", rng.uniform(0.0, 1.0)),
            ]
        },
    );
    study.file("trials.csv", &trials);
    let output = study
        .check(&[
            "--format",
            "methods",
            "--no-centring",
            "--orthogonalise",
            "serial",
        ])
        .get_output()
        .clone();
    let text = String::from_utf8(output.stdout).unwrap();
    assert!(text.contains("without mean-centring"), "{text}");
    assert!(text.contains("128 s high-pass filter"));
    assert!(text.contains("pe (outcome) and value (cue) of the learner model"));
    assert!(text.contains("Mumford, Poline & Poldrack, 2015"));
    assert!(text.contains("of 3 participants"));
    // One model: its own share, no share "with" another model.
    assert!(text.contains("kept"));
    assert!(!text.contains(" with learner"));
}

#[test]
fn three_models_render_every_pair() {
    let study = StudyDir::new();
    let extra = r#"
[[model]]
name = "first"
modulators = [ { event = "outcome", column = "a" } ]
[[model]]
name = "second"
modulators = [ { event = "outcome", column = "b" } ]
[[model]]
name = "third"
modulators = [ { event = "outcome", column = "c" } ]
"#;
    study.file("study.toml", &study_toml(1.0, 300, extra));
    let (trials, _) = trials_csv(
        &["a", "b"],
        30,
        |rng| rng.uniform(2.0, 5.0),
        &["a", "b", "c"],
        |_, rng| {
            let x = rng.uniform(-1.0, 1.0);
            vec![
                format!("{x:.3}"),
                format!("{:.3}", x + rng.uniform(-0.3, 0.3)),
                format!("{:.3}", rng.uniform(-1.0, 1.0)),
            ]
        },
    );
    study.file("trials.csv", &trials);
    let output = study.check(&["--format", "methods"]).get_output().clone();
    let text = String::from_utf8(output.stdout).unwrap();
    for (own, others) in [
        ("a", ["second", "third"]),
        ("b", ["first", "third"]),
        ("c", ["first", "second"]),
    ] {
        let start = text
            .find(&format!("; {own} shared "))
            .or_else(|| text.find(&format!(", {own} shared ")))
            .unwrap_or_else(|| panic!("{own} missing in\n{text}"));
        let rest = &text[start..];
        let end = rest.find(" and kept ").unwrap();
        for other in others {
            assert!(
                rest[..end].contains(&format!("with {other}")),
                "{own}/{other}"
            );
        }
    }
    assert!(text.contains("comparing the models' estimates cannot decide"));
}
