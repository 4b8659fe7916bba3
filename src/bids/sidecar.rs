//! BIDS JSON sidecars and their inheritance (placeholder).
