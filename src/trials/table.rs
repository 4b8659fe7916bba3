//! Delimited text tables (CSV or TSV, chosen by the file extension) with a header row.
//! UTF-8 with or without a byte-order mark, LF or CRLF line ends; `n/a` (the BIDS
//! spelling) or an empty cell means "missing".

use std::path::{Path, PathBuf};

use super::records::{Record, Records};
use crate::error::{Error, Location, Problem, Result};
use crate::files::InputFiles;

/// A table held compactly: the trimmed text of every cell in one buffer, with the end
/// of each cell, so that a cohort's trial table of millions of cells costs about its
/// own size in memory, not one allocation per cell.
#[derive(Debug, Clone)]
pub struct Table {
    pub path: PathBuf,
    pub headers: Vec<String>,
    /// Every cell's trimmed text, row after row.
    text: String,
    /// Where each cell ends in `text`, `headers.len()` per row.
    ends: Vec<u32>,
    /// 1-based line of each row in the file.
    lines: Vec<u32>,
}

/// One row of a [`Table`].
#[derive(Debug, Clone, Copy)]
pub struct Row<'a> {
    table: &'a Table,
    index: usize,
}

impl<'a> Row<'a> {
    /// Position among the table's rows, from 0.
    pub fn index(&self) -> usize {
        self.index
    }

    /// 1-based line of the row in the file.
    pub fn line(&self) -> usize {
        self.table.lines[self.index] as usize
    }

    /// The trimmed text of one cell.
    pub fn cell(&self, column: usize) -> &'a str {
        let width = self.table.headers.len();
        let at = self.index * width + column;
        let start = if at == 0 {
            0
        } else {
            self.table.ends[at - 1] as usize
        };
        &self.table.text[start..self.table.ends[at] as usize]
    }

    pub fn cells(&self) -> impl Iterator<Item = &'a str> + use<'a> {
        let row = *self;
        (0..self.table.headers.len()).map(move |column| row.cell(column))
    }
}

/// A cell that holds no value.
pub fn is_missing(cell: &str) -> bool {
    let cell = cell.trim();
    cell.is_empty() || cell.eq_ignore_ascii_case("n/a")
}

/// What became of a record offered to a table.
#[derive(Debug, PartialEq)]
enum Pushed {
    Row,
    /// Every cell blank (e.g. a line of delimiters only): skipped.
    Blank,
    /// This many cells, not one per column.
    Ragged(usize),
}

/// The cell buffer's offsets are 32-bit: a larger table (or chunk) is refused with a message.
const MAX_TABLE_BYTES: usize = u32::MAX as usize;

impl Table {
    /// The whole table.
    pub fn read(files: &dyn InputFiles, path: &Path) -> Result<Table> {
        let input = files.open(path).map_err(|err| cannot_read(path, &err))?;
        read_whole(path, input)
    }

    /// The table as consecutive tables of at most `rows` rows each, handed to `each`
    /// as they are read, so that a cohort's trial table is never held whole. Every
    /// problem (up to a limit) is returned at the end; `each` may have seen earlier
    /// chunks by then.
    pub fn read_in_chunks(
        files: &dyn InputFiles,
        path: &Path,
        rows: usize,
        each: &mut dyn FnMut(Table) -> Result<()>,
    ) -> Result<()> {
        let input = files.open(path).map_err(|err| cannot_read(path, &err))?;
        read_stream(path, input, rows, each)
    }

    /// A table from its text (for tests and embedded files).
    pub fn parse(path: &Path, text: &str) -> Result<Table> {
        read_whole(path, text.as_bytes())
    }

    fn empty(path: &Path, headers: Vec<String>) -> Table {
        Table {
            path: path.to_path_buf(),
            headers,
            text: String::new(),
            ends: Vec::new(),
            lines: Vec::new(),
        }
    }

    /// Appends a record's trimmed cells as a row; a record of blank cells, or of the
    /// wrong length, is taken back out. An error for bytes that are not a text table.
    fn push_record(&mut self, record: &Record<'_>) -> Result<Pushed> {
        let (text, ends) = (self.text.len(), self.ends.len());
        let mut blank = true;
        for field in record.fields() {
            let cell = std::str::from_utf8(field)
                .map_err(|_| not_text(&self.path, record.line, false))?
                .trim();
            if cell.contains('\0') {
                return Err(not_text(&self.path, record.line, true));
            }
            blank &= cell.is_empty();
            self.text.push_str(cell);
            self.ends.push(self.text.len().min(MAX_TABLE_BYTES) as u32);
        }
        let pushed = if record.cell_count() != self.headers.len() {
            Pushed::Ragged(record.cell_count())
        } else if blank {
            Pushed::Blank
        } else {
            Pushed::Row
        };
        if pushed != Pushed::Row {
            self.text.truncate(text);
            self.ends.truncate(ends);
            return Ok(pushed);
        }
        if self.text.len() > MAX_TABLE_BYTES {
            return Err(Problem::new(
                Location::line(&self.path, record.line),
                format!("the table is larger than {} GiB", MAX_TABLE_BYTES >> 30),
            )
            .with_hint("split the table, e.g. one file per group of participants, and check each with its own study file")
            .into());
        }
        self.lines.push(record.line.min(u32::MAX as usize) as u32);
        Ok(Pushed::Row)
    }

    /// The number of rows (blank lines not counted).
    pub fn row_count(&self) -> usize {
        self.lines.len()
    }

    pub fn row(&self, index: usize) -> Row<'_> {
        Row { table: self, index }
    }

    /// The rows in file order.
    pub fn rows(&self) -> impl ExactSizeIterator<Item = Row<'_>> {
        (0..self.row_count()).map(|index| Row { table: self, index })
    }

    /// The table with more columns: `cell(row, k)` is the cell of new column `k` in `row`.
    pub fn with_columns(
        self,
        names: Vec<String>,
        mut cell: impl FnMut(Row<'_>, usize) -> String,
    ) -> Table {
        let width = self.headers.len() + names.len();
        let mut wider = Table {
            path: self.path.clone(),
            headers: self
                .headers
                .iter()
                .cloned()
                .chain(names.iter().cloned())
                .collect(),
            text: String::with_capacity(self.text.len()),
            ends: Vec::with_capacity(self.row_count() * width),
            lines: self.lines.clone(),
        };
        for row in self.rows() {
            for existing in row.cells() {
                wider.text.push_str(existing);
                wider.ends.push(wider.text.len() as u32);
            }
            for k in 0..names.len() {
                wider.text.push_str(cell(row, k).trim());
                wider.ends.push(wider.text.len() as u32);
            }
        }
        wider
    }

    /// Index of a named column; the error lists the columns that exist.
    pub fn column(&self, name: &str, wanted_by: &str) -> Result<usize, Problem> {
        self.headers.iter().position(|h| h == name).ok_or_else(|| {
            let known: Vec<&str> = self.headers.iter().map(String::as_str).collect();
            let hint = match crate::error::closest_name(name, &known) {
                Some(near) => format!("did you mean \"{near}\"? columns: {}", known.join(", ")),
                None => format!("columns in the file: {}", known.join(", ")),
            };
            Problem::new(
                Location::line(&self.path, 1),
                format!("no column \"{name}\" (needed by {wanted_by})"),
            )
            .with_hint(hint)
        })
    }

    /// The number in a cell; `None` when the cell is missing.
    pub fn number(&self, row: Row<'_>, column: usize) -> Result<Option<f64>, Problem> {
        let cell = row.cell(column);
        if is_missing(cell) {
            return Ok(None);
        }
        let location = || {
            Location::cell(
                &self.path,
                row.line(),
                format!("column {} (\"{}\")", column + 1, self.headers[column]),
            )
        };
        match cell.parse::<f64>() {
            Ok(value) if value.is_finite() => Ok(Some(value)),
            Ok(_) => Err(
                Problem::new(location(), format!("\"{cell}\" is not a finite number"))
                    .with_hint("write n/a (or leave the cell empty) for a missing value"),
            ),
            Err(_) => Err(
                Problem::new(location(), format!("\"{cell}\" is not a number")).with_hint(
                    if cell.contains(',') {
                        "use a point as the decimal separator".to_string()
                    } else {
                        "write n/a (or leave the cell empty) for a missing value".to_string()
                    },
                ),
            ),
        }
    }

    /// The location of a cell, for messages about its value.
    pub fn cell_location(&self, row: Row<'_>, column: usize) -> Location {
        Location::cell(
            &self.path,
            row.line(),
            format!("column {} (\"{}\")", column + 1, self.headers[column]),
        )
    }
}

fn delimiter_for(path: &Path) -> Result<u8> {
    let extension = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase());
    match extension.as_deref() {
        Some("csv") => Ok(b','),
        Some("tsv") | Some("txt") => Ok(b'\t'),
        _ => Err(Problem::new(
            Location::file(path),
            "cannot tell the table format from the file name",
        )
        .with_hint("name comma-separated files .csv and tab-separated files .tsv")
        .into()),
    }
}

fn check_headers(path: &Path, headers: &[String], delimiter: u8) -> Result<()> {
    if headers.len() == 1 && headers[0].contains(';') {
        return Err(Problem::new(
            Location::line(path, 1),
            "the header is separated by semicolons",
        )
        .with_hint(if delimiter == b',' {
            "re-export with commas between cells and points as decimal separators (the semicolon form is a spreadsheet's regional setting)"
        } else {
            "re-export with tabs between cells and points as decimal separators"
        })
        .into());
    }
    let other = if delimiter == b',' { '\t' } else { ',' };
    if headers.len() == 1 && headers[0].contains(other) {
        let (found, expected) = if delimiter == b',' {
            ("tabs", "commas")
        } else {
            ("commas", "tabs")
        };
        return Err(Problem::new(
            Location::line(path, 1),
            format!(
                "the header is separated by {found}, but this file type is separated by {expected}"
            ),
        )
        .with_hint("rename the file (.csv for commas, .tsv for tabs) or re-export it")
        .into());
    }
    for (index, header) in headers.iter().enumerate() {
        if header.is_empty() {
            return Err(Problem::new(
                Location::cell(path, 1, format!("column {}", index + 1)),
                "a column has no name in the header row",
            )
            .with_hint("name every column in the first row (a trailing delimiter also makes an empty column)")
            .into());
        }
        if headers[..index].contains(header) {
            return Err(Problem::new(
                Location::cell(path, 1, format!("column {}", index + 1)),
                format!("the column name \"{header}\" appears twice in the header"),
            )
            .with_hint("rename one of the two columns so that every name is unique")
            .into());
        }
    }
    Ok(())
}

fn cannot_read(path: &Path, err: &std::io::Error) -> Error {
    Problem::new(Location::file(path), format!("cannot read the file: {err}"))
        .with_hint("check the path; relative paths are taken from the study file's folder")
        .into()
}

fn not_text(path: &Path, line: usize, binary: bool) -> Error {
    if binary {
        Problem::new(
            Location::line(path, line),
            "the file holds NUL bytes: it is a binary file, not a text table",
        )
        .with_hint("export the table as UTF-8 CSV or TSV text")
        .into()
    } else {
        crate::files::not_utf8_problem(path, line).into()
    }
}

/// The table as one chunk.
fn read_whole(path: &Path, input: impl std::io::Read) -> Result<Table> {
    let mut whole = None;
    read_stream(path, input, usize::MAX, &mut |table| {
        whole = Some(table);
        Ok(())
    })?;
    whole.ok_or_else(|| Error::Internal("a table was read but not kept".into()))
}

fn read_stream(
    path: &Path,
    input: impl std::io::Read,
    chunk_rows: usize,
    each: &mut dyn FnMut(Table) -> Result<()>,
) -> Result<()> {
    let delimiter = delimiter_for(path)?;
    let mut records = Records::new(input, delimiter);
    let read_error = |err: std::io::Error| cannot_read(path, &err);
    let mut header = Table::empty(path, Vec::new());
    if let Some(byte_order) = records.utf16().map_err(read_error)? {
        return Err(crate::files::utf16_problem(path, byte_order).into());
    }
    if let Some(record) = records.next_record().map_err(read_error)? {
        header.headers = vec![String::new(); record.cell_count()];
        header.push_record(&record)?;
    }
    let headers: Vec<String> = match header.row_count() {
        0 => Vec::new(),
        _ => header.row(0).cells().map(str::to_string).collect(),
    };
    if headers.iter().all(|h| h.is_empty()) {
        return Err(Problem::new(Location::file(path), "the table is empty")
            .with_hint("the first line must be a header row naming the columns")
            .into());
    }
    check_headers(path, &headers, delimiter)?;
    let mut problems = Vec::new();
    let mut chunk = Table::empty(path, headers.clone());
    let mut rows = 0;
    while let Some(record) = records.next_record().map_err(read_error)? {
        match chunk.push_record(&record)? {
            Pushed::Row => {}
            Pushed::Blank => continue,
            Pushed::Ragged(count) => {
                problems.push(
                    Problem::new(
                        Location::line(path, record.line),
                        format!(
                            "this row has {count} cells but the header has {}",
                            headers.len()
                        ),
                    )
                    .with_hint(
                        "every row needs one cell per column; write n/a for a missing value",
                    ),
                );
                if problems.len() >= crate::error::MAX_LISTED_PROBLEMS {
                    break;
                }
                continue;
            }
        }
        rows += 1;
        if chunk.row_count() >= chunk_rows {
            each(std::mem::replace(
                &mut chunk,
                Table::empty(path, headers.clone()),
            ))?;
        }
    }
    if !problems.is_empty() {
        return Err(Error::Input(problems));
    }
    if rows == 0 {
        return Err(
            Problem::new(Location::file(path), "the table has a header but no rows")
                .with_hint(
                    "the file may have been written before its program finished; export it again",
                )
                .into(),
        );
    }
    if chunk.row_count() > 0 {
        each(chunk)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_tsv_with_crlf_and_missing_cells() {
        let text = "a\tb\r\n1\tn/a\r\n2\t\r\n\r\n";
        let table = Table::parse(Path::new("x.tsv"), text).unwrap();
        assert_eq!(table.headers, ["a", "b"]);
        assert_eq!(table.row_count(), 2);
        assert_eq!(table.row(1).line(), 3);
        assert_eq!(table.number(table.row(0), 0).unwrap(), Some(1.0));
        assert_eq!(table.number(table.row(0), 1).unwrap(), None);
        assert_eq!(table.number(table.row(1), 1).unwrap(), None);
    }

    #[test]
    fn ragged_rows_and_bad_numbers_name_line_and_column() {
        let err = Table::parse(Path::new("t.csv"), "a,b\n1,2\n3\n").unwrap_err();
        let text = err.to_string();
        assert!(text.contains("t.csv, line 3"), "{text}");
        assert!(text.contains("1 cells but the header has 2"), "{text}");

        let table = Table::parse(Path::new("t.csv"), "a,b\n1,abc\n").unwrap();
        let problem = table.number(table.row(0), 1).unwrap_err();
        assert_eq!(
            problem.to_string().lines().next().unwrap(),
            "t.csv, line 2, column 2 (\"b\"): \"abc\" is not a number"
        );
        let table = Table::parse(Path::new("t.csv"), "a\nNaN\n").unwrap();
        assert!(table.number(table.row(0), 0).is_err());
    }

    #[test]
    fn wrong_delimiter_empty_and_header_only_tables_are_errors() {
        let err = Table::parse(Path::new("t.csv"), "a\tb\n1\t2\n").unwrap_err();
        assert!(err.to_string().contains("separated by tabs"));
        assert!(Table::parse(Path::new("t.csv"), "").is_err());
        let err = Table::parse(Path::new("t.csv"), "a,b\n").unwrap_err();
        assert!(err.to_string().contains("header but no rows"));
        let err = Table::parse(Path::new("t.csv"), "a,a\n1,2\n").unwrap_err();
        assert!(err.to_string().contains("appears twice"));
        assert!(Table::parse(Path::new("t.xlsx"), "a\n1\n").is_err());
    }
}
