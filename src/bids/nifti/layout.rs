//! Where the fields tangle reads sit in the two header versions, as the NIfTI Data
//! Format Working Group's nifti1.h (`struct nifti_1_header`, 348 bytes) and nifti2.h
//! (`struct nifti_2_header`, 540 bytes) lay them out, and how to read them in either
//! byte order. Offsets are in bytes from the start of the file.

/// One header version: its size, its magic and the offsets of the fields we use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) struct Layout {
    pub version: u8,
    /// `sizeof_hdr` must hold this value (nifti1.h: 348; nifti2.h: 540).
    pub size: usize,
    pub magic_offset: usize,
    /// The magic of a single-file image and of a header/image pair's header.
    pub magics: [&'static [u8]; 2],
    /// `dim[8]`: int16 in NIfTI-1, int64 in NIfTI-2.
    pub dim_offset: usize,
    pub dim_width: usize,
    /// `pixdim[8]`: float32 in NIfTI-1, float64 in NIfTI-2.
    pub pixdim_offset: usize,
    pub pixdim_width: usize,
    /// `xyzt_units`: a char in NIfTI-1, int32 in NIfTI-2.
    pub xyzt_units_offset: usize,
    pub xyzt_units_width: usize,
    /// `vox_offset`: float32 in NIfTI-1, int64 in NIfTI-2 (written by `header_bytes` only).
    pub vox_offset_offset: usize,
    /// `datatype` and `bitpix`: int16 in both (written by `header_bytes` only).
    pub datatype_offset: usize,
    pub bitpix_offset: usize,
}

/// nifti1.h, `struct nifti_1_header`.
pub(super) const NIFTI1: Layout = Layout {
    version: 1,
    size: 348,                    // nifti1.h: int sizeof_hdr at 0, "MUST be 348"
    magic_offset: 344,            // nifti1.h: char magic[4] at 344
    magics: [b"n+1\0", b"ni1\0"], // nifti1.h: "n+1\0" single file, "ni1\0" .hdr/.img pair
    dim_offset: 40,               // nifti1.h: short dim[8] at 40
    dim_width: 2,
    pixdim_offset: 76, // nifti1.h: float pixdim[8] at 76
    pixdim_width: 4,
    xyzt_units_offset: 123, // nifti1.h: char xyzt_units at 123
    xyzt_units_width: 1,
    vox_offset_offset: 108, // nifti1.h: float vox_offset at 108
    datatype_offset: 70,    // nifti1.h: short datatype at 70
    bitpix_offset: 72,      // nifti1.h: short bitpix at 72
};

/// nifti2.h, `struct nifti_2_header`.
pub(super) const NIFTI2: Layout = Layout {
    version: 2,
    size: 540,       // nifti2.h: int sizeof_hdr at 0, "MUST be 540"
    magic_offset: 4, // nifti2.h: char magic[8] at 4
    // nifti2.h: "n+2\0" or "ni2\0", then \r\n\032\n so that text-mode transfers show up.
    magics: [b"n+2\0\r\n\x1a\n", b"ni2\0\r\n\x1a\n"],
    dim_offset: 16, // nifti2.h: int64_t dim[8] at 16
    dim_width: 8,
    pixdim_offset: 104, // nifti2.h: double pixdim[8] at 104
    pixdim_width: 8,
    xyzt_units_offset: 500, // nifti2.h: int xyzt_units at 500
    xyzt_units_width: 4,
    vox_offset_offset: 168, // nifti2.h: int64_t vox_offset at 168
    datatype_offset: 12,    // nifti2.h: int16_t datatype at 12
    bitpix_offset: 14,      // nifti2.h: int16_t bitpix at 14
};

/// nifti1.h / nifti2.h: the 4-byte extension flag follows the header; all zeros means
/// no extensions, so a single-file image's data start right after it.
pub(super) const EXTENSION_FLAG_SIZE: usize = 4;

/// nifti1.h: `#define XYZT_TO_TIME(xyzt) ((xyzt) & 0x38)`, the temporal unit's bits
/// (the same codes in nifti2.h).
pub(super) const TIME_UNIT_MASK: i64 = 0x38;
pub(super) const UNITS_MM: i64 = 2; // nifti1.h: NIFTI_UNITS_MM
pub(super) const UNITS_SEC: i64 = 8; // nifti1.h: NIFTI_UNITS_SEC
pub(super) const UNITS_MSEC: i64 = 16; // nifti1.h: NIFTI_UNITS_MSEC
pub(super) const UNITS_USEC: i64 = 24; // nifti1.h: NIFTI_UNITS_USEC

/// The version and byte order that `sizeof_hdr` (int32 at offset 0 in both versions)
/// announces: 348 or 540 read natively means little-endian, read swapped big-endian.
/// nifti1.h recommends dim[0] for this test, but sizeof_hdr also tells the version.
pub(super) fn detect(first4: [u8; 4]) -> Option<(Layout, bool)> {
    [NIFTI1, NIFTI2].into_iter().find_map(|layout| {
        let size = layout.size as i32;
        if i32::from_le_bytes(first4) == size {
            Some((layout, false))
        } else if i32::from_be_bytes(first4) == size {
            Some((layout, true))
        } else {
            None
        }
    })
}

/// Numbers at fixed offsets of a header whose length has been checked.
pub(super) struct Fields<'a> {
    bytes: &'a [u8],
    big_endian: bool,
}

impl<'a> Fields<'a> {
    /// `None` when `bytes` is shorter than the layout's header, so later reads never
    /// run past the end.
    pub fn new(layout: &Layout, bytes: &'a [u8], big_endian: bool) -> Option<Self> {
        (bytes.len() >= layout.size).then_some(Fields { bytes, big_endian })
    }

    fn array<const N: usize>(&self, offset: usize) -> [u8; N] {
        let mut out = [0u8; N];
        if let Some(slice) = self.bytes.get(offset..offset + N) {
            out.copy_from_slice(slice);
        }
        if self.big_endian {
            out.reverse();
        }
        out
    }

    /// A signed integer field of 1, 2, 4 or 8 bytes, widened.
    pub fn int(&self, offset: usize, width: usize) -> i64 {
        match width {
            1 => i64::from(self.array::<1>(offset)[0]),
            2 => i64::from(i16::from_le_bytes(self.array(offset))),
            4 => i64::from(i32::from_le_bytes(self.array(offset))),
            _ => i64::from_le_bytes(self.array(offset)),
        }
    }

    /// A float32 or float64 field, widened (exactly) to f64.
    pub fn float(&self, offset: usize, width: usize) -> f64 {
        match width {
            4 => f64::from(f32::from_le_bytes(self.array(offset))),
            _ => f64::from_le_bytes(self.array(offset)),
        }
    }
}

/// Writes little-endian numbers at fixed offsets (for `header_bytes`).
pub(super) struct Writer(pub Vec<u8>);

impl Writer {
    pub fn put(&mut self, offset: usize, bytes: &[u8]) {
        self.0[offset..offset + bytes.len()].copy_from_slice(bytes);
    }

    /// An integer field of 1, 2, 4 or 8 bytes; the value must fit (checked by the caller).
    pub fn int(&mut self, offset: usize, width: usize, value: i64) {
        let bytes = value.to_le_bytes();
        self.put(offset, &bytes[..width]);
    }

    pub fn float(&mut self, offset: usize, width: usize, value: f64) {
        match width {
            4 => self.put(offset, &(value as f32).to_le_bytes()),
            _ => self.put(offset, &value.to_le_bytes()),
        }
    }
}
