//! Builders for small study folders written to a temporary directory.
#![allow(dead_code)]

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

/// The regressor names of a run in a JSON report.
pub fn regressor_names(run: &Value) -> Vec<&str> {
    run["regressors"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["name"].as_str().unwrap())
        .collect()
}

pub struct StudyDir {
    pub dir: tempfile::TempDir,
}

impl StudyDir {
    pub fn new() -> Self {
        StudyDir {
            dir: tempfile::tempdir().unwrap(),
        }
    }

    pub fn file(&self, name: &str, contents: &str) -> &Self {
        let path = self.dir.path().join(name);
        if let Some(parent) = path.parent() {
            std::fs::create_dir_all(parent).unwrap();
        }
        std::fs::write(path, contents).unwrap();
        self
    }

    pub fn path(&self, name: &str) -> PathBuf {
        self.dir.path().join(name)
    }

    pub fn check(&self, args: &[&str]) -> assert_cmd::assert::Assert {
        Command::cargo_bin("tangle")
            .unwrap()
            .current_dir(self.dir.path())
            .arg("check")
            .arg("study.toml")
            .args(args)
            .assert()
    }

    pub fn json(&self, args: &[&str]) -> Value {
        let mut all = vec!["--format", "json"];
        all.extend_from_slice(args);
        let output = self.check(&all).get_output().stdout.clone();
        serde_json::from_slice(&output).expect("JSON output")
    }
}

/// A study file with two events (cue, outcome) and the given models section.
pub fn study_toml(tr: f64, scans: usize, extra: &str) -> String {
    format!(
        r#"[study]
name = "test fixture (invented)"
[acquisition]
tr = {tr}
scans = {scans}
[trials]
file = "trials.csv"
[[event]]
name = "cue"
onset = "cue_onset"
[[event]]
name = "outcome"
onset = "outcome_onset"
{extra}
"#
    )
}

/// A small deterministic generator so fixtures need no random-number crate.
pub struct Lcg(pub u64);

impl Lcg {
    pub fn uniform(&mut self, low: f64, high: f64) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let unit = (self.0 >> 11) as f64 / (1u64 << 53) as f64;
        low + (high - low) * unit
    }
}

/// Wide-form trials: cue, then outcome after `gap()` seconds, then an interval of 3–6 s.
/// Extra columns are filled by `values(trial, rng)`.
pub fn trials_csv(
    subjects: &[&str],
    trials: usize,
    mut gap: impl FnMut(&mut Lcg) -> f64,
    columns: &[&str],
    mut values: impl FnMut(usize, &mut Lcg) -> Vec<String>,
) -> (String, f64) {
    let mut rng = Lcg(42);
    let mut text = format!(
        "subject,run,cue_onset,outcome_onset{}\n",
        columns.iter().map(|c| format!(",{c}")).collect::<String>()
    );
    let mut end: f64 = 0.0;
    for subject in subjects {
        let mut t = 2.0;
        for trial in 0..trials {
            let outcome = t + gap(&mut rng);
            let extra = values(trial, &mut rng);
            text.push_str(&format!(
                "{subject},1,{t:.3},{outcome:.3}{}\n",
                extra.iter().map(|v| format!(",{v}")).collect::<String>()
            ));
            t = outcome + rng.uniform(3.0, 6.0);
        }
        end = end.max(t);
    }
    (text, end)
}

pub fn exists(path: &Path) -> bool {
    path.exists()
}

/// The pairs of two lists compared element by element, after asserting that the lists are
/// equally long: a zip stops at the shorter list, so without the check an empty or short
/// result would compare as equal. `what` names the lists in the failure message.
#[track_caller]
pub fn paired<A, B>(a: A, b: B, what: &str) -> std::iter::Zip<A::IntoIter, B::IntoIter>
where
    A: IntoIterator,
    B: IntoIterator,
    A::IntoIter: ExactSizeIterator,
    B::IntoIter: ExactSizeIterator,
{
    let (a, b) = (a.into_iter(), b.into_iter());
    assert_eq!(a.len(), b.len(), "{what}: the two lists differ in length");
    a.zip(b)
}

/// The demo study with one GLM holding both learners (the design every model shares),
/// written beside a copy of nothing else: the trial table is the repository's.
pub fn demo_with_joint_glm() -> StudyDir {
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data");
    let study = std::fs::read_to_string(demo.join("study.toml"))
        .unwrap()
        .replace(
            "file = \"trials.csv\"",
            &format!("file = {:?}", demo.join("trials.csv").display().to_string()),
        );
    let dir = StudyDir::new();
    dir.file(
        "study.toml",
        &format!("{study}\n[[glm]]\nname = \"both learners\"\nmodels = [\"delta\", \"hybrid\"]\n"),
    );
    dir
}
