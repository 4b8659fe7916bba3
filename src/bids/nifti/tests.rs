//! Headers that read: both versions, both byte orders, plain and gzip, from memory and
//! from disk, and the units of the repetition time. The helpers here are shared with
//! `tests_errors.rs`.

use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::sync::atomic::{AtomicUsize, Ordering};

use super::*;
use crate::files::{DiskFiles, MemoryFiles};

/// Numeric fields of nifti1.h's `struct nifti_1_header` as (offset, element width,
/// element count), for swapping a header to big-endian. Chars and strings need none.
const NIFTI1_NUMBERS: &[(usize, usize, usize)] = &[
    (0, 4, 1),    // nifti1.h: int sizeof_hdr
    (32, 4, 1),   // nifti1.h: int extents
    (36, 2, 1),   // nifti1.h: short session_error
    (40, 2, 8),   // nifti1.h: short dim[8]
    (56, 4, 3),   // nifti1.h: float intent_p1, intent_p2, intent_p3
    (68, 2, 4),   // nifti1.h: short intent_code, datatype, bitpix, slice_start
    (76, 4, 8),   // nifti1.h: float pixdim[8]
    (108, 4, 3),  // nifti1.h: float vox_offset, scl_slope, scl_inter
    (120, 2, 1),  // nifti1.h: short slice_end (then chars slice_code, xyzt_units)
    (124, 4, 6),  // nifti1.h: float cal_max, cal_min, slice_duration, toffset; int glmax, glmin
    (252, 2, 2),  // nifti1.h: short qform_code, sform_code
    (256, 4, 18), // nifti1.h: float quatern_b..qoffset_z (6), srow_x, srow_y, srow_z (12)
];

/// The same for nifti2.h's `struct nifti_2_header`.
const NIFTI2_NUMBERS: &[(usize, usize, usize)] = &[
    (0, 4, 1),    // nifti2.h: int sizeof_hdr (then char magic[8])
    (12, 2, 2),   // nifti2.h: int16_t datatype, bitpix
    (16, 8, 8),   // nifti2.h: int64_t dim[8]
    (80, 8, 3),   // nifti2.h: double intent_p1, intent_p2, intent_p3
    (104, 8, 8),  // nifti2.h: double pixdim[8]
    (168, 8, 1),  // nifti2.h: int64_t vox_offset
    (176, 8, 6), // nifti2.h: double scl_slope, scl_inter, cal_max, cal_min, slice_duration, toffset
    (224, 8, 2), // nifti2.h: int64_t slice_start, slice_end
    (344, 4, 2), // nifti2.h: int qform_code, sform_code
    (352, 8, 18), // nifti2.h: double quatern_b..qoffset_z (6), srow_x, srow_y, srow_z (12)
    (496, 4, 3), // nifti2.h: int slice_code, xyzt_units, intent_code
];

/// The header turned big-endian: every numeric field's bytes reversed in place.
pub(super) fn big_endian(mut bytes: Vec<u8>) -> Vec<u8> {
    let fields = if bytes[0..4] == 348i32.to_le_bytes() {
        NIFTI1_NUMBERS
    } else {
        NIFTI2_NUMBERS
    };
    for &(offset, width, count) in fields {
        for element in 0..count {
            let start = offset + element * width;
            bytes[start..start + width].reverse();
        }
    }
    bytes
}

/// Overwrites a little-endian field (before any swap).
pub(super) fn set(bytes: &mut [u8], offset: usize, value: &[u8]) {
    bytes[offset..offset + value.len()].copy_from_slice(value);
}

/// nifti1.h: short dim[8] at 40; nifti2.h: int64_t dim[8] at 16.
pub(super) fn set_dim(bytes: &mut [u8], version: u8, index: usize, value: i64) {
    if version == 1 {
        set(bytes, 40 + 2 * index, &(value as i16).to_le_bytes());
    } else {
        set(bytes, 16 + 8 * index, &value.to_le_bytes());
    }
}

/// nifti1.h: float pixdim[8] at 76 and char xyzt_units at 123; nifti2.h: double
/// pixdim[8] at 104 and int xyzt_units at 500.
fn set_time_step(bytes: &mut [u8], version: u8, step: f64, units: u8) {
    if version == 1 {
        set(bytes, 76 + 4 * 4, &(step as f32).to_le_bytes());
        bytes[123] = units;
    } else {
        set(bytes, 104 + 4 * 8, &step.to_le_bytes());
        set(bytes, 500, &i32::from(units).to_le_bytes());
    }
}

pub(super) fn gzip(bytes: &[u8]) -> Vec<u8> {
    let mut encoder = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::default());
    encoder.write_all(bytes).expect("in memory");
    encoder.finish().expect("in memory")
}

/// Reads `bytes` as the file `name` through `MemoryFiles`.
pub(super) fn read_as(name: &str, bytes: Vec<u8>) -> crate::Result<ImageHeader> {
    let files = MemoryFiles::default().with(name, bytes);
    read_image_header(&files, Path::new(name))
}

#[test]
fn header_bytes_have_the_promised_size_and_vox_offset() {
    let v1 = header_bytes(1, &[64, 64, 32, 200], 2.0);
    assert_eq!(v1.len(), 352);
    assert_eq!(&v1[344..348], b"n+1\0"); // nifti1.h: char magic[4] at 344
    assert_eq!(v1[108..112], 352f32.to_le_bytes()); // nifti1.h: float vox_offset at 108
    assert_eq!(v1[348..352], [0; 4]); // nifti1.h: the extension flag follows the header
    let v2 = header_bytes(2, &[64, 64, 32, 200], 2.0);
    assert_eq!(v2.len(), 544);
    assert_eq!(&v2[4..12], b"n+2\0\r\n\x1a\n"); // nifti2.h: char magic[8] at 4
    assert_eq!(v2[168..176], 544i64.to_le_bytes()); // nifti2.h: int64_t vox_offset at 168
    assert_eq!(v2[540..544], [0; 4]);
}

#[test]
fn both_versions_in_both_byte_orders_read_alike() {
    for version in [1, 2] {
        let little = header_bytes(version, &[64, 64, 32, 200], 2.0);
        for bytes in [little.clone(), big_endian(little)] {
            let header = parse_header(Path::new("bold.nii"), &bytes).expect("valid");
            let expected = ImageHeader {
                version,
                dims: vec![64, 64, 32, 200],
                volumes: 200,
                repetition_time: Some(2.0),
            };
            assert_eq!(header, expected);
        }
    }
}

#[test]
fn plain_and_gzip_files_read_from_memory() {
    for version in [1, 2] {
        let bytes = header_bytes(version, &[10, 10, 5, 120], 0.8);
        for swapped in [false, true] {
            let bytes = if swapped {
                big_endian(bytes.clone())
            } else {
                bytes.clone()
            };
            let plain = read_as("sub-01/func/bold.nii", bytes.clone()).expect("plain");
            let packed = read_as("sub-01/func/bold.nii.gz", gzip(&bytes)).expect("gzip");
            assert_eq!(plain, packed);
            assert_eq!((plain.version, plain.volumes), (version, 120));
            // 0.8 is not exact in float32, so NIfTI-1 gives the nearest float32.
            let tr = plain.repetition_time.expect("a TR");
            assert!((tr - 0.8).abs() < 1e-6, "{tr}");
        }
    }
}

#[test]
fn plain_and_gzip_files_read_from_disk() {
    let dir = tempfile::tempdir().expect("temporary folder");
    for version in [1, 2] {
        let bytes = header_bytes(version, &[4, 4, 4, 30], 1.5);
        let plain = dir.path().join(format!("v{version}.nii"));
        let packed = dir.path().join(format!("v{version}.nii.gz"));
        std::fs::write(&plain, &bytes).expect("written");
        std::fs::write(&packed, gzip(&big_endian(bytes))).expect("written");
        for path in [plain, packed] {
            let header = read_image_header(&DiskFiles, &path).expect("valid");
            assert_eq!(header.dims, [4, 4, 4, 30]);
            assert_eq!(header.volumes, 30);
            assert_eq!(header.repetition_time, Some(1.5));
        }
    }
}

#[test]
fn a_gzip_file_named_nii_is_read_anyway() {
    let bytes = header_bytes(1, &[8, 8, 8, 12], 2.0);
    let header = read_as("bold.nii", gzip(&bytes)).expect("decompressed anyway");
    assert_eq!(header.volumes, 12);
}

#[test]
fn concatenated_gzip_members_are_one_stream() {
    // RFC 1952 allows several members; here the header itself is split between two.
    let bytes = header_bytes(2, &[8, 8, 8, 12], 2.0);
    let mut packed = gzip(&bytes[..100]);
    packed.extend(gzip(&bytes[100..]));
    assert_eq!(read_as("bold.nii.gz", packed).expect("valid").volumes, 12);
}

#[test]
fn images_with_fewer_than_four_dimensions_hold_one_volume() {
    for version in [1, 2] {
        let header = parse_header(
            Path::new("t1w.nii"),
            &header_bytes(version, &[176, 256, 256], 0.0),
        )
        .expect("valid");
        assert_eq!(header.dims, [176, 256, 256]);
        assert_eq!(header.volumes, 1);
        assert_eq!(header.repetition_time, None); // pixdim[4] = 0 is not positive
        let header =
            parse_header(Path::new("line.nii"), &header_bytes(version, &[5], 1.0)).expect("valid");
        assert_eq!((header.dims.as_slice(), header.volumes), (&[5u64][..], 1));
    }
}

#[test]
fn five_dimensional_images_count_dim4_as_volumes() {
    let header =
        parse_header(Path::new("x.nii"), &header_bytes(2, &[2, 3, 4, 5, 6], 1.0)).expect("valid");
    assert_eq!((header.dims.len(), header.volumes), (5, 5));
}

#[test]
fn the_time_unit_converts_pixdim4_to_seconds() {
    // nifti1.h: NIFTI_UNITS_MM = 2 | NIFTI_UNITS_SEC 8, MSEC 16, USEC 24, HZ 32; 0 unknown.
    let cases = [
        (2.0, 2 | 8, Some(2.0)),
        (2000.0, 2 | 16, Some(2.0)),
        (2_000_000.0, 2 | 24, Some(2.0)),
        (2.0, 2, None),      // no temporal unit given
        (2.0, 2 | 32, None), // Hz is not a time
        (-2.0, 2 | 8, None), // not positive
        (f64::NAN, 8, None), // not finite
        (f64::INFINITY, 8, None),
    ];
    for version in [1, 2] {
        for (step, units, expected) in cases {
            let mut bytes = header_bytes(version, &[2, 2, 2, 3], 1.0);
            set_time_step(&mut bytes, version, step, units);
            for bytes in [bytes.clone(), big_endian(bytes)] {
                let header = parse_header(Path::new("bold.nii"), &bytes).expect("valid");
                assert_eq!(
                    header.repetition_time, expected,
                    "v{version} {step} {units}"
                );
            }
        }
    }
}

/// One file's bytes, whose reader counts the bytes taken from it.
struct OneFile(Vec<u8>, Arc<AtomicUsize>);

impl crate::files::InputFiles for OneFile {
    fn read(&self, _: &Path) -> std::io::Result<Vec<u8>> {
        Ok(self.0.clone())
    }

    fn open(&self, _: &Path) -> std::io::Result<Box<dyn Read + '_>> {
        let inner = std::io::Cursor::new(&self.0[..]);
        let taken = self.1.clone();
        Ok(Box::new(Counting { inner, taken }))
    }

    fn list(&self, _: &Path) -> std::io::Result<Vec<PathBuf>> {
        Ok(Vec::new())
    }

    fn is_file(&self, _: &Path) -> bool {
        true
    }
}

/// A reader that counts the compressed bytes taken from it.
struct Counting<R> {
    inner: R,
    taken: Arc<AtomicUsize>,
}

impl<R: Read> Read for Counting<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.taken.fetch_add(n, Ordering::Relaxed);
        Ok(n)
    }
}

#[test]
fn a_large_gzip_image_is_decompressed_only_as_far_as_the_header() {
    // A header and 50 MB of zeros: the volumes would be 64 × 64 × 32 × 200 bytes.
    let mut encoder = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    encoder
        .write_all(&header_bytes(1, &[64, 64, 32, 200], 2.0))
        .expect("in memory");
    let zeros = vec![0u8; 1 << 20];
    for _ in 0..50 {
        encoder.write_all(&zeros).expect("in memory");
    }
    let packed = encoder.finish().expect("in memory");
    let dir = tempfile::tempdir().expect("temporary folder");
    let path = dir.path().join("bold.nii.gz");
    std::fs::write(&path, &packed).expect("written");
    let header = read_image_header(&DiskFiles, &path).expect("valid");
    assert_eq!(header.volumes, 200);

    // The compressed bytes taken are one read buffer's worth, not the whole stream.
    assert!(packed.len() > 200_000, "{} compressed bytes", packed.len());
    let taken = Arc::new(AtomicUsize::new(0));
    let files = OneFile(packed.clone(), taken.clone());
    let header = read_image_header(&files, Path::new("bold.nii.gz")).expect("valid");
    assert_eq!(header.dims, [64, 64, 32, 200]);
    let taken = taken.load(Ordering::Relaxed);
    assert!(
        taken <= 64 * 1024,
        "{taken} of {} compressed bytes read",
        packed.len()
    );
}
