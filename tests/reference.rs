//! The language reference (`grammar/README.md`) against the tables in the code: the layer
//! table (§6), the statistics of the summary (§11) and the diagnostic codes (§13) are
//! generated from the layer registry, the `Stat` table and the table of codes; this test fails
//! when they drift apart (`UPDATE_EXPECT=1` rewrites the generated parts). It also checks that
//! every code the reference names exists, and that every code has a test that produces it.

mod common;

use std::collections::BTreeSet;

use figura::diag::Code;

fn reference_path() -> std::path::PathBuf {
    common::root().join("grammar/README.md")
}

/// The reference with the generated part between `<!-- NAME:begin ... -->` and
/// `<!-- NAME:end -->` replaced by `table`.
fn with_generated(text: &str, name: &str, table: &str) -> String {
    let begin = format!("<!-- {name}:begin");
    let end = format!("<!-- {name}:end -->");
    let start = text
        .find(&begin)
        .unwrap_or_else(|| panic!("the reference has no {begin} marker"));
    let body = start + text[start..].find("-->\n").expect("a closed marker") + 4;
    let stop = text[body..]
        .find(&end)
        .map(|i| body + i)
        .unwrap_or_else(|| panic!("the reference has no {end} marker"));
    format!("{}{table}{}", &text[..body], &text[stop..])
}

#[test]
fn generated_tables_match_the_code() {
    let text = std::fs::read_to_string(reference_path()).unwrap();
    let mut expected = with_generated(&text, "layers", &figura::check::layer::reference_table());
    expected = with_generated(
        &expected,
        "stats",
        &figura::compute::layer::stat_reference_table(),
    );
    expected = with_generated(&expected, "codes", &figura::diag::codes::reference_table());
    common::expect_file(&reference_path(), &expected);
}

/// Every `F0123`-like code in `text`.
fn codes_named(text: &str) -> BTreeSet<String> {
    let bytes = text.as_bytes();
    (0..bytes.len().saturating_sub(4))
        .filter(|&i| {
            matches!(bytes[i], b'F' | b'W' | b'D' | b'P')
                && bytes[i + 1..i + 5].iter().all(u8::is_ascii_digit)
                && (i == 0 || !bytes[i - 1].is_ascii_alphanumeric())
                && bytes.get(i + 5).is_none_or(|b| !b.is_ascii_alphanumeric())
        })
        .map(|i| text[i..i + 5].to_string())
        .collect()
}

#[test]
fn every_code_the_reference_names_exists() {
    let text = std::fs::read_to_string(reference_path()).unwrap();
    let known: BTreeSet<&str> = Code::ALL.iter().map(|c| c.as_str()).collect();
    let unknown: Vec<String> = codes_named(&text)
        .into_iter()
        .filter(|c| !known.contains(c.as_str()))
        .collect();
    assert!(
        unknown.is_empty(),
        "the reference names unknown codes: {unknown:?}"
    );
}

/// The text of every test: runners, expected outputs and cases.
fn test_texts() -> String {
    let mut out = String::new();
    let mut stack = vec![common::root().join("tests")];
    while let Some(dir) = stack.pop() {
        for entry in std::fs::read_dir(&dir).unwrap().flatten() {
            let path = entry.path();
            if path.is_dir() {
                stack.push(path);
            } else if path.file_name().is_some_and(|n| n != "reference.rs")
                && path.extension().is_some_and(|e| {
                    ["rs", "expected", "errors", "py"].contains(&e.to_str().unwrap_or(""))
                })
            {
                out.push_str(&std::fs::read_to_string(&path).unwrap_or_default());
            }
        }
    }
    out
}

#[test]
fn every_code_has_a_test() {
    let texts = test_texts();
    let named = codes_named(&texts);
    // A test names a code by its text ("F0101") or by its name (`Code::UnknownVariable`).
    let untested: Vec<&str> = Code::ALL
        .iter()
        .filter(|c| !named.contains(c.as_str()) && !texts.contains(&format!("Code::{c:?}")))
        .map(|c| c.as_str())
        .collect();
    assert!(
        untested.is_empty(),
        "codes no test produces or names: {untested:?}"
    );
}
