//! Benchmark of Figura on large tables against the irreducible work (`cargo bench --bench data`).
//!
//! The table: invented, deterministic rows of an id (one per row, which no figure uses), a
//! factor with three levels and a ratio measure. The spec: a box plot of the measure by the
//! factor and a histogram of the measure, each written as SVG and PNG at 300 dpi; the release
//! `figura` builds them with `--force --jobs 1`.
//!
//! The irreducible work, done by the crates Figura itself uses: parsing the same CSV with the
//! `csv` crate alone (every record, the measure read as a number) plus drawing the two SVGs
//! Figura wrote with `resvg` alone at 300 dpi (parsed by `usvg`, rasterised, not encoded).
//! Figura's build and the irreducible work alternate, and the reported ratio is the median over
//! the pairs, so a change in the machine's load hits both. The data stage alone is timed the
//! same way against the `csv` crate alone: `data::read_table` on the same file (the two columns
//! the figures use), against the parse above without the drawing.
//!
//! Every measured run is a child process (Figura, or this program again with `--irreducible` or
//! `--data-stage`), so this process stays small: Linux counts the parent's peak memory in a
//! child's `ru_maxrss`, which is read from `wait4`.
//!
//! Reported for each size from 10⁴ to 10⁷ rows: Figura's time, the irreducible time, their
//! ratio, Figura's peak resident memory in bytes per row, the data stage's time against the
//! `csv` crate's and its peak memory. Then the memory of a histogram of one ratio column of 10⁷
//! rows: the peak minus the peak at 10⁴ rows (the fixed cost: program, font, the PNG being
//! drawn), against the column's 80 MB of raw doubles. Targets (issue 14): end to end ÷
//! irreducible ≤ 1.5 at 10⁶ rows; peak memory for the 10⁷-row column ≤ 3× its raw bytes plus
//! a few MB.
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
    let args: Vec<String> = std::env::args().collect();
    if let Some(i) = args.iter().position(|a| a == "--irreducible") {
        let seconds = irreducible(Path::new(&args[i + 1]), true).as_secs_f64();
        println!("{seconds}");
        return;
    }
    if let Some(i) = args.iter().position(|a| a == "--data-stage") {
        let folder = Path::new(&args[i + 1]);
        let data = data_stage(folder).as_secs_f64();
        let csv = irreducible(folder, false).as_secs_f64();
        println!("{data} {csv}");
        return;
    }
    let max_rows: usize = std::env::var("FIGURA_BENCH_MAX_ROWS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000_000);
    let temp = tempfile::tempdir().expect("a temporary folder");
    let kept = std::env::var_os("FIGURA_BENCH_DIR").map(std::path::PathBuf::from);
    let root = kept.as_deref().unwrap_or(temp.path());
    fs::create_dir_all(root).expect("the bench folder");
    println!("load average at start: {}", load_average());
    if max_rows >= 10_000_000 {
        column_memory(root);
    }
    println!(
        "{:>9} {:>9} {:>11} {:>6} {:>10} {:>8} | {:>10} {:>9} {:>6} {:>10}",
        "rows",
        "figura",
        "irreducible",
        "ratio",
        "peak RSS",
        "per row",
        "data stage",
        "csv crate",
        "ratio",
        "peak RSS"
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
        let mut data_ratios = Vec::new();
        let mut data = Vec::new();
        let mut csv = Vec::new();
        let mut peak = 0;
        let mut data_peak = 0;
        for _ in 0..pairs {
            let run = build(&folder, 2);
            let (irreducible, _) = child_seconds(&folder, "--irreducible");
            ratios.push(run.time.as_secs_f64() / irreducible[0]);
            figura.push(run.time.as_secs_f64());
            floor.push(irreducible[0]);
            peak = peak.max(run.peak_bytes);
            let (stage, stage_peak) = child_seconds(&folder, "--data-stage");
            data_ratios.push(stage[0] / stage[1]);
            data.push(stage[0]);
            csv.push(stage[1]);
            data_peak = data_peak.max(stage_peak);
        }
        println!(
            "{rows:>9} {:>8.3}s {:>10.3}s {:>5.2}x {:>7.1} MB {:>6.1} B | {:>9.3}s {:>8.3}s {:>5.2}x {:>7.1} MB",
            median(&mut figura),
            median(&mut floor),
            median(&mut ratios),
            peak as f64 / 1e6,
            peak as f64 / rows as f64,
            median(&mut data),
            median(&mut csv),
            median(&mut data_ratios),
            data_peak as f64 / 1e6,
        );
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

/// Runs this program again with `flag FOLDER`; the seconds it prints and its peak memory.
#[expect(
    clippy::zombie_processes,
    reason = "the child is waited for with wait4, which gives its peak memory"
)]
fn child_seconds(folder: &Path, flag: &str) -> (Vec<f64>, u64) {
    let mut child = Command::new(std::env::current_exe().expect("this program"))
        .args([flag, folder.to_str().expect("a UTF-8 path")])
        .stdout(Stdio::piped())
        .spawn()
        .expect("the bench runs itself");
    let mut out = String::new();
    if let Some(mut pipe) = child.stdout.take() {
        let _ = pipe.read_to_string(&mut out);
    }
    let (status, peak) = wait_with_peak(child.id());
    assert_eq!(status, 0, "{flag} failed: {out}");
    let seconds = out
        .split_whitespace()
        .map(|s| s.parse().expect("seconds"))
        .collect();
    (seconds, peak)
}

/// Reads the two columns the figures use with the data stage, as a build does.
fn data_stage(folder: &Path) -> Duration {
    let path = folder.join("times.figura");
    let mut sources = figura::diag::SourceMap::new();
    let id = sources.add(&path, fs::read_to_string(&path).expect("the spec"));
    let ast = figura::syntax::parse(id, sources.text(id)).expect("the spec parses");
    let unit = figura::check::SpecUnit {
        path,
        ast,
        sees: Vec::new(),
        build_figures: true,
    };
    let (program, diags) = figura::check::check(&[unit]);
    assert!(diags.is_empty(), "{diags:#?}");
    let book = &program.codebooks[0];
    let vars = program
        .figures
        .iter()
        .flat_map(|f| f.variables(book))
        .collect();
    let spec = figura::build::table_spec_reading(book, &vars);
    let started = Instant::now();
    let table = figura::data::read_table(&spec, &mut sources).expect("the table reads");
    let elapsed = started.elapsed();
    std::hint::black_box(table.n_rows());
    elapsed
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

/// The irreducible work: the CSV parsed by the `csv` crate, and (`draw`) the two SVGs drawn by
/// `resvg`.
fn irreducible(folder: &Path, draw: bool) -> Duration {
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
    for name in ["by_condition", "distribution"]
        .into_iter()
        .filter(|_| draw)
    {
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

fn median(values: &mut [f64]) -> f64 {
    values.sort_by(f64::total_cmp);
    values[values.len() / 2]
}

fn load_average() -> String {
    fs::read_to_string("/proc/loadavg")
        .map(|s| s.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".to_owned())
}
