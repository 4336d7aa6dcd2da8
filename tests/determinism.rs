//! Determinism: identical inputs give byte-identical outputs, in one process and across
//! processes, and jitter is seeded (the same points land in the same places every run).

mod common;

use std::path::Path;
use std::process::Command;

use figura::compute::layer::PointMarks;
use figura::compute::{self, LayerMarks};

/// Names of the files in two folders, and the first file whose bytes differ.
fn compare_folders(a: &Path, b: &Path) {
    let (fa, fb) = (common::output_files(a), common::output_files(b));
    let names = |f: &[(String, Vec<u8>)]| f.iter().map(|(n, _)| n.clone()).collect::<Vec<_>>();
    assert_eq!(
        names(&fa),
        names(&fb),
        "the two builds wrote different files"
    );
    for ((name, x), (_, y)) in fa.iter().zip(&fb) {
        assert!(x == y, "{name} differs between the two builds");
    }
    // Every kind of output was compared.
    for ext in [".svg", ".png", ".pdf", ".summary.csv"] {
        assert!(
            fa.iter().any(|(n, _)| n.ends_with(ext)),
            "no {ext} output was compared"
        );
    }
}

#[test]
fn building_twice_in_one_process_gives_identical_bytes() {
    let (a, b) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    common::build_examples(a.path());
    common::build_examples(b.path());
    compare_folders(a.path(), b.path());
}

fn build_with_binary(out: &Path) {
    let status = Command::new(env!("CARGO_BIN_EXE_figura"))
        .arg("build")
        .arg(common::examples())
        .arg("--out")
        .arg(out)
        .output()
        .expect("run figura");
    assert!(
        status.status.success(),
        "figura build failed:\n{}",
        String::from_utf8_lossy(&status.stderr)
    );
}

#[test]
fn building_in_two_processes_gives_identical_bytes_and_the_same_as_the_library() {
    let (a, b, lib) = (
        tempfile::tempdir().unwrap(),
        tempfile::tempdir().unwrap(),
        tempfile::tempdir().unwrap(),
    );
    build_with_binary(a.path());
    build_with_binary(b.path());
    compare_folders(a.path(), b.path());
    common::build_examples(lib.path());
    compare_folders(a.path(), lib.path());
}

/// The jittered offsets of every points layer of one example figure, computed afresh.
fn jitter_offsets(figure: &str) -> Vec<f64> {
    let (program, mut sources) = common::example_program();
    let plan = program
        .figures
        .iter()
        .find(|p| p.name == figure)
        .expect("the example figure exists");
    let book = &program.codebooks[plan.data];
    let table = figura::data::read_table(&figura::build::table_spec(book), &mut sources)
        .expect("the example data read");
    let data = compute::compute(plan, book, &table).expect("the figure computes");
    data.panels
        .iter()
        .flat_map(|p| &p.layers)
        .flat_map(|l| match l {
            LayerMarks::Points(PointMarks::Categories(points)) => {
                points.iter().map(|p| p.offset).collect()
            }
            _ => Vec::new(),
        })
        .collect()
}

#[test]
fn jitter_is_seeded_spread_and_within_its_band() {
    // `times_by_mode` asks for `points jitter(0.35)`.
    let first = jitter_offsets("times_by_mode");
    let second = jitter_offsets("times_by_mode");
    assert_eq!(first, second, "jitter changed between two computations");
    assert!(first.len() > 100, "the figure has its points");
    // Offsets are fractions of the band in [−jitter/2, jitter/2) and really spread out.
    assert!(
        first.iter().all(|o| (-0.175..0.175).contains(o)),
        "{first:?}"
    );
    let distinct = {
        let mut v: Vec<u64> = first.iter().map(|o| o.to_bits()).collect();
        v.sort_unstable();
        v.dedup();
        v.len()
    };
    assert!(distinct > first.len() * 9 / 10, "jitter offsets repeat");
    let mean = first.iter().sum::<f64>() / first.len() as f64;
    assert!(
        mean.abs() < 0.05,
        "jitter is not centred: mean offset {mean}"
    );
}
