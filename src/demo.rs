//! The bundled demo study (invented data, see demo-data/README.md), embedded in the
//! binary so that `tangle demo` works from any folder.

use std::path::{Path, PathBuf};

use crate::check::{CheckOptions, check_file};
use crate::files::MemoryFiles;
use crate::report::Report;

const STUDY: &str = include_str!("../demo-data/study.toml");
const TRIALS: &str = include_str!("../demo-data/trials.csv");

/// Where the demo files appear to live, in messages and in the report.
pub fn study_path() -> PathBuf {
    Path::new("demo-data").join("study.toml")
}

pub fn files() -> MemoryFiles {
    MemoryFiles::default()
        .with(study_path(), STUDY)
        .with(Path::new("demo-data").join("trials.csv"), TRIALS)
}

pub fn check_demo(options: CheckOptions) -> crate::Result<Report> {
    check_file(&files(), &study_path(), options)
}
