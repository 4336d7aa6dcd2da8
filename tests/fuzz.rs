//! Fuzz targets on stable Rust, run by `cargo test` with a bounded budget and fixed seeds.
//!
//! Three targets, each a loop over inputs drawn from a seeded generator (the same seeds give
//! the same inputs on every machine), each input run through the library with every panic
//! caught and reported with the input that caused it:
//!
//! - `parser`: the examples, the syntax test cases, generated specs and the regression corpus,
//!   mutated byte by byte (flips, insertions, deletions, duplicated and spliced chunks) →
//!   `syntax::parse`, the checker on what parses, `figura fmt`'s formatter, and every
//!   diagnostic drawn by both renderers (human and JSON).
//! - `data`: generated data files that fit a generated codebook, mutated the same way →
//!   the data stage, and its diagnostics drawn.
//! - `end_to_end`: generated specs that fit their codebook, with data that fit it →
//!   check, read, compute, lay out and render every figure (SVG, PNG, PDF). A figure may fail
//!   with diagnostics or a resource limit, never with an internal error.
//!
//! Plus `regressions`: every spec in `tests/fuzz/regressions/` (with its data file beside it)
//! goes end to end under the same rule — inputs that once crashed Figura stay fixed.
//!
//! Budget: `FIGURA_FUZZ_SCALE` multiplies the number of inputs (default 1: about a minute for
//! all targets in a debug build); `FIGURA_FUZZ_SEED` changes the seed, to search further:
//! `FIGURA_FUZZ_SCALE=20 FIGURA_FUZZ_SEED=7 cargo test --release --test fuzz`. A failure
//! prints the target, the seed, the input number and the input, and writes the input to
//! `target/fuzz-failures/` to add to the regression corpus.
//!
//! Internal errors already known are listed in `generate::KNOWN`, each with its reason; the targets
//! still run them, but do not fail on them. An entry that the regression corpus no longer
//! reproduces fails `regressions`, so the list shrinks as they are fixed.

mod common;
mod generate;

use std::panic::{self, AssertUnwindSafe};
use std::path::{Path, PathBuf};

use arbitrary::Unstructured;

use figura::build::{self, FigureError};
use figura::check;
use figura::data;
use figura::diag::{Diagnostic, SourceMap};
use figura::report::{self, MessageFormat};
use figura::stats::random::SplitMix64;
use figura::syntax;

const REGRESSIONS: &str = "tests/fuzz/regressions";

fn scale() -> usize {
    std::env::var("FIGURA_FUZZ_SCALE")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(1)
}

fn seed(target: u64) -> u64 {
    let base = std::env::var("FIGURA_FUZZ_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(0x5eed_f16a);
    base ^ target.wrapping_mul(0x9e37_79b9_7f4a_7c15)
}

/// At least `min` and fewer than `min + spread` pseudo-random bytes.
fn stream(rng: &mut SplitMix64, min: usize, spread: usize) -> Vec<u8> {
    let n = min + below(rng, spread);
    bytes(rng, n)
}

/// `n` pseudo-random bytes.
fn bytes(rng: &mut SplitMix64, n: usize) -> Vec<u8> {
    let mut out = Vec::with_capacity(n + 8);
    while out.len() < n {
        out.extend(rng.next_u64().to_le_bytes());
    }
    out.truncate(n);
    out
}

fn below(rng: &mut SplitMix64, n: usize) -> usize {
    (rng.next_u64() % n.max(1) as u64) as usize
}

/// One random edit of `input`, keeping its size bounded.
fn mutate(rng: &mut SplitMix64, input: &mut Vec<u8>, pool: &[Vec<u8>]) {
    const TOKENS: &[&[u8]] = &[
        b"(",
        b")",
        b"{",
        b"}",
        b"\"",
        b"\\",
        b"\n",
        b"\r",
        b";",
        b",",
        b"#",
        b" ",
        b"\t",
        b"where ",
        b"and ",
        b"not ",
        b"==",
        b"1e999",
        b"-0",
        b"0.5",
        b"85mm",
        b"x",
        b"\0",
        b"\xff",
        b"\xc3\xa9",
        b"\xef\xbf\xbf",
        b"include \"a.figura\"",
        b"levels(",
        b"NA",
    ];
    let at = below(rng, input.len() + 1);
    match below(rng, 7) {
        0 if !input.is_empty() => {
            let i = below(rng, input.len());
            input[i] ^= 1 << below(rng, 8);
        }
        1 => {
            let token = TOKENS[below(rng, TOKENS.len())];
            input.splice(at..at, token.iter().copied());
        }
        2 if !input.is_empty() => {
            let end = (at + 1 + below(rng, 16)).min(input.len());
            input.drain(at.min(end)..end);
        }
        3 if !input.is_empty() => {
            let start = below(rng, input.len());
            let end = (start + 1 + below(rng, 64)).min(input.len());
            let chunk = input[start..end].to_vec();
            input.splice(at..at, chunk);
        }
        4 if !pool.is_empty() => {
            let other = &pool[below(rng, pool.len())];
            let start = below(rng, other.len() + 1);
            let end = (start + below(rng, 128)).min(other.len());
            input.splice(at..at, other[start..end].iter().copied());
        }
        5 if !input.is_empty() => {
            let end = (at + below(rng, 8)).min(input.len());
            let c = input[below(rng, input.len())];
            for b in &mut input[at.min(end)..end] {
                *b = c;
            }
        }
        _ => {
            let n = 1 + below(rng, 4);
            input.extend(bytes(rng, n));
        }
    }
    input.truncate(64 * 1024);
}

/// What went wrong with one input.
struct Failure {
    target: &'static str,
    seed: u64,
    index: usize,
    what: String,
    input: String,
}

impl Failure {
    fn report(&self) -> String {
        let dir = common::root().join("target").join("fuzz-failures");
        let _ = std::fs::create_dir_all(&dir);
        let file = dir.join(format!("{}-{}-{}.txt", self.target, self.seed, self.index));
        let _ = std::fs::write(&file, &self.input);
        let shown: String = self.input.chars().take(2_000).collect();
        format!(
            "fuzz target `{}`, seed {}, input {}: {}\n(input written to {})\n--- input\n{shown}\n---",
            self.target,
            self.seed,
            self.index,
            self.what,
            file.display()
        )
    }
}

/// Runs `body`, turning a panic into its message.
fn no_panic<T>(body: impl FnOnce() -> T) -> Result<T, String> {
    panic::catch_unwind(AssertUnwindSafe(body)).map_err(|payload| {
        payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "a panic".to_owned())
    })
}

/// Draws every diagnostic both ways, as the command line does.
fn render(diags: &[Diagnostic], sources: &SourceMap) {
    for format in [MessageFormat::Human { colour: false }, MessageFormat::Json] {
        let text = report::render_all(diags, sources, format);
        assert!(diags.is_empty() || !text.is_empty());
    }
}

/// Parses, checks, formats and renders the diagnostics of one spec text (not UTF-8: skipped,
/// as the build reports it without parsing).
fn parse_everything(bytes: &[u8]) {
    let Ok(text) = std::str::from_utf8(bytes) else {
        return;
    };
    let mut sources = SourceMap::new();
    let id = sources.add("fuzz.figura", text);
    match syntax::parse(id, text) {
        Ok(ast) => {
            let (_, diags) = check::check(&[generate::unit(ast)]);
            render(&diags, &sources);
            if let Err(figura::format::FormatError::Internal(m)) =
                figura::format::format_source(id, text)
            {
                panic!("the formatter failed: {m}");
            }
        }
        Err(diags) => render(&diags, &sources),
    }
}

/// The texts every mutation starts from: examples, syntax cases, regressions.
fn spec_corpus() -> Vec<Vec<u8>> {
    let root = common::root();
    let mut out = Vec::new();
    for dir in [
        root.join("specs-examples"),
        root.join("tests/syntax/ok"),
        root.join("tests/syntax/err"),
        root.join("tests/check/ok"),
        root.join(REGRESSIONS),
    ] {
        for file in common::files_with_ext(&dir, "figura") {
            out.push(std::fs::read(file).unwrap());
        }
    }
    out
}

#[test]
fn parser() {
    let seed = seed(1);
    let mut rng = SplitMix64::new(seed);
    let pool = spec_corpus();
    let n = 3_000 * scale();
    for index in 0..n {
        let mut input = if index % 4 == 0 {
            let bytes = stream(&mut rng, 256, 1024);
            generate::case(&mut Unstructured::new(&bytes))
                .spec
                .into_bytes()
        } else {
            pool[below(&mut rng, pool.len())].clone()
        };
        for _ in 0..1 + below(&mut rng, 6) {
            mutate(&mut rng, &mut input, &pool);
        }
        if let Err(what) = no_panic(|| parse_everything(&input)) {
            let failure = Failure {
                target: "parser",
                seed,
                index,
                what,
                input: String::from_utf8_lossy(&input).into_owned(),
            };
            panic!("{}", failure.report());
        }
    }
}

/// Reads `data` with the first data block of `spec`; renders the diagnostics.
fn read_data(spec: &str, data: &[u8]) -> Option<(check::Program, data::Table, SourceMap)> {
    let mut sources = SourceMap::new();
    let id = sources.add("fuzz.figura", spec);
    let ast = syntax::parse(id, sources.text(id)).ok()?;
    let (program, _) = check::check(&[generate::unit(ast)]);
    let book = program.codebooks.first()?;
    match data::parse_table(&build::table_spec(book), data, &mut sources) {
        Ok(table) => Some((program, table, sources)),
        Err(diags) => {
            render(&diags, &sources);
            None
        }
    }
}

#[test]
fn data() {
    let seed = seed(2);
    let mut rng = SplitMix64::new(seed);
    let n = 1_500 * scale();
    for index in 0..n {
        let bytes = stream(&mut rng, 256, 2048);
        let case = generate::case(&mut Unstructured::new(&bytes));
        let mut input = case.data.clone().into_bytes();
        let pool = [input.clone()];
        for _ in 0..below(&mut rng, 6) {
            mutate(&mut rng, &mut input, &pool);
        }
        if let Err(what) = no_panic(|| read_data(&case.spec, &input)) {
            let failure = Failure {
                target: "data",
                seed,
                index,
                what,
                input: format!(
                    "{}\n--- {}\n{}",
                    case.spec,
                    case.data_name,
                    String::from_utf8_lossy(&input)
                ),
            };
            panic!("{}", failure.report());
        }
    }
}

/// What making every figure of a case gave.
#[derive(Default)]
struct Made {
    /// Figures drawn.
    drawn: usize,
    /// The internal errors, as text.
    internal: Vec<String>,
}

/// Makes every figure of a case that checks and whose data read.
fn make_figures(spec: &str, data: &str) -> Made {
    let mut made = Made::default();
    let Some((program, table, sources)) = read_data(spec, data.as_bytes()) else {
        return made;
    };
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let purpose = build::Purpose::Files(figura::export::Provenance {
            tool: "figura fuzz".to_string(),
            spec: String::new(),
            data: String::new(),
        });
        match build::render_figure(
            plan,
            book,
            &table,
            &purpose,
            &build::FigureChecks {
                allow_crowding: true,
                journal: None,
            },
        ) {
            Ok(_) => made.drawn += 1,
            Err(FigureError::Build(build::BuildError::Limit(_))) => {}
            Err(FigureError::Data(diags)) => render(&diags, &sources),
            Err(FigureError::Build(e)) => made.internal.push(e.to_string()),
        }
    }
    made
}

#[test]
fn end_to_end() {
    generate::quiet_figure_panics();
    let seed = seed(3);
    let mut rng = SplitMix64::new(seed);
    let n = 400 * scale();
    let mut drawn = 0;
    for index in 0..n {
        let bytes = stream(&mut rng, 128, 2048);
        let case = generate::case(&mut Unstructured::new(&bytes));
        let outcome = no_panic(|| {
            let mut sources = SourceMap::new();
            let id = sources.add("fuzz.figura", case.spec.as_str());
            if let Err(d) = syntax::parse(id, &case.spec) {
                panic!("a generated spec does not parse: {}", d[0].message);
            }
            make_figures(&case.spec, &case.data)
        });
        let what = match outcome {
            Ok(made) => {
                drawn += made.drawn;
                match made.internal.into_iter().find(|e| !generate::is_known(e)) {
                    None => continue,
                    Some(e) => e,
                }
            }
            Err(panic) => panic,
        };
        let failure = Failure {
            target: "end_to_end",
            seed,
            index,
            what,
            input: format!("{}\n--- {}\n{}", case.spec, case.data_name, case.data),
        };
        panic!("{}", failure.report());
    }
    // The generator is worth its time only if most cases reach the drawing.
    println!("end_to_end: {drawn} figures drawn from {n} cases");
    assert!(drawn >= n / 2, "only {drawn} figures drawn from {n} cases");
}

/// The regression corpus: (spec file, its text, its data text). The data file is the one
/// named by the spec's first data block.
fn regressions() -> Vec<(PathBuf, String, String)> {
    let dir = common::root().join(REGRESSIONS);
    common::files_with_ext(&dir, "figura")
        .into_iter()
        .map(|spec_path| {
            let spec = std::fs::read_to_string(&spec_path).unwrap();
            let data_name = spec
                .lines()
                .find(|l| l.starts_with("data "))
                .and_then(|l| l.split('"').nth(1))
                .unwrap_or_else(|| panic!("{}: no data block", spec_path.display()));
            let data = std::fs::read_to_string(dir.join(data_name)).unwrap_or_default();
            (spec_path, spec, data)
        })
        .collect()
}

#[test]
fn regressions_never_crash_and_known_errors_still_happen() {
    generate::quiet_figure_panics();
    let mut seen_known = vec![false; generate::KNOWN.len()];
    let cases = regressions();
    assert!(!cases.is_empty(), "the regression corpus is empty");
    for (path, spec, data) in cases {
        let name = path.file_name().unwrap().to_string_lossy();
        parse_everything(spec.as_bytes());
        let made = no_panic(|| make_figures(&spec, &data))
            .unwrap_or_else(|p| panic!("{name}: panicked outside a figure: {p}"));
        for error in made.internal {
            match generate::KNOWN
                .iter()
                .position(|(text, _)| error.contains(text))
            {
                Some(i) => seen_known[i] = true,
                None => panic!("{name}: an internal error: {error}"),
            }
        }
    }
    for ((text, why), seen) in generate::KNOWN.iter().zip(seen_known) {
        assert!(
            seen,
            "the known internal error `{text}` ({why}) no longer happens: remove it from KNOWN in tests/generate/mod.rs"
        );
    }
}

/// The corpus folder exists relative to the repository (for running from any folder).
#[test]
fn regression_corpus_files_have_their_data() {
    for (path, _, data) in regressions() {
        assert!(
            !data.is_empty(),
            "{}: its data file is missing in {}",
            path.display(),
            Path::new(REGRESSIONS).display()
        );
    }
}
