//! Writing results: to standard output, or to a file that appears whole or not at all
//! (written to a temporary file in the same folder, then renamed over the target).

use std::io::Write;
use std::path::Path;

use crate::error::{Error, Result};

pub fn write_atomically(path: &Path, contents: &str) -> Result<()> {
    let output_error = |source| Error::Output {
        path: path.to_path_buf(),
        source,
    };
    let folder = match path.parent() {
        Some(folder) if !folder.as_os_str().is_empty() => folder,
        _ => Path::new("."),
    };
    std::fs::create_dir_all(folder).map_err(output_error)?;
    let mut temporary = tempfile::NamedTempFile::new_in(folder).map_err(output_error)?;
    temporary
        .write_all(contents.as_bytes())
        .map_err(output_error)?;
    temporary.as_file().sync_all().map_err(output_error)?;
    temporary
        .persist(path)
        .map_err(|err| output_error(err.error))?;
    Ok(())
}

/// Writes TSV tables beside each other: the table named `main` to `path`, every other
/// table to `<stem>.<table>.tsv` in the same folder.
pub fn write_tables(
    path: &Path,
    tables: &[crate::report::tsv::TsvTable],
    main: &str,
) -> Result<()> {
    for table in tables {
        let target = if table.name == main {
            path.to_path_buf()
        } else {
            let stem = path
                .file_stem()
                .map_or_else(|| "tangle".into(), |s| s.to_string_lossy().into_owned());
            path.with_file_name(format!("{stem}.{}.tsv", table.name))
        };
        write_atomically(&target, &table.text)?;
    }
    Ok(())
}
