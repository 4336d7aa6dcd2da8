//! Readers for the option values several layers share: interval levels, error bars, bin rules,
//! bandwidths, bar heights, jitter and subjects.

use crate::diag::{did_you_mean, Code, Diagnostic, Span};
use crate::syntax::ast::{Call, Ident, Term};

use super::super::codebook::resolve;
use super::super::plan::{
    Band, BandKind, Bandwidth, BinRule, BootMethod, Codebook, ErrorBar, Heights, SummaryDetail,
    VarId,
};
use super::super::terms::{self, Options};
use super::LayerDecl;

/// `heights(...)`, one of `choices` (`count`, `percent`, `density`).
pub fn heights(opts: &Options, choices: &[&str], diags: &mut Vec<Diagnostic>) -> Option<Heights> {
    let c = opts.call("heights")?;
    let shape = "heights(percent)";
    let w = terms::single(c, shape, diags)
        .and_then(|t| terms::expect_choice(t, choices, shape, diags))?;
    Some(match w.name.as_str() {
        "percent" => Heights::Percent,
        "density" => Heights::Density,
        _ => Heights::Count,
    })
}

/// `bins(N | sturges | scott | fd)` or `width(W)`, never both.
pub fn bin_rule(opts: &Options, diags: &mut Vec<Diagnostic>) -> Option<BinRule> {
    let bins = opts.call("bins").and_then(|c| bins(c, diags));
    let Some(c) = opts.call("width") else {
        return bins;
    };
    if bins.is_some() {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "give either `bins(...)` or `width(...)`, not both",
            )
            .with_label(c.span, "width")
            .with_help("`width(W)` fixes the bin width; `bins(...)` chooses one from the data"),
        );
        return bins;
    }
    positive(c, "width(5)", diags).map(BinRule::Width)
}

fn bins(c: &Call, diags: &mut Vec<Diagnostic>) -> Option<BinRule> {
    let shape = "bins(fd)";
    match terms::single(c, shape, diags)? {
        Term::Num(n) => {
            if n.value.fract() == 0.0 && (1.0..=1000.0).contains(&n.value) {
                Some(BinRule::Count(n.value as u32))
            } else {
                diags.push(
                    Diagnostic::new(Code::BadArgument, "a bin count is a whole number from 1 to 1000")
                        .with_label(n.span, "not a bin count")
                        .with_help("write e.g. `bins(20)`, or a rule: `bins(sturges)`, `bins(scott)`, `bins(fd)`"),
                );
                None
            }
        }
        t => {
            let w = terms::expect_choice(t, &["sturges", "scott", "fd"], shape, diags)?;
            Some(match w.name.as_str() {
                "sturges" => BinRule::Sturges,
                "scott" => BinRule::Scott,
                _ => BinRule::FreedmanDiaconis,
            })
        }
    }
}

/// A single positive number, e.g. `width(5)`.
pub fn positive(c: &Call, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let n = terms::single(c, shape, diags).and_then(|t| terms::expect_num(t, shape, diags))?;
    if n.value > 0.0 && n.value.is_finite() {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            format!("`{}` must be positive", c.name.name),
        )
        .with_label(n.span, "not positive")
        .with_help(format!("write e.g. `{shape}`")),
    );
    None
}

/// `jitter(F)`, a fraction of the band from 0 to 1; 0 without the option.
pub fn jitter(opts: &Options, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let Some(c) = opts.call("jitter") else {
        return Some(0.0);
    };
    let shape = "jitter(0.2)";
    let n = terms::single(c, shape, diags).and_then(|t| terms::expect_num(t, shape, diags))?;
    if (0.0..=1.0).contains(&n.value) {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            "jitter is a fraction of the band, from 0 to 1",
        )
        .with_label(n.span, "out of range")
        .with_help("write e.g. `jitter(0.2)`: points spread over a fifth of each level's band"),
    );
    None
}

/// An interval level: a number strictly between 0 and 1 (rule 8).
fn level(term: &Term, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let n = terms::expect_num(term, shape, diags)?;
    if n.value > 0.0 && n.value < 1.0 {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::LevelOutOfRange,
            format!(
                "an interval level must lie between 0 and 1, found {}",
                n.text
            ),
        )
        .with_label(n.span, "not in (0, 1)")
        .with_help("write the coverage as a fraction, e.g. 0.95 for a 95% interval"),
    );
    None
}

/// `error(...)`, one of `choices` (`sd`, `se`, `ci`, `boot`), with its span.
///
/// `Ok(None)` without the option; `Err(())` after an error (reported).
pub fn error_bar(
    opts: &Options,
    choices: &[&str],
    diags: &mut Vec<Diagnostic>,
) -> Result<Option<(ErrorBar, Span)>, ()> {
    let Some(c) = opts.call("error") else {
        return Ok(None);
    };
    let shape = "error(ci(0.95))";
    let term = terms::single(c, shape, diags).ok_or(())?;
    let (name, args): (&Ident, Option<&Call>) = match term {
        Term::Word(w) => (w, None),
        Term::Call(inner) => (&inner.name, Some(inner)),
        other => {
            terms::expect_word(other, shape, diags);
            return Err(());
        }
    };
    terms::expect_choice(&Term::Word(name.clone()), choices, shape, diags).ok_or(())?;
    let bar = match (name.name.as_str(), args) {
        ("sd", None) => Some(ErrorBar::Sd),
        ("se", None) => Some(ErrorBar::Se),
        ("ci", Some(call)) => ci(call, diags),
        ("boot", Some(call)) => boot(call, diags),
        (word, _) => {
            let fix = match word {
                "ci" => "ci(0.95)",
                "boot" => "boot(0.95)",
                _ => word,
            };
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!("`{word}` is written `{fix}` here"),
                )
                .with_label(term.span(), "malformed")
                .with_help(format!("write `error({fix})`")),
            );
            None
        }
    };
    bar.map(|b| Some((b, c.span))).ok_or(())
}

/// `boot(L)` or `boot(L, bca)`.
fn boot(call: &Call, diags: &mut Vec<Diagnostic>) -> Option<ErrorBar> {
    let (level, bca) = level_with(call, "bca", "boot(0.95) or boot(0.95, bca)", diags)?;
    let method = if bca {
        BootMethod::Bca
    } else {
        BootMethod::Percentile
    };
    Some(ErrorBar::Bootstrap { level, method })
}

/// `band(L)` or `band(L, prediction)`: the band of a fitted line.
pub fn band(c: &Call, diags: &mut Vec<Diagnostic>) -> Option<Band> {
    let shape = "band(0.95) or band(0.95, prediction)";
    let (level, prediction) = level_with(c, "prediction", shape, diags)?;
    let kind = if prediction {
        BandKind::Prediction
    } else {
        BandKind::Mean
    };
    Some(Band { level, kind })
}

/// `NAME(L)` or `NAME(L, WORD)`: the level, and whether the word was given.
fn level_with(
    call: &Call,
    word: &str,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<(f64, bool)> {
    match call.args.items.as_slice() {
        [l] => level(l, shape, diags).map(|level| (level, false)),
        [l, w] => {
            let level = level(l, shape, diags);
            let given = terms::expect_choice(w, &[word], shape, diags);
            Some((level?, true)).filter(|_| given.is_some())
        }
        _ => {
            terms::arity(call, 1, shape, diags);
            None
        }
    }
}

/// `summary(full)`: list every drawn point of the layer's curves; the default without it.
pub fn summary_detail(opts: &Options, diags: &mut Vec<Diagnostic>) -> Option<SummaryDetail> {
    let Some(c) = opts.call("summary") else {
        return Some(SummaryDetail::Default);
    };
    let shape = "summary(full)";
    terms::single(c, shape, diags)
        .and_then(|t| terms::expect_choice(t, &["full"], shape, diags))?;
    Some(SummaryDetail::Full)
}

fn ci(call: &Call, diags: &mut Vec<Diagnostic>) -> Option<ErrorBar> {
    let shape = "ci(0.95) or ci(0.95, within)";
    let (level, within) = level_with(call, "within", shape, diags)?;
    Some(if within {
        ErrorBar::CiWithin { level }
    } else {
        ErrorBar::Ci { level }
    })
}

/// The options of a kernel density layer (`density`, `violin`): `bandwidth(...)` and
/// `summary(full)`; `None` after an error (reported).
pub fn kernel(opts: &Options, diags: &mut Vec<Diagnostic>) -> Option<(Bandwidth, SummaryDetail)> {
    let before = diags.len();
    let bandwidth = bandwidth(opts, diags);
    let summary = summary_detail(opts, diags);
    if diags.len() > before {
        return None;
    }
    Some((bandwidth?, summary?))
}

/// `bandwidth(silverman | scott | W)`; Silverman's rule without the option.
pub fn bandwidth(opts: &Options, diags: &mut Vec<Diagnostic>) -> Option<Bandwidth> {
    let Some(c) = opts.call("bandwidth") else {
        return Some(Bandwidth::Silverman);
    };
    let shape = "bandwidth(silverman)";
    match terms::single(c, shape, diags)? {
        Term::Num(_) => positive(c, "bandwidth(2.5)", diags).map(Bandwidth::Fixed),
        t => {
            let w = terms::expect_choice(t, &["silverman", "scott"], shape, diags)?;
            Some(if w.name == "scott" {
                Bandwidth::Scott
            } else {
                Bandwidth::Silverman
            })
        }
    }
}

/// `by(SUBJECT)`, required: the variable it names and its span.
pub fn by_subject(
    decl: &LayerDecl,
    book: &Codebook,
    opts: &Options,
    head: &Ident,
    diags: &mut Vec<Diagnostic>,
) -> Option<(VarId, Span)> {
    let Some(c) = opts.call("by") else {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!("{} needs `by(SUBJECT)`", decl.quoted()),
            )
            .with_label(head.span, "joins whose values?")
            .with_help(format!(
                "write `{} by(participant)`, naming the data's subject",
                decl.word
            )),
        );
        return None;
    };
    let shape = "by(participant)";
    let w = terms::single(c, shape, diags).and_then(|t| terms::expect_word(t, shape, diags))?;
    let id = resolve(book, w, diags)?;
    if book.subject != Some(id) {
        let help = match book.subject {
            Some(s) => format!("write `by({})`, the data's subject", book.var(s).name),
            None => format!(
                "declare `subject {}` in data `{}` if it identifies the observational unit",
                book.var(id).name,
                book.name
            ),
        };
        diags.push(
            Diagnostic::new(
                Code::LinesAcrossSubjects,
                format!(
                    "`{}` is not the subject of data `{}`",
                    book.var(id).name,
                    book.name
                ),
            )
            .with_label(w.span, "not the subject")
            .with_help(help),
        );
    }
    Some((id, w.span))
}

/// The level a call's single argument names — a text, a number or a name, as `levels(...)`
/// writes them — as its index among the declared `levels`, with the argument's span; an
/// unknown level is reported as `unknown(name)` says, with the closest declared level offered.
pub fn declared_level(
    c: &Call,
    levels: &[String],
    shape: &str,
    unknown: impl FnOnce(&str) -> String,
    diags: &mut Vec<Diagnostic>,
) -> Option<(usize, Span)> {
    let (name, span) = match terms::single(c, shape, diags)? {
        Term::Str(s) => (s.value.as_str(), s.span),
        Term::Num(n) => (n.text.as_str(), n.span),
        Term::Word(w) => (w.name.as_str(), w.span),
        other => {
            terms::expect_str(other, shape, diags);
            return None;
        }
    };
    if let Some(i) = levels.iter().position(|l| l == name) {
        return Some((i, span));
    }
    let help = match did_you_mean(name, levels.iter().map(String::as_str)) {
        Some(s) => format!("did you mean \"{s}\"?"),
        None => format!(
            "the declared levels are {}",
            levels
                .iter()
                .map(|l| format!("\"{l}\""))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    };
    diags.push(
        Diagnostic::new(Code::BadArgument, unknown(name))
            .with_label(span, "not a declared level")
            .with_help(help),
    );
    None
}
