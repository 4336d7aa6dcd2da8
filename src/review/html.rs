//! `index.html`: one self-contained page to review every figure that differs.
//!
//! The page needs nothing beside it: the style is inline and pictures are `data:` URIs
//! (base64 PNG). It shows the table of figures and their states, the quoted numbers that
//! changed, each changed figure (largest change first) with a picture comparison and its
//! moved numbers, each added or removed figure's picture, and a line diff (with three lines
//! of context) of every spec and data file that differs.
//!
//! The comparison shows one picture at the page's width at a time: *before*, *after* or the
//! *changed pixels* — switched with buttons that need no script, so flipping between them
//! shows every change in place — or *slide*, the after picture over the before picture up to
//! a slider the reviewer drags (one line of script moves the edge). Numbers are rounded to
//! show their change; the exact values appear on hover (`title`).
//!
//! Every text from specs and data is escaped; the only script is the slider's, and it reads
//! nothing but the slider.

use std::fmt::Write as _;

use base64::Engine as _;

use super::compare::{StatChange, State};
use super::lines::{self, Op};
use super::quotes::QuoteChange;
use super::sources::SourceChange;
use super::{FigureReview, Picture, Review};

/// At most this many moved numbers are listed per figure.
pub const MAX_ROWS: usize = 500;

/// At most this many diff lines are shown per file.
pub const MAX_DIFF_LINES: usize = 400;

/// Unchanged lines shown around each change.
const CONTEXT: usize = 3;

const STYLE: &str = "
* { box-sizing: border-box; }
body { font-family: sans-serif; margin: 2em auto; max-width: 1400px; padding: 0 1em; color: #222; }
h1 { font-size: 1.6em; } h2 { font-size: 1.3em; margin-top: 2em; } h3 { font-size: 1.05em; }
table { border-collapse: collapse; margin: 0.8em 0; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
td[title] { cursor: help; }
.state { font-weight: bold; }
.changed { color: #a04000; } .added { color: #006a4e; } .removed { color: #8b0000; } .unchanged { color: #666; }
img { max-width: 100%; border: 1px solid #ddd; display: block; }
img.single { max-width: min(100%, 900px); }
.compare > input { position: absolute; opacity: 0; }
.compare > label { display: inline-block; padding: 0.3em 0.9em; margin: 0 0.3em 0.5em 0; border: 1px solid #999; border-radius: 4px; cursor: pointer; user-select: none; }
.compare > input:checked + label { background: #0072b2; border-color: #0072b2; color: #fff; }
.compare > input:focus-visible + label { outline: 2px solid #e69f00; }
.stack { position: relative; width: 100%; }
.stack img { width: 100%; height: auto; }
.stack .after { position: absolute; left: 0; top: 0; display: none; clip-path: inset(0 0 0 var(--split, 50%)); }
.stack .marks, .compare .slider { display: none; }
.compare input.show-after:checked ~ .stack .after { display: block; clip-path: none; }
.compare input.show-changed:checked ~ .stack img { display: none; }
.compare input.show-changed:checked ~ .stack .marks { display: block; }
.compare input.show-slide:checked ~ .stack .after { display: block; }
.compare input.show-slide:checked ~ .slider { display: block; width: 100%; margin: 0.4em 0 0 0; }
pre.diff { background: #f7f7f7; padding: 0.6em; overflow-x: auto; font-size: 0.85em; }
pre.diff .del { background: #fde2e1; display: block; }
pre.diff .ins { background: #dcf5e3; display: block; }
pre.diff .hunk { color: #555; display: block; }
";

/// Text safe inside HTML elements and attribute values.
fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            other => out.push(other),
        }
    }
    out
}

fn data_uri(png: &[u8]) -> String {
    format!(
        "data:image/png;base64,{}",
        base64::engine::general_purpose::STANDARD.encode(png)
    )
}

/// The page's text.
pub fn page(review: &Review) -> String {
    let mut out = String::new();
    let _ = write!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <title>Figure changes</title>\n<style>{STYLE}</style>\n</head>\n<body>\n\
         <h1>Figure changes</h1>\n<p>Compared <code>{}</code> (before) with <code>{}</code> \
         (after): {} changed, {} added, {} removed, {} unchanged.</p>\n",
        escape(&review.base),
        escape(&review.head),
        review.count(State::Changed),
        review.count(State::Added),
        review.count(State::Removed),
        review.count(State::Unchanged),
    );
    figure_table(&mut out, review);
    quote_table(&mut out, &review.quotes);
    for (i, f) in review
        .figures
        .iter()
        .filter(|f| f.diff.state != State::Unchanged)
        .enumerate()
    {
        figure_section(&mut out, f, i);
    }
    if !review.sources.is_empty() {
        out.push_str("<h2 id=\"files\">Spec and data files that differ</h2>\n");
        for s in &review.sources {
            source_section(&mut out, s);
        }
    }
    out.push_str("</body>\n</html>\n");
    out
}

fn figure_table(out: &mut String, review: &Review) {
    out.push_str(
        "<table class=\"figures\">\n<thead><tr><th>Figure</th><th>State</th>\
         <th>Numbers moved</th><th>Pixels changed</th></tr></thead>\n<tbody>\n",
    );
    for f in &review.figures {
        let name = escape(&f.diff.name);
        let state = f.diff.state.as_str();
        let shown = if f.diff.state == State::Unchanged {
            name.clone()
        } else {
            format!("<a href=\"#figure-{name}\">{name}</a>")
        };
        let numbers = match f.diff.state {
            State::Changed => f.diff.numbers.len().to_string(),
            _ => String::new(),
        };
        let pixels = match &f.picture {
            Picture::Diff { changed_pixels, .. } => format!(
                "{changed_pixels} ({:.2}%)",
                100.0 * f.picture.changed_share()
            ),
            _ => String::new(),
        };
        let _ = writeln!(
            out,
            "<tr><td>{shown}</td><td class=\"state {state}\">{state}</td>\
             <td class=\"num\">{numbers}</td><td class=\"num\">{pixels}</td></tr>"
        );
    }
    out.push_str("</tbody>\n</table>\n");
}

fn quote_table(out: &mut String, quotes: &[QuoteChange]) {
    if quotes.is_empty() {
        return;
    }
    out.push_str(
        "<h2 id=\"quotes\">Quoted numbers that changed</h2>\n<table class=\"quotes\">\n\
         <thead><tr><th>Figure</th><th>Statistic</th><th>Cell</th><th>Before</th>\
         <th>After</th></tr></thead>\n<tbody>\n",
    );
    let dash = |v: Option<&str>| v.map_or_else(|| "—".to_owned(), escape);
    for q in quotes {
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td>\
             <td class=\"num\">{}</td></tr>",
            escape(&q.figure),
            escape(&q.stat),
            escape(&q.cell),
            dash(q.old.as_deref()),
            dash(q.new.as_deref()),
        );
    }
    out.push_str("</tbody>\n</table>\n");
}

/// The comparison of a changed figure: buttons, the picture stack and the slider.
fn comparison(
    out: &mut String,
    index: usize,
    name: &str,
    before: &[u8],
    after: &[u8],
    changed: &[u8],
) {
    let group = format!("view-{index}");
    out.push_str("<div class=\"compare\">\n");
    for (i, (class, label)) in [
        ("show-before", "Before"),
        ("show-after", "After"),
        ("show-changed", "Changed pixels"),
        ("show-slide", "Slide"),
    ]
    .into_iter()
    .enumerate()
    {
        let id = format!("{group}-{i}");
        let checked = if i == 2 { " checked" } else { "" };
        let _ = writeln!(
            out,
            "<input type=\"radio\" name=\"{group}\" id=\"{id}\" class=\"{class}\"{checked}>\
             <label for=\"{id}\">{label}</label>"
        );
    }
    let _ = writeln!(
        out,
        "<div class=\"stack\" style=\"--split: 50%\">\n\
         <img class=\"before\" src=\"{}\" alt=\"{name} before\">\n\
         <img class=\"after\" src=\"{}\" alt=\"{name} after\">\n\
         <img class=\"marks\" src=\"{}\" alt=\"{name}: changed pixels marked over the new picture\">\n\
         </div>\n\
         <input class=\"slider\" type=\"range\" min=\"0\" max=\"100\" value=\"50\" \
         aria-label=\"where the after picture starts\" \
         oninput=\"this.previousElementSibling.style.setProperty('--split', this.value + '%')\">\n\
         </div>",
        data_uri(before),
        data_uri(after),
        data_uri(changed),
    );
}

fn figure_section(out: &mut String, f: &FigureReview, index: usize) {
    let name = escape(&f.diff.name);
    let state = f.diff.state.as_str();
    let _ = writeln!(
        out,
        "<section id=\"figure-{name}\" class=\"figure\">\n\
         <h2>{name} <span class=\"state {state}\">{state}</span></h2>"
    );
    if f.diff.state == State::Changed {
        let _ = writeln!(
            out,
            "<p>Outputs that differ: {}.</p>",
            escape(&f.diff.differing.join(", "))
        );
    }
    match &f.picture {
        Picture::Diff {
            before,
            after,
            changed,
            changed_pixels,
            ..
        } => {
            let share = 100.0 * f.picture.changed_share();
            let _ = writeln!(
                out,
                "<p>{changed_pixels} pixels changed ({share:.2}% of the picture), marked \
                 over the new picture. Flip between before and after, or slide.</p>"
            );
            comparison(out, index, &name, before, after, changed);
        }
        Picture::Single(png) => {
            let _ = writeln!(
                out,
                "<img class=\"single\" src=\"{}\" alt=\"{name}\">",
                data_uri(png)
            );
        }
        Picture::Unavailable => out.push_str("<p>This figure has no PNG or SVG output.</p>\n"),
        Picture::None => {}
    }
    if f.diff.state == State::Changed {
        number_table(out, &f.diff.numbers);
    }
    out.push_str("</section>\n");
}

/// A table cell of a number: rounded, with the exact value on hover when they differ.
fn number_cell(shown: Option<&str>, exact: Option<&str>) -> String {
    match (shown, exact) {
        (Some(s), Some(e)) if s != e => format!(
            "<td class=\"num\" title=\"{}\">{}</td>",
            escape(e),
            escape(s)
        ),
        (Some(s), _) => format!("<td class=\"num\">{}</td>", escape(s)),
        (None, _) => "<td class=\"num\">—</td>".to_owned(),
    }
}

fn number_table(out: &mut String, numbers: &[StatChange]) {
    if numbers.is_empty() {
        out.push_str("<p>No number of the summary moved.</p>\n");
        return;
    }
    out.push_str(
        "<table class=\"numbers\">\n<thead><tr><th>Panel</th><th>Layer</th><th>Group</th>\
         <th>x</th><th>Statistic</th><th>Before</th><th>After</th><th>Difference</th>\
         </tr></thead>\n<tbody>\n",
    );
    for c in numbers.iter().take(MAX_ROWS) {
        let k = &c.key;
        let s = c.shown();
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>{}{}{}</tr>",
            escape(&k.panel),
            escape(&k.layer),
            escape(&k.group),
            escape(&k.x),
            escape(&k.stat_label()),
            number_cell(s.old.as_deref(), c.old.as_deref()),
            number_cell(s.new.as_deref(), c.new.as_deref()),
            number_cell(s.difference.as_deref(), None),
        );
    }
    out.push_str("</tbody>\n</table>\n");
    if numbers.len() > MAX_ROWS {
        let _ = writeln!(out, "<p>…and {} more.</p>", numbers.len() - MAX_ROWS);
    }
}

fn source_section(out: &mut String, s: &SourceChange) {
    let what = match (&s.old, &s.new) {
        (None, _) => " (new file)",
        (_, None) => " (removed)",
        _ => "",
    };
    let _ = writeln!(
        out,
        "<h3>{}{what}</h3>\n<pre class=\"diff\">",
        escape(&s.path)
    );
    let old = s.old.as_deref().unwrap_or("");
    let new = s.new.as_deref().unwrap_or("");
    let mut shown = 0;
    'hunks: for hunk in lines::hunks(old, new, CONTEXT) {
        let _ = write!(
            out,
            "<span class=\"hunk\">@@ line {} → line {} @@</span>",
            hunk.old_start, hunk.new_start
        );
        for op in &hunk.ops {
            if shown == MAX_DIFF_LINES {
                out.push_str("<span class=\"hunk\">… (more lines not shown)</span>");
                break 'hunks;
            }
            shown += 1;
            let _ = match op {
                Op::Same(l) => writeln!(out, "  {}", escape(l)),
                Op::Removed(l) => write!(out, "<span class=\"del\">- {}</span>", escape(l)),
                Op::Added(l) => write!(out, "<span class=\"ins\">+ {}</span>", escape(l)),
            };
        }
    }
    out.push_str("</pre>\n");
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_is_escaped() {
        assert_eq!(
            escape("<a href=\"x\">&'"),
            "&lt;a href=&quot;x&quot;&gt;&amp;&#39;"
        );
    }
}
