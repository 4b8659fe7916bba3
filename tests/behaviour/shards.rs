//! `check --shard K/N` and `tangle merge`: three shards of the demo study, merged, give
//! the unsharded JSON report byte for byte.

use std::process::Command;

fn tangle() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tangle"))
}

fn check(args: &[&str], out: &std::path::Path) {
    let status = tangle()
        .args(["check", "demo-data/study.toml", "--format", "json", "--out"])
        .arg(out)
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .status()
        .expect("tangle runs");
    assert!(status.success());
}

#[test]
fn merged_shards_equal_the_unsharded_report_byte_for_byte() {
    let dir = tempfile::tempdir().expect("temporary folder");
    let whole = dir.path().join("whole.json");
    check(&[], &whole);
    let mut shards = Vec::new();
    for k in 1..=3 {
        let path = dir.path().join(format!("shard-{k}.json"));
        check(&["--shard", &format!("{k}/3")], &path);
        shards.push(path);
    }
    // Participants sorted by label, the i-th to shard (i mod 3) + 1: the demo's 20
    // participants split 7, 7, 6.
    let subjects = |path: &std::path::Path| -> Vec<String> {
        let report: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(path).expect("read")).expect("json");
        report["subjects"]
            .as_array()
            .expect("subjects")
            .iter()
            .map(|s| s["subject"].as_str().expect("label").to_string())
            .collect()
    };
    let counts: Vec<usize> = shards.iter().map(|p| subjects(p).len()).collect();
    assert_eq!(counts, vec![7, 7, 6]);
    let all = subjects(&whole);
    assert_eq!(subjects(&shards[1])[0], all[1]);
    let merged = dir.path().join("merged.json");
    let status = tangle()
        .arg("merge")
        .args([&shards[2], &shards[0], &shards[1]])
        .arg("--out")
        .arg(&merged)
        .status()
        .expect("tangle runs");
    assert!(status.success());
    let merged = std::fs::read(&merged).expect("read");
    let whole = std::fs::read(&whole).expect("read");
    assert_eq!(merged.len(), whole.len());
    assert!(
        merged == whole,
        "the merged report differs from the unsharded one"
    );
}

#[test]
fn overlapping_shards_are_refused_naming_the_files() {
    let dir = tempfile::tempdir().expect("temporary folder");
    let a = dir.path().join("a.json");
    let b = dir.path().join("b.json");
    check(&["--shard", "1/2"], &a);
    check(&["--shard", "1/3"], &b);
    let output = tangle()
        .arg("merge")
        .arg(&a)
        .arg(&b)
        .output()
        .expect("runs");
    assert_eq!(output.status.code(), Some(1));
    let message = String::from_utf8_lossy(&output.stderr);
    assert!(
        message.contains("a.json") && message.contains("b.json"),
        "{message}"
    );
    assert!(message.contains("overlap"), "{message}");
}

#[test]
fn a_bad_shard_is_a_usage_error() {
    for bad in ["0/3", "4/3", "3", "a/b"] {
        let output = tangle()
            .args(["check", "demo-data/study.toml", "--shard", bad])
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .output()
            .expect("runs");
        assert_eq!(output.status.code(), Some(2), "{bad}"); // clap's usage exit code
    }
}

#[test]
fn merged_shards_in_every_other_format_equal_the_unsharded_check() {
    let dir = tempfile::tempdir().expect("temporary folder");
    let mut shards = Vec::new();
    for k in 1..=2 {
        let path = dir.path().join(format!("shard-{k}.json"));
        check(&["--shard", &format!("{k}/2")], &path);
        shards.push(path);
    }
    for format in ["table", "html", "methods"] {
        let whole = tangle()
            .args(["check", "demo-data/study.toml", "--format", format])
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .output()
            .expect("tangle runs");
        assert!(whole.status.success());
        let merged = tangle()
            .args(["merge", "--format", format])
            .args(&shards)
            .output()
            .expect("tangle runs");
        assert!(
            merged.status.success(),
            "{}",
            String::from_utf8_lossy(&merged.stderr)
        );
        assert!(
            merged.stdout == whole.stdout,
            "--format {format}: the merged report differs from the unsharded one"
        );
    }
    // TSV with --out writes one file per table: compare each.
    let whole = dir.path().join("whole");
    let merged = dir.path().join("merged");
    let status = tangle()
        .args(["check", "demo-data/study.toml", "--format", "tsv", "--out"])
        .arg(whole.join("report.tsv"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .status()
        .expect("tangle runs");
    assert!(status.success());
    let status = tangle()
        .args(["merge", "--format", "tsv", "--out"])
        .arg(merged.join("report.tsv"))
        .args(&shards)
        .status()
        .expect("tangle runs");
    assert!(status.success());
    let mut names: Vec<_> = std::fs::read_dir(&whole)
        .expect("tables written")
        .map(|entry| entry.expect("entry").file_name())
        .collect();
    names.sort();
    assert!(names.len() > 3, "{names:?}");
    for name in names {
        assert_eq!(
            std::fs::read(whole.join(&name)).expect("read"),
            std::fs::read(merged.join(&name)).expect("merged table written"),
            "{name:?}"
        );
    }
}
