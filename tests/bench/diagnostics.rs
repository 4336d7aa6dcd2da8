//! Benchmark of bad input: how the time and the output of `figura check` grow with the number
//! of broken statements (`cargo bench --bench diagnostics`).
//!
//! Two shapes, each at 25 000, 50 000, 100 000 and 200 000 misspelt statements (`pionts`, the
//! unknown statement `F0201` with a "did you mean" help): one statement per line, and every
//! statement on one line (`pionts; pionts; ...`). Each is checked by the release `figura`
//! binary with human messages; reported are the median time of three runs and the bytes
//! printed. Targets (issue 13): the time grows linearly with the input (200 000 statements
//! take about 8× the time of 25 000), and the output stays bounded (100 diagnostics of a file
//! in full, then one `F0223`), whatever the input.

use std::fmt::Write as _;
use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

const SIZES: [usize; 4] = [25_000, 50_000, 100_000, 200_000];
const RUNS: usize = 3;

fn spec(n: usize, one_line: bool) -> String {
    let mut s = String::from(
        "data d \"d.csv\" {\n  v: ratio\n}\n\nfigure f {\n  from d\n  x v\n  histogram\n",
    );
    if one_line {
        s.push_str("  ");
        for _ in 0..n {
            s.push_str("pionts; ");
        }
        s.push('\n');
    } else {
        for _ in 0..n {
            let _ = writeln!(s, "  pionts");
        }
    }
    s.push_str("}\n");
    s
}

/// The median time of `figura check` on `spec`, and the bytes it printed.
fn check(dir: &Path, spec: &str) -> (Duration, usize) {
    std::fs::write(dir.join("bench.figura"), spec).unwrap();
    let mut times = Vec::new();
    let mut printed = 0;
    for _ in 0..RUNS {
        let started = Instant::now();
        let out = Command::new(env!("CARGO_BIN_EXE_figura"))
            .args(["check", "bench.figura"])
            .current_dir(dir)
            .output()
            .expect("run figura");
        times.push(started.elapsed());
        assert_eq!(out.status.code(), Some(1), "every run finds the errors");
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(stderr.contains("F0223"), "the rest is counted in F0223");
        printed = out.stderr.len();
    }
    times.sort();
    (times[RUNS / 2], printed)
}

fn main() {
    let dir = tempfile::tempdir().expect("a temporary folder");
    std::fs::write(dir.path().join("d.csv"), "v\n1\n2\n").unwrap();
    for one_line in [false, true] {
        let shape = if one_line {
            "on one line"
        } else {
            "one per line"
        };
        let mut first: Option<Duration> = None;
        for n in SIZES {
            let (time, bytes) = check(dir.path(), &spec(n, one_line));
            let ratio = first.map_or(1.0, |f| time.as_secs_f64() / f.as_secs_f64());
            first.get_or_insert(time);
            println!(
                "{n:>7} statements {shape:<12}: {:>7.3} s ({ratio:>4.1}× the first), {bytes} bytes printed",
                time.as_secs_f64()
            );
        }
    }
}
