//! End-to-end checks of the layers and options beyond the basic ones (issue 3): spec + data
//! file in a temporary folder → build → summary CSV (and, where the summary holds no curve, the
//! computed marks), compared with outside references.
//!
//! References, named again beside each check:
//! - numpy and scipy through `tests/features/end_to_end.py` (python3 with numpy and scipy is
//!   required, as for tests/stats_differential.rs; without them these tests fail and say so);
//! - NIST StRD, linear regression dataset Norris (`tests/data/nist/Norris.dat`), certified values;
//! - Student (1908), the sleep data (`tests/data_files/student1908-sleep.csv`, see its README);
//! - hand counts of small fixtures written here (the counting is shown beside each).

mod common;

use common::{close, rel};

use std::path::PathBuf;

use figura::build::{self, BuildOptions, BuildReport};
use figura::check::{self, SpecUnit};
use figura::compute::{self, FigureData, LayerMarks};
use figura::diag::SourceMap;
use figura::{data, syntax};
use serde_json::{json, Value};

// ---------------------------------------------------------------------------------------------
// Helpers: a temporary project, its summaries and computed marks, and the Python references.

/// A folder holding one spec file and its data files.
struct Project {
    dir: tempfile::TempDir,
}

impl Project {
    fn new(spec: &str, files: &[(&str, &str)]) -> Project {
        let dir = tempfile::tempdir().expect("temp dir");
        std::fs::write(dir.path().join("figures.figura"), spec).unwrap();
        for (name, text) in files {
            std::fs::write(dir.path().join(name), text).unwrap();
        }
        Project { dir }
    }

    fn spec(&self) -> PathBuf {
        self.dir.path().join("figures.figura")
    }

    fn out(&self, folder: &str) -> PathBuf {
        self.dir.path().join(folder)
    }

    fn build_into(&self, folder: &str) -> BuildReport {
        build::build(
            &BuildOptions {
                paths: vec![self.spec()],
                out: Some(self.out(folder)),
                ..BuildOptions::default()
            },
            &build::NoProgress,
        )
        .expect("the build runs")
    }

    /// Builds into `out/` and asserts that no diagnostic was reported.
    fn build(&self) -> &Project {
        let report = self.build_into("out");
        assert!(
            report.diagnostics.is_empty(),
            "unexpected diagnostics: {:#?}",
            report.diagnostics
        );
        self
    }

    fn summary(&self, figure: &str) -> Summary {
        let text = std::fs::read_to_string(self.out("out").join(format!("{figure}.summary.csv")))
            .expect("summary written");
        Summary::parse(&text)
    }

    /// The computed numbers of one figure, straight from the compute stage.
    fn figure_data(&self, figure: &str) -> FigureData {
        let mut sources = SourceMap::new();
        let path = self.spec();
        let id = sources.add(&path, std::fs::read_to_string(&path).unwrap());
        let ast = syntax::parse(id, sources.text(id)).expect("the spec parses");
        let unit = SpecUnit {
            path,
            ast,
            sees: Vec::new(),
            build_figures: true,
        };
        let (program, diags) = check::check(&[unit]);
        assert!(diags.is_empty(), "{diags:#?}");
        let plan = program
            .figures
            .iter()
            .find(|f| f.name == figure)
            .expect("figure checked");
        let book = &program.codebooks[plan.data];
        let table = data::read_table(&build::table_spec(book), &mut sources).expect("data read");
        compute::compute(plan, book, &table).expect("numbers computed")
    }
}

/// One row of a summary CSV.
#[derive(Debug, Clone, PartialEq)]
struct Row {
    panel: String,
    layer: String,
    group: String,
    x: String,
    stat: String,
    value: String,
}

struct Summary(Vec<Row>);

impl Summary {
    fn parse(text: &str) -> Summary {
        let mut reader = csv::Reader::from_reader(text.as_bytes());
        let headers = reader.headers().unwrap().clone();
        assert_eq!(
            headers.iter().collect::<Vec<_>>(),
            ["panel", "layer", "group", "x", "stat", "value"]
        );
        Summary(
            reader
                .records()
                .map(|r| {
                    let r = r.unwrap();
                    Row {
                        panel: r[0].to_string(),
                        layer: r[1].to_string(),
                        group: r[2].to_string(),
                        x: r[3].to_string(),
                        stat: r[4].to_string(),
                        value: r[5].to_string(),
                    }
                })
                .collect(),
        )
    }

    /// The one number at (layer, group, x, stat) in any panel named `panel`.
    fn get(&self, panel: &str, layer: &str, group: &str, x: &str, stat: &str) -> f64 {
        let found: Vec<&Row> = self
            .0
            .iter()
            .filter(|r| {
                r.panel == panel
                    && r.layer == layer
                    && r.group == group
                    && r.x == x
                    && r.stat == stat
            })
            .collect();
        assert_eq!(
            found.len(),
            1,
            "expected one row ({panel},{layer},{group},{x},{stat}) in\n{:#?}",
            self.0
        );
        found[0].value.parse().expect("a number")
    }

    fn value(&self, layer: &str, group: &str, x: &str, stat: &str) -> f64 {
        self.get("", layer, group, x, stat)
    }

    /// The distinct x values of a layer's rows with `stat`, in order of appearance.
    fn xs(&self, layer: &str, stat: &str) -> Vec<String> {
        let mut out: Vec<String> = Vec::new();
        for r in self.0.iter().filter(|r| r.layer == layer && r.stat == stat) {
            if !out.contains(&r.x) {
                out.push(r.x.clone());
            }
        }
        out
    }
}

/// Runs `tests/features/end_to_end.py MODE` with `request` on stdin; fails with a clear message
/// when python3, numpy or scipy is missing.
fn reference(mode: &str, request: Value) -> Value {
    common::python(
        &common::root().join("tests/features/end_to_end.py"),
        mode,
        &request,
    )
}

/// The code and message of a build's only error.
fn only_error(report: &BuildReport) -> (&'static str, String) {
    let errors: Vec<_> = report.diagnostics.iter().filter(|d| d.is_error()).collect();
    assert_eq!(errors.len(), 1, "{errors:#?}");
    (errors[0].code.as_str(), errors[0].message.clone())
}

fn bits(values: &[f64]) -> Vec<u64> {
    values.iter().map(|v| v.to_bits()).collect()
}

fn number(v: &Value) -> f64 {
    v.as_f64().expect("a reference number")
}

/// The marks of layer `layer` in panel `panel`.
fn layer(data: &FigureData, panel: usize, layer: usize) -> &LayerMarks {
    &data.panels[panel].layers[layer]
}

// ---------------------------------------------------------------------------------------------
// Student's (1908) sleep data: densities and violins.

const SLEEP_BOOK: &str = r#"
data sleep "sleep.csv" {
  patient: id
  drug: nominal levels("A", "B")
  extra_hours: interval label("Extra sleep") unit("h")
  subject patient
  within drug
}
"#;

fn sleep_csv() -> String {
    std::fs::read_to_string(common::root().join("tests/data_files/student1908-sleep.csv")).unwrap()
}

/// The sleep values of one drug (or of both, for `None`), in file order.
fn sleep_values(drug: Option<&str>) -> Vec<f64> {
    sleep_csv()
        .lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.split(',').collect();
            (drug.is_none_or(|d| f[1] == d)).then(|| f[2].parse().unwrap())
        })
        .collect()
}

fn sleep_project(figures: &str) -> Project {
    Project::new(
        &format!("{SLEEP_BOOK}{figures}"),
        &[("sleep.csv", &sleep_csv())],
    )
}

#[test]
fn density_bandwidths_and_curves_match_numpy_and_scipy() {
    let project = sleep_project(
        r#"
figure by_drug { from sleep; x extra_hours; colour drug; density bandwidth(silverman) }
figure pooled { from sleep; x extra_hours; density bandwidth(scott) }
figure fixed { from sleep; x extra_hours; colour drug; density bandwidth(0.75) }
"#,
    );
    project.build();
    let cases: [(&str, Option<&str>, Value); 5] = [
        ("by_drug", Some("A"), json!("silverman")),
        ("by_drug", Some("B"), json!("silverman")),
        ("pooled", None, json!("scott")),
        ("fixed", Some("A"), json!(0.75)),
        ("fixed", Some("B"), json!(0.75)),
    ];
    let mut request = Vec::new();
    let mut curves = Vec::new();
    for (figure, drug, rule) in &cases {
        let data = project.figure_data(figure);
        let LayerMarks::Density(found) = layer(&data, 0, 0) else {
            panic!("{figure} draws no curves")
        };
        let group = drug.map_or(0, |d| if d == "A" { 0 } else { 1 });
        let curve = found.iter().find(|c| c.group == group).expect("a curve");
        let grid: Vec<f64> = curve.points.iter().map(|p| p.0).collect();
        request.push(json!({
            "values": bits(&sleep_values(*drug)),
            "rule": rule,
            "grid": bits(&grid),
        }));
        curves.push(curve.points.clone());
    }
    let answers = reference("kde", Value::Array(request));
    for (((figure, drug, _), answer), points) in
        cases.iter().zip(answers.as_array().unwrap()).zip(&curves)
    {
        let summary = project.summary(figure);
        let group = drug.unwrap_or("");
        // Bandwidth rules restated in numpy (Silverman 1986 eq. 3.31; Scott's 1.06 rule).
        rel(
            summary.value("density", group, "", "bandwidth"),
            number(&answer["bandwidth"]),
            1e-12,
            &format!("{figure} {group} bandwidth"),
        );
        // scipy.stats.gaussian_kde with the same bandwidth, at every grid point; tolerance
        // relative to the curve's peak.
        let expected: Vec<f64> = answer["density"]
            .as_array()
            .unwrap()
            .iter()
            .map(number)
            .collect();
        let peak = expected.iter().copied().fold(0.0, f64::max);
        for ((x, d), e) in points.iter().zip(&expected) {
            close(
                *d,
                *e,
                1e-9,
                peak,
                &format!("{figure} {group} density at {x}"),
            );
        }
    }
}

#[test]
fn violin_quartiles_bandwidths_and_outlines_match_numpy_and_scipy() {
    let project = sleep_project(
        r#"
figure violins { from sleep; x drug; y extra_hours; violin bandwidth(silverman); points }
"#,
    );
    project.build();
    let summary = project.summary("violins");
    let data = project.figure_data("violins");
    let LayerMarks::Violin(marks) = layer(&data, 0, 0) else {
        panic!("no violins")
    };
    let mut kde_request = Vec::new();
    let mut quartile_request = Vec::new();
    for (slot, drug) in ["A", "B"].iter().enumerate() {
        let values = sleep_values(Some(drug));
        let violin = marks
            .iter()
            .find(|v| v.x == slot)
            .expect("a violin per drug");
        let ys: Vec<f64> = violin.outline.iter().map(|p| p.0).collect();
        // The outline runs from the smallest to the largest value (common practice: a violin
        // trimmed to the data).
        let (lo, hi) = values
            .iter()
            .fold((f64::MAX, f64::MIN), |(a, b), v| (a.min(*v), b.max(*v)));
        assert_eq!((ys[0], ys[ys.len() - 1]), (lo, hi));
        kde_request.push(json!({"values": bits(&values), "rule": "silverman", "grid": bits(&ys)}));
        quartile_request.push(json!({"values": bits(&values)}));
        assert_eq!(summary.value("violin", "", drug, "n"), 10.0);
    }
    let kde = reference("kde", Value::Array(kde_request));
    let quartiles = reference("quartiles", Value::Array(quartile_request));
    let largest = marks
        .iter()
        .flat_map(|v| &v.outline)
        .map(|p| p.1)
        .fold(0.0, f64::max);
    assert_eq!(data.width_peak, largest, "one width scale for every violin");
    for (slot, drug) in ["A", "B"].iter().enumerate() {
        let violin = marks.iter().find(|v| v.x == slot).unwrap();
        // Bandwidth: Silverman's rule restated in numpy.
        rel(
            summary.value("violin", "", drug, "bandwidth"),
            number(&kde[slot]["bandwidth"]),
            1e-12,
            &format!("violin {drug} bandwidth"),
        );
        // Quartiles: numpy.quantile(method="linear"), Hyndman & Fan definition 7.
        for (i, stat) in ["q1", "median", "q3"].iter().enumerate() {
            let expected = number(&quartiles[slot][i]);
            rel(
                summary.value("violin", "", drug, stat),
                expected,
                1e-12,
                stat,
            );
        }
        assert_eq!(violin.median, summary.value("violin", "", drug, "median"));
        // Outline: scipy.stats.gaussian_kde at the outline's own y values.
        let expected: Vec<f64> = kde[slot]["density"]
            .as_array()
            .unwrap()
            .iter()
            .map(number)
            .collect();
        for ((y, d), e) in violin.outline.iter().zip(&expected) {
            close(
                *d,
                *e,
                1e-9,
                largest,
                &format!("violin {drug} density at {y}"),
            );
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Flows: a small fixture counted by hand.

const VISITS_BOOK: &str = r#"
data visits "visits.csv" {
  subject_id: id
  visit: ordinal levels("v1", "v2", "v3")
  state: ordinal levels("low", "mid", "high")
  subject subject_id
  within visit
}
"#;

/// Seven subjects at three visits. S5 has no row at v2; S7's state at v2 is missing.
const VISITS_CSV: &str = "subject_id,visit,state
S1,v1,low
S1,v2,low
S1,v3,mid
S2,v1,low
S2,v2,mid
S2,v3,mid
S3,v1,mid
S3,v2,mid
S3,v3,high
S4,v1,high
S4,v2,mid
S4,v3,low
S5,v1,mid
S5,v3,mid
S6,v1,high
S6,v2,high
S6,v3,high
S7,v1,low
S7,v2,
S7,v3,low
";

fn flows_project(extra: &str, csv: &str) -> Project {
    Project::new(
        &format!(
            "{VISITS_BOOK}
figure moves {{
  from visits
  x visit
  y state
  {extra}
  flows by(subject_id)
}}
"
        ),
        &[("visits.csv", csv)],
    )
}

/// (x, group, count) rows of the `flows` layer's `count` stat, in file order.
fn flow_counts(summary: &Summary) -> Vec<(String, String, f64)> {
    summary
        .0
        .iter()
        .filter(|r| r.layer == "flows" && r.stat == "count")
        .map(|r| (r.x.clone(), r.group.clone(), r.value.parse().unwrap()))
        .collect()
}

fn expect_counts(summary: &Summary, expected: &[(&str, &str, f64)]) {
    let found = flow_counts(summary);
    let expected: Vec<(String, String, f64)> = expected
        .iter()
        .map(|(x, g, n)| (x.to_string(), g.to_string(), *n))
        .collect();
    assert_eq!(found, expected);
}

#[test]
fn flows_match_a_hand_counted_cross_tabulation() {
    let project = flows_project("", VISITS_CSV);
    project.build();
    let summary = project.summary("moves");
    // Hand counts from VISITS_CSV.
    // v1: low = S1 S2 S7, mid = S3 S5, high = S4 S6.
    // v2: low = S1, mid = S2 S3 S4, high = S6 (S5 absent, S7 missing).
    // v3: low = S4 S7, mid = S1 S2 S5, high = S3 S6.
    // v1->v2, subjects seen at both: S1 low->low, S2 low->mid, S3 mid->mid, S4 high->mid,
    //   S6 high->high.
    // v2->v3: S1 low->mid, S2 mid->mid, S3 mid->high, S4 mid->low, S6 high->high.
    expect_counts(
        &summary,
        &[
            ("v1", "low", 3.0),
            ("v1", "mid", 2.0),
            ("v1", "high", 2.0),
            ("v2", "low", 1.0),
            ("v2", "mid", 3.0),
            ("v2", "high", 1.0),
            ("v3", "low", 2.0),
            ("v3", "mid", 3.0),
            ("v3", "high", 2.0),
            ("v1->v2", "low->low", 1.0),
            ("v1->v2", "low->mid", 1.0),
            ("v1->v2", "low->high", 0.0),
            ("v1->v2", "mid->low", 0.0),
            ("v1->v2", "mid->mid", 1.0),
            ("v1->v2", "mid->high", 0.0),
            ("v1->v2", "high->low", 0.0),
            ("v1->v2", "high->mid", 1.0),
            ("v1->v2", "high->high", 1.0),
            ("v2->v3", "low->low", 0.0),
            ("v2->v3", "low->mid", 1.0),
            ("v2->v3", "low->high", 0.0),
            ("v2->v3", "mid->low", 1.0),
            ("v2->v3", "mid->mid", 1.0),
            ("v2->v3", "mid->high", 1.0),
            ("v2->v3", "high->low", 0.0),
            ("v2->v3", "high->mid", 0.0),
            ("v2->v3", "high->high", 1.0),
        ],
    );
    // Seven subjects; one missing state (S7 at v2).
    assert_eq!(summary.value("flows", "", "", "n"), 7.0);
    assert_eq!(summary.value("flows", "", "", "n_missing"), 1.0);
    assert_eq!(summary.value("flows", "", "v2", "n"), 5.0);
    assert_eq!(summary.value("flows", "", "v2", "n_missing"), 1.0);
    assert_eq!(summary.value("flows", "", "v3", "n"), 7.0);
    let data = project.figure_data("moves");
    let LayerMarks::Flows(_) = layer(&data, 0, 0) else {
        panic!("no flows")
    };
    assert_eq!(data.width_peak, 7.0, "the most subjects at any visit");
    assert_eq!(data.panels[0].n_by_x, [[7], [5], [7]]);
}

#[test]
fn flows_after_an_ordinal_filter_start_at_the_kept_visits() {
    let project = flows_project("where visit >= \"v2\"", VISITS_CSV);
    project.build();
    let summary = project.summary("moves");
    // The same hand counts as above, for v2 and v3 only.
    let counts = flow_counts(&summary);
    let xs: Vec<&str> = counts.iter().map(|c| c.0.as_str()).collect();
    assert!(
        xs.iter().all(|x| ["v2", "v3", "v2->v3"].contains(x)),
        "{xs:?}"
    );
    assert_eq!(summary.value("flows", "mid->low", "v2->v3", "count"), 1.0);
    assert_eq!(summary.value("flows", "mid", "v2", "count"), 3.0);
    assert_eq!(summary.value("flows", "", "", "n"), 7.0);
}

#[test]
fn flows_name_a_subject_with_two_states_at_one_visit() {
    let csv = format!("{VISITS_CSV}S2,v2,high\n");
    let project = flows_project("", &csv);
    let report = project.build_into("out");
    let (code, message) = only_error(&report);
    assert_eq!(code, "F0109");
    // S2's second row at v2 is the file's last line: data row 22 (the header is row 1).
    assert_eq!(
        message,
        "subject \"S2\" has more than one state at occasion \"v2\" (data rows 6 and 22)"
    );
    assert!(!project.out("out").join("moves.svg").exists());
}

#[test]
fn more_states_or_groups_than_colours_is_a_located_error() {
    // Nine states at two visits: the palette has eight colours (Okabe & Ito 2008).
    let csv: String = std::iter::once("subject_id,visit,state,score\n".to_string())
        .chain((1..=9).flat_map(|i| ["v1", "v2"].map(|v| format!("S{i},{v},state{i},{i}\n"))))
        .collect();
    let project = Project::new(
        r#"
data many "many.csv" {
  subject_id: id
  visit: ordinal levels("v1", "v2")
  state: nominal
  score: ratio
  subject subject_id
  within visit
}
figure moves { from many; x visit; y state; flows by(subject_id) }
figure coloured { from many; x score; y score; colour state; points }
"#,
        &[("many.csv", &csv)],
    );
    let report = project.build_into("out");
    let messages: Vec<(&str, &str)> = report
        .diagnostics
        .iter()
        .map(|d| (d.code.as_str(), d.message.as_str()))
        .collect();
    let expected = "`state` has 9 levels to tell apart by colour, more than the palette's 8";
    assert_eq!(messages, [("F0119", expected), ("F0119", expected)]);
}

// ---------------------------------------------------------------------------------------------
// Fit: NIST StRD Norris.

/// The (x, y) pairs of Norris.dat, from its data section (columns y then x).
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

#[test]
fn fit_matches_the_certified_values_of_nist_norris() {
    let pairs = norris();
    assert_eq!(pairs.len(), 36, "Norris has 36 observations");
    let csv: String = std::iter::once("x,y\n".to_string())
        .chain(pairs.iter().map(|(x, y)| format!("{x},{y}\n")))
        .collect();
    let project = Project::new(
        r#"
data norris "norris.csv" {
  x: ratio
  y: ratio
}
figure line { from norris; x x; y y; points; fit linear band(0.95) }
"#,
        &[("norris.csv", &csv)],
    );
    project.build();
    let summary = project.summary("line");
    // Certified values (NIST StRD, Norris): B0, B1 and R-squared.
    let (b0, b1, r2) = (-0.262323073774029, 1.00211681802045, 0.999993745883712);
    assert_eq!(summary.value("fit", "", "", "n"), 36.0);
    rel(
        summary.value("fit", "", "", "intercept"),
        b0,
        1e-12,
        "intercept",
    );
    rel(summary.value("fit", "", "", "slope"), b1, 1e-13, "slope");
    rel(
        summary.value("fit", "", "", "r").powi(2),
        r2,
        1e-13,
        "r squared",
    );
    // The band at each drawn x: ŷ ± t(0.975, 34) · s · √(1/n + (x − x̄)²/Sxx), with the certified
    // residual sd s and Sxx = (s / se(B1))² from the certified standard error of B1; the t
    // quantile from scipy.stats.t.ppf.
    let (s, se_b1): (f64, f64) = (0.884796396144373, 0.429796848199937e-03);
    let sxx = (s / se_b1).powi(2);
    let t = number(&reference("t", json!([[0.975, 34]]))[0]);
    let mean_x = pairs.iter().map(|p| p.0).sum::<f64>() / 36.0;
    let data = project.figure_data("line");
    let LayerMarks::Fit(fits) = layer(&data, 0, 1) else {
        panic!("no fit")
    };
    let fit = &fits[0];
    assert_eq!(fit.band.len(), fit.line.len());
    for ((x, low, high), (lx, fitted)) in fit.band.iter().zip(&fit.line) {
        assert_eq!(x, lx);
        rel(*fitted, b0 + b1 * x, 1e-11, "fitted value");
        let half = t * s * (1.0 / 36.0 + (x - mean_x).powi(2) / sxx).sqrt();
        // The certified s and se(B1) have 15 significant digits; the band is compared at 1e-9
        // of its half-width.
        close(
            (high - low) / 2.0,
            half,
            1e-9,
            half,
            &format!("band half-width at {x}"),
        );
    }
    let xs: Vec<f64> = fit.line.iter().map(|p| p.0).collect();
    let (lo, hi) = pairs
        .iter()
        .fold((f64::MAX, f64::MIN), |(a, b), p| (a.min(p.0), b.max(p.0)));
    assert_eq!(
        (xs[0], xs[xs.len() - 1]),
        (lo, hi),
        "the line spans the data's x range"
    );
}

#[test]
fn a_zero_on_a_log_axis_is_a_located_data_error() {
    let project = Project::new(
        r#"
data pairs "pairs.csv" {
  x: ratio
  y: ratio
}
figure logged { from pairs; x x; y y scale(log); points }
"#,
        &[("pairs.csv", "x,y\n1,2\n2,0\n3,5\n")],
    );
    let report = project.build_into("out");
    let codes: Vec<&str> = report.diagnostics.iter().map(|d| d.code.as_str()).collect();
    assert_eq!(codes, ["F0114"]);
    assert!(
        report.diagnostics[0].message.contains("data row 3"),
        "{}",
        report.diagnostics[0].message
    );
}

// ---------------------------------------------------------------------------------------------
// Repeated trials, filters and bootstrap intervals on numpy-drawn trial data.

const TRIALS_BOOK: &str = r#"
data trials "trials.csv" {
  subject: id
  condition: nominal levels("a", "b", "c")
  session: ordinal levels("first", "second", "third")
  trial: interval
  score: interval
  subject subject
  within condition, session
  REPLICATES
}
"#;

fn trial_csv(seed: u64) -> String {
    let answer = reference(
        "trials",
        json!({
            "seed": seed,
            "subjects": 12,
            "conditions": ["a", "b", "c"],
            "sessions": ["first", "second", "third"],
            "trials": 4,
        }),
    );
    answer["csv"].as_str().unwrap().to_string()
}

fn trials_project(replicates: &str, figures: &str, csv: &str) -> Project {
    Project::new(
        &format!("{}{figures}", TRIALS_BOOK.replace("REPLICATES", replicates)),
        &[("trials.csv", csv)],
    )
}

/// Checks a `mean error(ci(0.95, within))` summary against the numpy reference.
fn check_collapsed(summary: &Summary, csv: &str, collapse: &str, sessions: &[&str]) {
    let expected = reference(
        "collapse",
        json!({
            "csv": csv,
            "collapse": collapse,
            "conditions": ["a", "b", "c"],
            "sessions": sessions,
            "level": 0.95,
        }),
    );
    for (j, cond) in ["a", "b", "c"].iter().enumerate() {
        // One value per subject and cell: n counts the 12 subjects, never their trials.
        assert_eq!(summary.value("mean", "", cond, "n"), 12.0);
        assert_eq!(summary.value("points", "", cond, "n"), 12.0);
        // numpy mean of the per-subject values; Cousineau-Morey restated in numpy with the
        // scipy t quantile.
        let mean = number(&expected["means"][j]);
        let half = number(&expected["half_widths"][j]);
        rel(summary.value("mean", "", cond, "mean"), mean, 1e-12, "mean");
        rel(
            summary.value("mean", "", cond, "ci_low"),
            mean - half,
            1e-12,
            "ci_low",
        );
        rel(
            summary.value("mean", "", cond, "ci_high"),
            mean + half,
            1e-12,
            "ci_high",
        );
    }
}

const WITHIN_FIGURE: &str = r#"
figure within {
  from trials
  x condition
  y score
  WHERE
  points
  lines by(subject)
  mean error(ci(0.95, within))
}
"#;

#[test]
fn repeated_trials_collapse_to_one_value_per_subject_as_numpy_does() {
    let csv = trial_csv(2024);
    for collapse in ["mean", "median"] {
        let project = trials_project(
            &format!("replicates trial collapse({collapse})"),
            &WITHIN_FIGURE.replace("WHERE", ""),
            &csv,
        );
        project.build();
        check_collapsed(
            &project.summary("within"),
            &csv,
            collapse,
            &["first", "second", "third"],
        );
    }
}

#[test]
fn per_subject_layers_without_replicates_name_the_subject_and_cell() {
    let csv = trial_csv(2024);
    let project = trials_project("", &WITHIN_FIGURE.replace("WHERE", ""), &csv);
    let report = project.build_into("out");
    let (code, message) = only_error(&report);
    assert_eq!(code, "F0109");
    // numpy's CSV lists S01's trials first: rows 2 and 3 of the file are its first two trials
    // in condition a.
    assert_eq!(
        message,
        "subject \"S01\" has more than one value in cell (x = \"a\") (data rows 2 and 3)"
    );
}

#[test]
fn filters_on_an_ordinal_follow_its_level_order() {
    let csv = trial_csv(77);
    let filters = [
        "where session >= \"second\"",
        "where session > \"first\"",
        "where not (session == \"first\")",
        "where session in (\"second\", \"third\")",
        "where session != \"first\" and (condition == \"a\" or condition != \"a\")",
    ];
    let figures: String = filters
        .iter()
        .enumerate()
        .map(|(i, f)| {
            WITHIN_FIGURE
                .replace("figure within", &format!("figure within_{i}"))
                .replace("WHERE", f)
        })
        .collect();
    let project = trials_project("replicates trial collapse(mean)", &figures, &csv);
    project.build();
    let first = project.summary("within_0");
    // The kept sessions, collapsed per subject and condition, against numpy.
    check_collapsed(&first, &csv, "mean", &["second", "third"]);
    for (i, filter) in filters.iter().enumerate().skip(1) {
        assert_eq!(
            project.summary(&format!("within_{i}")).0,
            first.0,
            "{filter}"
        );
    }
    // A filter on x itself leaves only the kept levels on the axis.
    let project = trials_project(
        "replicates trial collapse(mean)",
        r#"
figure sessions { from trials; x session; y score; where session <= "second"; points }
"#,
        &csv,
    );
    project.build();
    assert_eq!(
        project.summary("sessions").xs("points", "n"),
        ["first", "second"]
    );
}

#[test]
fn bootstrap_intervals_match_a_restated_percentile_bootstrap() {
    let csv = trial_csv(5);
    let project = trials_project(
        "replicates trial collapse(mean)",
        r#"
figure boot {
  from trials
  x condition
  y score
  points
  mean error(boot(0.95))
  median error(boot(0.9))
}
"#,
        &csv,
    );
    project.build();
    let summary = project.summary("boot");
    let per_subject = reference(
        "collapse",
        json!({"csv": csv, "collapse": "mean", "conditions": ["a", "b", "c"],
               "sessions": ["first", "second", "third"], "level": 0.95}),
    );
    let mut request = Vec::new();
    for j in 0..3 {
        // The cell's values in ascending order, as Figura resamples them.
        let mut values: Vec<f64> = per_subject["subject_values"][j]
            .as_array()
            .unwrap()
            .iter()
            .map(number)
            .collect();
        values.sort_by(f64::total_cmp);
        // Seed and resamples documented in src/stats/bootstrap.rs (DEFAULT_SEED, 2000).
        for (statistic, level) in [("mean", 0.95), ("median", 0.9)] {
            request.push(json!({"values": bits(&values), "statistic": statistic,
                                "level": level, "seed": 0x5EED_0F16_0000_0001u64,
                                "resamples": 2000}));
        }
    }
    let expected = reference("bootstrap", Value::Array(request));
    for (j, cond) in ["a", "b", "c"].iter().enumerate() {
        for (k, layer_name) in ["mean", "median"].iter().enumerate() {
            let e = &expected[2 * j + k];
            // Efron & Tibshirani (1993) percentile interval, restated with numpy quantiles.
            rel(
                summary.value(layer_name, "", cond, "ci_low"),
                number(&e[0]),
                1e-9,
                "low",
            );
            rel(
                summary.value(layer_name, "", cond, "ci_high"),
                number(&e[1]),
                1e-9,
                "high",
            );
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Histogram densities and PDF output.

#[test]
fn density_heights_integrate_to_one_and_match_numpy() {
    let project = sleep_project(
        r#"
figure heights { from sleep; x extra_hours; histogram width(0.5) heights(density) }
"#,
    );
    project.build();
    let summary = project.summary("heights");
    let bins: Vec<(f64, f64, f64)> = summary
        .0
        .iter()
        .filter(|r| r.layer == "histogram" && r.stat == "density")
        .map(|r| {
            let inner = r.x.trim_start_matches('[').trim_end_matches([')', ']']);
            let (lo, hi) = inner.split_once(',').unwrap();
            (
                lo.parse().unwrap(),
                hi.parse().unwrap(),
                r.value.parse().unwrap(),
            )
        })
        .collect();
    let total: f64 = bins.iter().map(|(lo, hi, d)| d * (hi - lo)).sum();
    close(total, 1.0, 1e-12, 1.0, "bars integrate to one");
    for (lo, hi, _) in &bins {
        close(hi - lo, 0.5, 1e-12, 1.0, "the width asked for");
        close(
            (lo / 0.5).round() * 0.5,
            *lo,
            1e-12,
            1.0,
            "edges at multiples of the width",
        );
    }
    let mut edges: Vec<f64> = bins.iter().map(|b| b.0).collect();
    edges.push(bins[bins.len() - 1].1);
    // numpy.histogram(density=True) with the same edges.
    let expected = reference(
        "histogram",
        json!([{"values": bits(&sleep_values(None)), "edges": bits(&edges)}]),
    );
    for ((lo, _, d), e) in bins.iter().zip(expected[0].as_array().unwrap()) {
        rel(*d, number(e), 1e-12, &format!("density of the bin at {lo}"));
    }
}

/// The `/MediaBox [x0 y0 x1 y1]` of a one-page PDF.
fn media_box(pdf: &[u8]) -> [f64; 4] {
    let text = String::from_utf8_lossy(pdf);
    let start = text.find("/MediaBox").expect("a MediaBox") + "/MediaBox".len();
    let open = start + text[start..].find('[').unwrap() + 1;
    let close = open + text[open..].find(']').unwrap();
    let v: Vec<f64> = text[open..close]
        .split_whitespace()
        .map(|t| t.parse().unwrap())
        .collect();
    [v[0], v[1], v[2], v[3]]
}

#[test]
fn pdf_pages_are_the_figure_size_and_identical_across_builds() {
    let project = sleep_project(
        r#"
figure paper { from sleep; x drug; y extra_hours; violin; points; size 120mm x 70mm; formats pdf }
"#,
    );
    for folder in ["one", "two"] {
        let report = project.build_into(folder);
        assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    }
    let read = |folder: &str| std::fs::read(project.out(folder).join("paper.pdf")).unwrap();
    let (one, two) = (read("one"), read("two"));
    assert!(one.starts_with(b"%PDF-"));
    assert!(one == two, "the PDFs of two builds differ");
    assert!(
        !project.out("one").join("paper.png").exists(),
        "only the PDF was asked for"
    );
    // 1 in = 25.4 mm = 72 pt (common practice).
    let [x0, y0, x1, y1] = media_box(&one);
    close(x1 - x0, 120.0 / 25.4 * 72.0, 1e-3, 1.0, "page width in pt");
    close(y1 - y0, 70.0 / 25.4 * 72.0, 1e-3, 1.0, "page height in pt");
}

// ---------------------------------------------------------------------------------------------
// Issue 9's fixes, each with the numbers it got wrong (every check failed before its fix).

const RATINGS_BOOK: &str = r#"
data ratings "ratings.csv" {
  rater: id
  trial: ratio
  task: nominal levels("easy")
  effort: ordinal levels(1, 2, 3, 4, 5)
  subject rater
  replicates trial collapse(COLLAPSE)
}

figure effort {
  from ratings
  x task
  y effort
  median
}
"#;

/// R1 rated 1 and 5; R2 rated 2, 3 and 3; R3 rated 4 once.
const RATINGS_CSV: &str = "rater,trial,task,effort
R1,1,easy,1
R1,2,easy,5
R2,1,easy,2
R2,2,easy,3
R2,3,easy,3
R3,1,easy,4
";

#[test]
fn ordinal_trials_collapse_to_a_level_some_trial_had() {
    // Hand derivation with Hyndman & Fan definition 1 (the first level whose cumulative
    // proportion reaches 1/2): R1's trials 1, 5 give 1 (1/2 of them at or below 1), not 3;
    // R2's 2, 3, 3 give 3; R3's single 4 gives 4. Across the three raters, 1, 3, 4: the median
    // is 3 (2/3 ≥ 1/2), the first quartile 1 (1/3 ≥ 1/4), the third 4. Both `collapse` words
    // give the same levels: a mean of levels is not defined, so ordinal trials always collapse
    // to their median level.
    for collapse in ["median", "mean"] {
        let project = Project::new(
            &RATINGS_BOOK.replace("COLLAPSE", collapse),
            &[("ratings.csv", RATINGS_CSV)],
        );
        project.build();
        let summary = project.summary("effort");
        assert_eq!(summary.value("median", "", "easy", "n"), 3.0, "{collapse}");
        assert_eq!(
            summary.value("median", "", "easy", "median"),
            3.0,
            "{collapse}"
        );
        assert_eq!(summary.value("median", "", "easy", "q1"), 1.0, "{collapse}");
        assert_eq!(summary.value("median", "", "easy", "q3"), 4.0, "{collapse}");
    }
}

#[test]
fn flows_count_a_row_without_an_occasion_in_its_own_panel_only() {
    let book = r#"
data clinic "clinic.csv" {
  patient: id
  site: nominal levels("north", "south")
  visit: ordinal levels("v1", "v2")
  state: nominal levels("well", "ill")
  subject patient
  within visit
}

figure moves {
  from clinic
  x visit
  y state
  panels site
  flows by(patient)
}
"#;
    // North: P1 and P2 at both visits, plus P3 with no visit (row 6). South: P4 at both
    // visits. P5 has no site (row 9): it is in no panel and counts nowhere.
    let csv = "patient,site,visit,state
P1,north,v1,well
P1,north,v2,ill
P2,north,v1,ill
P2,north,v2,ill
P3,north,,well
P4,south,v1,well
P4,south,v2,well
P5,,v1,ill
";
    let project = Project::new(book, &[("clinic.csv", csv)]);
    project.build();
    let summary = project.summary("moves");
    assert_eq!(summary.get("north", "flows", "", "", "n"), 2.0);
    assert_eq!(summary.get("north", "flows", "", "", "n_missing"), 1.0);
    assert_eq!(summary.get("south", "flows", "", "", "n"), 1.0);
    assert_eq!(summary.get("south", "flows", "", "", "n_missing"), 0.0);
}

#[test]
fn a_histogram_group_all_on_the_grid_s_last_edge_keeps_its_bar() {
    // A ceiling effect: group `top` scored 100 every time, the most of anyone, so its values
    // lie on the last edge of the shared grid (width 10: edges 0, 10, ..., 100). The last bin
    // is closed, [90,100], and holds them.
    let spec = r#"
data scores "scores.csv" {
  pupil: id
  class: nominal levels("mixed", "top")
  score: ratio
}

figure scores {
  from scores
  x score
  colour class
  histogram width(10)
}
"#;
    let csv =
        "pupil,class,score\nA,mixed,5\nB,mixed,42\nC,mixed,100\nD,top,100\nE,top,100\nF,top,100\n";
    let project = Project::new(spec, &[("scores.csv", csv)]);
    project.build();
    let summary = project.summary("scores");
    assert_eq!(summary.value("histogram", "top", "", "n"), 3.0);
    assert_eq!(summary.value("histogram", "top", "[90,100]", "count"), 3.0);
    assert_eq!(
        summary.value("histogram", "mixed", "[90,100]", "count"),
        1.0
    );
    // Every value of every group is in a bar.
    for group in ["mixed", "top"] {
        let counted: f64 = summary
            .0
            .iter()
            .filter(|r| r.layer == "histogram" && r.group == group && r.stat == "count")
            .map(|r| r.value.parse::<f64>().unwrap())
            .sum();
        assert_eq!(
            counted,
            summary.value("histogram", group, "", "n"),
            "{group}"
        );
    }
    // A group whose largest value is an inner edge takes the bin starting there ([40,50) holds
    // 42; [100 is the last edge]): the bins are those of the shared grid.
    assert_eq!(summary.value("histogram", "mixed", "[40,50)", "count"), 1.0);
}

#[test]
fn a_violin_of_equal_values_reports_its_quartiles_and_draws_nothing() {
    let spec = r#"
data trays "trays.csv" {
  tray: id
  light: nominal levels("shade", "sun")
  height: ratio
}

figure heights {
  from trays
  x light
  y height
  violin
  points
}
"#;
    // Every shaded tray measured 5: the quartiles are 5, and no bandwidth rule has a spread.
    let csv =
        "tray,light,height\nT1,shade,5\nT2,shade,5\nT3,shade,5\nT4,sun,7\nT5,sun,9\nT6,sun,8\n";
    let project = Project::new(spec, &[("trays.csv", csv)]);
    project.build();
    let summary = project.summary("heights");
    for stat in ["q1", "median", "q3"] {
        assert_eq!(summary.value("violin", "", "shade", stat), 5.0, "{stat}");
    }
    assert!(!summary
        .0
        .iter()
        .any(|r| r.x == "shade" && r.stat == "bandwidth"));
    let data = project.figure_data("heights");
    let LayerMarks::Violin(violins) = layer(&data, 0, 0) else {
        panic!("no violins")
    };
    assert_eq!(violins.len(), 1, "only the sunny trays are drawn");
}

#[test]
fn every_finite_double_lays_out_with_readable_tick_labels() {
    // Values from the smallest subnormal to the largest double, of both signs, through a
    // scatter plot with a fit, a box plot and a histogram: every figure is drawn, or (when a
    // statistic is beyond the range of doubles) refused with F0123, never an internal error.
    let cases: [(&str, [f64; 5]); 7] = [
        ("big", [2e40, 3.5e40, 5e40, 1.2e41, 8e40]),
        ("tiny", [1e-30, 2.5e-30, 3e-30, 7e-30, 4.4e-30]),
        ("largest", [1e308, 1.5e308, 1.7e308, 1.2e308, 1.1e308]),
        ("mixed", [-3e40, 2e40, -1e40, 5e40, 0.5e40]),
        ("mixed_tiny", [-3e-30, 2e-30, -1e-30, 5e-30, 0.5e-30]),
        ("whole_range", [-1.7e308, 1.7e308, 0.0, 1.0, -1.0]),
        ("subnormal", [5e-324, 1e-320, 2e-322, 3e-321, 1e-319]),
    ];
    let mut spec = String::new();
    let mut files = Vec::new();
    for (name, values) in &cases {
        let mut csv = String::from("p,g,x,y\n");
        for (i, v) in values.iter().enumerate() {
            let w = values[(i + 1) % values.len()];
            csv.push_str(&format!("p{i},{},{v:e},{w:e}\n", ["a", "b"][i % 2]));
        }
        files.push((format!("{name}.csv"), csv));
        spec.push_str(&format!(
            "data {name} \"{name}.csv\" {{\n  p: id\n  g: nominal\n  x: interval\n  y: interval\n}}\n\
             figure {name}_scatter {{\n  from {name}\n  x x\n  y y\n  points\n  fit band(0.95)\n}}\n\
             figure {name}_box {{\n  from {name}\n  x g\n  y y\n  points\n  box\n}}\n\
             figure {name}_histogram {{\n  from {name}\n  x x\n  histogram\n}}\n"
        ));
    }
    let files: Vec<(&str, &str)> = files
        .iter()
        .map(|(n, c)| (n.as_str(), c.as_str()))
        .collect();
    let project = Project::new(&spec, &files);
    let report = project.build_into("out");
    assert!(
        report.failures.is_empty(),
        "internal errors: {:?}",
        report.failures
    );
    assert!(
        report.diagnostics.iter().all(|d| d.code == "F0123"),
        "{:#?}",
        report.diagnostics
    );
    assert!(
        report.count(build::FigureState::Built) >= 19,
        "{:?}",
        report.figures
    );
    // Tick labels of extreme magnitudes are short: scientific, with a superscript exponent.
    let data = project.figure_data("big_scatter");
    let figura::compute::XScale::Numbers(x) = &data.x else {
        panic!("numeric x")
    };
    let axis = figura::layout::NumAxisMap::new(x, 5);
    assert!(
        axis.labels.iter().all(|l| l.chars().count() <= 8),
        "{:?}",
        axis.labels
    );
    assert!(
        axis.labels.iter().any(|l| l.ends_with("10⁴⁰")),
        "{:?}",
        axis.labels
    );
}
