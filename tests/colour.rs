//! `figura::colour` against published values and independent references.
//!
//! - CIEDE2000: the 34 pairs of Sharma, Wu & Dalal (2005), Table 1, to 1e-4
//!   (`tests/data/ciede2000-sharma2005.csv`), and 200 random pairs against the independent
//!   implementation of the `colour-science` Python package (`tests/data/ciede2000-pairs.csv`).
//! - Conversions and simulations: 58 colours (primaries, greys, the Okabe–Ito colours, random
//!   ones) re-derived with numpy from the published definitions and cross-checked against
//!   `colour-science` (`tests/data/colour-conversions.csv`, written by
//!   `tests/data/colour_reference.py`; provenance in `tests/data/colour-reference.md`).
//! - OKLab: Ottosson's (2020) table of XYZ → OKLab test values and his printed inverse
//!   matrices. sRGB: the 4-decimal matrix printed in IEC 61966-2-1. CIELAB of the sRGB
//!   primaries as widely reprinted.
//! - Palettes: the Okabe–Ito palette checked for colour-vision deficiency at every size the
//!   code uses, and every ordered palette, listed in `tests/colour/palettes.expected`
//!   (`UPDATE_EXPECT=1` rewrites it; read the diff).

mod common;

use std::fmt::Write;

use figura::colour::difference::ciede2000;
use figura::colour::distinct::{self, closest_pair, pairs_too_close, TELL_APART};
use figura::colour::hex::parse_hex;
use figura::colour::ordered;
use figura::colour::palette::{self, MAX_GROUPS, OKABE_ITO};
use figura::colour::space::{
    Lab, LinearRgb, Oklab, Srgb, Xyz, OKLAB_FROM_LMS, OKLAB_LMS_FROM_LINEAR, XYZ_FROM_LINEAR,
};
use figura::colour::vision::Vision;
use figura::scene::Colour;

/// A CSV file of `tests/data/` as rows of fields, header first.
fn read_csv(name: &str) -> Vec<Vec<String>> {
    let path = common::root().join("tests/data").join(name);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("read {name}: {e}"));
    text.lines()
        .map(|l| l.split(',').map(str::to_owned).collect())
        .collect()
}

/// The rows of a CSV file as header → number, with the `hex` column kept as text.
fn read_table(name: &str) -> Vec<(String, Vec<(String, f64)>)> {
    let rows = read_csv(name);
    let header = &rows[0];
    rows[1..]
        .iter()
        .map(|r| {
            let numbers = header
                .iter()
                .zip(r)
                .filter(|(h, _)| *h != "hex" && *h != "pair")
                .map(|(h, v)| (h.clone(), v.parse::<f64>().unwrap()))
                .collect();
            let key = r[0].clone();
            (key, numbers)
        })
        .collect()
}

fn field(row: &[(String, f64)], name: &str) -> f64 {
    row.iter()
        .find(|(h, _)| h == name)
        .unwrap_or_else(|| panic!("no column {name}"))
        .1
}

fn assert_close(actual: f64, expected: f64, tol: f64, what: &str) {
    assert!(
        (actual - expected).abs() <= tol,
        "{what}: got {actual}, expected {expected} (tolerance {tol:e})"
    );
}

fn lab_pair(row: &[(String, f64)]) -> (Lab, Lab) {
    let lab = |l, a, b| Lab {
        l: field(row, l),
        a: field(row, a),
        b: field(row, b),
    };
    (lab("L1", "a1", "b1"), lab("L2", "a2", "b2"))
}

#[test]
fn ciede2000_matches_the_34_published_pairs() {
    // Sharma, Wu & Dalal (2005), Table 1: ΔE00 printed to 4 decimals.
    let table = read_table("ciede2000-sharma2005.csv");
    assert_eq!(table.len(), 34);
    for (pair, row) in &table {
        let (x, y) = lab_pair(row);
        let expected = field(row, "dE00");
        assert_close(ciede2000(x, y), expected, 1e-4, &format!("pair {pair}"));
        assert_close(
            ciede2000(y, x),
            expected,
            1e-4,
            &format!("pair {pair} swapped"),
        );
    }
}

#[test]
fn ciede2000_matches_an_independent_implementation_on_random_pairs() {
    // colour-science 0.4.7, `delta_E(method="CIE 2000")`, on 200 random CIELAB pairs.
    let table = read_table("ciede2000-pairs.csv");
    assert_eq!(table.len(), 200);
    for (i, (_, row)) in table.iter().enumerate() {
        let (x, y) = lab_pair(row);
        let expected = field(row, "dE00");
        assert_close(
            ciede2000(x, y),
            expected,
            1e-9 * expected.max(1.0),
            &format!("{i}"),
        );
    }
}

#[test]
fn conversions_match_the_reference_colours() {
    // numpy from the published definitions, cross-checked with colour-science
    // (tests/data/colour-reference.md).
    let table = read_table("colour-conversions.csv");
    assert_eq!(table.len(), 58);
    for (hex, row) in &table {
        let colour = parse_hex(hex).unwrap();
        let lin = LinearRgb::from_colour(colour);
        let xyz = lin.to_xyz();
        let lab = lin.to_lab();
        let ok = lin.to_oklab();
        let checks = [
            ("lin_r", lin.r, 1e-15),
            ("lin_g", lin.g, 1e-15),
            ("lin_b", lin.b, 1e-15),
            ("X", xyz.x, 1e-14),
            ("Y", xyz.y, 1e-14),
            ("Z", xyz.z, 1e-14),
            ("L", lab.l, 1e-11),
            ("a", lab.a, 1e-11),
            ("b", lab.b, 1e-11),
            ("ok_L", ok.l, 1e-13),
            ("ok_a", ok.a, 1e-13),
            ("ok_b", ok.b, 1e-13),
        ];
        for (name, actual, tol) in checks {
            assert_close(actual, field(row, name), tol, &format!("{hex} {name}"));
        }
    }
}

#[test]
fn simulations_match_the_reference_colours() {
    // Machado et al. (2009) matrices at severity 1.0 applied to linear RGB and clipped, as
    // computed with colour-science's copy of the published matrices; greyscale is Y.
    let table = read_table("colour-conversions.csv");
    let visions = [
        (Vision::Protanopia, "prot"),
        (Vision::Deuteranopia, "deut"),
        (Vision::Tritanopia, "trit"),
    ];
    for (hex, row) in &table {
        let lin = LinearRgb::from_colour(parse_hex(hex).unwrap());
        for (vision, key) in visions {
            let seen = vision.simulate(lin);
            for (c, actual) in ["r", "g", "b"].into_iter().zip([seen.r, seen.g, seen.b]) {
                let name = format!("{key}_{c}");
                assert_close(actual, field(row, &name), 1e-14, &format!("{hex} {name}"));
            }
        }
        let grey = Vision::Greyscale.simulate(lin);
        assert_close(grey.g, field(row, "grey_Y"), 1e-14, &format!("{hex} grey"));
    }
}

#[test]
fn every_conversion_goes_back_to_the_same_colour() {
    let table = read_table("colour-conversions.csv");
    for (hex, _) in &table {
        let colour = parse_hex(hex).unwrap();
        let lin = LinearRgb::from_colour(colour);
        assert_eq!(lin.to_colour(), colour, "{hex} linear");
        assert_eq!(
            lin.to_lab().to_xyz().to_linear_rgb().to_colour(),
            colour,
            "{hex} Lab"
        );
        let back = lin.to_oklab().to_oklch().to_oklab().to_linear_rgb();
        assert_eq!(back.to_colour(), colour, "{hex} OKLCh");
        assert_eq!(Srgb::from_colour(colour).to_colour(), colour, "{hex} sRGB");
    }
}

#[test]
fn oklab_matches_ottossons_table_of_test_values() {
    // Ottosson (2020), "A perceptual color space for image processing": XYZ → OKLab pairs,
    // printed to 3 decimals.
    let table = [
        ([0.950, 1.000, 1.089], [1.000, 0.000, 0.000]),
        ([1.000, 0.000, 0.000], [0.450, 1.236, -0.019]),
        ([0.000, 1.000, 0.000], [0.922, -0.671, 0.263]),
        ([0.000, 0.000, 1.000], [0.153, -1.415, -0.449]),
    ];
    for ([x, y, z], [l, a, b]) in table {
        let ok = Xyz { x, y, z }.to_oklab();
        let what = format!("XYZ ({x}, {y}, {z})");
        assert_close(ok.l, l, 5e-4, &what);
        assert_close(ok.a, a, 5e-4, &what);
        assert_close(ok.b, b, 5e-4, &what);
    }
}

#[test]
fn inverse_matrices_match_the_published_ones() {
    // Ottosson (2020) prints the inverses to 10 decimals. He inverted his matrices before
    // rounding them, so the exact inverse of the rounded LMS → OKLab matrix differs from his
    // rounded inverse by up to 5.5e-8 (numpy: `abs(inv(M2) - printed).max()`); hence 1e-7.
    let lms_from_oklab = [
        [1.0, 0.3963377774, 0.2158037573],
        [1.0, -0.1055613458, -0.0638541728],
        [1.0, -0.0894841775, -1.2914855480],
    ];
    let linear_from_lms = [
        [4.0767416621, -3.3077115913, 0.2309699292],
        [-1.2684380046, 2.6097574011, -0.3413193965],
        [-0.0041960863, -0.7034186147, 1.7076147010],
    ];
    for (ours, published) in [
        (OKLAB_FROM_LMS.inverse(), lms_from_oklab),
        (OKLAB_LMS_FROM_LINEAR.inverse(), linear_from_lms),
    ] {
        for (row, prow) in ours.0.iter().zip(published) {
            for (v, p) in row.iter().zip(prow) {
                assert_close(*v, p, 1e-7, "inverse");
            }
        }
    }
    // IEC 61966-2-1 prints the linear sRGB → XYZ matrix to 4 decimals.
    let iec = [
        [0.4124, 0.3576, 0.1805],
        [0.2126, 0.7152, 0.0722],
        [0.0193, 0.1192, 0.9505],
    ];
    for (row, prow) in XYZ_FROM_LINEAR.0.iter().zip(iec) {
        for (v, p) in row.iter().zip(prow) {
            assert_close(*v, p, 5e-5, "sRGB matrix");
        }
    }
}

#[test]
fn cielab_of_the_srgb_primaries_as_widely_reprinted() {
    // From memory of the widely reprinted values (2 decimals); the reprints use a D65 white of
    // (0.95047, 1, 1.08883), which moves a* and b* by up to 0.014 from ours, hence 0.02.
    let table = [
        (0xff0000, [53.24, 80.09, 67.20]),
        (0x00ff00, [87.73, -86.18, 83.18]),
        (0x0000ff, [32.30, 79.19, -107.86]),
        (0xffffff, [100.0, 0.0, 0.0]),
    ];
    for (hex, [l, a, b]) in table {
        let lab = Lab::from_colour(Colour::from_hex(hex));
        let what = format!("{hex:06x}");
        assert_close(lab.l, l, 0.02, &what);
        assert_close(lab.a, a, 0.02, &what);
        assert_close(lab.b, b, 0.02, &what);
    }
}

#[test]
fn okabe_ito_stays_apart_under_every_deficiency_but_not_in_greyscale() {
    // The threshold and its reasons: figura::colour::distinct. Every palette size the code
    // uses (1 to MAX_GROUPS groups): no pair below TELL_APART under normal vision or any
    // simulated dichromacy; in greyscale the palette holds up to 3 groups, and from 4 groups
    // on some pairs differ in hue only (their lightness is close).
    for n in 1..=MAX_GROUPS {
        let colours = palette::group_colours(n).unwrap();
        let close = pairs_too_close(&colours, TELL_APART);
        let visions: Vec<Vision> = close.iter().map(|p| p.vision).collect();
        assert!(
            visions.iter().all(|&v| v == Vision::Greyscale),
            "{n} groups: {close:?}"
        );
        assert_eq!(close.is_empty(), n <= 3, "{n} groups: {close:?}");
    }
}

#[test]
fn palettes_listing() {
    // The palettes and their closest pairs, for review (tests/colour/palettes.expected).
    let mut out = String::new();
    writeln!(
        out,
        "# Okabe–Ito, as groups use it: closest pair per vision (ΔE00)"
    )
    .unwrap();
    for n in 2..=MAX_GROUPS {
        let colours = palette::group_colours(n).unwrap();
        write!(out, "{n} groups:").unwrap();
        for vision in Vision::ALL {
            let p = closest_pair(&colours, vision).unwrap();
            let name = |i: usize| OKABE_ITO[i].name;
            write!(
                out,
                " | {} {:.1} ({} / {})",
                vision.name(),
                p.delta_e,
                name(p.first),
                name(p.second)
            )
            .unwrap();
        }
        writeln!(out).unwrap();
    }
    writeln!(
        out,
        "\n# Sequential: colours, then the closest neighbours per vision"
    )
    .unwrap();
    for n in ordered::MIN_LEVELS..=ordered::MAX_LEVELS {
        list_ordered(
            &mut out,
            &format!("{n:>2}"),
            &ordered::sequential(n).unwrap(),
        );
    }
    writeln!(out, "\n# Diverging (levels, midpoint)").unwrap();
    for n in ordered::MIN_LEVELS..=ordered::MAX_LEVELS {
        for m in 0..n {
            let palette = ordered::diverging(n, m).unwrap();
            list_ordered(&mut out, &format!("{n:>2},{m:>2}"), &palette);
        }
    }
    common::expect_file(&common::root().join("tests/colour/palettes.expected"), &out);
}

fn list_ordered(out: &mut String, label: &str, palette: &[Colour]) {
    let hex: Vec<String> = palette.iter().map(Colour::to_string).collect();
    write!(out, "{label}: {}\n      ", hex.join(" ")).unwrap();
    for vision in Vision::ALL {
        let closest = palette
            .windows(2)
            .map(|w| distinct::difference_seen(w[0], w[1], vision))
            .fold(f64::INFINITY, f64::min);
        write!(out, " {} {closest:.1};", vision.name()).unwrap();
    }
    writeln!(out).unwrap();
}

#[test]
fn ordered_lightness_is_monotone_in_cielab_too() {
    // The palettes are designed in OKLab; their order must hold in CIELAB L* as well.
    for n in ordered::MIN_LEVELS..=ordered::MAX_LEVELS {
        let palette = ordered::sequential(n).unwrap();
        let l: Vec<f64> = palette.iter().map(|&c| Lab::from_colour(c).l).collect();
        assert!(l.windows(2).all(|w| w[1] < w[0]), "{n}: {l:?}");
        let ok: Vec<f64> = palette.iter().map(|&c| Oklab::from_colour(c).l).collect();
        assert!(ok.windows(2).all(|w| w[1] < w[0]), "{n}: {ok:?}");
    }
}
