//! Layers end to end against outside references: a spec and its data in a temporary folder are
//! built, and the numbers of the summary are compared with scipy and statsmodels
//! (tests/layers/reference.py) or with certified values. Data are published (Student 1908,
//! `tests/data_files/student1908-sleep.csv`; NIST StRD Norris, `tests/data/nist/Norris.dat`) or
//! made here by a formula written beside them.

mod common;

use common::{close, rel};

use std::collections::BTreeMap;

use figura::build::{self, BuildOptions, NoProgress};
use figura::compute::layer::PathPoint;
use figura::compute::LayerMarks;
use serde_json::json;

/// A temporary folder holding `spec` as `figures.figura` and `files` beside it.
fn folder_of(spec: &str, files: &[(&str, &str)]) -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("figures.figura"), spec).unwrap();
    for (name, text) in files {
        std::fs::write(dir.path().join(name), text).unwrap();
    }
    dir
}

/// Builds `spec` beside `files` and returns the summary rows of `figure` as
/// (layer, group, x, stat, value); the build must report nothing.
fn summary_of(spec: &str, files: &[(&str, &str)], figure: &str) -> Vec<[String; 5]> {
    let (_dir, out, report) = build_in(spec, files);
    assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    read_summary(&out, figure)
}

/// The summary rows of `figure` in the output folder `out`, as (layer, group, x, stat, value).
fn read_summary(out: &std::path::Path, figure: &str) -> Vec<[String; 5]> {
    let text = std::fs::read_to_string(out.join(format!("{figure}.summary.csv"))).unwrap();
    csv::Reader::from_reader(text.as_bytes())
        .records()
        .map(|r| {
            let r = r.unwrap();
            [1, 2, 3, 4, 5].map(|i| r[i].to_string())
        })
        .collect()
}

/// Builds `spec` beside `files` into a temporary folder: the folder (kept while it lives), the
/// output folder and the build's report.
fn build_in(
    spec: &str,
    files: &[(&str, &str)],
) -> (tempfile::TempDir, std::path::PathBuf, build::BuildReport) {
    let dir = folder_of(spec, files);
    let out = dir.path().join("out");
    let report = build::build(
        &BuildOptions {
            paths: vec![dir.path().join("figures.figura")],
            out: Some(out.clone()),
            ..BuildOptions::default()
        },
        &NoProgress,
    )
    .expect("the build runs");
    (dir, out, report)
}

/// The one number at (layer, group, x, stat).
fn value(rows: &[[String; 5]], layer: &str, group: &str, x: &str, stat: &str) -> f64 {
    let found: Vec<&[String; 5]> = rows
        .iter()
        .filter(|r| r[0] == layer && r[1] == group && r[2] == x && r[3] == stat)
        .collect();
    assert_eq!(
        found.len(),
        1,
        "one row ({layer},{group},{x},{stat}) in {rows:#?}"
    );
    found[0][4].parse().expect("a number")
}

/// Whether a row (layer, group, x, stat) exists.
fn has(rows: &[[String; 5]], layer: &str, group: &str, x: &str, stat: &str) -> bool {
    rows.iter()
        .any(|r| r[0] == layer && r[1] == group && r[2] == x && r[3] == stat)
}

/// (x, value) of every row of `stat` of a layer and group, in order.
fn series(rows: &[[String; 5]], layer: &str, group: &str, stat: &str) -> Vec<(f64, f64)> {
    rows.iter()
        .filter(|r| r[0] == layer && r[1] == group && r[3] == stat)
        .map(|r| (r[2].parse().unwrap(), r[4].parse().unwrap()))
        .collect()
}

fn reference(mode: &str, request: serde_json::Value) -> serde_json::Value {
    common::python(
        &common::root().join("tests/layers/reference.py"),
        mode,
        &request,
    )
}

fn num(v: &serde_json::Value) -> f64 {
    v.as_f64().expect("a reference number")
}

fn sleep_table() -> String {
    std::fs::read_to_string(common::root().join("tests/data_files/student1908-sleep.csv")).unwrap()
}

const SLEEP_BOOK: &str = r#"data sleep "sleep.csv" {
  patient: id
  drug: nominal levels("A", "B")
  extra: interval column("extra_hours") unit("h")
  subject patient
  within drug
}
"#;

#[test]
fn ecdf_steps_match_scipy() {
    let spec = format!(
        "{SLEEP_BOOK}\nfigure steps {{\n  from sleep\n  x extra\n  colour drug\n  ecdf\n}}\n"
    );
    let rows = summary_of(&spec, &[("sleep.csv", &sleep_table())], "steps");
    // Per group: the values of the table by drug, and the summary's steps.
    let table = sleep_table();
    let mut samples: BTreeMap<String, Vec<f64>> = BTreeMap::new();
    let mut reader = csv::Reader::from_reader(table.as_bytes());
    let headers = reader.headers().unwrap().clone();
    let col = |name: &str| headers.iter().position(|h| h == name).unwrap();
    for r in reader.records() {
        let r = r.unwrap();
        samples
            .entry(r[col("drug")].to_string())
            .or_default()
            .push(r[col("extra_hours")].parse().unwrap());
    }
    let request = json!(samples.values().collect::<Vec<_>>());
    let expected = common::python(
        &common::root().join("tests/layers/reference.py"),
        "ecdf",
        &request,
    );
    for (i, (drug, sample)) in samples.iter().enumerate() {
        let steps: Vec<(f64, f64)> = rows
            .iter()
            .filter(|r| r[0] == "ecdf" && r[1] == *drug && r[3] == "proportion")
            .map(|r| (r[2].parse().unwrap(), r[4].parse().unwrap()))
            .collect();
        let reference = &expected[i];
        let values: Vec<f64> = serde_json::from_value(reference["values"].clone()).unwrap();
        let probabilities: Vec<f64> =
            serde_json::from_value(reference["probabilities"].clone()).unwrap();
        assert_eq!(
            steps.len(),
            values.len(),
            "one step per distinct value of drug {drug}"
        );
        for ((v, p), (rv, rp)) in steps.iter().zip(values.iter().zip(&probabilities)) {
            assert_eq!(v, rv, "step value (drug {drug})");
            assert!(
                (p - rp).abs() <= 1e-12,
                "F({v}) = {p}, scipy {rp} (drug {drug})"
            );
        }
        let n = rows
            .iter()
            .find(|r| r[0] == "ecdf" && r[1] == *drug && r[3] == "n")
            .map(|r| r[4].parse::<f64>().unwrap());
        assert_eq!(n, Some(sample.len() as f64), "n of drug {drug}");
    }
}

/// The sleep values of each drug, in file order.
fn sleep_by_drug() -> BTreeMap<String, Vec<f64>> {
    let mut out: BTreeMap<String, Vec<f64>> = BTreeMap::new();
    for line in sleep_table().lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        out.entry(f[1].to_string())
            .or_default()
            .push(f[2].parse().unwrap());
    }
    out
}

// ---------------------------------------------------------------------------------------------
// fit: coefficients with standard errors and intervals, r², residual sd, bands at the points
// drawn (summary(full)).

/// The (x, y) pairs of NIST StRD Norris (columns y then x in the file).
fn norris() -> Vec<(f64, f64)> {
    let text = std::fs::read_to_string(common::root().join("tests/data/nist/Norris.dat")).unwrap();
    let data = text.rsplit("Data:").next().expect("a data section");
    data.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<f64> = line
                .split_whitespace()
                .filter_map(|t| t.parse().ok())
                .collect();
            (f.len() == 2).then(|| (f[1], f[0]))
        })
        .collect()
}

fn pairs_csv(pairs: &[(f64, f64)]) -> String {
    std::iter::once("x,y\n".to_string())
        .chain(pairs.iter().map(|(x, y)| format!("{x:?},{y:?}\n")))
        .collect()
}

/// Checks the fit rows of `rows` against statsmodels OLS of `ys` on `xs` at `level`; `back`
/// turns the fit's scale into the axis's (exp on a log y). `prediction` chooses the band.
fn check_fit_against_ols(
    rows: &[[String; 5]],
    (xs, ys): (&[f64], &[f64]),
    level: f64,
    prediction: bool,
    on_logs: (bool, bool),
) {
    let drawn = series(rows, "fit", "", "fitted");
    assert_eq!(
        drawn.len(),
        figura::compute::layer::FIT_GRID,
        "one row per point drawn"
    );
    let at: Vec<f64> = drawn
        .iter()
        .map(|(x, _)| if on_logs.0 { x.ln() } else { *x })
        .collect();
    let ols = reference("ols", json!({"x": xs, "y": ys, "level": level, "at": at}));
    let back = |v: f64| if on_logs.1 { v.exp() } else { v };
    for (stat, key, tol) in [
        ("slope", "slope", 1e-10),
        ("intercept", "intercept", 1e-9),
        ("slope_se", "slope_se", 1e-8),
        ("intercept_se", "intercept_se", 1e-8),
        ("r_squared", "r_squared", 1e-12),
        ("residual_sd", "residual_sd", 1e-8),
    ] {
        rel(value(rows, "fit", "", "", stat), num(&ols[key]), tol, stat);
    }
    for (stat, key, i) in [
        ("slope_ci_low", "slope_ci", 0),
        ("slope_ci_high", "slope_ci", 1),
        ("intercept_ci_low", "intercept_ci", 0),
        ("intercept_ci_high", "intercept_ci", 1),
    ] {
        rel(
            value(rows, "fit", "", "", stat),
            num(&ols[key][i]),
            1e-9,
            stat,
        );
    }
    let (low_key, high_key) = if prediction {
        ("obs_low", "obs_high")
    } else {
        ("mean_low", "mean_high")
    };
    let lows = series(rows, "fit", "", "band_low");
    let highs = series(rows, "fit", "", "band_high");
    assert_eq!(lows.len(), drawn.len());
    for (i, (x, fitted)) in drawn.iter().enumerate() {
        let (f, lo, hi) = (
            back(num(&ols["fitted"][i])),
            back(num(&ols[low_key][i])),
            back(num(&ols[high_key][i])),
        );
        let width = hi - lo;
        close(*fitted, f, 1e-9, width, &format!("fitted at {x}"));
        close(lows[i].1, lo, 1e-8, width, &format!("band_low at {x}"));
        close(highs[i].1, hi, 1e-8, width, &format!("band_high at {x}"));
    }
}

#[test]
fn fit_summary_matches_nist_norris_and_statsmodels() {
    let pairs = norris();
    assert_eq!(pairs.len(), 36);
    let (xs, ys): (Vec<f64>, Vec<f64>) = pairs.iter().copied().unzip();
    let spec = r#"data norris "norris.csv" {
  x: ratio
  y: ratio
}
figure mean_band { from norris; x x; y y; points; fit band(0.95) summary(full) }
figure new_values { from norris; x x; y y; points; fit band(0.9, prediction) summary(full) }
figure plain { from norris; x x; y y; points; fit }
"#;
    let files = [("norris.csv", pairs_csv(&pairs))];
    let files: Vec<(&str, &str)> = files.iter().map(|(n, c)| (*n, c.as_str())).collect();
    let rows = summary_of(spec, &files, "mean_band");
    // NIST StRD Norris, certified: se(B0) 0.232818234301152, se(B1) 0.429796848199937E-03,
    // residual sd 0.884796396144373, R² 0.999993745883712.
    rel(
        value(&rows, "fit", "", "", "intercept_se"),
        0.232818234301152,
        1e-10,
        "se(B0)",
    );
    rel(
        value(&rows, "fit", "", "", "slope_se"),
        0.429796848199937e-3,
        1e-10,
        "se(B1)",
    );
    rel(
        value(&rows, "fit", "", "", "residual_sd"),
        0.884796396144373,
        1e-10,
        "s",
    );
    rel(
        value(&rows, "fit", "", "", "r_squared"),
        0.999993745883712,
        1e-13,
        "R²",
    );
    check_fit_against_ols(&rows, (&xs, &ys), 0.95, false, (false, false));
    let rows = summary_of(spec, &files, "new_values");
    check_fit_against_ols(&rows, (&xs, &ys), 0.9, true, (false, false));
    // Without a band: standard errors, no intervals (no level was asked for), no drawn points.
    let rows = summary_of(spec, &files, "plain");
    assert!(has(&rows, "fit", "", "", "slope_se"));
    assert!(!has(&rows, "fit", "", "", "slope_ci_low"));
    assert!(series(&rows, "fit", "", "fitted").is_empty());
}

#[test]
fn a_fit_on_log_axes_is_the_least_squares_line_of_the_logs() {
    // A power law with a wobble made here: x = 1.4^i, y = 3 · x^1.5 · e^(0.2 sin 3i), i = 0..19.
    let pairs: Vec<(f64, f64)> = (0..20)
        .map(|i| {
            let x = 1.4_f64.powi(i);
            (x, 3.0 * x.powf(1.5) * (0.2 * (3.0 * i as f64).sin()).exp())
        })
        .collect();
    let spec = r#"data growth "growth.csv" {
  x: ratio
  y: ratio
}
figure power { from growth; x x scale(log); y y scale(log); points; fit band(0.95) summary(full) }
"#;
    let csv = pairs_csv(&pairs);
    let rows = summary_of(spec, &[("growth.csv", &csv)], "power");
    // Reference: statsmodels OLS of ln y on ln x; the drawn line and band are its fitted
    // values and mean-response interval exponentiated.
    let (lx, ly): (Vec<f64>, Vec<f64>) = pairs.iter().map(|(x, y)| (x.ln(), y.ln())).unzip();
    check_fit_against_ols(&rows, (&lx, &ly), 0.95, false, (true, true));
    rel(
        value(&rows, "fit", "", "", "slope"),
        1.5,
        0.05,
        "the exponent, near 1.5",
    );
}

// ---------------------------------------------------------------------------------------------
// counts heights(percent) error(ci(L)): Wilson intervals.

#[test]
fn percentages_carry_wilson_intervals_as_statsmodels_computes_them() {
    // Made here: school a has 0 walkers, 3 cyclists and 7 bus riders; school b 5 walkers only;
    // school c is declared and has no pupils.
    let spec = r#"data travel "travel.csv" {
  pupil: id
  school: nominal levels("a", "b", "c")
  mode: nominal levels("walk", "cycle", "bus")
}
figure modes {
  from travel
  x mode
  colour school
  counts heights(percent) error(ci(0.9))
}
"#;
    let mut csv = String::from("pupil,school,mode\n");
    let pupils = [("a", "cycle", 3), ("a", "bus", 7), ("b", "walk", 5)];
    let mut id = 0;
    for (school, mode, n) in pupils {
        for _ in 0..n {
            id += 1;
            csv.push_str(&format!("P{id},{school},{mode}\n"));
        }
    }
    let rows = summary_of(spec, &[("travel.csv", &csv)], "modes");
    let cases = [
        ("a", "walk", 0, 10),
        ("a", "cycle", 3, 10),
        ("a", "bus", 7, 10),
        ("b", "walk", 5, 5),
        ("b", "cycle", 0, 5),
        ("b", "bus", 0, 5),
    ];
    let request: Vec<serde_json::Value> = cases
        .iter()
        .map(|(_, _, k, n)| json!([k, n, 0.9]))
        .collect();
    let wilson = reference("wilson", json!(request));
    for (i, (school, mode, k, n)) in cases.iter().enumerate() {
        let what = format!("{school} {mode}");
        rel(
            value(&rows, "counts", school, mode, "percent"),
            100.0 * *k as f64 / *n as f64,
            1e-15,
            &what,
        );
        // statsmodels gives proportions; the summary gives percents.
        let (lo, hi) = (100.0 * num(&wilson[i][0]), 100.0 * num(&wilson[i][1]));
        close(
            value(&rows, "counts", school, mode, "ci_low"),
            lo,
            1e-12,
            100.0,
            &what,
        );
        close(
            value(&rows, "counts", school, mode, "ci_high"),
            hi,
            1e-12,
            100.0,
            &what,
        );
    }
    // No pupil at school c: a count of 0 and no percentage or interval.
    assert_eq!(value(&rows, "counts", "c", "", "n"), 0.0);
    assert_eq!(value(&rows, "counts", "c", "walk", "count"), 0.0);
    assert!(!has(&rows, "counts", "c", "walk", "percent"));
    assert!(!has(&rows, "counts", "c", "walk", "ci_low"));
}

// ---------------------------------------------------------------------------------------------
// mean on a log axis: the geometric mean, intervals on the logs.

#[test]
fn means_on_a_log_axis_are_geometric_with_intervals_from_the_logs() {
    // Made here: positive values with a long right tail, y = e^(sin(2.7 i) + i / 9).
    let groups: [(&str, Vec<f64>); 2] = [
        (
            "dry",
            (0..9)
                .map(|i| ((2.7 * i as f64).sin() + i as f64 / 9.0).exp())
                .collect(),
        ),
        (
            "wet",
            (0..14)
                .map(|i| (1.0 + (1.3 * i as f64).cos() * 1.5).exp())
                .collect(),
        ),
    ];
    let mut csv = String::from("plant,soil,mass\n");
    for (soil, values) in &groups {
        for (i, v) in values.iter().enumerate() {
            csv.push_str(&format!("{soil}{i},{soil},{v:?}\n"));
        }
    }
    let figure = |error: &str| {
        format!(
            r#"data plants "plants.csv" {{
  plant: id
  soil: nominal levels("dry", "wet")
  mass: ratio
}}
figure means {{ from plants; x soil; y mass scale(log); points; mean error({error}) }}
"#
        )
    };
    let samples: Vec<&Vec<f64>> = groups.iter().map(|(_, v)| v).collect();
    let want = reference("geometric", json!({"samples": samples, "level": 0.95}));
    let ci = summary_of(&figure("ci(0.95)"), &[("plants.csv", &csv)], "means");
    let sd = summary_of(&figure("sd"), &[("plants.csv", &csv)], "means");
    let se = summary_of(&figure("se"), &[("plants.csv", &csv)], "means");
    for (i, (soil, _)) in groups.iter().enumerate() {
        let w = &want[i];
        // scipy.stats.gmean; the t interval of numpy.log with scipy's t quantile, exponentiated.
        rel(
            value(&ci, "mean", "", soil, "geometric_mean"),
            num(&w["gmean"]),
            1e-13,
            soil,
        );
        assert!(
            !has(&ci, "mean", "", soil, "mean"),
            "no arithmetic mean on a log axis"
        );
        rel(
            value(&ci, "mean", "", soil, "ci_low"),
            num(&w["ci"][0]),
            1e-12,
            soil,
        );
        rel(
            value(&ci, "mean", "", soil, "ci_high"),
            num(&w["ci"][1]),
            1e-12,
            soil,
        );
        rel(
            value(&sd, "mean", "", soil, "geometric_sd"),
            num(&w["sd_factor"]),
            1e-12,
            soil,
        );
        rel(
            value(&se, "mean", "", soil, "geometric_se"),
            num(&w["se_factor"]),
            1e-12,
            soil,
        );
    }
}

// ---------------------------------------------------------------------------------------------
// median error(ci(L)) and box notch on Student's sleep data.

#[test]
fn median_intervals_and_notches_match_the_binomial_and_the_formula() {
    let spec = format!(
        "{SLEEP_BOOK}\nfigure medians {{\n  from sleep\n  x drug\n  y extra\n  box notch\n  median error(ci(0.95))\n}}\n"
    );
    let rows = summary_of(&spec, &[("sleep.csv", &sleep_table())], "medians");
    let samples = sleep_by_drug();
    let want = reference(
        "median_ci",
        json!({"samples": samples.values().collect::<Vec<_>>(), "level": 0.95}),
    );
    for (i, drug) in samples.keys().enumerate() {
        let w = &want[i];
        // scipy.stats.binom: for n = 10 the largest l is 2 (coverage 1 − 2 · 11/1024).
        assert_eq!(
            value(&rows, "median", "", drug, "ci_low"),
            num(&w["ci"][0]),
            "{drug}"
        );
        assert_eq!(
            value(&rows, "median", "", drug, "ci_high"),
            num(&w["ci"][1]),
            "{drug}"
        );
        rel(
            value(&rows, "median", "", drug, "coverage"),
            num(&w["coverage"]),
            1e-15,
            drug,
        );
        rel(
            value(&rows, "median", "", drug, "coverage"),
            1.0 - 22.0 / 1024.0,
            1e-15,
            drug,
        );
        // McGill, Tukey & Larsen (1978): median ± 1.58 · IQR / √n, numpy's linear percentiles.
        rel(
            value(&rows, "box", "", drug, "notch_low"),
            num(&w["notch"][0]),
            1e-13,
            drug,
        );
        rel(
            value(&rows, "box", "", drug, "notch_high"),
            num(&w["notch"][1]),
            1e-13,
            drug,
        );
    }
}

// ---------------------------------------------------------------------------------------------
// error(boot(L, bca)) on a skewed sample.

#[test]
fn bca_intervals_agree_with_scipy_within_monte_carlo_error() {
    // Made here: a long right tail, y = (e^(1.2 sin 2.3i + 0.05 i))², i = 0..19, where the BCa
    // interval of the mean lies well above the percentile one.
    let values: Vec<f64> = (0..20)
        .map(|i| {
            let i = i as f64;
            (1.2 * (2.3 * i).sin() + 0.05 * i).exp().powi(2)
        })
        .collect();
    let mut csv = String::from("lake,site,load\n");
    for (i, v) in values.iter().enumerate() {
        csv.push_str(&format!("L{i},shore,{v:?}\n"));
    }
    let spec = r#"data lakes "lakes.csv" {
  lake: id
  site: nominal levels("shore")
  load: ratio
}
figure means { from lakes; x site; y load; points; mean error(boot(0.95, bca)) }
figure plain { from lakes; x site; y load; points; mean error(boot(0.95)) }
"#;
    let rows = summary_of(spec, &[("lakes.csv", &csv)], "means");
    let want = reference("bca", json!({"samples": [values], "level": 0.95}));
    let se = num(&want[0]["standard_error"]);
    // scipy.stats.bootstrap(method="BCa", 50 000 resamples) against the layer's 2000: over 30
    // scipy seeds at 2000 resamples on these data the sd of the ends was 0.042 and 0.19
    // bootstrap standard errors, so the tolerances 0.2 and 0.85 are more than 4.4 of them.
    // The percentile interval's upper end lies 0.9 standard errors below BCa's here, so a
    // missing correction fails.
    for (stat, key, factor) in [("ci_low", "low", 0.2), ("ci_high", "high", 0.85)] {
        let got = value(&rows, "mean", "", "shore", stat);
        let reference = num(&want[0][key]);
        assert!(
            (got - reference).abs() <= factor * se,
            "{stat}: {got}, scipy {reference}, tolerance {}",
            factor * se
        );
    }
    // The same resamples read as percentiles (`boot(0.95)`) give a lower upper end.
    let plain = summary_of(spec, &[("lakes.csv", &csv)], "plain");
    assert!(
        value(&plain, "mean", "", "shore", "ci_high")
            < value(&rows, "mean", "", "shore", "ci_high") - 0.5 * se
    );
}

// ---------------------------------------------------------------------------------------------
// density and violin of a ratio variable: reflected at zero, every point in summary(full).

#[test]
fn densities_of_a_ratio_variable_are_reflected_at_zero() {
    // Made here: waiting times piled up near zero, t = (i / 7)² for i = 0..24.
    let times: Vec<f64> = (0..25).map(|i| (i as f64 / 7.0).powi(2)).collect();
    let mut csv = String::from("visit,queue,wait\n");
    for (i, t) in times.iter().enumerate() {
        csv.push_str(&format!("V{i},{},{t:?}\n", ["one", "two"][i % 2]));
    }
    let spec = r#"data waits "waits.csv" {
  visit: id
  queue: nominal levels("one", "two")
  wait: ratio unit("min")
}
figure curve { from waits; x wait; density bandwidth(0.8) summary(full) }
figure shapes { from waits; x queue; y wait; violin bandwidth(0.8) summary(full) }
"#;
    let rows = summary_of(spec, &[("waits.csv", &csv)], "curve");
    let curve = series(&rows, "density", "", "density");
    assert_eq!(curve.len(), 256, "every point drawn");
    assert_eq!(
        curve[0].0, 0.0,
        "the curve starts at zero: max(0, min − 3h)"
    );
    let grid: Vec<f64> = curve.iter().map(|p| p.0).collect();
    let want = reference(
        "reflected",
        json!({"values": times, "bandwidth": 0.8, "grid": grid}),
    );
    let peak = curve.iter().fold(0.0_f64, |m, p| m.max(p.1));
    for (i, (x, d)) in curve.iter().enumerate() {
        close(*d, num(&want[i]), 1e-12, peak, &format!("density at {x}"));
    }
    // The reflected estimate keeps area 1 over [0, ∞) (trapezoids on the grid, which ends
    // three bandwidths beyond the largest value).
    let area: f64 = curve
        .windows(2)
        .map(|w| (w[1].0 - w[0].0) * (w[0].1 + w[1].1) / 2.0)
        .sum();
    assert!((area - 1.0).abs() < 2e-3, "area {area}");
    // The violins' outlines, from each queue's smallest to its largest wait, reflected too
    // (rows `LEVEL@y`).
    let rows = summary_of(spec, &[("waits.csv", &csv)], "shapes");
    for (q, queue) in ["one", "two"].iter().enumerate() {
        let values: Vec<f64> = times.iter().skip(q).step_by(2).copied().collect();
        let outline: Vec<(f64, f64)> = rows
            .iter()
            .filter(|r| r[0] == "violin" && r[3] == "density")
            .filter_map(|r| {
                let y = r[2].strip_prefix(&format!("{queue}@"))?;
                Some((y.parse().unwrap(), r[4].parse().unwrap()))
            })
            .collect();
        assert_eq!(outline.len(), figura::compute::layer::VIOLIN_GRID);
        assert_eq!(outline[0].0, values[0]);
        assert_eq!(outline[outline.len() - 1].0, values[values.len() - 1]);
        let grid: Vec<f64> = outline.iter().map(|p| p.0).collect();
        let want = reference(
            "reflected",
            json!({"values": values, "bandwidth": 0.8, "grid": grid}),
        );
        let peak = outline.iter().fold(0.0_f64, |m, p| m.max(p.1));
        for (i, (y, d)) in outline.iter().enumerate() {
            close(*d, num(&want[i]), 1e-12, peak, &format!("{queue} at {y}"));
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Joined means, trajectories, smooths and guides (issue 15): helpers.

/// Builds `spec` beside `files` and returns every diagnostic as (code, message).
fn diagnostics_of(spec: &str, files: &[(&str, &str)]) -> Vec<(String, String)> {
    let dir = folder_of(spec, files);
    let report = build::build(
        &BuildOptions {
            paths: vec![dir.path().join("figures.figura")],
            out: Some(dir.path().join("out")),
            ..BuildOptions::default()
        },
        &NoProgress,
    )
    .expect("the build runs");
    report
        .diagnostics
        .iter()
        .map(|d| (d.code.as_str().to_string(), d.message.clone()))
        .collect()
}

/// One figure checked, computed and laid out through the library: its numbers and its scene.
fn laid_out(
    spec: &str,
    files: &[(&str, &str)],
    figure: &str,
) -> (figura::compute::FigureData, figura::scene::Scene) {
    let dir = folder_of(spec, files);
    let path = dir.path().join("figures.figura");
    let mut sources = figura::diag::SourceMap::new();
    let id = sources.add(&path, spec.to_string());
    let ast = figura::syntax::parse(id, sources.text(id)).expect("the spec parses");
    let unit = figura::check::SpecUnit {
        path,
        ast,
        sees: Vec::new(),
        build_figures: true,
    };
    let (program, diags) = figura::check::check(&[unit]);
    assert!(diags.is_empty(), "{diags:#?}");
    let plan = program.figures.iter().find(|f| f.name == figure).unwrap();
    let book = &program.codebooks[plan.data];
    let table = figura::data::read_table(&build::table_spec(book), &mut sources).unwrap();
    let data = figura::compute::compute(plan, book, &table).expect("numbers computed");
    let laid = figura::layout::layout(plan, &data);
    assert!(laid.crowding.is_none(), "{:?}", laid.crowding);
    (data, laid.scene)
}

/// Every mark of a scene, with the marks inside clips.
fn all_marks(scene: &figura::scene::Scene) -> Vec<figura::scene::Mark> {
    use figura::scene::Mark;
    let mut out = Vec::new();
    let mut stack: Vec<&Mark> = scene.marks.iter().collect();
    while let Some(m) = stack.pop() {
        match m {
            Mark::Clip { marks, .. } => stack.extend(marks),
            other => out.push(other.clone()),
        }
    }
    out
}

/// Asserts that there are `lines` joining lines, each running left to right through means'
/// dots (filled circles of the estimates' radius) of its own colour, and that no dot is on two
/// lines: joined means meet their own dots. Returns the number of dots and of those on a line.
fn joins_meet_their_dots(scene: &figura::scene::Scene, lines: usize) -> (usize, usize) {
    use figura::scene::Mark;
    let marks = all_marks(scene);
    let dots: Vec<(figura::scene::Point, figura::scene::Colour)> = marks
        .iter()
        .filter_map(|m| match m {
            Mark::Circle {
                centre,
                radius,
                fill: Some(f),
                stroke: Some(_),
            } if (*radius - 0.8).abs() < 1e-12 => Some((*centre, f.colour)),
            _ => None,
        })
        .collect();
    assert!(!dots.is_empty(), "no mean drawn");
    let at_dot = |p: &figura::scene::Point| {
        dots.iter()
            .find(|(c, _)| (c.x - p.x).abs() < 1e-9 && (c.y - p.y).abs() < 1e-9)
    };
    let joins: Vec<(&Vec<figura::scene::Point>, figura::scene::Colour)> = marks
        .iter()
        .filter_map(|m| match m {
            Mark::Line { points, stroke } if points.iter().all(|p| at_dot(p).is_some()) => {
                Some((points, stroke.colour))
            }
            _ => None,
        })
        .collect();
    assert_eq!(joins.len(), lines, "one line per colour group");
    for (points, colour) in &joins {
        assert!(points.windows(2).all(|w| w[0].x < w[1].x), "in x order");
        for p in points.iter() {
            assert_eq!(
                at_dot(p).unwrap().1,
                *colour,
                "a line meets its own group's dots"
            );
        }
    }
    let mut joined = 0;
    for (c, _) in &dots {
        let on = joins
            .iter()
            .filter(|(points, _)| points.iter().any(|p| p == c))
            .count();
        assert!(on <= 1, "a dot on two lines");
        joined += on;
    }
    (dots.len(), joined)
}

// ---------------------------------------------------------------------------------------------
// mean join: the numbers are the means' own; the lines join each colour group's dots.

/// The values of column `value` of a CSV (header first), by the columns `group` and `x`.
fn samples_by(
    csv: &str,
    group: usize,
    x: usize,
    value: usize,
) -> BTreeMap<(String, String), Vec<f64>> {
    let mut out: BTreeMap<(String, String), Vec<f64>> = BTreeMap::new();
    for line in csv.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        out.entry((f[group].to_string(), f[x].to_string()))
            .or_default()
            .push(f[value].parse().unwrap());
    }
    out
}

/// Every `mean` cell (colour group, x) of `rows` against its sample: n, the mean and the 95%
/// t interval of `scipy.stats.t.interval`.
fn means_match_t_intervals(rows: &[[String; 5]], samples: &BTreeMap<(String, String), Vec<f64>>) {
    let want = reference(
        "t_means",
        json!({"samples": samples.values().collect::<Vec<_>>(), "level": 0.95}),
    );
    for (i, ((group, x), sample)) in samples.iter().enumerate() {
        let what = format!("{group} at {x}");
        assert_eq!(
            value(rows, "mean", group, x, "n"),
            sample.len() as f64,
            "{what}"
        );
        rel(
            value(rows, "mean", group, x, "mean"),
            num(&want[i]["mean"]),
            1e-13,
            &what,
        );
        rel(
            value(rows, "mean", group, x, "ci_low"),
            num(&want[i]["ci"][0]),
            1e-12,
            &what,
        );
        rel(
            value(rows, "mean", group, x, "ci_high"),
            num(&want[i]["ci"][1]),
            1e-12,
            &what,
        );
    }
}

/// Student's sleep data with an ordinal occasion: each patient's extra sleep on drug A and B
/// at two nights (the second night made here as the first plus 0.1 · patient number), so the
/// within-subject intervals have two within factors.
fn sleep_nights() -> String {
    let mut csv = String::from("patient,drug,night,extra_hours\n");
    for line in sleep_table().lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let (patient, drug, extra): (&str, &str, f64) = (f[0], f[1], f[2].parse().unwrap());
        let p: f64 = patient
            .trim_start_matches(|c: char| !c.is_ascii_digit())
            .parse()
            .unwrap();
        csv.push_str(&format!("{patient},{drug},first,{extra:?}\n"));
        csv.push_str(&format!("{patient},{drug},second,{:?}\n", extra + 0.1 * p));
    }
    csv
}

#[test]
fn joined_means_keep_their_numbers_and_meet_their_dots() {
    let book = r#"data sleep "sleep.csv" {
  patient: id
  drug: nominal levels("A", "B")
  night: ordinal levels("first", "second")
  extra: interval column("extra_hours") unit("h")
  subject patient
  within drug, night
}
"#;
    let csv = sleep_nights();
    let files = [("sleep.csv", csv.as_str())];
    for error in ["ci(0.95)", "ci(0.95, within)", "se", "boot(0.95)"] {
        let figure = |join: &str| {
            format!("{book}figure f {{ from sleep; x night; y extra; colour drug; points; mean {join}error({error}) }}\n")
        };
        // `join` draws a line; it changes no number of the summary.
        let joined = summary_of(&figure("join "), &files, "f");
        let plain = summary_of(&figure(""), &files, "f");
        assert_eq!(joined, plain, "error({error})");
        let (_, scene) = laid_out(&figure("join "), &files, "f");
        assert_eq!(joins_meet_their_dots(&scene, 2), (4, 4), "error({error})");
    }
    // Each cell's mean and t interval (scipy.stats.t.interval).
    let rows = summary_of(
        &format!("{book}figure f {{ from sleep; x night; y extra; colour drug; points; mean join error(ci(0.95)) }}\n"),
        &files,
        "f",
    );
    means_match_t_intervals(&rows, &samples_by(&csv, 1, 2, 3));
}

#[test]
fn a_joined_line_breaks_at_a_level_without_a_mean() {
    // Made here: three doses, the middle one measured in group "a" only.
    let csv = "plot,dose,soil,mass\nP1,low,a,3\nP2,low,a,4\nP3,mid,a,5\nP4,high,a,7\nP5,high,a,6\n\
               P6,low,b,2\nP7,high,b,5\nP8,high,b,6\n";
    let spec = r#"data plots "plots.csv" {
  plot: id
  dose: ordinal levels("low", "mid", "high")
  soil: nominal levels("a", "b")
  mass: ratio
}
figure f { from plots; x dose; y mass; colour soil; points; mean join }
"#;
    let (_, scene) = laid_out(spec, &[("plots.csv", csv)], "f");
    // Group a: one line through three means; group b has no mean at "mid": no line across it.
    assert_eq!(joins_meet_their_dots(&scene, 1), (5, 3));
}

// ---------------------------------------------------------------------------------------------
// Trajectories over a numeric time, with means per occasion and a smooth on top.

/// Made here: 8 patients in two arms, strength at weeks 0, 2, 6 and 12 (patient 3 misses week
/// 6), y = 10 + p + week · (0.5 + 0.1 p) + 0.7 sin(3 p + week).
fn visits_csv() -> String {
    let mut csv = String::from("patient,arm,week,grip\n");
    for p in 1..=8 {
        let arm = if p % 2 == 0 { "home" } else { "clinic" };
        for week in [0.0, 2.0, 6.0, 12.0] {
            if p == 3 && week == 6.0 {
                continue;
            }
            let y = 10.0
                + p as f64
                + week * (0.5 + 0.1 * p as f64)
                + 0.7 * (3.0 * p as f64 + week).sin();
            csv.push_str(&format!("H{p},{arm},{week},{y:?}\n"));
        }
    }
    csv
}

const VISITS_BOOK: &str = r#"data visits "visits.csv" {
  patient: id
  arm: nominal levels("clinic", "home")
  week: ratio
  grip: ratio unit("kg")
  subject patient
  between arm
}
"#;

#[test]
fn trajectories_follow_each_subject_in_time_order_with_means_per_occasion() {
    let csv = visits_csv();
    let spec = format!(
        "{VISITS_BOOK}figure f {{ from visits; x week; y grip; colour arm; lines by(patient); mean join error(ci(0.95)) }}\n"
    );
    let files = [("visits.csv", csv.as_str())];
    let (data, scene) = laid_out(&spec, &files, "f");
    // Each patient's path: the patient's rows, in week order (the data themselves).
    let LayerMarks::Lines(paths) = &data.panels[0].layers[0] else {
        panic!("lines first")
    };
    assert_eq!(paths.len(), 8, "one path per patient");
    let mut by_patient: BTreeMap<String, Vec<(f64, f64)>> = BTreeMap::new();
    for line in csv.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        by_patient
            .entry(f[0].to_string())
            .or_default()
            .push((f[2].parse().unwrap(), f[3].parse().unwrap()));
    }
    let mut want: Vec<Vec<(f64, f64)>> = by_patient.into_values().collect();
    let mut got: Vec<Vec<(f64, f64)>> = paths
        .iter()
        .map(|p| {
            p.points
                .iter()
                .map(|q| match *q {
                    PathPoint::Value { x, y } => (x, y),
                    PathPoint::Slot { .. } => panic!("a numeric x"),
                })
                .collect()
        })
        .collect();
    want.sort_by(|a, b| a[0].1.total_cmp(&b[0].1));
    got.sort_by(|a, b| a[0].1.total_cmp(&b[0].1));
    assert_eq!(got, want);
    assert!(
        got.iter().all(|p| p.windows(2).all(|w| w[0].0 < w[1].0)),
        "time order"
    );
    assert_eq!(joins_meet_their_dots(&scene, 2), (8, 8));
    let rows = summary_of(&spec, &files, "f");
    assert_eq!(
        value(&rows, "lines", "clinic", "", "n"),
        4.0,
        "patients drawn"
    );
    assert_eq!(
        value(&rows, "mean", "clinic", "", "n"),
        15.0,
        "pairs of the arm"
    );
    // The mean at each week of each arm: scipy.stats.t.interval of that week's values.
    means_match_t_intervals(&rows, &samples_by(&csv, 1, 2, 3));
}

#[test]
fn a_subject_twice_at_one_time_is_an_error_unless_trials_collapse_per_time() {
    // Made here: patient H1 measured twice at week 2 (trials 1 and 2).
    let csv = "patient,trial,week,grip\nH1,1,0,10\nH1,1,2,12\nH1,2,2,14\nH2,1,0,11\nH2,1,2,15\n";
    let book = |replicates: &str| {
        format!(
            r#"data visits "visits.csv" {{
  patient: id
  trial: interval
  week: ratio
  grip: ratio
  subject patient
  {replicates}
}}
figure f {{ from visits; x week; y grip; lines by(patient); mean }}
"#
        )
    };
    let diags = diagnostics_of(&book(""), &[("visits.csv", csv)]);
    assert_eq!(diags.len(), 1, "{diags:#?}");
    assert_eq!(diags[0].0, "F0109");
    assert!(
        diags[0].1.contains("\"H1\"") && diags[0].1.contains("week = 2"),
        "{}",
        diags[0].1
    );
    assert!(diags[0].1.contains("data rows 3 and 4"), "{}", diags[0].1);
    // With `replicates`, H1's trials at week 2 collapse to their mean, 13, and the trajectory
    // keeps its two times (not one point per patient).
    let (data, _) = laid_out(
        &book("replicates trial collapse(mean)"),
        &[("visits.csv", csv)],
        "f",
    );
    let LayerMarks::Lines(paths) = &data.panels[0].layers[0] else {
        panic!("lines first")
    };
    assert_eq!(
        paths[0].points,
        vec![
            PathPoint::Value { x: 0.0, y: 10.0 },
            PathPoint::Value { x: 2.0, y: 13.0 }
        ]
    );
    let rows = summary_of(
        &book("replicates trial collapse(mean)"),
        &[("visits.csv", csv)],
        "f",
    );
    assert_eq!(value(&rows, "mean", "", "2", "mean"), 14.0, "(13 + 15) / 2");
}

#[test]
fn means_over_times_few_subjects_share_warn_and_point_to_smooth() {
    // Made here: every patient seen on a day of its own.
    let mut csv = String::from("patient,day,grip\n");
    for p in 0..12 {
        csv.push_str(&format!("H{p},{},{}\n", p * 3 + 1, 10 + p));
    }
    let spec = r#"data visits "visits.csv" {
  patient: id
  day: ratio
  grip: ratio
  subject patient
}
figure f { from visits; x day; y grip; points; mean }
"#;
    let diags = diagnostics_of(spec, &[("visits.csv", &csv)]);
    assert_eq!(diags.len(), 1, "{diags:#?}");
    assert_eq!(diags[0].0, "W0014");
    assert!(
        diags[0].1.contains("12 of the 12 x values"),
        "{}",
        diags[0].1
    );
}

// ---------------------------------------------------------------------------------------------
// smooth: LOWESS against statsmodels.

/// Made here: a wavy trend with a deterministic wobble and one wild value, at x values that
/// are all distinct: x = i + 0.37 sin i, y = 10 + 3 sin(x / 6) + 0.8 sin 7.1i, y₁₇ + 9; and
/// 300 pairs of a second group, x = i / 10 + 0.003 sin i, y = 5 + cos(x) + 0.4 sin 3.3i.
fn wavy_groups() -> Vec<(&'static str, Vec<(f64, f64)>)> {
    let a = (0..40)
        .map(|i| {
            let i = i as f64;
            let x = i + 0.37 * i.sin();
            let wild = if i == 17.0 { 9.0 } else { 0.0 };
            (
                x,
                10.0 + 3.0 * (x / 6.0).sin() + 0.8 * (7.1 * i).sin() + wild,
            )
        })
        .collect();
    let b = (0..300)
        .map(|i| {
            let i = i as f64;
            let x = i / 10.0 + 0.003 * i.sin();
            (x, 5.0 + x.cos() + 0.4 * (3.3 * i).sin())
        })
        .collect();
    vec![("a", a), ("b", b)]
}

fn wavy_csv(groups: &[(&str, Vec<(f64, f64)>)]) -> String {
    let mut csv = String::from("unit,site,x,y\n");
    for (site, pairs) in groups {
        for (i, (x, y)) in pairs.iter().enumerate() {
            csv.push_str(&format!("{site}{i},{site},{x:?},{y:?}\n"));
        }
    }
    csv
}

const WAVY_BOOK: &str = r#"data wavy "wavy.csv" {
  unit: id
  site: nominal levels("a", "b")
  x: ratio
  y: ratio
}
"#;

#[test]
fn smooths_match_statsmodels_lowess_at_every_point_drawn() {
    let groups = wavy_groups();
    let csv = wavy_csv(&groups);
    for (span, option) in [(2.0 / 3.0, String::new()), (0.3, "span(0.3) ".to_string())] {
        let spec = format!(
            "{WAVY_BOOK}figure f {{ from wavy; x x; y y; colour site; points; smooth {option}summary(full) }}\n"
        );
        let rows = summary_of(&spec, &[("wavy.csv", &csv)], "f");
        let drawn: Vec<Vec<(f64, f64)>> = groups
            .iter()
            .map(|(site, _)| series(&rows, "smooth", site, "fitted"))
            .collect();
        let request: Vec<serde_json::Value> = groups
            .iter()
            .zip(&drawn)
            .map(|((_, pairs), line)| {
                json!({
                    "x": pairs.iter().map(|p| p.0).collect::<Vec<_>>(),
                    "y": pairs.iter().map(|p| p.1).collect::<Vec<_>>(),
                    "frac": span,
                    "at": line.iter().map(|p| p.0).collect::<Vec<_>>(),
                })
            })
            .collect();
        let want = reference("lowess", json!(request));
        for (g, (site, pairs)) in groups.iter().enumerate() {
            let line = &drawn[g];
            // Through every distinct x (40), or 256 points across the range (300 > 256), the
            // first and last at the data's ends.
            let expected_points = if pairs.len() > 256 { 256 } else { pairs.len() };
            assert_eq!(line.len(), expected_points, "{site}");
            assert_eq!(line[0].0, pairs[0].0, "{site} starts at the smallest x");
            assert_eq!(
                line[line.len() - 1].0,
                pairs[pairs.len() - 1].0,
                "{site} ends at the largest x"
            );
            assert_eq!(value(&rows, "smooth", site, "", "n"), pairs.len() as f64);
            assert_eq!(value(&rows, "smooth", site, "", "n_missing"), 0.0);
            assert_eq!(value(&rows, "smooth", site, "", "span"), span);
            assert_eq!(
                value(&rows, "smooth", site, "", "neighbours"),
                num(&want[g]["neighbours"]),
                "{site}: neighbours int(frac n + 1e-10)"
            );
            let smooth: Vec<f64> = serde_json::from_value(want[g]["smooth"].clone()).unwrap();
            for ((x, got), reference) in line.iter().zip(&smooth) {
                close(
                    *got,
                    *reference,
                    1e-9,
                    10.0,
                    &format!("{site} span {span} at {x}"),
                );
            }
        }
    }
}

#[test]
fn a_smooth_on_log_axes_is_the_lowess_of_the_logs() {
    let groups = wavy_groups();
    let pairs: Vec<(f64, f64)> = groups[0].1.iter().map(|(x, y)| (x + 1.0, *y)).collect();
    let csv = wavy_csv(&[("a", pairs.clone())]);
    let spec = format!(
        "{WAVY_BOOK}figure f {{ from wavy; x x scale(log); y y scale(log); points; smooth span(0.5) summary(full) }}\n"
    );
    let rows = summary_of(&spec, &[("wavy.csv", &csv)], "f");
    let line = series(&rows, "smooth", "", "fitted");
    // statsmodels lowess of ln y on ln x, read at ln x and exponentiated.
    let want = reference(
        "lowess",
        json!([{
            "x": pairs.iter().map(|p| p.0.ln()).collect::<Vec<_>>(),
            "y": pairs.iter().map(|p| p.1.ln()).collect::<Vec<_>>(),
            "frac": 0.5,
            "at": line.iter().map(|p| p.0.ln()).collect::<Vec<_>>(),
        }]),
    );
    let smooth: Vec<f64> = serde_json::from_value(want[0]["smooth"].clone()).unwrap();
    assert_eq!(line.len(), pairs.len());
    for ((x, got), reference) in line.iter().zip(&smooth) {
        rel(*got, reference.exp(), 1e-9, &format!("at {x}"));
    }
}

#[test]
fn a_smooth_of_too_few_pairs_draws_nothing_and_says_why() {
    // Made here: 6 pairs in group a (too few), 12 in group b (enough).
    let mut csv = String::from("unit,site,x,y\n");
    for i in 0..18 {
        let site = if i < 6 { "a" } else { "b" };
        csv.push_str(&format!("u{i},{site},{i},{}\n", (i * i) % 7));
    }
    let spec =
        format!("{WAVY_BOOK}figure f {{ from wavy; x x; y y; colour site; points; smooth }}\n");
    let diags = diagnostics_of(&spec, &[("wavy.csv", &csv)]);
    assert_eq!(diags.len(), 1, "{diags:#?}");
    assert_eq!(diags[0].0, "W0015");
    assert!(
        diags[0].1.contains("colour group \"a\"")
            && diags[0].1.contains("6 pairs, fewer than the 10"),
        "{}",
        diags[0].1
    );
    let (data, _) = laid_out(&spec, &[("wavy.csv", &csv)], "f");
    let LayerMarks::Smooth(curves) = &data.panels[0].layers[1] else {
        panic!("smooth second")
    };
    assert_eq!(curves.len(), 1, "a curve for group b only");
    // A span that leaves each local line two pairs: no curve either.
    let narrow =
        format!("{WAVY_BOOK}figure f {{ from wavy; x x; y y; points; smooth span(0.1) }}\n");
    let diags = diagnostics_of(&narrow, &[("wavy.csv", &csv)]);
    assert!(
        diags[0].1.contains("leaves each local line 2 pairs"),
        "{diags:#?}"
    );
}

#[test]
fn a_smooth_of_more_pairs_than_the_limit_is_a_located_error() {
    let mut csv = String::from("unit,site,x,y\n");
    for i in 0..5_001 {
        csv.push_str(&format!("u{i},a,{i},{}\n", i % 13));
    }
    let spec = format!("{WAVY_BOOK}figure f {{ from wavy; x x; y y; points; smooth }}\n");
    let diags = diagnostics_of(&spec, &[("wavy.csv", &csv)]);
    assert_eq!(diags.len(), 1, "{diags:#?}");
    assert_eq!(diags[0].0, "F0126");
    assert!(diags[0].1.contains("5001 pairs"), "{}", diags[0].1);
}

// ---------------------------------------------------------------------------------------------
// guide: reference lines and bands from the spec.

#[test]
fn guides_are_in_the_summary_on_the_axis_and_in_the_key() {
    let csv = visits_csv();
    let spec = format!(
        r#"{VISITS_BOOK}figure f {{
  from visits
  x week
  y grip
  points
  guide y(0)
  guide x(14, 16) label("follow-up")
  guide y(40) label("normal limit")
}}
"#
    );
    let files = [("visits.csv", csv.as_str())];
    let rows = summary_of(&spec, &files, "f");
    let guides: Vec<(String, f64)> = rows
        .iter()
        .filter(|r| r[0] == "guide")
        .map(|r| (r[3].clone(), r[4].parse().unwrap()))
        .collect();
    assert_eq!(
        guides,
        [
            ("y_line".to_string(), 0.0),
            ("x_band_low".to_string(), 14.0),
            ("x_band_high".to_string(), 16.0),
            ("y_line".to_string(), 40.0)
        ]
    );
    let (data, scene) = laid_out(&spec, &files, "f");
    // The axes reach the guides as they reach the data (grip runs from about 11 to 32).
    let figura::compute::YScale::Numbers(y) = &data.y else {
        panic!("a numeric y")
    };
    assert_eq!(y.extent, (0.0, 40.0));
    let figura::compute::XScale::Numbers(x) = &data.x else {
        panic!("a numeric x")
    };
    assert_eq!(x.extent, (0.0, 16.0));
    // The unlabelled line is named in the key; the labelled ones say what they are on the plot.
    assert_eq!(data.key, ["Dashed line: y = 0."]);
    let texts: Vec<String> = scene.text_boxes().into_iter().map(|t| t.text).collect();
    assert!(
        texts.contains(&"follow-up".to_string()) && texts.contains(&"normal limit".to_string())
    );
}

#[test]
fn guide_labels_that_cannot_stand_apart_make_the_figure_too_small() {
    // Three labels wider than half the panel, at lines less than a label's height apart: two
    // find a place (above and below the lines), the third none.
    let csv = visits_csv();
    let spec = format!(
        r#"{VISITS_BOOK}figure f {{
  from visits
  x week
  y grip
  points
  guide y(20) label("a label for a reference line")
  guide y(20.5) label("another label beside it")
  guide y(21) label("and a third one here")
  size 50mm x 45mm
}}
"#
    );
    let diags = diagnostics_of(&spec, &[("visits.csv", &csv)]);
    assert_eq!(diags.len(), 1, "{diags:#?}");
    assert_eq!(diags[0].0, "F0124");
    assert!(
        diags[0].1.contains("of a guide has no room"),
        "{}",
        diags[0].1
    );
}

// ---------------------------------------------------------------------------------------------
// difference from("LEVEL"): paired t and Welch intervals; stack: shares; points arrange(swarm);
// the small-n rules (W0016, intervals left out and said so in the key).

/// The text of every `<text>` element of an SVG, in order, joined by spaces.
fn svg_text(svg: &str) -> String {
    svg.split("<text")
        .skip(1)
        .filter_map(|t| Some(t.split_once('>')?.1.split('<').next()?.to_string()))
        .collect::<Vec<_>>()
        .join(" ")
}

#[test]
fn paired_differences_match_student_1908_and_scipy() {
    let spec = format!(
        "{SLEEP_BOOK}\nfigure diff {{ from sleep; x drug; y extra; points jitter(0.2); lines by(patient); difference from(\"A\") dots }}\nfigure diff90 {{ from sleep; x drug; y extra; points; difference from(\"A\") error(ci(0.9)) }}\n"
    );
    let table = sleep_table();
    let samples = sleep_by_drug();
    let (a, b) = (&samples["A"], &samples["B"]);
    for (figure, level) in [("diff", 0.95), ("diff90", 0.9)] {
        let rows = summary_of(&spec, &[("sleep.csv", &table)], figure);
        // Student (1908): the differences B − A of the ten patients have mean 1.58 and
        // t = 4.06 on 9 degrees of freedom.
        rel(
            value(&rows, "difference", "", "B", "difference"),
            1.58,
            1e-12,
            "mean difference",
        );
        assert_eq!(value(&rows, "difference", "", "B", "df"), 9.0);
        assert_eq!(value(&rows, "difference", "", "B", "n"), 10.0);
        assert_eq!(value(&rows, "difference", "", "B", "n_missing"), 0.0);
        assert!(
            !has(&rows, "difference", "", "A", "n"),
            "no row for the reference"
        );
        // scipy.stats.ttest_rel(B, A).confidence_interval(L).
        let want = reference("paired", json!([[b, a, level]]));
        rel(num(&want[0]["t"]), 4.06, 1e-3, "scipy's t, as published");
        for (stat, i) in [("ci_low", 0), ("ci_high", 1)] {
            rel(
                value(&rows, "difference", "", "B", stat),
                num(&want[0]["ci"][i]),
                1e-12,
                stat,
            );
        }
    }
}

/// Heights of plants in three pots under two soils, made here: pot p, soil s, plant i of n
/// has 30 + 6p + 4s + (2 + p + s) · sin(2.1 i + p) (every group its own size and spread).
fn pots_csv() -> (String, BTreeMap<(usize, usize), Vec<f64>>) {
    let mut csv = String::from("plant,pot,soil,height\n");
    let mut groups = BTreeMap::new();
    let sizes = [[7, 4], [12, 9], [5, 2]];
    for (p, pot) in ["clay", "peat", "coir"].iter().enumerate() {
        for (s, soil) in ["dry", "wet"].iter().enumerate() {
            for i in 0..sizes[p][s] {
                let (pf, sf, i) = (p as f64, s as f64, i as f64);
                let h = 30.0 + 6.0 * pf + 4.0 * sf + (2.0 + pf + sf) * (2.1 * i + pf).sin();
                csv.push_str(&format!("P{p}{s}{i},{pot},{soil},{h:?}\n"));
                groups.entry((p, s)).or_insert_with(Vec::new).push(h);
            }
        }
    }
    (csv, groups)
}

const POTS_BOOK: &str = r#"data pots "pots.csv" {
  plant: id
  pot: nominal levels("clay", "peat", "coir")
  soil: nominal levels("dry", "wet")
  height: ratio unit("mm")
  subject plant
  between pot
}
"#;

#[test]
fn differences_between_groups_match_welch_as_scipy_computes_it() {
    let spec = format!(
        "{POTS_BOOK}\nfigure diff {{ from pots; x pot; y height; colour soil; points arrange(swarm); difference from(\"clay\") error(ci(0.9)); size 120mm x 90mm }}\n"
    );
    let (csv, groups) = pots_csv();
    let rows = summary_of(&spec, &[("pots.csv", &csv)], "diff");
    let cases: Vec<(usize, usize)> = vec![(1, 0), (1, 1), (2, 0), (2, 1)];
    let request: Vec<serde_json::Value> = cases
        .iter()
        .map(|(p, s)| json!([groups[&(*p, *s)], groups[&(0, *s)], 0.9]))
        .collect();
    // scipy.stats.ttest_ind(level, reference, equal_var=False).confidence_interval(0.9).
    let want = reference("welch", json!(request));
    for (i, (p, s)) in cases.iter().enumerate() {
        let (pot, soil) = (["clay", "peat", "coir"][*p], ["dry", "wet"][*s]);
        let what = format!("{pot} {soil}");
        let w = &want[i];
        rel(
            value(&rows, "difference", soil, pot, "difference"),
            num(&w["difference"]),
            1e-12,
            &what,
        );
        rel(
            value(&rows, "difference", soil, pot, "df"),
            num(&w["df"]),
            1e-12,
            &what,
        );
        let width = num(&w["ci"][1]) - num(&w["ci"][0]);
        close(
            value(&rows, "difference", soil, pot, "ci_low"),
            num(&w["ci"][0]),
            1e-12,
            width,
            &what,
        );
        close(
            value(&rows, "difference", soil, pot, "ci_high"),
            num(&w["ci"][1]),
            1e-12,
            width,
            &what,
        );
        assert_eq!(
            value(&rows, "difference", soil, pot, "n"),
            groups[&(*p, *s)].len() as f64
        );
    }
}

#[test]
fn a_difference_from_too_few_values_has_no_interval_and_the_key_says_so() {
    // Made here: "coir" has one plant, so its difference from "clay" is drawn without an
    // interval; "peat" keeps its interval. And a paired design with a single complete pair.
    let spec = r#"data pots "pots.csv" {
  plant: id
  pot: nominal levels("clay", "peat", "coir")
  height: ratio unit("mm")
}
figure diff { from pots; x pot; y height; points; difference from("clay") }
data sleep "sleep.csv" {
  patient: id
  drug: nominal levels("A", "B")
  extra: interval column("extra_hours")
  subject patient
  within drug
}
figure pair { from sleep; x drug; y extra; points; difference from("A") }
"#;
    let csv =
        "plant,pot,height\nA,clay,30\nB,clay,34\nC,clay,35\nD,peat,40\nE,peat,37\nF,coir,50\n";
    let sleep = "patient,drug,extra_hours\n1,A,0.7\n1,B,1.9\n2,A,-1.6\n3,B,0.1\n";
    let files = [("pots.csv", csv), ("sleep.csv", sleep)];
    let (_dir, out, report) = build_in(spec, &files);
    assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    let diff = read_summary(&out, "diff");
    // Welch restated by hand: 50 − 33 for coir; peat keeps its interval.
    assert_eq!(
        value(&diff, "difference", "", "coir", "difference"),
        50.0 - 33.0
    );
    assert!(!has(&diff, "difference", "", "coir", "ci_low"));
    assert!(!has(&diff, "difference", "", "coir", "df"));
    assert!(has(&diff, "difference", "", "peat", "ci_low"));
    let key = svg_text(&std::fs::read_to_string(out.join("diff.svg")).unwrap());
    assert!(
        key.contains("no interval where a level has fewer than 2 values"),
        "{key}"
    );
    let pair = read_summary(&out, "pair");
    // One complete pair (patient 1): 1.9 − 0.7, no interval; the unpaired B value is missing.
    assert_eq!(value(&pair, "difference", "", "B", "n"), 1.0);
    assert_eq!(value(&pair, "difference", "", "B", "n_missing"), 1.0);
    rel(
        value(&pair, "difference", "", "B", "difference"),
        1.9 - 0.7,
        1e-15,
        "one pair",
    );
    assert!(!has(&pair, "difference", "", "B", "ci_low"));
    let key = svg_text(&std::fs::read_to_string(out.join("pair.svg")).unwrap());
    assert!(key.contains("no interval from fewer than 2 pairs"), "{key}");
}

#[test]
fn few_values_under_a_box_or_violin_and_an_empty_reference_warn() {
    let spec = r#"data pots "pots.csv" {
  plant: id
  pot: nominal levels("clay", "peat", "coir")
  height: ratio unit("mm")
}
figure boxes { from pots; x pot; y height; box }
figure shapes { from pots; x pot; y height; violin; mean }
figure shown { from pots; x pot; y height; points; box }
figure diff { from pots; x pot; y height; where pot != "clay"; points; difference from("clay") }
"#;
    let mut csv = String::from("plant,pot,height\n");
    for i in 0..8 {
        csv.push_str(&format!("C{i},clay,{}\nP{i},peat,{}\n", 30 + i, 40 - i));
    }
    csv.push_str("X1,coir,50\nX2,coir,52\nX3,coir,57\n");
    let (_dir, _out, report) = build_in(spec, &[("pots.csv", &csv)]);
    let warnings: Vec<&figura::diag::Diagnostic> = report
        .diagnostics
        .iter()
        .filter(|d| d.code == figura::diag::Code::FewValues)
        .collect();
    assert_eq!(warnings.len(), 3, "{:#?}", report.diagnostics);
    // A box or violin of 3 values (fewer than 5: common practice) names its smallest cell;
    // with `points` the values are seen, and nothing is said.
    assert!(
        warnings[0]
            .message
            .contains("a box of 3 values (x = \"coir\")"),
        "{}",
        warnings[0].message
    );
    assert!(
        warnings[1].message.contains("a violin of 3 values"),
        "{}",
        warnings[1].message
    );
    assert!(
        warnings[2]
            .message
            .contains("no values at the reference level \"clay\""),
        "{}",
        warnings[2].message
    );
    assert!(report.failures.is_empty(), "warnings never stop a figure");
}

#[test]
fn stacked_shares_are_each_levels_count_over_the_x_levels_values() {
    // Made here: ratings 1–5 of three items by 23 respondents, r = 1 + (3i + 7j) mod 5 for
    // respondent i and item j, with respondent 4's rating of item "b" missing.
    let spec = r#"data survey "survey.csv" {
  respondent: id
  item: nominal levels("a", "b", "c")
  rating: ordinal levels(1, 2, 3, 4, 5) midpoint(3)
  subject respondent
  within item
}
figure shares { from survey; x item; y rating; stack }
figure centred { from survey; x item; y rating; stack diverging }
"#;
    let mut csv = String::from("respondent,item,rating\n");
    let mut by_item: Vec<Vec<String>> = vec![Vec::new(); 3];
    for i in 0..23 {
        for (j, item) in ["a", "b", "c"].iter().enumerate() {
            if i == 4 && j == 1 {
                csv.push_str(&format!("R{i},{item},\n"));
                continue;
            }
            let r = 1 + (3 * i + 7 * j) % 5;
            csv.push_str(&format!("R{i},{item},{r}\n"));
            by_item[j].push(r.to_string());
        }
    }
    let levels = ["1", "2", "3", "4", "5"];
    let request: Vec<serde_json::Value> = by_item.iter().map(|v| json!([v, levels])).collect();
    // numpy.unique(..., return_counts=True).
    let want = reference("shares", json!(request));
    for figure in ["shares", "centred"] {
        let rows = summary_of(spec, &[("survey.csv", &csv)], figure);
        for (j, item) in ["a", "b", "c"].iter().enumerate() {
            let w = &want[j];
            assert_eq!(value(&rows, "stack", "", item, "n"), num(&w["n"]));
            assert_eq!(
                value(&rows, "stack", "", item, "n_missing"),
                f64::from(j == 1)
            );
            for (k, level) in levels.iter().enumerate() {
                assert_eq!(
                    value(&rows, "stack", level, item, "count"),
                    num(&w["count"][k])
                );
                rel(
                    value(&rows, "stack", level, item, "percent"),
                    num(&w["percent"][k]),
                    1e-15,
                    &format!("{item} {level}"),
                );
            }
        }
    }
}

/// The data dots (radius 0.55 mm, 60% opaque) of an SVG: (cx, cy).
fn dots(svg: &str) -> Vec<(f64, f64)> {
    svg.split("<circle ")
        .skip(1)
        .filter(|c| c.contains("r=\"0.55\"") && c.contains("fill-opacity=\"0.6\""))
        .map(|c| {
            let attr = |name: &str| -> f64 {
                let start = c.find(&format!("{name}=\"")).unwrap() + name.len() + 2;
                c[start..].split('"').next().unwrap().parse().unwrap()
            };
            (attr("cx"), attr("cy"))
        })
        .collect()
}

#[test]
fn a_swarm_places_each_dot_where_the_sweep_says_and_again_identically() {
    // Made here: 40 waiting times w = 10 + 6 · frac(0.618 i)² (golden-ratio steps, so no two
    // are equal), one queue, in a figure wide enough that no row of dots is narrowed.
    let spec = r#"data waits "waits.csv" {
  visit: id
  queue: nominal levels("one")
  wait: ratio unit("min")
}
figure swarm { from waits; x queue; y wait; points arrange(swarm); size 80mm x 90mm }
"#;
    let mut csv = String::from("visit,queue,wait\n");
    for i in 0..40 {
        let f = (0.618_033_988_75 * i as f64).fract();
        csv.push_str(&format!("V{i},one,{:?}\n", 10.0 + 6.0 * f * f));
    }
    let files = [("waits.csv", csv.as_str())];
    let (_first, out, report) = build_in(spec, &files);
    assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    let svg = std::fs::read_to_string(out.join("swarm.svg")).unwrap();
    let placed = dots(&svg);
    assert_eq!(placed.len(), 40);
    // The sweep restated in Python on the drawn heights (upwards: −cy): the lowest dot sits on
    // the band's centre line, every other dot at its offset from it.
    let heights: Vec<f64> = placed.iter().map(|(_, cy)| -cy).collect();
    let want = reference("swarm", json!({"heights": heights, "radius": 0.55}));
    let lowest = (0..placed.len())
        .max_by(|&i, &j| placed[i].1.total_cmp(&placed[j].1))
        .unwrap();
    let centre = placed[lowest].0;
    for (i, (cx, _)) in placed.iter().enumerate() {
        // The SVG writes three decimals.
        close(cx - centre, num(&want[i]), 2e-3, 1.0, &format!("dot {i}"));
    }
    // No two dots overlap (beyond the SVG's rounding).
    for i in 0..placed.len() {
        for j in 0..i {
            let d = (placed[i].0 - placed[j].0).hypot(placed[i].1 - placed[j].1);
            assert!(d >= 1.1 - 3e-3, "dots {i} and {j} are {d} mm apart");
        }
    }
    // Built again elsewhere: the same bytes.
    let (_second, again, _) = build_in(spec, &files);
    assert_eq!(
        svg,
        std::fs::read_to_string(again.join("swarm.svg")).unwrap()
    );
}
