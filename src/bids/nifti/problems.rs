//! The messages for images whose header cannot be read. Each names the file, says
//! what was found, and suggests a fix.

use std::path::Path;

use super::layout::{Layout, NIFTI1, NIFTI2};
use crate::Error;
use crate::error::{Location, Problem};

const RECOPY: &str = "the file may have been cut short while copying or downloading; copy it again";

fn problem(path: &Path, message: impl Into<String>, hint: impl Into<String>) -> Error {
    Problem::new(Location::file(path), message)
        .with_hint(hint)
        .into()
}

pub(super) fn unreadable(path: &Path, err: &std::io::Error) -> Error {
    problem(
        path,
        format!("cannot read the image: {err}"),
        "check the path and that the file can be read",
    )
}

/// Up to 8 leading bytes, in hex and as escaped text, e.g. `7b 22 61 ... ("{\"a...")`.
pub(super) fn describe(bytes: &[u8]) -> String {
    let shown = &bytes[..bytes.len().min(8)];
    let hex: Vec<String> = shown.iter().map(|b| format!("{b:02x}")).collect();
    format!("{} (\"{}\")", hex.join(" "), shown.escape_ascii())
}

pub(super) fn gz_name_but_not_gzip(path: &Path, start: &[u8]) -> Error {
    let found = if start.is_empty() {
        "the file is empty".to_string()
    } else {
        format!("its first bytes are {}", describe(start))
    };
    problem(
        path,
        format!("the name ends in .gz but is not gzip-compressed ({found})"),
        "if it is an uncompressed NIfTI image, rename it to end in .nii; otherwise compress it with gzip",
    )
}

pub(super) fn broken_gzip(path: &Path, found: usize, err: &std::io::Error) -> Error {
    problem(
        path,
        format!(
            "the gzip stream is damaged or cut short: {err}; only {found} bytes of the header \
             could be decompressed"
        ),
        format!("{RECOPY}, or test it with `gzip -t`"),
    )
}

/// A header shorter than its version needs; `layout` is `None` when even sizeof_hdr
/// (4 bytes) is missing.
pub(super) fn too_short(
    path: &Path,
    found: usize,
    layout: Option<&Layout>,
    compressed: bool,
) -> Error {
    let what = if compressed {
        "the decompressed image"
    } else {
        "the file"
    };
    let message = match (found, layout) {
        (0, _) => format!("{what} is empty, so it holds no NIfTI header"),
        (_, None) => format!(
            "{what} has only {found} bytes; a NIfTI header is {} (NIfTI-1) or {} (NIfTI-2) bytes",
            NIFTI1.size, NIFTI2.size
        ),
        (_, Some(layout)) => format!(
            "{what} is cut short: it has {found} bytes, but a NIfTI-{} header is {} bytes",
            layout.version, layout.size
        ),
    };
    problem(path, message, RECOPY)
}

/// sizeof_hdr (int32 at offset 0, nifti1.h and nifti2.h) is neither 348 nor 540.
pub(super) fn not_nifti(path: &Path, bytes: &[u8]) -> Error {
    let start = bytes.first_chunk::<4>().copied().unwrap_or_default();
    let little = i32::from_le_bytes(start);
    let big = i32::from_be_bytes(start);
    let hint = if bytes.starts_with(&super::GZIP_MAGIC) {
        "the bytes are gzip-compressed (compressed twice, or not decompressed yet?); \
         decompress them once with gunzip"
            .to_string()
    } else {
        format!(
            "is this a NIfTI image? the first bytes look like {}",
            describe(bytes)
        )
    };
    problem(
        path,
        format!(
            "not a NIfTI header: sizeof_hdr (the first 4 bytes) reads {little} little-endian \
             and {big} big-endian, but must be {} for NIfTI-1 or {} for NIfTI-2",
            NIFTI1.size, NIFTI2.size
        ),
        hint,
    )
}

pub(super) fn bad_magic(path: &Path, layout: &Layout, found: &[u8]) -> Error {
    let expected: Vec<String> = layout
        .magics
        .iter()
        .map(|magic| format!("\"{}\"", magic.escape_ascii()))
        .collect();
    let single = layout.magics[0];
    let hint = if found.iter().all(|&b| b == 0) && layout.version == 1 {
        "this looks like an ANALYZE 7.5 header, which has no NIfTI magic; convert it to NIfTI"
            .to_string()
    } else if layout.version == 2 && found.get(..4) == single.get(..4) {
        // nifti2.h: the \r\n\032\n after "n+2\0" exist to catch exactly this.
        "the bytes after \"n+2\\0\" were changed, as a text-mode transfer (FTP ASCII mode, \
         line-ending conversion) does; copy the file again in binary mode"
            .to_string()
    } else {
        format!(
            "sizeof_hdr says NIfTI-{} but the magic does not match; the file is damaged or \
             not a NIfTI image",
            layout.version
        )
    };
    problem(
        path,
        format!(
            "the NIfTI-{} magic at byte {} is \"{}\"; expected {}",
            layout.version,
            layout.magic_offset,
            found.escape_ascii(),
            expected.join(" or ")
        ),
        hint,
    )
}

/// A header field outside the range the standard allows.
pub(super) fn bad_field(path: &Path, field: &str, found: &str, expected: &str) -> Error {
    problem(
        path,
        format!("the header's {field} is {found}, but must be {expected}"),
        "the header is damaged or was written by a faulty program; re-export the image",
    )
}

pub(super) fn too_many_voxels(path: &Path, count: i64) -> Error {
    problem(
        path,
        format!("the header's dim[1] to dim[{count}] multiply to more voxels than can be counted"),
        "the header is damaged or was written by a faulty program; re-export the image",
    )
}
