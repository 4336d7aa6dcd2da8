//! Colour science for figures, as pure functions: colour spaces, colour difference,
//! colour-vision deficiency, palettes, and reading colours written by users.
//!
//! | file | what it holds |
//! |---|---|
//! | [`space`] | sRGB ↔ linear RGB ↔ CIE XYZ (D65) ↔ CIELAB, and OKLab / OKLCh |
//! | [`difference`] | CIEDE2000 (Sharma, Wu & Dalal 2005) |
//! | [`vision`] | Protanopia, deuteranopia, tritanopia (Machado, Oliveira & Fernandes 2009) and greyscale |
//! | [`distinct`] | Whether colours that must be told apart can be, under every vision; thresholds |
//! | [`palette`] | The qualitative Okabe–Ito palette for groups |
//! | [`ordered`] | Sequential and diverging palettes for ordinal variables, designed in OKLCh |
//! | [`scheme`] | Which palette levels take from their level of measurement (nominal, ordinal, midpoint) |
//! | [`hex`] | `#rrggbb` / `#rgb` parsing with errors that say what is wrong |
//!
//! Every colour that reaches a figure is an 8-bit sRGB [`crate::scene::Colour`]; the
//! floating-point spaces are for computing. Nothing here reads files or depends on the
//! machine: the non-linear functions come from the pure-Rust `libm` crate and the matrices
//! are computed at compile time, so results are identical everywhere.
//! Published reference values are checked in `tests/colour.rs`.

mod matrix;

pub mod difference;
pub mod distinct;
pub mod hex;
pub mod ordered;
pub mod palette;
pub mod scheme;
pub mod space;
pub mod vision;

pub use matrix::Mat3;
