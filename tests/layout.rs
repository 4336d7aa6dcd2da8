//! Layout end to end: no text overlaps other text or leaves the page, on every example and on
//! a generated stress set (many panels, long labels, wide numbers, large n, many bins, long
//! titles, a long legend); a figure that cannot fit says so with the smallest size that would,
//! and fits at that size; every n shown is an n of the summary; colours follow the level of
//! measurement; a large dataset builds small, with a warning.

mod common;

use std::fmt::Write as _;
use std::path::Path;

use figura::check::plan::FigurePlan;
use figura::colour::difference::ciede2000;
use figura::colour::ordered;
use figura::colour::space::{Lab, Oklab};
use figura::compute::{FigureData, StatValue};
use figura::diag::Code;
use figura::layout::Laid;
use figura::scene::{Mark, Scene};

/// One figure, computed and laid out.
struct Made {
    plan: FigurePlan,
    data: FigureData,
    laid: Laid,
}

/// Checks, computes and lays out every figure of the specs under `root`.
fn make_all(root: &Path) -> Vec<Made> {
    let specs = figura::build::load::find_specs(&[root.to_path_buf()]).expect("specs are found");
    let mut sources = figura::diag::SourceMap::new();
    let loaded = figura::build::load::load(&specs, None, &mut sources).expect("specs load");
    assert!(loaded.diags.is_empty(), "{:?}", loaded.diags);
    let (program, diags) = figura::check::check(&loaded.units);
    assert!(
        diags.iter().all(|d| !d.is_error()),
        "the specs check: {diags:?}"
    );
    program
        .figures
        .iter()
        .map(|plan| {
            let book = &program.codebooks[plan.data];
            let table = figura::data::read_table(&figura::build::table_spec(book), &mut sources)
                .expect("the data read");
            let data = figura::compute::compute(plan, book, &table).expect("the figure computes");
            let laid = figura::layout::layout(plan, &data);
            Made {
                plan: plan.clone(),
                data,
                laid,
            }
        })
        .collect()
}

/// Every piece of text inside the page, and no two overlapping (touching is allowed).
fn assert_text_apart(name: &str, scene: &Scene) {
    let boxes = scene.text_boxes();
    assert!(!boxes.is_empty(), "{name}: no text at all");
    let page = scene.page().grown(1e-6);
    for b in &boxes {
        assert!(
            page.contains(&b.rect),
            "{name}: \"{}\" leaves the page: {:?}",
            b.text,
            b.rect
        );
    }
    for (i, a) in boxes.iter().enumerate() {
        for b in &boxes[i + 1..] {
            assert!(
                !a.rect.grown(-1e-6).overlaps(&b.rect.grown(-1e-6)),
                "{name}: \"{}\" {:?} overlaps \"{}\" {:?}",
                a.text,
                a.rect,
                b.text,
                b.rect
            );
        }
    }
}

#[test]
fn examples_fit_and_no_text_overlaps() {
    let made = make_all(&common::examples());
    assert!(made.len() >= 20);
    for m in &made {
        assert!(
            m.laid.crowding.is_none(),
            "{}: {:?}",
            m.plan.name,
            m.laid.crowding
        );
        assert_text_apart(&m.plan.name, &m.laid.scene);
    }
}

#[test]
fn every_n_shown_is_an_n_of_the_summary() {
    let mut made = make_all(&common::examples());
    let set = stress_set();
    made.extend(make_all(set.path()));
    let mut checked = 0;
    for m in &made {
        // Numbers drawn, also those of colour groups joined under a category ("24/23").
        let texts: Vec<String> = m
            .laid
            .scene
            .text_boxes()
            .into_iter()
            .flat_map(|b| b.text.split('/').map(str::to_string).collect::<Vec<_>>())
            .collect();
        for panel in &m.data.panels {
            for (x, by_group) in panel.n_by_x.iter().enumerate() {
                for (g, n) in by_group.iter().enumerate() {
                    let x_name = level_name(&m.data, x);
                    let group = m
                        .data
                        .legend
                        .as_ref()
                        .filter(|_| m.plan.colour.is_some())
                        .map_or(String::new(), |l| l.levels.names[g].clone());
                    let panel_name = if m.plan.panels.is_some() {
                        panel_level(&m.data, panel)
                    } else {
                        String::new()
                    };
                    let in_summary = m.data.summary.iter().any(|r| {
                        r.panel == panel_name
                            && r.x == x_name
                            && r.group == group
                            && matches!(r.stat.as_str(), "n" | "count")
                            && r.value == StatValue::Number(*n as f64)
                    });
                    assert!(
                        in_summary,
                        "{}: n {n} at x {x_name:?}, group {group:?}, panel {panel_name:?} is no n of the summary",
                        m.plan.name
                    );
                    assert!(
                        texts.contains(&n.to_string()),
                        "{}: n {n} is not drawn",
                        m.plan.name
                    );
                    checked += 1;
                }
            }
        }
    }
    assert!(checked > 50, "only {checked} n checked");
}

fn level_name(data: &FigureData, x: usize) -> String {
    match &data.x {
        figura::compute::XScale::Categories { levels, .. } => levels.names[x].clone(),
        figura::compute::XScale::Numbers(_) => String::new(),
    }
}

/// The panel's level name, as the summary writes it.
fn panel_level(data: &FigureData, panel: &figura::compute::PanelData) -> String {
    let i = data
        .panels
        .iter()
        .position(|p| std::ptr::eq(p, panel))
        .unwrap();
    data.summary
        .iter()
        .map(|r| r.panel.clone())
        .fold(Vec::<String>::new(), |mut names, p| {
            if !names.contains(&p) {
                names.push(p);
            }
            names
        })
        .get(i)
        .cloned()
        .unwrap_or_default()
}

#[test]
fn the_within_subject_mean_and_the_n_under_it_agree() {
    // speed_within: one reader misses the evening screen session, so the within-subject mean
    // uses 23 complete readers in every cell; the n under the axis says 23, as the summary.
    let made = make_all(&common::examples());
    let m = made.iter().find(|m| m.plan.name == "speed_within").unwrap();
    for panel in &m.data.panels {
        assert!(
            panel.n_by_x.iter().flatten().all(|n| *n == 23),
            "{:?}",
            panel.n_by_x
        );
    }
    assert!(m.data.key.iter().any(|k| k.contains("Cousineau–Morey")));
    assert!(m
        .data
        .key
        .iter()
        .any(|k| k.starts_with("n: participants with a value at every level")));
}

#[test]
fn the_key_names_every_summary_mark() {
    let made = make_all(&common::examples());
    let key = |name: &str| {
        made.iter()
            .find(|m| m.plan.name == name)
            .unwrap()
            .data
            .key
            .join(" ")
    };
    assert!(key("beetles_by_mulch").contains("Bars and large dots: mean ± SD."));
    assert!(key("height_by_light").contains(
        "Boxes: median and quartiles, whiskers to 1.5 IQR; notches: median ± 1.58 IQR / sqrt(n)."
    ));
    assert!(key("comfort_by_medium").contains("median level, interquartile range"));
    assert!(key("response_violins").contains("Dots: each participant's mean of 18 trials."));
    assert!(key("response_violins").contains("median, 95% bootstrap CI"));
    assert!(key("soil_temperature").contains("mean, 90% CI"));
    // `key off` leaves the key out.
    let dir = tempfile::tempdir().unwrap();
    write(
        dir.path(),
        "beetles.csv",
        "plot,mulch,beetles\n1,a,3\n2,a,5\n3,b,4\n4,b,6\n",
    );
    write(
        dir.path(),
        "k.figura",
        "data d \"beetles.csv\" {\n  plot: id\n  mulch: nominal\n  beetles: ratio\n}\nfigure k {\n  from d\n  x mulch\n  y beetles\n  points\n  mean error(sd)\n  key off\n}\n",
    );
    let m = &make_all(dir.path())[0];
    assert!(m.data.key.is_empty());
    assert!(m
        .laid
        .scene
        .text_boxes()
        .iter()
        .all(|b| !b.text.contains("mean")));
}

#[test]
fn stress_figures_fit_or_say_the_smallest_size_that_does() {
    let set = stress_set();
    let made = make_all(set.path());
    assert!(made.len() >= 10);
    let mut crowded = 0;
    for m in &made {
        match &m.laid.crowding {
            None => assert_text_apart(&m.plan.name, &m.laid.scene),
            Some(c) => {
                crowded += 1;
                assert!(!c.problems.is_empty());
                let (w, h) = c
                    .smallest
                    .unwrap_or_else(|| panic!("{}: no size fits", m.plan.name));
                assert!(w >= m.plan.width_mm && h >= m.plan.height_mm);
                let mut plan = m.plan.clone();
                plan.width_mm = w;
                plan.height_mm = h;
                let laid = figura::layout::layout(&plan, &m.data);
                assert!(
                    laid.crowding.is_none(),
                    "{} at the size it suggests, {w} × {h} mm: {:?}",
                    m.plan.name,
                    laid.crowding
                );
                assert_text_apart(&m.plan.name, &laid.scene);
            }
        }
    }
    assert!(
        crowded >= 1,
        "the stress set holds a figure too full for its size"
    );
}

#[test]
fn a_crowded_figure_fails_with_its_size_and_the_size_that_fits_unless_allowed() {
    let set = stress_set();
    let spec = set.path().join("panels.figura");
    let build = |allow: bool| {
        let out = tempfile::tempdir().unwrap();
        let options = figura::build::BuildOptions {
            paths: vec![spec.clone()],
            out: Some(out.path().to_path_buf()),
            allow_crowding: allow,
            ..figura::build::BuildOptions::default()
        };
        let report = figura::build::build(&options, &figura::build::NoProgress).unwrap();
        let svg = out.path().join("ten_panels.svg").exists();
        (report, svg)
    };
    let (report, svg) = build(false);
    let d = report
        .diagnostics
        .iter()
        .find(|d| d.code == Code::FigureCrowded)
        .expect("F0124");
    assert!(!svg, "a crowded figure writes nothing");
    assert!(
        d.message.contains("does not fit 85 × 65 mm"),
        "{}",
        d.message
    );
    let help = d.help.as_deref().unwrap();
    assert!(
        help.contains("the smallest size that holds it is"),
        "{help}"
    );
    assert!(help.contains("--allow-crowding"), "{help}");
    let (report, svg) = build(true);
    assert!(report
        .diagnostics
        .iter()
        .any(|d| d.code == Code::CrowdingAllowed));
    assert!(!report.has_errors());
    assert!(svg);
}

#[test]
fn ordinal_colours_take_the_ordered_palette_and_a_midpoint_diverges() {
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::from("id,rating,agree,score\n");
    for i in 0..60 {
        let rating = ["low", "mid", "high", "top"][i % 4];
        let agree = ["no", "neutral", "yes"][i % 3];
        writeln!(csv, "{i},{rating},{agree},{}", (i * 7) % 23).unwrap();
    }
    write(dir.path(), "r.csv", &csv);
    write(
        dir.path(),
        "r.figura",
        r#"data r "r.csv" {
  id: id
  rating: ordinal levels("low", "mid", "high", "top")
  agree: ordinal levels("no", "neutral", "yes") midpoint("neutral")
  score: ratio
}
figure by_rating {
  from r
  x score
  colour rating
  ecdf
}
figure by_agreement {
  from r
  x score
  colour agree
  ecdf
}
figure filtered {
  from r
  x score
  colour rating
  where rating >= "mid"
  ecdf
}
"#,
    );
    let made = make_all(dir.path());
    let colours = |name: &str| {
        made.iter()
            .find(|m| m.plan.name == name)
            .unwrap()
            .data
            .legend
            .as_ref()
            .unwrap()
            .colours
            .clone()
    };
    assert_eq!(colours("by_rating"), ordered::sequential(4).unwrap());
    assert_eq!(colours("by_agreement"), ordered::diverging(3, 1).unwrap());
    // A filter that hides a level keeps the others' colours.
    assert_eq!(
        colours("filtered"),
        ordered::sequential(4).unwrap()[1..].to_vec()
    );
    // Along the levels, OKLab lightness falls and the CIEDE2000 difference from the first
    // level grows (Ottosson 2020; Sharma, Wu & Dalal 2005), as the ordered palettes promise.
    let levels = colours("by_rating");
    let lightness: Vec<f64> = levels.iter().map(|c| Oklab::from_colour(*c).l).collect();
    assert!(lightness.windows(2).all(|w| w[1] < w[0]), "{lightness:?}");
    let first = Lab::from_colour(levels[0]);
    let from_first: Vec<f64> = levels
        .iter()
        .map(|c| ciede2000(first, Lab::from_colour(*c)))
        .collect();
    assert!(from_first.windows(2).all(|w| w[1] > w[0]), "{from_first:?}");
    // The marks are drawn in those colours.
    let m = made.iter().find(|m| m.plan.name == "by_rating").unwrap();
    let drawn = figura::svg::to_svg(&m.laid.scene).unwrap();
    for c in ordered::sequential(4).unwrap() {
        assert!(drawn.contains(&c.to_string()), "{c} is not drawn");
    }
}

/// The marks drawn inside the panels (the clipped groups).
fn data_marks(scene: &Scene) -> Vec<&Mark> {
    scene
        .marks
        .iter()
        .filter_map(|m| match m {
            Mark::Clip { marks, .. } => Some(marks),
            _ => None,
        })
        .flatten()
        .collect()
}

#[test]
fn overlapping_groups_never_mix_colours_and_many_bins_stay_solid() {
    let made = make_all(&common::examples());
    // Histograms and densities of several colour groups overlap: outlines only, no fill.
    for name in ["temperature_spread", "response_density"] {
        let m = made.iter().find(|m| m.plan.name == name).unwrap();
        let marks = data_marks(&m.laid.scene);
        assert!(!marks.is_empty());
        assert!(
            marks.iter().all(|m| matches!(m, Mark::Line { .. })),
            "{name} fills an area that groups share"
        );
    }
    // 400 bins of one group: one filled shape, and no white line between bins narrower
    // than a millimetre.
    let set = stress_set();
    let made = make_all(set.path());
    let m = made.iter().find(|m| m.plan.name == "many_bins").unwrap();
    let marks = data_marks(&m.laid.scene);
    let filled = marks
        .iter()
        .filter(|m| matches!(m, Mark::Polygon { fill: Some(_), .. }))
        .count();
    assert_eq!(filled, 1);
    assert!(marks.iter().all(|m| match m {
        Mark::Line { stroke, .. } => stroke.colour != figura::scene::Colour::WHITE,
        _ => true,
    }));
}

#[test]
fn many_values_build_small_with_a_warning() {
    // 300 000 values in 3 cells: every value drawn, the file stays small.
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::with_capacity(300_000 * 16);
    csv.push_str("group,value\n");
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    for i in 0..300_000u64 {
        // xorshift64 (Marsaglia 2003): a fixed, deterministic spread of values.
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        let u = (state >> 11) as f64 / (1u64 << 53) as f64;
        let group = ["a", "b", "c"][(i % 3) as usize];
        writeln!(
            csv,
            "{group},{:.3}",
            100.0 + 40.0 * (u - 0.5) * (u - 0.5) * 4.0
        )
        .unwrap();
    }
    write(dir.path(), "big.csv", &csv);
    write(
        dir.path(),
        "big.figura",
        "data big \"big.csv\" {\n  group: nominal\n  value: ratio\n}\nfigure many {\n  from big\n  x group\n  y value\n  points jitter(0.4)\n  box\n  formats svg\n}\n",
    );
    let out = tempfile::tempdir().unwrap();
    let options = figura::build::BuildOptions {
        paths: vec![dir.path().to_path_buf()],
        out: Some(out.path().to_path_buf()),
        ..figura::build::BuildOptions::default()
    };
    let report = figura::build::build(&options, &figura::build::NoProgress).unwrap();
    assert!(!report.has_errors(), "{:?}", report.diagnostics);
    assert!(report
        .diagnostics
        .iter()
        .any(|d| d.code == Code::ManyPoints));
    let svg = std::fs::metadata(out.path().join("many.svg"))
        .unwrap()
        .len();
    assert!(svg < 3_000_000, "the SVG has {svg} bytes");
}

fn write(dir: &Path, name: &str, text: &str) {
    std::fs::write(dir.join(name), text).unwrap();
}

/// The stress set: specs and data in a temporary folder. With `FIGURA_STRESS_DIR=FOLDER` the
/// set is also written there, to build and look at (`figura build FOLDER`).
fn stress_set() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    write_stress_set(dir.path());
    if let Ok(keep) = std::env::var("FIGURA_STRESS_DIR") {
        std::fs::create_dir_all(&keep).unwrap();
        write_stress_set(Path::new(&keep));
    }
    dir
}

fn write_stress_set(d: &Path) {
    // Ten sites, three conditions, wide numbers.
    let mut csv = String::from("plot,site,condition,yield,rating,state,visit\n");
    let sites: Vec<String> = (0..10)
        .map(|i| format!("Research site {}", i + 1))
        .collect();
    let ratings = [
        "Very dissatisfied",
        "Dissatisfied",
        "Neither satisfied nor dissatisfied",
        "Satisfied",
        "Very satisfied",
    ];
    for (s, site) in sites.iter().enumerate() {
        for k in 0..12 {
            let c = k % 3;
            for v in 0..3 {
                let y = 1_000_000.0 + 123_456.7 * ((s * 7 + c * 3 + k * 5 + v) % 11) as f64;
                let rating = ratings[(s + c + k + v) % 5];
                let state = ["none", "mild", "moderate", "severe"][(s + k + v) % 4];
                writeln!(
                    csv,
                    "p{s}_{k},{site},cond {c},{y},{rating},{state},v{}",
                    v + 1
                )
                .unwrap();
            }
        }
    }
    write(d, "plots.csv", &csv);
    let levels = sites
        .iter()
        .map(|s| format!("\"{s}\""))
        .collect::<Vec<_>>()
        .join(", ");
    let rating_levels = ratings
        .iter()
        .map(|s| format!("\"{s}\""))
        .collect::<Vec<_>>()
        .join(", ");
    let codebook = format!(
        "data plots \"plots.csv\" {{\n  plot: id\n  site: nominal levels({levels})\n  condition: nominal levels(\"cond 0\", \"cond 1\", \"cond 2\") labels(\"Control condition\", \"Low dose of the treatment\", \"High dose of the treatment\") label(\"Condition of the treatment in the field\")\n  yield: ratio label(\"Yield of the plot in the harvest season\") unit(\"kg/ha\")\n  rating: ordinal levels({rating_levels}) label(\"Satisfaction of the farmer\")\n  state: ordinal levels(\"none\", \"mild\", \"moderate\", \"severe\")\n  visit: ordinal levels(\"v1\", \"v2\", \"v3\")\n  subject plot\n  within visit\n  between condition\n}}\n"
    );
    write(d, "plots.figura", &codebook);
    write(
        d,
        "panels.figura",
        "include \"plots.figura\"\n\nfigure ten_panels {\n  from plots\n  title \"Yield of every research plot under three conditions of the treatment, in each of the ten research sites of the network, measured in the harvest season\" show\n  x condition\n  y yield\n  panels site\n  points jitter(0.3)\n  box\n}\n\nfigure ten_panels_wide {\n  from plots\n  x condition\n  y yield\n  panels site\n  points jitter(0.3)\n  box\n  size 180mm x 160mm\n}\n",
    );
    write(
        d,
        "labels.figura",
        "include \"plots.figura\"\n\nfigure long_labels {\n  from plots\n  x rating\n  y yield\n  colour condition\n  points jitter(0.3)\n  median\n}\n\nfigure long_labels_narrow {\n  from plots\n  x rating\n  y yield\n  points\n  size 40mm x 70mm\n}\n\nfigure long_legend {\n  from plots\n  x yield\n  colour site\n  where site in (\"Research site 1\", \"Research site 2\", \"Research site 3\", \"Research site 4\", \"Research site 5\", \"Research site 6\", \"Research site 7\", \"Research site 8\")\n  density\n  size 85mm x 80mm\n}\n",
    );
    write(
        d,
        "counts.figura",
        "include \"plots.figura\"\n\nfigure counts_by_site {\n  from plots\n  x site\n  counts\n}\n\nfigure counts_in_panels {\n  from plots\n  x rating\n  colour condition\n  panels state\n  counts heights(percent)\n  size 170mm x 90mm\n}\n\nfigure flows_by_site {\n  from plots\n  x visit\n  y state\n  panels condition\n  flows by(plot)\n}\n",
    );
    write(
        d,
        "ordinal.figura",
        "include \"plots.figura\"\n\nfigure ordinal_medians {\n  from plots\n  x site\n  y rating\n  median\n  size 120mm x 60mm\n  title \"Farmers' satisfaction by site\" show\n  caption \"A caption long enough to wrap onto more than one line of the figure, with words that need room, so the layout must make room for it under the key and keep it on the page.\"\n}\n",
    );
    write(
        d,
        "estimates.figura",
        "include \"plots.figura\"\n\nfigure ten_panels_of_differences {\n  from plots\n  x condition\n  y yield\n  panels site\n  points arrange(swarm)\n  mean error(ci(0.95))\n  difference from(\"cond 0\")\n  size 180mm x 220mm\n}\n\nfigure differences_in_a_column {\n  from plots\n  x condition\n  y yield\n  colour visit\n  points arrange(stack)\n  difference from(\"cond 0\")\n}\n\nfigure shares_of_ratings {\n  from plots\n  x site\n  y rating\n  panels condition\n  stack\n  size 180mm x 120mm\n}\n",
    );
    // Many values for large n and many bins.
    let mut big = String::from("unit,group,value\n");
    let mut state: u64 = 0x9e37_79b9_7f4a_7c15;
    for i in 0..20_460 {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        let u = (state >> 11) as f64 / (1u64 << 53) as f64;
        writeln!(big, "u{i},g{},{:.4}", i % 10, 50.0 + 30.0 * (u - 0.5)).unwrap();
    }
    write(d, "big.csv", &big);
    write(
        d,
        "big.figura",
        "data big \"big.csv\" {\n  unit: id\n  group: nominal levels(\"g0\", \"g1\", \"g2\", \"g3\", \"g4\", \"g5\", \"g6\", \"g7\", \"g8\", \"g9\")\n  value: ratio label(\"Value\")\n}\n\nfigure large_n {\n  from big\n  x group\n  y value\n  box\n}\n\nfigure many_bins {\n  from big\n  x value\n  histogram bins(400)\n}\n\nfigure fd_bins {\n  from big\n  x value\n  histogram bins(fd) heights(density)\n  density\n}\n",
    );
}

/// Every character an example draws is in the bundled font (a missing one shows as an empty
/// box: the key's words and tick labels must stay within the font's characters).
#[test]
fn every_text_of_the_examples_has_its_glyphs() {
    for m in make_all(&common::examples()) {
        m.laid.scene.for_each_text(&mut |t| {
            let missing = figura::font::missing_chars(&t.text, t.style.weight);
            assert!(
                missing.is_empty(),
                "{}: {:?} has characters the font cannot draw: {missing:?}",
                m.plan.name,
                t.text
            );
        });
    }
}
