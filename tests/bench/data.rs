//! Benchmark of Figura on large tables against the irreducible work (`cargo bench --bench data`).
//!
//! The table: invented, deterministic rows of an id (one per row, which no figure uses), a
//! factor with three levels and a ratio measure. The spec: a box plot of the measure by the
//! factor and a histogram of the measure, each written as SVG and PNG at 300 dpi; the release
//! `figura` builds them with `--force --jobs 1`.
//!
//! The irreducible work, done in this process by the crates Figura itself uses: parsing the
//! same CSV with the `csv` crate alone (every record, the measure read as a number) plus
//! drawing the two SVGs Figura wrote with `resvg` alone at 300 dpi (parsed by `usvg`,
//! rasterised, not encoded). Figura's build and the irreducible work alternate, and the
//! reported ratio is the median over the pairs, so a change in the machine's load hits both.
//!
//! Reported for each size from 10⁴ to 10⁷ rows: Figura's time, the irreducible time, their
//! ratio, and Figura's peak resident memory (`ru_maxrss` of the child, from `wait4`) in bytes
//! per row. Then the memory of a histogram of one ratio column of 10⁷ rows: the peak minus the
//! peak at 10⁴ rows (the fixed cost: program, font, the PNG being drawn), against the column's
//! 80 MB of raw doubles. Targets (issue 14): end to end ÷ irreducible ≤ 1.5 at 10⁶ rows;
//! peak memory for the 10⁷-row column ≤ 3× its raw bytes plus a few MB.
//!
//! Options: `FIGURA_BENCH_MAX_ROWS` (default 10000000) stops the sizes earlier;
//! `FIGURA_BENCH_DIR` generates the tables in that (new) folder and keeps them, for profiling.

use std::fmt::Write as _;
use std::fs;
use std::io::{BufWriter, Read, Write};
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

#[path = "common.rs"]
mod common;

use common::Mix;

const DPI: f32 = 300.0;

fn main() {
    let max_rows: usize = std::env::var("FIGURA_BENCH_MAX_ROWS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000_000);
    let temp = tempfile::tempdir().expect("a temporary folder");
    let kept = std::env::var_os("FIGURA_BENCH_DIR").map(std::path::PathBuf::from);
    let root = kept.as_deref().unwrap_or(temp.path());
    fs::create_dir_all(root).expect("the bench folder");
    println!("load average at start: {}", load_average());
    println!(
        "{:>10} {:>10} {:>12} {:>8} {:>12} {:>12}",
        "rows", "figura", "irreducible", "ratio", "peak RSS", "RSS per row"
    );
    let sizes = [10_000, 100_000, 1_000_000, 10_000_000];
    for &rows in sizes.iter().filter(|&&n| n <= max_rows) {
        let folder = root.join(format!("rows_{rows}"));
        write_table(&folder, rows, true);
        write_spec(&folder, &["box", "histogram"]);
        let pairs = match rows {
            n if n >= 10_000_000 => 3,
            n if n >= 1_000_000 => 5,
            _ => 7,
        };
        let mut ratios = Vec::new();
        let mut figura = Vec::new();
        let mut floor = Vec::new();
        let mut peak = 0;
        for _ in 0..pairs {
            let run = build(&folder, 2);
            let irreducible = irreducible(&folder);
            ratios.push(run.time.as_secs_f64() / irreducible.as_secs_f64());
            figura.push(run.time);
            floor.push(irreducible);
            peak = peak.max(run.peak_bytes);
        }
        println!(
            "{rows:>10} {:>9.3}s {:>11.3}s {:>7.2}x {:>9.1} MB {:>9.1} B",
            median(&mut figura).as_secs_f64(),
            median(&mut floor).as_secs_f64(),
            median_f64(&mut ratios),
            peak as f64 / 1e6,
            peak as f64 / rows as f64
        );
    }
    if max_rows >= 10_000_000 {
        column_memory(root);
    }
    println!("load average at end: {}", load_average());
}

/// The memory of a histogram of one ratio column of 10⁷ rows, over the fixed cost.
fn column_memory(root: &Path) {
    let small = root.join("column_small");
    write_table(&small, 10_000, false);
    write_spec(&small, &["histogram"]);
    let large = root.join("column_large");
    write_table(&large, 10_000_000, false);
    write_spec(&large, &["histogram"]);
    let fixed = build(&small, 1).peak_bytes;
    let peak = build(&large, 1).peak_bytes;
    let raw = 8.0 * 10_000_000.0;
    println!(
        "one ratio column, 10^7 rows: peak {:.1} MB; fixed cost (10^4 rows) {:.1} MB; \
         above it {:.1} MB = {:.2}x the {:.0} MB of raw doubles (target <= 3x)",
        peak as f64 / 1e6,
        fixed as f64 / 1e6,
        peak.saturating_sub(fixed) as f64 / 1e6,
        peak.saturating_sub(fixed) as f64 / raw,
        raw / 1e6
    );
}

/// An invented table of reaction times: `rows` rows of an id, a condition and a time, or of
/// the time alone.
fn write_table(folder: &Path, rows: usize, all_columns: bool) {
    fs::create_dir_all(folder).expect("the table's folder");
    let path = folder.join("times.csv");
    if path.exists() {
        return;
    }
    let file = fs::File::create(&path).expect("the table");
    let mut out = BufWriter::new(file);
    let mut rng = Mix(rows as u64);
    let header = if all_columns {
        "trial,condition,time_ms\n"
    } else {
        "time_ms\n"
    };
    out.write_all(header.as_bytes()).expect("written");
    let conditions = ["quiet", "music", "speech"];
    let mut line = String::new();
    for i in 0..rows {
        let c = i % 3;
        // A skewed time: 250 ms plus an exponential tail whose mean depends on the condition.
        let time = 250.0 - (40.0 + 15.0 * c as f64) * (1.0 - rng.next()).ln();
        line.clear();
        if all_columns {
            let _ = write!(line, "T{i:08},{},", conditions[c]);
        }
        let _ = writeln!(line, "{time:.1}");
        out.write_all(line.as_bytes()).expect("written");
    }
    out.flush().expect("written");
}

fn write_spec(folder: &Path, figures: &[&str]) {
    let mut spec = String::new();
    if figures.contains(&"box") {
        spec.push_str(
            "data times \"times.csv\" {\n  trial: id\n  condition: nominal levels(\"quiet\", \"music\", \"speech\")\n  time: ratio column(\"time_ms\") unit(\"ms\")\n}\n\n\
             figure by_condition {\n  from times\n  x condition\n  y time\n  box\n  formats svg, png\n  dpi 300\n}\n",
        );
    } else {
        spec.push_str(
            "data times \"times.csv\" {\n  time: ratio column(\"time_ms\") unit(\"ms\")\n}\n",
        );
    }
    spec.push_str(
        "\nfigure distribution {\n  from times\n  x time\n  histogram\n  formats svg, png\n  dpi 300\n}\n",
    );
    fs::write(folder.join("times.figura"), spec).expect("the spec");
}

/// One build: its wall time and the child's peak resident memory in bytes.
struct Run {
    time: Duration,
    peak_bytes: u64,
}

/// Builds the folder's figures with the release binary (`--force --jobs 1`), checking that
/// exactly `figures` were built.
#[expect(
    clippy::zombie_processes,
    reason = "the child is waited for with wait4, which gives its peak memory"
)]
fn build(folder: &Path, figures: usize) -> Run {
    let started = Instant::now();
    let mut child = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(["build", "--force", "--jobs", "1", "times.figura"])
        .current_dir(folder)
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .expect("figura runs");
    let mut stderr = String::new();
    if let Some(mut pipe) = child.stderr.take() {
        let _ = pipe.read_to_string(&mut stderr);
    }
    let (status, peak_bytes) = wait_with_peak(child.id());
    let time = started.elapsed();
    let closing = stderr.lines().last().unwrap_or("");
    assert!(
        status == 0 && closing.starts_with(&format!("{figures} built, ")),
        "figura did not build {figures} figures:\n{stderr}"
    );
    Run { time, peak_bytes }
}

/// Waits for the child `pid`; its exit status and peak resident memory in bytes.
fn wait_with_peak(pid: u32) -> (i32, u64) {
    let mut status = 0;
    // SAFETY: `rusage` is plain data that `wait4` fills in; `pid` is our own child, not yet
    // waited for (std's `Child` is dropped without waiting).
    let mut usage: libc::rusage = unsafe { std::mem::zeroed() };
    let pid = libc::pid_t::try_from(pid).expect("a pid");
    let waited = unsafe { libc::wait4(pid, &mut status, 0, &mut usage) };
    assert_eq!(waited, pid, "wait4 failed");
    let code = if libc::WIFEXITED(status) {
        libc::WEXITSTATUS(status)
    } else {
        -1
    };
    // Linux reports ru_maxrss in KiB.
    (code, u64::try_from(usage.ru_maxrss).unwrap_or(0) * 1024)
}

/// The irreducible work: the CSV parsed by the `csv` crate, the two SVGs drawn by `resvg`.
fn irreducible(folder: &Path) -> Duration {
    let started = Instant::now();
    let mut reader = csv::ReaderBuilder::new()
        .from_path(folder.join("times.csv"))
        .expect("the table opens");
    let mut record = csv::ByteRecord::new();
    let mut sum = 0.0;
    while reader.read_byte_record(&mut record).expect("a record") {
        let field = record.get(record.len() - 1).unwrap_or_default();
        sum += std::str::from_utf8(field)
            .ok()
            .and_then(|s| s.parse::<f64>().ok())
            .unwrap_or(0.0);
    }
    std::hint::black_box(sum);
    for name in ["by_condition", "distribution"] {
        let path = folder.join("out").join(format!("{name}.svg"));
        let Ok(svg) = fs::read(&path) else {
            continue;
        };
        let tree = usvg::Tree::from_data(&svg, &usvg::Options::default()).expect("the SVG parses");
        let scale = DPI / 96.0;
        let size = tree.size().to_int_size().scale_by(scale).expect("a size");
        let mut pixmap =
            resvg::tiny_skia::Pixmap::new(size.width(), size.height()).expect("a pixmap");
        resvg::render(
            &tree,
            resvg::tiny_skia::Transform::from_scale(scale, scale),
            &mut pixmap.as_mut(),
        );
        std::hint::black_box(pixmap.data().len());
    }
    started.elapsed()
}

fn median(values: &mut [Duration]) -> Duration {
    values.sort();
    values[values.len() / 2]
}

fn median_f64(values: &mut [f64]) -> f64 {
    values.sort_by(f64::total_cmp);
    values[values.len() / 2]
}

fn load_average() -> String {
    fs::read_to_string("/proc/loadavg")
        .map(|s| s.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".to_owned())
}
