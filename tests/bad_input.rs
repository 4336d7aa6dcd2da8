//! Bad input never panics: malformed specs and data files, run through the `figura` binary,
//! give diagnostics and exit 1 (or exit 2 when a file cannot be read as text at all), never a
//! crash. Each case checks the exit status, that nothing panicked, and (with JSON messages)
//! the code and file of the first diagnostic. The tables are small invented ones.

use std::path::Path;
use std::process::Command;

use serde_json::Value;

/// A spec with one figure over `DATA` (the file name is replaced per case).
const SPEC: &str = r#"data trial "DATA" {
  missing("NA", "")
  runner: id
  shoe: nominal levels("road", "trail")
  time: ratio unit("s")
  subject runner
}

figure times {
  from trial
  x shoe
  y time
  points jitter(0.2)
  median
}
"#;

const GOOD_ROWS: &str = "R1,road,61.2\nR2,trail,64.0\nR3,road,58.9\nR4,trail,66.1\n";

struct Outcome {
    code: i32,
    stderr: String,
}

fn figura(dir: &Path, args: &[&str]) -> Outcome {
    let out = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("run figura");
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    // A panic prints "panicked at" and exits 101; a crash ends the process by a signal.
    assert!(
        !stderr.contains("panicked"),
        "figura panicked on {args:?}:\n{stderr}"
    );
    let code = out
        .status
        .code()
        .unwrap_or_else(|| panic!("figura was killed by a signal on {args:?}:\n{stderr}"));
    Outcome { code, stderr }
}

/// Writes the spec and a data file with these bytes, builds with JSON messages, and returns
/// the outcome and the diagnostics.
fn build_with_data(name: &str, data: &[u8]) -> (Outcome, Vec<Value>) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("spec.figura"), SPEC.replace("DATA", name)).unwrap();
    std::fs::write(dir.path().join(name), data).unwrap();
    let outcome = figura(
        dir.path(),
        &["build", "spec.figura", "--message-format", "json"],
    );
    let diags = json_lines(&outcome.stderr);
    (outcome, diags)
}

fn json_lines(stderr: &str) -> Vec<Value> {
    stderr
        .lines()
        .map(|l| serde_json::from_str(l).unwrap_or_else(|e| panic!("not JSON ({e}): {l}")))
        .collect()
}

/// Asserts exit 1 with a first error of `code` about `file`.
fn assert_rejected(case: &str, (outcome, diags): (Outcome, Vec<Value>), code: &str, file: &str) {
    assert_eq!(outcome.code, 1, "{case}: exit status\n{}", outcome.stderr);
    let first = diags
        .iter()
        .find(|d| d["severity"] == "error")
        .unwrap_or_else(|| panic!("{case}: no error reported"));
    assert_eq!(first["code"], code, "{case}: {first}");
    assert!(
        first["file"].as_str().unwrap_or("").ends_with(file),
        "{case}: the error names {file}: {first}"
    );
}

#[test]
fn an_empty_data_file_is_an_error_at_the_data_block() {
    assert_rejected(
        "empty",
        build_with_data("times.csv", b""),
        "D0005",
        "spec.figura",
    );
}

#[test]
fn a_header_without_rows_is_an_error() {
    assert_rejected(
        "header only",
        build_with_data("times.csv", b"runner,shoe,time\n"),
        "D0006",
        "times.csv",
    );
}

#[test]
fn ragged_rows_are_errors_naming_each_row() {
    let data = "runner,shoe,time\nR1,road\nR2,trail,64.0,extra\nR3,road,58.9\n";
    let result = build_with_data("times.csv", data.as_bytes());
    let ragged: Vec<u64> = result
        .1
        .iter()
        .filter(|d| d["code"] == "D0010")
        .map(|d| d["line"].as_u64().unwrap())
        .collect();
    assert_eq!(ragged, [2, 3], "both short and long rows, by line");
    assert_rejected("ragged", result, "D0010", "times.csv");
}

#[test]
fn a_data_file_that_is_not_utf8_is_an_error() {
    let mut data = b"runner,shoe,time\nR1,road,6".to_vec();
    data.extend([0xff, 0xfe]);
    data.extend(b"1.2\nR2,trail,64.0\n");
    assert_rejected(
        "not UTF-8",
        build_with_data("times.csv", &data),
        "D0003",
        "spec.figura",
    );
}

#[test]
fn a_byte_order_mark_is_read_as_nothing() {
    let mut data = "\u{feff}runner,shoe,time\n".as_bytes().to_vec();
    data.extend(GOOD_ROWS.as_bytes());
    let (outcome, diags) = build_with_data("times.csv", &data);
    assert_eq!(outcome.code, 0, "{}", outcome.stderr);
    assert!(diags.is_empty(), "{diags:?}");
}

#[test]
fn an_enormous_number_is_an_error_not_infinity() {
    let data = format!("runner,shoe,time\n{GOOD_ROWS}R5,road,1e999\n");
    let result = build_with_data("times.csv", data.as_bytes());
    // Row 6 of the file (header = row 1), column 3 where the number starts.
    let d = &result.1[0];
    assert_eq!(
        (d["line"].as_u64(), d["column"].as_u64()),
        (Some(6), Some(9))
    );
    assert_rejected("1e999", result, "D0013", "times.csv");
}

#[test]
fn a_negative_value_of_a_ratio_variable_is_an_error() {
    let data = format!("runner,shoe,time\n{GOOD_ROWS}R5,road,-3\n");
    let (outcome, diags) = build_with_data("times.csv", data.as_bytes());
    assert_eq!(outcome.code, 1);
    assert!(diags
        .iter()
        .any(|d| d["file"].as_str().unwrap_or("").ends_with("times.csv") && d["line"] == 6));
}

#[test]
fn a_tab_separated_file_with_commas_is_read_by_its_extension() {
    // `.tsv` is tab separated; commas inside a cell are plain text (here in an id).
    let data = "runner\tshoe\ttime\nR1,a\troad\t61.2\nR2\ttrail\t64.0\nR3\troad\t58.9\n";
    let (outcome, diags) = build_with_data("times.tsv", data.as_bytes());
    assert_eq!(outcome.code, 0, "{}", outcome.stderr);
    assert!(diags.is_empty());
}

/// Builds one spec text (with good data beside it) and returns the outcome.
fn build_spec(spec: &[u8]) -> (Outcome, tempfile::TempDir) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("spec.figura"), spec).unwrap();
    std::fs::write(
        dir.path().join("times.csv"),
        format!("runner,shoe,time\n{GOOD_ROWS}"),
    )
    .unwrap();
    let outcome = figura(
        dir.path(),
        &["build", "spec.figura", "--message-format", "json"],
    );
    (outcome, dir)
}

fn spec_with(figure_lines: &str) -> String {
    SPEC.replace("DATA", "times.csv")
        .replace("  median\n", &format!("  median\n{figure_lines}"))
}

#[test]
fn an_empty_spec_builds_nothing_and_succeeds() {
    // A spec holds any number of blocks, zero included.
    let (outcome, dir) = build_spec(b"");
    assert_eq!(outcome.code, 0, "{}", outcome.stderr);
    assert!(!dir.path().join("out").join("times.svg").exists());
}

#[test]
fn a_huge_figure_size_is_an_error_at_the_size() {
    for size in [
        "size 100000mm x 80mm",
        "size 85mm x 1e300mm",
        "size 0mm x 80mm",
    ] {
        let (outcome, _dir) = build_spec(spec_with(&format!("  {size}\n")).as_bytes());
        assert_eq!(outcome.code, 1, "{size}: {}", outcome.stderr);
        let diags = json_lines(&outcome.stderr);
        assert!(
            diags
                .iter()
                .any(|d| d["code"] == "F0213" || d["code"] == "F0204"),
            "{size}: {diags:?}"
        );
    }
}

#[test]
fn a_huge_dpi_is_an_error() {
    let (outcome, _dir) = build_spec(spec_with("  dpi 1000000\n").as_bytes());
    assert_eq!(outcome.code, 1, "{}", outcome.stderr);
}

#[test]
fn enormous_numbers_in_a_spec_are_errors() {
    for line in [
        "  dpi 1e999",
        "  size 1e999mm x 80mm",
        "  where time > 1e999",
    ] {
        let (outcome, _dir) = build_spec(spec_with(&format!("{line}\n")).as_bytes());
        assert_eq!(outcome.code, 1, "{line}: {}", outcome.stderr);
    }
}

#[test]
fn deep_nesting_is_an_error_not_a_stack_overflow() {
    let open = "(".repeat(20_000);
    let close = ")".repeat(20_000);
    let filter = format!("  where {open}shoe == \"road\"{close}\n");
    let (outcome, _dir) = build_spec(spec_with(&filter).as_bytes());
    assert_eq!(outcome.code, 1, "{}", outcome.stderr);
    let (outcome, _dir) = build_spec("{".repeat(200_000).as_bytes());
    assert_eq!(outcome.code, 1);
    let nots = format!("  where {}shoe == \"road\"\n", "not ".repeat(50_000));
    let (outcome, _dir) = build_spec(spec_with(&nots).as_bytes());
    assert!(outcome.code == 0 || outcome.code == 1, "{}", outcome.stderr);
}

#[test]
fn garbage_specs_give_syntax_errors() {
    for text in [
        "figure",
        "figure f {",
        "data d \"times.csv\" { runner: id",
        "}}}}",
        "figure f { from trial x shoe counts }",
        "\"unterminated",
        "figure f {\n  title \"a\\q\"\n}\n",
        "\u{0}\u{1}\u{2}",
    ] {
        let (outcome, _dir) = build_spec(text.as_bytes());
        assert_eq!(outcome.code, 1, "{text:?}: {}", outcome.stderr);
        assert!(
            !json_lines(&outcome.stderr).is_empty(),
            "{text:?} gave no diagnostic"
        );
    }
}

#[test]
fn a_spec_that_is_not_utf8_is_refused_with_its_name() {
    // The spec cannot be read as text: a diagnostic of that file (F0222, exit 1) that names
    // it and the offset of the first bad byte, not a crash.
    let (outcome, _dir) = build_spec(b"figure f {\n  title \"\xff\xfe\"\n}\n");
    assert_eq!(outcome.code, 1, "{}", outcome.stderr);
    assert!(outcome.stderr.contains("F0222"), "{}", outcome.stderr);
    assert!(outcome.stderr.contains("spec.figura"), "{}", outcome.stderr);
    assert!(outcome.stderr.contains("offset 20"), "{}", outcome.stderr);
}

#[test]
fn a_spec_path_that_is_a_folder_without_specs_builds_nothing() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir(dir.path().join("empty")).unwrap();
    let outcome = figura(dir.path(), &["build", "empty"]);
    assert_eq!(outcome.code, 0, "{}", outcome.stderr);
}

#[test]
fn an_error_past_character_65535_of_a_line_is_shown_cut() {
    // Regression: the renderer used to panic ("Formatting argument out of range") when a
    // label sat past character 65 535 of its line. A spec line, a data row and `fmt --check`.
    let dir = tempfile::tempdir().unwrap();
    let long_spec = format!("figure f {{ {} @ }}\n", "x".repeat(70_000));
    std::fs::write(dir.path().join("long.figura"), &long_spec).unwrap();
    for args in [
        &["check", "long.figura"][..],
        &["fmt", "--check", "long.figura"],
    ] {
        let outcome = figura(dir.path(), args);
        assert_eq!(outcome.code, 1, "{args:?}: {}", outcome.stderr);
        assert!(outcome.stderr.contains("F0014"), "{}", outcome.stderr);
        assert!(
            outcome.stderr.contains("long.figura:1:70013"),
            "{}",
            outcome.stderr
        );
        assert!(
            outcome.stderr.len() < 2_000,
            "the line is cut: {}",
            outcome.stderr
        );
    }

    // 12 000 columns: the bad value sits past character 65 535 of row 2.
    let n = 12_000;
    let header: Vec<String> = (0..n).map(|i| format!("c{i}")).collect();
    let mut row: Vec<String> = (0..n).map(|i| format!("{i}.5")).collect();
    row[n - 1] = "oops".to_string();
    let data = format!("{}\n{}\n", header.join(","), row.join(","));
    std::fs::write(dir.path().join("wide.csv"), data).unwrap();
    let last = format!("c{}", n - 1);
    let spec = format!(
        "data wide \"wide.csv\" {{\n  {last}: ratio\n}}\nfigure w {{\n  from wide\n  x {last}\n  histogram\n}}\n"
    );
    std::fs::write(dir.path().join("wide.figura"), spec).unwrap();
    let outcome = figura(dir.path(), &["check", "wide.figura"]);
    assert_eq!(outcome.code, 1, "{}", outcome.stderr);
    assert!(outcome.stderr.contains("D0012"), "{}", outcome.stderr);
    assert!(outcome.stderr.contains("oops"), "{}", outcome.stderr);
    assert!(
        outcome.stderr.len() < 3_000,
        "the row is cut: {}",
        outcome.stderr
    );
}

#[test]
fn thousands_of_bad_statements_give_a_short_report() {
    // Regression: 5 000 unknown statements on one line printed the whole line 5 000 times
    // (hundreds of MB). Now: 100 diagnostics of a file in full, then one F0223 counting the
    // rest, each line cut to a window around its label.
    let many = "pionts; ".repeat(5_000);
    let (outcome, _dir) = build_spec(spec_with(&format!("  {many}\n")).as_bytes());
    assert_eq!(outcome.code, 1);
    let diags = json_lines(&outcome.stderr);
    assert_eq!(diags.len(), 101, "{}", &outcome.stderr[..2_000]);
    let last = &diags[100];
    assert_eq!(last["code"], "F0223");
    assert_eq!(
        last["message"],
        "spec.figura: 4900 more problems not shown (F0201: 4900)"
    );
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("spec.figura"),
        spec_with(&format!("  {many}\n")),
    )
    .unwrap();
    std::fs::write(
        dir.path().join("times.csv"),
        format!("runner,shoe,time\n{GOOD_ROWS}"),
    )
    .unwrap();
    let human = figura(dir.path(), &["check", "spec.figura"]);
    assert!(human.stderr.len() < 100_000, "{} bytes", human.stderr.len());
}

#[test]
fn a_long_chain_of_includes_is_an_error_about_includes() {
    // Regression: 3 000 files including each other ran the parser out of stack, and the
    // error talked about parentheses. Now a chain longer than 32 files is F0224.
    let dir = tempfile::tempdir().unwrap();
    for i in 0..40 {
        std::fs::write(
            dir.path().join(format!("f{i}.figura")),
            format!("include \"f{}.figura\"\n", i + 1),
        )
        .unwrap();
    }
    std::fs::write(dir.path().join("f40.figura"), "").unwrap();
    let outcome = figura(
        dir.path(),
        &["check", "f0.figura", "--message-format", "json"],
    );
    assert_eq!(outcome.code, 1, "{}", outcome.stderr);
    let diags = json_lines(&outcome.stderr);
    assert_eq!(diags.len(), 1, "{}", outcome.stderr);
    assert_eq!(diags[0]["code"], "F0224");
    assert_eq!(
        diags[0]["file"], "f31.figura",
        "the 32nd file names one more"
    );
    assert!(!outcome.stderr.contains("parenthes"), "{}", outcome.stderr);
}
