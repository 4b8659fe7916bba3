//! Our palette. The three data colours differ strongly in lightness (dark, mid, light),
//! so they stay apart for colour-blind readers and in a greyscale print; grey is kept
//! for scaffolding (grid, missing values) and never carries a result on its own.

use plotters::style::RGBColor;

/// Dark blue-black: text, axes, the "own share" and "severe" marks.
pub const INK: RGBColor = RGBColor(0x1d, 0x2b, 0x3f);
/// Mid orange: the "caution" marks and the share held with the other model.
pub const EMBER: RGBColor = RGBColor(0xd9, 0x7b, 0x29);
/// Light sand: the share held only with the rest of the design.
pub const SAND: RGBColor = RGBColor(0xea, 0xdc, 0xb5);
/// Neutral grey: grid lines, separators, missing cells.
pub const STONE: RGBColor = RGBColor(0x8a, 0x8f, 0x96);
/// Pale grey: the fill of cells without a value.
pub const MIST: RGBColor = RGBColor(0xdd, 0xdf, 0xe2);
/// The negative end of the correlation scale (dark slate blue).
pub const COLD: RGBColor = RGBColor(0x23, 0x4e, 0x7a);
/// The positive end of the correlation scale (light amber; lighter than `COLD`).
pub const WARM: RGBColor = RGBColor(0xe8, 0x9a, 0x3c);
