//! One error type for the whole library. Every problem with the user's input names
//! the file and, where it is known, the line and the column or key involved, so a
//! researcher can go straight to the cell that needs fixing.

use std::fmt;
use std::path::{Path, PathBuf};

/// Where in an input file a problem sits. Lines and columns are 1-based, as editors show them.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Location {
    pub file: PathBuf,
    pub line: Option<usize>,
    /// A character column (TOML) or a table column described in words (CSV/TSV).
    pub column: Option<String>,
}

impl Location {
    pub fn file(file: &Path) -> Self {
        Location {
            file: file.to_path_buf(),
            line: None,
            column: None,
        }
    }

    pub fn line(file: &Path, line: usize) -> Self {
        Location {
            line: Some(line),
            ..Location::file(file)
        }
    }

    pub fn cell(file: &Path, line: usize, column: impl Into<String>) -> Self {
        Location {
            line: Some(line),
            column: Some(column.into()),
            ..Location::file(file)
        }
    }

    /// Location of a byte offset in a text: 1-based line and character column.
    pub fn at_offset(file: &Path, text: &str, offset: usize) -> Self {
        let offset = offset.min(text.len());
        let before = &text[..floor_char_boundary(text, offset)];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        let column = before[line_start..].chars().count() + 1;
        Location {
            line: Some(line),
            column: Some(format!("column {column}")),
            ..Location::file(file)
        }
    }
}

fn floor_char_boundary(text: &str, mut offset: usize) -> usize {
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    offset
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some(line) = self.line {
            write!(f, ", line {line}")?;
        }
        if let Some(column) = &self.column {
            write!(f, ", {column}")?;
        }
        Ok(())
    }
}

/// One thing wrong with the input, with a hint on how to fix it where we can give one.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    pub location: Location,
    pub message: String,
    pub hint: Option<String>,
}

impl Problem {
    pub fn new(location: Location, message: impl Into<String>) -> Self {
        Problem {
            location,
            message: message.into(),
            hint: None,
        }
    }

    pub fn with_hint(mut self, hint: impl Into<String>) -> Self {
        self.hint = Some(hint.into());
        self
    }
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.location, self.message)?;
        if let Some(hint) = &self.hint {
            write!(f, "\n  hint: {hint}")?;
        }
        Ok(())
    }
}

/// At most this many problems are listed; the rest are counted.
pub const MAX_LISTED_PROBLEMS: usize = 50;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The input files are wrong; every problem found is listed.
    #[error("{}", list_problems(.0))]
    Input(Vec<Problem>),
    /// The command line is wrong.
    #[error("{0}")]
    Usage(String),
    /// An output could not be written.
    #[error("cannot write {}: {source}", .path.display())]
    Output {
        path: PathBuf,
        source: std::io::Error,
    },
    /// A bug in tangle: the input was fine but we failed.
    #[error("internal error (please report it): {0}")]
    Internal(String),
}

impl Error {
    pub fn input(problem: Problem) -> Self {
        Error::Input(vec![problem])
    }
}

impl From<Problem> for Error {
    fn from(problem: Problem) -> Self {
        Error::input(problem)
    }
}

fn list_problems(problems: &[Problem]) -> String {
    let mut text = String::new();
    let count = problems.len();
    if count > 1 {
        text.push_str(&format!("{count} problems in the input:\n"));
    }
    for problem in problems.iter().take(MAX_LISTED_PROBLEMS) {
        text.push_str(&problem.to_string());
        text.push('\n');
    }
    if count > MAX_LISTED_PROBLEMS {
        text.push_str(&format!(
            "... and {} more problems not listed\n",
            count - MAX_LISTED_PROBLEMS
        ));
    }
    text.trim_end().to_string()
}

/// Collects problems so that validation can report all of them at once.
#[derive(Debug, Default)]
pub struct Problems(Vec<Problem>);

impl Problems {
    pub fn push(&mut self, problem: Problem) {
        self.0.push(problem);
    }

    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// Keeps the value of a fallible step, or records its problems and yields `None`.
    pub fn keep<T>(&mut self, result: Result<T, Error>) -> Option<T> {
        match result {
            Ok(value) => Some(value),
            Err(Error::Input(found)) => {
                self.0.extend(found);
                None
            }
            Err(other) => {
                self.0.push(Problem::new(
                    Location::file(Path::new("<tangle>")),
                    other.to_string(),
                ));
                None
            }
        }
    }

    /// `Ok(value)` when nothing was recorded, otherwise all recorded problems.
    pub fn finish<T>(self, value: T) -> Result<T, Error> {
        if self.0.is_empty() {
            Ok(value)
        } else {
            Err(Error::Input(self.0))
        }
    }
}

pub type Result<T, E = Error> = std::result::Result<T, E>;

/// The name in `known` most like `name`, if any is close enough to be a plausible typo
/// (for "did you mean" hints): Jaro–Winkler similarity at least 0.75, or, for short
/// names (which score low on Jaro–Winkler), one Damerau–Levenshtein edit away.
pub fn closest_name<'a>(name: &str, known: &[&'a str]) -> Option<&'a str> {
    known
        .iter()
        .map(|candidate| (strsim::jaro_winkler(name, candidate), *candidate))
        .filter(|(score, candidate)| {
            *score >= 0.75 || strsim::damerau_levenshtein(name, candidate) <= 1
        })
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, candidate)| candidate)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets_become_one_based_lines_and_columns() {
        let text = "a = 1\nbé = 2\n";
        let location = Location::at_offset(Path::new("s.toml"), text, 9);
        assert_eq!(location.line, Some(2));
        assert_eq!(location.column.as_deref(), Some("column 3"));
        assert_eq!(location.to_string(), "s.toml, line 2, column 3");
    }

    #[test]
    fn long_problem_lists_are_cut_with_a_count() {
        let problems: Vec<Problem> = (0..60)
            .map(|i| Problem::new(Location::line(Path::new("t.csv"), i + 1), "bad"))
            .collect();
        let text = Error::Input(problems).to_string();
        assert!(text.starts_with("60 problems in the input:"));
        assert!(text.ends_with("... and 10 more problems not listed"));
    }

    #[test]
    fn typos_find_the_closest_name() {
        assert_eq!(closest_name("p_e", &["pe", "value"]), Some("pe"));
        assert_eq!(closest_name("zzzz", &["pe", "value"]), None);
    }
}
