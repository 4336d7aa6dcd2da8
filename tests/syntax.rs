//! Tests of the `syntax` stage.
//!
//! - `tests/syntax/ok/NNN_name.figura` must parse; the tree, rendered compactly, must equal
//!   `NNN_name.tree` beside it, and every span in the tree must cover exactly its own text.
//! - `tests/syntax/err/NNN_name.figura` must fail; the diagnostics (code, span as
//!   line:col-line:col, message, labels, help) must equal `NNN_name.errors` beside it.
//! - Robustness: every prefix and a fixed set of byte mutations of the ok cases never panic
//!   and always give a valid tree or well-formed diagnostics with spans inside the text.
//!
//! `UPDATE_EXPECT=1 cargo test --test syntax` rewrites the expected files; without it a
//! missing or different expected file fails the test. The example specs in ok cases 001–004
//! are those of the language contract (sections 2, 3 and 8), which must keep parsing.

use std::fmt::Write as _;
use std::fs;
use std::path::{Path, PathBuf};

use figura::diag::{Diagnostic, SourceId, SourceMap, Span};
use figura::syntax::ast::*;
use figura::syntax::{parse, MAX_ERRORS, MAX_NESTING};

const OK_DIR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/syntax/ok");
const ERR_DIR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/syntax/err");
const GRAMMAR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/grammar/figura.pest");

// ---------------------------------------------------------------------------------------------
// Data-driven runners

#[test]
fn ok_cases_parse_to_the_expected_trees() {
    let mut failures = Vec::new();
    let cases = cases(OK_DIR);
    assert!(cases.len() >= 10, "ok cases missing in {OK_DIR}");
    for case in cases {
        let text = read(&case);
        let (map, id) = source(&case, &text);
        match parse(id, &text) {
            Ok(file) => {
                for problem in span_problems(&file, &text) {
                    failures.push(format!("{}: {problem}", case.display()));
                }
                compare(
                    &case.with_extension("tree"),
                    &render_tree(&file, &map, id),
                    &mut failures,
                );
            }
            Err(diags) => failures.push(format!(
                "{}: expected to parse, got:\n{}",
                case.display(),
                render_diagnostics(&diags, &map, id)
            )),
        }
    }
    assert!(failures.is_empty(), "\n{}", failures.join("\n\n"));
}

#[test]
fn err_cases_give_the_expected_diagnostics() {
    let rule_names = grammar_rule_names();
    let mut failures = Vec::new();
    let cases = cases(ERR_DIR);
    assert!(cases.len() >= 19, "err cases missing in {ERR_DIR}");
    for case in cases {
        let text = read(&case);
        let (map, id) = source(&case, &text);
        match parse(id, &text) {
            Ok(_) => failures.push(format!("{}: expected errors, parsed", case.display())),
            Err(diags) => {
                for problem in diagnostic_problems(&diags, &text, &rule_names) {
                    failures.push(format!("{}: {problem}", case.display()));
                }
                let rendered = render_diagnostics(&diags, &map, id);
                compare(&case.with_extension("errors"), &rendered, &mut failures);
            }
        }
    }
    assert!(failures.is_empty(), "\n{}", failures.join("\n\n"));
}

/// Every code the stage documents is produced by at least one err case.
#[test]
fn every_code_has_an_err_case() {
    let mut seen = std::collections::BTreeSet::new();
    for case in cases(ERR_DIR) {
        let text = read(&case);
        if let Err(diags) = parse(SourceId(0), &text) {
            seen.extend(diags.iter().map(|d| d.code));
        }
    }
    let missing: Vec<String> = (1..=20)
        .map(|n| format!("F{n:04}"))
        .filter(|code| !seen.contains(code.as_str()))
        .collect();
    assert!(missing.is_empty(), "codes without an err case: {missing:?}");
}

fn cases(dir: &str) -> Vec<PathBuf> {
    let mut cases: Vec<PathBuf> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot read {dir}: {e}"))
        .map(|entry| entry.expect("directory entry").path())
        .filter(|p| p.extension().is_some_and(|e| e == "figura"))
        .collect();
    cases.sort();
    cases
}

fn read(path: &Path) -> String {
    fs::read_to_string(path).unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()))
}

fn source(path: &Path, text: &str) -> (SourceMap, SourceId) {
    let mut map = SourceMap::new();
    let id = map.add(path, text);
    (map, id)
}

/// Compares with an expected file, or rewrites it when `UPDATE_EXPECT` is set.
fn compare(expected_path: &Path, actual: &str, failures: &mut Vec<String>) {
    let update = std::env::var_os("UPDATE_EXPECT").is_some();
    match fs::read_to_string(expected_path) {
        Ok(expected) if expected == actual => {}
        _ if update => fs::write(expected_path, actual)
            .unwrap_or_else(|e| panic!("cannot write {}: {e}", expected_path.display())),
        Ok(expected) => failures.push(format!(
            "{} differs (UPDATE_EXPECT=1 rewrites it)\n--- expected\n{expected}--- actual\n{actual}",
            expected_path.display()
        )),
        Err(_) => failures.push(format!(
            "{} is missing (UPDATE_EXPECT=1 creates it)\n--- actual\n{actual}",
            expected_path.display()
        )),
    }
}

// ---------------------------------------------------------------------------------------------
// Rendering

fn at(map: &SourceMap, id: SourceId, span: Span) -> String {
    let (l1, c1) = map.line_col(id, span.start);
    let (l2, c2) = map.line_col(id, span.end);
    format!("{l1}:{c1}-{l2}:{c2}")
}

/// One line per item and statement: `[span] source-like text`, where a bare word is a
/// `Word`, `85` a `Num`, `85mm` a `Length`, `"…"` a `Str` (value re-escaped) and `f(…)` a
/// `Call`. Numbers whose text is not the shortest form of their value show `=value`.
/// Filters are shown as prefix expressions, so grouping and precedence are visible.
fn render_tree(file: &SpecFile, map: &SourceMap, id: SourceId) -> String {
    let mut out = String::new();
    for item in &file.items {
        match item {
            Item::Include(inc) => {
                let _ = writeln!(
                    out,
                    "[{}] include {}",
                    at(map, id, inc.span),
                    render_str(&inc.path)
                );
            }
            Item::Block(block) => {
                let path = block.path.as_ref().map(|p| format!(" {}", render_str(p)));
                let _ = writeln!(
                    out,
                    "[{}] block {} {}{}",
                    at(map, id, block.span),
                    block.kind.name,
                    block.name.name,
                    path.unwrap_or_default()
                );
                for statement in &block.statements {
                    let _ = writeln!(
                        out,
                        "  [{}] {}",
                        at(map, id, statement.span()),
                        render_statement(statement)
                    );
                }
            }
        }
    }
    for comment in &file.comments {
        let _ = writeln!(
            out,
            "[{}] comment {}",
            at(map, id, comment.span),
            comment.text
        );
    }
    out
}

fn render_statement(statement: &Statement) -> String {
    match statement {
        Statement::Where(w) => format!("where {}", render_expr(&w.expr)),
        Statement::Plain(p) => {
            let mut out = String::new();
            if let Some(target) = &p.target {
                let _ = write!(out, "{}: ", target.name);
            }
            out.push_str(&p.head.name);
            if let Some(args) = &p.head_args {
                out.push_str(&render_args(args));
            }
            for term in &p.terms {
                out.push(' ');
                out.push_str(&render_term(term));
            }
            out
        }
    }
}

fn render_args(args: &Args) -> String {
    let items: Vec<String> = args.items.iter().map(render_term).collect();
    format!("({})", items.join(", "))
}

fn render_term(term: &Term) -> String {
    match term {
        Term::Word(w) => w.name.clone(),
        Term::Str(s) => render_str(s),
        Term::Num(n) => render_number(&n.text, n.value, ""),
        Term::Length(l) => render_number(&l.text, l.value, l.unit.as_str()),
        Term::Call(c) => format!("{}{}", c.name.name, render_args(&c.args)),
    }
}

fn render_number(text: &str, value: f64, unit: &str) -> String {
    if format!("{value}") == text {
        format!("{text}{unit}")
    } else {
        format!("{text}{unit}={value}")
    }
}

fn render_str(s: &Str) -> String {
    format!("{:?}", s.value)
}

fn render_value(v: &Value) -> String {
    match v {
        Value::Str(s) => render_str(s),
        Value::Num(n) => render_number(&n.text, n.value, ""),
    }
}

fn render_expr(expr: &Expr) -> String {
    match expr {
        Expr::Compare { var, op, value, .. } => {
            format!("({} {} {})", op.as_str(), var.name, render_value(value))
        }
        Expr::In { var, values, .. } => {
            let values: Vec<String> = values.iter().map(render_value).collect();
            format!("(in {} [{}])", var.name, values.join(", "))
        }
        Expr::Not { inner, .. } => format!("(not {})", render_expr(inner)),
        Expr::And(a, b) => format!("(and {} {})", render_expr(a), render_expr(b)),
        Expr::Or(a, b) => format!("(or {} {})", render_expr(a), render_expr(b)),
        Expr::Group { inner, .. } => format!("(group {})", render_expr(inner)),
    }
}

fn render_diagnostics(diags: &[Diagnostic], map: &SourceMap, id: SourceId) -> String {
    let mut out = String::new();
    for d in diags {
        let span = d.span().map_or_else(|| "-".to_owned(), |s| at(map, id, s));
        let _ = writeln!(out, "{} {} {}", d.code, span, d.message);
        for label in &d.labels {
            let _ = writeln!(out, "  label {} {}", at(map, id, label.span), label.text);
        }
        let _ = writeln!(out, "  help: {}", d.help.as_deref().unwrap_or("(none)"));
    }
    out
}

// ---------------------------------------------------------------------------------------------
// Invariants

/// Every way a tree's spans fail to cover exactly their own text.
fn span_problems(file: &SpecFile, text: &str) -> Vec<String> {
    let mut problems = Vec::new();
    let mut check = |span: Span, what: &str, ok: &dyn Fn(&str) -> bool| {
        let slice = (span.start <= span.end)
            .then(|| text.get(span.start..span.end))
            .flatten();
        match slice {
            Some(s) if ok(s) => {}
            Some(s) => problems.push(format!(
                "{what} span {}..{} covers {s:?}",
                span.start, span.end
            )),
            None => problems.push(format!(
                "{what} span {}..{} is not inside the text",
                span.start, span.end
            )),
        }
    };
    for c in &file.comments {
        check(c.span, "comment", &|s| s == c.text && s.starts_with('#'));
    }
    for item in &file.items {
        match item {
            Item::Include(inc) => {
                check(inc.span, "include", &|s| {
                    s.starts_with("include") && s.ends_with('"')
                });
                check_str(&inc.path, &mut check);
            }
            Item::Block(b) => {
                check(b.span, "block", &|s| {
                    s.starts_with(&b.kind.name) && s.ends_with('}')
                });
                check_ident(&b.kind, &mut check);
                check_ident(&b.name, &mut check);
                if let Some(p) = &b.path {
                    check_str(p, &mut check);
                }
                for statement in &b.statements {
                    check_statement(statement, &mut check);
                }
            }
        }
    }
    problems
}

type Check<'a> = dyn FnMut(Span, &str, &dyn Fn(&str) -> bool) + 'a;

fn check_ident(ident: &Ident, check: &mut Check) {
    check(ident.span, "name", &|s| s == ident.name);
}

fn check_str(s: &Str, check: &mut Check) {
    check(s.span, "string", &|t| {
        t.len() >= 2 && t.starts_with('"') && t.ends_with('"')
    });
}

fn check_statement(statement: &Statement, check: &mut Check) {
    match statement {
        Statement::Where(w) => {
            let end = w.expr.span().end;
            check(w.span, "where", &|s| s.starts_with("where"));
            check(
                Span::new(w.span.source, w.span.start, end),
                "where end",
                &|s| s.len() == w.span.len(),
            );
            check_expr(&w.expr, check);
        }
        Statement::Plain(p) => {
            let first = p.target.as_ref().unwrap_or(&p.head);
            let last_end = p
                .terms
                .last()
                .map(|t| t.span().end)
                .or(p.head_args.as_ref().map(|a| a.span.end))
                .unwrap_or(p.head.span.end);
            check(p.span, "statement", &|s| {
                s.starts_with(&first.name)
                    && p.span.start == first.span.start
                    && p.span.end == last_end
            });
            if let Some(t) = &p.target {
                check_ident(t, check);
            }
            check_ident(&p.head, check);
            if let Some(args) = &p.head_args {
                check_args(args, check);
            }
            for term in &p.terms {
                check_term(term, check);
            }
        }
    }
}

fn check_args(args: &Args, check: &mut Check) {
    check(args.span, "args", &|s| {
        s.starts_with('(') && s.ends_with(')')
    });
    for term in &args.items {
        check_term(term, check);
    }
}

fn check_term(term: &Term, check: &mut Check) {
    match term {
        Term::Word(w) => check_ident(w, check),
        Term::Str(s) => check_str(s, check),
        Term::Num(n) => check(n.span, "number", &|s| s == n.text),
        Term::Length(l) => check(l.span, "length", &|s| {
            s == format!("{}{}", l.text, l.unit.as_str())
        }),
        Term::Call(c) => {
            check(c.span, "call", &|s| {
                s.starts_with(&c.name.name) && s.ends_with(')') && c.args.span.end == c.span.end
            });
            check_ident(&c.name, check);
            check_args(&c.args, check);
        }
    }
}

fn check_value(value: &Value, check: &mut Check) {
    match value {
        Value::Str(s) => check_str(s, check),
        Value::Num(n) => check(n.span, "number", &|s| s == n.text),
    }
}

fn check_expr(expr: &Expr, check: &mut Check) {
    match expr {
        Expr::Compare {
            var,
            op,
            op_span,
            value,
            span,
        } => {
            check(*span, "comparison", &|s| {
                s.starts_with(&var.name) && span.end == value.span().end
            });
            check(*op_span, "operator", &|s| s == op.as_str());
            check_ident(var, check);
            check_value(value, check);
        }
        Expr::In { var, values, span } => {
            check(*span, "in", &|s| {
                s.starts_with(&var.name) && s.ends_with(')')
            });
            check_ident(var, check);
            for v in values {
                check_value(v, check);
            }
        }
        Expr::Not { inner, span } => {
            check(*span, "not", &|s| {
                s.starts_with("not") && span.end == inner.span().end
            });
            check_expr(inner, check);
        }
        Expr::Group { inner, span } => {
            check(*span, "group", &|s| s.starts_with('(') && s.ends_with(')'));
            check_expr(inner, check);
        }
        Expr::And(a, b) | Expr::Or(a, b) => {
            check_expr(a, check);
            check_expr(b, check);
        }
    }
}

/// The names of the grammar's rules, which must never appear in a message.
fn grammar_rule_names() -> Vec<String> {
    read(Path::new(GRAMMAR))
        .lines()
        .filter_map(|line| {
            line.split_once(" = ")
                .map(|(name, _)| name.trim().to_owned())
        })
        .filter(|name| {
            !name.is_empty() && name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_')
        })
        .collect()
}

/// Every way a list of diagnostics is malformed: no diagnostics, a span outside the text,
/// no help, an unknown code, or a grammar rule name in the words shown to the user.
fn diagnostic_problems(diags: &[Diagnostic], text: &str, rule_names: &[String]) -> Vec<String> {
    let mut problems = Vec::new();
    if diags.is_empty() {
        problems.push("an error result with no diagnostics".to_owned());
    }
    if diags.len() > MAX_ERRORS + 1 {
        problems.push(format!("{} diagnostics, more than the limit", diags.len()));
    }
    for d in diags {
        let valid_code = d.code.len() == 5
            && d.code.starts_with('F')
            && d.code[1..]
                .parse::<u32>()
                .is_ok_and(|n| (1..=20).contains(&n));
        if !valid_code {
            problems.push(format!("code {} is not one of F0001–F0020", d.code));
        }
        if d.message.is_empty() || d.message.ends_with('.') {
            problems.push(format!(
                "{}: message {:?} is empty or ends with a full stop",
                d.code, d.message
            ));
        }
        if d.help.as_deref().is_none_or(str::is_empty) {
            problems.push(format!("{}: no help", d.code));
        }
        if d.code != "F0019" && d.labels.is_empty() {
            problems.push(format!("{}: no span", d.code));
        }
        for label in &d.labels {
            let inside = label.span.start <= label.span.end
                && label.span.end <= text.len()
                && text.is_char_boundary(label.span.start)
                && text.is_char_boundary(label.span.end);
            if !inside {
                problems.push(format!(
                    "{}: span {:?} outside the text",
                    d.code, label.span
                ));
            }
        }
        let words: Vec<&str> = std::iter::once(d.message.as_str())
            .chain(d.help.as_deref())
            .chain(d.labels.iter().map(|l| l.text.as_str()))
            .collect();
        for w in words {
            if let Some(rule) = rule_names
                .iter()
                .find(|r| r.contains('_') && w.contains(r.as_str()))
            {
                problems.push(format!("{}: {w:?} names the grammar rule `{rule}`", d.code));
            }
        }
    }
    problems
}

// ---------------------------------------------------------------------------------------------
// Robustness

/// Parses `text` and checks the result is well-formed; returns a description of any problem.
fn well_formed(text: &str, rule_names: &[String]) -> Option<String> {
    match parse(SourceId(0), text) {
        Ok(file) => {
            let problems = span_problems(&file, text);
            (!problems.is_empty()).then(|| problems.join("; "))
        }
        Err(diags) => {
            let problems = diagnostic_problems(&diags, text, rule_names);
            (!problems.is_empty()).then(|| problems.join("; "))
        }
    }
}

#[test]
fn every_prefix_of_the_ok_cases_is_handled() {
    let rule_names = grammar_rule_names();
    let mut failures = Vec::new();
    for case in cases(OK_DIR) {
        let text = read(&case);
        for (cut, _) in text.char_indices() {
            if let Some(problem) = well_formed(&text[..cut], &rule_names) {
                failures.push(format!("{} cut at byte {cut}: {problem}", case.display()));
            }
        }
    }
    assert!(failures.is_empty(), "\n{}", failures.join("\n"));
}

/// Replacements tried at each position: the characters that matter to the grammar, an
/// invisible one and a multi-byte one. `None` deletes the character.
const MUTATIONS: [Option<&str>; 18] = [
    Some("("),
    Some(")"),
    Some("{"),
    Some("}"),
    Some("\""),
    Some("\\"),
    Some("#"),
    Some("\n"),
    Some(";"),
    Some(","),
    Some("="),
    Some("-"),
    Some("."),
    Some("9"),
    Some("x"),
    Some("é"),
    Some("\u{a0}"),
    None,
];

#[test]
fn byte_mutations_of_the_ok_cases_are_handled() {
    let rule_names = grammar_rule_names();
    let mut failures = Vec::new();
    for (case_idx, case) in cases(OK_DIR).into_iter().enumerate() {
        let text = read(&case);
        for (pos, c) in text.char_indices() {
            // Two mutations per position, chosen by a fixed rule so every kind meets every
            // kind of character across the cases.
            for round in 0..2 {
                let kind = (pos * 7 + case_idx * 3 + round * 5) % MUTATIONS.len();
                let mut mutated = String::with_capacity(text.len() + 2);
                mutated.push_str(&text[..pos]);
                if let Some(replacement) = MUTATIONS[kind] {
                    mutated.push_str(replacement);
                }
                mutated.push_str(&text[pos + c.len_utf8()..]);
                if let Some(problem) = well_formed(&mutated, &rule_names) {
                    failures.push(format!(
                        "{} with {:?} at byte {pos}: {problem}",
                        case.display(),
                        MUTATIONS[kind]
                    ));
                }
            }
        }
    }
    assert!(failures.is_empty(), "\n{}", failures.join("\n"));
}

fn codes(text: &str) -> Vec<&'static str> {
    match parse(SourceId(0), text) {
        Ok(_) => Vec::new(),
        Err(diags) => diags.iter().map(|d| d.code).collect(),
    }
}

#[test]
fn deep_nesting_is_refused_without_exhausting_the_stack() {
    let deep_call = format!("figure a {{\n  x {}\n}}\n", "f(".repeat(10_000));
    assert_eq!(codes(&deep_call), vec!["F0013"]);
    let deep_group = format!("figure a {{\n  where {}a == 1\n}}\n", "(".repeat(10_000));
    assert_eq!(codes(&deep_group), vec!["F0013"]);
    let nots = format!("figure a {{\n  where {}a == 1\n}}\n", "not ".repeat(10_000));
    assert_eq!(codes(&nots), vec!["F0013"]);
    let ands = format!(
        "figure a {{\n  where {}\n}}\n",
        vec!["a == 1"; 10_000].join(" and ")
    );
    assert_eq!(codes(&ands), vec!["F0013"]);
}

#[test]
fn nesting_up_to_the_limit_parses_on_a_small_stack() {
    let n = MAX_NESTING;
    let calls = format!(
        "figure a {{\n  x {}1{}\n}}\n",
        "f(".repeat(n),
        ")".repeat(n)
    );
    let groups = format!(
        "figure a {{\n  where {}a == 1{}\n}}\n",
        "(".repeat(n),
        ")".repeat(n)
    );
    // 2 MiB is the default stack of a test thread; run on it explicitly.
    let handle = std::thread::Builder::new()
        .stack_size(2 << 20)
        .spawn(move || (codes(&calls), codes(&groups)))
        .expect("spawn a parser thread");
    let (calls, groups) = handle.join().expect("parser thread");
    assert_eq!(calls, Vec::<&str>::new());
    assert_eq!(groups, Vec::<&str>::new());
}

#[test]
fn line_endings_and_byte_order_mark() {
    let crlf = "\u{feff}figure a {\r\n  x b # note\r\n  where c == \"d\"\r\n}\r\n";
    let file = parse(SourceId(0), crlf).expect("CRLF with a byte-order mark parses");
    assert_eq!(file.items.len(), 1);
    assert_eq!(file.comments.len(), 1);
    assert_eq!(file.comments[0].text, "# note");
    let lone_cr = "figure a {\r  x b\r}";
    assert!(parse(SourceId(0), lone_cr).is_ok());
}

#[test]
fn independent_errors_are_all_reported() {
    let text =
        "figure a {\n  title \"open\n  x medium )\n}\nfigure b {\n  where s = \"x\"\n  y a\\b\n}\n";
    assert_eq!(codes(text), vec!["F0002", "F0007", "F0015", "F0014"]);
}

#[test]
fn long_files_parse_in_linear_work() {
    // 4 000 blocks, about 400 KB. Parsing once must stay well under the limit even unoptimised,
    // and a file with an error in every block stops after MAX_ERRORS re-parses.
    let block = read(&Path::new(OK_DIR).join("002_speed_by_medium.figura"));
    let big: String = (0..4_000).map(|_| block.as_str()).collect();
    let started = std::time::Instant::now();
    assert!(parse(SourceId(0), &big).is_ok());
    let broken: String = (0..1_000).map(|_| block.replace("box", "box )")).collect();
    let found = codes(&broken);
    assert_eq!(found.len(), MAX_ERRORS + 1);
    assert_eq!(found.last(), Some(&"F0019"));
    let took = started.elapsed();
    assert!(took.as_secs() < 60, "parsing took {took:?}");
}
