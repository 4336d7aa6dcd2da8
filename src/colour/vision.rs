//! How colours look to readers with a colour-vision deficiency, and in greyscale.
//!
//! Dichromacy is simulated with the model of G. M. Machado, M. M. Oliveira and
//! L. A. F. Fernandes (2009), "A physiologically-based model for simulation of color vision
//! deficiency", IEEE Transactions on Visualization and Computer Graphics 15(6): 1291–1298. Each
//! deficiency is one 3 × 3 matrix applied to linear RGB; the matrices below are those of
//! severity 1.0 (protanopia, deuteranopia, tritanopia: one cone type missing) from the table of
//! matrices the authors published with the paper, to their 6 decimals. They were entered from
//! memory of that table and checked against the copy of it shipped by the `colour-science`
//! Python package (0.4.7, `CVD_MATRICES_MACHADO2010`); every row sums to 1 within 2e-6, so
//! greys (white and black included) stay grey. Simulated components outside `[0, 1]` are
//! clipped (common practice: the result must be a displayable colour).
//!
//! Greyscale is what a black-and-white print or screen shows: the grey of the same relative
//! luminance Y, hence of the same CIELAB L*.
//!
//! Prevalence, for weighing the results (common practice, from memory of the usual figures
//! for readers of European descent): red–green deficiencies (protan, deutan) affect about 8% of
//! men and 0.5% of women; tritan deficiencies are rare (about 1 in 10 000).

use super::matrix::Mat3;
use super::space::LinearRgb;
use crate::scene::Colour;

/// Machado et al. (2009), protanopia (severity 1.0), on linear RGB.
pub const PROTANOPIA: Mat3 = Mat3([
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
]);

/// Machado et al. (2009), deuteranopia (severity 1.0), on linear RGB.
pub const DEUTERANOPIA: Mat3 = Mat3([
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.011820, 0.042940, 0.968881],
]);

/// Machado et al. (2009), tritanopia (severity 1.0), on linear RGB.
pub const TRITANOPIA: Mat3 = Mat3([
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.303900],
]);

/// A way of seeing the figure under which colours must still be told apart.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Vision {
    /// Normal colour vision: the colours as drawn.
    Normal,
    /// No long-wavelength (L) cones.
    Protanopia,
    /// No medium-wavelength (M) cones.
    Deuteranopia,
    /// No short-wavelength (S) cones.
    Tritanopia,
    /// A greyscale print or screen.
    Greyscale,
}

impl Vision {
    /// Every vision, normal first.
    pub const ALL: [Vision; 5] = [
        Vision::Normal,
        Vision::Protanopia,
        Vision::Deuteranopia,
        Vision::Tritanopia,
        Vision::Greyscale,
    ];

    /// The plain name, for messages ("protanopia", "greyscale", ...).
    pub fn name(self) -> &'static str {
        match self {
            Vision::Normal => "normal colour vision",
            Vision::Protanopia => "protanopia",
            Vision::Deuteranopia => "deuteranopia",
            Vision::Tritanopia => "tritanopia",
            Vision::Greyscale => "greyscale",
        }
    }

    /// The Machado et al. (2009) matrix of a dichromacy; `None` for normal vision and greyscale.
    pub fn matrix(self) -> Option<&'static Mat3> {
        match self {
            Vision::Protanopia => Some(&PROTANOPIA),
            Vision::Deuteranopia => Some(&DEUTERANOPIA),
            Vision::Tritanopia => Some(&TRITANOPIA),
            Vision::Normal | Vision::Greyscale => None,
        }
    }

    /// How a linear-RGB colour looks under this vision, in linear RGB within `[0, 1]`.
    pub fn simulate(self, colour: LinearRgb) -> LinearRgb {
        match (self, self.matrix()) {
            (Vision::Greyscale, _) => LinearRgb::grey(colour.luminance()),
            (_, Some(m)) => LinearRgb::from_array(m.apply(colour.to_array())).clamped(),
            (_, None) => colour,
        }
    }

    /// How an 8-bit sRGB colour looks under this vision, rounded to 8-bit sRGB (for pictures).
    pub fn see(self, colour: Colour) -> Colour {
        self.simulate(LinearRgb::from_colour(colour)).to_colour()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_row_of_every_matrix_sums_to_one() {
        // A published property of the model: neutrals are seen as neutrals.
        for v in Vision::ALL {
            if let Some(m) = v.matrix() {
                for s in m.row_sums() {
                    assert!((s - 1.0).abs() <= 2e-6, "{}: row sum {s}", v.name());
                }
            }
        }
    }

    #[test]
    fn white_black_and_greys_stay_as_they_are() {
        for v in Vision::ALL {
            for grey in [0x00, 0x80, 0xff] {
                let c = Colour::rgb(grey, grey, grey);
                assert_eq!(v.see(c), c, "{}", v.name());
            }
        }
    }

    #[test]
    fn pure_red_under_protanopia_is_the_first_column_clipped() {
        // Hand computation: linear (1, 0, 0) · matrix = its first column,
        // (0.152286, 0.114503, −0.003882); the negative blue is clipped to 0.
        let seen = Vision::Protanopia.simulate(LinearRgb::from_array([1.0, 0.0, 0.0]));
        assert_eq!(seen.to_array(), [0.152286, 0.114503, 0.0]);
        // Encoded: 255 · (1.055 · 0.152286^(1/2.4) − 0.055) = 108.79 → 109;
        // 255 · (1.055 · 0.114503^(1/2.4) − 0.055) = 95.03 → 95.
        assert_eq!(
            Vision::Protanopia.see(Colour::rgb(255, 0, 0)),
            Colour::rgb(109, 95, 0)
        );
    }

    #[test]
    fn greyscale_keeps_luminance() {
        // Hand computation: pure green has Y = 0.715169 (row 2 of the sRGB matrix), encoded
        // 255 · (1.055 · 0.715169^(1/2.4) − 0.055) = 219.93 → 220.
        assert_eq!(
            Vision::Greyscale.see(Colour::rgb(0, 255, 0)),
            Colour::rgb(220, 220, 220)
        );
    }
}
