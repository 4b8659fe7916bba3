//! Where input files come from. The tool reads from disk; the bundled demo study reads
//! from copies embedded in the binary, so `tangle demo` works from any folder.

use std::collections::BTreeMap;
use std::io;
use std::path::{Path, PathBuf};

pub trait InputFiles: Sync {
    fn read(&self, path: &Path) -> io::Result<Vec<u8>>;
}

/// Files on disk.
pub struct DiskFiles;

impl InputFiles for DiskFiles {
    fn read(&self, path: &Path) -> io::Result<Vec<u8>> {
        std::fs::read(path)
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
}

/// Reads a UTF-8 text file, dropping a byte-order mark; errors name the file.
pub fn read_text(files: &dyn InputFiles, path: &Path) -> crate::Result<String> {
    use crate::error::{Location, Problem};
    let bytes = files.read(path).map_err(|err| {
        Problem::new(Location::file(path), format!("cannot read the file: {err}"))
            .with_hint("check the path; relative paths are taken from the study file's folder")
    })?;
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(&bytes);
    String::from_utf8(bytes.to_vec()).map_err(|err| {
        let offset = err.utf8_error().valid_up_to();
        let line = bytes[..offset].iter().filter(|&&b| b == b'\n').count() + 1;
        Problem::new(
            Location::line(path, line),
            "the file is not UTF-8 text (or is a binary file)",
        )
        .with_hint("save it as UTF-8 CSV or TSV")
        .into()
    })
}
