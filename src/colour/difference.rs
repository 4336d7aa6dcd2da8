//! Colour difference: CIEDE2000 (ΔE00).
//!
//! Definition: G. Sharma, W. Wu and E. N. Dalal (2005), "The CIEDE2000 color-difference
//! formula: implementation notes, supplementary test data, and mathematical observations",
//! Color Research & Application 30(1): 21–30, equations (1)–(22), with the parametric factors
//! `kL = kC = kH = 1` (reference conditions). The hue conventions follow their notes: the hue
//! of a colour with `a' = b = 0` is 0; the hue difference and mean hue of a pair where either
//! chroma is 0 are 0 and the sum of the hues. The tests check their 34 published pairs to
//! 1e-4 (`tests/colour.rs`).
//!
//! Scale, for reading the numbers (common practice): ΔE00 ≈ 1 is about one just-noticeable
//! difference between large patches side by side; differences of a few units are seen at a
//! glance; data marks, which are small and apart, need several times more (see
//! [`crate::colour::distinct`]).

use super::space::Lab;

/// 25⁷, the constant of the chroma terms `G` and `R_C`.
const POW25_7: f64 = 6_103_515_625.0;

/// The CIEDE2000 difference between two CIELAB colours. Symmetric, and 0 only for equal
/// colours.
pub fn ciede2000(first: Lab, second: Lab) -> f64 {
    let c_mean = (chroma(first) + chroma(second)) / 2.0;
    let g = 0.5 * (1.0 - chroma_weight(c_mean));
    let p1 = Prime::of(first, g);
    let p2 = Prime::of(second, g);

    let delta_l = p2.l - p1.l;
    let delta_c = p2.c - p1.c;
    let product_c = p1.c * p2.c;
    let delta_h_deg = if product_c == 0.0 {
        0.0
    } else {
        let d = p2.h - p1.h;
        if d > 180.0 {
            d - 360.0
        } else if d < -180.0 {
            d + 360.0
        } else {
            d
        }
    };
    let delta_big_h = 2.0 * product_c.sqrt() * libm::sin((delta_h_deg / 2.0).to_radians());

    let l_mean = (p1.l + p2.l) / 2.0;
    let c_mean_prime = (p1.c + p2.c) / 2.0;
    let h_mean = mean_hue(p1.h, p2.h, product_c);

    let t = 1.0 - 0.17 * cos_deg(h_mean - 30.0)
        + 0.24 * cos_deg(2.0 * h_mean)
        + 0.32 * cos_deg(3.0 * h_mean + 6.0)
        - 0.20 * cos_deg(4.0 * h_mean - 63.0);
    let delta_theta = 30.0 * libm::exp(-((h_mean - 275.0) / 25.0).powi(2));
    let r_c = 2.0 * chroma_weight(c_mean_prime);
    let l50 = (l_mean - 50.0).powi(2);
    let s_l = 1.0 + 0.015 * l50 / (20.0 + l50).sqrt();
    let s_c = 1.0 + 0.045 * c_mean_prime;
    let s_h = 1.0 + 0.015 * c_mean_prime * t;
    let r_t = -libm::sin((2.0 * delta_theta).to_radians()) * r_c;

    let (dl, dc, dh) = (delta_l / s_l, delta_c / s_c, delta_big_h / s_h);
    (dl * dl + dc * dc + dh * dh + r_t * dc * dh).sqrt()
}

/// A colour in the "prime" coordinates of CIEDE2000: a* rescaled by `1 + G`.
struct Prime {
    l: f64,
    c: f64,
    /// Hue in degrees, `[0, 360)`; 0 for a neutral.
    h: f64,
}

impl Prime {
    fn of(lab: Lab, g: f64) -> Prime {
        let a = (1.0 + g) * lab.a;
        let h = if a == 0.0 && lab.b == 0.0 {
            0.0
        } else {
            let h = libm::atan2(lab.b, a).to_degrees();
            if h < 0.0 {
                h + 360.0
            } else {
                h
            }
        };
        Prime {
            l: lab.l,
            c: (a * a + lab.b * lab.b).sqrt(),
            h,
        }
    }
}

fn chroma(lab: Lab) -> f64 {
    (lab.a * lab.a + lab.b * lab.b).sqrt()
}

/// `sqrt(C⁷ / (C⁷ + 25⁷))`, shared by `G` and `R_C`.
fn chroma_weight(c: f64) -> f64 {
    let c7 = c.powi(7);
    (c7 / (c7 + POW25_7)).sqrt()
}

/// The mean hue of a pair, Sharma et al. (2005) equation (14).
fn mean_hue(h1: f64, h2: f64, product_c: f64) -> f64 {
    if product_c == 0.0 {
        h1 + h2
    } else if (h1 - h2).abs() <= 180.0 {
        (h1 + h2) / 2.0
    } else if h1 + h2 < 360.0 {
        (h1 + h2 + 360.0) / 2.0
    } else {
        (h1 + h2 - 360.0) / 2.0
    }
}

fn cos_deg(deg: f64) -> f64 {
    libm::cos(deg.to_radians())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lab(l: f64, a: f64, b: f64) -> Lab {
        Lab { l, a, b }
    }

    #[test]
    fn equal_colours_differ_by_zero_and_order_does_not_matter() {
        let x = lab(50.0, 2.6772, -79.7751);
        let y = lab(50.0, 0.0, -82.7485);
        assert_eq!(ciede2000(x, x), 0.0);
        assert_eq!(ciede2000(x, y), ciede2000(y, x));
    }

    #[test]
    fn a_lightness_step_between_neutrals_at_mid_grey_is_the_step() {
        // At L* = 50 the lightness weight S_L is exactly 1 and neutrals have no chroma or hue
        // terms, so ΔE00 equals ΔL* (follows from the definition).
        assert!((ciede2000(lab(49.0, 0.0, 0.0), lab(51.0, 0.0, 0.0)) - 2.0).abs() < 1e-12);
    }

    #[test]
    fn first_published_pair() {
        // Sharma, Wu & Dalal (2005), Table 1, pair 1: ΔE00 = 2.0425.
        let d = ciede2000(lab(50.0, 2.6772, -79.7751), lab(50.0, 0.0, -82.7485));
        assert!((d - 2.0425).abs() < 5e-5, "{d}");
    }
}
