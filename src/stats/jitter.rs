//! Deterministic jitter: the same row always lands at the same place.
//!
//! Guarantee: [`jitter_offset`] is a pure function of `(key, index)` built from the SplitMix64
//! mixing function on integers only, so it gives the same offset on every platform and run. The
//! offset is uniform-looking in `[−0.5, 0.5)`; the caller scales it by the jitter fraction of a
//! band. Different keys (e.g. a hash of the figure and layer) give unrelated sequences.

use super::random::{mix64, unit_interval};

/// An offset in `[−0.5, 0.5)` for row `index` under `key`.
pub fn jitter_offset(key: u64, index: u64) -> f64 {
    unit_interval(mix64(mix64(key) ^ index)) - 0.5
}
