//! NIfTI-1 and NIfTI-2 image headers (placeholder).
