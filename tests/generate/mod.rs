//! Generated specs that fit their codebook, with a data file that fits the codebook, for the
//! fuzz targets (`tests/fuzz.rs`) and the properties (`tests/properties.rs`).
//!
//! A [`Case`] is drawn from an [`arbitrary::Unstructured`] byte stream, so the same bytes always
//! give the same case (the fuzz targets draw the bytes from fixed seeds; proptest draws and
//! shrinks them). The generator writes a data block — an id, categorical factors (nominal or
//! ordinal, declared levels or not, within or between subjects), numeric variables (interval
//! or ratio) — then rows that follow the design (every subject at every level of its within
//! factors, sometimes repeated trials or gaps, missing cells), and one or two figures: a frame
//! chosen from the variables (counts, distribution, values by category, ordinal by category,
//! scatter, flows), layers that fit it with random options, and sometimes `colour`, `panels`,
//! a `where` filter, axis options, a title with escapes and non-ASCII text. The specs are
//! valid syntax by construction; some break a rule of the checker on purpose (a mean of an
//! ordinal, lines over a between factor), and the data hold awkward numbers (zeros, ties,
//! huge and tiny magnitudes, constant columns).
//!
//! The `pick` helpers never fail: an exhausted byte stream gives the first choice, so a short
//! stream gives a small, plain case (which is what shrinking looks for).
#![allow(dead_code)]

use std::fmt::Write as _;

use arbitrary::Unstructured;

/// Internal errors known and not yet fixed: (a text the failure contains, why it is known).
/// The fuzz targets and the properties run them but do not fail on them; `tests/fuzz.rs`
/// fails when the regression corpus no longer reproduces one, so the list shrinks.
pub const KNOWN: &[(&str, &str)] = &[];

/// Panics inside a figure keep their place (file and line) for the failure's message, which
/// is what [`KNOWN`] matches; call it before making figures.
pub fn quiet_figure_panics() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(figura::build::report_figure_panics_as_failures);
}

/// Whether an internal error is one of [`KNOWN`].
pub fn is_known(internal: &str) -> bool {
    KNOWN.iter().any(|(text, _)| internal.contains(text))
}

/// A parsed spec as the checker takes it: one file, `spec.figura`, whose figures are built.
pub fn unit(ast: figura::syntax::ast::SpecFile) -> figura::check::SpecUnit {
    figura::check::SpecUnit {
        path: std::path::PathBuf::from("spec.figura"),
        ast,
        sees: Vec::new(),
        build_figures: true,
    }
}

/// One generated spec with its data file.
#[derive(Debug, Clone)]
pub struct Case {
    /// The spec's text; its data block reads `data.csv` (or `data.tsv`) beside it.
    pub spec: String,
    /// The data file's name, as the spec writes it.
    pub data_name: String,
    /// The data file's text.
    pub data: String,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    Within,
    Between,
    Free,
}

#[derive(Debug, Clone)]
struct Factor {
    name: String,
    ordinal: bool,
    levels: Vec<String>,
    declare_levels: bool,
    role: Role,
}

#[derive(Debug, Clone)]
struct Measure {
    name: String,
    ratio: bool,
    /// How values are drawn: 0 plain, 1 constant, 2 huge, 3 tiny, 4 with zeros, 5 integers.
    shape: u8,
}

struct Codebook {
    factors: Vec<Factor>,
    measures: Vec<Measure>,
    replicates: bool,
}

fn pick<T: Copy>(u: &mut Unstructured, items: &[T]) -> T {
    u.choose(items).copied().unwrap_or(items[0])
}

fn below(u: &mut Unstructured, n: usize) -> usize {
    if n <= 1 {
        return 0;
    }
    u.int_in_range(0..=n - 1).unwrap_or(0)
}

fn chance(u: &mut Unstructured, percent: u8) -> bool {
    u.int_in_range(0..=99u8).is_ok_and(|r| r < percent)
}

/// Draws one case.
pub fn case(u: &mut Unstructured) -> Case {
    let book = codebook(u);
    let data_name = if chance(u, 15) {
        "data.tsv"
    } else {
        "data.csv"
    };
    let data = rows(u, &book, data_name.ends_with(".tsv"));
    let mut spec = data_block(u, &book, data_name);
    let n_figures = 1 + below(u, 2);
    for i in 0..n_figures {
        spec.push('\n');
        spec.push_str(&figure(u, &book, i));
    }
    Case {
        spec,
        data_name: data_name.to_owned(),
        data,
    }
}

fn codebook(u: &mut Unstructured) -> Codebook {
    let n_factors = 1 + below(u, 3);
    let factors = (0..n_factors)
        .map(|i| {
            let n_levels = 1 + below(u, 4);
            let style = below(u, 3);
            let levels = (0..n_levels)
                .map(|j| match style {
                    0 => format!("l{j}"),
                    1 => format!("{}", j + 1),
                    _ => ["low", "mid dle", "Ünïcode", "a,b", "q\"uote", "high"][j % 6].to_owned(),
                })
                .collect();
            let ordinal = chance(u, 40);
            Factor {
                name: format!("f{i}"),
                ordinal,
                levels,
                declare_levels: ordinal || chance(u, 60),
                role: pick(u, &[Role::Within, Role::Between, Role::Free]),
            }
        })
        .collect();
    let n_measures = 1 + below(u, 3);
    let measures = (0..n_measures)
        .map(|i| Measure {
            name: format!("m{i}"),
            ratio: chance(u, 60),
            shape: below(u, 6) as u8,
        })
        .collect();
    Codebook {
        factors,
        measures,
        replicates: chance(u, 15),
    }
}

/// A number of the given shape (never negative for a ratio variable).
fn value(u: &mut Unstructured, m: &Measure) -> f64 {
    let r = u.int_in_range(0..=10_000u32).unwrap_or(0) as f64 / 100.0;
    let v = match m.shape {
        1 => 7.5,
        2 => r * 1e300,
        3 => r * 1e-300,
        4 => {
            if chance(u, 30) {
                0.0
            } else {
                r
            }
        }
        5 => r.round(),
        _ => r - 20.0,
    };
    if m.ratio {
        v.abs()
    } else {
        v
    }
}

fn quote_csv(cell: &str, sep: char) -> String {
    if cell.contains(sep) || cell.contains('"') || cell.contains('\n') {
        format!("\"{}\"", cell.replace('"', "\"\""))
    } else {
        cell.to_owned()
    }
}

fn rows(u: &mut Unstructured, book: &Codebook, tsv: bool) -> String {
    let sep = if tsv { '\t' } else { ',' };
    let mut header = vec!["p".to_owned(), "trial".to_owned()];
    header.extend(book.factors.iter().map(|f| f.name.clone()));
    header.extend(book.measures.iter().map(|m| m.name.clone()));
    let mut out = header.join(&sep.to_string());
    out.push('\n');
    let n_subjects = 1 + below(u, 10);
    let within: Vec<&Factor> = book
        .factors
        .iter()
        .filter(|f| f.role == Role::Within)
        .collect();
    let n_cells: usize = within.iter().map(|f| f.levels.len()).product();
    for s in 0..n_subjects {
        let between: Vec<String> = book
            .factors
            .iter()
            .map(|f| {
                let i = below(u, f.levels.len());
                f.levels[i].clone()
            })
            .collect();
        for cell in 0..n_cells.max(1) {
            if chance(u, 5) {
                continue; // a gap in the design
            }
            let trials = if book.replicates { 1 + below(u, 3) } else { 1 };
            for t in 0..trials {
                let mut fields = vec![format!("S{s}"), format!("{}", t + 1)];
                let mut rest = cell;
                for (fi, f) in book.factors.iter().enumerate() {
                    let level = match f.role {
                        Role::Within => {
                            let i = rest % f.levels.len();
                            rest /= f.levels.len();
                            f.levels[i].clone()
                        }
                        Role::Between => between[fi].clone(),
                        Role::Free => f.levels[below(u, f.levels.len())].clone(),
                    };
                    let level = if chance(u, 4) { "NA".to_owned() } else { level };
                    fields.push(quote_csv(&level, sep));
                }
                for m in &book.measures {
                    let cell = if chance(u, 6) {
                        String::new()
                    } else {
                        format!("{}", value(u, m))
                    };
                    fields.push(cell);
                }
                out.push_str(&fields.join(&sep.to_string()));
                out.push(if chance(u, 5) { '\r' } else { '\n' });
                if out.ends_with('\r') {
                    out.push('\n');
                }
            }
        }
    }
    out
}

fn spec_string(text: &str) -> String {
    let escaped = text
        .replace('\\', "\\\\")
        .replace('"', "\\\"")
        .replace('\n', "\\n");
    format!("\"{escaped}\"")
}

fn data_block(u: &mut Unstructured, book: &Codebook, data_name: &str) -> String {
    let mut s = format!("data study {} {{\n", spec_string(data_name));
    if chance(u, 50) {
        s.push_str("  missing(\"NA\", \"\")\n");
    }
    s.push_str("  p: id\n");
    if book.replicates {
        s.push_str("  trial: ordinal levels(1, 2, 3)\n");
    }
    for f in &book.factors {
        let scale = if f.ordinal { "ordinal" } else { "nominal" };
        let _ = write!(s, "  {}: {scale}", f.name);
        if f.declare_levels {
            let levels: Vec<String> = f.levels.iter().map(|l| spec_string(l)).collect();
            let _ = write!(s, " levels({})", levels.join(", "));
            if chance(u, 30) {
                let labels: Vec<String> = f
                    .levels
                    .iter()
                    .map(|l| spec_string(&format!("Level {l}")))
                    .collect();
                let _ = write!(s, " labels({})", labels.join(", "));
            }
        }
        if chance(u, 30) {
            let _ = write!(s, " label(\"Factor {}\")", f.name);
        }
        s.push('\n');
    }
    for m in &book.measures {
        let scale = if m.ratio { "ratio" } else { "interval" };
        let _ = write!(s, "  {}: {scale}", m.name);
        if chance(u, 30) {
            s.push_str(" unit(\"µg/m³\")");
        }
        s.push('\n');
    }
    s.push_str("  subject p\n");
    let within: Vec<&str> = book
        .factors
        .iter()
        .filter(|f| f.role == Role::Within)
        .map(|f| f.name.as_str())
        .collect();
    if !within.is_empty() {
        let _ = writeln!(s, "  within {}", within.join(", "));
    }
    let between: Vec<&str> = book
        .factors
        .iter()
        .filter(|f| f.role == Role::Between)
        .map(|f| f.name.as_str())
        .collect();
    if !between.is_empty() {
        let _ = writeln!(s, "  between {}", between.join(", "));
    }
    if book.replicates {
        let how = pick(u, &["mean", "median"]);
        let _ = writeln!(s, "  replicates trial collapse({how})");
    }
    s.push_str("}\n");
    s
}

#[derive(Clone, Copy)]
enum Frame {
    Counts,
    Distribution,
    ByCategory,
    OrdinalByCategory,
    Scatter,
    Flows,
}

fn figure(u: &mut Unstructured, book: &Codebook, index: usize) -> String {
    let frame = pick(
        u,
        &[
            Frame::ByCategory,
            Frame::Counts,
            Frame::Distribution,
            Frame::Scatter,
            Frame::OrdinalByCategory,
            Frame::Flows,
        ],
    );
    let factor = |u: &mut Unstructured| book.factors[below(u, book.factors.len())].clone();
    let measure = |u: &mut Unstructured| book.measures[below(u, book.measures.len())].clone();
    let mut lines: Vec<String> = vec!["from study".to_owned()];
    if chance(u, 40) {
        let title = pick(
            u,
            &[
                "Reading speed",
                "Two\nlines",
                "Ünïcode — “quotes” & <tags>",
                "a \"quoted\" \\ title",
                "",
            ],
        );
        lines.push(format!("title {}", spec_string(title)));
    }
    let x_factor = factor(u);
    let mut layers: Vec<String> = Vec::new();
    let mut x_is_factor = true;
    match frame {
        Frame::Counts => {
            lines.push(format!(
                "x {}{}",
                x_factor.name,
                cat_axis_options(u, &x_factor)
            ));
            layers.push(format!("counts{}", pick(u, &["", " heights(percent)"])));
        }
        Frame::Distribution => {
            let m = measure(u);
            x_is_factor = false;
            lines.push(format!("x {}{}", m.name, num_axis_options(u, &m, false)));
            if chance(u, 60) {
                let bins = pick(
                    u,
                    &[
                        "",
                        " bins(scott)",
                        " bins(fd)",
                        " bins(7)",
                        " width(2.5)",
                        " heights(density)",
                    ],
                );
                layers.push(format!("histogram{bins}"));
            } else {
                let bw = pick(
                    u,
                    &["", " bandwidth(scott)", " bandwidth(1)", " bandwidth(0.25)"],
                );
                layers.push(format!("density{bw}"));
            }
        }
        Frame::ByCategory => {
            let m = measure(u);
            lines.push(format!(
                "x {}{}",
                x_factor.name,
                cat_axis_options(u, &x_factor)
            ));
            lines.push(format!("y {}{}", m.name, num_axis_options(u, &m, true)));
            let n_layers = 1 + below(u, 3);
            for _ in 0..n_layers {
                let layer = match below(u, 7) {
                    0 => format!(
                        "points{}",
                        pick(
                            u,
                            &[
                                "",
                                " jitter(0.3)",
                                " jitter(1)",
                                " arrange(stack)",
                                " arrange(swarm)"
                            ]
                        )
                    ),
                    1 => format!("box{}", pick(u, &["", " whiskers(range)"])),
                    2 => format!(
                        "violin{}",
                        pick(u, &["", " bandwidth(scott)", " bandwidth(0.5)"])
                    ),
                    3 => {
                        let error = pick(
                            u,
                            &[
                                "",
                                " error(sd)",
                                " error(se)",
                                " error(ci(0.95))",
                                " error(ci(0.9, within))",
                                " error(boot(0.95))",
                            ],
                        );
                        let bar = if m.ratio && chance(u, 30) { " bar" } else { "" };
                        format!("mean{error}{bar}")
                    }
                    4 => format!("median{}", pick(u, &["", " error(boot(0.9))"])),
                    5 => "lines by(p)".to_owned(),
                    _ => {
                        let level = &x_factor.levels[below(u, x_factor.levels.len())];
                        format!(
                            "difference from(\"{level}\"){}",
                            pick(u, &["", " dots", " error(ci(0.8))"])
                        )
                    }
                };
                layers.push(layer);
            }
        }
        Frame::OrdinalByCategory => {
            let y = book
                .factors
                .iter()
                .find(|f| f.ordinal)
                .cloned()
                .unwrap_or_else(|| factor(u));
            lines.push(format!("x {}", x_factor.name));
            lines.push(format!("y {}", y.name));
            layers.push(pick(u, &["median", "stack"]).to_owned());
        }
        Frame::Scatter => {
            let (mx, my) = (measure(u), measure(u));
            x_is_factor = false;
            lines.push(format!("x {}{}", mx.name, num_axis_options(u, &mx, false)));
            lines.push(format!("y {}{}", my.name, num_axis_options(u, &my, false)));
            layers.push(format!("points{}", pick(u, &["", " jitter(0.2)"])));
            if chance(u, 60) {
                layers.push(format!(
                    "fit{}",
                    pick(u, &["", " band(0.95)", " linear band(0.5)"])
                ));
            }
        }
        Frame::Flows => {
            let y = factor(u);
            lines.push(format!("x {}", x_factor.name));
            lines.push(format!("y {}", y.name));
            layers.push("flows by(p)".to_owned());
        }
    }
    let others: Vec<&Factor> = book
        .factors
        .iter()
        .filter(|f| !x_is_factor || f.name != x_factor.name)
        .collect();
    if !others.is_empty() && chance(u, 35) {
        let f = others[below(u, others.len())];
        lines.push(format!("colour {}", f.name));
    }
    if !others.is_empty() && chance(u, 25) {
        let f = others[below(u, others.len())];
        lines.push(format!("panels {}", f.name));
    }
    if chance(u, 25) {
        lines.push(filter(u, book));
    }
    lines.extend(layers);
    if chance(u, 30) {
        lines.push(
            pick(
                u,
                &["size 40mm x 30mm", "size 3in x 2in", "size 200pt x 150pt"],
            )
            .to_owned(),
        );
    }
    lines.push(format!(
        "formats {}",
        pick(u, &["svg", "svg png", "svg pdf"])
    ));
    lines.push("dpi 50".to_owned());
    let sep = if chance(u, 20) { "; " } else { "\n  " };
    let open = if sep == "; " { " " } else { "\n  " };
    let close = if sep == "; " { " " } else { "\n" };
    format!("figure fig{index} {{{open}{}{close}}}\n", lines.join(sep))
}

fn cat_axis_options(u: &mut Unstructured, f: &Factor) -> String {
    let mut s = String::new();
    if !f.ordinal && chance(u, 20) {
        s.push_str(pick(u, &[" order(count)", " order(name)"]));
    }
    if chance(u, 15) {
        s.push_str(" label(\"An axis\")");
    }
    s
}

fn num_axis_options(u: &mut Unstructured, m: &Measure, categorical_x: bool) -> String {
    let mut s = String::new();
    if m.ratio && chance(u, 15) && (categorical_x || chance(u, 50)) {
        s.push_str(" scale(log)");
        if chance(u, 30) {
            s.push_str(" range(0.1, 1000)");
        }
    } else if chance(u, 15) {
        s.push_str(pick(
            u,
            &[" range(0, 10)", " range(-1e6, 1e6)", " range(5, 5.001)"],
        ));
    }
    s
}

fn filter(u: &mut Unstructured, book: &Codebook) -> String {
    let f = &book.factors[below(u, book.factors.len())];
    let m = &book.measures[below(u, book.measures.len())];
    let level = spec_string(&f.levels[below(u, f.levels.len())]);
    match below(u, 4) {
        0 => format!("where {} == {level}", f.name),
        1 => format!("where {} != {level} and {} > 1", f.name, m.name),
        2 => format!("where not ({} < 0 or {} in ({level}))", m.name, f.name),
        _ => format!("where {} >= -5", m.name),
    }
}
