//! Projects and incremental builds, run through the `figura` command on temporary projects.
//!
//! Data: `tests/data_files/student1908-sleep.csv` (Student 1908, "The probable error of a
//! mean", Biometrika 6(1): 1–25; provenance in `tests/data_files/README.md`). Where a test
//! needs a second or a changed data file it edits one cell of that table and says which.
//!
//! What is checked: exactly the figures whose inputs changed are rebuilt (data, a figure
//! block, an included file, the project defaults, the tool version); outputs of other figures
//! are not rewritten (their modification time stays); `build --check` writes nothing and tells
//! stale and missing figures apart; a failing figure does not stop the others; no temporary
//! file is left behind; `figura.toml` is found from a subfolder and its errors point at the
//! key; `new`, `list` and `watch` work as a new user would use them.

mod common;

use std::collections::BTreeMap;
use std::fs;
use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::sync::mpsc;
use std::time::{Duration, SystemTime};

use figura::build::{self, BuildOptions, FigureState, NoProgress};

const MANIFEST: &str = ".figura-manifest.json";

fn sleep_table() -> String {
    fs::read_to_string(common::root().join("tests/data_files/student1908-sleep.csv")).unwrap()
}

/// The sleep table with patient 1's value under drug A changed from 0.7 to `value`.
fn sleep_table_edited(value: &str) -> String {
    let table = sleep_table();
    assert!(table.contains("\n1,A,0.7\n"));
    table.replace("\n1,A,0.7\n", &format!("\n1,A,{value}\n"))
}

/// A data block over the sleep table at `path`, named `name`.
fn sleep_block(name: &str, path: &str) -> String {
    format!(
        r#"data {name} "{path}" {{
  patient: id
  drug: nominal levels("A", "B")
  extra: interval column("extra_hours") label("Extra sleep") unit("h")
  subject patient
  within drug
}}
"#
    )
}

/// A small figure of data block `data`.
fn figure(name: &str, data: &str) -> String {
    format!(
        "figure {name} {{\n  from {data}\n  x drug\n  y extra\n  points\n  box\n  size 60mm x 45mm\n}}\n"
    )
}

/// A temporary project folder.
struct Project {
    dir: tempfile::TempDir,
}

impl Project {
    fn new() -> Project {
        Project {
            dir: tempfile::tempdir().unwrap(),
        }
    }

    /// The standard test project: `figures/a.figura` (figures a1, a2 of data/a.csv) and
    /// `figures/b.figura` (figure b1 of data/b.csv), outputs in figures/out, svg only.
    fn standard() -> Project {
        let p = Project::new();
        p.write(
            "figura.toml",
            "[project]\nspecs = [\"figures\"]\nout = \"figures/out\"\n\n[defaults]\nformats = [\"svg\"]\n",
        );
        p.write("data/a.csv", &sleep_table());
        p.write("data/b.csv", &sleep_table());
        p.write(
            "figures/a.figura",
            &format!(
                "{}\n{}\n{}",
                sleep_block("sleep_a", "../data/a.csv"),
                figure("a1", "sleep_a"),
                figure("a2", "sleep_a")
            ),
        );
        p.write(
            "figures/b.figura",
            &format!(
                "{}\n{}",
                sleep_block("sleep_b", "../data/b.csv"),
                figure("b1", "sleep_b")
            ),
        );
        p
    }

    fn path(&self, rel: &str) -> PathBuf {
        self.dir.path().join(rel)
    }

    fn write(&self, rel: &str, text: &str) {
        let path = self.path(rel);
        fs::create_dir_all(path.parent().unwrap()).unwrap();
        fs::write(path, text).unwrap();
    }

    fn read(&self, rel: &str) -> String {
        fs::read_to_string(self.path(rel)).unwrap()
    }

    /// Runs `figura ARGS` in the subfolder `cwd` of the project.
    fn run(&self, cwd: &str, args: &[&str]) -> Run {
        let output = Command::new(env!("CARGO_BIN_EXE_figura"))
            .args(args)
            .current_dir(self.path(cwd))
            .output()
            .unwrap();
        Run::from(output)
    }

    /// Modification time of every file below `rel`, by path.
    fn mtimes(&self, rel: &str) -> BTreeMap<PathBuf, SystemTime> {
        files_below(&self.path(rel))
            .into_iter()
            .map(|p| {
                let t = fs::metadata(&p).unwrap().modified().unwrap();
                (p, t)
            })
            .collect()
    }

    /// Content of every file below `rel`, by file name.
    fn contents(&self, rel: &str) -> BTreeMap<String, Vec<u8>> {
        files_below(&self.path(rel))
            .into_iter()
            .map(|p| {
                let name = p.file_name().unwrap().to_string_lossy().into_owned();
                (name, fs::read(&p).unwrap())
            })
            .collect()
    }
}

fn files_below(dir: &Path) -> Vec<PathBuf> {
    let mut out = Vec::new();
    let Ok(entries) = fs::read_dir(dir) else {
        return out;
    };
    for e in entries {
        let p = e.unwrap().path();
        if p.is_dir() {
            out.extend(files_below(&p));
        } else {
            out.push(p);
        }
    }
    out.sort();
    out
}

/// One finished command.
struct Run {
    code: i32,
    stdout: String,
    stderr: String,
}

impl From<Output> for Run {
    fn from(o: Output) -> Run {
        Run {
            code: o.status.code().unwrap_or(-1),
            stdout: String::from_utf8_lossy(&o.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&o.stderr).into_owned(),
        }
    }
}

impl Run {
    fn show(&self) -> String {
        format!(
            "exit {}\n--- stdout\n{}--- stderr\n{}",
            self.code, self.stdout, self.stderr
        )
    }

    fn expect_code(&self, code: i32) -> &Run {
        assert_eq!(self.code, code, "{}", self.show());
        self
    }

    /// The closing line of a build, without its time: "2 built, 1 up to date, 0 failed".
    fn counts(&self) -> String {
        let line = self
            .stderr
            .lines()
            .rev()
            .find(|l| l.contains(" built, "))
            .unwrap_or_else(|| panic!("no closing line\n{}", self.show()));
        line.split(" in ").next().unwrap().to_string()
    }

    /// The rows of `figura list`'s table, cells split at runs of two or more spaces.
    fn rows(&self) -> Vec<Vec<String>> {
        self.stdout
            .lines()
            .map(|l| {
                l.split("  ")
                    .map(str::trim)
                    .filter(|c| !c.is_empty())
                    .map(str::to_string)
                    .collect()
            })
            .collect()
    }

    /// The figures named in "built NAME" progress lines, sorted.
    fn built(&self) -> Vec<String> {
        let mut names: Vec<String> = self
            .stderr
            .lines()
            .filter_map(|l| l.strip_prefix("built "))
            .map(str::to_string)
            .collect();
        names.sort();
        names
    }
}

fn row(cells: &[&str]) -> Vec<String> {
    cells.iter().map(|c| c.to_string()).collect()
}

/// The output files that changed between two snapshots of modification times.
fn rewritten(
    before: &BTreeMap<PathBuf, SystemTime>,
    after: &BTreeMap<PathBuf, SystemTime>,
) -> Vec<String> {
    let mut out: Vec<String> = after
        .iter()
        .filter(|(p, t)| before.get(*p) != Some(*t))
        .map(|(p, _)| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    out.sort();
    out
}

/// Waits long enough that a rewritten file gets a new modification time on any file system
/// (some record whole seconds, common practice; this is not a timing measurement).
fn tick() {
    std::thread::sleep(Duration::from_millis(1100));
}

#[test]
fn a_build_from_a_subfolder_builds_the_whole_project_and_a_second_does_nothing() {
    let p = Project::standard();
    let first = p.run("figures", &["build"]);
    first.expect_code(0);
    assert_eq!(
        first.counts(),
        "3 built, 0 up to date, 0 failed",
        "{}",
        first.show()
    );
    assert_eq!(first.built(), ["a1", "a2", "b1"]);
    let names: Vec<String> = p.contents("figures/out").into_keys().collect();
    assert_eq!(
        names,
        [
            MANIFEST,
            "a1.summary.csv",
            "a1.svg",
            "a2.summary.csv",
            "a2.svg",
            "b1.summary.csv",
            "b1.svg"
        ]
    );
    let before = p.mtimes("figures/out");
    tick();
    let second = p.run("data", &["build"]);
    second.expect_code(0);
    assert_eq!(second.counts(), "0 built, 3 up to date, 0 failed");
    assert_eq!(
        rewritten(&before, &p.mtimes("figures/out")),
        Vec::<String>::new()
    );
}

#[test]
fn changing_one_data_file_rebuilds_exactly_its_figures() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let before = p.mtimes("figures/out");
    let old_b1 = p.read("figures/out/b1.summary.csv");
    tick();
    // Edit: patient 1 under drug A, 0.7 → 2.7 (in b.csv only).
    p.write("data/b.csv", &sleep_table_edited("2.7"));
    let run = p.run(".", &["build"]);
    run.expect_code(0);
    assert_eq!(run.counts(), "1 built, 2 up to date, 0 failed");
    assert_eq!(run.built(), ["b1"]);
    assert_eq!(
        rewritten(&before, &p.mtimes("figures/out")),
        [MANIFEST, "b1.summary.csv", "b1.svg"]
    );
    assert_ne!(old_b1, p.read("figures/out/b1.summary.csv"));
}

#[test]
fn changing_one_figure_block_rebuilds_only_that_figure() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let spec = p.read("figures/a.figura");
    let a2 = figure("a2", "sleep_a");
    let changed = a2.replace("size 60mm x 45mm", "size 64mm x 45mm");
    p.write("figures/a.figura", &spec.replace(&a2, &changed));
    let run = p.run(".", &["build"]);
    assert_eq!(run.counts(), "1 built, 2 up to date, 0 failed");
    assert_eq!(run.built(), ["a2"]);
}

#[test]
fn a_comment_outside_figure_blocks_rebuilds_the_figures_of_that_file_only() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let spec = p.read("figures/a.figura");
    p.write("figures/a.figura", &format!("# a note\n{spec}"));
    let run = p.run(".", &["build"]);
    // A comment belongs to no block: nothing to rebuild.
    assert_eq!(run.counts(), "0 built, 3 up to date, 0 failed");
    // A data block is shared by the figures of its file: all of them rebuild.
    let spec = p.read("figures/a.figura");
    p.write(
        "figures/a.figura",
        &spec.replace("label(\"Extra sleep\")", "label(\"Extra sleep, hours\")"),
    );
    let run = p.run(".", &["build"]);
    assert_eq!(run.counts(), "2 built, 1 up to date, 0 failed");
    assert_eq!(run.built(), ["a1", "a2"]);
}

#[test]
fn changing_an_included_file_rebuilds_the_figures_that_include_it() {
    let p = Project::standard();
    p.write(
        "figures/codebooks/sleep.figura",
        &sleep_block("sleep_c", "../../data/a.csv"),
    );
    p.write(
        "figures/c.figura",
        &format!(
            "include \"codebooks/sleep.figura\"\n\n{}",
            figure("c1", "sleep_c")
        ),
    );
    let first = p.run(".", &["build"]);
    assert_eq!(
        first.counts(),
        "4 built, 0 up to date, 0 failed",
        "{}",
        first.show()
    );
    let book = p.read("figures/codebooks/sleep.figura");
    p.write(
        "figures/codebooks/sleep.figura",
        &book.replace("unit(\"h\")", "unit(\"hours\")"),
    );
    let run = p.run(".", &["build"]);
    assert_eq!(run.counts(), "1 built, 3 up to date, 0 failed");
    assert_eq!(run.built(), ["c1"]);
}

#[test]
fn changing_the_project_defaults_rebuilds_every_figure() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let toml = p.read("figura.toml");
    p.write(
        "figura.toml",
        &toml.replace(
            "formats = [\"svg\"]",
            "formats = [\"svg\", \"png\"]\ndpi = 60",
        ),
    );
    let run = p.run(".", &["build"]);
    assert_eq!(run.counts(), "3 built, 0 up to date, 0 failed");
    let png = fs::read(p.path("figures/out/a1.png")).unwrap();
    // PNG pHYs chunk: pixels per metre, 60 dpi → round(60 / 0.0254) = 2362 (PNG spec 11.3.5.3).
    let phys = png.windows(4).position(|w| w == b"pHYs").unwrap();
    let ppm = u32::from_be_bytes(png[phys + 4..phys + 8].try_into().unwrap());
    assert_eq!(ppm, 2362);
    // A figure's own `formats` wins over the defaults.
    let spec = p.read("figures/b.figura");
    p.write(
        "figures/b.figura",
        &spec.replace("  points\n", "  points\n  formats pdf\n"),
    );
    p.run(".", &["build"]).expect_code(0);
    assert!(p.path("figures/out/b1.pdf").is_file());
}

#[test]
fn a_new_tool_version_rebuilds_every_figure() {
    let p = Project::standard();
    let options = |version: &str| BuildOptions {
        paths: vec![p.path("figures")],
        out: Some(p.path("figures/out")),
        tool_version: version.to_string(),
        ..BuildOptions::default()
    };
    let states = |version: &str| -> Vec<FigureState> {
        let report = build::build(&options(version), &NoProgress).unwrap();
        report.figures.iter().map(|f| f.state).collect()
    };
    assert_eq!(states("1.0.0"), [FigureState::Built; 3]);
    assert_eq!(states("1.0.0"), [FigureState::UpToDate; 3]);
    assert_eq!(states("1.0.1"), [FigureState::Built; 3]);
    assert_eq!(states("1.0.1"), [FigureState::UpToDate; 3]);
}

#[test]
fn force_rebuilds_every_figure_but_leaves_identical_files_alone() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let before = p.mtimes("figures/out");
    tick();
    let run = p.run(".", &["build", "--force"]);
    assert_eq!(run.counts(), "3 built, 0 up to date, 0 failed");
    assert_eq!(
        rewritten(&before, &p.mtimes("figures/out")),
        Vec::<String>::new()
    );
}

#[test]
fn check_writes_nothing_and_names_each_stale_or_missing_figure() {
    let p = Project::standard();
    let missing = p.run(".", &["build", "--check"]);
    missing.expect_code(1);
    assert!(!p.path("figures/out").exists(), "--check wrote files");
    for name in ["a1", "a2", "b1"] {
        assert!(
            missing.stderr.contains(&format!("missing  {name} (")),
            "{}",
            missing.show()
        );
    }
    p.run(".", &["build"]).expect_code(0);
    let clean = p.run("figures", &["build", "--check"]);
    clean.expect_code(0);
    assert!(clean
        .stderr
        .contains("3 up to date, 0 stale, 0 missing, 0 failing"));

    // Edit: patient 1 under drug A, 0.7 → 1.7 (in a.csv); and b1's SVG removed.
    p.write("data/a.csv", &sleep_table_edited("1.7"));
    fs::remove_file(p.path("figures/out/b1.svg")).unwrap();
    let before = p.contents("figures/out");
    let stale = p.run(".", &["build", "--check"]);
    stale.expect_code(1);
    assert!(
        stale.stderr.contains("stale    a1 (figures/a.figura)"),
        "{}",
        stale.show()
    );
    assert!(stale.stderr.contains("stale    a2 (figures/a.figura)"));
    assert!(stale.stderr.contains("missing  b1 (figures/b.figura)"));
    assert!(stale
        .stderr
        .contains("0 up to date, 2 stale, 1 missing, 0 failing"));
    assert_eq!(
        before,
        p.contents("figures/out"),
        "--check changed the outputs"
    );

    // An output edited by hand is stale too.
    p.run(".", &["build"]).expect_code(0);
    p.write("figures/out/a1.summary.csv", "edited\n");
    let edited = p.run(".", &["build", "--check"]);
    edited.expect_code(1);
    assert!(edited.stderr.contains("stale    a1 ("));
}

#[test]
fn a_failing_figure_is_reported_and_the_others_still_build() {
    let p = Project::standard();
    // Edit: patient 1 under drug A, 0.7 → "lots" (not a number) in b.csv.
    p.write("data/b.csv", &sleep_table_edited("lots"));
    let spec = p.read("figures/a.figura");
    p.write(
        "figures/a.figura",
        &format!(
            "{spec}\n{}",
            figure("a3", "sleep_a").replace("y extra", "y extr")
        ),
    );
    let run = p.run(".", &["build"]);
    run.expect_code(1);
    assert_eq!(
        run.counts(),
        "2 built, 0 up to date, 2 failed",
        "{}",
        run.show()
    );
    assert!(run.stderr.contains("failed b1"));
    assert!(run.stderr.contains("\"lots\""), "{}", run.show());
    assert!(run.stderr.contains("extr"));
    assert!(p.path("figures/out/a1.svg").is_file());
    assert!(p.path("figures/out/a2.svg").is_file());
    assert!(!p.path("figures/out/b1.svg").exists());
    let rows = p.run(".", &["list"]).rows();
    assert!(
        rows.contains(&row(&["b1", "figures/b.figura", "data/b.csv", "failing"])),
        "{rows:?}"
    );
    assert!(
        rows.contains(&row(&["a3", "figures/a.figura", "-", "failing"])),
        "{rows:?}"
    );
    // Fixing the data builds the failed figure; the others stay.
    p.write("data/b.csv", &sleep_table());
    let fixed = p.run(".", &["build"]);
    assert_eq!(fixed.counts(), "1 built, 2 up to date, 1 failed");
    assert_eq!(fixed.built(), ["b1"]);
}

#[test]
fn an_unwritable_output_fails_that_figure_only_and_leaves_no_temporary_file() {
    let p = Project::standard();
    // A folder where a1's SVG should go: the rename onto it fails.
    fs::create_dir_all(p.path("figures/out/a1.svg")).unwrap();
    let run = p.run(".", &["build"]);
    run.expect_code(2);
    assert_eq!(
        run.counts(),
        "2 built, 0 up to date, 1 failed",
        "{}",
        run.show()
    );
    assert!(run.stderr.contains("a1.svg"), "{}", run.show());
    assert!(p.path("figures/out/a2.svg").is_file());
    assert!(p.path("figures/out/b1.svg").is_file());
    let leftovers: Vec<PathBuf> = files_below(p.dir.path())
        .into_iter()
        .filter(|f| f.to_string_lossy().ends_with(".figura-tmp"))
        .collect();
    assert!(leftovers.is_empty(), "temporary files left: {leftovers:?}");
}

#[test]
fn two_figures_of_one_name_is_an_error_naming_both_files() {
    let p = Project::standard();
    p.write(
        "figures/more/b.figura",
        &format!(
            "{}\n{}",
            sleep_block("sleep_b2", "../../data/b.csv"),
            figure("b1", "sleep_b2")
        ),
    );
    let run = p.run(".", &["build"]);
    run.expect_code(1);
    assert!(
        run.stderr.contains("two figures are named `b1`"),
        "{}",
        run.show()
    );
    assert!(run.stderr.contains("figures/b.figura"), "{}", run.show());
    assert!(
        run.stderr.contains("figures/more/b.figura"),
        "{}",
        run.show()
    );
}

#[test]
fn the_same_bytes_whatever_the_number_of_jobs() {
    let p = Project::standard();
    p.run(".", &["build", "--jobs", "1", "--out", "one"])
        .expect_code(0);
    p.run(".", &["build", "--jobs", "3", "--out", "three"])
        .expect_code(0);
    let one = p.contents("one");
    assert_eq!(one.len(), 7);
    assert_eq!(one, p.contents("three"));
}

#[test]
fn unknown_keys_in_the_project_file_are_errors_at_their_line() {
    let p = Project::standard();
    p.write(
        "figura.toml",
        "[project]\nspecs = [\"figures\"]\n\n[defaults]\nformat = [\"svg\"]\ndpi = \"high\"\n",
    );
    let run = p.run("figures", &["build"]);
    run.expect_code(1);
    assert!(
        run.stderr
            .contains("`defaults.format` is not a setting of figura.toml"),
        "{}",
        run.show()
    );
    assert!(run.stderr.contains("figura.toml:5:1"), "{}", run.show());
    assert!(run.stderr.contains("did you mean `defaults.formats`?"));
    assert!(run.stderr.contains("`dpi` is a whole number, not a string"));
    assert!(run.stderr.contains("figura.toml:6:7"), "{}", run.show());
    assert!(!p.path("figures/out").exists());
}

#[test]
fn explicit_paths_outside_a_project_still_build_beside_the_spec() {
    let p = Project::new();
    p.write("data/a.csv", &sleep_table());
    p.write(
        "specs/a.figura",
        &format!(
            "{}\n{}",
            sleep_block("s", "../data/a.csv"),
            figure("only", "s")
        ),
    );
    let run = p.run(".", &["build", "specs/a.figura"]);
    run.expect_code(0);
    assert!(p.path("specs/out/only.svg").is_file());
    assert!(p.path("specs/out/only.png").is_file());
    assert!(p.path("specs/out").join(MANIFEST).is_file());
}

#[test]
fn removed_figures_leave_the_manifest() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let spec = p.read("figures/a.figura");
    p.write(
        "figures/a.figura",
        &spec.replace(&figure("a2", "sleep_a"), ""),
    );
    p.run(".", &["build"]).expect_code(0);
    let manifest = p.read("figures/out/.figura-manifest.json");
    assert!(manifest.contains("\"a1\""));
    assert!(!manifest.contains("\"a2\""), "{manifest}");
    assert!(manifest.contains("\"spec\": \"../b.figura\""), "{manifest}");
}

#[test]
fn new_makes_a_project_that_builds_at_once() {
    let p = Project::new();
    let made = p.run(".", &["new", "paper"]);
    made.expect_code(0);
    for file in [
        "figura.toml",
        ".gitignore",
        "data/basil.csv",
        "figures/basil.figura",
    ] {
        assert!(p.path("paper").join(file).is_file(), "{file} missing");
    }
    let run = p.run("paper/figures", &["build"]);
    run.expect_code(0);
    assert_eq!(
        run.counts(),
        "2 built, 0 up to date, 0 failed",
        "{}",
        run.show()
    );
    assert!(
        run.stderr.contains("0 errors, 0 warnings"),
        "{}",
        run.show()
    );
    for file in [
        "height_by_watering.svg",
        "height_by_watering.png",
        "growth_by_week.png",
    ] {
        assert!(p.path("paper/figures/out").join(file).is_file());
    }
    p.run("paper", &["build", "--check"]).expect_code(0);
    // Never over existing work.
    let again = p.run(".", &["new", "paper"]);
    again.expect_code(2);
    assert!(again.stderr.contains("not empty"));
}

#[test]
fn list_shows_each_figure_with_its_spec_data_and_state() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    // Edit: patient 1 under drug A, 0.7 → 1.7 (in b.csv).
    p.write("data/b.csv", &sleep_table_edited("1.7"));
    let list = p.run("figures", &["list"]);
    list.expect_code(0);
    common::expect_file(&common::root().join("tests/project/list.txt"), &list.stdout);
}

/// Reads lines of a child's standard error on a thread, so a test can wait with a limit.
fn line_reader(child: &mut std::process::Child) -> mpsc::Receiver<String> {
    let (tx, rx) = mpsc::channel();
    let stderr = child.stderr.take().unwrap();
    std::thread::spawn(move || {
        for line in BufReader::new(stderr).lines() {
            if tx.send(line.unwrap_or_default()).is_err() {
                break;
            }
        }
    });
    rx
}

/// Waits (at most a minute) for a line containing `needle`; returns every line read.
fn wait_for(rx: &mpsc::Receiver<String>, needle: &str) -> Vec<String> {
    let mut seen = Vec::new();
    loop {
        match rx.recv_timeout(Duration::from_secs(60)) {
            Ok(line) => {
                let found = line.contains(needle);
                seen.push(line);
                if found {
                    return seen;
                }
            }
            Err(_) => panic!("no line with {needle:?}; read:\n{}", seen.join("\n")),
        }
    }
}

#[test]
fn watch_rebuilds_the_figures_of_a_changed_data_file() {
    let p = Project::standard();
    let mut child = Command::new(env!("CARGO_BIN_EXE_figura"))
        .arg("watch")
        .current_dir(p.path("figures"))
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let rx = line_reader(&mut child);
    let first = wait_for(&rx, "watching for changes");
    assert!(
        first.iter().any(|l| l.starts_with("3 built, 0 up to date")),
        "{first:?}"
    );
    // Edit: patient 1 under drug A, 0.7 → 2.7 (in a.csv).
    p.write("data/a.csv", &sleep_table_edited("2.7"));
    let second = wait_for(&rx, " up to date, ");
    // Edit: the same cell to "many" — a data error, printed as it comes.
    p.write("data/a.csv", &sleep_table_edited("many"));
    let third = wait_for(&rx, " up to date, ");
    child.kill().unwrap();
    child.wait().unwrap();
    assert!(
        second.iter().any(|l| l.contains("data/a.csv")),
        "{second:?}"
    );
    assert!(
        second
            .iter()
            .any(|l| l.starts_with("2 built, 1 up to date, 0 failed")),
        "{second:?}"
    );
    assert!(third.iter().any(|l| l.contains("\"many\"")), "{third:?}");
    assert!(
        third
            .iter()
            .any(|l| l.starts_with("0 built, 1 up to date, 2 failed")),
        "{third:?}"
    );
}

/// A process that reads every output file again and again (as a viewer refreshing its
/// picture would), until it is killed.
fn keep_reading(dir: &Path) -> std::process::Child {
    Command::new("sh")
        .arg("-c")
        .arg("while :; do for f in out/*; do cat \"$f\" >/dev/null 2>&1; done; sleep 0.05; done")
        .current_dir(dir)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap()
}

/// The closing line of the next round, after its `changed:` line.
fn next_round(rx: &mpsc::Receiver<String>) -> (String, String) {
    let lines = wait_for(rx, " up to date, ");
    let changed = lines
        .iter()
        .rev()
        .find(|l| l.starts_with("changed: "))
        .cloned()
        .unwrap_or_else(|| panic!("no changed line: {lines:?}"));
    let closing = lines
        .last()
        .unwrap()
        .split(" in ")
        .next()
        .unwrap()
        .to_string();
    (changed, closing)
}

#[test]
fn watch_rebuilds_on_every_save_of_a_spec_in_any_style_while_outputs_are_read() {
    let p = Project::standard();
    let mut child = Command::new(env!("CARGO_BIN_EXE_figura"))
        .arg("watch")
        .current_dir(p.path("figures"))
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let rx = line_reader(&mut child);
    wait_for(&rx, "watching for changes");
    let mut reader = keep_reading(&p.path("figures"));
    let spec = p.path("figures/a.figura");
    let size = |n: u32| {
        format!("figure a1 {{\n  from sleep_a\n  x drug\n  y extra\n  points\n  box\n  size {n}mm x 45mm\n}}\n")
    };
    let original = p.read("figures/a.figura");
    assert!(original.contains(&size(60)));
    let mut rounds = Vec::new();

    // 1. Written in place.
    fs::write(&spec, original.replace(&size(60), &size(61))).unwrap();
    rounds.push(next_round(&rx));
    // 2. `sed -i`: a new file renamed over the old one by sed itself.
    let sed = Command::new("sed")
        .args(["-i", "s/size 61mm/size 62mm/", spec.to_str().unwrap()])
        .status()
        .unwrap();
    assert!(sed.success());
    rounds.push(next_round(&rx));
    // 3. An editor's atomic save: a hidden temporary file, then a rename.
    let tmp = p.path("figures/.a.figura.swp");
    fs::write(
        &tmp,
        p.read("figures/a.figura").replace(&size(62), &size(63)),
    )
    .unwrap();
    fs::rename(&tmp, &spec).unwrap();
    rounds.push(next_round(&rx));
    // 4. A new spec file.
    p.write(
        "figures/c.figura",
        &format!("include \"a.figura\"\n\n{}", figure("c1", "sleep_a")),
    );
    rounds.push(next_round(&rx));
    // 5. The new spec file deleted again: its figure's outputs are pruned.
    fs::remove_file(p.path("figures/c.figura")).unwrap();
    rounds.push(next_round(&rx));

    reader.kill().unwrap();
    reader.wait().unwrap();
    child.kill().unwrap();
    child.wait().unwrap();
    let expected = [
        ("a.figura", "1 built, 2 up to date, 0 failed"),
        ("a.figura", "1 built, 2 up to date, 0 failed"),
        ("a.figura", "1 built, 2 up to date, 0 failed"),
        ("c.figura", "1 built, 3 up to date, 0 failed"),
        ("c.figura", "0 built, 3 up to date, 0 failed"),
    ];
    for ((changed, closing), (file, counts)) in rounds.iter().zip(expected) {
        assert!(changed.contains(file), "{rounds:?}");
        assert_eq!(closing, counts, "{rounds:?}");
    }
    assert!(p.read("figures/out/a1.svg").contains("63mm"));
    assert!(!p.path("figures/out/c1.svg").exists());
    p.run("figures", &["build", "--check"]).expect_code(0);
}
