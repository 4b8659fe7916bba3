//! BIDS JSON sidecars and their inheritance.
//!
//! BIDS specification, "Common principles: The Inheritance Principle": a JSON metadata
//! file applies to a data file when it sits in the data file's folder or a folder above
//! it (up to the dataset root), has the same suffix, and all of its entities appear in
//! the data file's name with the same values. Applicable files are ordered from the
//! top of the dataset down and, within one folder, from fewest to most entities; keys
//! of later files override those of earlier ones. Two applicable files in one folder
//! with the same number of entities are ambiguous, which the standard forbids.

use std::collections::BTreeMap;
use std::io;
use std::path::{Component, Path, PathBuf};

use serde_json::{Map, Value};

use super::entities::BidsName;
use crate::error::{Location, Problem, Result};
use crate::files::InputFiles;

/// The metadata that applies to one data file, merged from every applicable sidecar.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Sidecar {
    pub values: Map<String, Value>,
    /// For each top-level key, the file it came from.
    pub sources: BTreeMap<String, PathBuf>,
}

/// The metadata that applies to `data_file` inside the dataset at `root`, merged by the
/// inheritance principle (see the module comment). No applicable sidecar gives an
/// empty `Sidecar`; the caller decides whether that is an error.
pub fn resolve_sidecar(files: &dyn InputFiles, root: &Path, data_file: &Path) -> Result<Sidecar> {
    let data_name = data_file
        .file_name()
        .and_then(|name| name.to_str())
        .and_then(BidsName::parse)
        .ok_or_else(|| {
            Problem::new(
                Location::file(data_file),
                "the file name is not a BIDS name of the form key-value_..._suffix.ext",
            )
            .with_hint("name it like sub-01_task-x_run-1_bold.nii.gz")
        })?;
    let inside = data_file
        .parent()
        .and_then(|folder| folder.strip_prefix(root).ok())
        // Only plain folder names: a `..` could lead the walk out of the dataset.
        .filter(|inside| {
            inside
                .components()
                .all(|c| matches!(c, Component::Normal(_)))
        })
        .ok_or_else(|| {
            Problem::new(
                Location::file(data_file),
                format!("the file is not inside the dataset {}", root.display()),
            )
            .with_hint("give the dataset's root folder, the one above the sub-* folders")
        })?;

    // Folders from the dataset root down to the data file's own folder; nearer
    // folders come later so that their keys override (specification, "The
    // Inheritance Principle").
    let mut folders = vec![root.to_path_buf()];
    for part in inside.components() {
        let next = folders[folders.len() - 1].join(part);
        folders.push(next);
    }

    let mut sidecar = Sidecar::default();
    for folder in &folders {
        for path in applicable_in(files, folder, data_file, &data_name)? {
            let object = read_object(files, &path)?;
            for (key, value) in object {
                sidecar.sources.insert(key.clone(), path.clone());
                sidecar.values.insert(key, value);
            }
        }
    }
    Ok(sidecar)
}

/// The applicable sidecars in one folder, from fewest to most entities; an error when
/// two have the same number of entities, since neither could override the other.
fn applicable_in(
    files: &dyn InputFiles,
    folder: &Path,
    data_file: &Path,
    data_name: &BidsName,
) -> Result<Vec<PathBuf>> {
    let entries = match files.list(folder) {
        Ok(entries) => entries,
        // A folder with nothing in it holds no sidecar.
        Err(err) if err.kind() == io::ErrorKind::NotFound => return Ok(Vec::new()),
        Err(err) => {
            return Err(Problem::new(
                Location::file(folder),
                format!("cannot list the folder: {err}"),
            )
            .with_hint("check that the folder exists and can be read")
            .into());
        }
    };
    let mut found: Vec<(usize, PathBuf)> = entries
        .into_iter()
        .filter(|path| path != data_file && files.is_file(path))
        .filter_map(|path| {
            let name = BidsName::parse(path.file_name()?.to_str()?)?;
            let applies = name.extension == ".json"
                && name.suffix == data_name.suffix
                && name.entities_within(data_name);
            applies.then_some((name.entities.len(), path))
        })
        .collect();
    found.sort_by_key(|(count, _)| *count);
    if let Some(pair) = found.windows(2).find(|pair| pair[0].0 == pair[1].0) {
        let (first, second) = (&pair[0].1, &pair[1].1);
        return Err(Problem::new(
            Location::file(first),
            format!(
                "both this file and {} apply to {} with the same number of entities, \
                 so neither overrides the other",
                second.display(),
                data_file.display()
            ),
        )
        .with_hint(
            "the BIDS inheritance principle allows one such file per folder: merge them, \
             or add an entity to one so it is more specific",
        )
        .into());
    }
    Ok(found.into_iter().map(|(_, path)| path).collect())
}

/// Reads a sidecar, which must be a UTF-8 JSON object (specification, "Common
/// principles: Key-value files (dictionaries)").
fn read_object(files: &dyn InputFiles, path: &Path) -> Result<Map<String, Value>> {
    let bytes = files.read(path).map_err(|err| {
        Problem::new(Location::file(path), format!("cannot read the file: {err}"))
            .with_hint("check that the file exists and can be read")
    })?;
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(&bytes);
    let text = std::str::from_utf8(bytes).map_err(|err| {
        let line = bytes[..err.valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1;
        Problem::new(Location::line(path, line), "the file is not UTF-8 text")
            .with_hint("save the JSON file as UTF-8")
    })?;
    match serde_json::from_str::<Value>(text) {
        Ok(Value::Object(object)) => Ok(object),
        Ok(_) => Err(Problem::new(
            Location::file(path),
            "the sidecar is valid JSON but not an object of key-value pairs",
        )
        .with_hint("wrap the metadata in { ... }, e.g. {\"RepetitionTime\": 2.0}")
        .into()),
        Err(err) => Err(Problem::new(
            Location::cell(path, err.line(), format!("column {}", err.column())),
            // The location already gives line and column; keep only the reason.
            format!("the file is not valid JSON: {}", json_reason(&err)),
        )
        .with_hint("look for a missing comma, quote or brace at or just before this spot")
        .into()),
    }
}

/// serde_json's message without its trailing " at line L column C".
fn json_reason(err: &serde_json::Error) -> String {
    let text = err.to_string();
    match text.rfind(" at line ") {
        Some(end) => text[..end].to_string(),
        None => text,
    }
}

impl Sidecar {
    /// A positive finite number under `key`, or None if absent; an error naming the
    /// source file if present but not a positive number.
    pub fn positive_number(&self, key: &str) -> Result<Option<(f64, PathBuf)>> {
        let Some((value, source)) = self.entry(key) else {
            return Ok(None);
        };
        match value.as_f64() {
            Some(number) if number.is_finite() && number > 0.0 => {
                Ok(Some((number, source.to_path_buf())))
            }
            _ => Err(Problem::new(
                Location::file(source),
                format!("\"{key}\" must be a positive number, found {value}"),
            )
            .with_hint(format!(
                "write it as a number without quotes, e.g. \"{key}\": 2.0"
            ))
            .into()),
        }
    }

    /// A list of finite numbers ≥ 0 under `key` (e.g. SliceTiming), or None if absent;
    /// an error naming the source file if present but not such a list.
    pub fn numbers(&self, key: &str) -> Result<Option<(Vec<f64>, PathBuf)>> {
        let Some((value, source)) = self.entry(key) else {
            return Ok(None);
        };
        let problem = |message: String| {
            Problem::new(Location::file(source), message).with_hint(format!(
                "write it as a list of numbers without quotes, e.g. \"{key}\": [0.0, 0.5, 1.0]"
            ))
        };
        let Value::Array(items) = value else {
            return Err(problem(format!(
                "\"{key}\" must be a list of numbers, found {value}"
            ))
            .into());
        };
        let mut numbers = Vec::with_capacity(items.len());
        for (index, item) in items.iter().enumerate() {
            match item.as_f64() {
                Some(number) if number.is_finite() && number >= 0.0 => numbers.push(number),
                _ => {
                    return Err(problem(format!(
                        "entry {} of \"{key}\" must be a number of at least 0, found {item}",
                        index + 1
                    ))
                    .into());
                }
            }
        }
        Ok(Some((numbers, source.to_path_buf())))
    }

    fn entry(&self, key: &str) -> Option<(&Value, &Path)> {
        let value = self.values.get(key)?;
        // `resolve_sidecar` records a source for every key; a placeholder stands in
        // only if a caller filled `values` by hand without one.
        let source = self
            .sources
            .get(key)
            .map_or(Path::new("<sidecar>"), PathBuf::as_path);
        Some((value, source))
    }
}

#[cfg(test)]
mod tests;
