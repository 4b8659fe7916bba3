//! The bad-input catalogue: every folder of `tests/bad_inputs/` is one case — its input
//! files and a `case.toml` naming the command, the exit code and the text standard error
//! must hold (the file, the line/column or key, a hint). Adding a case is adding a folder;
//! see `tests/bad_inputs/README.md`.
//!
//! Every case is copied to a temporary folder first (so nothing is written into the
//! repository), large or binary inputs are generated there by name (`generate = [...]`),
//! and every case must be free of panic text.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::time::Instant;

use assert_cmd::Command;

/// Text that must never reach a user, whatever the input.
const PANIC_TEXT: [&str; 5] = [
    "panicked",
    "internal error",
    "RUST_BACKTRACE",
    "unwrap()",
    "stack backtrace",
];

struct Case {
    name: String,
    args: Vec<String>,
    exit: i32,
    stderr: Vec<String>,
    stderr_absent: Vec<String>,
    /// Text of the message that says how to fix the input (a hint, a suggestion).
    fix: Option<String>,
    /// The number of problems the message must announce ("N problems in the input").
    problems: Option<usize>,
    generate: Vec<String>,
    /// Files that must be byte-for-byte the same after the run.
    unchanged: Vec<String>,
}

fn catalogue_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad_inputs")
}

fn strings(table: &toml::Table, key: &str) -> Vec<String> {
    table
        .get(key)
        .and_then(|v| v.as_array())
        .map(|items| {
            items
                .iter()
                .filter_map(|v| v.as_str().map(str::to_string))
                .collect()
        })
        .unwrap_or_default()
}

fn read_case(dir: &Path) -> Case {
    let text = std::fs::read_to_string(dir.join("case.toml"))
        .unwrap_or_else(|err| panic!("{}: {err}", dir.display()));
    let table: toml::Table =
        toml::from_str(&text).unwrap_or_else(|err| panic!("{}/case.toml: {err}", dir.display()));
    let args = strings(&table, "args");
    assert!(!args.is_empty(), "{}: case.toml needs args", dir.display());
    Case {
        name: dir
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default(),
        args,
        exit: table
            .get("exit")
            .and_then(|v| v.as_integer())
            .map_or(1, |v| v as i32),
        stderr: strings(&table, "stderr"),
        stderr_absent: strings(&table, "stderr_absent"),
        fix: table
            .get("fix")
            .and_then(|v| v.as_str())
            .map(str::to_string),
        problems: table
            .get("problems")
            .and_then(|v| v.as_integer())
            .map(|v| v as usize),
        generate: strings(&table, "generate"),
        unchanged: strings(&table, "unchanged"),
    }
}

fn copy_tree(from: &Path, to: &Path) {
    for entry in std::fs::read_dir(from).unwrap() {
        let entry = entry.unwrap();
        let target = to.join(entry.file_name());
        if entry.file_type().unwrap().is_dir() {
            std::fs::create_dir_all(&target).unwrap();
            copy_tree(&entry.path(), &target);
        } else if entry.file_name() != "case.toml" {
            std::fs::copy(entry.path(), &target).unwrap();
        }
    }
}

/// Inputs too large or too binary to commit, made at test time.
fn generate(name: &str, dir: &Path) {
    let write = |file: &str, bytes: &[u8]| std::fs::write(dir.join(file), bytes).unwrap();
    match name {
        // Bytes that are not text: a NUL, invalid UTF-8, a stray continuation byte.
        "binary-trials" => write(
            "trials.csv",
            &[
                0x7f, 0x45, 0x4c, 0x46, 0x02, 0x00, 0xff, 0xfe, 0x0a, 0x80, 0x81,
            ],
        ),
        "binary-study" => write("study.toml", &[0x00, 0x01, 0xc3, 0x28, 0xff, 0x0a, 0x5b]),
        "binary-spec" => write("forecast.toml", &[0x1f, 0x8b, 0x08, 0x00, 0xff, 0xff]),
        // 200,000 rows, one of them (near the end) with a non-numeric onset.
        "huge-trials" => {
            let mut text = String::from("subject,run,cue_onset,outcome_onset,pe\n");
            for row in 0..200_000usize {
                let t = 2.0 + (row % 30) as f64 * 10.0;
                if row == 199_990 {
                    text.push_str("01,1,soon,5.0,0.1\n");
                } else {
                    let _ = writeln!(text, "01,1,{t},{},{row}", t + 3.0);
                }
            }
            write("trials.csv", text.as_bytes());
        }
        // One header cell 5 MB long: a file exported without line ends.
        "long-line-trials" => {
            let mut text = String::from("subject,run,cue_onset,outcome_onset,pe");
            text.push_str(&",x".repeat(2_500_000));
            text.push('\n');
            text.push_str("01,1,2,5,0.1\n");
            write("trials.csv", text.as_bytes());
        }
        // A nuisance table of binary bytes.
        "binary-nuisance" => write("confounds_01_1.tsv", &[0x00; 64]),
        // An image that claims to be gzipped but is not.
        "fake-gzip-image" => {
            let path = dir.join("bids/sub-01/func/sub-01_task-lights_run-1_bold.nii.gz");
            std::fs::write(path, b"this is not an image").unwrap();
        }
        other => panic!("unknown generator {other:?}"),
    }
}

/// Runs one case; returns what is wrong with it, or nothing.
fn run_case(case_dir: &Path) -> Result<(), String> {
    let case = read_case(case_dir);
    let work = tempfile::tempdir().map_err(|e| e.to_string())?;
    copy_tree(case_dir, work.path());
    for name in &case.generate {
        generate(name, work.path());
    }
    let before: Vec<Option<Vec<u8>>> = case
        .unchanged
        .iter()
        .map(|f| std::fs::read(work.path().join(f)).ok())
        .collect();
    let started = Instant::now();
    let output = Command::cargo_bin("tangle")
        .map_err(|e| e.to_string())?
        .current_dir(work.path())
        .env_remove("RUST_BACKTRACE")
        .args(&case.args)
        .output()
        .map_err(|e| e.to_string())?;
    let elapsed = started.elapsed();
    let stderr = String::from_utf8_lossy(&output.stderr).into_owned();
    let stdout = String::from_utf8_lossy(&output.stdout).into_owned();
    let mut wrong = Vec::new();
    if output.status.code() != Some(case.exit) {
        wrong.push(format!(
            "exit code {:?}, expected {}",
            output.status.code(),
            case.exit
        ));
    }
    for text in &case.stderr {
        if !stderr.contains(text.as_str()) {
            wrong.push(format!("standard error lacks {text:?}"));
        }
    }
    for text in &case.stderr_absent {
        if stderr.contains(text.as_str()) {
            wrong.push(format!("standard error holds {text:?}"));
        }
    }
    if let Some(count) = case.problems {
        let announced = format!("{count} problems in the input");
        if !stderr.contains(&announced) {
            wrong.push(format!("standard error lacks {announced:?}"));
        }
    }
    for text in PANIC_TEXT {
        if stderr.contains(text) || stdout.contains(text) {
            wrong.push(format!("panic text {text:?}"));
        }
    }
    match &case.fix {
        Some(fix) if stderr.contains(fix.as_str()) => {}
        Some(fix) => wrong.push(format!("standard error lacks the fix {fix:?}")),
        None if case.exit == 1 => wrong.push("case.toml names no `fix` text".into()),
        None => {}
    }
    assert_eq!(
        case.unchanged.len(),
        before.len(),
        "unchanged files and their contents"
    );
    for (file, old) in case.unchanged.iter().zip(before) {
        let new = std::fs::read(work.path().join(file)).ok();
        if new != old {
            wrong.push(format!("{file} changed"));
        }
    }
    // A generous bound: a bad file must not make the tool hang (debug build).
    if elapsed.as_secs() > 60 {
        wrong.push(format!("took {elapsed:?}"));
    }
    if wrong.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "{}: {}\n--- stderr ---\n{}",
            case.name,
            wrong.join("; "),
            stderr.chars().take(3000).collect::<String>()
        ))
    }
}

fn case_dirs() -> Vec<PathBuf> {
    let mut dirs: Vec<PathBuf> = std::fs::read_dir(catalogue_dir())
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.path())
        .filter(|p| p.join("case.toml").is_file())
        .collect();
    dirs.sort();
    dirs
}

#[test]
fn every_catalogued_bad_input_is_a_clear_error() {
    let dirs = case_dirs();
    assert!(dirs.len() >= 30, "only {} cases", dirs.len());
    let only = std::env::var("BAD_INPUT_CASE").ok();
    let failures: Vec<String> = dirs
        .iter()
        .filter(|d| only.as_deref().is_none_or(|o| d.ends_with(o)))
        .filter_map(|dir| run_case(dir).err())
        .collect();
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n\n{}",
        failures.len(),
        dirs.len(),
        failures.join("\n\n")
    );
}

#[test]
fn the_readme_lists_every_case() {
    let readme = std::fs::read_to_string(catalogue_dir().join("README.md")).unwrap();
    for dir in case_dirs() {
        let name = dir.file_name().unwrap().to_string_lossy().into_owned();
        assert!(
            readme.contains(&format!("`{name}`")),
            "tests/bad_inputs/README.md does not list {name}"
        );
    }
}

/// A small valid study (invented numbers) in a fresh folder.
fn good_study() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    let mut trials = String::from("subject,run,cue_onset,outcome_onset,pe,value\n");
    for subject in ["01", "02"] {
        for run in ["1", "2"] {
            for t in 0..12usize {
                let cue = 2.0 + 9.0 * t as f64 + (t % 3) as f64;
                let _ = writeln!(
                    trials,
                    "{subject},{run},{cue},{},{},{}",
                    cue + 2.0 + (t % 4) as f64,
                    ((t * 7 + subject.len()) % 11) as f64 / 11.0 - 0.5,
                    ((t * 5 + run.len()) % 13) as f64 / 13.0
                );
            }
        }
    }
    let study = r#"[study]
name = "<script>alert('x')</script> & \"quotes\" (invented)"
[acquisition]
tr = 2.0
scans = 70
[trials]
file = "trials.csv"
[[event]]
name = "cue"
onset = "cue_onset"
[[event]]
name = "outcome"
onset = "outcome_onset"
[[model]]
name = "m<b>"
modulators = [ { event = "outcome", column = "pe" }, { event = "cue", column = "value" } ]
"#;
    std::fs::write(dir.path().join("study.toml"), study).unwrap();
    std::fs::write(dir.path().join("trials.csv"), trials).unwrap();
    dir
}

fn tangle_in(dir: &Path) -> Command {
    let mut command = Command::cargo_bin("tangle").unwrap();
    command.current_dir(dir).env_remove("RUST_BACKTRACE");
    command
}

#[test]
fn a_failing_run_leaves_an_earlier_output_untouched() {
    let dir = good_study();
    let out = dir.path().join("results/nested/report.json");
    tangle_in(dir.path())
        .args(["check", "study.toml", "--format", "json", "--out"])
        .arg(&out)
        .assert()
        .code(0);
    // Folders are created as needed; the file is whole JSON.
    let before = std::fs::read(&out).unwrap();
    serde_json::from_slice::<serde_json::Value>(&before).expect("whole JSON");
    // Break the trial table: the run fails and the earlier report stays as it was.
    let trials = dir.path().join("trials.csv");
    let text = std::fs::read_to_string(&trials).unwrap();
    std::fs::write(&trials, text.replacen("0.5", "oops", 1) + "01,1,3\n").unwrap();
    let output = tangle_in(dir.path())
        .args(["check", "study.toml", "--format", "json", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&output.stderr).contains("trials.csv, line"));
    assert_eq!(std::fs::read(&out).unwrap(), before);
    // No temporary file is left beside it.
    let left: Vec<_> = std::fs::read_dir(out.parent().unwrap())
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.file_name())
        .collect();
    assert_eq!(left, [std::ffi::OsString::from("report.json")]);
}

#[test]
fn check_output_is_the_same_for_one_and_two_threads_and_every_run() {
    let dir = good_study();
    let run = |threads: &str| {
        let output = tangle_in(dir.path())
            .env("RAYON_NUM_THREADS", threads)
            .args(["check", "study.toml", "--format", "json"])
            .output()
            .unwrap();
        assert_eq!(output.status.code(), Some(0));
        output.stdout
    };
    let one = run("1");
    assert!(!one.is_empty());
    assert_eq!(one, run("2"));
    assert_eq!(one, run("2"));
    assert_eq!(one, run("1"));
}

#[test]
fn json_holds_no_nan_or_infinity_and_html_escapes_user_text() {
    let dir = good_study();
    let output = tangle_in(dir.path())
        .args(["check", "study.toml", "--format", "json"])
        .output()
        .unwrap();
    let text = String::from_utf8(output.stdout).unwrap();
    let json: serde_json::Value = serde_json::from_str(&text).expect("JSON");
    assert!(json.is_object());
    for bad in ["NaN", "Infinity", "inf,"] {
        assert!(!text.contains(bad), "{bad} in the JSON");
    }
    let html = dir.path().join("report.html");
    tangle_in(dir.path())
        .args(["check", "study.toml", "--format", "html", "--out"])
        .arg(&html)
        .assert()
        .code(0);
    let page = std::fs::read_to_string(html).unwrap();
    assert!(
        !page.contains("<script>alert"),
        "the study name is not escaped"
    );
    assert!(!page.contains("m<b>"), "a model name is not escaped");
    assert!(page.contains("&lt;script&gt;") || page.contains("&#x3C;script"));
}
