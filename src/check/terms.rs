//! Reading the generic terms of a statement: options, flags and their arguments.
//!
//! The syntax tree does not know which words a statement accepts; these helpers turn terms into
//! typed values and report anything unknown, repeated or of the wrong kind with its span.

use crate::diag::{did_you_mean, Code, Diagnostic, Span};
use crate::syntax::ast::{Args, Call, Ident, Num, Plain, Str, Term};

use super::layer::OptionDecl;

/// The options (`name(args)`) and flags (bare words) of a statement, after validation.
#[derive(Debug, Default)]
pub struct Options<'a> {
    calls: Vec<&'a Call>,
    flags: Vec<&'a Ident>,
}

impl<'a> Options<'a> {
    pub fn call(&self, name: &str) -> Option<&'a Call> {
        self.calls.iter().copied().find(|c| c.name.name == name)
    }

    pub fn flag(&self, name: &str) -> Option<&'a Ident> {
        self.flags.iter().copied().find(|f| f.name == name)
    }
}

/// What a statement accepts after its fixed leading terms.
pub struct Accepts<'s> {
    /// What the statement is called in messages, e.g. "`histogram`".
    pub what: &'s str,
    pub calls: Vec<&'s str>,
    pub flags: Vec<&'s str>,
}

impl<'s> Accepts<'s> {
    /// A statement that takes only `name(args)` options.
    pub fn calls(what: &'s str, calls: &[&'s str]) -> Accepts<'s> {
        Accepts {
            what,
            calls: calls.to_vec(),
            flags: Vec::new(),
        }
    }

    /// The options a layer declares.
    pub fn from_decls(what: &'s str, decls: &[OptionDecl]) -> Accepts<'s> {
        let names = |flag: bool| {
            decls
                .iter()
                .filter(|d| d.flag == flag)
                .map(|d| d.name)
                .collect()
        };
        Accepts {
            what,
            calls: names(false),
            flags: names(true),
        }
    }
}

/// Sorts `terms` into options and flags, reporting unknown and repeated ones.
pub fn options<'a>(
    terms: &'a [Term],
    accepts: &Accepts,
    diags: &mut Vec<Diagnostic>,
) -> Options<'a> {
    let mut out = Options::default();
    for term in terms {
        match term {
            Term::Call(call) => {
                let name = call.name.name.as_str();
                if !accepts.calls.contains(&name) {
                    diags.push(unknown_option(&call.name, accepts));
                } else if let Some(first) = out.call(name) {
                    diags.push(repeated(&call.name, first.name.span));
                } else {
                    out.calls.push(call);
                }
            }
            Term::Word(word) => {
                let name = word.name.as_str();
                if accepts.flags.contains(&name) {
                    if let Some(first) = out.flag(name) {
                        diags.push(repeated(word, first.span));
                    } else {
                        out.flags.push(word);
                    }
                } else if accepts.calls.contains(&name) {
                    diags.push(
                        Diagnostic::new(
                            Code::BadArgument,
                            format!("`{name}` needs a value in parentheses"),
                        )
                        .with_label(word.span, "no value given")
                        .with_help(format!(
                            "write `{name}(...)`; see the language reference for {}",
                            accepts.what
                        )),
                    );
                } else {
                    diags.push(unknown_option(word, accepts));
                }
            }
            other => diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!("unexpected value after {}", accepts.what),
                )
                .with_label(other.span(), "not expected here")
                .with_help(option_list_help(accepts)),
            ),
        }
    }
    out
}

fn option_list_help(accepts: &Accepts) -> String {
    let mut all: Vec<String> = accepts
        .calls
        .iter()
        .map(|c| format!("`{c}(...)`"))
        .collect();
    all.extend(accepts.flags.iter().map(|f| format!("`{f}`")));
    if all.is_empty() {
        format!("{} takes no options", accepts.what)
    } else {
        format!("{} accepts {}", accepts.what, all.join(", "))
    }
}

fn unknown_option(word: &Ident, accepts: &Accepts) -> Diagnostic {
    let known = accepts.calls.iter().chain(accepts.flags.iter()).copied();
    let d = Diagnostic::new(
        Code::UnknownOption,
        format!("{} has no option `{}`", accepts.what, word.name),
    )
    .with_label(word.span, "unknown option");
    match did_you_mean(&word.name, known) {
        Some(s) => d.with_help(format!("did you mean `{s}`? {}", option_list_help(accepts))),
        None => d.with_help(option_list_help(accepts)),
    }
}

fn repeated(word: &Ident, first: Span) -> Diagnostic {
    Diagnostic::new(Code::Repeated, format!("`{}` is given twice", word.name))
        .with_label(word.span, "given again here")
        .with_label(first, "first given here")
        .with_help("keep one of them")
}

/// Exactly `n` arguments, or a diagnostic.
pub fn arity<'a>(
    call: &'a Call,
    n: usize,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a [Term]> {
    if call.args.items.len() == n {
        Some(&call.args.items)
    } else {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!(
                    "`{}` takes {n} argument{}, found {}",
                    call.name.name,
                    if n == 1 { "" } else { "s" },
                    call.args.items.len()
                ),
            )
            .with_label(call.args.span, "here")
            .with_help(format!("write `{shape}`")),
        );
        None
    }
}

/// The single argument of `call`.
pub fn single<'a>(call: &'a Call, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<&'a Term> {
    arity(call, 1, shape, diags).map(|a| &a[0])
}

pub fn expect_str<'a>(term: &'a Term, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<&'a Str> {
    match term {
        Term::Str(s) => Some(s),
        other => {
            diags.push(wrong_kind(other, "a text in double quotes", shape));
            None
        }
    }
}

pub fn expect_num<'a>(term: &'a Term, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<&'a Num> {
    match term {
        Term::Num(n) => Some(n),
        other => {
            diags.push(wrong_kind(other, "a number", shape));
            None
        }
    }
}

pub fn expect_word<'a>(
    term: &'a Term,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a Ident> {
    match term {
        Term::Word(w) => Some(w),
        other => {
            diags.push(wrong_kind(other, "a name", shape));
            None
        }
    }
}

/// A word from a fixed set, e.g. `bins(fd)`.
pub fn expect_choice<'a>(
    term: &'a Term,
    choices: &[&str],
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a Ident> {
    let word = expect_word(term, shape, diags)?;
    if choices.contains(&word.name.as_str()) {
        return Some(word);
    }
    let list = choices
        .iter()
        .map(|c| format!("`{c}`"))
        .collect::<Vec<_>>()
        .join(", ");
    let help = match did_you_mean(&word.name, choices.iter().copied()) {
        Some(s) => format!("did you mean `{s}`? the choices are {list}"),
        None => format!("the choices are {list}"),
    };
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            format!("`{}` is not one of the choices here", word.name),
        )
        .with_label(word.span, "unknown choice")
        .with_help(help),
    );
    None
}

/// A statement's terms after its head must be exactly one word (e.g. `from reading`).
pub fn one_word<'a>(
    stmt: &'a Plain,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a Ident> {
    match stmt.terms.as_slice() {
        [Term::Word(w)] => Some(w),
        [] => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!("`{}` needs a name", stmt.head.name),
                )
                .with_label(stmt.head.span, "name missing")
                .with_help(format!("write `{shape}`")),
            );
            None
        }
        [first, ..] => {
            diags.push(wrong_kind(first, "a single name", shape));
            None
        }
    }
}

/// A statement's terms after its head must be exactly one string (e.g. `title "..."`).
pub fn one_string<'a>(
    stmt: &'a Plain,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a Str> {
    match stmt.terms.as_slice() {
        [Term::Str(s)] => Some(s),
        [] => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!("`{}` needs a text", stmt.head.name),
                )
                .with_label(stmt.head.span, "text missing")
                .with_help(format!("write `{shape}`")),
            );
            None
        }
        [first, ..] => {
            diags.push(wrong_kind(first, "one text in double quotes", shape));
            None
        }
    }
}

/// Level names: strings, or numbers written as in the data (`levels(1, 2, 3)`).
pub fn level_list(
    args: &Args,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<Vec<(String, Span)>> {
    let mut out = Vec::new();
    for term in &args.items {
        match term {
            Term::Str(s) => out.push((s.value.clone(), s.span)),
            Term::Num(n) => out.push((n.text.clone(), n.span)),
            Term::Word(w) => out.push((w.name.clone(), w.span)),
            other => {
                diags.push(wrong_kind(other, "a level (text or number)", shape));
                return None;
            }
        }
    }
    Some(out)
}

/// Plain strings, e.g. `missing("NA", "")`.
pub fn string_list(args: &Args, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<Vec<String>> {
    let mut out = Vec::new();
    for term in &args.items {
        out.push(expect_str(term, shape, diags)?.value.clone());
    }
    Some(out)
}

fn wrong_kind(term: &Term, wanted: &str, shape: &str) -> Diagnostic {
    let found = match term {
        Term::Word(_) => "a name",
        Term::Str(_) => "a text",
        Term::Num(_) => "a number",
        Term::Length(_) => "a length",
        Term::Call(_) => "an option",
    };
    Diagnostic::new(
        Code::BadArgument,
        format!("expected {wanted}, found {found}"),
    )
    .with_label(term.span(), format!("expected {wanted}"))
    .with_help(format!("write `{shape}`"))
}
