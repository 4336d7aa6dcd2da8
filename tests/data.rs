//! Tests of the `data` stage: reading a CSV/TSV file into a typed table and every data error
//! (D0001–D0016) with its exact message, row, column, value and span.
//!
//! Test data: Student (1908), "The probable error of a mean", Biometrika 6(1): 1–25, the
//! additional hours of sleep of 10 patients under two drugs (tests/data_files/README.md).
//! Error cases are small edits of that table, named in each test.

use std::path::{Path, PathBuf};

use figura::data::{
    parse_table, parse_table_with, read_table, read_table_with, CellRange, Column, ColumnKind,
    ColumnSpec, DecimalMark, FileFormat, ReadLimits, Separator, Table, TableSpec, TextFormat,
    WorkbookFormat, MAX_FILE_BYTES,
};
use figura::diag::{Code, Diagnostic, SourceMap, Span};

const SLEEP_FILE: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/data_files/student1908-sleep.csv"
);

/// The spec text the column declarations' spans point into.
const SLEEP_SPEC: &str = r#"data sleep "student1908-sleep.csv" {
  patient: id
  drug: nominal levels("A", "B")
  extra_hours: ratio
}
"#;

fn sleep_text() -> String {
    std::fs::read_to_string(SLEEP_FILE).expect("fixture file is readable")
}

/// The fixture with file row `row` (header = 1) replaced by `line`; the fixture has no quoted
/// line breaks, so rows and lines agree.
fn edit_row(text: &str, row: usize, line: &str) -> String {
    let mut lines: Vec<&str> = text.lines().collect();
    lines[row - 1] = line;
    lines.join("\n") + "\n"
}

/// A spec and the source map holding its text.
struct Setup {
    sources: SourceMap,
    spec: TableSpec,
}

fn span_in(sources: &SourceMap, id: figura::diag::SourceId, needle: &str) -> Span {
    let start = sources.text(id).find(needle).expect("needle in spec text");
    Span::new(id, start, start + needle.len())
}

/// Builds a spec whose path is `path` and whose columns are `(name, header, kind)`; the
/// declaration spans point at `name:` in `spec_text` (or at the path when absent).
fn setup(spec_text: &str, path: impl Into<PathBuf>, columns: &[(&str, &str, ColumnKind)]) -> Setup {
    let mut sources = SourceMap::new();
    let id = sources.add("test.figura", spec_text);
    let path = path.into();
    // The path string is the spec's first quoted text.
    let start = spec_text.find('"').expect("a quoted path");
    let end = start + 2 + spec_text[start + 1..].find('"').expect("closing quote");
    let path_span = Span::new(id, start, end);
    let columns = columns
        .iter()
        .map(|(name, header, kind)| {
            let decl = format!("{name}:");
            let decl_span = if sources.text(id).contains(&decl) {
                span_in(&sources, id, &decl)
            } else {
                path_span
            };
            ColumnSpec {
                name: name.to_string(),
                header: header.to_string(),
                decl_span,
                kind: kind.clone(),
                read: true,
            }
        })
        .collect();
    let spec = TableSpec {
        format: FileFormat::for_path(&path),
        path,
        path_span,
        missing: vec![String::new(), "NA".to_owned()],
        columns,
    };
    Setup { sources, spec }
}

fn drug_levels() -> ColumnKind {
    ColumnKind::Categorical {
        levels: Some(vec!["A".to_owned(), "B".to_owned()]),
        ordered: false,
    }
}

/// patient: id, drug: nominal levels("A", "B"), extra_hours: ratio or interval.
fn sleep_setup(path: impl Into<PathBuf>, ratio: bool) -> Setup {
    setup(
        SLEEP_SPEC,
        path,
        &[
            ("patient", "patient", ColumnKind::Id),
            ("drug", "drug", drug_levels()),
            ("extra_hours", "extra_hours", ColumnKind::Numeric { ratio }),
        ],
    )
}

impl Setup {
    fn parse(&mut self, text: impl AsRef<[u8]>) -> Result<Table, Vec<Diagnostic>> {
        parse_table(&self.spec, text.as_ref(), &mut self.sources)
    }

    fn errors(&mut self, text: impl AsRef<[u8]>) -> Vec<Diagnostic> {
        match self.parse(text) {
            Ok(table) => panic!("expected errors, got a table:\n{}", table.canonical_text()),
            Err(diagnostics) => diagnostics,
        }
    }

    fn only_error(&mut self, text: impl AsRef<[u8]>) -> Diagnostic {
        let mut errors = self.errors(text);
        assert_eq!(errors.len(), 1, "{errors:#?}");
        errors.remove(0)
    }

    /// The text under a label and the 1-based line and column where it starts.
    fn place(&self, span: Span) -> (&str, (usize, usize)) {
        (
            self.sources.slice(span),
            self.sources.line_col(span.source, span.start),
        )
    }

    fn help(diagnostic: &Diagnostic) -> &str {
        diagnostic.help.as_deref().unwrap_or("")
    }
}

fn interval_numbers(table: &Table, name: &str) -> Vec<f64> {
    table
        .numeric(name)
        .expect("numeric column")
        .iter()
        .map(|v| v.expect("no missing value"))
        .collect()
}

// ---------------------------------------------------------------------------------------------
// Reading good files

#[test]
fn reads_the_sleep_table_from_disk() {
    let mut s = sleep_setup(SLEEP_FILE, false);
    let table = read_table(&s.spec, &mut s.sources).expect("the fixture reads");
    assert_eq!(table.n_rows(), 20);
    let (codes, values) = table.id("patient").expect("id column");
    let expected_ids: Vec<String> = (1..=10).map(|i| i.to_string()).collect();
    assert_eq!(values.to_vec(), expected_ids);
    assert_eq!(codes.get(10), Some(0), "patient 1 again under drug B");
    let (drug_codes, levels) = table.categorical("drug").expect("categorical column");
    assert_eq!(*levels, ["A", "B"]);
    assert!(drug_codes.iter().take(10).all(|c| c == Some(0)));
    assert!(drug_codes.iter().skip(10).all(|c| c == Some(1)));
    // Student (1908): the paired differences B − A have mean 1.58 and sd 1.230 (3 d.p.).
    let hours = interval_numbers(&table, "extra_hours");
    let diffs: Vec<f64> = (0..10).map(|i| hours[i + 10] - hours[i]).collect();
    let mean = diffs.iter().sum::<f64>() / 10.0;
    let sd = (diffs.iter().map(|d| (d - mean).powi(2)).sum::<f64>() / 9.0).sqrt();
    assert!((mean - 1.58).abs() < 1e-12, "mean {mean}");
    assert!((sd - 1.230).abs() < 5e-4, "sd {sd}");
    // Rows know where they are; a file that reads cleanly is not kept in the source map.
    assert_eq!(table.path(), Path::new(SLEEP_FILE));
    let place = table.row_place(1).expect("second data row");
    assert_eq!((place.file_row, place.line), (3, 3));
    assert_eq!(
        table.row_label(1).as_deref(),
        Some("student1908-sleep.csv row 3")
    );
    assert_eq!(s.sources.files().len(), 1, "only the spec's text");
}

#[test]
fn canonical_text_is_exact_and_repeatable() {
    // First three data rows of the sleep table, one cell made missing.
    let text = "patient,drug,extra_hours\n1,A,0.7\n2,A,NA\n3,B,-0.2\n";
    let mut s = sleep_setup("sleep.csv", false);
    let first = s.parse(text).expect("reads");
    let second = s.parse(text).expect("reads");
    assert_eq!(first.canonical_text(), second.canonical_text());
    assert_eq!(
        first.canonical_text(),
        "rows 3\n\
         patient: id [\"1\", \"2\", \"3\"] 0 1 2\n\
         drug: categorical [\"A\", \"B\"] 0 0 1\n\
         extra_hours: numeric 0.7 . -0.2\n"
    );
    let column = first.column("extra_hours").expect("column");
    assert_eq!((column.len(), column.n_missing()), (3, 1));
    assert_eq!(first.column("drug").and_then(|c| c.text_at(2)), Some("B"));
}

#[test]
fn levels_without_a_declaration_follow_first_appearance() {
    // The sleep table with its two halves swapped: drug B comes first.
    let text = sleep_text();
    let lines: Vec<&str> = text.lines().collect();
    let swapped = [&lines[..1], &lines[11..], &lines[1..11]]
        .concat()
        .join("\n");
    let mut s = setup(
        SLEEP_SPEC,
        "sleep.csv",
        &[(
            "drug",
            "drug",
            ColumnKind::Categorical {
                levels: None,
                ordered: false,
            },
        )],
    );
    let table = s.parse(swapped).expect("reads");
    let (codes, levels) = table.categorical("drug").expect("categorical");
    assert_eq!(*levels, ["B", "A"]);
    assert_eq!(codes.get(0), Some(0));
    assert_eq!(codes.get(19), Some(1));
}

#[test]
fn a_byte_order_mark_is_skipped_and_spans_count_it() {
    // The sleep table saved with a UTF-8 byte-order mark, with drug "a" in row 2.
    let text = format!("\u{feff}{}", edit_row(&sleep_text(), 2, "1,a,0.7"));
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(&text);
    assert_eq!(error.code, Code::NotALevel);
    let span = error.span().expect("span");
    assert_eq!(span.start, "\u{feff}patient,drug,extra_hours\n1,".len());
    assert_eq!(s.place(span), ("a", (2, 3)));
    // Without the error the header's first name is read without the mark.
    let clean = format!("\u{feff}{}", sleep_text());
    let table = s.parse(clean).expect("reads");
    assert_eq!(table.n_rows(), 20);
    assert!(table.id("patient").is_some());
}

#[test]
fn tsv_files_are_tab_separated() {
    // The sleep table with tabs; a comma inside a TSV field is an ordinary character, so the
    // number "0,7" is a decimal comma, reported as such.
    let tsv = sleep_text().replace(',', "\t");
    let mut s = sleep_setup("sleep.TSV", false);
    let table = s.parse(&tsv).expect("reads as TSV");
    assert_eq!(table.n_rows(), 20);
    let error = s.only_error(edit_row(&tsv, 2, "1\tA\t0,7"));
    assert_eq!(
        error.message,
        "sleep.TSV row 2, column \"extra_hours\": \"0,7\" is not a number"
    );
    assert_eq!(s.place(error.span().unwrap()), ("0,7", (2, 5)));
    assert!(Setup::help(&error).contains("decimal point and no thousands separators"));
    // The same text read as .csv has one field per row: every declared column is missing.
    let mut as_csv = sleep_setup("sleep.csv", false);
    let errors = as_csv.errors(&tsv);
    assert_eq!(errors.len(), 3);
    assert!(errors.iter().all(|e| e.code == Code::MissingColumn));
    assert!(Setup::help(&errors[0]).contains("one field that holds tabs"));
}

#[test]
fn quoted_fields_may_hold_separators_quotes_and_line_breaks() {
    // Row 3 of the sleep table with its id quoted, holding a comma, a doubled quote and a line
    // break; row 4 then starts on line 5, and a bad cell there says so.
    let text = "patient,drug,extra_hours\n\
                1,A,0.7\n\
                \"2, \"\"second\"\"\nof ten\",A,-1.6\n\
                3,X,-0.2\n";
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(text);
    assert_eq!(
        error.message,
        "sleep.csv row 4 (line 5), column \"drug\": \"X\" is not a declared level"
    );
    assert_eq!(s.place(error.span().unwrap()), ("X", (5, 3)));
    let fixed = text.replace("3,X", "3,A");
    let table = s.parse(&fixed).expect("reads");
    let (_, ids) = table.id("patient").unwrap();
    assert_eq!(&ids[1], "2, \"second\"\nof ten");
    assert_eq!(
        table.row_label(2).as_deref(),
        Some("sleep.csv row 4 (line 5)")
    );
}

#[test]
fn windows_line_endings_and_blank_lines() {
    // The first rows of the sleep table with CRLF endings and a blank line (row 3) before
    // row 4.
    let text = "patient,drug,extra_hours\r\n1,A,0.7\r\n\r\n2,A,-1.6\r\n";
    let mut s = sleep_setup("sleep.csv", true);
    let error = s.only_error(text);
    assert_eq!(error.code, Code::NegativeRatio);
    assert_eq!(
        error.message,
        "sleep.csv row 4, column \"extra_hours\": \"-1.6\" is negative, but extra_hours is a \
         ratio variable"
    );
    assert_eq!(s.place(error.span().unwrap()), ("-1.6", (4, 5)));
}

#[test]
fn rows_of_empty_fields_are_skipped_and_blank_lines_count_as_rows() {
    // The first rows of the sleep table with two blank lines and two rows of separators only,
    // as spreadsheets export them; rows are numbered as a spreadsheet shows them.
    let text = "patient,drug,extra_hours\n\n1,A,0.7\n,,\n\n2,a,-1.6\n , ,\n,,,\n";
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(text);
    assert_eq!(
        error.message,
        "sleep.csv row 6, column \"drug\": \"a\" is not a declared level"
    );
    let table = s.parse(text.replace(",a,", ",A,")).expect("reads");
    assert_eq!(table.n_rows(), 2);
    let places: Vec<(usize, usize)> = (0..2)
        .map(|i| table.row_place(i).map(|p| (p.file_row, p.line)).unwrap())
        .collect();
    assert_eq!(places, [(3, 3), (6, 6)]);
    // Only empty rows below the header: as good as none.
    assert_eq!(
        s.only_error("patient,drug,extra_hours\n,,\n").code,
        Code::HeaderOnly
    );
}

#[test]
fn custom_missing_tokens_replace_the_defaults() {
    // Sleep rows 2–4 with "-" for a missing value; with missing("-") only, "NA" is an error.
    let text = "patient,drug,extra_hours\n1,A,-\n2, - ,-1.6\n3,A,NA\n";
    let mut s = sleep_setup("sleep.csv", false);
    s.spec.missing = vec!["-".to_owned()];
    let error = s.only_error(text);
    assert_eq!(
        error.message,
        "sleep.csv row 4, column \"extra_hours\": \"NA\" is not a number"
    );
    assert_eq!(
        Setup::help(&error),
        "if \"NA\" marks a missing value, add it to missing(...) in the data block"
    );
    let table = s.parse(text.replace("NA", "-0.2")).expect("reads");
    assert_eq!(
        table
            .numeric("extra_hours")
            .unwrap()
            .iter()
            .collect::<Vec<_>>(),
        [None, Some(-1.6), Some(-0.2)]
    );
    // " - " is the token with spaces around it: missing too.
    assert_eq!(
        table
            .categorical("drug")
            .unwrap()
            .0
            .iter()
            .collect::<Vec<_>>(),
        [Some(0), None, Some(0)]
    );
}

#[test]
fn numbers_may_have_spaces_signs_and_exponents() {
    // Sleep values rewritten in equivalent notations.
    let text = "patient,drug,extra_hours\n1,A, 0.7 \n2,A,-1.6e0\n3,A,-.2\n9,A,-0\n10,A,+2.\n";
    let mut s = sleep_setup("sleep.csv", false);
    let table = s.parse(text).expect("reads");
    let values = interval_numbers(&table, "extra_hours");
    assert_eq!(values, [0.7, -1.6, -0.2, 0.0, 2.0]);
    assert!(values[3].is_sign_positive(), "-0 is stored as 0");
}

#[test]
fn a_header_other_than_the_name_is_read() {
    let spec_text = "data sleep \"sleep.csv\" {\n  hours: ratio column(\"extra_hours\")\n}\n";
    let mut s = setup(
        spec_text,
        "sleep.csv",
        &[("hours", "extra_hours", ColumnKind::Numeric { ratio: false })],
    );
    let table = s.parse(sleep_text()).expect("reads");
    assert_eq!(table.numeric("hours").unwrap().get(0), Some(0.7));
    assert!(
        table.column("extra_hours").is_none(),
        "columns go by variable name"
    );
    assert!(
        table.column("patient").is_none(),
        "undeclared columns are ignored"
    );
}

// ---------------------------------------------------------------------------------------------
// Errors about the file as a whole

#[test]
fn d0001_a_missing_file_names_a_close_file() {
    let folder = tempfile::tempdir().expect("temp dir");
    std::fs::copy(SLEEP_FILE, folder.path().join("sleep.csv")).expect("copy");
    let mut s = sleep_setup(folder.path().join("slep.csv"), false);
    let errors = read_table(&s.spec, &mut s.sources).expect_err("no such file");
    assert_eq!(errors.len(), 1);
    let error = &errors[0];
    assert_eq!(error.code, Code::Unreadable);
    let shown = folder.path().join("slep.csv").display().to_string();
    assert_eq!(error.message, format!("data file {shown:?} does not exist"));
    assert_eq!(
        s.place(error.span().unwrap()).0,
        "\"student1908-sleep.csv\""
    );
    assert_eq!(
        Setup::help(error),
        "did you mean \"sleep.csv\"? paths in a data block are relative to the spec file"
    );
    assert_eq!(
        error.file.as_deref(),
        Some(folder.path().join("slep.csv").as_path())
    );
}

#[test]
fn d0001_a_folder_is_not_a_data_file() {
    let folder = tempfile::tempdir().expect("temp dir");
    let mut s = sleep_setup(folder.path(), false);
    let errors = read_table(&s.spec, &mut s.sources).expect_err("a folder");
    assert_eq!(errors[0].code, Code::Unreadable);
    assert!(errors[0].message.ends_with("is a folder, not a file"));
}

#[test]
fn d0002_files_over_the_limit_are_refused_before_reading() {
    // A sparse file one byte over the default limit: refused from its size alone.
    let folder = tempfile::tempdir().expect("temp dir");
    let path = folder.path().join("huge.csv");
    let file = std::fs::File::create(&path).expect("create");
    file.set_len(MAX_FILE_BYTES + 1).expect("sparse file");
    let mut s = sleep_setup(&path, false);
    let spec_text = SLEEP_SPEC.replace("student1908-sleep.csv", "huge.csv");
    s.sources = SourceMap::new();
    let id = s.sources.add("test.figura", spec_text);
    s.spec.path_span = span_in(&s.sources, id, "\"huge.csv\"");
    let errors = read_table(&s.spec, &mut s.sources).expect_err("too large");
    assert_eq!(errors[0].code, Code::TooLarge);
    assert_eq!(
        errors[0].message,
        "data file huge.csv is larger than the limit of 1073741824 bytes (1073741825 bytes)"
    );
    assert_eq!(s.place(errors[0].span().unwrap()).0, "\"huge.csv\"");
    // A smaller limit applies to bytes in memory and to files alike.
    let limits = ReadLimits {
        max_file_bytes: 100,
        ..ReadLimits::default()
    };
    let mut s = sleep_setup(SLEEP_FILE, false);
    let in_memory = parse_table_with(&s.spec, sleep_text().as_bytes(), &mut s.sources, &limits);
    assert_eq!(in_memory.unwrap_err()[0].code, Code::TooLarge);
    let on_disk = read_table_with(&s.spec, &mut s.sources, &limits);
    assert_eq!(on_disk.unwrap_err()[0].code, Code::TooLarge);
}

#[test]
fn d0003_text_that_is_not_utf8() {
    // Row 3 of the sleep table with a Latin-1 "é" (byte 0xE9) in the drug column.
    let mut bytes = b"patient,drug,extra_hours\n1,A,0.7\n2,".to_vec();
    let offset = bytes.len();
    bytes.extend_from_slice(b"\xE9,-1.6\n");
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(&bytes);
    assert_eq!(error.code, Code::NotUtf8);
    assert_eq!(
        error.message,
        format!("data file sleep.csv is not UTF-8 text: byte 0xE9 at line 3, byte offset {offset}")
    );
    assert_eq!(
        Setup::help(&error),
        "save the file as CSV in UTF-8, or name its encoding with `encoding \"...\"` in the data \
         block, e.g. `encoding \"windows-1252\"` (the bytes near it are \"2,\u{fffd},-1.6\")"
    );
    assert_eq!(
        s.place(error.span().unwrap()).0,
        "\"student1908-sleep.csv\""
    );
    // UTF-16 with its byte-order mark, and a zipped workbook, get their own advice.
    let utf16 = s.only_error(b"\xFF\xFEp\x00a\x00");
    assert!(Setup::help(&utf16).contains("UTF-16"));
    let workbook = s.only_error(b"PK\x03\x04\x14\x00\x06\x00\x08\x00\x00\x00!\x00\xff");
    assert!(Setup::help(&workbook).contains("spreadsheet workbook"));
    // Nothing of a non-UTF-8 file is added to the source map.
    assert_eq!(s.sources.text(figura::diag::SourceId(0)), SLEEP_SPEC);
}

#[test]
fn d0004_nul_bytes() {
    // The sleep header saved as UTF-16LE without a byte-order mark: valid UTF-8, full of NULs.
    let utf16: Vec<u8> = "patient\n".bytes().flat_map(|b| [b, 0]).collect();
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(utf16);
    assert_eq!(error.code, Code::NulByte);
    assert_eq!(
        error.message,
        "data file sleep.csv holds a NUL byte at line 1, byte offset 1"
    );
}

#[test]
fn d0005_an_empty_file_has_no_header() {
    let mut s = sleep_setup("sleep.csv", false);
    for text in ["", "\n\r\n\n"] {
        let error = s.only_error(text);
        assert_eq!(error.code, Code::EmptyFile);
        assert_eq!(
            error.message,
            "data file sleep.csv is empty: it has no header row"
        );
        assert_eq!(
            Setup::help(&error),
            "the first row must name the columns, separated by commas: \"patient\", \"drug\", \
             \"extra_hours\""
        );
    }
    // A byte-order mark alone is still empty.
    assert_eq!(s.only_error("\u{feff}").code, Code::EmptyFile);
}

#[test]
fn d0006_a_header_without_rows() {
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error("patient,drug,extra_hours\n\n");
    assert_eq!(error.code, Code::HeaderOnly);
    assert_eq!(error.message, "sleep.csv has a header row but no data rows");
    assert_eq!(
        s.place(error.span().unwrap()),
        ("patient,drug,extra_hours", (1, 1))
    );
}

#[test]
fn d0007_a_quote_that_never_closes() {
    // Row 3 of the sleep table with an opening quote before the drug and none after.
    let text = edit_row(&sleep_text(), 3, "2,\"A,-1.6");
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(&text);
    assert_eq!(error.code, Code::Malformed);
    assert_eq!(
        error.message,
        "sleep.csv row 3: a quoted field is never closed"
    );
    assert_eq!(s.place(error.span().unwrap()), ("\"", (3, 3)));
    // In the header too.
    let error = s.only_error("patient,\"drug,extra_hours\n1,A,0.7\n");
    assert_eq!(
        error.message,
        "sleep.csv row 1: a quoted field is never closed"
    );
    assert_eq!(s.place(error.span().unwrap()), ("\"", (1, 9)));
}

// ---------------------------------------------------------------------------------------------
// Errors in the header

#[test]
fn d0008_a_declared_column_the_header_lacks() {
    // The sleep header with "extra_hours" written "Extra_Hours" and "drug" renamed "treatment".
    let text = edit_row(&sleep_text(), 1, "patient,treatment,Extra_Hours");
    let mut s = sleep_setup("sleep.csv", false);
    let errors = s.errors(&text);
    assert_eq!(errors.len(), 2, "{errors:#?}");
    let (drug, hours) = (&errors[0], &errors[1]);
    assert_eq!(drug.code, Code::MissingColumn);
    assert_eq!(drug.message, "sleep.csv has no column \"drug\"");
    assert_eq!(s.place(drug.span().unwrap()).0, "drug:");
    assert_eq!(
        s.place(drug.labels[1].span).0,
        "patient,treatment,Extra_Hours"
    );
    assert_eq!(
        Setup::help(drug),
        "the columns of sleep.csv are \"patient\", \"treatment\", \"Extra_Hours\""
    );
    assert_eq!(hours.message, "sleep.csv has no column \"extra_hours\"");
    assert_eq!(
        Setup::help(hours),
        "did you mean \"Extra_Hours\"? write column(\"Extra_Hours\") in the declaration of \
         extra_hours, or rename the column in the file"
    );
    // Spaces around a header name.
    let padded = edit_row(&sleep_text(), 1, "patient, drug,extra_hours");
    let error = s.only_error(padded);
    assert_eq!(
        Setup::help(&error),
        "the header has \" drug\" with spaces around the name; remove them, or write \
         column(\" drug\")"
    );
    // A semicolon-separated file read as CSV.
    let semicolons = sleep_text().replace(',', ";");
    let errors = s.errors(semicolons);
    assert_eq!(errors.len(), 3);
    assert!(Setup::help(&errors[0]).contains("one field that holds semicolons"));
}

#[test]
fn d0008_names_the_variable_when_the_header_differs() {
    let spec_text = "data sleep \"sleep.csv\" {\n  hours: ratio column(\"hours (extra)\")\n}\n";
    let mut s = setup(
        spec_text,
        "sleep.csv",
        &[(
            "hours",
            "hours (extra)",
            ColumnKind::Numeric { ratio: false },
        )],
    );
    let error = s.only_error(sleep_text());
    assert_eq!(
        error.message,
        "sleep.csv has no column \"hours (extra)\" (read for hours)"
    );
}

#[test]
fn d0009_a_declared_header_twice() {
    // The sleep header with its third name changed to "drug": two columns named "drug".
    // Duplicates among undeclared columns do not matter.
    let text = edit_row(&sleep_text(), 1, "patient,drug,drug");
    let mut s = setup(
        SLEEP_SPEC,
        "sleep.csv",
        &[
            ("patient", "patient", ColumnKind::Id),
            ("drug", "drug", drug_levels()),
        ],
    );
    let error = s.only_error(&text);
    assert_eq!(error.code, Code::DuplicateHeader);
    assert_eq!(error.message, "sleep.csv has 2 columns named \"drug\"");
    assert_eq!(s.place(error.labels[0].span), ("drug", (1, 9)));
    assert_eq!(s.place(error.labels[1].span), ("drug", (1, 14)));
    assert_eq!(s.place(error.labels[2].span).0, "drug:");
    let mut only_patient = setup(
        SLEEP_SPEC,
        "sleep.csv",
        &[("patient", "patient", ColumnKind::Id)],
    );
    assert!(only_patient.parse(&text).is_ok());
}

// ---------------------------------------------------------------------------------------------
// Errors in rows and cells

#[test]
fn d0010_rows_of_the_wrong_width() {
    // Row 3 loses its drug field; row 5 gains a trailing comma; row 7 gains an unquoted
    // comma in the drug field. Their cells are not read, so no other error follows.
    let mut text = sleep_text();
    text = edit_row(&text, 3, "2,-1.6");
    text = edit_row(&text, 5, "4,A,-1.2,");
    text = edit_row(&text, 7, "6,A, first drug,3.4");
    let mut s = sleep_setup("sleep.csv", false);
    let errors = s.errors(&text);
    assert_eq!(errors.len(), 3, "{errors:#?}");
    assert!(errors.iter().all(|e| e.code == Code::RaggedRow));
    assert_eq!(
        errors[0].message,
        "sleep.csv row 3: 2 fields, but the header has 3 fields"
    );
    assert_eq!(s.place(errors[0].span().unwrap()), ("2,-1.6", (3, 1)));
    assert_eq!(
        s.place(errors[0].labels[1].span).0,
        "patient,drug,extra_hours"
    );
    assert_eq!(
        Setup::help(&errors[0]),
        "give every row one field per column; leave a field empty for a missing value"
    );
    assert_eq!(
        errors[1].message,
        "sleep.csv row 5: 4 fields, but the header has 3 fields"
    );
    assert_eq!(
        Setup::help(&errors[1]),
        "the row ends with extra separators; remove them"
    );
    assert_eq!(
        Setup::help(&errors[2]),
        "a value that holds a comma must be in double quotes"
    );
}

#[test]
fn d0011_a_value_outside_the_declared_levels() {
    // Drug cells of rows 2, 12 and 13 edited: a case slip, a spacing slip, a stranger.
    let mut text = sleep_text();
    text = edit_row(&text, 2, "1,a,0.7");
    text = edit_row(&text, 12, "1,B ,1.9");
    text = edit_row(&text, 13, "2,C,0.8");
    let mut s = sleep_setup("sleep.csv", false);
    let errors = s.errors(&text);
    assert_eq!(errors.len(), 3, "{errors:#?}");
    assert!(errors.iter().all(|e| e.code == Code::NotALevel));
    assert_eq!(
        errors[0].message,
        "sleep.csv row 2, column \"drug\": \"a\" is not a declared level"
    );
    assert_eq!(
        Setup::help(&errors[0]),
        "did you mean \"A\"? levels must match exactly, in letter case and spacing too"
    );
    assert_eq!(errors[0].labels[0].text, "not a level of drug");
    assert_eq!(s.place(errors[0].span().unwrap()), ("a", (2, 3)));
    assert_eq!(
        errors[1].message,
        "sleep.csv row 12, column \"drug\": \"B \" is not a declared level"
    );
    assert!(Setup::help(&errors[1]).starts_with("did you mean \"B\"?"));
    assert_eq!(s.place(errors[1].span().unwrap()), ("B ", (12, 3)));
    // "C" is one edit from both one-letter levels, which is no likeness: the levels are listed.
    assert_eq!(
        Setup::help(&errors[2]),
        "the declared levels of drug are \"A\", \"B\"; add \"C\" to levels(...) if it is one"
    );
}

#[test]
fn d0011_lists_the_levels_when_none_is_close() {
    // Longer levels so that a stranger is not "close": the two drugs' names written out
    // (dextro- and laevo-hyoscyamine, from memory of the paper's description).
    let mut s = setup(
        SLEEP_SPEC,
        "sleep.csv",
        &[(
            "drug",
            "drug",
            ColumnKind::Categorical {
                levels: Some(vec![
                    "dextro-hyoscyamine".to_owned(),
                    "laevo-hyoscyamine".to_owned(),
                ]),
                ordered: false,
            },
        )],
    );
    let error = s.only_error("drug\ndextro-hyoscyamine\nplacebo\n");
    assert_eq!(
        Setup::help(&error),
        "the declared levels of drug are \"dextro-hyoscyamine\", \"laevo-hyoscyamine\"; add \
         \"placebo\" to levels(...) if it is one"
    );
    let marker = s.only_error("drug\nlaevo-hyoscyamine\nn/a\n");
    assert!(Setup::help(&marker)
        .starts_with("if \"n/a\" marks a missing value, add it to missing(...)"));
    // A quoted cell's span includes its quotes.
    let quoted = s.only_error("drug\n\"laevo-hyoscyamine, low dose\"\n");
    assert_eq!(
        s.place(quoted.span().unwrap()),
        ("\"laevo-hyoscyamine, low dose\"", (2, 1))
    );
    assert_eq!(
        quoted.message,
        "sleep.csv row 2, column \"drug\": \"laevo-hyoscyamine, low dose\" is not a declared \
         level"
    );
}

#[test]
fn d0012_non_numeric_values() {
    // extra_hours cells of the sleep table rewritten in ways people type numbers.
    let cases = [
        (
            "\"1,900\"",
            "\"1,900\"",
            "decimal point and no thousands separators",
        ),
        (
            "\"0,7\"",
            "\"0,7\"",
            "decimal point and no thousands separators",
        ),
        (
            "1 900",
            "1 900",
            "decimal point and no thousands separators",
        ),
        ("0.7 h", "0.7 h", "unit(\"...\")"),
        ("n/a", "n/a", "if \"n/a\" marks a missing value"),
        ("#VALUE!", "#VALUE!", "spreadsheet error value"),
        (
            "seven",
            "seven",
            "extra_hours is numeric, so each cell must be a number",
        ),
        ("0x1", "0x1", "extra_hours is numeric"),
    ];
    let mut s = sleep_setup("sleep.csv", false);
    for (cell, shown, help) in cases {
        let text = edit_row(&sleep_text(), 2, &format!("1,A,{cell}"));
        let error = s.only_error(&text);
        assert_eq!(error.code, Code::NotANumber, "{cell}");
        let value = cell.trim_matches('"');
        assert_eq!(
            error.message,
            format!("sleep.csv row 2, column \"extra_hours\": {value:?} is not a number")
        );
        assert_eq!(s.place(error.span().unwrap()), (shown, (2, 5)));
        assert!(
            Setup::help(&error).contains(help),
            "{cell}: {:?}",
            error.help
        );
    }
}

#[test]
fn d0013_non_finite_numbers() {
    let mut s = sleep_setup("sleep.csv", false);
    for (cell, message) in [
        ("nan", "\"nan\" is not a finite number"),
        ("-Inf", "\"-Inf\" is not a finite number"),
        ("infinity", "\"infinity\" is not a finite number"),
        ("1e999", "\"1e999\" is too large for a number"),
    ] {
        let text = edit_row(&sleep_text(), 4, &format!("3,A,{cell}"));
        let error = s.only_error(&text);
        assert_eq!(error.code, Code::NotFinite, "{cell}");
        assert_eq!(
            error.message,
            format!("sleep.csv row 4, column \"extra_hours\": {message}")
        );
        assert_eq!(s.place(error.span().unwrap()), (cell, (4, 5)));
    }
}

#[test]
fn d0014_negative_values_in_a_ratio_column() {
    // The sleep table read with extra_hours declared ratio: Student's negative values (rows
    // 3, 4, 5, 6 and 16) are each an error, in row order.
    let mut s = sleep_setup(SLEEP_FILE, true);
    let errors = read_table(&s.spec, &mut s.sources).expect_err("negative values");
    let found: Vec<(usize, &str)> = errors
        .iter()
        .map(|e| {
            assert_eq!(e.code, Code::NegativeRatio);
            let (text, (line, _)) = s.place(e.span().unwrap());
            (line, text)
        })
        .collect();
    assert_eq!(
        found,
        [
            (3, "-1.6"),
            (4, "-0.2"),
            (5, "-1.2"),
            (6, "-0.1"),
            (16, "-0.1")
        ]
    );
    assert_eq!(
        errors[0].message,
        "student1908-sleep.csv row 3, column \"extra_hours\": \"-1.6\" is negative, but \
         extra_hours is a ratio variable"
    );
    assert!(Setup::help(&errors[0]).contains("declare extra_hours interval"));
}

#[test]
fn d0015_a_missing_id() {
    // Row 6 of the sleep table with its patient left empty, row 7 with "NA".
    let mut text = edit_row(&sleep_text(), 6, ",A,-0.1");
    text = edit_row(&text, 7, "NA,A,3.4");
    let mut s = sleep_setup("sleep.csv", false);
    let errors = s.errors(&text);
    assert_eq!(errors.len(), 2);
    assert_eq!(errors[0].code, Code::MissingId);
    assert_eq!(
        errors[0].message,
        "sleep.csv row 6, column \"patient\": the id is missing (\"\" is a missing token)"
    );
    assert_eq!(s.place(errors[0].span().unwrap()), ("", (6, 1)));
    assert_eq!(
        errors[1].message,
        "sleep.csv row 7, column \"patient\": the id is missing (\"NA\" is a missing token)"
    );
}

#[test]
fn d0016_errors_past_the_cap_are_summed_up() {
    // The sleep table with every drug written in lower case and every hour as "x": 40 errors.
    let mut text = sleep_text();
    for row in 2..=21 {
        let line = text.lines().nth(row - 1).unwrap().to_owned();
        let mut fields: Vec<String> = line.split(',').map(str::to_owned).collect();
        fields[1] = fields[1].to_lowercase();
        fields[2] = "x".to_owned();
        text = edit_row(&text, row, &fields.join(","));
    }
    let mut s = sleep_setup("sleep.csv", false);
    let errors = s.errors(&text);
    assert_eq!(errors.len(), 21);
    // Reading order: row by row, left to right.
    assert_eq!(errors[0].code, Code::NotALevel);
    assert_eq!(errors[1].code, Code::NotANumber);
    assert!(errors[19]
        .message
        .starts_with("sleep.csv row 11, column \"extra_hours\""));
    let summary = &errors[20];
    assert_eq!(summary.code, Code::MoreDataErrors);
    assert_eq!(
        summary.message,
        "sleep.csv: 20 more data errors not shown (D0011: 10, D0012: 10)"
    );
    assert_eq!(
        s.place(summary.span().unwrap()).0,
        "\"student1908-sleep.csv\""
    );
    // A different cap.
    let limits = ReadLimits {
        max_diagnostics: 3,
        ..ReadLimits::default()
    };
    let errors = parse_table_with(&s.spec, text.as_bytes(), &mut s.sources, &limits).unwrap_err();
    assert_eq!(errors.len(), 4);
    assert_eq!(
        errors[3].message,
        "sleep.csv: 37 more data errors not shown (D0011: 18, D0012: 19)"
    );
}

#[test]
fn all_kinds_of_errors_are_reported_in_one_pass() {
    // One edit of each kind in one file; header errors come first, then rows in order.
    let mut text = sleep_text();
    text = edit_row(&text, 1, "patient,drug,extra_hours,extra_hours");
    for row in 2..=21 {
        let line = text.lines().nth(row - 1).unwrap().to_owned();
        text = edit_row(&text, row, &format!("{line},0"));
    }
    text = edit_row(&text, 3, "2,a,-1.6,0");
    text = edit_row(&text, 4, "3,A,-0.2");
    text = edit_row(&text, 5, ",A,-1.2,0");
    let spec_text = SLEEP_SPEC.replace("extra_hours: ratio", "extra_hours: ratio\n  note: nominal");
    let mut s = setup(
        &spec_text,
        "sleep.csv",
        &[
            ("patient", "patient", ColumnKind::Id),
            ("drug", "drug", drug_levels()),
            (
                "extra_hours",
                "extra_hours",
                ColumnKind::Numeric { ratio: true },
            ),
            (
                "note",
                "note",
                ColumnKind::Categorical {
                    levels: None,
                    ordered: false,
                },
            ),
        ],
    );
    let errors = s.errors(&text);
    let found: Vec<Code> = errors.iter().map(|e| e.code).collect();
    assert_eq!(
        found,
        [
            Code::DuplicateHeader,
            Code::MissingColumn,
            Code::NotALevel,
            Code::RaggedRow,
            Code::MissingId,
        ]
    );
}

// ---------------------------------------------------------------------------------------------
// Robustness

/// xorshift64* (Vigna 2016), a fixed seed: the same inputs on every run.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }

    fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
}

/// Bytes that matter to a CSV reader, plus invalid and multi-byte UTF-8.
const ALPHABET: &[&[u8]] = &[
    b",",
    b",",
    b"\t",
    b"\"",
    b"\"",
    b"\n",
    b"\n",
    b"\r",
    b"\r\n",
    b" ",
    b"A",
    b"B",
    b"a",
    b"1",
    b"-",
    b".",
    b"e",
    b"9",
    b"NA",
    b"nan",
    b"inf",
    b"1e999",
    b"\xEF\xBB\xBF",
    b"\xE9",
    b"\xC3",
    b"\x00",
    b"\xC3\xA9",
    b"\xF0\x9F\x98\x80",
    b"patient",
    b"drug",
    b"extra_hours",
];

fn random_input(rng: &mut Rng) -> Vec<u8> {
    let n = rng.below(60);
    (0..n)
        .flat_map(|_| ALPHABET[rng.below(ALPHABET.len())].iter().copied())
        .collect()
}

fn mutated_sleep(rng: &mut Rng, base: &[u8]) -> Vec<u8> {
    let mut bytes = base.to_vec();
    for _ in 0..=rng.below(6) {
        let at = rng.below(bytes.len() + 1);
        let piece = ALPHABET[rng.below(ALPHABET.len())];
        match rng.below(3) {
            0 => bytes.splice(at..at, piece.iter().copied()).for_each(drop),
            1 if at < bytes.len() => {
                bytes.remove(at);
            }
            _ => {
                let end = (at + piece.len()).min(bytes.len());
                bytes.splice(at..end, piece.iter().copied()).for_each(drop);
            }
        }
    }
    bytes
}

/// What holds for every input: a table keeps its invariants; diagnostics point at real text.
fn check_outcome(s: &Setup, outcome: &Result<Table, Vec<Diagnostic>>, input: &[u8]) {
    match outcome {
        Ok(table) => {
            assert!(table.n_rows() > 0);
            for (name, column) in table.columns() {
                assert_eq!(column.len(), table.n_rows(), "{name}");
                match column {
                    Column::Id { codes, values } => {
                        assert!(codes
                            .iter()
                            .all(|c| c.is_some_and(|c| (c as usize) < values.len())));
                    }
                    Column::Categorical { codes, levels } => {
                        assert!(codes.iter().flatten().all(|c| (c as usize) < levels.len()));
                    }
                    Column::Numeric(values) => {
                        assert!(values.iter().flatten().all(|v| v.is_finite()));
                    }
                }
            }
        }
        Err(errors) => {
            assert!(!errors.is_empty());
            assert!(
                errors.len() <= figura::data::MAX_DIAGNOSTICS + 1,
                "{input:?}"
            );
            for error in errors {
                assert!(error.code.as_str().starts_with('D') && error.is_error());
                assert!(!error.message.is_empty() && error.help.is_some());
                for label in &error.labels {
                    let text = s.sources.text(label.span.source);
                    assert!(label.span.end <= text.len(), "{error:?}");
                    assert!(text.is_char_boundary(label.span.start), "{error:?}");
                    assert!(text.is_char_boundary(label.span.end), "{error:?}");
                }
            }
        }
    }
}

#[test]
fn never_panics_on_random_or_mutated_bytes() {
    let base = sleep_text().into_bytes();
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    let mut n_ok = 0;
    for i in 0..3000 {
        let input = if i % 2 == 0 {
            random_input(&mut rng)
        } else {
            mutated_sleep(&mut rng, &base)
        };
        let path = if i % 3 == 0 { "sleep.tsv" } else { "sleep.csv" };
        let mut s = sleep_setup(path, i % 4 == 0);
        if i % 5 == 0 {
            s.spec.columns[1].kind = ColumnKind::Categorical {
                levels: None,
                ordered: true,
            };
        }
        let outcome = s.parse(&input);
        n_ok += usize::from(outcome.is_ok());
        check_outcome(&s, &outcome, &input);
        // The same bytes give the same outcome.
        let again = s.parse(&input);
        match (&outcome, &again) {
            (Ok(a), Ok(b)) => assert_eq!(a.canonical_text(), b.canonical_text()),
            (Err(a), Err(b)) => {
                let strip = |d: &Vec<Diagnostic>| -> Vec<String> {
                    d.iter()
                        .map(|e| format!("{} {} {:?}", e.code, e.message, e.help))
                        .collect()
                };
                assert_eq!(strip(a), strip(b));
            }
            _ => panic!("different outcomes for {input:?}"),
        }
    }
    // The mutations leave some files valid, so both paths are exercised.
    assert!(n_ok > 50, "only {n_ok} inputs read");
}

// ---------------------------------------------------------------------------------------------
// Dialects of text files

/// The sleep table with `;` between fields and decimal commas, as spreadsheets in many
/// languages export it (an edit of the fixture: every `,` made `;`, every `.` made `,`).
fn semicolon_sleep() -> String {
    sleep_text().replace(',', ";").replace('.', ",")
}

fn text_format(separator: Separator, decimal: DecimalMark) -> FileFormat {
    FileFormat::Text(TextFormat {
        separator,
        decimal,
        ..TextFormat::default()
    })
}

#[test]
fn a_semicolon_file_with_decimal_commas_reads_like_the_csv() {
    let mut csv = sleep_setup("sleep.csv", false);
    let expected = csv
        .parse(sleep_text())
        .expect("the CSV reads")
        .canonical_text();
    let mut s = sleep_setup("sleep.csv", false);
    s.spec.format = text_format(Separator::Semicolon, DecimalMark::Comma);
    let table = s.parse(semicolon_sleep()).expect("reads");
    assert_eq!(table.canonical_text(), expected);
    // A decimal point is the other mark here, and digit grouping is refused as before.
    let error = s.only_error(edit_row(&semicolon_sleep(), 2, "1;A;0.7"));
    assert_eq!(
        error.message,
        "sleep.csv row 2, column \"extra_hours\": \"0.7\" is not a number"
    );
    assert_eq!(s.place(error.span().unwrap()), ("0.7", (2, 5)));
    assert!(Setup::help(&error).starts_with("the data block says `decimal comma`"));
    let grouped = s.only_error(edit_row(&semicolon_sleep(), 2, "1;A;1.234,5"));
    assert_eq!(grouped.code, Code::NotANumber);
    // Read with commas, the header is one field holding semicolons: the help names the fix.
    let mut as_csv = sleep_setup("sleep.csv", false);
    let errors = as_csv.errors(semicolon_sleep());
    assert!(Setup::help(&errors[0]).contains("write `separator semicolon`"));
}

#[test]
fn windows_1252_text_is_decoded_and_labels_point_into_the_decoded_text() {
    // The sleep table with drug A renamed "Ä" (byte 0xC4 in windows-1252, WHATWG Encoding
    // Standard index) and row 3's hours made "x".
    let text = edit_row(&sleep_text(), 3, "2,A,x").replace(",A,", ",\u{c4},");
    let (bytes, _, unmappable) = encoding_rs::WINDOWS_1252.encode(&text);
    assert!(!unmappable);
    let spec_text = SLEEP_SPEC.replace("levels(\"A\", \"B\")", "levels(\"Ä\", \"B\")");
    let mut s = setup(
        &spec_text,
        "sleep.csv",
        &[
            (
                "drug",
                "drug",
                ColumnKind::Categorical {
                    levels: Some(vec!["\u{c4}".to_owned(), "B".to_owned()]),
                    ordered: false,
                },
            ),
            (
                "extra_hours",
                "extra_hours",
                ColumnKind::Numeric { ratio: false },
            ),
        ],
    );
    // Read as UTF-8 the byte 0xC4 is an error whose help names the statement to write.
    let utf8 = s.only_error(&*bytes);
    assert_eq!(utf8.code, Code::NotUtf8);
    s.spec.format = FileFormat::Text(TextFormat {
        encoding: encoding_rs::WINDOWS_1252,
        ..TextFormat::default()
    });
    let error = s.only_error(&*bytes);
    assert_eq!(
        error.message,
        "sleep.csv row 3, column \"extra_hours\": \"x\" is not a number"
    );
    // The excerpt is the decoded text: "2,Ä," is four characters before the cell.
    assert_eq!(s.place(error.span().unwrap()), ("x", (3, 5)));
    let table = s.parse(
        &*encoding_rs::WINDOWS_1252
            .encode(&text.replace(",x", ",-1.6"))
            .0,
    );
    let table = table.expect("reads");
    assert_eq!(*table.categorical("drug").unwrap().1, ["\u{c4}", "B"]);
}

// ---------------------------------------------------------------------------------------------
// Caps

#[test]
fn d0020_a_row_longer_than_the_limit_stops_reading_without_holding_it() {
    // Row 3 of the sleep table with a 32 MiB cell, twice the default row limit: the reader
    // stops at the limit instead of holding the cell (or the file's text) in memory.
    let mut bytes = b"patient,drug,extra_hours\n1,A,0.7\n2,".to_vec();
    bytes.resize(bytes.len() + (32 << 20), b'A');
    bytes.extend_from_slice(b",-1.6\n");
    let mut s = sleep_setup("sleep.csv", false);
    let error = s.only_error(&bytes);
    assert_eq!(error.code, Code::RowTooLong);
    assert_eq!(
        error.message,
        "sleep.csv row 3: the row is longer than the limit of 16777216 bytes"
    );
    assert_eq!(
        s.place(error.span().unwrap()).0,
        "\"student1908-sleep.csv\""
    );
    assert_eq!(s.sources.files().len(), 1, "the file's text is not quoted");
    // A smaller limit, and a quote that never closes, which runs into it.
    let limits = ReadLimits {
        max_row_bytes: 64,
        ..ReadLimits::default()
    };
    let open = format!(
        "patient,drug,extra_hours\n\"1,A,0.7\n{}",
        "2,A,-1.6\n".repeat(20)
    );
    let errors = parse_table_with(&s.spec, open.as_bytes(), &mut s.sources, &limits).unwrap_err();
    assert_eq!(errors[0].code, Code::RowTooLong);
}

#[test]
fn d0021_too_many_distinct_values_without_declared_levels() {
    let mut s = setup(
        SLEEP_SPEC,
        "sleep.csv",
        &[(
            "patient",
            "patient",
            ColumnKind::Categorical {
                levels: None,
                ordered: false,
            },
        )],
    );
    let limits = ReadLimits {
        max_levels: 4,
        ..ReadLimits::default()
    };
    let errors =
        parse_table_with(&s.spec, sleep_text().as_bytes(), &mut s.sources, &limits).unwrap_err();
    assert_eq!(errors.len(), 1, "reported once per column");
    assert_eq!(errors[0].code, Code::TooManyLevels);
    assert_eq!(
        errors[0].message,
        "student1908-sleep.csv row 6, column \"patient\": \"5\" is one more distinct value \
         than patient may have without declared levels (4)"
            .replace("student1908-sleep.csv", "sleep.csv")
    );
    assert!(Setup::help(&errors[0]).contains("declare it `id`"));
}

#[test]
fn d0022_more_rows_than_the_limit() {
    let mut s = sleep_setup("sleep.csv", false);
    let limits = ReadLimits {
        max_rows: 19,
        ..ReadLimits::default()
    };
    let errors =
        parse_table_with(&s.spec, sleep_text().as_bytes(), &mut s.sources, &limits).unwrap_err();
    assert_eq!(errors.len(), 1);
    assert_eq!(errors[0].code, Code::TooManyRows);
    assert_eq!(
        errors[0].message,
        "data file sleep.csv has more than 19 data rows"
    );
    let exact = ReadLimits {
        max_rows: 20,
        ..ReadLimits::default()
    };
    assert!(parse_table_with(&s.spec, sleep_text().as_bytes(), &mut s.sources, &exact).is_ok());
}

// ---------------------------------------------------------------------------------------------
// Columns that are not read, and the file's text

#[test]
fn columns_no_figure_uses_are_only_looked_for_in_the_header() {
    // Every hour made "x": an error only when the column is read.
    let mut text = sleep_text();
    for row in 2..=21 {
        let line = text.lines().nth(row - 1).unwrap().to_owned();
        let (id_drug, _) = line.rsplit_once(',').unwrap();
        text = edit_row(&text, row, &format!("{id_drug},x"));
    }
    let mut s = sleep_setup("sleep.csv", false);
    s.spec.columns[2].read = false;
    let table = s.parse(&text).expect("the bad column is not read");
    assert!(table.column("extra_hours").is_none());
    assert_eq!(table.columns().count(), 2);
    // A declared column the header lacks is an error whether it is read or not.
    let missing = text.replace("extra_hours", "hours");
    assert_eq!(s.only_error(missing).code, Code::MissingColumn);
}

#[test]
fn the_text_of_a_file_is_added_only_when_a_message_quotes_it() {
    let mut s = sleep_setup("sleep.csv", false);
    s.parse(sleep_text()).expect("reads");
    assert_eq!(s.sources.files().len(), 1);
    let bad = edit_row(&sleep_text(), 2, "1,a,0.7");
    s.only_error(&bad);
    assert_eq!(s.sources.files().len(), 2);
    assert_eq!(s.sources.files()[1].text, bad);
    // An error about the file as a whole quotes nothing.
    s.only_error("");
    assert_eq!(s.sources.files().len(), 2);
}

// ---------------------------------------------------------------------------------------------
// Workbooks

#[path = "data_files/writers.rs"]
mod writers;

use writers::{PColumn, Sheet, XCell};

/// The sleep table as a sheet: ids and hours as numbers, drugs as shared strings, from `top`
/// (1-based row) and `left` (0-based column).
fn sleep_sheet(name: &str, top: u32, left: u32) -> Sheet<'_> {
    let text = Box::leak(sleep_text().into_boxed_str());
    let rows = text
        .lines()
        .enumerate()
        .map(|(i, line)| {
            let fields: Vec<&str> = line.split(',').collect();
            let cells = fields
                .iter()
                .enumerate()
                .map(|(j, f)| {
                    let cell = match f.parse::<f64>() {
                        Ok(v) if i > 0 => XCell::Num(v),
                        _ => XCell::Str(f),
                    };
                    (left + j as u32, cell)
                })
                .collect();
            (top + i as u32, cells)
        })
        .collect();
    Sheet { name, rows }
}

fn workbook_setup(path: &str) -> Setup {
    sleep_setup(path, false)
}

#[test]
fn a_workbook_sheet_reads_like_the_csv() {
    let mut csv = sleep_setup("sleep.csv", false);
    let expected = csv
        .parse(sleep_text())
        .expect("the CSV reads")
        .canonical_text();
    let bytes = writers::xlsx(&[sleep_sheet("Sleep", 1, 0)]);
    let mut s = workbook_setup("sleep.xlsx");
    let table = s.parse(&bytes).expect("the workbook reads");
    assert_eq!(table.canonical_text(), expected);
    assert_eq!(table.row_label(1).as_deref(), Some("sleep.xlsx row 3"));
    // From a file on disk too.
    let folder = tempfile::tempdir().expect("temp dir");
    let path = folder.path().join("sleep.xlsx");
    std::fs::write(&path, &bytes).expect("written");
    let mut s = workbook_setup(path.to_str().unwrap());
    let table = read_table(&s.spec, &mut s.sources).expect("reads from disk");
    assert_eq!(table.canonical_text(), expected);
}

#[test]
fn a_named_sheet_and_a_block_of_cells() {
    // The table on a second sheet, from cell C4, with a note above it and a total below it
    // that the block leaves out.
    let mut sheet = sleep_sheet("Data", 4, 2);
    sheet
        .rows
        .insert(0, (2, vec![(2, XCell::Str("Student (1908)"))]));
    sheet
        .rows
        .push((30, vec![(2, XCell::Str("total")), (4, XCell::Num(30.8))]));
    let bytes = writers::xlsx(&[
        Sheet {
            name: "Notes",
            rows: vec![(1, vec![(0, XCell::Str("x"))])],
        },
        sheet,
    ]);
    let mut s = workbook_setup("sleep.xlsx");
    s.spec.format = FileFormat::Workbook(WorkbookFormat {
        sheet: Some("Data".to_owned()),
        cells: CellRange::parse("C4:E24"),
    });
    let table = s.parse(&bytes).expect("the block reads");
    assert_eq!(table.n_rows(), 20);
    assert_eq!(table.row_label(0).as_deref(), Some("sleep.xlsx row 5"));
    // Without the block, the note is the header and the total a row.
    s.spec.format = FileFormat::Workbook(WorkbookFormat {
        sheet: Some("Data".to_owned()),
        cells: None,
    });
    let errors = s.errors(&bytes);
    assert_eq!(errors[0].code, Code::MissingColumn);
    // A sheet that is not there names the close one.
    s.spec.format = FileFormat::Workbook(WorkbookFormat {
        sheet: Some("data".to_owned()),
        cells: None,
    });
    let error = s.only_error(&bytes);
    assert_eq!(error.code, Code::NoSheet);
    assert_eq!(
        error.message,
        "data file sleep.xlsx has no sheet named \"data\""
    );
    assert_eq!(
        Setup::help(&error),
        "did you mean \"Data\"? sheet names match exactly"
    );
}

#[test]
fn workbook_cells_of_every_kind() {
    // Sleep rows 2–9, each cell edited to one kind of value a workbook holds.
    let rows = vec![
        (
            1,
            vec![
                (0, XCell::Str("patient")),
                (1, XCell::Str("drug")),
                (2, XCell::Str("extra_hours")),
            ],
        ),
        (
            2,
            vec![
                (0, XCell::Num(1.0)),
                (1, XCell::Inline("A")),
                (2, XCell::Inline(" 0.7 ")),
            ],
        ),
        (
            3,
            vec![
                (0, XCell::Num(2.0)),
                (1, XCell::Str("A")),
                (2, XCell::Error("#DIV/0!")),
            ],
        ),
        (
            5,
            vec![
                (0, XCell::Num(3.0)),
                (1, XCell::Bool(true)),
                (2, XCell::Num(-0.2)),
            ],
        ),
        (6, vec![(0, XCell::Inline("  "))]),
        (
            7,
            vec![
                (0, XCell::Num(4.0)),
                (1, XCell::Str("A")),
                (2, XCell::Date(45352.0)),
            ],
        ),
        (8, vec![(1, XCell::Str("B")), (2, XCell::Num(1.9))]),
        (9, vec![(0, XCell::Num(6.0)), (1, XCell::Str("B"))]),
    ];
    let bytes = writers::xlsx(&[Sheet {
        name: "Sleep",
        rows,
    }]);
    let mut s = workbook_setup("sleep.xlsx");
    let errors = s.errors(&bytes);
    let found: Vec<(Code, &str)> = errors
        .iter()
        .map(|e| (e.code, e.message.as_str()))
        .collect();
    assert_eq!(
        found,
        [
            (Code::NotANumber, "sleep.xlsx sheet \"Sleep\" row 3, column \"extra_hours\" (cell C3): \"#DIV/0!\" is not a number"),
            (Code::NotALevel, "sleep.xlsx sheet \"Sleep\" row 5, column \"drug\" (cell B5): \"TRUE\" is not a declared level"),
            (Code::NotANumber, "sleep.xlsx sheet \"Sleep\" row 7, column \"extra_hours\" (cell C7): \"2024-03-01\" is a date, not a number"),
            (Code::MissingId, "sleep.xlsx sheet \"Sleep\" row 8, column \"patient\" (cell A8): the id is missing (\"\" is a missing token)"),
        ]
    );
    assert!(Setup::help(&errors[0]).contains("spreadsheet error value"));
    // Labels point at the path in the spec, and the data file is named.
    assert_eq!(
        s.place(errors[0].span().unwrap()).0,
        "\"student1908-sleep.csv\""
    );
}

#[test]
fn d0023_files_that_are_not_workbooks_or_unpack_too_far() {
    let mut s = workbook_setup("sleep.xlsx");
    let error = s.only_error(sleep_text());
    assert_eq!(error.code, Code::NotAWorkbook);
    assert!(error
        .message
        .starts_with("data file sleep.xlsx cannot be read as an .xlsx workbook: "));
    let bytes = writers::xlsx(&[sleep_sheet("Sleep", 1, 0)]);
    let limits = ReadLimits {
        max_unpacked_bytes: 1000,
        ..ReadLimits::default()
    };
    let errors = parse_table_with(&s.spec, &bytes, &mut s.sources, &limits).unwrap_err();
    assert_eq!(errors[0].code, Code::NotAWorkbook);
    assert!(
        errors[0].message.contains("more than the limit of 1000"),
        "{}",
        errors[0].message
    );
}

// ---------------------------------------------------------------------------------------------
// Parquet files

/// The sleep table's columns: ids, drugs, hours.
type SleepColumns = (
    Vec<Option<i64>>,
    Vec<Option<&'static str>>,
    Vec<Option<f64>>,
);

fn sleep_columns() -> SleepColumns {
    let text = Box::leak(sleep_text().into_boxed_str());
    let mut ids = Vec::new();
    let mut drugs = Vec::new();
    let mut hours = Vec::new();
    for line in text.lines().skip(1) {
        let fields: Vec<&'static str> = line.split(',').collect();
        ids.push(fields[0].parse().ok());
        drugs.push(Some(fields[1]));
        hours.push(fields[2].parse().ok());
    }
    (ids, drugs, hours)
}

#[test]
fn a_parquet_file_reads_like_the_csv() {
    let mut csv = sleep_setup("sleep.csv", false);
    let expected = csv
        .parse(sleep_text())
        .expect("the CSV reads")
        .canonical_text();
    let (ids, drugs, hours) = sleep_columns();
    // Three row groups of 8, 8 and 4 rows, and an extra column that is not declared.
    let bytes = writers::parquet(
        &[
            PColumn::Bool("extra", vec![Some(true); 20]),
            PColumn::Int64("patient", ids),
            PColumn::Text("drug", drugs),
            PColumn::Double("extra_hours", hours),
        ],
        8,
    );
    let mut s = sleep_setup("sleep.parquet", false);
    let table = s.parse(&bytes).expect("the Parquet file reads");
    assert_eq!(table.canonical_text(), expected);
    assert_eq!(table.row_label(0).as_deref(), Some("sleep.parquet row 1"));
}

#[test]
fn parquet_nulls_dates_and_refused_types() {
    let (ids, mut drugs, mut hours) = sleep_columns();
    drugs[3] = Some("a");
    hours[5] = None;
    let bytes = writers::parquet(
        &[
            PColumn::Int64("patient", ids.clone()),
            PColumn::Text("drug", drugs),
            PColumn::Double("extra_hours", hours),
        ],
        100,
    );
    let mut s = sleep_setup("sleep.parquet", false);
    let error = s.only_error(&bytes);
    assert_eq!(
        error.message,
        "sleep.parquet row 4, column \"drug\": \"a\" is not a declared level"
    );
    // Dates are categories, not numbers: a date column for a numeric variable is refused once.
    let dates: Vec<Option<i32>> = (0..20).map(|i| Some(19_783 + i)).collect();
    let with_dates = writers::parquet(
        &[
            PColumn::Int64("patient", ids),
            PColumn::Text("drug", vec![Some("A"); 20]),
            PColumn::Int32("extra_hours", "(DATE)", dates),
        ],
        100,
    );
    let error = s.only_error(&with_dates);
    assert_eq!(error.code, Code::ColumnType);
    assert_eq!(
        error.message,
        "sleep.parquet column \"extra_hours\" holds dates, which cannot be read as numbers"
    );
    s.spec.columns[2].kind = ColumnKind::Categorical {
        levels: None,
        ordered: true,
    };
    let table = s.parse(&with_dates).expect("dates as levels");
    // 19783 days after 1970-01-01 is 2024-03-01 (common practice: Unix day numbers).
    assert_eq!(
        &table.categorical("extra_hours").unwrap().1[0],
        "2024-03-01"
    );
    // Not a Parquet file.
    let error = s.only_error(sleep_text());
    assert_eq!(error.code, Code::NotParquet);
}

#[test]
fn workbooks_and_parquet_files_never_panic_on_mutated_bytes() {
    let workbook = writers::xlsx(&[sleep_sheet("Sleep", 1, 0)]);
    let (ids, drugs, hours) = sleep_columns();
    let parquet = writers::parquet(
        &[
            PColumn::Int64("patient", ids),
            PColumn::Text("drug", drugs),
            PColumn::Double("extra_hours", hours),
        ],
        8,
    );
    let mut rng = Rng(0x2545_F491_4F6C_DD1D);
    for i in 0..400 {
        let (path, base) = if i % 2 == 0 {
            ("sleep.xlsx", &workbook)
        } else {
            ("sleep.parquet", &parquet)
        };
        let mut bytes = base.clone();
        for _ in 0..=rng.below(4) {
            let at = rng.below(bytes.len());
            bytes[at] = rng.next() as u8;
        }
        let mut s = sleep_setup(path, false);
        let outcome = s.parse(&bytes);
        check_outcome(&s, &outcome, &bytes);
    }
}

// ---------------------------------------------------------------------------------------------
// The examples in every format

/// Builds `specs` (file name → text) in a copy of the examples' data folder; the summary of
/// every figure built, by name.
fn build_summaries(specs: &[(&str, String)]) -> std::collections::BTreeMap<String, String> {
    let folder = tempfile::tempdir().expect("temp dir");
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("specs-examples");
    std::fs::create_dir(folder.path().join("data")).expect("data folder");
    for entry in std::fs::read_dir(examples.join("data")).expect("the examples' data") {
        let path = entry.expect("an entry").path();
        std::fs::copy(
            &path,
            folder.path().join("data").join(path.file_name().unwrap()),
        )
        .expect("copied");
    }
    for (name, text) in specs {
        std::fs::write(folder.path().join(name), text).expect("spec written");
    }
    let out = folder.path().join("out");
    let options = figura::build::BuildOptions {
        paths: vec![folder.path().to_path_buf()],
        out: Some(out.clone()),
        force: true,
        ..figura::build::BuildOptions::default()
    };
    let report = figura::build::build(&options, &figura::build::NoProgress).expect("builds");
    assert!(report.diagnostics.is_empty(), "{:#?}", report.diagnostics);
    std::fs::read_dir(&out)
        .expect("outputs")
        .filter_map(|e| {
            let path = e.ok()?.path();
            let name = path
                .file_name()?
                .to_str()?
                .strip_suffix(".summary.csv")?
                .to_owned();
            Some((name, std::fs::read_to_string(&path).ok()?))
        })
        .collect()
}

#[test]
fn the_workbook_parquet_and_semicolon_examples_give_the_numbers_of_the_csv() {
    // specs-examples/nests.figura reads one invented table in four formats; every figure is
    // built again from the plain CSV, and its summary must be the same to the last digit.
    let examples = Path::new(env!("CARGO_MANIFEST_DIR")).join("specs-examples");
    let spec = std::fs::read_to_string(examples.join("nests.figura")).expect("the example");
    let mut twin = spec.clone();
    for source in ["nests_workbook", "nests_export", "nests_semicolon"] {
        twin = twin.replace(&format!("from {source}\n"), "from nests\n");
    }
    for figure in ["egg_mass_by_meadow", "clutch_sizes", "egg_mass_means"] {
        twin = twin.replace(
            &format!("figure {figure} "),
            &format!("figure {figure}_csv "),
        );
    }
    let summaries = build_summaries(&[("nests.figura", spec), ("twin.figura", twin)]);
    for figure in ["egg_mass_by_meadow", "clutch_sizes", "egg_mass_means"] {
        let from_format = &summaries[figure];
        assert!(from_format.lines().count() > 5, "{figure}: {from_format}");
        assert_eq!(
            from_format,
            &summaries[&format!("{figure}_csv")],
            "{figure}"
        );
    }
    // The semicolon file's accented levels were decoded from windows-1252.
    assert!(summaries["egg_mass_means"].contains("Hölzliwiese"));
}

#[test]
fn a_table_of_no_column_read_still_has_its_rows() {
    // The sleep table in each format, with no column read: 20 rows, no columns.
    let (ids, drugs, hours) = sleep_columns();
    let files = [
        ("sleep.csv", sleep_text().into_bytes()),
        ("sleep.xlsx", writers::xlsx(&[sleep_sheet("Sleep", 1, 0)])),
        (
            "sleep.parquet",
            writers::parquet(
                &[
                    PColumn::Int64("patient", ids),
                    PColumn::Text("drug", drugs),
                    PColumn::Double("extra_hours", hours),
                ],
                8,
            ),
        ),
    ];
    for (path, bytes) in files {
        let mut s = sleep_setup(path, false);
        s.spec.columns.iter_mut().for_each(|c| c.read = false);
        let table = s.parse(&bytes).expect("reads");
        assert_eq!((table.n_rows(), table.columns().count()), (20, 0), "{path}");
    }
}
