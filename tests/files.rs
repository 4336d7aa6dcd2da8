//! Spec files that include each other, and project files (`figura.toml`), through the library's
//! build: a missing include (F0220), an include cycle (F0221), a project file that is not TOML
//! (P0001), an unknown key (P0002) and a value of the wrong type (P0003). Each case asserts the
//! code and the file the diagnostic points into. The files are small invented specs.

use std::path::Path;

use figura::build::{self, BuildOptions, NoProgress};
use figura::diag::Code;

const BOOK: &str = "data d \"d.csv\" {\n  g: nominal\n}\n";
const FIGURE: &str = "figure f {\n  from d\n  x g\n  counts\n}\n";

/// Builds `spec` in a folder holding `files`; returns every diagnostic's code and the name of
/// the file its primary label points into (or that it names).
fn codes_of(files: &[(&str, &str)], spec: &str) -> Vec<(Code, String)> {
    let dir = tempfile::tempdir().unwrap();
    for (name, text) in files {
        let path = dir.path().join(name);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(path, text).unwrap();
    }
    let options = BuildOptions {
        paths: vec![dir.path().join(spec)],
        out: Some(dir.path().join("out")),
        ..BuildOptions::default()
    };
    let report = match build::build(&options, &NoProgress) {
        Ok(report) => report,
        Err(e) => panic!("the build runs: {e}"),
    };
    report
        .diagnostics
        .iter()
        .map(|d| {
            let file = match d.span() {
                Some(s) => report.sources.path(s.source).to_path_buf(),
                None => d.file.clone().unwrap_or_default(),
            };
            let name = file.file_name().map(|n| n.to_string_lossy().into_owned());
            (d.code, name.unwrap_or_default())
        })
        .collect()
}

#[test]
fn a_missing_include_is_reported_at_the_include() {
    let main = format!("include \"shared.figura\"\n\n{FIGURE}");
    let codes = codes_of(
        &[("main.figura", &main), ("d.csv", "g\na\n")],
        "main.figura",
    );
    assert!(
        codes.contains(&(Code::IncludeMissing, "main.figura".into())),
        "{codes:?}"
    );
}

#[test]
fn files_that_include_each_other_are_a_cycle() {
    let a = format!("include \"b.figura\"\n{BOOK}\n{FIGURE}");
    let b = "include \"a.figura\"\n";
    let codes = codes_of(
        &[("a.figura", &a), ("b.figura", b), ("d.csv", "g\na\n")],
        "a.figura",
    );
    assert!(
        codes.iter().any(|(c, _)| *c == Code::IncludeCycle),
        "{codes:?}"
    );
}

/// Builds a project whose `figura.toml` is `toml`, from its `figures/` folder.
fn project_codes(toml: &str) -> Vec<Code> {
    let dir = tempfile::tempdir().unwrap();
    let write = |name: &str, text: &str| {
        let path = dir.path().join(name);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(path, text).unwrap();
    };
    write("figura.toml", toml);
    write("figures/a.figura", &format!("{BOOK}\n{FIGURE}"));
    write("figures/d.csv", "g\na\n");
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(["build", "--message-format", "json"])
        .current_dir(dir.path().join("figures"))
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(1),
        "a bad project file fails the run"
    );
    String::from_utf8_lossy(&out.stderr)
        .lines()
        .filter_map(|l| serde_json::from_str::<serde_json::Value>(l).ok())
        .filter(|v| {
            v["file"]
                .as_str()
                .is_some_and(|f| Path::new(f).ends_with("figura.toml"))
        })
        .filter_map(|v| {
            let text = v["code"].as_str()?.to_string();
            Code::ALL.iter().copied().find(|c| c.as_str() == text)
        })
        .collect()
}

#[test]
fn a_project_file_that_is_not_toml_is_p0001() {
    assert_eq!(project_codes("[project\nspecs = 3\n"), [Code::NotToml]);
}

#[test]
fn unknown_keys_and_wrong_values_are_p0002_and_p0003() {
    let codes = project_codes(
        "[project]\nspecs = [\"figures\"]\ncolour = 1\n\n[defaults]\ndpi = \"high\"\n",
    );
    assert_eq!(codes, [Code::UnknownKey, Code::BadValue]);
}
