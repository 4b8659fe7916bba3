//! Typed access to a spanned TOML tree, shared by the study-file and forecast-spec
//! readers: every wrong type, impossible value or unknown key becomes a [`Problem`] with
//! its line and column, collected so that all of them are reported together.

use std::collections::BTreeSet;
use std::ops::Range;
use std::path::Path;

use toml::Spanned;
use toml::de::{DeTable, DeValue};

use crate::error::{Error, Location, Problem, Problems, Result};

pub type Table<'i> = DeTable<'i>;
pub type Value<'i> = Spanned<DeValue<'i>>;

/// Parses `text` as TOML, or returns the syntax error at its line and column.
pub fn parse_toml<'i>(path: &Path, text: &'i str, reference: &str) -> Result<Spanned<DeTable<'i>>> {
    DeTable::parse(text).map_err(|err| {
        let location = match err.span() {
            Some(span) => Location::at_offset(path, text, span.start),
            None => Location::file(path),
        };
        Error::input(
            Problem::new(
                location,
                format!("not valid TOML: {}", err.message().trim()),
            )
            .with_hint(format!("see the {reference} reference in the README")),
        )
    })
}

/// Collects the problems of one TOML file while its values are read.
pub struct TomlReader<'a> {
    pub path: &'a Path,
    pub text: &'a str,
    pub problems: Problems,
}

impl<'a> TomlReader<'a> {
    pub fn new(path: &'a Path, text: &'a str) -> TomlReader<'a> {
        TomlReader {
            path,
            text,
            problems: Problems::default(),
        }
    }

    /// The value built from the file, or every problem found in it.
    pub fn finish<T>(self, value: Option<T>, what: &str) -> Result<T> {
        match value {
            Some(value) => self.problems.finish(value),
            None => {
                Err(self.problems.finish(()).err().unwrap_or_else(|| {
                    Error::Internal(format!("{what} rejected without a reason"))
                }))
            }
        }
    }

    /// A problem about the whole file (e.g. a missing section).
    pub fn file_problem(&mut self, message: impl Into<String>, hint: impl Into<String>) {
        let problem = Problem::new(Location::file(self.path), message).with_hint(hint);
        self.problems.push(problem);
    }

    pub fn at(&self, span: Range<usize>) -> Location {
        Location::at_offset(self.path, self.text, span.start)
    }

    /// A problem at `span`, with a hint pointing to where the file's keys are described.
    pub fn problem(&mut self, span: Range<usize>, message: impl Into<String>) {
        let problem = Problem::new(self.at(span), message)
            .with_hint("the README describes every key of this file and the values it takes");
        self.problems.push(problem);
    }

    pub fn problem_with_hint(&mut self, span: Range<usize>, message: String, hint: String) {
        let problem = Problem::new(self.at(span), message).with_hint(hint);
        self.problems.push(problem);
    }

    // ---- typed access -------------------------------------------------------

    /// Reports every key of `table` that is not in `valid`, with the closest valid key.
    pub fn check_keys(&mut self, table: &Table<'_>, section: &str, valid: &[&str]) {
        for (key, _) in table.iter() {
            let name: &str = key.get_ref();
            if valid.contains(&name) {
                continue;
            }
            let place = if section.is_empty() {
                "at the top level".to_string()
            } else {
                format!("in [{section}]")
            };
            let hint = match crate::error::closest_name(name, valid) {
                Some(near) => format!("did you mean `{near}`?"),
                None => format!("valid keys here: {}", valid.join(", ")),
            };
            self.problem_with_hint(key.span(), format!("unknown key `{name}` {place}"), hint);
        }
    }

    /// The `[name]` section of `root`, its keys checked against `valid`.
    pub fn section<'t, 'i>(
        &mut self,
        root: &'t Table<'i>,
        name: &str,
        valid: &[&str],
    ) -> Option<&'t Table<'i>> {
        let value = get(root, name)?;
        match value.get_ref() {
            DeValue::Table(table) => {
                self.check_keys(table, name, valid);
                Some(table)
            }
            _ => {
                self.problem(
                    value.span(),
                    format!(
                        "[{name}] must be a table (a section), not a {}",
                        value.get_ref().type_str()
                    ),
                );
                None
            }
        }
    }

    pub fn array_of_tables<'t, 'i>(
        &mut self,
        root: &'t Table<'i>,
        name: &str,
    ) -> Option<Vec<(&'t Table<'i>, Range<usize>)>> {
        let value = get(root, name)?;
        let DeValue::Array(items) = value.get_ref() else {
            self.problem_with_hint(
                value.span(),
                format!("`{name}` must be a list of tables"),
                format!("write each one under its own [[{name}]] header"),
            );
            return None;
        };
        let mut tables = Vec::new();
        for item in items {
            match item.get_ref() {
                DeValue::Table(table) => tables.push((table, item.span())),
                other => self.problem(
                    item.span(),
                    format!(
                        "each [[{name}]] must be a table, not a {}",
                        other.type_str()
                    ),
                ),
            }
        }
        Some(tables)
    }

    pub fn required_name(
        &mut self,
        table: &Table<'_>,
        section: &str,
        span: Range<usize>,
        seen: &mut BTreeSet<String>,
    ) -> Option<String> {
        let Some((name, name_span)) = self.string(table, "name") else {
            if !has_key(table, "name") {
                self.problem_with_hint(
                    span,
                    format!("this [[{section}]] has no name"),
                    "add name = \"...\"".to_string(),
                );
            }
            return None;
        };
        if name.trim().is_empty() {
            self.problem(name_span, format!("the {section} name is empty"));
            return None;
        }
        if !seen.insert(name.clone()) {
            self.problem_with_hint(
                name_span,
                format!("two [[{section}]] entries are named \"{name}\""),
                format!("give every [[{section}]] its own name (remove or rename the second)"),
            );
            return None;
        }
        Some(name)
    }

    pub fn missing(&mut self, table: &Table<'_>, section: &str, key: &str, example: &str) {
        let _ = table;
        self.problems.push(
            Problem::new(
                Location::file(self.path),
                format!("[{section}] is missing the required key `{key}`"),
            )
            .with_hint(format!("add: {example}")),
        );
    }

    pub fn string(&mut self, table: &Table<'_>, key: &str) -> Option<(String, Range<usize>)> {
        let value = get(table, key)?;
        match value.get_ref() {
            DeValue::String(text) => Some((text.to_string(), value.span())),
            other => {
                self.problem_with_hint(
                    value.span(),
                    format!(
                        "`{key}` must be a string in quotes, not a {}",
                        other.type_str()
                    ),
                    format!("put the value in double quotes, e.g. {key} = \"...\""),
                );
                None
            }
        }
    }

    pub fn string_list(&mut self, value: &Spanned<DeValue<'_>>) -> Option<Vec<String>> {
        let DeValue::Array(items) = value.get_ref() else {
            self.problem(
                value.span(),
                "expected a list of strings, e.g. [\"tx\", \"ty\"]",
            );
            return None;
        };
        let mut list = Vec::new();
        for item in items {
            match item.get_ref() {
                DeValue::String(text) => list.push(text.to_string()),
                other => {
                    self.problem(
                        item.span(),
                        format!("expected a string, not a {}", other.type_str()),
                    );
                    return None;
                }
            }
        }
        Some(list)
    }

    pub fn boolean(&mut self, table: &Table<'_>, key: &str) -> Option<bool> {
        let value = get(table, key)?;
        match value.get_ref() {
            DeValue::Boolean(flag) => Some(*flag),
            other => {
                self.problem_with_hint(
                    value.span(),
                    format!("`{key}` must be true or false, not a {}", other.type_str()),
                    format!("write {key} = true or {key} = false, without quotes"),
                );
                None
            }
        }
    }

    /// A finite number (TOML integer or float).
    pub fn number(&mut self, table: &Table<'_>, key: &str) -> Option<(f64, Range<usize>)> {
        let value = get(table, key)?;
        self.number_value(value, &format!("`{key}`"))
            .map(|number| (number, value.span()))
    }

    /// `value` as a finite number; `what` names it in the message (e.g. "`tr`").
    pub fn number_value(&mut self, value: &Value<'_>, what: &str) -> Option<f64> {
        let parsed = match value.get_ref() {
            DeValue::Integer(integer) => {
                parse_integer(integer.as_str(), integer.radix()).map(|i| i as f64)
            }
            DeValue::Float(float) => float.as_str().replace('_', "").parse::<f64>().ok(),
            other => {
                self.problem_with_hint(
                    value.span(),
                    format!("{what} must be a number, not a {}", other.type_str()),
                    "write the number without quotes, e.g. 2.0".to_string(),
                );
                return None;
            }
        };
        match parsed {
            Some(number) if number.is_finite() => Some(number),
            _ => {
                self.problem_with_hint(
                    value.span(),
                    format!("{what} must be a finite number"),
                    "nan and inf are not allowed here; write an ordinary number".to_string(),
                );
                None
            }
        }
    }

    /// `value` as a number or a list of numbers; `what` names it in messages.
    pub fn numbers_value(&mut self, value: &Value<'_>, what: &str) -> Option<Vec<f64>> {
        match value.get_ref() {
            DeValue::Array(items) => {
                let numbers: Vec<Option<f64>> = items
                    .iter()
                    .map(|item| self.number_value(item, what))
                    .collect();
                numbers.into_iter().collect()
            }
            _ => self.number_value(value, what).map(|n| vec![n]),
        }
    }

    pub fn positive_integer(&mut self, table: &Table<'_>, key: &str) -> Option<usize> {
        let value = get(table, key)?;
        let DeValue::Integer(integer) = value.get_ref() else {
            self.problem_with_hint(
                value.span(),
                format!(
                    "`{key}` must be a whole number, not a {}",
                    value.get_ref().type_str()
                ),
                format!("write a whole number without quotes or a decimal point, e.g. {key} = 3"),
            );
            return None;
        };
        match parse_integer(integer.as_str(), integer.radix()) {
            Some(n) if n > 0 => usize::try_from(n).ok(),
            _ => {
                self.problem(
                    value.span(),
                    format!(
                        "`{key}` must be a positive whole number, not {}",
                        integer.as_str()
                    ),
                );
                None
            }
        }
    }
}

pub fn get<'t, 'i>(table: &'t Table<'i>, key: &str) -> Option<&'t Spanned<DeValue<'i>>> {
    table
        .iter()
        .find(|(name, _)| AsRef::<str>::as_ref(name.get_ref()) == key)
        .map(|(_, value)| value)
}

pub fn has_key(table: &Table<'_>, key: &str) -> bool {
    get(table, key).is_some()
}

pub fn parse_integer(text: &str, radix: u32) -> Option<i64> {
    let digits = text.replace('_', "");
    let digits = digits.trim_start_matches('+');
    let digits = match radix {
        16 => digits.trim_start_matches("0x"),
        8 => digits.trim_start_matches("0o"),
        2 => digits.trim_start_matches("0b"),
        _ => digits,
    };
    i64::from_str_radix(digits, radix).ok()
}
