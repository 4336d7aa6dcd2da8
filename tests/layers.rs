//! Layers end to end against outside references: a spec and its data in a temporary folder are
//! built, and the numbers of the summary are compared with scipy (tests/layers/reference.py).
//! Data are published (Student 1908, `tests/data_files/student1908-sleep.csv`) or drawn here.

mod common;

use std::collections::BTreeMap;

use figura::build::{self, BuildOptions, NoProgress};
use serde_json::json;

/// Builds `spec` beside `files` and returns each figure's summary rows as
/// (layer, group, x, stat, value).
fn summary_of(spec: &str, files: &[(&str, &str)], figure: &str) -> Vec<[String; 5]> {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("figures.figura"), spec).unwrap();
    for (name, text) in files {
        std::fs::write(dir.path().join(name), text).unwrap();
    }
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
    assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    let text = std::fs::read_to_string(out.join(format!("{figure}.summary.csv"))).unwrap();
    csv::Reader::from_reader(text.as_bytes())
        .records()
        .map(|r| {
            let r = r.unwrap();
            [1, 2, 3, 4, 5].map(|i| r[i].to_string())
        })
        .collect()
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
