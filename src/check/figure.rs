//! Checking `figure` blocks: their statements, axes, groupings, sizes and layers, and the
//! warnings about hidden data.

use std::path::Path;

use crate::diag::{did_you_mean, Code, Diagnostic, Span};
use crate::scene::TextForm;
use crate::syntax::ast::{Block, Ident, Plain, Statement, Term, Where};

use super::axes::{self, not_categorical};
use super::codebook::unknown_variable;
use super::colours;
use super::display;
use super::filter::check_filter;
use super::layer::{self, shape, Fitted, LayerPlan, Shows, LAYERS};
use super::plan::{CatVar, Codebook, FigurePlan, Filter, Formats, GroupMarks, Layer, Scale};
use super::terms;

/// Default printed size: 85 mm × 65 mm (a single journal column).
pub const DEFAULT_SIZE_MM: (f64, f64) = (85.0, 65.0);
/// Default raster resolution.
pub const DEFAULT_DPI: u32 = 300;
/// Output settings of a figure that gives no `formats` or `dpi` of its own.
///
/// The language's defaults (`svg png`, 300 dpi) unless a project's `figura.toml` sets others.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FigureDefaults {
    pub formats: Formats,
    pub dpi: u32,
}

impl Default for FigureDefaults {
    fn default() -> Self {
        FigureDefaults {
            formats: Formats {
                svg: true,
                png: true,
                ..Formats::NONE
            },
            dpi: DEFAULT_DPI,
        }
    }
}

/// Accepted figure sizes, in millimetres per side.
pub const SIZE_LIMITS_MM: (f64, f64) = (20.0, 600.0);
/// Accepted raster resolutions.
pub const DPI_LIMITS: (u32, u32) = (50, 2400);

const FIGURE_STATEMENTS: [&str; 13] = [
    "from", "title", "caption", "x", "y", "colour", "panels", "size", "formats", "dpi", "key",
    "grid", "where",
];

/// The statements of a figure, sorted by kind before they are interpreted.
#[derive(Default)]
struct Parts<'a> {
    from: Option<&'a Plain>,
    title: Option<&'a Plain>,
    caption: Option<&'a Plain>,
    x: Option<&'a Plain>,
    y: Option<&'a Plain>,
    colour: Option<&'a Plain>,
    panels: Option<&'a Plain>,
    size: Option<&'a Plain>,
    formats: Option<&'a Plain>,
    dpi: Option<&'a Plain>,
    key: Option<&'a Plain>,
    grid: Option<&'a Plain>,
    filter: Option<&'a Where>,
    layers: Vec<(&'static layer::LayerDecl, &'a Plain)>,
}

/// Checks one figure against the data blocks visible from its file.
pub fn check_figure(
    block: &Block,
    spec_path: &Path,
    visible: &[(usize, &Codebook)],
    defaults: &FigureDefaults,
    diags: &mut Vec<Diagnostic>,
) -> Option<FigurePlan> {
    // Every error from here on, the statements' own included, stops the figure (§11).
    let errors_before = count_errors(diags);
    let parts = sort_statements(block, diags);
    let Some(from) = parts.from else {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!(
                    "figure `{}` does not say which data to show",
                    block.name.name
                ),
            )
            .with_label(block.name.span, "no `from`")
            .with_help("add `from NAME`, naming a data block"),
        );
        return None;
    };
    let (data_idx, book) = resolve_data(from, visible, diags)?;
    let (title, show_title) = match parts.title.and_then(|p| title(p, diags)) {
        Some((t, show)) => (Some(t), show),
        None => (None, false),
    };
    let key = parts
        .key
        .is_none_or(|p| switch(p, "key off", diags).unwrap_or(true));
    let grid = parts
        .grid
        .is_some_and(|p| p.terms.is_empty() || switch(p, "grid", diags).unwrap_or(false));
    let caption = parts
        .caption
        .and_then(|p| terms::one_string(p, "caption \"...\"", diags))
        .map(|s| display::text(s, diags));
    let x = parts.x.and_then(|p| axes::axis_var(book, p, diags));
    let y = parts.y.map(|p| axes::axis_var(book, p, diags));
    let (colour, group_marks) = match parts.colour.and_then(|p| colour_by(book, p, diags)) {
        Some((c, marks)) => (Some(c), marks),
        None => (None, GroupMarks::default()),
    };
    let panels = parts.panels.and_then(|p| grouping(book, p, diags));
    // A bad size, format list or dpi is reported, and the rest of the figure is still checked
    // (with the default in its place); the error rejects the figure at the end.
    let (width_mm, height_mm) = parts
        .size
        .and_then(|p| size(p, diags))
        .unwrap_or(DEFAULT_SIZE_MM);
    let size_span = parts.size.map_or(block.name.span, |p| p.span);
    let formats = parts
        .formats
        .and_then(|p| formats(p, diags))
        .unwrap_or(defaults.formats);
    let dpi = parts
        .dpi
        .and_then(|p| dpi(p, diags))
        .unwrap_or(defaults.dpi);
    // A filter with errors is reported, and the rest of the figure is still checked.
    let filter: Option<Filter> = parts
        .filter
        .and_then(|w| check_filter(book, &w.expr, diags));
    // Unknown and repeated options of every layer first, then the axes, then each layer.
    let layer_opts: Vec<_> = parts
        .layers
        .iter()
        .map(|(decl, p)| terms::options(&p.terms, &decl.accepts(&decl.quoted()), diags))
        .collect();
    if parts.layers.is_empty() {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!("figure `{}` has no layers", block.name.name),
            )
            .with_label(block.name.span, "nothing to draw")
            .with_help("add a layer such as `points`, `box`, `counts` or `histogram`"),
        );
        return None;
    }
    let only_guides = parts
        .layers
        .iter()
        .all(|(d, _)| d.shows == Shows::Reference);
    if let (true, Some((_, guide))) = (only_guides, parts.layers.first()) {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!(
                    "figure `{}` has guides but no layer that shows the data",
                    block.name.name
                ),
            )
            .with_label(guide.head.span, "marks a value for the data")
            .with_help("add a layer such as `points` or `box`: a guide is read against the data"),
        );
        return None;
    }
    let Some(x) = x else {
        if parts.x.is_none() {
            diags.push(
                Diagnostic::new(
                    Code::MissingStatement,
                    format!("figure `{}` has no `x`", block.name.name),
                )
                .with_label(block.name.span, "no x axis")
                .with_help("add `x VARIABLE`"),
            );
        }
        return None;
    };
    let y = match y {
        Some(None) => return None,
        Some(Some(y)) => Some(y),
        None => None,
    };
    let errors_before_axes = count_errors(diags);
    let plan_axes = axes::axes(book, &x, y.as_ref(), diags);
    let fitted = plan_axes.as_ref().map(|_| Fitted {
        x: &x,
        y: y.as_ref(),
    });
    let layers = fit_layers(book, &parts.layers, &layer_opts, fitted, diags);
    if let Some(alone) = layers.iter().find(|l| l.decl.alone) {
        if let Some(c) = &colour {
            diags.push(
                Diagnostic::new(
                    Code::LayerDoesNotFit,
                    format!(
                        "{} colours its marks by the levels of y; `colour` cannot split them",
                        alone.decl.quoted()
                    ),
                )
                .with_label(c.span, "a second colouring")
                .with_help("remove `colour`, or show each group in its own panel with `panels`"),
            );
        }
    }
    check_company(&layers, diags);
    if count_errors(diags) == errors_before_axes {
        warn_hidden_data(&layers, diags);
    }
    if count_errors(diags) > errors_before {
        return None;
    }
    Some(FigurePlan {
        name: block.name.name.clone(),
        name_span: block.name.span,
        spec_path: spec_path.to_path_buf(),
        data: data_idx,
        title,
        show_title,
        caption,
        key,
        grid,
        axes: plan_axes?,
        layers,
        colour,
        group_marks,
        panels,
        filter,
        filter_span: parts.filter.map(|w| w.span),
        width_mm,
        height_mm,
        size_span,
        formats,
        dpi,
        dpi_span: parts.dpi.map(|p| p.span),
    })
}

/// Fits every layer to the axes and reads its options; a layer after an `alone` layer that
/// fits (flows) is refused, as is every other layer beside it.
fn fit_layers(
    book: &Codebook,
    stmts: &[(&'static layer::LayerDecl, &Plain)],
    opts: &[terms::Options],
    fitted: Option<Fitted>,
    diags: &mut Vec<Diagnostic>,
) -> Vec<LayerPlan> {
    let fits = |decl: &layer::LayerDecl, p: &Plain, diags: &mut Vec<Diagnostic>| {
        fitted.is_some_and(|f| shape::fits(decl, p.head.span, book, f.x, f.y, diags))
    };
    let alone = fitted.and_then(|f| {
        stmts.iter().find(|(decl, p)| {
            decl.alone && shape::fits(decl, p.head.span, book, f.x, f.y, &mut Vec::new())
        })
    });
    let mut out = Vec::new();
    for ((decl, p), opts) in stmts.iter().zip(opts) {
        let fit = match alone {
            Some((alone, _)) if alone.word != decl.word => {
                diags.push(
                    Diagnostic::new(
                        Code::LayerDoesNotFit,
                        format!(
                            "{} cannot share a figure with {}",
                            decl.quoted(),
                            alone.quoted()
                        ),
                    )
                    .with_label(p.head.span, "does not fit")
                    .with_help(format!("draw {} in a figure of its own", alone.quoted())),
                );
                false
            }
            _ => fits(decl, p, diags),
        };
        let axes = fitted.filter(|_| fit);
        if let Some(plan) = layer::read(decl, book, p, opts, axes, diags) {
            if fit {
                out.push(plan);
            }
        }
    }
    out
}

/// Layers that need others beside them, or cannot have some: a comparison (`difference`) is
/// drawn under the data it compares, once per figure; lines cannot meet arranged dots, whose
/// places the layout finds.
fn check_company(layers: &[LayerPlan], diags: &mut Vec<Diagnostic>) {
    let comparisons: Vec<&LayerPlan> = layers
        .iter()
        .filter(|l| l.decl.shows == Shows::Comparison)
        .collect();
    if let (Some(first), true) = (comparisons.first(), comparisons.len() == layers.len()) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!(
                    "{} is drawn under the data it compares, and no layer draws them",
                    first.decl.quoted()
                ),
            )
            .with_label(first.head, "compares the levels of x")
            .with_help(
                "add `points`, `box` or `mean` to show each level's values above the differences",
            ),
        );
    }
    if let [first, second, ..] = comparisons.as_slice() {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!(
                    "a figure has one axis of differences, and {} is given twice",
                    second.decl.quoted()
                ),
            )
            .with_label(second.head, "a second comparison")
            .with_label(first.head, "the first")
            .with_help("keep one; to compare with another reference level, make a second figure"),
        );
    }
    let arranged = layers
        .iter()
        .find(|l| matches!(&l.layer, Layer::Points(p) if p.arrange.is_some()));
    let lines = layers.iter().find(|l| matches!(l.layer, Layer::Lines(_)));
    if let (Some(points), Some(lines)) = (arranged, lines) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                "lines cannot join arranged dots: each dot's place across the band depends on the others",
            )
            .with_label(lines.head, "joins each subject's values")
            .with_label(points.span, "dots placed side by side")
            .with_help("use `points jitter(...)` with `lines`: a subject's dots and its line then meet"),
        );
    }
}

/// The two warnings of §6: a mean with nothing that shows spread or values; bars without points.
fn warn_hidden_data(layers: &[LayerPlan], diags: &mut Vec<Diagnostic>) {
    let shows = |what: &[Shows]| layers.iter().any(|l| what.contains(&l.decl.shows));
    for l in layers {
        if l.traits.needs_spread && !shows(&[Shows::Values, Shows::Distribution]) {
            diags.push(
                Diagnostic::new(Code::MeanAlone, "a mean alone hides how the values spread")
                    .with_label(l.head, "only the mean is shown")
                    .with_help(
                        "add `points`, `box` or `violin` so readers see the distribution and n",
                    ),
            );
        }
        if let (Some(bar), false) = (l.traits.needs_points, shows(&[Shows::Values])) {
            diags.push(
                Diagnostic::new(
                    Code::BarWithoutPoints,
                    "bars of means hide the distribution",
                )
                .with_label(bar, "bar without points")
                .with_help("add `points jitter(0.2)` to show the individual values"),
            );
        }
    }
}

/// The number of errors (not warnings) among `diags`.
pub(super) fn count_errors(diags: &[Diagnostic]) -> usize {
    diags.iter().filter(|d| d.is_error()).count()
}

fn sort_statements<'a>(block: &'a Block, diags: &mut Vec<Diagnostic>) -> Parts<'a> {
    let mut parts = Parts::default();
    for stmt in &block.statements {
        let p = match stmt {
            Statement::Where(w) => {
                if let Some(first) = parts.filter {
                    diags.push(twice("where", w.span, first.span));
                } else {
                    parts.filter = Some(w);
                }
                continue;
            }
            Statement::Plain(p) => p,
        };
        if let Some(t) = &p.target {
            diags.push(
                Diagnostic::new(
                    Code::UnknownStatement,
                    "variables are declared in data blocks, not in figures",
                )
                .with_label(t.span, "a declaration")
                .with_help("move the declaration into the `data` block"),
            );
            continue;
        }
        let slot = match p.head.name.as_str() {
            "from" => &mut parts.from,
            "title" => &mut parts.title,
            "caption" => &mut parts.caption,
            "x" => &mut parts.x,
            "y" => &mut parts.y,
            "colour" => &mut parts.colour,
            "panels" => &mut parts.panels,
            "size" => &mut parts.size,
            "formats" => &mut parts.formats,
            "dpi" => &mut parts.dpi,
            "key" => &mut parts.key,
            "grid" => &mut parts.grid,
            name if layer::find(name).is_some() => {
                parts.layers.extend(layer::find(name).map(|decl| (decl, p)));
                continue;
            }
            _ => {
                diags.push(unknown_figure_statement(&p.head));
                continue;
            }
        };
        match slot {
            Some(first) => diags.push(twice(&p.head.name, p.head.span, first.head.span)),
            None => *slot = Some(p),
        }
    }
    parts
}

fn twice(name: &str, span: Span, first: Span) -> Diagnostic {
    Diagnostic::new(
        Code::Repeated,
        format!("`{name}` is given twice in one figure"),
    )
    .with_label(span, "given again here")
    .with_label(first, "first given here")
    .with_help("a figure takes each statement once (only layers repeat); keep one")
}

fn unknown_figure_statement(head: &Ident) -> Diagnostic {
    let known = FIGURE_STATEMENTS
        .iter()
        .copied()
        .chain(LAYERS.iter().map(|d| d.word));
    let d = Diagnostic::new(
        Code::UnknownStatement,
        format!("`{}` is not a statement or layer of a figure", head.name),
    )
    .with_label(head.span, "unknown");
    match did_you_mean(&head.name, known) {
        Some(s) => d.with_help(format!("did you mean `{s}`?")),
        None => d.with_help(format!(
            "figure statements: {}; layers: {}",
            FIGURE_STATEMENTS.join(", "),
            LAYERS.iter().map(|d| d.word).collect::<Vec<_>>().join(", ")
        )),
    }
}

fn resolve_data<'b>(
    from: &Plain,
    visible: &[(usize, &'b Codebook)],
    diags: &mut Vec<Diagnostic>,
) -> Option<(usize, &'b Codebook)> {
    let name = terms::one_word(from, "from reading", diags)?;
    if let Some((idx, book)) = visible.iter().find(|(_, b)| b.name == name.name) {
        return Some((*idx, book));
    }
    let d = Diagnostic::new(
        Code::UnknownData,
        format!("no data block named `{}`", name.name),
    )
    .with_label(name.span, "unknown data");
    let help = match did_you_mean(&name.name, visible.iter().map(|(_, b)| b.name.as_str())) {
        Some(s) => format!("did you mean `{s}`?"),
        None if visible.is_empty() => {
            "declare a `data NAME \"file.csv\" { ... }` block in this file or in an `include`d one"
                .to_string()
        }
        None => format!(
            "visible data blocks: {}",
            visible
                .iter()
                .map(|(_, b)| b.name.as_str())
                .collect::<Vec<_>>()
                .join(", ")
        ),
    };
    diags.push(d.with_help(help));
    None
}

/// `colour VAR [shapes] [dashes]`: the grouping, and how else the groups are told apart; a
/// variable with its own `colours(...)` that look alike in greyscale, told apart by colour only,
/// is W0013.
fn colour_by(
    book: &Codebook,
    p: &Plain,
    diags: &mut Vec<Diagnostic>,
) -> Option<(CatVar, GroupMarks)> {
    let shape = "colour VARIABLE shapes dashes";
    let mut marks = GroupMarks::default();
    for term in p.terms.iter().skip(1) {
        let word = terms::expect_choice(term, &["shapes", "dashes"], shape, diags)?;
        let slot = match word.name.as_str() {
            "shapes" => &mut marks.shapes,
            _ => &mut marks.dashes,
        };
        if *slot {
            diags.push(
                Diagnostic::new(Code::Repeated, format!("`{}` is given twice", word.name))
                    .with_label(word.span, "given again here")
                    .with_help("keep one of them"),
            );
        }
        *slot = true;
    }
    let Some(Term::Word(name)) = p.terms.first() else {
        diags.push(
            Diagnostic::new(Code::BadArgument, "`colour` needs a name")
                .with_label(p.span, "which variable?")
                .with_help(format!(
                    "write `{shape}` (`shapes` and `dashes` are optional)"
                )),
        );
        return None;
    };
    let var = grouping_var(book, name, "`colour`", diags)?;
    let decl = book.var(var.var);
    if let (Some(colours), Some(levels), false) =
        (&decl.colours, &decl.levels, marks.shapes || marks.dashes)
    {
        diags.extend(colours::alike_in_grey(colours, levels, &decl.name, p.span));
    }
    Some((var, marks))
}

/// `panels VAR`: a categorical variable.
fn grouping(book: &Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<CatVar> {
    let role = p.head.name.as_str();
    let name = terms::one_word(p, &format!("{role} VARIABLE"), diags)?;
    grouping_var(book, name, &format!("`{role}`"), diags)
}

/// The categorical variable a `colour` or `panels` statement names.
fn grouping_var(
    book: &Codebook,
    name: &Ident,
    role: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<CatVar> {
    let Some(id) = book.find(&name.name) else {
        diags.push(unknown_variable(book, name));
        return None;
    };
    let var = book.var(id);
    if !var.scale.is_categorical() {
        diags.push(not_categorical(var, name.span, role));
        return None;
    }
    Some(CatVar {
        var: id,
        ordered: var.scale == Scale::Ordinal,
        span: name.span,
    })
}

/// `title "..."`, drawn in the figure only with `show`: the text, and whether it is drawn.
fn title(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<(String, bool)> {
    let shape = "title \"...\" show";
    match p.terms.as_slice() {
        [Term::Str(s), Term::Word(w)] if w.name == "show" => Some((display::text(s, diags), true)),
        [Term::Str(_), other] => {
            terms::expect_choice(other, &["show"], shape, diags);
            None
        }
        _ => terms::one_string(p, shape, diags).map(|s| (display::text(s, diags), false)),
    }
}

/// `on` or `off` after a statement's word (`key off`, `grid on`).
fn switch(p: &Plain, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<bool> {
    let [term] = p.terms.as_slice() else {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!("`{}` takes `on` or `off`", p.head.name),
            )
            .with_label(p.span, "here")
            .with_help(format!("write `{shape}`")),
        );
        return None;
    };
    terms::expect_choice(term, &["on", "off"], shape, diags).map(|w| w.name == "on")
}

fn size(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<(f64, f64)> {
    let shape = "size 85mm x 65mm";
    let (w, h) = match p.terms.as_slice() {
        [Term::Length(w), Term::Word(x), Term::Length(h)] if x.name == "x" => (w, h),
        _ => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "a size is a width and a height with units",
                )
                .with_label(p.span, "not a size")
                .with_help(format!("write `{shape}` (units mm, cm, in or pt)")),
            );
            return None;
        }
    };
    let (lo, hi) = SIZE_LIMITS_MM;
    let mut ok = true;
    for len in [w, h] {
        let mm = len.to_mm();
        if !(lo..=hi).contains(&mm) {
            diags.push(
                Diagnostic::new(
                    Code::OutOfLimits,
                    format!("{mm:.0} mm is outside the supported {lo:.0}–{hi:.0} mm"),
                )
                .with_label(len.span, "out of limits")
                .with_help(
                    "journal figures are usually 85 mm (one column) to 180 mm (two columns) wide",
                ),
            );
            ok = false;
        }
    }
    ok.then(|| (w.to_mm(), h.to_mm()))
}

fn formats(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<Formats> {
    let shape = "formats svg png pdf tiff text(outlined)";
    let mut f = Formats::NONE;
    for term in &p.terms {
        if let Term::Call(call) = term {
            if call.name.name == "text" {
                let text_shape = "text(outlined)";
                let arg = terms::single(call, text_shape, diags)?;
                let w = terms::expect_choice(arg, &["editable", "outlined"], text_shape, diags)?;
                f.text = match w.name.as_str() {
                    "outlined" => TextForm::Outlined,
                    _ => TextForm::Editable,
                };
                continue;
            }
        }
        let w = terms::expect_choice(term, &["svg", "png", "pdf", "tiff"], shape, diags)?;
        let slot = match w.name.as_str() {
            "svg" => &mut f.svg,
            "png" => &mut f.png,
            "pdf" => &mut f.pdf,
            _ => &mut f.tiff,
        };
        *slot = true;
    }
    if !(f.svg || f.png || f.pdf || f.tiff) {
        diags.push(
            Diagnostic::new(Code::BadArgument, "`formats` needs at least one format")
                .with_label(p.head.span, "no format")
                .with_help(format!("write `{shape}`")),
        );
        return None;
    }
    Some(f)
}

fn dpi(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<u32> {
    let shape = "dpi 300";
    let n = match p.terms.as_slice() {
        [t] => terms::expect_num(t, shape, diags)?,
        _ => {
            diags.push(
                Diagnostic::new(Code::BadArgument, "`dpi` takes one whole number")
                    .with_label(p.span, "here")
                    .with_help(format!("write `{shape}`")),
            );
            return None;
        }
    };
    let (lo, hi) = DPI_LIMITS;
    if n.value.fract() != 0.0 || n.value < f64::from(lo) || n.value > f64::from(hi) {
        diags.push(
            Diagnostic::new(
                Code::OutOfLimits,
                format!("dpi must be a whole number from {lo} to {hi}"),
            )
            .with_label(n.span, "out of limits")
            .with_help("journals usually ask for 300 dpi (photographs) to 600 dpi (line art)"),
        );
        return None;
    }
    Some(n.value as u32)
}
