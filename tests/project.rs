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

    /// Expects `needle` in what the command printed (standard output or error).
    fn expect_printed(&self, needle: &str) -> &Run {
        let found = self.stdout.contains(needle) || self.stderr.contains(needle);
        assert!(found, "{needle:?} not in\n{}", self.show());
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
            "a1.alt.txt",
            "a1.summary.csv",
            "a1.svg",
            "a2.alt.txt",
            "a2.summary.csv",
            "a2.svg",
            "b1.alt.txt",
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
        [MANIFEST, "b1.alt.txt", "b1.summary.csv", "b1.svg"]
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
    assert_eq!(one.len(), 10);
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
    // Outside a project and a git work tree, a spec reads only inside its own folder.
    let p = Project::new();
    p.write("specs/data/a.csv", &sleep_table());
    p.write(
        "specs/a.figura",
        &format!(
            "{}\n{}",
            sleep_block("s", "data/a.csv"),
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

/// `figura watch` started in the project's `figures/`, and its lines of standard error.
fn watch(p: &Project) -> (std::process::Child, mpsc::Receiver<String>) {
    let mut child = Command::new(env!("CARGO_BIN_EXE_figura"))
        .arg("watch")
        .current_dir(p.path("figures"))
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let rx = line_reader(&mut child);
    (child, rx)
}

#[test]
fn watch_rebuilds_the_figures_of_a_changed_data_file() {
    let p = Project::standard();
    let (mut child, rx) = watch(&p);
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
    let (mut child, rx) = watch(&p);
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

/// A figure of the sleep table with means and 95% intervals.
fn means_figure(name: &str, data: &str) -> String {
    format!(
        "figure {name} {{\n  from {data}\n  x drug\n  y extra\n  mean error(ci(0.95))\n  size 60mm x 45mm\n}}\n"
    )
}

#[test]
fn a_removed_figure_is_orphaned_until_a_build_removes_its_files_and_only_those() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    // Files Figura did not write, including one named like an output.
    p.write("figures/out/notes.txt", "mine");
    p.write("figures/out/zz.svg", "<svg/>");
    let spec = p.read("figures/a.figura");
    p.write(
        "figures/a.figura",
        &spec.replace(&figure("a2", "sleep_a"), ""),
    );
    fs::remove_file(p.path("figures/b.figura")).unwrap();

    let check = p.run("figures", &["build", "--check"]);
    check.expect_code(1);
    check.expect_printed("orphaned a2 (out/a2.alt.txt, a2.summary.csv, a2.svg)");
    assert!(check.stderr.contains("orphaned b1 ("), "{}", check.show());
    check.expect_printed("1 up to date, 0 stale, 0 missing, 0 failing, 2 orphaned");
    assert!(
        p.path("figures/out/a2.svg").is_file(),
        "--check removes nothing"
    );

    let build = p.run(".", &["build"]);
    build.expect_code(0);
    assert!(build.stderr.contains("removed  a2 ("), "{}", build.show());
    let left: Vec<String> = p.contents("figures/out").into_keys().collect();
    assert_eq!(
        left,
        [
            ".figura-manifest.json",
            "a1.alt.txt",
            "a1.summary.csv",
            "a1.svg",
            "notes.txt",
            "zz.svg"
        ]
    );
    let manifest = p.read("figures/out/.figura-manifest.json");
    assert!(
        !manifest.contains("\"a2\"") && !manifest.contains("\"b1\""),
        "{manifest}"
    );
    p.run(".", &["build", "--check"]).expect_code(0);
}

#[test]
fn an_output_a_figure_no_longer_makes_is_removed() {
    let p = Project::standard();
    let toml = p.read("figura.toml");
    p.write(
        "figura.toml",
        &toml.replace("[\"svg\"]", "[\"svg\", \"png\"]"),
    );
    p.run(".", &["build"]).expect_code(0);
    assert!(p.path("figures/out/a1.png").is_file());
    p.write("figura.toml", &toml);
    p.run(".", &["build"]).expect_code(0);
    assert!(!p.path("figures/out/a1.png").exists());
    assert!(p.path("figures/out/a1.svg").is_file());
}

#[test]
fn a_failing_figure_keeps_its_old_outputs_listed_so_they_are_pruned_later() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    // Edit: patient 1 under drug A becomes "many" in a.csv, a data error for a1 and a2.
    p.write("data/a.csv", &sleep_table_edited("many"));
    p.run(".", &["build"]).expect_code(1);
    assert!(
        p.path("figures/out/a1.svg").is_file(),
        "a failure removes nothing"
    );
    let spec = p.read("figures/a.figura");
    p.write(
        "figures/a.figura",
        &spec.replace(&figure("a1", "sleep_a"), ""),
    );
    p.run(".", &["build"]).expect_code(1);
    assert!(!p.path("figures/out/a1.svg").exists());
    assert!(!p.path("figures/out/a1.summary.csv").exists());
}

#[test]
fn an_edited_manifest_cannot_make_figura_delete_other_files() {
    let p = Project::standard();
    p.run(".", &["build"]).expect_code(0);
    let manifest = p.read("figures/out/.figura-manifest.json");
    // An orphan entry whose outputs point at the data and at a spec.
    let planted = manifest.replacen(
        "\"figures\": {",
        "\"figures\": {\n    \"gone\": {\"spec\": \"../gone.figura\", \"inputs\": \"x\", \"outputs\": {\"../../data/a.csv\": \"x\", \"../a.figura\": \"x\", \"gone.svg\": \"x\"}},",
        1,
    );
    assert_ne!(planted, manifest);
    p.write("figures/out/.figura-manifest.json", &planted);
    p.write("figures/out/gone.svg", "<svg/>");
    p.run(".", &["build"]).expect_code(0);
    assert!(p.path("data/a.csv").is_file());
    assert!(p.path("figures/a.figura").is_file());
    assert!(!p.path("figures/out/gone.svg").exists());
    // clean, likewise.
    p.write("figures/out/.figura-manifest.json", &planted);
    p.run(".", &["clean"]).expect_code(0);
    assert!(p.path("data/a.csv").is_file());
    assert!(p.path("figures/a.figura").is_file());
}

#[test]
fn clean_removes_every_output_and_nothing_else() {
    let p = Project::standard();
    let toml = p.read("figura.toml");
    p.write(
        "figura.toml",
        &toml.replace(
            "out = \"figures/out\"",
            "out = \"figures/out\"\nnumbers = [\"tex\"]",
        ),
    );
    p.run(".", &["build"]).expect_code(0);
    p.write("figures/out/notes.txt", "mine");
    let clean = p.run("figures", &["clean"]);
    clean.expect_code(0);
    clean.expect_printed("removed out/a1.svg");
    clean.expect_printed("removed out/numbers.tex");
    // Nine outputs of three figures, the numbers file and the manifest.
    clean.expect_printed("11 files removed\n");
    let left: Vec<String> = p.contents("figures/out").into_keys().collect();
    assert_eq!(left, ["notes.txt"]);
    // With nothing else left, the folder goes too.
    fs::remove_file(p.path("figures/out/notes.txt")).unwrap();
    p.run(".", &["build"]).expect_code(0);
    let clean = p.run(".", &["clean"]);
    clean.expect_printed("and the empty output folder");
    assert!(!p.path("figures/out").exists());
    assert!(p.path("data/a.csv").is_file() && p.path("figures/a.figura").is_file());
}

/// The numbers project: the standard project with a figure of means and the three numbers
/// files.
fn numbers_project() -> Project {
    let p = Project::standard();
    let toml = p.read("figura.toml");
    p.write(
        "figura.toml",
        &toml.replace(
            "out = \"figures/out\"",
            "out = \"figures/out\"\nnumbers = [\"tex\", \"typ\", \"json\"]",
        ),
    );
    p.write(
        "figures/means.figura",
        &format!(
            "include \"b.figura\"\n\n{}",
            means_figure("sleep_means", "sleep_b")
        ),
    );
    p
}

#[test]
fn numbers_files_quote_every_number_rounded_by_its_interval() {
    let p = numbers_project();
    p.run(".", &["build"]).expect_code(0);
    // Student (1908): drug A (dextro-) mean +0.75 h, drug B (laevo-) mean +2.33 h over ten
    // patients. 95% interval: mean ± t(0.975, 9) · s / √10 with t(0.975, 9) = 2.2622 (t
    // tables) and s the sample standard deviation (n − 1) computed here from the table:
    // A [−0.53, 2.03], B [0.90, 3.76]. Their widths, 2.6 and 2.9 h, have two significant
    // digits at the first decimal, so every number of the cell has one decimal.
    let table = sleep_table();
    let extra = |drug: &str| -> Vec<f64> {
        table
            .lines()
            .skip(1)
            .filter(|l| l.split(',').nth(1) == Some(drug))
            .map(|l| l.split(',').nth(2).unwrap().parse().unwrap())
            .collect()
    };
    let interval = |v: &[f64]| {
        let n = v.len() as f64;
        let m = v.iter().sum::<f64>() / n;
        let s = (v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
        let half = 2.262_157_162_8 * s / n.sqrt();
        (m, m - half, m + half)
    };
    let (ma, la, ha) = interval(&extra("A"));
    let (mb, lb, hb) = interval(&extra("B"));
    assert!((ma - 0.75).abs() < 1e-12 && (mb - 2.33).abs() < 1e-12);
    assert_eq!(
        format!("{la:.1} {ha:.1} {lb:.1} {hb:.1}"),
        "-0.5 2.0 0.9 3.8"
    );

    let json: serde_json::Value =
        serde_json::from_str(&p.read("figures/out/numbers.json")).unwrap();
    let entry = |stat: &str, cell: &str| json["figures"]["sleep_means"][stat][cell].clone();
    assert_eq!(entry("mean", "A")["text"], "0.8\u{a0}h");
    assert_eq!(entry("mean", "B")["text"], "2.3\u{a0}h");
    assert_eq!(entry("mean", "B")["value"], 2.33);
    assert_eq!(entry("ci", "A")["text"], "[\u{2212}0.5, 2.0]");
    assert_eq!(entry("mean.ci", "B")["text"], "[0.9, 3.8]");
    assert_eq!(entry("n", "B")["text"], "10");
    // The box of b1: median (1.6 + 1.9) / 2 = 1.75 h and quartiles 0.875 and 4.15 h
    // (Hyndman & Fan definition 7 on the sorted B values); the interquartile range 3.275 h
    // gives one decimal, and 1.75 (exact in binary) rounds half to even: 1.8.
    assert_eq!(
        json["figures"]["b1"]["box.median"]["B"]["text"],
        "1.8\u{a0}h"
    );
    assert_eq!(json["figures"]["b1"]["box.q1"]["B"]["text"], "0.9\u{a0}h");

    let tex = p.read("figures/out/numbers.tex");
    assert!(
        tex.contains(r"\figura@def{sleep_means}{ci}{A}{[\ensuremath{-}0.5, 2.0]}"),
        "{tex}"
    );
    assert!(
        tex.contains(r"\figura@def{sleep_means}{mean}{B}{2.3~h}{2.3}"),
        "{tex}"
    );
    let typ = p.read("figures/out/numbers.typ");
    assert!(typ.contains("\"B\": (text: \"2.3\u{a0}h\", number: \"2.3\", value: 2.33),"));
}

#[test]
fn numbers_files_are_outputs_incremental_and_checked() {
    let p = numbers_project();
    p.run(".", &["build"]).expect_code(0);
    p.run(".", &["build", "--check"]).expect_code(0);
    let before = p.mtimes("figures/out");
    tick();
    // A no-op build writes nothing; a change to a.csv (not quoted by sleep_means, but by a1,
    // a2) makes the numbers again, and they keep sleep_means' numbers.
    p.run(".", &["build"]).expect_code(0);
    assert!(rewritten(&before, &p.mtimes("figures/out")).is_empty());
    p.write("data/a.csv", &sleep_table_edited("2.7"));
    let check = p.run(".", &["build", "--check"]);
    check.expect_code(1);
    check.expect_printed("stale    numbers (figures/out/numbers.tex, numbers.typ, numbers.json)");
    p.run(".", &["build"]).expect_code(0);
    let json = p.read("figures/out/numbers.json");
    assert!(json.contains("\"sleep_means\""), "{json}");
    p.run(".", &["build", "--check"]).expect_code(0);
    // A number edited by hand is found.
    let tex = p.read("figures/out/numbers.tex");
    p.write(
        "figures/out/numbers.tex",
        &tex.replace("{2.3~h}", "{2.4~h}"),
    );
    let check = p.run(".", &["build", "--check"]);
    check.expect_code(1);
    check.expect_printed("stale    numbers");
    p.run(".", &["build"]).expect_code(0);
    assert!(p.read("figures/out/numbers.tex").contains("{2.3~h}"));
    // Turning the numbers off removes their files.
    let toml = p.read("figura.toml");
    p.write(
        "figura.toml",
        &toml.replace("numbers = [\"tex\", \"typ\", \"json\"]\n", ""),
    );
    p.run(".", &["build"]).expect_code(0);
    assert!(!p.path("figures/out/numbers.tex").exists());
}

#[test]
fn an_unknown_numbers_format_is_an_error_at_its_value() {
    let p = Project::standard();
    p.write("figura.toml", "[project]\nnumbers = [\"tex\", \"docx\"]\n");
    let run = p.run(".", &["build"]);
    run.expect_code(1);
    run.expect_printed("P0003");
    run.expect_printed("\"docx\" is not a numbers format");
    run.expect_printed("figura.toml:2:");
}

/// Copies the example specs, data, project file and manuscripts (not their outputs) into a
/// new folder.
fn copy_examples(to: &Path) {
    fn copy(from: &Path, to: &Path) {
        fs::create_dir_all(to).unwrap();
        for e in fs::read_dir(from).unwrap() {
            let e = e.unwrap();
            let name = e.file_name();
            if name == "out" || name == "images" {
                continue;
            }
            if e.path().is_dir() {
                copy(&e.path(), &to.join(&name));
            } else {
                fs::copy(e.path(), to.join(&name)).unwrap();
            }
        }
    }
    copy(&common::root().join("specs-examples"), to);
}

/// Runs a tool in `dir` and returns its standard output; fails with its output if it fails.
fn tool(dir: &Path, program: &str, args: &[&str]) -> String {
    let out = Command::new(program)
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap_or_else(|e| {
            panic!("{program} cannot run ({e}): install it with `bash .ci/run` or apt-get")
        });
    assert!(
        out.status.success(),
        "{program} {args:?}:\n{}\n{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// The text of a PDF, with runs of white space made one space.
fn pdf_text(dir: &Path, pdf: &str) -> String {
    tool(dir, "pdftotext", &[pdf, "-"])
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

/// Mean and 95% interval of the morning paper speeds of the reading example's data, with
/// t(0.975, 23) = 2.0687 (t tables) and the sample standard deviation (n − 1): common
/// practice, computed here from the file, not by Figura.
fn morning_paper(csv: &str) -> (f64, f64, f64) {
    let v: Vec<f64> = csv
        .lines()
        .skip(1)
        .filter(|l| l.contains(",paper,morning,"))
        .map(|l| l.split(',').nth(3).unwrap().parse().unwrap())
        .collect();
    assert_eq!(v.len(), 24);
    let n = v.len() as f64;
    let m = v.iter().sum::<f64>() / n;
    let s = (v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
    let half = 2.068_657_610_419 * s / n.sqrt();
    (m, m - half, m + half)
}

/// The unit of reading speed (`words·min^-1^`) as pdftotext reads it from the LaTeX
/// manuscript, where it is set with `\textsuperscript`.
const SPEED_UNIT_LATEX: &str = "words·min-1";
/// The same unit in the Typst manuscript, which quotes it in Unicode superscripts.
const SPEED_UNIT_TYPST: &str = "words·min⁻¹";

/// The quote of a mean and its interval as the manuscript should read: decimals that give
/// the interval's width two significant digits (at least none).
fn quoted(m: f64, lo: f64, hi: f64) -> (String, String) {
    let d = (1 - (hi - lo).log10().floor() as i32).max(0) as usize;
    (
        format!("{m:.d$} {SPEED_UNIT_LATEX}"),
        format!("[{lo:.d$}, {hi:.d$}]"),
    )
}

#[test]
fn the_example_manuscripts_quote_numbers_that_follow_the_data() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("examples");
    copy_examples(&dir);
    let figura = |args: &[&str]| {
        Run::from(
            Command::new(env!("CARGO_BIN_EXE_figura"))
                .args(args)
                .current_dir(&dir)
                .output()
                .unwrap(),
        )
    };
    figura(&["build"]).expect_code(0);
    let compile = || {
        tool(
            &dir,
            "pdflatex",
            &[
                "-interaction=nonstopmode",
                "-halt-on-error",
                "manuscript.tex",
            ],
        );
        pdf_text(&dir, "manuscript.pdf")
    };
    let csv = fs::read_to_string(dir.join("data/reading.csv")).unwrap();
    let (m, lo, hi) = morning_paper(&csv);
    let (mean, ci) = quoted(m, lo, hi);
    assert_eq!(
        (mean.as_str(), ci.as_str()),
        ("243 words·min-1", "[228, 257]")
    );
    let text = compile();
    let sentence = format!("read paper at a mean of {mean} (95% CI {ci})");
    assert!(text.contains(&sentence), "{sentence:?} not in\n{text}");
    assert!(
        text.contains("where 23 of 24 readers have a value"),
        "{text}"
    );

    // The Typst manuscript quotes the same numbers.
    tool(
        &dir,
        "python3",
        &[
            "-c",
            "import typst; typst.compile('manuscript.typ', output='manuscript-typst.pdf')",
        ],
    );
    let typst_text = pdf_text(&dir, "manuscript-typst.pdf");
    let sentence = sentence.replace(SPEED_UNIT_LATEX, SPEED_UNIT_TYPST);
    assert!(
        typst_text.contains(&sentence),
        "{sentence:?} not in\n{typst_text}"
    );

    // A corrected value: reader R01's morning paper speed 262.7 → 362.7 words/min.
    let edited = csv.replacen("R01,paper,morning,262.7,", "R01,paper,morning,362.7,", 1);
    assert_ne!(edited, csv);
    fs::write(dir.join("data/reading.csv"), &edited).unwrap();
    let check = figura(&["build", "--check"]);
    check.expect_code(1);
    assert!(
        check.stderr.contains("stale    numbers (out/numbers.tex"),
        "{}",
        check.show()
    );
    figura(&["build"]).expect_code(0);
    figura(&["build", "--check"]).expect_code(0);
    let (m2, lo2, hi2) = morning_paper(&edited);
    let (mean2, ci2) = quoted(m2, lo2, hi2);
    assert_ne!(mean2, mean);
    let text = compile();
    let sentence = format!("read paper at a mean of {mean2} (95% CI {ci2})");
    assert!(text.contains(&sentence), "{sentence:?} not in\n{text}");
}
