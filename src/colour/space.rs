//! Colour spaces and the conversions between them.
//!
//! Definitions and sources:
//! - **sRGB** ([`Srgb`], gamma-encoded, components in `[0, 1]`) and its transfer function:
//!   IEC 61966-2-1:1999. Decoding: `c / 12.92` for `c ≤ 0.04045`, else
//!   `((c + 0.055) / 1.055)^2.4`; encoding is its inverse, with the break at `0.0031308`.
//! - **Linear RGB** ([`LinearRgb`]): the sRGB primaries with the transfer function removed.
//! - **CIE XYZ** ([`Xyz`], white has `Y = 1`): the matrix from linear RGB is derived, at compile
//!   time, from the sRGB primaries' chromaticities R (0.64, 0.33), G (0.30, 0.60),
//!   B (0.15, 0.06) and the D65 white point (0.3127, 0.3290) given in IEC 61966-2-1, so that
//!   RGB white maps exactly onto the white point. Rounded to 4 decimals it is the matrix
//!   printed in the standard (tested).
//! - **CIELAB** ([`Lab`]): CIE 15:2004 with the same D65 white (`Xn = 0.3127 / 0.3290`,
//!   `Yn = 1`, `Zn = 0.3583 / 0.3290`): `L* = 116 f(Y/Yn) − 16`, `a* = 500 (f(X/Xn) − f(Y/Yn))`,
//!   `b* = 200 (f(Y/Yn) − f(Z/Zn))`, with `f(t) = t^(1/3)` above `(6/29)³` and
//!   `t / (3 (6/29)²) + 4/29` below.
//! - **OKLab** ([`Oklab`]) and its polar form **OKLCh** ([`Oklch`], hue in degrees): Björn
//!   Ottosson, "A perceptual color space for image processing" (2020). Linear sRGB → cone-like
//!   LMS by his published sRGB matrix, cube root, then his second matrix. The inverse matrices
//!   are computed from the published forward ones (they agree with his printed inverses to
//!   their 10 digits, tested). XYZ converts through linear RGB, which reproduces his table of
//!   XYZ → OKLab test values (tested).
//!
//! Every non-linear step uses the pure-Rust `libm` functions, not the platform's, so every
//! conversion gives the same bits on every machine.

use super::matrix::Mat3;
use crate::scene::Colour;

/// Chromaticity `(x, y)` of the D65 white point, as IEC 61966-2-1 gives it for sRGB.
pub const D65_XY: (f64, f64) = (0.3127, 0.3290);

/// Chromaticities `(x, y)` of the sRGB red, green and blue primaries (IEC 61966-2-1).
pub const SRGB_PRIMARIES_XY: [(f64, f64); 3] = [(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)];

/// The D65 white point in XYZ with `Y = 1`: the CIELAB reference white.
pub const D65_WHITE: Xyz = xyz_of_chromaticity(D65_XY);

/// Linear sRGB → XYZ, derived from [`SRGB_PRIMARIES_XY`] and [`D65_XY`].
pub const XYZ_FROM_LINEAR: Mat3 = rgb_to_xyz_matrix(SRGB_PRIMARIES_XY, D65_XY);
const LINEAR_FROM_XYZ: Mat3 = XYZ_FROM_LINEAR.inverse();

/// Linear sRGB → LMS, as published by Ottosson (2020).
pub const OKLAB_LMS_FROM_LINEAR: Mat3 = Mat3([
    [0.4122214708, 0.5363325363, 0.0514459929],
    [0.2119034982, 0.6806995451, 0.1073969566],
    [0.0883024619, 0.2817188376, 0.6299787005],
]);
/// Cube-rooted LMS → OKLab, as published by Ottosson (2020).
pub const OKLAB_FROM_LMS: Mat3 = Mat3([
    [0.2104542553, 0.7936177850, -0.0040720468],
    [1.9779984951, -2.4285922050, 0.4505937099],
    [0.0259040371, 0.7827717662, -0.8086757660],
]);
const LINEAR_FROM_LMS: Mat3 = OKLAB_LMS_FROM_LINEAR.inverse();
const LMS_FROM_OKLAB: Mat3 = OKLAB_FROM_LMS.inverse();

/// Linear RGB components further than this outside `[0, 1]` are out of the sRGB gamut; the
/// margin absorbs rounding in round trips through other spaces.
const GAMUT_MARGIN: f64 = 1e-9;

/// Gamma-encoded sRGB, each component in `[0, 1]` for colours in the gamut.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Srgb {
    pub r: f64,
    pub g: f64,
    pub b: f64,
}

/// Linear-light sRGB: proportional to light, each component in `[0, 1]` in the gamut.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinearRgb {
    pub r: f64,
    pub g: f64,
    pub b: f64,
}

/// CIE 1931 XYZ relative to a white of `Y = 1`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Xyz {
    pub x: f64,
    pub y: f64,
    pub z: f64,
}

/// CIELAB (D65): `l` is L* in `[0, 100]`, `a` and `b` are a* and b*.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lab {
    pub l: f64,
    pub a: f64,
    pub b: f64,
}

/// OKLab: `l` in `[0, 1]` (white is 1), `a` green–red, `b` blue–yellow.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Oklab {
    pub l: f64,
    pub a: f64,
    pub b: f64,
}

/// OKLCh, the polar form of OKLab: lightness, chroma `c ≥ 0`, hue `h` in degrees `[0, 360)`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Oklch {
    pub l: f64,
    pub c: f64,
    pub h: f64,
}

/// The sRGB transfer function: encoded component → linear light.
pub fn srgb_decode(c: f64) -> f64 {
    if c <= 0.04045 {
        c / 12.92
    } else {
        libm::pow((c + 0.055) / 1.055, 2.4)
    }
}

/// The inverse sRGB transfer function: linear light → encoded component.
pub fn srgb_encode(c: f64) -> f64 {
    if c <= 0.0031308 {
        12.92 * c
    } else {
        1.055 * libm::pow(c, 1.0 / 2.4) - 0.055
    }
}

impl Srgb {
    pub fn from_colour(colour: Colour) -> Srgb {
        let unit = |v: u8| f64::from(v) / 255.0;
        Srgb {
            r: unit(colour.r),
            g: unit(colour.g),
            b: unit(colour.b),
        }
    }

    /// The nearest 8-bit colour: each component clamped to `[0, 1]`, then rounded.
    pub fn to_colour(self) -> Colour {
        let byte = |v: f64| (v.clamp(0.0, 1.0) * 255.0).round() as u8;
        Colour::rgb(byte(self.r), byte(self.g), byte(self.b))
    }

    pub fn to_linear(self) -> LinearRgb {
        LinearRgb {
            r: srgb_decode(self.r),
            g: srgb_decode(self.g),
            b: srgb_decode(self.b),
        }
    }
}

impl LinearRgb {
    pub fn from_colour(colour: Colour) -> LinearRgb {
        Srgb::from_colour(colour).to_linear()
    }

    pub(crate) const fn from_array([r, g, b]: [f64; 3]) -> LinearRgb {
        LinearRgb { r, g, b }
    }

    pub(crate) const fn to_array(self) -> [f64; 3] {
        [self.r, self.g, self.b]
    }

    /// A grey of relative luminance `y`.
    pub const fn grey(y: f64) -> LinearRgb {
        LinearRgb { r: y, g: y, b: y }
    }

    pub fn to_srgb(self) -> Srgb {
        Srgb {
            r: srgb_encode(self.r),
            g: srgb_encode(self.g),
            b: srgb_encode(self.b),
        }
    }

    /// The nearest 8-bit colour (out-of-gamut components are clamped).
    pub fn to_colour(self) -> Colour {
        self.clamped().to_srgb().to_colour()
    }

    /// Whether every component lies in `[0, 1]` (within a rounding margin).
    pub fn is_in_gamut(self) -> bool {
        self.to_array()
            .iter()
            .all(|&v| (-GAMUT_MARGIN..=1.0 + GAMUT_MARGIN).contains(&v))
    }

    /// Each component clamped to `[0, 1]`.
    pub fn clamped(self) -> LinearRgb {
        LinearRgb::from_array(self.to_array().map(|v| v.clamp(0.0, 1.0)))
    }

    /// Relative luminance: the Y of CIE XYZ (row 2 of [`XYZ_FROM_LINEAR`]).
    pub fn luminance(self) -> f64 {
        self.to_xyz().y
    }

    pub fn to_xyz(self) -> Xyz {
        let [x, y, z] = XYZ_FROM_LINEAR.apply(self.to_array());
        Xyz { x, y, z }
    }

    pub fn to_lab(self) -> Lab {
        self.to_xyz().to_lab()
    }

    pub fn to_oklab(self) -> Oklab {
        let lms = OKLAB_LMS_FROM_LINEAR.apply(self.to_array());
        let [l, a, b] = OKLAB_FROM_LMS.apply(lms.map(libm::cbrt));
        Oklab { l, a, b }
    }
}

impl Xyz {
    pub fn to_linear_rgb(self) -> LinearRgb {
        LinearRgb::from_array(LINEAR_FROM_XYZ.apply([self.x, self.y, self.z]))
    }

    pub fn to_lab(self) -> Lab {
        let w = D65_WHITE;
        let (fx, fy, fz) = (
            lab_f(self.x / w.x),
            lab_f(self.y / w.y),
            lab_f(self.z / w.z),
        );
        Lab {
            l: 116.0 * fy - 16.0,
            a: 500.0 * (fx - fy),
            b: 200.0 * (fy - fz),
        }
    }

    pub fn to_oklab(self) -> Oklab {
        self.to_linear_rgb().to_oklab()
    }
}

impl Lab {
    pub fn from_colour(colour: Colour) -> Lab {
        LinearRgb::from_colour(colour).to_lab()
    }

    pub fn to_xyz(self) -> Xyz {
        let fy = (self.l + 16.0) / 116.0;
        let fx = fy + self.a / 500.0;
        let fz = fy - self.b / 200.0;
        let w = D65_WHITE;
        Xyz {
            x: w.x * lab_f_inverse(fx),
            y: w.y * lab_f_inverse(fy),
            z: w.z * lab_f_inverse(fz),
        }
    }
}

impl Oklab {
    pub fn from_colour(colour: Colour) -> Oklab {
        LinearRgb::from_colour(colour).to_oklab()
    }

    pub fn to_linear_rgb(self) -> LinearRgb {
        let lms_root = LMS_FROM_OKLAB.apply([self.l, self.a, self.b]);
        LinearRgb::from_array(LINEAR_FROM_LMS.apply(lms_root.map(|v| v * v * v)))
    }

    pub fn to_xyz(self) -> Xyz {
        self.to_linear_rgb().to_xyz()
    }

    pub fn to_oklch(self) -> Oklch {
        let h = libm::atan2(self.b, self.a).to_degrees();
        Oklch {
            l: self.l,
            c: (self.a * self.a + self.b * self.b).sqrt(),
            h: if h < 0.0 { h + 360.0 } else { h },
        }
    }
}

impl Oklch {
    pub fn to_oklab(self) -> Oklab {
        let h = self.h.to_radians();
        Oklab {
            l: self.l,
            a: self.c * libm::cos(h),
            b: self.c * libm::sin(h),
        }
    }

    pub fn to_linear_rgb(self) -> LinearRgb {
        self.to_oklab().to_linear_rgb()
    }
}

/// δ = 6/29 of CIE 15:2004: the break between the cube root and the linear part of `f`.
const LAB_DELTA: f64 = 6.0 / 29.0;

fn lab_f(t: f64) -> f64 {
    if t > LAB_DELTA * LAB_DELTA * LAB_DELTA {
        libm::cbrt(t)
    } else {
        t / (3.0 * LAB_DELTA * LAB_DELTA) + 4.0 / 29.0
    }
}

fn lab_f_inverse(f: f64) -> f64 {
    if f > LAB_DELTA {
        f * f * f
    } else {
        3.0 * LAB_DELTA * LAB_DELTA * (f - 4.0 / 29.0)
    }
}

/// XYZ of a chromaticity `(x, y)` at `Y = 1`.
const fn xyz_of_chromaticity((x, y): (f64, f64)) -> Xyz {
    Xyz {
        x: x / y,
        y: 1.0,
        z: (1.0 - x - y) / y,
    }
}

/// The RGB → XYZ matrix of a set of primaries and a white point: each primary's XYZ column,
/// scaled so that RGB (1, 1, 1) maps onto the white (SMPTE RP 177-1993, common practice).
const fn rgb_to_xyz_matrix(primaries: [(f64, f64); 3], white: (f64, f64)) -> Mat3 {
    let unscaled = Mat3::from_columns([
        xyz_array(primaries[0]),
        xyz_array(primaries[1]),
        xyz_array(primaries[2]),
    ]);
    let w = xyz_of_chromaticity(white);
    unscaled.scale_columns(unscaled.inverse().apply([w.x, w.y, w.z]))
}

const fn xyz_array(chromaticity: (f64, f64)) -> [f64; 3] {
    let xyz = xyz_of_chromaticity(chromaticity);
    [xyz.x, xyz.y, xyz.z]
}
