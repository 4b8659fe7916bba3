//! `--format json`: the report model as JSON (the fields of DESIGN.md). Undefined
//! numbers are `null`, with a flag in the same run saying why.
//!
//! [`JsonStream`] writes the same bytes as [`render`] one run at a time, so that a large
//! cohort's report never has to be held in memory whole.

use std::io::Write;

use serde::Serialize;

use crate::check::{Prepared, ReportHead, Summaries};
use crate::error::{Error, Result};
use crate::files::InputFiles;
use crate::report::Report;
use crate::report::RunReport;
use crate::screen::CLAIMS_NOTE;

pub fn render(report: &Report) -> String {
    match serde_json::to_string_pretty(report) {
        Ok(mut text) => {
            text.push('\n');
            text
        }
        // The model holds only strings, finite numbers and options: this cannot fail.
        Err(err) => format!("{{\"error\": \"cannot render the report: {err}\"}}\n"),
    }
}

/// Writes a report's JSON as its runs arrive, byte for byte what [`render`] writes for
/// the whole report: the head, then each run, then the cohort views.
pub struct JsonStream<W: Write> {
    out: W,
    runs: usize,
}

impl<W: Write> JsonStream<W> {
    pub fn begin(mut out: W, head: &ReportHead) -> std::io::Result<Self> {
        out.write_all(b"{")?;
        let mut stream = JsonStream { out, runs: 0 };
        stream.field("tool", &head.tool, true)?;
        stream.field("study", &head.study, false)?;
        stream.field("settings", &head.settings, false)?;
        stream.out.write_all(b",\n  \"runs\": [")?;
        Ok(stream)
    }

    pub fn run(&mut self, run: &RunReport) -> std::io::Result<()> {
        self.rendered_run(&render_run(run)?)
    }

    /// A run already rendered by [`render_run`] (e.g. on another thread).
    pub fn rendered_run(&mut self, rendered: &[u8]) -> std::io::Result<()> {
        if self.runs > 0 {
            self.out.write_all(b",")?;
        }
        self.out.write_all(b"\n    ")?;
        self.out.write_all(rendered)?;
        self.runs += 1;
        Ok(())
    }

    pub fn finish(mut self, summaries: &Summaries) -> std::io::Result<W> {
        if self.runs > 0 {
            self.out.write_all(b"\n  ")?;
        }
        self.out.write_all(b"]")?;
        self.field("subjects", &summaries.subjects, false)?;
        self.field("cohort", &summaries.cohort, false)?;
        self.field("subject_partition", &summaries.subject_partition, false)?;
        self.field("cohort_partition", &summaries.cohort_partition, false)?;
        self.field("claims_note", &CLAIMS_NOTE, false)?;
        self.out.write_all(b"\n}\n")?;
        self.out.flush()?;
        Ok(self.out)
    }

    fn field<T: Serialize>(&mut self, key: &str, value: &T, first: bool) -> std::io::Result<()> {
        if !first {
            self.out.write_all(b",")?;
        }
        write!(self.out, "\n  \"{key}\": ")?;
        write_indented(&mut self.out, value, b"\n  ")
    }
}

/// `check --format json` of a prepared study: every run is checked and written to `out`
/// as its batch finishes (rendered on the worker threads), so the whole report is never
/// held in memory. Returns the cohort views; an error of the check itself is returned as
/// is, a failed write as [`Error::Output`].
pub fn stream_check(
    prepared: &Prepared,
    files: &dyn InputFiles,
    out: &mut dyn Write,
) -> Result<Summaries> {
    let output_error = |source| Error::Output {
        path: "the report".into(),
        source,
    };
    let mut stream = JsonStream::begin(out, &prepared.head()).map_err(output_error)?;
    let summaries = prepared.run_all_rendered(files, &|run| render_run(&run), &mut |rendered| {
        stream
            .rendered_run(&rendered.map_err(output_error)?)
            .map_err(output_error)
    })?;
    stream.finish(&summaries).map_err(output_error)?;
    Ok(summaries)
}

/// One run's JSON as it sits in the report's list of runs.
pub fn render_run(run: &RunReport) -> std::io::Result<Vec<u8>> {
    let mut rendered = Vec::new();
    write_indented(&mut rendered, run, b"\n    ")?;
    Ok(rendered)
}

/// `value` as pretty JSON, every line after the first indented to its depth. JSON
/// strings never hold a raw line break, so every `\n` of the text is a line end.
fn write_indented<W: Write, T: Serialize>(
    out: &mut W,
    value: &T,
    newline: &[u8],
) -> std::io::Result<()> {
    let text = serde_json::to_vec_pretty(value).map_err(std::io::Error::other)?;
    let mut lines = text.split(|&b| b == b'\n');
    if let Some(first) = lines.next() {
        out.write_all(first)?;
    }
    for line in lines {
        out.write_all(newline)?;
        out.write_all(line)?;
    }
    Ok(())
}
