//! Addressing and formatting, on hand-made summary rows.

use super::text::{cell_decimals, fixed, interval, quote, Exact};
use super::*;
use crate::compute::summary::RowKey;
use crate::compute::Stat;

fn key(panel: &str, layer: &'static str, group: &str, x: &str) -> RowKey {
    RowKey {
        panel: panel.into(),
        layer,
        group: group.into(),
        x: x.into(),
    }
}

/// Rows like `speed_by_medium`'s (values from `tests/golden/speed_by_medium.summary.csv`).
fn reading_rows() -> Vec<SummaryRow> {
    let mut rows = Vec::new();
    for (x, n, mean, lo, hi, median) in [
        (
            "paper",
            24,
            242.7125,
            228.49530354827652,
            256.9296964517235,
            234.3,
        ),
        (
            "screen",
            24,
            221.00416666666666,
            205.28833411935693,
            236.7199992139764,
            212.2,
        ),
    ] {
        let b = key("morning", "box", "", x);
        rows.push(b.count(Stat::N, n));
        rows.push(b.number(Stat::Median, median));
        let m = key("morning", "mean", "", x);
        rows.push(m.count(Stat::N, n));
        rows.push(m.number(Stat::Mean, mean));
        rows.push(m.number(Stat::CiLow, lo));
        rows.push(m.number(Stat::CiHigh, hi));
    }
    rows.push(key("morning", "lines", "", "").count(Stat::N, 24));
    rows.push(key("morning", "box", "", "paper").number(Stat::Outliers, 150.5));
    rows.push(key("morning", "box", "", "paper").number(Stat::Outliers, 330.25));
    rows
}

fn reading() -> Addressed {
    address(&[FigureNumbers {
        figure: "speed_by_medium".into(),
        unit: Some("words/min".into()),
        rows: reading_rows(),
    }])
}

fn text(numbers: &Addressed, stat: &str, cell: &str) -> Option<String> {
    Some(
        numbers
            .get("speed_by_medium")?
            .get(stat)?
            .get(cell)?
            .text
            .clone(),
    )
}

#[test]
fn a_mean_and_its_interval_are_rounded_by_the_interval_width() {
    let n = reading();
    // Width 28.43: two significant digits are the units, so no decimals.
    assert_eq!(
        text(&n, "mean", "morning/paper").unwrap(),
        "243\u{a0}words/min"
    );
    assert_eq!(
        text(&n, "mean.mean", "morning/paper").unwrap(),
        "243\u{a0}words/min"
    );
    assert_eq!(text(&n, "ci", "morning/paper").unwrap(), "[228, 257]");
    assert_eq!(
        text(&n, "mean.ci_low", "morning/screen").unwrap(),
        "205\u{a0}words/min"
    );
}

#[test]
fn a_short_name_stands_only_where_every_layer_agrees() {
    let n = reading();
    // box and mean both report n = 24 in each cell.
    assert_eq!(text(&n, "n", "morning/paper").unwrap(), "24");
    // The whole-panel row of `lines` writes `*` for the x it does not have.
    assert_eq!(text(&n, "lines.n", "morning/*").unwrap(), "24");
    assert_eq!(text(&n, "n", "morning/*").unwrap(), "24");
    // Without quartiles, the median gets three significant digits.
    assert_eq!(
        text(&n, "median", "morning/paper").unwrap(),
        "234\u{a0}words/min"
    );
    // Outliers are one quote, listed.
    assert_eq!(
        text(&n, "outliers", "morning/paper").unwrap(),
        "150, 330\u{a0}words/min"
    );
}

#[test]
fn two_numbers_at_one_address_leave_both_out() {
    let rows = vec![
        key("", "mean", "", "a").number(Stat::Mean, 1.0),
        key("", "mean", "", "a").number(Stat::Mean, 2.0),
        key("", "median", "", "a").number(Stat::Median, 1.5),
        key("", "box", "", "a").number(Stat::Median, 1.75),
    ];
    let n = address(&[FigureNumbers {
        figure: "f".into(),
        unit: None,
        rows,
    }]);
    let f = &n["f"];
    assert!(!f.contains_key("mean.mean"), "{f:?}");
    assert!(!f.contains_key("median"), "layers disagree: {f:?}");
    assert_eq!(f["box.median"]["a"].text, "1.75");
}

#[test]
fn precision_follows_the_uncertainty() {
    // Common practice: two significant digits of the uncertainty.
    assert_eq!(cell_decimals(Some((1.23, 1.87)), None, None, None), Some(2));
    assert_eq!(cell_decimals(None, Some(0.048), None, None), Some(3));
    assert_eq!(cell_decimals(None, None, Some(12.0), None), Some(0));
    assert_eq!(cell_decimals(None, None, None, Some((10.0, 11.5))), Some(1));
    assert_eq!(cell_decimals(None, None, None, None), None);
    assert_eq!(cell_decimals(None, Some(0.0), None, None), None);
    // Whole digits are never rounded away.
    assert_eq!(
        cell_decimals(Some((0.0, 4000.0)), None, None, None),
        Some(0)
    );
}

#[test]
fn numbers_are_written_for_reading() {
    assert_eq!(fixed(-0.004, 2), "0.00");
    assert_eq!(fixed(-1.25, 1), "\u{2212}1.2");
    assert_eq!(
        quote("percent", &Exact::One(28.333333333333332), None, Some("s")).text,
        "28.3%"
    );
    assert_eq!(
        quote("count", &Exact::One(51.0), None, Some("s")).text,
        "51"
    );
    assert_eq!(quote("r", &Exact::One(0.98765), None, None).text, "0.99");
    assert_eq!(
        quote("bandwidth", &Exact::One(4.56789), None, Some("mm")).text,
        "4.57\u{a0}mm"
    );
    assert_eq!(
        quote("slope", &Exact::One(0.0123456), None, Some("mm")).text,
        "0.0123"
    );
    assert_eq!(interval(-1.234, 5.678, Some(1)).text, "[\u{2212}1.2, 5.7]");
    let level = quote("median", &Exact::Level("agree".into()), Some(2), Some("x"));
    assert_eq!((level.text.as_str(), level.unit), ("agree", None));
}

#[test]
fn the_three_files_name_every_address() {
    let n = reading();
    let tex = NumbersFormat::Tex.render(&n);
    assert!(tex.contains(r"\figura@def{speed_by_medium}{mean}{morning/paper}{243~words/min}{243}"));
    assert!(
        tex.contains(r"\figura@def{speed_by_medium}{ci}{morning/paper}{[228, 257]}{[228, 257]}")
    );
    let typ = NumbersFormat::Typ.render(&n);
    assert!(typ.contains(
        "\"morning/paper\": (text: \"243\u{a0}words/min\", number: \"243\", value: 242.7125),"
    ));
    let json: serde_json::Value = serde_json::from_str(&NumbersFormat::Json.render(&n)).unwrap();
    let entry = &json["figures"]["speed_by_medium"]["ci"]["morning/paper"];
    assert_eq!(entry["text"], "[228, 257]");
    assert_eq!(entry["value"][0], 228.49530354827652);
    assert_eq!(
        json["figures"]["speed_by_medium"]["mean"]["morning/paper"]["unit"],
        "words/min"
    );
}

#[test]
fn tex_escapes_values_and_leaves_out_addresses_it_cannot_read() {
    assert_eq!(
        tex::escape("a_b & 50% #1 {x} ~ ^"),
        r"a\_b \& 50\% \#1 \{x\} \textasciitilde{} \textasciicircum{}"
    );
    let rows = vec![
        key("", "median", "", "a}b").level(Stat::Median, "x_y"),
        key("", "median", "", "ok").level(Stat::Median, "x_y"),
    ];
    let n = address(&[FigureNumbers {
        figure: "f".into(),
        unit: None,
        rows,
    }]);
    let tex = NumbersFormat::Tex.render(&n);
    assert!(
        tex.contains(r"\figura@def{f}{median}{ok}{x\_y}{x\_y}"),
        "{tex}"
    );
    assert!(!tex.contains("a}b"), "{tex}");
    assert!(NumbersFormat::Typ.render(&n).contains("\"a}b\""));
}
