//! End to end, on data nobody has seen: every number of every summary Figura writes is checked
//! against numpy and scipy.
//!
//! `tests/differential/summaries.py generate` draws new random datasets (a repeated-measures
//! design with between groups, missing values, declared levels in a shuffled order and levels
//! in order of first appearance, independent rows with zeros and ties, repeated trials collapsed
//! by mean and by median) and writes a spec whose figures use box (both whisker rules), mean
//! with sd / se / ci(L) / ci(L, within) (within cells on x, colour and panels), median on
//! numbers and on ordinal levels, lines, points, counts with count and percent heights and
//! every level order, and histograms with every bin rule and every height. The `figura` binary
//! builds them; `summaries.py reference` recomputes every summary row independently (numpy
//! percentile "linear", std with ddof=1, scipy.stats.t.ppf, Cousineau–Morey restated in numpy,
//! numpy.histogram on the edges Figura reports, whose width and placement it also checks) and
//! this test compares them: the same rows, and every number within 1e-9 relative.
//!
//! The seed changes on every run (it is derived from the clock) and is printed on failure;
//! `FIGURA_DIFF_SEED=N cargo test --test summary_differential` replays a run. Python 3 with
//! numpy and scipy is required: if it is missing the test fails and says what to install.

use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;
use std::process::{Command, Output};

use serde_json::Value;

/// Datasets per run (consecutive seeds).
const ROUNDS: u64 = 4;
/// Relative tolerance of every number.
const REL_TOL: f64 = 1e-9;
/// Absolute tolerance, as a share of the data's magnitude, for results that cancel to nearly
/// zero (a mean of values of both signs): their relative error is not a property of the code.
const SCALE_TOL: f64 = 1e-12;

fn script() -> &'static str {
    concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/differential/summaries.py"
    )
}

/// The first seed: `FIGURA_DIFF_SEED`, or one derived from the clock.
fn first_seed() -> u64 {
    if let Ok(text) = std::env::var("FIGURA_DIFF_SEED") {
        return text
            .trim()
            .parse()
            .expect("FIGURA_DIFF_SEED must be a whole number");
    }
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_nanos());
    (nanos % 1_000_000_000_000) as u64
}

fn python(args: &[&str]) -> Output {
    let out = Command::new("python3")
        .arg(script())
        .args(args)
        .output()
        .unwrap_or_else(|e| {
            panic!("cannot run python3 ({e}); install Python 3 with numpy and scipy (pip install numpy scipy)")
        });
    assert!(
        out.status.success(),
        "tests/differential/summaries.py {args:?} failed ({}); it needs python3 with numpy and scipy:\n{}",
        out.status,
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// A summary row's place: panel, layer, group, x, stat.
type Key = (String, String, String, String, String);

/// An expected value: a number with the data's magnitude, or a level name.
#[derive(Debug)]
enum Expected {
    Number { value: f64, scale: f64 },
    Level(String),
}

fn expected_rows(rows: &Value) -> BTreeMap<Key, Vec<Expected>> {
    let mut out: BTreeMap<Key, Vec<Expected>> = BTreeMap::new();
    for row in rows.as_array().expect("a list of rows") {
        let r = row.as_array().expect("a row");
        let text = |i: usize| r[i].as_str().expect("text").to_string();
        let key = (text(0), text(1), text(2), text(3), text(4));
        let value = match &r[5] {
            Value::Object(o) => Expected::Level(o["level"].as_str().expect("a level").into()),
            v => Expected::Number {
                value: v.as_f64().expect("a number"),
                scale: r[6].as_f64().expect("a scale"),
            },
        };
        out.entry(key).or_default().push(value);
    }
    out
}

fn actual_rows(path: &Path) -> BTreeMap<Key, Vec<String>> {
    let mut reader = csv::Reader::from_path(path)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    let header: Vec<String> = reader
        .headers()
        .expect("a header")
        .iter()
        .map(String::from)
        .collect();
    assert_eq!(header, ["panel", "layer", "group", "x", "stat", "value"]);
    let mut out: BTreeMap<Key, Vec<String>> = BTreeMap::new();
    for record in reader.records() {
        let r = record.expect("a summary row");
        let key = (
            r[0].to_string(),
            r[1].to_string(),
            r[2].to_string(),
            r[3].to_string(),
            r[4].to_string(),
        );
        out.entry(key).or_default().push(r[5].to_string());
    }
    out
}

fn close(actual: f64, expected: f64, scale: f64) -> bool {
    let diff = (actual - expected).abs();
    diff <= REL_TOL * expected.abs() || diff <= SCALE_TOL * scale
}

/// Compares one figure; returns the number of values checked, and pushes every mismatch.
fn compare_figure(
    name: &str,
    expected: &BTreeMap<Key, Vec<Expected>>,
    actual: &BTreeMap<Key, Vec<String>>,
    failures: &mut Vec<String>,
) -> usize {
    let mut checked = 0;
    let keys: BTreeSet<&Key> = expected.keys().chain(actual.keys()).collect();
    for key in keys {
        let (e, a) = (expected.get(key), actual.get(key));
        let (Some(e), Some(a)) = (e, a) else {
            failures.push(format!(
                "{name} {key:?}: Figura wrote {a:?}, the reference has {e:?}"
            ));
            continue;
        };
        if e.len() != a.len() {
            failures.push(format!(
                "{name} {key:?}: Figura wrote {a:?}, expected {e:?}"
            ));
            continue;
        }
        for (e, a) in e.iter().zip(a) {
            checked += 1;
            let ok = match e {
                Expected::Level(level) => a == level,
                Expected::Number { value, scale } => {
                    a.parse::<f64>().is_ok_and(|a| close(a, *value, *scale))
                }
            };
            if !ok {
                failures.push(format!("{name} {key:?}: Figura wrote {a}, expected {e:?}"));
            }
        }
    }
    checked
}

/// Generates, builds and checks one dataset; returns the number of values checked.
fn check_seed(seed: u64, failures: &mut Vec<String>) -> usize {
    let dir = tempfile::tempdir().expect("a temporary folder");
    let data = dir.path().join("data");
    let out = dir.path().join("out");
    let (data_s, out_s) = (data.to_str().unwrap(), out.to_str().unwrap());
    python(&["generate", data_s, &seed.to_string()]);
    let build = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(["build", data_s, "--out", out_s, "--deny-warnings"])
        .output()
        .expect("run figura");
    if !build.status.success() {
        failures.push(format!(
            "seed {seed}: figura build failed ({}):\n{}",
            build.status,
            String::from_utf8_lossy(&build.stderr)
        ));
        return 0;
    }
    let reference: Value = serde_json::from_slice(&python(&["reference", data_s, out_s]).stdout)
        .expect("summaries.py prints JSON");
    for problem in reference["problems"].as_array().expect("a list") {
        failures.push(format!("seed {seed}: {}", problem.as_str().unwrap_or("?")));
    }
    let figures = reference["figures"].as_object().expect("figures");
    assert!(
        figures.len() >= 30,
        "the spec has fewer figures than expected"
    );
    let mut checked = 0;
    for (name, rows) in figures {
        let expected = expected_rows(rows);
        let actual = actual_rows(&out.join(format!("{name}.summary.csv")));
        checked += compare_figure(&format!("seed {seed} {name}"), &expected, &actual, failures);
    }
    checked
}

#[test]
fn every_summary_number_matches_numpy_and_scipy_on_new_random_data() {
    let first = first_seed();
    let mut failures = Vec::new();
    let mut checked = 0;
    for seed in first..first + ROUNDS {
        checked += check_seed(seed, &mut failures);
    }
    assert!(
        failures.is_empty(),
        "{} mismatches:\n{}\n\nreplay with FIGURA_DIFF_SEED={first} cargo test --test summary_differential",
        failures.len(),
        failures.join("\n")
    );
    // Every run checks many numbers; a spec that silently produced nothing would fail here.
    assert!(
        checked >= 1000,
        "only {checked} values were compared (seed {first})"
    );
}

#[test]
fn the_comparison_rejects_a_wrong_number_and_a_missing_row() {
    // The checker of this file, on made-up rows: a value off by 1e-6 relative and a row that
    // Figura did not write must both be reported.
    let key = |stat: &str| {
        (
            String::new(),
            "mean".to_string(),
            String::new(),
            "a".to_string(),
            stat.to_string(),
        )
    };
    let mut expected = BTreeMap::new();
    expected.insert(
        key("mean"),
        vec![Expected::Number {
            value: 2.0,
            scale: 2.0,
        }],
    );
    expected.insert(
        key("sd"),
        vec![Expected::Number {
            value: 1.0,
            scale: 2.0,
        }],
    );
    let mut actual = BTreeMap::new();
    actual.insert(key("mean"), vec!["2.000002".to_string()]);
    let mut failures = Vec::new();
    compare_figure("made up", &expected, &actual, &mut failures);
    assert_eq!(failures.len(), 2, "{failures:?}");
    actual.insert(key("mean"), vec!["2.0000000000000004".to_string()]);
    actual.insert(key("sd"), vec!["1".to_string()]);
    failures.clear();
    compare_figure("made up", &expected, &actual, &mut failures);
    assert!(failures.is_empty(), "{failures:?}");
}
