//! Where input files come from. The tool reads from disk; the bundled demo study reads
//! from copies embedded in the binary, so `tangle demo` works from any folder.

use std::collections::BTreeMap;
use std::io;
use std::path::{Path, PathBuf};

pub trait InputFiles: Sync {
    fn read(&self, path: &Path) -> io::Result<Vec<u8>>;

    /// A reader over the file, for reading only its start (e.g. an image header).
    fn open(&self, path: &Path) -> io::Result<Box<dyn io::Read + '_>> {
        Ok(Box::new(io::Cursor::new(self.read(path)?)))
    }

    /// The entries of a folder (files and folders), sorted by name.
    fn list(&self, folder: &Path) -> io::Result<Vec<PathBuf>>;

    fn is_file(&self, path: &Path) -> bool;
}

/// Files on disk.
pub struct DiskFiles;

impl InputFiles for DiskFiles {
    fn read(&self, path: &Path) -> io::Result<Vec<u8>> {
        std::fs::read(path)
    }

    fn open(&self, path: &Path) -> io::Result<Box<dyn io::Read + '_>> {
        Ok(Box::new(io::BufReader::new(std::fs::File::open(path)?)))
    }

    fn list(&self, folder: &Path) -> io::Result<Vec<PathBuf>> {
        let mut entries = std::fs::read_dir(folder)?
            .map(|entry| entry.map(|e| e.path()))
            .collect::<io::Result<Vec<_>>>()?;
        entries.sort();
        Ok(entries)
    }

    fn is_file(&self, path: &Path) -> bool {
        path.is_file()
    }
}

/// Files held in memory, keyed by path.
#[derive(Default)]
pub struct MemoryFiles(BTreeMap<PathBuf, Vec<u8>>);

impl MemoryFiles {
    pub fn with(mut self, path: impl Into<PathBuf>, contents: impl Into<Vec<u8>>) -> Self {
        self.0.insert(path.into(), contents.into());
        self
    }
}

impl InputFiles for MemoryFiles {
    fn read(&self, path: &Path) -> io::Result<Vec<u8>> {
        self.0.get(path).cloned().ok_or_else(|| {
            io::Error::new(
                io::ErrorKind::NotFound,
                "no such file in the bundled demo study",
            )
        })
    }

    /// Every file under `folder`, and every folder on the way to one, one level down.
    fn list(&self, folder: &Path) -> io::Result<Vec<PathBuf>> {
        let mut entries: Vec<PathBuf> = self
            .0
            .keys()
            .filter_map(|path| {
                let rest = path.strip_prefix(folder).ok()?;
                let first = rest.components().next()?;
                Some(folder.join(first))
            })
            .collect();
        entries.dedup();
        if entries.is_empty() {
            return Err(io::Error::new(io::ErrorKind::NotFound, "no such folder"));
        }
        Ok(entries)
    }

    fn is_file(&self, path: &Path) -> bool {
        self.0.contains_key(path)
    }
}

/// Reads a UTF-8 text file, dropping a byte-order mark; errors name the file.
pub fn read_text(files: &dyn InputFiles, path: &Path) -> crate::Result<String> {
    use crate::error::{Location, Problem};
    let bytes = files.read(path).map_err(|err| {
        Problem::new(Location::file(path), format!("cannot read the file: {err}"))
            .with_hint("check the path; relative paths are taken from the study file's folder")
    })?;
    if let Some(encoding) = utf16_mark(&bytes) {
        return Err(utf16_problem(path, encoding).into());
    }
    let mut bytes = bytes;
    if bytes.starts_with(b"\xEF\xBB\xBF") {
        bytes.drain(..3);
    }
    String::from_utf8(bytes).map_err(|err| {
        let offset = err.utf8_error().valid_up_to();
        let line = err.as_bytes()[..offset]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1;
        not_utf8_problem(path, line).into()
    })
}

/// The UTF-16 byte order a file's first bytes announce, if they are a UTF-16 mark.
pub fn utf16_mark(start: &[u8]) -> Option<&'static str> {
    match start {
        [0xFF, 0xFE, ..] => Some("little-endian"),
        [0xFE, 0xFF, ..] => Some("big-endian"),
        _ => None,
    }
}

/// A file saved as UTF-16 (as some spreadsheet "Unicode text" exports are).
pub fn utf16_problem(path: &Path, byte_order: &str) -> crate::error::Problem {
    use crate::error::{Location, Problem};
    Problem::new(
        Location::line(path, 1),
        format!("the file is UTF-16 text ({byte_order}), not UTF-8"),
    )
    .with_hint("save it again as UTF-8 (e.g. \"CSV UTF-8\" in a spreadsheet's save dialog)")
}

/// Bytes that are not UTF-8, at `line`.
pub fn not_utf8_problem(path: &Path, line: usize) -> crate::error::Problem {
    use crate::error::{Location, Problem};
    Problem::new(
        Location::line(path, line),
        "the file is not UTF-8 text (or is a binary file)",
    )
    .with_hint("save it as UTF-8 CSV or TSV; text with accents saved as Latin-1 or Windows-1252 (a spreadsheet's default on some systems) is not UTF-8")
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::Read;

    #[test]
    fn memory_folders_list_one_level_and_open_reads_the_start() {
        let files = MemoryFiles::default()
            .with("ds/sub-01/func/a.tsv", "x")
            .with("ds/sub-01/func/b.tsv", "y")
            .with("ds/sub-02/anat/c.nii", "z")
            .with("ds/dataset_description.json", "{}");
        let listed = files.list(Path::new("ds")).expect("a folder");
        let names: Vec<&str> = listed.iter().filter_map(|p| p.to_str()).collect();
        assert_eq!(
            names,
            ["ds/dataset_description.json", "ds/sub-01", "ds/sub-02"]
        );
        assert!(files.list(Path::new("elsewhere")).is_err());
        assert!(files.is_file(Path::new("ds/sub-01/func/a.tsv")));
        assert!(!files.is_file(Path::new("ds/sub-01")));
        let mut start = [0u8; 1];
        files
            .open(Path::new("ds/sub-01/func/b.tsv"))
            .and_then(|mut r| r.read_exact(&mut start))
            .expect("readable");
        assert_eq!(&start, b"y");
    }

    #[test]
    fn disk_folders_list_sorted() {
        let dir = tempfile::tempdir().expect("temporary folder");
        for name in ["b.tsv", "a.tsv"] {
            std::fs::write(dir.path().join(name), "x").expect("written");
        }
        let listed = DiskFiles.list(dir.path()).expect("a folder");
        assert_eq!(listed, [dir.path().join("a.tsv"), dir.path().join("b.tsv")]);
        assert!(DiskFiles.is_file(&listed[0]));
    }
}
