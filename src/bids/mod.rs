//! Studies kept in the open BIDS layout: discovery of events files, sidecar metadata
//! (with the standard's inheritance), image headers, and model outputs in derivatives.

pub mod entities;
pub mod nifti;
pub mod sidecar;
