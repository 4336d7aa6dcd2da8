//! Checking `figure` blocks: resolving names, choosing the frame, and the scale rules of §4.

use std::path::Path;

use crate::diag::{did_you_mean, Diagnostic, Span};
use crate::scene::TextForm;
use crate::syntax::ast::{Block, Ident, Plain, Statement, Term, Where};

use super::codebook::{resolve, unknown_variable};
use super::codes;
use super::filter::check_filter;
use super::layers::{self, LayerKind, RawLayer};
use super::plan::{
    AxisScale, CatAxis, CatVar, Codebook, FigurePlan, Filter, Formats, LevelOrder, NumAxis, NumVar,
    Scale,
};
use super::terms::{self, Accepts};

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

const FIGURE_STATEMENTS: [&str; 11] = [
    "from", "title", "caption", "x", "y", "colour", "panels", "size", "formats", "dpi", "where",
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
    filter: Option<&'a Where>,
    layers: Vec<&'a Plain>,
}

/// Checks one figure against the data blocks visible from its file.
pub fn check_figure(
    block: &Block,
    spec_path: &Path,
    visible: &[(usize, &Codebook)],
    defaults: &FigureDefaults,
    diags: &mut Vec<Diagnostic>,
) -> Option<FigurePlan> {
    let parts = sort_statements(block, diags);
    let errors_before = count_errors(diags);
    let Some(from) = parts.from else {
        diags.push(
            Diagnostic::error(
                codes::MISSING_STATEMENT,
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
    let title = parts
        .title
        .and_then(|p| terms::one_string(p, "title \"...\"", diags))
        .map(|s| s.value.clone());
    let caption = parts
        .caption
        .and_then(|p| terms::one_string(p, "caption \"...\"", diags))
        .map(|s| s.value.clone());
    let x = parts.x.and_then(|p| axis_var(book, p, diags));
    let y = parts.y.map(|p| axis_var(book, p, diags));
    let colour = parts.colour.and_then(|p| grouping(book, p, diags));
    let panels = parts.panels.and_then(|p| grouping(book, p, diags));
    // A bad size, format list or dpi is reported, and the rest of the figure is still checked
    // (with the default in its place); the error rejects the figure at the end.
    let (width_mm, height_mm) = parts
        .size
        .and_then(|p| size(p, diags))
        .unwrap_or(DEFAULT_SIZE_MM);
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
    let raw_layers: Vec<RawLayer> = parts
        .layers
        .iter()
        .filter_map(|p| layers::read_layer(book, p, diags))
        .collect();
    if parts.layers.is_empty() {
        diags.push(
            Diagnostic::error(
                codes::MISSING_STATEMENT,
                format!("figure `{}` has no layers", block.name.name),
            )
            .with_label(block.name.span, "nothing to draw")
            .with_help("add a layer such as `points`, `box`, `counts` or `histogram`"),
        );
        return None;
    }
    if parts.x.is_none() {
        diags.push(
            Diagnostic::error(
                codes::MISSING_STATEMENT,
                format!("figure `{}` has no `x`", block.name.name),
            )
            .with_label(block.name.span, "no x axis")
            .with_help("add `x VARIABLE`"),
        );
        return None;
    };
    let x = x?;
    let frame = layers::frame(
        book,
        layers::FrameInput {
            x,
            y,
            layers: raw_layers,
        },
        diags,
    )?;
    if let (super::plan::Frame::Flows { .. }, Some(c)) = (&frame, &colour) {
        diags.push(
            Diagnostic::error(
                codes::LAYER_DOES_NOT_FIT,
                "flows are coloured by their states; `colour` cannot split them",
            )
            .with_label(c.span, "a second colouring")
            .with_help(
                "remove `colour`, or show each group's flows in its own panel with `panels`",
            ),
        );
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
        caption,
        frame,
        colour,
        panels,
        filter,
        width_mm,
        height_mm,
        formats,
        dpi,
    })
}

fn count_errors(diags: &[Diagnostic]) -> usize {
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
                Diagnostic::error(
                    codes::UNKNOWN_STATEMENT,
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
            name if LayerKind::from_word(name).is_some() => {
                parts.layers.push(p);
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
    Diagnostic::error(
        codes::REPEATED,
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
        .chain(LayerKind::ALL.iter().map(|k| k.word()));
    let d = Diagnostic::error(
        codes::UNKNOWN_STATEMENT,
        format!("`{}` is not a statement or layer of a figure", head.name),
    )
    .with_label(head.span, "unknown");
    match did_you_mean(&head.name, known) {
        Some(s) => d.with_help(format!("did you mean `{s}`?")),
        None => d.with_help(format!(
            "figure statements: {}; layers: {}",
            FIGURE_STATEMENTS.join(", "),
            LayerKind::ALL
                .iter()
                .map(|k| k.word())
                .collect::<Vec<_>>()
                .join(", ")
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
    let d = Diagnostic::error(
        codes::UNKNOWN_DATA,
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

/// A variable named by `x` or `y`, with its axis options, before the frame decides its role.
#[derive(Debug, Clone)]
pub struct AxisVar {
    pub var: super::plan::VarId,
    pub scale: Scale,
    pub name_span: Span,
    pub title: Option<String>,
    pub range: Option<(f64, f64)>,
    pub log_span: Option<Span>,
    pub order: Option<(LevelOrder, Span)>,
}

impl AxisVar {
    pub fn cat_axis(&self) -> CatAxis {
        CatAxis {
            var: CatVar {
                var: self.var,
                ordered: self.scale == Scale::Ordinal,
                span: self.name_span,
            },
            title: self.title.clone(),
            order: self.order.map_or(LevelOrder::Levels, |(o, _)| o),
        }
    }

    pub fn num_axis(&self) -> NumAxis {
        NumAxis {
            var: NumVar {
                var: self.var,
                ratio: self.scale == Scale::Ratio,
                span: self.name_span,
            },
            title: self.title.clone(),
            range: self.range,
            scale: if self.log_span.is_some() {
                AxisScale::Log
            } else {
                AxisScale::Linear
            },
            scale_span: self.log_span,
        }
    }
}

fn axis_var(book: &Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<AxisVar> {
    let axis = p.head.name.as_str();
    let Some(Term::Word(name)) = p.terms.first() else {
        diags.push(
            Diagnostic::error(codes::BAD_ARGUMENT, format!("`{axis}` needs a variable"))
                .with_label(p.head.span, "which variable?")
                .with_help(format!("write `{axis} VARIABLE`")),
        );
        return None;
    };
    let id = resolve(book, name, diags)?;
    let var = book.var(id);
    let accepts = Accepts {
        what: "an axis",
        calls: &["label", "range", "scale", "order"],
        flags: &[],
    };
    let opts = terms::options(&p.terms[1..], &accepts, diags);
    let mut out = AxisVar {
        var: id,
        scale: var.scale,
        name_span: name.span,
        title: None,
        range: None,
        log_span: None,
        order: None,
    };
    if let Some(c) = opts.call("label") {
        let shape = "label(\"Axis title\")";
        out.title = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_str(t, shape, diags))
            .map(|s| s.value.clone());
    }
    if let Some(c) = opts.call("range") {
        out.range = range(c, var.scale, diags);
    }
    if let Some(c) = opts.call("scale") {
        let shape = "scale(log)";
        let choice = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_choice(t, &["linear", "log"], shape, diags));
        if let Some(w) = choice {
            if w.name == "log" {
                out.log_span = log_allowed(var, c.span, diags).then_some(c.span);
            }
        }
    }
    if let Some(c) = opts.call("order") {
        out.order = order(var, c, diags).map(|o| (o, c.span));
    }
    if let (Some(log), Some((lo, _))) = (out.log_span, out.range) {
        if lo <= 0.0 {
            diags.push(
                Diagnostic::error(codes::BAD_ARGUMENT, "a log axis cannot reach zero or below")
                    .with_label(log, "log scale")
                    .with_label(
                        opts.call("range").map_or(log, |c| c.span),
                        "range starts at or below zero",
                    )
                    .with_help("start the range above zero, e.g. `range(1, 1000)`"),
            );
            out.range = None;
        }
    }
    Some(out)
}

fn range(
    c: &crate::syntax::ast::Call,
    scale: Scale,
    diags: &mut Vec<Diagnostic>,
) -> Option<(f64, f64)> {
    let shape = "range(0, 100)";
    if !scale.is_numeric() {
        diags.push(
            Diagnostic::error(codes::BAD_ARGUMENT, "`range` applies to a numeric axis")
                .with_label(c.span, "on a categorical axis")
                .with_help("remove `range(...)`; a categorical axis shows its levels"),
        );
        return None;
    }
    let args = terms::arity(c, 2, shape, diags)?;
    let lo = terms::expect_num(&args[0], shape, diags)?;
    let hi = terms::expect_num(&args[1], shape, diags)?;
    if lo.value >= hi.value {
        diags.push(
            Diagnostic::error(
                codes::BAD_ARGUMENT,
                "the range's low end is not below its high end",
            )
            .with_label(c.args.span, "empty range")
            .with_help("write the lower limit first, e.g. `range(0, 100)`"),
        );
        return None;
    }
    Some((lo.value, hi.value))
}

fn log_allowed(var: &super::plan::Variable, span: Span, diags: &mut Vec<Diagnostic>) -> bool {
    match var.scale {
        Scale::Ratio => true,
        Scale::Interval => {
            diags.push(
                Diagnostic::error(codes::LOG_OF_INTERVAL, format!("a log scale needs a true zero, and `{}` is interval", var.name))
                    .with_label(span, "log scale")
                    .with_label(var.span, "declared interval here")
                    .with_help("ratios of interval values mean nothing; use a linear scale, or declare the variable `ratio` if it has a true zero"),
            );
            false
        }
        _ => {
            diags.push(
                Diagnostic::error(
                    codes::LOG_OF_INTERVAL,
                    "a log scale applies to numeric variables only",
                )
                .with_label(span, "log scale on a categorical axis")
                .with_help("remove `scale(log)`"),
            );
            false
        }
    }
}

fn order(
    var: &super::plan::Variable,
    c: &crate::syntax::ast::Call,
    diags: &mut Vec<Diagnostic>,
) -> Option<LevelOrder> {
    let shape = "order(count)";
    let w = terms::single(c, shape, diags)
        .and_then(|t| terms::expect_choice(t, &["levels", "count", "name"], shape, diags))?;
    let order = match w.name.as_str() {
        "count" => LevelOrder::Count,
        "name" => LevelOrder::Name,
        _ => LevelOrder::Levels,
    };
    if var.scale == Scale::Ordinal && order != LevelOrder::Levels {
        diags.push(
            Diagnostic::error(codes::ORDINAL_REORDERED, "an ordinal axis keeps the order of its levels")
                .with_label(c.span, "reorders an ordinal axis")
                .with_help(format!("`{}` is ordinal: remove `order(...)`, or declare it nominal if its levels have no order", var.name)),
        );
        return None;
    }
    if !var.scale.is_categorical() {
        diags.push(
            Diagnostic::error(codes::BAD_ARGUMENT, "`order` applies to a categorical axis")
                .with_label(c.span, "on a numeric axis")
                .with_help("remove `order(...)`"),
        );
        return None;
    }
    Some(order)
}

/// `colour VAR` or `panels VAR`: a categorical variable.
fn grouping(book: &Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<CatVar> {
    let role = p.head.name.as_str();
    let name = terms::one_word(p, &format!("{role} VARIABLE"), diags)?;
    let Some(id) = book.find(&name.name) else {
        diags.push(unknown_variable(book, name));
        return None;
    };
    let var = book.var(id);
    if !var.scale.is_categorical() {
        diags.push(not_categorical(var, name.span, &format!("`{role}`")));
        return None;
    }
    Some(CatVar {
        var: id,
        ordered: var.scale == Scale::Ordinal,
        span: name.span,
    })
}

/// Rule 6: a grouping or categorical role on a numeric variable or an id.
pub fn not_categorical(var: &super::plan::Variable, span: Span, role: &str) -> Diagnostic {
    let why = if var.scale == Scale::Id {
        "an id names observational units; it is never a category to compare".to_string()
    } else {
        format!(
            "`{}` is {}: its values are numbers, not categories",
            var.name,
            var.scale.as_str()
        )
    };
    Diagnostic::error(
        codes::NOT_CATEGORICAL,
        format!("{role} needs a nominal or ordinal variable"),
    )
    .with_label(span, format!("declared {}", var.scale.as_str()))
    .with_label(var.span, "declared here")
    .with_help(format!("{why}; choose a nominal or ordinal variable"))
}

fn size(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<(f64, f64)> {
    let shape = "size 85mm x 65mm";
    let (w, h) = match p.terms.as_slice() {
        [Term::Length(w), Term::Word(x), Term::Length(h)] if x.name == "x" => (w, h),
        _ => {
            diags.push(
                Diagnostic::error(
                    codes::BAD_ARGUMENT,
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
                Diagnostic::error(
                    codes::OUT_OF_LIMITS,
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
            Diagnostic::error(codes::BAD_ARGUMENT, "`formats` needs at least one format")
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
                Diagnostic::error(codes::BAD_ARGUMENT, "`dpi` takes one whole number")
                    .with_label(p.span, "here")
                    .with_help(format!("write `{shape}`")),
            );
            return None;
        }
    };
    let (lo, hi) = DPI_LIMITS;
    if n.value.fract() != 0.0 || n.value < f64::from(lo) || n.value > f64::from(hi) {
        diags.push(
            Diagnostic::error(
                codes::OUT_OF_LIMITS,
                format!("dpi must be a whole number from {lo} to {hi}"),
            )
            .with_label(n.span, "out of limits")
            .with_help("journals usually ask for 300 dpi (photographs) to 600 dpi (line art)"),
        );
        return None;
    }
    Some(n.value as u32)
}
