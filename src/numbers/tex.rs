//! `numbers.tex`: the numbers as LaTeX definitions.
//!
//! `\input{out/numbers.tex}` in the preamble; then `\figura{FIGURE}{STAT}{CELL}` writes a
//! number with its unit and `\figuranum{FIGURE}{STAT}{CELL}` the number alone. An address
//! that is not in the file stops the run with an error naming it (and prints `??`), so a
//! quote of a number that no longer exists cannot go unnoticed. Works with any LaTeX engine
//! that has e-TeX's `\ifcsname` (all current ones).
//!
//! Addresses are compared as plain characters (`\detokenize`); an address holding a
//! character LaTeX cannot take as written inside an argument (`\`, `{`, `}`, `%` or `^^`) is
//! left out of this file (the Typst and JSON files have it). Values are escaped for text
//! mode, the minus sign is a math minus and the space before the unit does not break.

use std::fmt::Write as _;

use super::text::UNIT_SPACE;
use super::Addressed;
use crate::markup::{self, Position};

const HEADER: &str = r"% Numbers of the figures in this folder, written by Figura: do not edit.
% \input this file, then write \figura{FIGURE}{STAT}{CELL} for a number with its
% unit, and \figuranum{FIGURE}{STAT}{CELL} for the number alone.
\makeatletter
\def\figura@def#1#2#3#4#5{%
  \expandafter\def\csname figura@t@\detokenize{#1/#2/#3}\endcsname{#4}%
  \expandafter\def\csname figura@n@\detokenize{#1/#2/#3}\endcsname{#5}}
\def\figura@get#1#2#3#4{%
  \ifcsname figura@#1@\detokenize{#2/#3/#4}\endcsname
    \csname figura@#1@\detokenize{#2/#3/#4}\endcsname
  \else
    \PackageError{figura}{No number \detokenize{#2/#3/#4}}{The address is not in
      numbers.tex: check it against the figure's summary, or build the figures again}%
    \textbf{??}%
  \fi}
\providecommand\figura[3]{\figura@get{t}{#1}{#2}{#3}}
\providecommand\figuranum[3]{\figura@get{n}{#1}{#2}{#3}}
";

/// Whether LaTeX reads `part` back unchanged inside an argument.
fn fits_an_argument(part: &str) -> bool {
    !part.contains(['\\', '{', '}', '%']) && !part.contains("^^")
}

/// Text escaped for LaTeX's text mode; the styled runs of label markup ([`crate::markup`])
/// as `\textsuperscript`, `\textsubscript`, `\textit` and `\textbf`.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for run in markup::runs(text) {
        let mut wrappers: Vec<&str> = Vec::new();
        match run.style.position {
            Position::Base => {}
            Position::Raised => wrappers.push(r"\textsuperscript{"),
            Position::Lowered => wrappers.push(r"\textsubscript{"),
        }
        if run.style.italic {
            wrappers.push(r"\textit{");
        }
        if run.style.bold {
            wrappers.push(r"\textbf{");
        }
        wrappers.iter().for_each(|w| out.push_str(w));
        escape_plain(&run.text, &mut out);
        wrappers.iter().for_each(|_| out.push('}'));
    }
    out
}

/// Plain text escaped for LaTeX's text mode, onto `out`.
fn escape_plain(text: &str, out: &mut String) {
    for c in text.chars() {
        match c {
            '\\' => out.push_str(r"\textbackslash{}"),
            '{' | '}' | '%' | '#' | '&' | '$' | '_' => {
                out.push('\\');
                out.push(c);
            }
            '~' => out.push_str(r"\textasciitilde{}"),
            '^' => out.push_str(r"\textasciicircum{}"),
            '\u{2212}' => out.push_str(r"\ensuremath{-}"),
            UNIT_SPACE => out.push('~'),
            other => out.push(other),
        }
    }
}

/// The file's text.
pub fn render(numbers: &Addressed) -> String {
    let mut out = String::from(HEADER);
    for (figure, stats) in numbers {
        for (stat, cells) in stats {
            for (cell, quote) in cells {
                if ![figure, stat, cell].iter().all(|p| fits_an_argument(p)) {
                    continue;
                }
                let _ = writeln!(
                    out,
                    r"\figura@def{{{figure}}}{{{stat}}}{{{cell}}}{{{}}}{{{}}}",
                    escape(&quote.text),
                    escape(&quote.number)
                );
            }
        }
    }
    out.push_str("\\makeatother\n");
    out
}
