//! Delimited text tables (CSV or TSV, chosen by the file extension) with a header row.
//! UTF-8 with or without a byte-order mark, LF or CRLF line ends; `n/a` (the BIDS
//! spelling) or an empty cell means "missing".

use std::path::{Path, PathBuf};

use crate::error::{Error, Location, Problem, Result};
use crate::files::{InputFiles, read_text};

#[derive(Debug, Clone)]
pub struct Table {
    pub path: PathBuf,
    pub headers: Vec<String>,
    pub rows: Vec<Row>,
}

#[derive(Debug, Clone)]
pub struct Row {
    /// 1-based line of the row in the file.
    pub line: usize,
    pub cells: Vec<String>,
}

/// A cell that holds no value.
pub fn is_missing(cell: &str) -> bool {
    let cell = cell.trim();
    cell.is_empty() || cell.eq_ignore_ascii_case("n/a")
}

impl Table {
    pub fn read(files: &dyn InputFiles, path: &Path) -> Result<Table> {
        let text = read_text(files, path)?;
        Table::parse(path, &text)
    }

    pub fn parse(path: &Path, text: &str) -> Result<Table> {
        let delimiter = delimiter_for(path)?;
        if let Some(offset) = text.find('\0') {
            let line = text[..offset].matches('\n').count() + 1;
            return Err(Problem::new(
                Location::line(path, line),
                "the file holds NUL bytes: it is a binary file, not a text table",
            )
            .with_hint("export the table as UTF-8 CSV or TSV text")
            .into());
        }
        let lines = LineIndex::new(text);
        let mut reader = csv::ReaderBuilder::new()
            .delimiter(delimiter)
            .has_headers(true)
            .flexible(false)
            .from_reader(text.as_bytes());
        let headers: Vec<String> = reader
            .headers()
            .map_err(|err| csv_problem(path, &lines, &err))?
            .iter()
            .map(|h| h.trim().to_string())
            .collect();
        if headers.iter().all(|h| h.is_empty()) {
            return Err(Problem::new(Location::file(path), "the table is empty")
                .with_hint("the first line must be a header row naming the columns")
                .into());
        }
        check_headers(path, &headers, delimiter)?;
        let mut rows = Vec::new();
        let mut problems = Vec::new();
        for record in reader.records() {
            match record {
                Ok(record) => {
                    let line = record.position().map_or(0, |p| lines.line_of(p.byte()));
                    if record.iter().all(|cell| cell.trim().is_empty()) {
                        continue; // a blank line, e.g. at the end of the file
                    }
                    let cells = record.iter().map(|c| c.trim().to_string()).collect();
                    rows.push(Row { line, cells });
                }
                Err(err) => {
                    problems.push(csv_problem(path, &lines, &err));
                    if problems.len() >= crate::error::MAX_LISTED_PROBLEMS {
                        break;
                    }
                }
            }
        }
        if !problems.is_empty() {
            return Err(Error::Input(problems));
        }
        if rows.is_empty() {
            return Err(Problem::new(
                Location::file(path),
                "the table has a header but no rows",
            )
            .with_hint("the file may have been written before its program finished; export it again")
            .into());
        }
        Ok(Table {
            path: path.to_path_buf(),
            headers,
            rows,
        })
    }

    /// Index of a named column; the error lists the columns that exist.
    pub fn column(&self, name: &str, wanted_by: &str) -> Result<usize, Problem> {
        self.headers.iter().position(|h| h == name).ok_or_else(|| {
            let known: Vec<&str> = self.headers.iter().map(String::as_str).collect();
            let hint = match crate::study::closest_name(name, &known) {
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
    pub fn number(&self, row: &Row, column: usize) -> Result<Option<f64>, Problem> {
        let cell = row.cells[column].as_str();
        if is_missing(cell) {
            return Ok(None);
        }
        let location = || {
            Location::cell(
                &self.path,
                row.line,
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
    pub fn cell_location(&self, row: &Row, column: usize) -> Location {
        Location::cell(
            &self.path,
            row.line,
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

/// Line numbers from byte offsets (the csv crate's own line count is off by one for CRLF files).
struct LineIndex(Vec<usize>);

impl LineIndex {
    fn new(text: &str) -> Self {
        LineIndex(text.match_indices('\n').map(|(i, _)| i).collect())
    }

    /// 1-based line holding byte `offset`.
    fn line_of(&self, offset: u64) -> usize {
        // With CRLF ends the csv reader puts a record's start on the LF that precedes it.
        self.0
            .partition_point(|&newline| (newline as u64) <= offset)
            + 1
    }
}

fn csv_problem(path: &Path, lines: &LineIndex, err: &csv::Error) -> Problem {
    let line = err.position().map_or(0, |p| lines.line_of(p.byte()));
    let location = if line > 0 {
        Location::line(path, line)
    } else {
        Location::file(path)
    };
    match err.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => Problem::new(
            location,
            format!("this row has {len} cells but the header has {expected_len}"),
        )
        .with_hint("every row needs one cell per column; write n/a for a missing value"),
        _ => Problem::new(location, format!("cannot read the table: {err}")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_tsv_with_crlf_and_missing_cells() {
        let text = "a\tb\r\n1\tn/a\r\n2\t\r\n\r\n";
        let table = Table::parse(Path::new("x.tsv"), text).unwrap();
        assert_eq!(table.headers, ["a", "b"]);
        assert_eq!(table.rows.len(), 2);
        assert_eq!(table.rows[1].line, 3);
        assert_eq!(table.number(&table.rows[0], 0).unwrap(), Some(1.0));
        assert_eq!(table.number(&table.rows[0], 1).unwrap(), None);
        assert_eq!(table.number(&table.rows[1], 1).unwrap(), None);
    }

    #[test]
    fn ragged_rows_and_bad_numbers_name_line_and_column() {
        let err = Table::parse(Path::new("t.csv"), "a,b\n1,2\n3\n").unwrap_err();
        let text = err.to_string();
        assert!(text.contains("t.csv, line 3"), "{text}");
        assert!(text.contains("1 cells but the header has 2"), "{text}");

        let table = Table::parse(Path::new("t.csv"), "a,b\n1,abc\n").unwrap();
        let problem = table.number(&table.rows[0], 1).unwrap_err();
        assert_eq!(
            problem.to_string().lines().next().unwrap(),
            "t.csv, line 2, column 2 (\"b\"): \"abc\" is not a number"
        );
        let table = Table::parse(Path::new("t.csv"), "a\nNaN\n").unwrap();
        assert!(table.number(&table.rows[0], 0).is_err());
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
