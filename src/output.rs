//! Writing results: to standard output, or to a file that appears whole or not at all
//! (written to a temporary file in the same folder, then renamed over the target).

use std::io::Write;
use std::path::Path;

use crate::error::{Error, Result};
use crate::render::Document;

/// Writes a rendered report to `out`, or to standard output.
pub fn deliver(document: Document, out: Option<&Path>) -> Result<()> {
    match (document, out) {
        (Document::Text(text), Some(path)) => write_atomically(path, &text),
        (Document::Text(text), None) => print_to_stdout(text.as_bytes()),
        (Document::Tables { tables, main, .. }, Some(path)) => write_tables(path, &tables, main),
        (Document::Tables { tables, joined, .. }, None) => {
            print_to_stdout(joined(&tables).as_bytes())
        }
    }
}

/// Standard output closed early (e.g. piped into `head`) is not an error: the reader has
/// what it wanted.
pub fn print_to_stdout(bytes: &[u8]) -> Result<()> {
    let mut stdout = std::io::stdout().lock();
    match stdout.write_all(bytes).and_then(|()| stdout.flush()) {
        Err(err) if err.kind() != std::io::ErrorKind::BrokenPipe => Err(Error::Output {
            path: "standard output".into(),
            source: err,
        }),
        _ => Ok(()),
    }
}

pub fn write_atomically(path: &Path, contents: &str) -> Result<()> {
    write_atomically_with(path, &mut |out| out.write_all(contents.as_bytes()))
}

/// As [`write_atomically`], with the contents written by `write` (buffered), so that a
/// large output is never held in memory whole. A target that exists and is not a plain
/// file (e.g. `/dev/null`, a named pipe) is written to directly, never replaced.
pub fn write_atomically_with(
    path: &Path,
    write: &mut dyn FnMut(&mut dyn Write) -> std::io::Result<()>,
) -> Result<()> {
    let output_error = |source| Error::Output {
        path: path.to_path_buf(),
        source,
    };
    let folder = match path.parent() {
        Some(folder) if !folder.as_os_str().is_empty() => folder,
        _ => Path::new("."),
    };
    std::fs::create_dir_all(folder).map_err(output_error)?;
    if std::fs::metadata(path).is_ok_and(|m| !m.is_file() && !m.is_dir()) {
        let file = std::fs::OpenOptions::new()
            .write(true)
            .open(path)
            .map_err(output_error)?;
        let mut buffered = std::io::BufWriter::new(file);
        write(&mut buffered).map_err(output_error)?;
        return buffered.flush().map_err(output_error);
    }
    let mut temporary = tempfile::NamedTempFile::new_in(folder).map_err(output_error)?;
    {
        let mut buffered = std::io::BufWriter::new(temporary.as_file_mut());
        write(&mut buffered).map_err(output_error)?;
        buffered.flush().map_err(output_error)?;
    }
    // A temporary file is private (0600); an output is an ordinary file the user's group
    // and tools may read, as if it had been created directly.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let permissions = std::fs::Permissions::from_mode(0o644);
        temporary
            .as_file()
            .set_permissions(permissions)
            .map_err(output_error)?;
    }
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
    tables: &[crate::render::tsv::TsvTable],
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

/// Writes one folder per variant of a forecast under `dir` (see
/// [`crate::forecast::write::variant_files`]); each file appears whole or not at all.
pub fn write_trial_folders(
    dir: &Path,
    spec: &crate::forecast::spec::ForecastSpec,
    forecast: &crate::forecast::Forecast,
) -> Result<()> {
    use crate::forecast::write::{folder_name, variant_files};
    for (i, (variant, participants)) in spec.variants.iter().zip(&forecast.participants).enumerate()
    {
        let folder = dir.join(folder_name(i + 1, &variant.name));
        for (name, contents) in variant_files(spec, variant, participants) {
            write_atomically(&folder.join(name), &contents)?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn written_files_are_whole_and_readable_by_others() {
        let dir = tempfile::tempdir().expect("temporary folder");
        let path = dir.path().join("new/folder/report.json");
        write_atomically(&path, "{}\n").expect("written");
        assert_eq!(std::fs::read_to_string(&path).expect("read"), "{}\n");
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = std::fs::metadata(&path)
                .expect("metadata")
                .permissions()
                .mode();
            assert_eq!(mode & 0o777, 0o644);
        }
        let leftovers = std::fs::read_dir(path.parent().expect("folder"))
            .expect("list")
            .count();
        assert_eq!(leftovers, 1, "no temporary file is left behind");
    }
}
