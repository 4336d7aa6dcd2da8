//! Benchmark of project builds: a generated manuscript project of 200 figures, built by the
//! `figura` command (`cargo bench --bench project`).
//!
//! The project: 20 data files of invented, deterministic data (60 subjects, a between-group
//! factor with three levels, a two-level within factor, a ratio measure, an interval measure
//! and an ordinal rating), and 20 spec files of 10 figures each (a mix of points, boxes, means
//! with intervals, lines by subject, histograms and counts), SVG and PNG at 300 dpi.
//!
//! Reported: a cold build with `--jobs 1` and with `--jobs 2` (and their ratio), a no-op build
//! (median of several) as a fraction of the cold build, and two one-change builds (one data
//! file, which ten figures read; one figure's block). Targets (issue 4): the no-op costs under
//! 2% of the cold build; on two cores `--jobs 2` is at least 1.6× faster than `--jobs 1`.
//!
//! Options: `FIGURA_BENCH_FIGURES_PER_FILE` (default 10) scales the project;
//! `FIGURA_BENCH_DIR` generates it in that (new) folder and keeps it, for profiling by hand.

use std::fmt::Write as _;
use std::fs;
use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

#[path = "common.rs"]
mod common;

use common::Mix;

const DATA_FILES: usize = 20;
const SUBJECTS: usize = 60;
const NO_OP_RUNS: usize = 7;

fn main() {
    let per_file: usize = std::env::var("FIGURA_BENCH_FIGURES_PER_FILE")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10);
    let temp = tempfile::tempdir().expect("a temporary folder");
    let kept = std::env::var_os("FIGURA_BENCH_DIR").map(std::path::PathBuf::from);
    let root = kept.as_deref().unwrap_or(temp.path());
    generate(root, per_file);
    let figures = DATA_FILES * per_file;
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    println!("project: {figures} figures in {DATA_FILES} spec files, {DATA_FILES} data files; {cores} cores");

    let cold_1 = cold(root, "1", figures);
    let cold_2 = cold(root, "2", figures);
    let mut no_op: Vec<Duration> = (0..NO_OP_RUNS)
        .map(|_| time(root, &["build"], "0 built, "))
        .collect();
    no_op.sort();
    let no_op = no_op[NO_OP_RUNS / 2];

    // One data file changes: the ten figures that read it rebuild.
    let data = root.join("data/d07.csv");
    let text = fs::read_to_string(&data).unwrap();
    fs::write(&data, text.replacen(",12.", ",13.", 1)).unwrap();
    let one_data = time(root, &["build"], &format!("{per_file} built, "));

    // One figure's block changes: that figure alone rebuilds.
    let spec = root.join("figures/s03.figura");
    let text = fs::read_to_string(&spec).unwrap();
    fs::write(
        &spec,
        text.replacen("size 85mm x 65mm", "size 86mm x 65mm", 1),
    )
    .unwrap();
    let one_figure = time(root, &["build"], "1 built, ");

    let speedup = cold_1.as_secs_f64() / cold_2.as_secs_f64();
    let no_op_share = no_op.as_secs_f64() / cold_2.as_secs_f64();
    println!(
        "cold build, --jobs 1:        {:>8.2} s",
        cold_1.as_secs_f64()
    );
    println!("cold build, --jobs 2:        {:>8.2} s   speedup {speedup:.2}x (target >= 1.6x on 2 cores)", cold_2.as_secs_f64());
    println!(
        "no-op build (median of {NO_OP_RUNS}):  {:>8.3} s   {:.2}% of the cold build (target < 2%)",
        no_op.as_secs_f64(),
        no_op_share * 100.0
    );
    println!(
        "one data file changed:       {:>8.3} s   ({per_file} figures rebuilt)",
        one_data.as_secs_f64()
    );
    println!(
        "one figure block changed:    {:>8.3} s   (1 figure rebuilt)",
        one_figure.as_secs_f64()
    );
}

/// A cold build with `jobs` threads: the output folder removed first.
fn cold(root: &Path, jobs: &str, figures: usize) -> Duration {
    let _ = fs::remove_dir_all(root.join("figures/out"));
    time(
        root,
        &["build", "--jobs", jobs],
        &format!("{figures} built, 0 up to date"),
    )
}

/// Runs `figura ARGS` in the project's `figures/` subfolder; its closing line must start with
/// `expect` (so a benchmark never times a build that did something else).
fn time(root: &Path, args: &[&str], expect: &str) -> Duration {
    let started = Instant::now();
    let out = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(root.join("figures"))
        .output()
        .expect("figura runs");
    let elapsed = started.elapsed();
    let stderr = String::from_utf8_lossy(&out.stderr);
    let closing = stderr.lines().last().unwrap_or("");
    assert!(
        out.status.success() && closing.starts_with(expect),
        "figura {args:?} did not do what was expected ({expect}):\n{stderr}"
    );
    elapsed
}

fn generate(root: &Path, per_file: usize) {
    write(
        root,
        "figura.toml",
        "[project]\nspecs = [\"figures\"]\nout = \"figures/out\"\n\n[defaults]\nformats = [\"svg\", \"png\"]\ndpi = 300\n",
    );
    for d in 0..DATA_FILES {
        write(root, &format!("data/d{d:02}.csv"), &table(d as u64));
        write(root, &format!("figures/s{d:02}.figura"), &spec(d, per_file));
    }
}

/// An invented table: subjects in three groups, measured in two sessions.
fn table(seed: u64) -> String {
    let mut rng = Mix(seed + 1);
    let mut out = String::from("subject,group,session,time_s,score,rating\n");
    for s in 0..SUBJECTS {
        let group = ["north", "south", "east"][s % 3];
        let base = 10.0 + 4.0 * rng.next() + (s % 3) as f64;
        for session in ["first", "second"] {
            let time = base + 3.0 * rng.next() + if session == "second" { 1.5 } else { 0.0 };
            let score = 40.0 + 20.0 * rng.next() - 5.0;
            let rating = 1 + (rng.next() * 5.0) as usize % 5;
            let _ = writeln!(
                out,
                "S{s:03},{group},{session},{time:.2},{score:.1},{rating}"
            );
        }
    }
    out
}

/// One spec file: the data block and `per_file` figures cycling through six kinds.
fn spec(d: usize, per_file: usize) -> String {
    let mut out = format!(
        r#"data d{d:02} "../data/d{d:02}.csv" {{
  subject: id
  group: nominal levels("north", "south", "east")
  session: nominal levels("first", "second")
  time: ratio column("time_s") label("Time") unit("s")
  score: interval label("Score")
  rating: ordinal levels(1, 2, 3, 4, 5) label("Rating")
  subject subject
  within session
  between group
}}
"#
    );
    let bodies = [
        "  x group\n  y time\n  points jitter(0.2)\n  box\n",
        "  x session\n  y time\n  lines by(subject)\n  mean error(ci(0.95, within))\n",
        "  x group\n  y score\n  colour session\n  points jitter(0.2)\n  mean error(ci(0.95))\n",
        "  x time\n  histogram bins(fd)\n",
        "  x rating\n  counts heights(percent)\n",
        "  x group\n  y time\n  panels session\n  points jitter(0.2)\n  box\n",
    ];
    for f in 0..per_file {
        let _ = write!(
            out,
            "\nfigure f{d:02}_{f:02} {{\n  from d{d:02}\n  title \"Figure {f} of file {d}\"\n{}  size 85mm x 65mm\n}}\n",
            bodies[f % bodies.len()]
        );
    }
    out
}

fn write(root: &Path, rel: &str, text: &str) {
    let path = root.join(rel);
    fs::create_dir_all(path.parent().unwrap()).unwrap();
    fs::write(path, text).unwrap();
}
