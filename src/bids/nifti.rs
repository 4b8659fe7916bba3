//! NIfTI-1 and NIfTI-2 image headers: how many volumes a run's image holds, its
//! dimensions and its repetition time, read from the header alone (the first 348 or
//! 540 bytes), so a multi-gigabyte `.nii.gz` costs a few kilobytes of decompression.
//!
//! Field offsets follow the NIfTI Data Format Working Group's nifti1.h and nifti2.h;
//! they are listed, with their sources, in `nifti/layout.rs`.

mod layout;
mod problems;
#[cfg(test)]
mod tests;
#[cfg(test)]
mod tests_errors;

use std::io::{Cursor, Read};
use std::path::Path;

use crate::files::InputFiles;
use layout::{EXTENSION_FLAG_SIZE, Fields, Layout, NIFTI1, NIFTI2, Writer};

/// What tangle needs from an image header.
#[derive(Debug, Clone, PartialEq)]
pub struct ImageHeader {
    /// 1 or 2.
    pub version: u8,
    /// dim[1..=dim[0]]: the size of each dimension.
    pub dims: Vec<u64>,
    /// Number of volumes: dim[4] when dim[0] ≥ 4, else 1.
    pub volumes: usize,
    /// pixdim[4] converted to seconds using xyzt_units (ms → /1000, µs → /1e6, unknown
    /// unit → None); None when not positive and finite.
    pub repetition_time: Option<f64>,
}

/// The gzip magic (RFC 1952, ID1 and ID2).
const GZIP_MAGIC: [u8; 2] = [0x1f, 0x8b];

/// Reads the header of a `.nii` or `.nii.gz` image (only its first bytes; the gzip
/// stream is decompressed only as far as the header).
///
/// Compression is decided from the first two bytes, not the name: a name ending in
/// `.gz` whose bytes are not gzip is an error (something renamed it, or a download
/// saved it already decompressed), while a `.nii` that is gzip-compressed is read
/// anyway, since its content is unambiguous and renaming buys the user nothing.
/// Concatenated gzip members are read as one stream (RFC 1952 allows them).
pub fn read_image_header(files: &dyn InputFiles, path: &Path) -> crate::Result<ImageHeader> {
    let mut raw = files
        .open(path)
        .map_err(|err| problems::unreadable(path, &err))?;
    // Eight bytes: two decide gzip, all eight describe a file that is neither.
    let mut start = Vec::with_capacity(8);
    read_at_most(&mut raw, 8, &mut start).map_err(|err| problems::unreadable(path, &err))?;
    let gzip = start.starts_with(&GZIP_MAGIC);
    if names_gzip(path) && !gzip {
        return Err(problems::gz_name_but_not_gzip(path, &start));
    }
    let whole = Cursor::new(start).chain(raw);
    if gzip {
        let mut decoder = flate2::read::MultiGzDecoder::new(whole);
        let bytes = read_header_bytes(&mut decoder)
            .map_err(|(found, err)| problems::broken_gzip(path, found, &err))?;
        parse(path, &bytes, true)
    } else {
        let mut plain = whole;
        let bytes =
            read_header_bytes(&mut plain).map_err(|(_, err)| problems::unreadable(path, &err))?;
        parse(path, &bytes, false)
    }
}

/// The header from bytes already in memory (the start of an uncompressed image);
/// `path` is for messages.
pub fn parse_header(path: &Path, bytes: &[u8]) -> crate::Result<ImageHeader> {
    parse(path, bytes, false)
}

/// Test support (also used by other tests to write tiny datasets): the bytes of a
/// minimal valid single-file image header (magic "n+1" for version 1, "n+2" for 2),
/// little-endian, with the given dims (e.g. [64, 64, 32, 200]) and pixdim[4] = tr
/// seconds (xyzt_units = seconds|mm), followed by the 4-byte extension flag (zeros)
/// and vox_offset pointing just after (352 for v1, 544 for v2), no voxel data.
///
/// # Panics
/// When `version` is not 1 or 2, when there are not 1 to 7 dims, or when a dim is 0
/// or does not fit the version's field (int16 for NIfTI-1, int64 for NIfTI-2): these
/// are mistakes in the calling test, not in any input.
pub fn header_bytes(version: u8, dims: &[u64], tr: f64) -> Vec<u8> {
    let layout = match version {
        1 => NIFTI1,
        2 => NIFTI2,
        _ => panic!("header_bytes: NIfTI version {version} does not exist (use 1 or 2)"),
    };
    assert!(
        (1..=7).contains(&dims.len()),
        "header_bytes: a NIfTI image has 1 to 7 dimensions, not {}",
        dims.len()
    );
    let max = if version == 1 {
        i16::MAX as u64
    } else {
        i64::MAX as u64
    };
    let total = layout.size + EXTENSION_FLAG_SIZE;
    let mut out = Writer(vec![0; total]);
    // nifti1.h / nifti2.h: int sizeof_hdr at offset 0.
    out.int(0, 4, layout.size as i64);
    out.put(layout.magic_offset, layout.magics[0]);
    // dim[0] is the number of dimensions; nifti1.h has readers ignore dims after it,
    // which are set to 1 here as is customary.
    out.int(layout.dim_offset, layout.dim_width, dims.len() as i64);
    for i in 1..=7 {
        let dim = dims.get(i - 1).copied().unwrap_or(1);
        assert!(
            (1..=max).contains(&dim),
            "header_bytes: dim[{i}] = {dim} is outside 1..={max} for NIfTI-{version}"
        );
        out.int(
            layout.dim_offset + i * layout.dim_width,
            layout.dim_width,
            dim as i64,
        );
    }
    // pixdim[0] is qfac (1 or -1, nifti1.h); spacings of 1 mm, then the TR.
    for i in 0..=3 {
        out.float(
            layout.pixdim_offset + i * layout.pixdim_width,
            layout.pixdim_width,
            1.0,
        );
    }
    out.float(
        layout.pixdim_offset + 4 * layout.pixdim_width,
        layout.pixdim_width,
        tr,
    );
    let units = layout::UNITS_MM | layout::UNITS_SEC;
    out.int(layout.xyzt_units_offset, layout.xyzt_units_width, units);
    // nifti1.h: DT_UINT8 = 2, 8 bits per voxel; the type matters little with no data.
    out.int(layout.datatype_offset, 2, 2);
    out.int(layout.bitpix_offset, 2, 8);
    if version == 1 {
        out.float(layout.vox_offset_offset, 4, total as f64);
    } else {
        out.int(layout.vox_offset_offset, 8, total as i64);
    }
    out.0
}

fn names_gzip(path: &Path) -> bool {
    path.extension()
        .is_some_and(|ext| ext.eq_ignore_ascii_case("gz"))
}

/// Reads at most `limit` more bytes into `out`, stopping early only at the end of the
/// stream; on an error the bytes read so far stay in `out`.
fn read_at_most(reader: &mut dyn Read, limit: usize, out: &mut Vec<u8>) -> std::io::Result<()> {
    reader.take(limit as u64).read_to_end(out).map(|_| ())
}

/// The header's bytes: sizeof_hdr first, which says how many more to read (348 or
/// 540 in all). Anything unrecognised is returned as is, for `parse` to describe.
/// An error comes with the number of bytes read before it.
fn read_header_bytes(reader: &mut dyn Read) -> Result<Vec<u8>, (usize, std::io::Error)> {
    let mut bytes = Vec::with_capacity(NIFTI2.size);
    read_at_most(reader, 4, &mut bytes).map_err(|err| (bytes.len(), err))?;
    // Not a header: four more bytes, only to show them in the message.
    let more = match first4(&bytes).and_then(layout::detect) {
        Some((layout, _)) => layout.size - 4,
        None => 4,
    };
    read_at_most(reader, more, &mut bytes).map_err(|err| (bytes.len(), err))?;
    Ok(bytes)
}

fn first4(bytes: &[u8]) -> Option<[u8; 4]> {
    bytes.first_chunk().copied()
}

/// `compressed` only changes the wording of messages about a short header.
fn parse(path: &Path, bytes: &[u8], compressed: bool) -> crate::Result<ImageHeader> {
    let Some(start) = first4(bytes) else {
        return Err(problems::too_short(path, bytes.len(), None, compressed));
    };
    let Some((layout, big_endian)) = layout::detect(start) else {
        return Err(problems::not_nifti(path, bytes));
    };
    let Some(fields) = Fields::new(&layout, bytes, big_endian) else {
        return Err(problems::too_short(
            path,
            bytes.len(),
            Some(&layout),
            compressed,
        ));
    };
    check_magic(path, &layout, bytes)?;
    let dims = read_dims(path, &layout, &fields)?;
    let volumes = match dims.get(3) {
        Some(&count) => usize::try_from(count).map_err(|_| {
            problems::bad_field(path, "dim[4]", &count.to_string(), "a number of volumes")
        })?,
        None => 1,
    };
    Ok(ImageHeader {
        version: layout.version,
        volumes,
        repetition_time: repetition_time(&layout, &fields),
        dims,
    })
}

fn check_magic(path: &Path, layout: &Layout, bytes: &[u8]) -> crate::Result<()> {
    let width = layout.magics[0].len();
    let found = bytes
        .get(layout.magic_offset..layout.magic_offset + width)
        .unwrap_or_default();
    if layout.magics.contains(&found) {
        Ok(())
    } else {
        Err(problems::bad_magic(path, layout, found))
    }
}

/// nifti1.h: dim[0] is the number of dimensions (1 to 7) and dim[1..=dim[0]] their
/// sizes, each at least 1; later entries are ignored.
fn read_dims(path: &Path, layout: &Layout, fields: &Fields) -> crate::Result<Vec<u64>> {
    let dim = |i: usize| fields.int(layout.dim_offset + i * layout.dim_width, layout.dim_width);
    let count = dim(0);
    if !(1..=7).contains(&count) {
        let expected = "the number of dimensions, 1 to 7";
        return Err(problems::bad_field(
            path,
            "dim[0]",
            &count.to_string(),
            expected,
        ));
    }
    let mut dims = Vec::with_capacity(count as usize);
    let mut voxels: u64 = 1;
    for i in 1..=count as usize {
        let value = dim(i);
        let Some(size) = u64::try_from(value).ok().filter(|&size| size >= 1) else {
            let name = format!("dim[{i}]");
            return Err(problems::bad_field(
                path,
                &name,
                &value.to_string(),
                "a size of at least 1",
            ));
        };
        // Only NIfTI-2's int64 dims can get here; no file that large can exist.
        voxels = voxels
            .checked_mul(size)
            .ok_or_else(|| problems::too_many_voxels(path, count))?;
        dims.push(size);
    }
    Ok(dims)
}

/// nifti1.h: pixdim[4] is the time step, in the unit XYZT_TO_TIME(xyzt_units) names.
/// Units that are not time (Hz, ppm, rad/s) or unknown give `None`, as does any
/// value that is not positive and finite once converted.
fn repetition_time(layout: &Layout, fields: &Fields) -> Option<f64> {
    let step = fields.float(
        layout.pixdim_offset + 4 * layout.pixdim_width,
        layout.pixdim_width,
    );
    let units = fields.int(layout.xyzt_units_offset, layout.xyzt_units_width);
    let seconds = match units & layout::TIME_UNIT_MASK {
        layout::UNITS_SEC => step,
        layout::UNITS_MSEC => step / 1000.0,
        layout::UNITS_USEC => step / 1e6,
        _ => return None,
    };
    (seconds.is_finite() && seconds > 0.0).then_some(seconds)
}
