//! The `figura` binary as a user runs it: exit codes (0 success; 1 a spec or data error, or a
//! warning with `--deny-warnings`; 2 a bad command line or a path that cannot be read), JSON
//! diagnostics, `figura check` writing nothing, every error of a file in one run, and every
//! checker rule pointing at its line through the binary. Each test works in its own temporary
//! folder. The data are small invented tables.

mod common;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;

/// A temporary folder to run `figura` in.
struct Folder {
    dir: tempfile::TempDir,
}

/// What one run printed and returned.
struct Run {
    code: i32,
    stdout: String,
    stderr: String,
}

impl Run {
    /// The diagnostics of a `--message-format json` run: standard error must hold one JSON
    /// object per line and nothing else.
    fn json(&self) -> Vec<Value> {
        self.stderr
            .lines()
            .map(|line| {
                serde_json::from_str(line).unwrap_or_else(|e| {
                    panic!(
                        "stderr line is not JSON ({e}): {line}\nstderr:\n{}",
                        self.stderr
                    )
                })
            })
            .collect()
    }

    /// Code, line and column of every JSON diagnostic.
    fn places(&self) -> Vec<(String, u64, u64)> {
        self.json().iter().map(diagnostic_at).collect()
    }

    fn assert_code(&self, code: i32) -> &Run {
        assert_eq!(
            self.code, code,
            "exit status\n--- stdout\n{}\n--- stderr\n{}",
            self.stdout, self.stderr
        );
        self
    }
}

impl Folder {
    fn new() -> Folder {
        Folder {
            dir: tempfile::tempdir().unwrap(),
        }
    }

    fn path(&self, name: &str) -> PathBuf {
        self.dir.path().join(name)
    }

    fn write(&self, name: &str, contents: impl AsRef<[u8]>) -> &Folder {
        let path = self.path(name);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(path, contents).unwrap();
        self
    }

    fn run(&self, args: &[&str]) -> Run {
        let out = Command::new(env!("CARGO_BIN_EXE_figura"))
            .args(args)
            .current_dir(self.dir.path())
            .env("NO_COLOR", "1")
            .output()
            .expect("run figura");
        Run {
            code: out
                .status
                .code()
                .expect("figura exited normally, not by a signal"),
            stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
        }
    }

    /// Every file under the folder with its bytes (to see that nothing was written).
    fn snapshot(&self) -> BTreeMap<PathBuf, Vec<u8>> {
        fn walk(dir: &Path, out: &mut BTreeMap<PathBuf, Vec<u8>>) {
            for entry in std::fs::read_dir(dir).unwrap() {
                let path = entry.unwrap().path();
                if path.is_dir() {
                    walk(&path, out);
                } else {
                    out.insert(path.clone(), std::fs::read(&path).unwrap());
                }
            }
        }
        let mut out = BTreeMap::new();
        walk(self.dir.path(), &mut out);
        out
    }
}

/// An invented tasting study: three tasters rate a light and a dark roast.
const TASTING_CSV: &str = "taster,roast,score,bitterness\n\
T1,light,61,2\n\
T1,dark,55,4\n\
T2,light,70,3\n\
T2,dark,58,5\n\
T3,light,66,2\n\
T3,dark,49,4\n";

const CODEBOOK: &str = r#"data tasting "tasting.csv" {
  taster: id
  roast: nominal levels("light", "dark")
  score: ratio label("Score")
  bitterness: ordinal levels(1, 2, 3, 4, 5)
  subject taster
  within roast
}
"#;

/// A folder with the tasting data and `name.figura` = codebook + `figures`.
fn tasting(name: &str, figures: &str) -> Folder {
    let folder = Folder::new();
    folder
        .write("tasting.csv", TASTING_CSV)
        .write(&format!("{name}.figura"), format!("{CODEBOOK}\n{figures}"));
    folder
}

const GOOD_FIGURE: &str = "figure scores {
  from tasting
  x roast
  y score
  points jitter(0.2)
  box
}
";

/// Line and column (1-based) of the first occurrence of `needle` in `text`.
fn locate(text: &str, needle: &str) -> (u64, u64) {
    let at = text.find(needle).expect("the needle is in the text");
    let line = text[..at].matches('\n').count() + 1;
    let column = at - text[..at].rfind('\n').map_or(0, |i| i + 1) + 1;
    (line as u64, column as u64)
}

fn diagnostic_at(d: &Value) -> (String, u64, u64) {
    (
        d["code"].as_str().expect("a code").to_string(),
        d["line"].as_u64().expect("a line"),
        d["column"].as_u64().expect("a column"),
    )
}

#[test]
fn a_good_build_exits_0_and_writes_every_output() {
    let folder = tasting("good", GOOD_FIGURE);
    folder.run(&["build", "good.figura"]).assert_code(0);
    for file in ["scores.svg", "scores.png", "scores.summary.csv"] {
        assert!(folder.path("out").join(file).is_file(), "{file} written");
    }
    // `--out` puts them elsewhere.
    folder
        .run(&["build", "good.figura", "--out", "elsewhere"])
        .assert_code(0);
    assert!(folder.path("elsewhere/scores.svg").is_file());
}

#[test]
fn help_and_version_exit_0() {
    let folder = Folder::new();
    let help = folder.run(&["--help"]);
    help.assert_code(0);
    assert!(help.stdout.contains("build") && help.stdout.contains("check"));
    folder.run(&["--version"]).assert_code(0);
    folder.run(&["build", "--help"]).assert_code(0);
}

#[test]
fn a_bad_command_line_or_an_unreadable_path_exits_2() {
    let folder = tasting("good", GOOD_FIGURE);
    for args in [
        vec![],
        vec!["frobnicate"],
        vec!["build", "--no-such-flag", "good.figura"],
        vec!["build", "--message-format", "xml", "good.figura"],
        vec!["build", "missing.figura"],
        vec!["check", "missing-folder"],
        vec!["build", "good.figura", "missing.figura"],
    ] {
        let run = folder.run(&args);
        run.assert_code(2);
        assert!(!run.stderr.trim().is_empty(), "{args:?} says why");
    }
    // Nothing was built by the failed runs.
    assert!(!folder.path("out").exists());
}

#[test]
fn a_spec_error_exits_1_and_json_points_at_the_name() {
    let figures = GOOD_FIGURE.replace("y score", "y scor");
    let folder = tasting("bad", &figures);
    let run = folder.run(&["build", "bad.figura", "--message-format", "json"]);
    run.assert_code(1);
    let diags = run.json();
    assert_eq!(diags.len(), 1, "{}", run.stderr);
    let d = &diags[0];
    let text = format!("{CODEBOOK}\n{figures}");
    let (line, column) = locate(&text, "scor\n");
    assert_eq!(diagnostic_at(d), ("F0101".to_string(), line, column));
    assert_eq!(d["severity"], "error");
    assert!(d["file"].as_str().unwrap().ends_with("bad.figura"));
    assert!(d["message"].as_str().unwrap().contains("scor"));
    assert!(
        d["help"].as_str().unwrap().contains("score"),
        "did you mean"
    );
    assert!(!folder.path("out/scores.svg").exists());
}

#[test]
fn a_data_error_exits_1_and_names_the_file_row_and_column() {
    let folder = tasting("good", GOOD_FIGURE);
    // Row 4 of the file (the header is row 1) has a roast that is not a declared level.
    folder.write(
        "tasting.csv",
        TASTING_CSV.replace("T2,light,70", "T2,medium,70"),
    );
    let run = folder.run(&["check", "good.figura", "--message-format", "json"]);
    run.assert_code(1);
    let diags = run.json();
    assert_eq!(diags.len(), 1, "{}", run.stderr);
    let d = &diags[0];
    assert!(d["file"].as_str().unwrap().ends_with("tasting.csv"));
    assert_eq!(
        (d["line"].as_u64(), d["column"].as_u64()),
        (Some(4), Some(4))
    );
    let message = d["message"].as_str().unwrap();
    assert!(
        message.contains("row 4") && message.contains("roast") && message.contains("medium"),
        "{message}"
    );
}

#[test]
fn every_json_diagnostic_is_one_object_on_one_line_with_its_place() {
    // Three errors in one spec: each is one line of JSON with code, file, line and column.
    let figures = "figure a {
  from tasting
  x score
  counts
}

figure b {
  from tasting
  x bitterness order(count)
  counts
}

figure c {
  from tasting
  x roast
  y bitterness
  mean
}
";
    let folder = tasting("three", figures);
    let run = folder.run(&["check", "three.figura", "--message-format", "json"]);
    run.assert_code(1);
    let text = format!("{CODEBOOK}\n{figures}");
    let found = run.places();
    let (l1, c1) = locate(&text, "score\n  counts");
    let (l2, c2) = locate(&text, "order(count)");
    // A mean of an ordinal y is reported at the y variable.
    let (l3, c3) = locate(&text, "bitterness\n  mean");
    for expected in [
        ("F0103".to_string(), l1, c1),
        ("F0106".to_string(), l2, c2),
        ("F0104".to_string(), l3, c3),
    ] {
        assert!(
            found.contains(&expected),
            "{expected:?} not among {found:?}"
        );
    }
    for d in run.json() {
        for key in [
            "severity", "code", "message", "file", "line", "column", "labels",
        ] {
            assert!(d.get(key).is_some(), "{key} missing in {d}");
        }
    }
}

#[test]
fn every_error_of_a_file_is_reported_in_one_run() {
    // Errors in the codebook, in two figures and in one figure twice.
    let text = r#"data tasting "tasting.csv" {
  taster: id
  roast: nominal levels("light", "dark") labels("Light")
  score: ratio
  subject taster
}

figure a {
  from tasting
  x roast
  y score
  histogram
}

figure b {
  from tastings
  x roast
  counts
}

figure c {
  from tasting
  x roast
  y score
  mean bar error(ci(2))
  size 5000mm x 80mm
}
"#;
    let folder = Folder::new();
    folder
        .write("tasting.csv", TASTING_CSV)
        .write("all.figura", text);
    let run = folder.run(&["check", "all.figura", "--message-format", "json"]);
    run.assert_code(1);
    let codes: Vec<String> = run
        .json()
        .iter()
        .filter(|d| d["severity"] == "error")
        .map(|d| d["code"].as_str().unwrap().to_string())
        .collect();
    for code in ["F0210", "F0116", "F0206", "F0111", "F0213"] {
        assert!(
            codes.iter().any(|c| c == code),
            "{code} not reported; got {codes:?}"
        );
    }
    assert!(codes.len() >= 5);
}

#[test]
fn deny_warnings_turns_a_warning_into_exit_1() {
    // `mean` alone shows no spread (W0001): a warning, exit 0, the figure is built.
    let figures = "figure means {
  from tasting
  x roast
  y score
  mean
}
";
    let folder = tasting("warn", figures);
    let run = folder.run(&["build", "warn.figura", "--message-format", "json"]);
    run.assert_code(0);
    let diags = run.json();
    assert_eq!(diags.len(), 1);
    assert_eq!(diags[0]["severity"], "warning");
    assert_eq!(diags[0]["code"], "W0001");
    assert!(folder.path("out/means.svg").is_file());
    let run = folder.run(&["build", "warn.figura", "--deny-warnings", "--force"]);
    run.assert_code(1);
    assert!(run.stderr.contains("W0001"), "{}", run.stderr);
    folder
        .run(&["check", "warn.figura", "--deny-warnings"])
        .assert_code(1);
    folder.run(&["check", "warn.figura"]).assert_code(0);
}

#[test]
fn check_writes_nothing_whether_the_spec_is_good_or_bad() {
    let folder = tasting("good", GOOD_FIGURE);
    folder.write(
        "bad.figura",
        format!(
            "{CODEBOOK}\n{}",
            GOOD_FIGURE
                .replace("scores", "other")
                .replace("  box\n", "  box whiskers(long)\n")
        ),
    );
    let before = folder.snapshot();
    folder.run(&["check", "good.figura"]).assert_code(0);
    folder.run(&["check", "."]).assert_code(1);
    folder
        .run(&["check", "bad.figura", "--message-format", "json"])
        .assert_code(1);
    assert_eq!(before, folder.snapshot(), "figura check changed the folder");
    // The same good spec does write when built.
    folder.run(&["build", "good.figura"]).assert_code(0);
    assert_ne!(before, folder.snapshot());
}

#[test]
fn the_data_dependent_rules_point_at_their_layer() {
    // T1 has two light-roast rows, joined by `lines`: F0109 at the `lines` statement.
    let figures = "figure joined {
  from tasting
  x roast
  y score
  points
  lines by(taster)
}
";
    let folder = tasting("joined", figures);
    folder.write("tasting.csv", format!("{TASTING_CSV}T1,light,64,3\n"));
    let run = folder.run(&["build", "joined.figura", "--message-format", "json"]);
    run.assert_code(1);
    let text = format!("{CODEBOOK}\n{figures}");
    let (line, column) = locate(&text, "lines by");
    let diags = run.json();
    assert_eq!(diags.len(), 1, "{}", run.stderr);
    assert_eq!(
        diagnostic_at(&diags[0]),
        ("F0109".to_string(), line, column)
    );
    assert!(diags[0]["message"].as_str().unwrap().contains("\"T1\""));
}

/// `CODE line:col-line:col ...` lines of a checker case's expected file.
fn expected_places(expected: &str) -> Vec<(String, u64, u64)> {
    expected
        .lines()
        .filter(|l| !l.starts_with(' ') && !l.is_empty())
        .map(|l| {
            let mut words = l.split(' ');
            let code = words.next().unwrap().to_string();
            let place = words.next().unwrap();
            let start = place.split('-').next().unwrap();
            let (line, col) = start.split_once(':').unwrap();
            (code, line.parse().unwrap(), col.parse().unwrap())
        })
        .collect()
}

#[test]
fn every_rejected_checker_case_exits_1_and_points_at_the_same_place_through_the_binary() {
    // tests/check/err holds one rejected case per rule, with the expected code and place of
    // each diagnostic (tests/check.rs checks them through the library); the binary must report
    // the same code at the same line and column.
    let cases = common::files_with_ext(&common::root().join("tests/check/err"), "figura");
    assert!(cases.len() >= 30);
    let folder = Folder::new();
    for case in cases {
        let run = folder.run(&["check", case.to_str().unwrap(), "--message-format", "json"]);
        run.assert_code(1);
        let found = run.places();
        let expected =
            std::fs::read_to_string(case.with_extension("expected")).expect("an expected file");
        let places = expected_places(&expected);
        assert!(!places.is_empty(), "{}", case.display());
        for place in places {
            assert!(
                found.contains(&place),
                "{}: {place:?} not among {found:?}",
                case.display()
            );
        }
    }
}
