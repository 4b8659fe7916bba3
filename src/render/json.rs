//! `--format json`: the report model as JSON (the fields of the README's "JSON"
//! section). Undefined numbers are `null`, with a flag in the same run saying why.
//!
//! [`JsonStream`] writes the same bytes as [`render`] one run at a time, so that a large
//! cohort's report never has to be held in memory whole; `check` and `merge` both write
//! their JSON through it.

use std::io::Write;

use serde::Serialize;

use crate::cohort::Summaries;
use crate::report::{Report, ReportHead};
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
/// the whole report: the head, then each run's GLM entries, then the lists kept for
/// after them (separations, model shares), then the cohort views.
pub struct JsonStream<W: Write> {
    out: W,
    /// Items written to the list now open.
    items: usize,
}

/// The head fields of a report, each already rendered as it sits in the report (e.g.
/// copied from a shard's JSON).
pub struct RenderedHead<'a> {
    pub tool: &'a [u8],
    pub study: &'a [u8],
    pub settings: &'a [u8],
}

impl<W: Write> JsonStream<W> {
    pub fn begin(out: W, head: &ReportHead) -> std::io::Result<Self> {
        let tool = render_field(&head.tool)?;
        let study = render_field(&head.study)?;
        let settings = render_field(&head.settings)?;
        JsonStream::begin_rendered(
            out,
            RenderedHead {
                tool: &tool,
                study: &study,
                settings: &settings,
            },
        )
    }

    pub fn begin_rendered(mut out: W, head: RenderedHead<'_>) -> std::io::Result<Self> {
        out.write_all(b"{\n  \"tool\": ")?;
        out.write_all(head.tool)?;
        out.write_all(b",\n  \"study\": ")?;
        out.write_all(head.study)?;
        out.write_all(b",\n  \"settings\": ")?;
        out.write_all(head.settings)?;
        out.write_all(b",\n  \"runs\": [")?;
        Ok(JsonStream { out, items: 0 })
    }

    /// An item of the list now open, already rendered by [`render_item`] (e.g. on
    /// another thread, or copied from a shard's JSON).
    pub fn item(&mut self, rendered: &[u8]) -> std::io::Result<()> {
        if self.items > 0 {
            self.out.write_all(b",")?;
        }
        self.out.write_all(b"\n    ")?;
        self.out.write_all(rendered)?;
        self.items += 1;
        Ok(())
    }

    /// Closes the list now open and opens the report's list `key`.
    pub fn next_list(&mut self, key: &str) -> std::io::Result<()> {
        self.close_list()?;
        write!(self.out, ",\n  \"{key}\": [")?;
        self.items = 0;
        Ok(())
    }

    fn close_list(&mut self) -> std::io::Result<()> {
        if self.items > 0 {
            self.out.write_all(b"\n  ")?;
        }
        self.out.write_all(b"]")
    }

    pub fn finish(mut self, summaries: &Summaries) -> std::io::Result<W> {
        self.close_list()?;
        self.field("subjects", &summaries.subjects)?;
        self.field("cohort", &summaries.cohort)?;
        self.field("subject_partition", &summaries.subject_partition)?;
        self.field("cohort_partition", &summaries.cohort_partition)?;
        self.field("separation_summary", &summaries.separations)?;
        self.field("claims_note", &CLAIMS_NOTE)?;
        self.out.write_all(b"\n}\n")?;
        self.out.flush()?;
        Ok(self.out)
    }

    fn field<T: Serialize>(&mut self, key: &str, value: &T) -> std::io::Result<()> {
        write!(self.out, ",\n  \"{key}\": ")?;
        write_indented(&mut self.out, value, b"\n  ")
    }
}

/// A head field's JSON as it sits in the report (one level deep).
fn render_field<T: Serialize>(value: &T) -> std::io::Result<Vec<u8>> {
    let mut rendered = Vec::new();
    write_indented(&mut rendered, value, b"\n  ")?;
    Ok(rendered)
}

/// One item's JSON as it sits in one of the report's lists (runs, separations, …).
pub fn render_item<T: Serialize>(item: &T) -> std::io::Result<Vec<u8>> {
    let mut rendered = Vec::new();
    write_indented(&mut rendered, item, b"\n    ")?;
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
