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

/// Markdown text without its backslash escapes.
fn unescape(cell: &str) -> String {
    let mut out = String::new();
    let mut chars = cell.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, chars.peek()) {
            ('\\', Some(n)) if n.is_ascii_punctuation() => {
                out.push(*n);
                chars.next();
            }
            _ => out.push(c),
        }
    }
    out
}

/// The cells of the Markdown table rows of `text` that follow `heading` (up to a blank line
/// after the table), unescaped.
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
                .map(|c| unescape(c.trim()))
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

/// Whether `text`, a number rounded to its decimals, is `expected` rounded there.
fn rounded_from(text: &str, expected: f64) -> bool {
    let got: f64 = text.parse().unwrap_or(f64::NAN);
    let decimals = text.split_once('.').map_or(0, |(_, f)| f.len());
    (got - expected).abs() <= 0.5 * 10f64.powi(-(decimals as i32)) + 1e-12
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
        .map(|row| (row[0].clone(), row[1].clone()))
        .collect();
    // Changed figures first (the one with more changed pixels first), then added, removed
    // and unchanged ones by name.
    let mut changed: Vec<&str> = states[..2].iter().map(|(n, _)| n.as_str()).collect();
    changed.sort_unstable();
    assert_eq!(changed, ["height_bars", "height_by_light"], "{md}");
    let expected_states = [
        ("changed", "changed"),
        ("height_box_only", "added"),
        ("height_distribution", "removed"),
        ("commute_modes", "unchanged"),
        ("commute_times", "unchanged"),
        ("satisfaction_by_mode", "unchanged"),
        ("times_by_mode", "unchanged"),
    ];
    let got: Vec<(&str, &str)> = std::iter::once(("changed", states[1].1.as_str()))
        .chain(states[2..].iter().map(|(a, b)| (a.as_str(), b.as_str())))
        .collect();
    assert_eq!(got, expected_states, "{md}");
    assert_eq!(states[0].1, "changed");
    let table = table_after(&md, "| Figure |");
    let share = |row: &[String]| -> f64 {
        let p = &row[3];
        p[p.find('(').unwrap() + 1..p.find('%').unwrap()]
            .parse()
            .unwrap()
    };
    assert!(share(&table[0]) >= share(&table[1]), "{md}");

    // height_by_light: the shade maximum moved by +7; as an outlier, 88.5 is gone and 95.5
    // is new (outliers are compared as sets).
    let rows = table_after(&md, "### height\\_by\\_light");
    assert_eq!(rows.len(), 3, "{md}");
    assert_eq!(
        rows[0],
        ["", "box", "", "shade", "max", "88.5", "95.5", "+7"]
    );
    assert_eq!(
        rows[1],
        ["", "box", "", "shade", "outliers", "88.5", "—", "—"]
    );
    assert_eq!(
        rows[2],
        ["", "box", "", "shade", "outliers", "—", "95.5", "—"]
    );

    // height_bars: the shade mean and its standard error moved, nothing else; the larger
    // relative change first, each rounded so that its difference has two significant digits.
    let old_data =
        std::fs::read_to_string(root().join("specs-examples/data/seedlings.csv")).unwrap();
    let new_data = old_data.replace(OLD_LINE, NEW_LINE);
    let (old, new) = (shade_heights(&old_data), shade_heights(&new_data));
    assert_eq!(old.len(), 20);
    let rows = table_after(&md, "### height\\_bars");
    assert_eq!(rows.len(), 2, "{md}");
    let relative = |a: f64, b: f64| (b - a).abs() / a.abs().max(b.abs());
    let mut expected = [
        ("mean", mean(&old), mean(&new)),
        ("se", standard_error(&old), standard_error(&new)),
    ];
    expected.sort_by(|x, y| relative(y.1, y.2).total_cmp(&relative(x.1, x.2)));
    for (row, (stat, before, after)) in rows.iter().zip(expected) {
        assert_eq!(&row[..5], ["", "mean", "", "shade", stat], "{md}");
        assert!(
            rounded_from(&row[5], before),
            "{stat}: {} vs {before}",
            row[5]
        );
        assert!(
            rounded_from(&row[6], after),
            "{stat}: {} vs {after}",
            row[6]
        );
        assert!(rounded_from(&row[7], after - before), "{stat}: {}", row[7]);
        // Two significant digits of the difference.
        let digits: String = row[7].chars().filter(|c| c.is_ascii_digit()).collect();
        assert_eq!(digits.trim_start_matches('0').len(), 2, "{}", row[7]);
    }
    // (95.5 − 88.5) / 20 = 0.35.
    let mean_row = rows.iter().find(|r| r[4] == "mean").unwrap();
    assert_eq!(mean_row[7], "+0.35");

    // The terminal summary agrees.
    assert!(
        run.stdout
            .contains("changed   height_by_light (3 numbers moved)"),
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

/// Three pictures per changed figure: before and after as built, and the changed pixels at
/// the figure's size with marks only where the pictures differ.
fn picture_diffs_have_three_panels(report: &Path) {
    let mut pictures: Vec<String> = std::fs::read_dir(report)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".png"))
        .collect();
    pictures.sort();
    assert_eq!(
        pictures,
        [
            "height_bars.after.png",
            "height_bars.before.png",
            "height_bars.changed.png",
            "height_by_light.after.png",
            "height_by_light.before.png",
            "height_by_light.changed.png",
        ]
    );
    let decode = |name: &str| {
        let bytes = std::fs::read(report.join(name)).unwrap();
        let mut reader = png::Decoder::new(bytes.as_slice()).read_info().unwrap();
        let mut buf = vec![0; reader.output_buffer_size()];
        let info = reader.next_frame(&mut buf).unwrap();
        buf.truncate(info.buffer_size());
        (info, buf)
    };
    let (changed, marks) = decode("height_by_light.changed.png");
    let (before, old) = decode("height_by_light.before.png");
    let (_, new) = decode("height_by_light.after.png");
    // The figure is 85 mm × 65 mm at 300 dpi: round(85 / 25.4 × 300) = 1004 pixels wide,
    // round(65 / 25.4 × 300) = 768 high (1 in = 25.4 mm).
    assert_eq!((changed.width, changed.height), (1004, 768));
    assert_eq!((before.width, before.height), (1004, 768));
    assert_eq!(changed.color_type, png::ColorType::Rgb);
    // Changed pixels are painted vermillion (213, 94, 0), within 2 pixels of a pixel that
    // differs between before and after.
    let (w, h) = (changed.width as usize, changed.height as usize);
    let step = |buf: &[u8]| buf.len() / (w * h);
    let (so, sn) = (step(&old), step(&new));
    let differs = |x: usize, y: usize| {
        let i = y * w + x;
        old[i * so..i * so + 3] != new[i * sn..i * sn + 3]
    };
    let mut marked = 0;
    for y in 0..h {
        for x in 0..w {
            let i = (y * w + x) * 3;
            if marks[i..i + 3] == [213, 94, 0] {
                marked += 1;
                let near = (y.saturating_sub(2)..=(y + 2).min(h - 1))
                    .any(|yy| (x.saturating_sub(2)..=(x + 2).min(w - 1)).any(|xx| differs(xx, yy)));
                assert!(near, "a mark at ({x}, {y}) with no change near it");
            }
        }
    }
    assert!(marked > 100);
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
    // Pictures are inlined (before, after and changed pixels of two changed figures, and the
    // added and the removed figure); the page refers to no other file.
    assert_eq!(dom.matches("src=\"data:image/png;base64,").count(), 8);
    // Each changed figure can be flipped between before, after and changed pixels, or slid.
    assert_eq!(dom.matches("class=\"compare\"").count(), 2);
    for label in ["Before", "After", "Changed pixels", "Slide"] {
        assert_eq!(
            dom.matches(&format!(">{label}</label>")).count(),
            2,
            "{label}"
        );
    }
    // Rounded numbers keep their exact value on hover.
    assert!(dom.contains("title=\""), "no exact values");
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

#[test]
fn diff_from_a_subfolder_of_a_new_project_lists_only_what_differs_relative_to_the_top() {
    let tmp = tempfile::tempdir().unwrap();
    let made = figura(tmp.path(), &["new", "paper"]);
    assert_eq!(made.code, 0, "{}{}", made.stdout, made.stderr);
    let repo = tmp.path().join("paper");
    // The project quotes its numbers.
    edit(&repo.join("figura.toml"), |t| {
        t.replace(
            "out = \"figures/out\"",
            "out = \"figures/out\"\nnumbers = [\"tex\"]",
        )
    });
    git(&repo, &["init", "-q"]);
    git(&repo, &["add", "-A"]);
    git(&repo, &["commit", "-q", "-m", "new project"]);
    // A corrected value: plant P01 (watered daily) measured 58.7 mm in week 3, not 55.7.
    edit(&repo.join("data/basil.csv"), |t| {
        assert!(t.contains("P01,daily,3,55.7\n"));
        t.replace("P01,daily,3,55.7\n", "P01,daily,3,58.7\n")
    });
    git(&repo, &["commit", "-q", "-a", "-m", "correct P01"]);

    // Exactly what the README's CI script runs, from figures/.
    let run = figura(
        &repo.join("figures"),
        &["diff", "HEAD~1", "HEAD", "--report", "../figure-review"],
    );
    assert_eq!(run.code, 1, "{}{}", run.stdout, run.stderr);
    let md = std::fs::read_to_string(repo.join("figure-review/report.md")).unwrap();
    assert!(
        md.contains("\nFiles that differ: data/basil\\.csv.\n"),
        "{md}"
    );
    let page = std::fs::read_to_string(repo.join("figure-review/index.html")).unwrap();
    assert_eq!(page.matches("<h3>").count(), 1, "one file differs");
    assert!(page.contains("<h3>data/basil.csv</h3>"));
    assert!(!page.contains("figura-side-") && !md.contains("figura-side-"));
    // The quoted median of the daily plants in week 3 moved: (55.7 + 59.5) / 2 = 57.6 mm →
    // (58.7 + 59.5) / 2 = 59.1 mm.
    let quotes = table_after(&md, "### Quoted numbers that changed");
    assert!(
        quotes
            .iter()
            .any(|r| r[..3] == ["height_by_watering", "median", "daily"]
                && r[3].starts_with("57.6")
                && r[4].starts_with("59.1")),
        "{md}"
    );
    assert!(
        run.stdout.contains("quoted numbers changed"),
        "{}",
        run.stdout
    );

    // The same report from the top of the repository.
    let top = figura(
        &repo,
        &["diff", "HEAD~1", "HEAD", "--report", "figure-review-top"],
    );
    assert_eq!(top.code, 1, "{}{}", top.stdout, top.stderr);
    let md_top = std::fs::read_to_string(repo.join("figure-review-top/report.md")).unwrap();
    assert_eq!(md_top, md);
}

#[test]
fn names_from_the_data_are_escaped_in_the_report_and_the_page() {
    let tmp = tempfile::tempdir().unwrap();
    let repo = tmp.path().join("r");
    std::fs::create_dir(&repo).unwrap();
    std::fs::write(
        repo.join("f.figura"),
        "data d \"d.csv\" {\n  g: nominal\n  v: ratio\n}\n\nfigure f {\n  from d\n  x g\n  y v\n  mean\n  size 170mm x 100mm\n}\n",
    )
    .unwrap();
    let levels = [
        "<script>alert(1)</script>",
        "a|b",
        "![x](http://example.org/p.png)",
        "@team",
    ];
    let data = |shift: f64| {
        let mut t = String::from("g,v\n");
        for (i, l) in levels.iter().enumerate() {
            for j in 0..2 {
                t.push_str(&format!("{l},{}\n", (i * 2 + j) as f64 + shift));
            }
        }
        t
    };
    std::fs::write(repo.join("d.csv"), data(1.0)).unwrap();
    git(&repo, &["init", "-q"]);
    git(&repo, &["add", "-A"]);
    git(&repo, &["commit", "-q", "-m", "a"]);
    std::fs::write(repo.join("d.csv"), data(1.5)).unwrap();
    git(&repo, &["commit", "-q", "-a", "-m", "b"]);
    let run = figura(&repo, &["diff", "HEAD~1", "HEAD", "--report", "../rep"]);
    assert_eq!(run.code, 1, "{}{}", run.stdout, run.stderr);
    let md = std::fs::read_to_string(tmp.path().join("rep/report.md")).unwrap();
    for raw in ["<script>", "![x](", "a|b", "@team"] {
        assert!(!md.contains(raw), "{raw} unescaped in\n{md}");
    }
    // Each level is one cell of the table, shown as written.
    let rows = table_after(&md, "### f");
    let mut xs: Vec<String> = rows
        .iter()
        .filter(|r| r[4] == "mean")
        .map(|r| r[3].replace("&#64;", "@"))
        .collect();
    xs.sort();
    let mut expected: Vec<String> = levels.iter().map(|l| l.to_string()).collect();
    expected.sort();
    assert_eq!(xs, expected, "{md}");
    let page = std::fs::read_to_string(tmp.path().join("rep/index.html")).unwrap();
    assert!(!page.contains("<script>alert"));
    assert!(page.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
}
