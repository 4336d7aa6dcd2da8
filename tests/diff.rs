//! `figura diff` in a real git repository: two commits of the seedlings and commute examples,
//! where the second corrects one data value, adds a figure and removes one.
//!
//! Expected numbers are computed here from the data file with the usual definitions (common
//! practice: sample mean; standard error = sample standard deviation (n − 1) / √n), not read
//! from Figura.
//! The page is loaded in headless Chromium (Debian's `chromium` package), which must be
//! installed: the test fails without it.

use std::path::{Path, PathBuf};
use std::process::Command;

mod common;
use common::git;

/// The corrected value: tray T017 (shade) measured 88.5 mm, corrected to 95.5 mm. It stays an
/// outlier of the shade box, so only the outlier, the maximum, the mean and the standard error
/// of the shade group move.
const OLD_LINE: &str = "T017,shade,88.5";
const NEW_LINE: &str = "T017,shade,95.5";

const ADDED_FIGURE: &str = "
figure height_box_only {
  from seedlings
  x light
  y height
  box
}
";

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn copy_example(repo: &Path, spec: &str, data: &str) {
    let examples = root().join("specs-examples");
    std::fs::create_dir_all(repo.join("data")).unwrap();
    std::fs::copy(examples.join(spec), repo.join(spec)).unwrap();
    std::fs::copy(examples.join(data), repo.join(data)).unwrap();
}

fn edit(path: &Path, f: impl FnOnce(String) -> String) {
    let text = std::fs::read_to_string(path).unwrap();
    std::fs::write(path, f(text)).unwrap();
}

/// Removes the block `figure NAME { ... }` (up to its closing brace line).
fn without_figure(text: &str, name: &str) -> String {
    let start = text.find(&format!("figure {name} {{")).unwrap();
    let end = start + text[start..].find("\n}\n").unwrap() + 3;
    format!("{}{}", &text[..start], &text[end..])
}

/// A repository with two commits; returns the temporary folder and the repository path.
fn two_commits() -> (tempfile::TempDir, PathBuf) {
    let tmp = tempfile::tempdir().unwrap();
    let repo = tmp.path().join("manuscript");
    std::fs::create_dir(&repo).unwrap();
    git(&repo, &["init", "-q"]);
    copy_example(&repo, "seedlings.figura", "data/seedlings.csv");
    copy_example(&repo, "commute.figura", "data/commute.tsv");
    // The scenario below is written for these seven figures; later examples stay out of it.
    edit(&repo.join("seedlings.figura"), |t| {
        without_figure(&without_figure(&t, "height_density"), "height_cumulative")
    });
    git(&repo, &["add", "-A"]);
    git(&repo, &["commit", "-q", "-m", "figures"]);

    edit(&repo.join("data/seedlings.csv"), |t| {
        assert!(t.contains(OLD_LINE));
        t.replace(OLD_LINE, NEW_LINE)
    });
    edit(&repo.join("seedlings.figura"), |t| {
        without_figure(&t, "height_distribution") + ADDED_FIGURE
    });
    git(
        &repo,
        &["commit", "-q", "-a", "-m", "correct T017, new box figure"],
    );
    (tmp, repo)
}

struct Run {
    code: i32,
    stdout: String,
    stderr: String,
}

fn figura(dir: &Path, args: &[&str]) -> Run {
    let out = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap();
    Run {
        code: out.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    }
}

/// The cells of the Markdown table rows of `text` that follow `heading` (up to a blank line
/// after the table).
fn table_after(text: &str, heading: &str) -> Vec<Vec<String>> {
    let start = text
        .find(heading)
        .unwrap_or_else(|| panic!("no {heading} in\n{text}"));
    text[start..]
        .lines()
        .skip_while(|l| !l.starts_with('|'))
        .take_while(|l| l.starts_with('|'))
        .skip(2)
        .map(|l| {
            l.trim_matches('|')
                .split(" | ")
                .map(|c| c.trim().to_owned())
                .collect()
        })
        .collect()
}

/// Shade heights of a version of the data file.
fn shade_heights(csv: &str) -> Vec<f64> {
    csv.lines()
        .filter(|l| l.contains(",shade,"))
        .map(|l| l.rsplit(',').next().unwrap().parse().unwrap())
        .collect()
}

fn mean(v: &[f64]) -> f64 {
    v.iter().sum::<f64>() / v.len() as f64
}

fn standard_error(v: &[f64]) -> f64 {
    let m = mean(v);
    let var = v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (v.len() - 1) as f64;
    var.sqrt() / (v.len() as f64).sqrt()
}

fn close(text: &str, expected: f64) -> bool {
    let got: f64 = text.parse().unwrap_or(f64::NAN);
    (got - expected).abs() <= 1e-9 * expected.abs().max(1.0)
}

#[test]
fn two_commits_report_the_changed_added_and_removed_figures_and_the_moved_numbers() {
    let (tmp, repo) = two_commits();
    let report = tmp.path().join("report");
    let status_before = git(&repo, &["status", "--porcelain", "--ignored"]);
    let run = figura(
        &repo,
        &[
            "diff",
            "HEAD~1",
            "HEAD",
            "--report",
            report.to_str().unwrap(),
        ],
    );
    assert_eq!(
        run.code, 1,
        "stdout:\n{}\nstderr:\n{}",
        run.stdout, run.stderr
    );
    // The repository is only read: no output folders, no changed files.
    assert_eq!(
        git(&repo, &["status", "--porcelain", "--ignored"]),
        status_before
    );
    assert!(git(&repo, &["worktree", "list"]).lines().count() == 1);

    let md = std::fs::read_to_string(report.join("report.md")).unwrap();
    let states: Vec<(String, String)> = table_after(&md, "| Figure |")
        .into_iter()
        .map(|row| (row[0].trim_matches('`').to_owned(), row[1].clone()))
        .collect();
    let expected_states = [
        ("height_bars", "changed"),
        ("height_by_light", "changed"),
        ("height_box_only", "added"),
        ("height_distribution", "removed"),
        ("commute_modes", "unchanged"),
        ("commute_times", "unchanged"),
        ("satisfaction_by_mode", "unchanged"),
        ("times_by_mode", "unchanged"),
    ];
    let expected_states: Vec<(String, String)> = expected_states
        .iter()
        .map(|(a, b)| (a.to_string(), b.to_string()))
        .collect();
    assert_eq!(states, expected_states, "{md}");

    // height_by_light: the shade box's outlier and maximum moved by +7, nothing else.
    let rows = table_after(&md, "### `height_by_light`");
    let moved: Vec<&[String]> = rows.iter().map(|r| &r[..]).collect();
    assert_eq!(moved.len(), 2, "{md}");
    for (row, stat) in moved.iter().zip(["outliers", "max"]) {
        assert_eq!(&row[..5], ["", "box", "", "shade", stat]);
        assert_eq!(&row[5..], ["88.5", "95.5", "+7"]);
    }

    // height_bars: the shade mean and its standard error moved, nothing else.
    let old_data =
        std::fs::read_to_string(root().join("specs-examples/data/seedlings.csv")).unwrap();
    let new_data = old_data.replace(OLD_LINE, NEW_LINE);
    let (old, new) = (shade_heights(&old_data), shade_heights(&new_data));
    assert_eq!(old.len(), 20);
    let rows = table_after(&md, "### `height_bars`");
    assert_eq!(rows.len(), 2, "{md}");
    assert_eq!(&rows[0][..5], ["", "mean", "", "shade", "mean"]);
    assert!(
        close(&rows[0][5], mean(&old)) && close(&rows[0][6], mean(&new)),
        "{md}"
    );
    // (95.5 − 88.5) / 20 = 0.35.
    assert_eq!(rows[0][7], "+0.35");
    assert_eq!(&rows[1][..5], ["", "mean", "", "shade", "se"]);
    assert!(close(&rows[1][5], standard_error(&old)), "{md}");
    assert!(close(&rows[1][6], standard_error(&new)), "{md}");

    // The terminal summary agrees.
    assert!(
        run.stdout
            .contains("changed   height_by_light (2 numbers moved)"),
        "{}",
        run.stdout
    );
    assert!(
        run.stdout
            .contains("2 changed, 1 added, 1 removed, 4 unchanged"),
        "{}",
        run.stdout
    );

    picture_diffs_have_three_panels(&report);
    page_renders_in_chromium(&report, tmp.path());
}

/// One picture diff per changed figure, three panels wide, with marked pixels in the third.
fn picture_diffs_have_three_panels(report: &Path) {
    let mut pictures: Vec<String> = std::fs::read_dir(report)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".diff.png"))
        .collect();
    pictures.sort();
    assert_eq!(
        pictures,
        ["height_bars.diff.png", "height_by_light.diff.png"]
    );

    let bytes = std::fs::read(report.join("height_by_light.diff.png")).unwrap();
    let mut reader = png::Decoder::new(bytes.as_slice()).read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    // The figure is 85 mm × 65 mm at 300 dpi: round(85 / 25.4 × 300) = 1004 pixels wide,
    // round(65 / 25.4 × 300) = 768 high (1 in = 25.4 mm).
    let (w, h) = (1004, 768);
    assert!(
        info.width >= 3 * w && info.width < 3 * w + 200,
        "width {}",
        info.width
    );
    assert!(
        info.height >= h && info.height < h + 200,
        "height {}",
        info.height
    );
    assert_eq!(info.color_type, png::ColorType::Rgb);
    // Changed pixels are painted vermillion (213, 94, 0), only in the right-hand third.
    let channels = 3;
    let is_mark = |x: u32, y: u32| {
        let i = ((y * info.width + x) * channels) as usize;
        buf[i..i + 3] == [213, 94, 0]
    };
    let marks_in = |from: u32, to: u32| {
        (0..info.height)
            .flat_map(|y| (from..to).map(move |x| (x, y)))
            .filter(|&(x, y)| is_mark(x, y))
            .count()
    };
    let third = info.width / 3;
    assert_eq!(marks_in(0, 2 * third), 0);
    assert!(marks_in(2 * third, info.width) > 100);
}

/// Loads the page in headless Chromium and checks the figure names and states it shows.
fn page_renders_in_chromium(report: &Path, tmp: &Path) {
    let chromium = Path::new("/usr/bin/chromium");
    assert!(
        chromium.exists(),
        "this test needs Chromium: apt-get install -y chromium"
    );
    let profile = tmp.join("chromium-profile");
    let page = report.join("index.html");
    let out = Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg("--dump-dom")
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("chromium runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let dom = String::from_utf8_lossy(&out.stdout);
    for name in [
        "height_bars",
        "height_by_light",
        "height_box_only",
        "height_distribution",
        "times_by_mode",
    ] {
        assert!(
            dom.contains(&format!("<td>{name}</td>")) || dom.contains(&format!(">{name}</a>")),
            "{name} not in the page"
        );
    }
    for name in ["height_bars", "height_by_light", "height_box_only"] {
        assert!(
            dom.contains(&format!("id=\"figure-{name}\"")),
            "no section for {name}"
        );
    }
    assert!(dom.contains("changed") && dom.contains("added") && dom.contains("removed"));
    // Pictures are inlined; the page refers to no other file.
    assert_eq!(dom.matches("src=\"data:image/png;base64,").count(), 4);
    assert!(!dom.contains("src=\"http") && !dom.contains("src=\"file"));
    // The spec diff shows the removed figure's header as a removed line.
    assert!(
        dom.contains("- figure height_distribution {"),
        "no spec diff"
    );
    assert!(dom.contains("+ T017,shade,95.5"), "no data diff");
}

#[test]
fn nothing_changed_exits_zero() {
    let (tmp, repo) = two_commits();
    let report = tmp.path().join("same");
    let run = figura(
        &repo,
        &["diff", "HEAD", "HEAD", "--report", report.to_str().unwrap()],
    );
    assert_eq!(run.code, 0, "{}{}", run.stdout, run.stderr);
    let md = std::fs::read_to_string(report.join("report.md")).unwrap();
    assert!(
        md.contains("0 changed, 0 added, 0 removed, 7 unchanged"),
        "{md}"
    );
}

#[test]
fn the_working_tree_is_the_default_head_and_folders_compare_too() {
    let (tmp, repo) = two_commits();
    // An uncommitted edit of a title changes one figure's picture but none of its numbers.
    edit(&repo.join("commute.figura"), |t| {
        t.replace(
            "title \"Satisfaction with each mode of travel\"",
            "title \"How satisfied commuters are, by mode\"",
        )
    });
    let report = tmp.path().join("work");
    let run = figura(
        &repo,
        &["diff", "HEAD", "--report", report.to_str().unwrap()],
    );
    assert_eq!(run.code, 1, "{}{}", run.stdout, run.stderr);
    assert!(run.stdout.contains("head: working tree"), "{}", run.stdout);
    assert!(
        run.stdout.contains("changed   satisfaction_by_mode\n"),
        "{}",
        run.stdout
    );
    assert!(
        run.stdout
            .contains("1 changed, 0 added, 0 removed, 6 unchanged"),
        "{}",
        run.stdout
    );

    // Two folders: the repository against itself.
    let run = figura(
        tmp.path(),
        &[
            "diff",
            "manuscript",
            "manuscript",
            "--report",
            report.to_str().unwrap(),
        ],
    );
    assert_eq!(run.code, 0, "{}{}", run.stdout, run.stderr);
}

#[test]
fn an_unknown_revision_is_an_error() {
    let (tmp, repo) = two_commits();
    let report = tmp.path().join("bad");
    let run = figura(
        &repo,
        &[
            "diff",
            "no-such-branch",
            "--report",
            report.to_str().unwrap(),
        ],
    );
    assert_eq!(run.code, 2);
    assert!(run.stderr.contains("no-such-branch"), "{}", run.stderr);
    assert!(!report.exists());
}
