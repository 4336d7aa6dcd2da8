//! What a spec from someone else's branch can touch, through the `figura` binary: paths stay
//! inside the project (`../`, absolute paths, links to outside, `out` in figura.toml), only
//! regular files are read (a FIFO, `/dev/zero`), the folder walk follows no link (links to
//! `.`, a link to `/usr`), outputs are never written through planted links and stale
//! temporary files are removed, text that cannot be written is a diagnostic, a panic in one
//! figure does not stop the others, and `figura diff` never shows a file from outside.
//!
//! Every run has a time limit, so a hang is a failure, never a stuck test. The tables are
//! small invented ones. Unix only (links, FIFOs and devices).
#![cfg(unix)]

use std::os::unix::fs::symlink;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use serde_json::Value;

mod common;
use common::git;

/// A secret that must never appear in any output, diagnostic or report.
const SECRET: &str = "TOP-SECRET-7f3a";

const TABLE: &str = "runner,shoe,time\nR1,road,61.2\nR2,trail,64.0\nR3,road,58.9\nR4,trail,66.1\n";

/// A spec reading `data` with one figure, `times`.
fn spec(data: &str) -> String {
    format!(
        "data trial \"{data}\" {{\n  runner: id\n  shoe: nominal levels(\"road\", \"trail\")\n  \
         time: ratio\n  subject runner\n}}\n\nfigure times {{\n  from trial\n  x shoe\n  y time\n  \
         points\n  box\n  formats svg\n}}\n"
    )
}

/// A temporary folder to lay out a case in.
struct Tree {
    _tmp: tempfile::TempDir,
    root: PathBuf,
}

impl Tree {
    fn new() -> Tree {
        let tmp = tempfile::tempdir().unwrap();
        let root = tmp.path().canonicalize().unwrap();
        Tree { _tmp: tmp, root }
    }

    fn path(&self, rel: &str) -> PathBuf {
        self.root.join(rel)
    }

    fn write(&self, rel: &str, text: &str) -> PathBuf {
        let path = self.path(rel);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(&path, text).unwrap();
        path
    }

    fn link(&self, rel: &str, target: impl AsRef<Path>) {
        let path = self.path(rel);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        symlink(target, path).unwrap();
    }

    fn fifo(&self, rel: &str) {
        let path = self.path(rel);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        let made = Command::new("mkfifo")
            .arg(&path)
            .status()
            .expect("mkfifo runs");
        assert!(made.success());
    }

    /// The secret file outside every project of the case.
    fn secret(&self) -> PathBuf {
        self.write(
            "outside/secret.csv",
            &format!("runner,shoe,time\n{SECRET},road,1\n"),
        )
    }
}

struct Run {
    code: i32,
    stdout: String,
    stderr: String,
}

impl Run {
    fn show(&self) -> String {
        format!(
            "exit {}\n--- stdout\n{}--- stderr\n{}",
            self.code, self.stdout, self.stderr
        )
    }

    fn json(&self) -> Vec<Value> {
        self.stderr
            .lines()
            .filter_map(|l| serde_json::from_str(l).ok())
            .collect()
    }

    fn codes(&self) -> Vec<String> {
        self.json()
            .iter()
            .filter_map(|d| d["code"].as_str().map(str::to_owned))
            .collect()
    }

    fn assert_secret_kept(&self) {
        assert!(!self.stderr.contains(SECRET), "{}", self.show());
        assert!(!self.stdout.contains(SECRET), "{}", self.show());
    }
}

/// Runs `figura` in `dir`, killing it (and failing) after 60 s: a hang is a failure.
fn figura(dir: &Path, args: &[&str]) -> Run {
    let mut child = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(dir)
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("run figura");
    let started = Instant::now();
    while child.try_wait().unwrap().is_none() {
        if started.elapsed() > Duration::from_secs(60) {
            let _ = child.kill();
            panic!("figura {args:?} hung in {}", dir.display());
        }
        std::thread::sleep(Duration::from_millis(20));
    }
    let out = child.wait_with_output().unwrap();
    let run = Run {
        code: out.status.code().expect("figura exits with a status"),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    };
    assert!(!run.stderr.contains("panicked"), "{}", run.show());
    run
}

fn build_json(dir: &Path, spec: &str) -> Run {
    figura(dir, &["build", spec, "--message-format", "json"])
}

// ---- containment -------------------------------------------------------------------------

#[test]
fn a_data_path_up_and_out_of_the_spec_folder_is_refused() {
    let t = Tree::new();
    t.secret();
    t.write("specs/a.figura", &spec("../outside/secret.csv"));
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.code, 1, "{}", run.show());
    assert_eq!(run.codes(), ["F0225"], "{}", run.show());
    run.assert_secret_kept();
    assert!(!t.path("specs/out/times.svg").exists());
    // The human message says how far paths may lead and how to widen it.
    let human = figura(&t.path("specs"), &["check", "a.figura"]);
    assert!(human.stderr.contains("allow-outside"), "{}", human.show());
    human.assert_secret_kept();
}

#[test]
fn an_absolute_data_path_is_refused() {
    let t = Tree::new();
    let secret = t.secret();
    t.write("specs/a.figura", &spec(secret.to_str().unwrap()));
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.codes(), ["F0225"], "{}", run.show());
    run.assert_secret_kept();
}

#[test]
fn a_link_inside_the_project_to_a_file_outside_is_refused() {
    let t = Tree::new();
    let secret = t.secret();
    t.link("specs/data.csv", &secret);
    t.write("specs/a.figura", &spec("data.csv"));
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.codes(), ["F0225"], "{}", run.show());
    run.assert_secret_kept();
    // A linked folder too.
    let t = Tree::new();
    t.secret();
    t.link("specs/data", t.path("outside"));
    t.write("specs/a.figura", &spec("data/secret.csv"));
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.codes(), ["F0225"], "{}", run.show());
    run.assert_secret_kept();
}

#[test]
fn includes_stay_inside_the_project_and_name_spec_files() {
    let t = Tree::new();
    t.write(
        "outside/other.figura",
        &format!("data {SECRET} \"x.csv\" {{ broken ( }}\n"),
    );
    t.write("specs/notes.txt", &format!("{SECRET} is not a spec\n"));
    t.write("specs/data.csv", TABLE);
    let base = spec("data.csv");
    t.write(
        "specs/a.figura",
        &format!("include \"../outside/other.figura\"\n{base}"),
    );
    t.write("specs/b.figura", &format!("include \"notes.txt\"\n{base}"));
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.codes(), ["F0225"], "{}", run.show());
    run.assert_secret_kept();
    let run = build_json(&t.path("specs"), "b.figura");
    assert_eq!(run.codes(), ["F0220"], "{}", run.show());
    run.assert_secret_kept();
}

#[test]
fn the_project_root_is_the_folder_of_figura_toml_or_the_work_tree() {
    // With a figura.toml above, a spec in figures/ reads ../data.
    let t = Tree::new();
    t.write("figura.toml", "[project]\nspecs = [\"figures\"]\n");
    t.write("data/times.csv", TABLE);
    t.write("figures/a.figura", &spec("../data/times.csv"));
    let run = figura(&t.path("figures"), &["build"]);
    assert_eq!(run.code, 0, "{}", run.show());
    assert!(t.path("figures/out/times.svg").is_file());
    // Without one, the top of the git work tree is the root.
    let t = Tree::new();
    std::fs::create_dir(t.path(".git")).unwrap();
    t.write("data/times.csv", TABLE);
    t.write("figures/a.figura", &spec("../data/times.csv"));
    let run = figura(&t.path("figures"), &["build", "a.figura"]);
    assert_eq!(run.code, 0, "{}", run.show());
}

#[test]
fn allow_outside_opens_a_folder() {
    let t = Tree::new();
    t.write("shared-data/times.csv", TABLE);
    t.write(
        "paper/figures/a.figura",
        &spec("../../shared-data/times.csv"),
    );
    t.write("paper/figura.toml", "[project]\nspecs = [\"figures\"]\n");
    let refused = figura(&t.path("paper"), &["build", "--message-format", "json"]);
    assert_eq!(refused.codes(), ["F0225"], "{}", refused.show());
    t.write(
        "paper/figura.toml",
        "[project]\nspecs = [\"figures\"]\nallow-outside = [\"../shared-data\"]\n",
    );
    let run = figura(&t.path("paper"), &["build"]);
    assert_eq!(run.code, 0, "{}", run.show());
    assert!(t.path("paper/figures/out/times.svg").is_file());
}

#[test]
fn an_output_folder_outside_the_project_in_figura_toml_is_refused() {
    for out in ["../elsewhere", "/tmp/figura-never-written-here"] {
        let t = Tree::new();
        t.write("paper/data.csv", TABLE);
        t.write("paper/a.figura", &spec("data.csv"));
        t.write(
            "paper/figura.toml",
            &format!("[project]\nout = \"{out}\"\n"),
        );
        let run = figura(&t.path("paper"), &["build", "--message-format", "json"]);
        assert_eq!(run.code, 1, "{out}: {}", run.show());
        assert_eq!(run.codes(), ["P0004"], "{}", run.show());
        assert!(!t.path("elsewhere").exists());
        assert!(!Path::new("/tmp/figura-never-written-here").exists());
    }
}

#[test]
fn an_output_folder_linked_to_outside_is_not_written() {
    let t = Tree::new();
    std::fs::create_dir_all(t.path("victim")).unwrap();
    t.write("specs/data.csv", TABLE);
    t.write("specs/a.figura", &spec("data.csv"));
    t.link("specs/out", t.path("victim"));
    let run = figura(&t.path("specs"), &["build", "a.figura"]);
    assert_eq!(run.code, 2, "{}", run.show());
    assert!(run.stderr.contains("leads outside"), "{}", run.show());
    assert_eq!(std::fs::read_dir(t.path("victim")).unwrap().count(), 0);
    // The closing line counts the failure as an error.
    assert!(
        run.stderr.contains("0 built, 0 up to date, 1 failed")
            && run.stderr.contains("; 1 error, 0 warnings"),
        "{}",
        run.show()
    );
}

// ---- safe writes -------------------------------------------------------------------------

#[test]
fn planted_links_at_output_and_temporary_names_are_replaced_not_followed() {
    let t = Tree::new();
    let victim = t.write("victim.txt", "precious\n");
    t.write("specs/data.csv", TABLE);
    t.write("specs/a.figura", &spec("data.csv"));
    t.link("specs/out/times.svg", &victim);
    t.link("specs/out/times.summary.csv", &victim);
    // The names the old writer used: `.NAME.PID.figura-tmp` for the next few process ids.
    for pid in 1..2_000 {
        t.link(&format!("specs/out/.times.svg.{pid}.figura-tmp"), &victim);
    }
    let run = figura(&t.path("specs"), &["build", "a.figura"]);
    assert_eq!(run.code, 0, "{}", run.show());
    assert_eq!(std::fs::read_to_string(&victim).unwrap(), "precious\n");
    let svg = std::fs::symlink_metadata(t.path("specs/out/times.svg")).unwrap();
    assert!(svg.is_file(), "the link was replaced by the output");
    assert!(std::fs::read_to_string(t.path("specs/out/times.svg"))
        .unwrap()
        .starts_with("<svg"));
}

#[test]
fn temporary_files_left_by_a_killed_build_are_removed() {
    let t = Tree::new();
    t.write("specs/data.csv", TABLE);
    t.write("specs/a.figura", &spec("data.csv"));
    let stale = t.write("specs/out/.times.svg.4242.figura-tmp", "half a figure");
    let run = figura(&t.path("specs"), &["build", "a.figura"]);
    assert_eq!(run.code, 0, "{}", run.show());
    assert!(!stale.exists());
    let left: Vec<String> = std::fs::read_dir(t.path("specs/out"))
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with("figura-tmp"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
}

// ---- special files -----------------------------------------------------------------------

#[test]
fn a_fifo_as_data_is_refused_at_once() {
    let t = Tree::new();
    t.fifo("specs/data.csv");
    t.write("specs/a.figura", &spec("data.csv"));
    // `build --check` reads no data: the FIFO is not hashed, so the figure is missing.
    let run = figura(&t.path("specs"), &["build", "--check", "a.figura"]);
    assert_eq!(run.code, 1, "{}", run.show());
    assert!(run.stderr.contains("missing  times"), "{}", run.show());
    for args in [
        &["build", "a.figura", "--message-format", "json"][..],
        &["check", "a.figura", "--message-format", "json"],
    ] {
        let run = figura(&t.path("specs"), args);
        assert_eq!(run.code, 1, "{args:?}: {}", run.show());
        let first = &run.json()[0];
        assert_eq!(first["code"], "D0001", "{}", run.show());
        assert!(
            first["message"].as_str().unwrap().contains("named pipe"),
            "{}",
            run.show()
        );
    }
}

#[test]
fn devices_as_data_are_refused_at_once() {
    for device in ["/dev/zero", "/dev/urandom"] {
        let t = Tree::new();
        t.write(
            "paper/figura.toml",
            "[project]\nallow-outside = [\"/dev\"]\n",
        );
        t.link("paper/data.csv", device);
        t.write("paper/a.figura", &spec("data.csv"));
        let run = figura(&t.path("paper"), &["build", "--message-format", "json"]);
        assert_eq!(run.code, 1, "{device}: {}", run.show());
        assert_eq!(run.json()[0]["code"], "D0001", "{}", run.show());
        assert!(run.stderr.contains("a device"), "{}", run.show());
    }
}

#[test]
fn special_files_among_specs_and_outputs_never_block() {
    let t = Tree::new();
    t.write("specs/data.csv", TABLE);
    t.write("specs/a.figura", &spec("data.csv"));
    // A FIFO that looks like a spec is not a spec file of the folder.
    t.fifo("specs/trap.figura");
    // A FIFO as the manifest and as an output: neither is read.
    t.fifo("specs/out/.figura-manifest.json");
    t.fifo("specs/out/times.svg");
    let run = figura(&t.path("specs"), &["build"]);
    assert_eq!(run.code, 0, "{}", run.show());
    assert!(std::fs::symlink_metadata(t.path("specs/out/times.svg"))
        .unwrap()
        .is_file());
    // Named on the command line, a FIFO is an error at once.
    let run = figura(&t.path("specs"), &["build", "trap.figura"]);
    assert_eq!(run.code, 2, "{}", run.show());
    assert!(run.stderr.contains("named pipe"), "{}", run.show());
}

#[test]
fn the_folder_walk_follows_no_link() {
    let t = Tree::new();
    t.write("specs/data.csv", TABLE);
    t.write("specs/a.figura", &spec("data.csv"));
    t.link("specs/loop1", ".");
    t.link("specs/loop2", ".");
    t.link("specs/system", "/usr");
    t.link("specs/b.figura", t.path("specs/a.figura"));
    let run = figura(&t.path("specs"), &["list"]);
    assert_eq!(run.code, 0, "{}", run.show());
    let rows: Vec<&str> = run.stdout.lines().skip(1).collect();
    assert_eq!(rows.len(), 1, "only a.figura's figure: {}", run.show());
    assert!(rows[0].contains("a.figura"), "{}", run.show());
}

// ---- text that cannot be written, panics --------------------------------------------------

#[test]
fn characters_an_svg_cannot_hold_are_located_diagnostics() {
    let t = Tree::new();
    t.write("specs/data.csv", TABLE);
    let with_title =
        spec("data.csv").replace("  points\n", "  title \"odd \u{FFFF} title\"\n  points\n");
    t.write("specs/a.figura", &with_title);
    let run = build_json(&t.path("specs"), "a.figura");
    assert_eq!(run.code, 1, "{}", run.show());
    let first = &run.json()[0];
    assert_eq!(first["code"], "F0020");
    assert_eq!(
        (first["line"].as_u64(), first["column"].as_u64()),
        (Some(12), Some(14))
    );

    t.write(
        "specs/data.csv",
        "runner,shoe,time\nR1,road,61.2\nR2,tr\u{1}ail,64.0\n",
    );
    t.write(
        "specs/b.figura",
        &spec("data.csv").replace(" levels(\"road\", \"trail\")", ""),
    );
    let run = build_json(&t.path("specs"), "b.figura");
    assert_eq!(run.code, 1, "{}", run.show());
    assert_eq!(run.codes(), ["D0020"], "{}", run.show());
    assert!(!run.stderr.contains("internal error"), "{}", run.show());
}

#[test]
fn a_panic_in_one_figure_leaves_the_others_built() {
    // Regression 001 of the fuzz corpus: `density bandwidth(1)` with an empty colour group
    // panicked inside compute and took the whole build down, with no manifest and no closing
    // line. Now it is that figure's failure; should the panic be fixed, the figure builds.
    let t = Tree::new();
    t.write("specs/d.csv", "g,v\na,1\na,2\na,3\nb,NA\n");
    t.write(
        "specs/a.figura",
        "data d \"d.csv\" {\n  g: nominal levels(\"a\", \"b\")\n  v: ratio\n}\n\n\
         figure dens {\n  from d\n  x v\n  colour g\n  density bandwidth(1)\n}\n\n\
         figure hist {\n  from d\n  x v\n  histogram\n}\n",
    );
    let run = figura(&t.path("specs"), &["build", "a.figura"]);
    assert!(t.path("specs/out/hist.svg").is_file(), "{}", run.show());
    let manifest = std::fs::read_to_string(t.path("specs/out/.figura-manifest.json")).unwrap();
    assert!(manifest.contains("\"hist\""), "{manifest}");
    assert!(manifest.contains("\"dens\""), "{manifest}");
    if t.path("specs/out/dens.svg").is_file() {
        assert_eq!(run.code, 0, "{}", run.show());
    } else {
        assert_eq!(run.code, 2, "{}", run.show());
        assert!(
            run.stderr.contains("figure `dens` could not be made"),
            "{}",
            run.show()
        );
        assert!(
            run.stderr.contains("1 built, 0 up to date, 1 failed")
                && run.stderr.contains("; 1 error"),
            "{}",
            run.show()
        );
    }
}

// ---- figura diff --------------------------------------------------------------------------

#[test]
fn diff_never_shows_a_file_from_outside_the_revision() {
    let t = Tree::new();
    let secret = t.secret();
    let repo = t.path("repo");
    t.write("repo/figures/data.csv", TABLE);
    t.write("repo/figures/a.figura", &spec("data.csv"));
    git(&repo, &["init", "-q"]);
    git(&repo, &["add", "."]);
    git(&repo, &["commit", "-q", "-m", "base"]);
    // The proposed change reads the data through a committed link to a file outside, and
    // widens the project to the whole machine.
    std::fs::remove_file(t.path("repo/figures/data.csv")).unwrap();
    t.link("repo/figures/data.csv", &secret);
    t.write(
        "repo/figura.toml",
        "[project]\nspecs = [\"figures\"]\nallow-outside = [\"/\"]\n",
    );
    git(&repo, &["add", "-A"]);
    git(&repo, &["commit", "-q", "-m", "head"]);
    let report = t.path("review");
    let run = figura(
        &t.path("repo/figures"),
        &[
            "diff",
            "HEAD~1",
            "HEAD",
            "--report",
            report.to_str().unwrap(),
        ],
    );
    assert_eq!(run.code, 2, "the head side does not build: {}", run.show());
    assert!(run.stderr.contains("F0225"), "{}", run.show());
    run.assert_secret_kept();
    if report.exists() {
        for entry in std::fs::read_dir(&report).unwrap().flatten() {
            let bytes = std::fs::read(entry.path()).unwrap();
            assert!(!String::from_utf8_lossy(&bytes).contains(SECRET));
        }
    }
}
