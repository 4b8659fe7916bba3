//! Headers that do not read: every message names the file, says what was found and
//! hints at a fix; no bytes make the reader panic.

use std::path::Path;

use proptest::prelude::*;

use super::tests::{big_endian, gzip, read_as, set, set_dim};
use super::*;
use crate::files::MemoryFiles;

/// The error's text, checked to name the file and to carry a hint.
fn failure(result: crate::Result<ImageHeader>, name: &str) -> String {
    let text = result.expect_err("should fail").to_string();
    assert!(text.starts_with(name), "{text}");
    assert!(text.contains("hint: "), "{text}");
    text
}

fn assert_has(text: &str, parts: &[&str]) {
    for part in parts {
        assert!(text.contains(part), "missing {part:?} in: {text}");
    }
}

#[test]
fn a_missing_file_cannot_be_read() {
    let result = read_image_header(&MemoryFiles::default(), Path::new("gone.nii.gz"));
    assert_has(&failure(result, "gone.nii.gz"), &["cannot read the image"]);
}

#[test]
fn empty_and_tiny_files_say_how_many_bytes_they_have() {
    let text = failure(read_as("a.nii", Vec::new()), "a.nii");
    assert_has(&text, &["the file is empty"]);
    let text = failure(read_as("b.nii", vec![0x5c, 0x01, 0]), "b.nii");
    assert_has(&text, &["only 3 bytes", "348 (NIfTI-1) or 540 (NIfTI-2)"]);
    let text = failure(read_as("c.nii.gz", gzip(&[])), "c.nii.gz");
    assert_has(&text, &["the decompressed image is empty"]);
}

#[test]
fn truncated_headers_say_how_many_bytes_were_found() {
    let v1 = header_bytes(1, &[64, 64, 32, 200], 2.0);
    let text = failure(read_as("v1.nii", v1[..200].to_vec()), "v1.nii");
    assert_has(
        &text,
        &["cut short", "has 200 bytes", "NIfTI-1 header is 348 bytes"],
    );
    let v2 = big_endian(header_bytes(2, &[64, 64, 32, 200], 2.0));
    let text = failure(parse_header(Path::new("v2.nii"), &v2[..539]), "v2.nii");
    assert_has(&text, &["has 539 bytes", "NIfTI-2 header is 540 bytes"]);
    let text = failure(read_as("v2.nii.gz", gzip(&v2[..300])), "v2.nii.gz");
    assert_has(&text, &["decompressed image is cut short", "has 300 bytes"]);
}

#[test]
fn truncated_or_damaged_gzip_streams_are_reported() {
    let packed = gzip(&header_bytes(2, &[64, 64, 32, 200], 2.0));
    for cut in [3, 10, 20, packed.len() / 2] {
        let text = failure(
            read_as("bold.nii.gz", packed[..cut].to_vec()),
            "bold.nii.gz",
        );
        assert_has(
            &text,
            &["gzip stream is damaged or cut short", "bytes of the header"],
        );
    }
    // Cut just before the 8-byte trailer (RFC 1952: CRC32, ISIZE): all 544 bytes inflate.
    let cut = packed[..packed.len() - 8].to_vec();
    assert_eq!(
        read_as("bold.nii.gz", cut)
            .expect("header complete")
            .volumes,
        200
    );
    let mut damaged = packed.clone();
    damaged[12..40].fill(0xff);
    let text = failure(read_as("bold.nii.gz", damaged), "bold.nii.gz");
    assert!(
        text.contains("gzip stream") || text.contains("NIfTI"),
        "{text}"
    );
}

#[test]
fn a_gz_name_on_bytes_that_are_not_gzip_is_an_error() {
    let plain = header_bytes(1, &[4, 4, 4, 10], 2.0);
    let text = failure(read_as("bold.nii.gz", plain), "bold.nii.gz");
    assert_has(
        &text,
        &[
            "ends in .gz but is not gzip-compressed",
            "5c 01 00 00",
            "rename it",
        ],
    );
    let text = failure(read_as("empty.nii.GZ", Vec::new()), "empty.nii.GZ");
    assert_has(&text, &["not gzip-compressed (the file is empty)"]);
}

#[test]
fn other_files_are_not_taken_for_headers() {
    let json = br#"{"RepetitionTime": 2.0, "TaskName": "bandit"}"#.to_vec();
    let text = failure(read_as("bold.nii", json), "bold.nii");
    assert_has(
        &text,
        &[
            "not a NIfTI header",
            "must be 348 for NIfTI-1 or 540 for NIfTI-2",
            "is this a NIfTI image? the first bytes look like 7b 22 52 65",
            r#"("{\"Repeti")"#,
        ],
    );
    let twice = gzip(&gzip(&header_bytes(1, &[4, 4, 4, 10], 2.0)));
    let text = failure(read_as("bold.nii.gz", twice), "bold.nii.gz");
    assert_has(&text, &["compressed twice"]);
    let once = gzip(&header_bytes(1, &[4, 4, 4, 10], 2.0));
    let text = failure(parse_header(Path::new("mem.nii"), &once), "mem.nii");
    assert_has(&text, &["gzip-compressed"]);
}

#[test]
fn a_wrong_magic_says_what_was_found_and_expected() {
    let mut v1 = header_bytes(1, &[4, 4, 4, 10], 2.0);
    set(&mut v1, 344, b"n+2\0"); // nifti1.h: char magic[4] at 344
    let text = failure(parse_header(Path::new("a.nii"), &v1), "a.nii");
    assert_has(
        &text,
        &[
            r#"magic at byte 344 is "n+2\x00""#,
            r#"expected "n+1\x00" or "ni1\x00""#,
        ],
    );
    set(&mut v1, 344, &[0; 4]);
    let text = failure(parse_header(Path::new("a.nii"), &big_endian(v1)), "a.nii");
    assert_has(&text, &["ANALYZE 7.5"]);

    let mut v2 = header_bytes(2, &[4, 4, 4, 10], 2.0);
    set(&mut v2, 4, b"n+2\0\n\x1a\n\0"); // nifti2.h: char magic[8] at 4, \r\n made \n
    let text = failure(parse_header(Path::new("b.nii"), &v2), "b.nii");
    assert_has(
        &text,
        &[
            "NIfTI-2 magic at byte 4",
            r#"expected "n+2\x00\r\n\x1a\n""#,
            "binary mode",
        ],
    );
    set(&mut v2, 4, b"n+1\0\0\0\0\0");
    let text = failure(parse_header(Path::new("b.nii"), &v2), "b.nii");
    assert_has(&text, &["sizeof_hdr says NIfTI-2"]);
}

#[test]
fn a_pair_header_magic_is_accepted() {
    let mut v1 = header_bytes(1, &[4, 4, 4, 10], 2.0);
    set(&mut v1, 344, b"ni1\0"); // nifti1.h: char magic[4] at 344, .hdr/.img pair
    assert_eq!(
        parse_header(Path::new("a.hdr"), &v1)
            .expect("valid")
            .version,
        1
    );
    let mut v2 = header_bytes(2, &[4, 4, 4, 10], 2.0);
    set(&mut v2, 4, b"ni2\0\r\n\x1a\n"); // nifti2.h: char magic[8] at 4
    assert_eq!(
        parse_header(Path::new("a.hdr"), &v2)
            .expect("valid")
            .version,
        2
    );
}

#[test]
fn dim0_outside_one_to_seven_is_an_error() {
    for version in [1, 2] {
        for count in [0, 8, -1, 300] {
            let mut bytes = header_bytes(version, &[4, 4, 4, 10], 2.0);
            set_dim(&mut bytes, version, 0, count);
            for bytes in [bytes.clone(), big_endian(bytes)] {
                let text = failure(parse_header(Path::new("d.nii"), &bytes), "d.nii");
                assert_has(&text, &[&format!("dim[0] is {count}"), "1 to 7"]);
            }
        }
    }
}

#[test]
fn dimension_sizes_below_one_are_errors_naming_the_field() {
    for version in [1, 2] {
        for (index, value) in [(2, -5), (3, 0), (4, -1), (1, i64::from(i16::MIN))] {
            let mut bytes = header_bytes(version, &[4, 4, 4, 10], 2.0);
            set_dim(&mut bytes, version, index, value);
            let text = failure(parse_header(Path::new("d.nii"), &bytes), "d.nii");
            assert_has(&text, &[&format!("dim[{index}] is {value}"), "at least 1"]);
        }
    }
    let mut v2 = header_bytes(2, &[4, 4, 4, 10], 2.0);
    set_dim(&mut v2, 2, 4, i64::MIN);
    let text = failure(parse_header(Path::new("d.nii"), &big_endian(v2)), "d.nii");
    assert_has(&text, &[&format!("dim[4] is {}", i64::MIN)]);
}

#[test]
fn absurd_nifti2_sizes_are_errors() {
    let mut v2 = header_bytes(2, &[4, 4, 4, 10], 2.0);
    set_dim(&mut v2, 2, 1, i64::MAX);
    set_dim(&mut v2, 2, 2, i64::MAX);
    let text = failure(parse_header(Path::new("d.nii"), &v2), "d.nii");
    assert_has(&text, &["dim[1] to dim[4] multiply to more voxels"]);
}

#[test]
fn dims_after_dim0_are_ignored() {
    let mut v1 = header_bytes(1, &[4, 4, 4, 10], 2.0);
    set_dim(&mut v1, 1, 5, -3); // dim[5], unused when dim[0] = 4
    assert_eq!(
        parse_header(Path::new("d.nii"), &v1).expect("valid").dims,
        [4, 4, 4, 10]
    );
}

proptest! {
    #[test]
    fn no_bytes_make_the_reader_panic(bytes in proptest::collection::vec(any::<u8>(), 0..700)) {
        let _ = parse_header(Path::new("x.nii"), &bytes);
        let _ = read_as("x.nii", bytes.clone());
        let _ = read_as("x.nii.gz", gzip(&bytes));
    }

    #[test]
    fn damaged_headers_never_panic(
        version in 1u8..=2,
        swap in any::<bool>(),
        edits in proptest::collection::vec((0usize..544, any::<u8>()), 1..12),
        cut in 0usize..=544,
    ) {
        let mut bytes = header_bytes(version, &[64, 64, 32, 200], 2.0);
        if swap {
            bytes = big_endian(bytes);
        }
        for (at, value) in edits {
            if let Some(byte) = bytes.get_mut(at) {
                *byte = value;
            }
        }
        bytes.truncate(cut);
        if let Ok(header) = parse_header(Path::new("x.nii"), &bytes) {
            prop_assert!(header.repetition_time.is_none_or(|tr| tr.is_finite() && tr > 0.0));
            prop_assert!(header.dims.iter().all(|&d| d >= 1));
        }
        let _ = read_as("x.nii.gz", gzip(&bytes));
    }
}
