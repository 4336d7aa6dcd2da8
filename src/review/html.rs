//! `index.html`: one self-contained page to review every figure that differs.
//!
//! The page needs nothing beside it: the style is inline, pictures are `data:` URIs (base64
//! PNG), and there is no script. It shows the table of figures and their states, each changed
//! figure's picture diff and moved numbers, each added or removed figure's picture, and a line
//! diff (with three lines of context) of every spec and data file that differs.

use std::fmt::Write as _;

use base64::Engine as _;

use super::compare::{StatChange, State};
use super::lines::{self, Op};
use super::sources::SourceChange;
use super::{FigureReview, Picture, Review};

/// At most this many moved numbers are listed per figure.
pub const MAX_ROWS: usize = 500;

/// At most this many diff lines are shown per file.
pub const MAX_DIFF_LINES: usize = 400;

/// Unchanged lines shown around each change.
const CONTEXT: usize = 3;

const STYLE: &str = "
body { font-family: sans-serif; margin: 2em auto; max-width: 1400px; padding: 0 1em; color: #222; }
h1 { font-size: 1.6em; } h2 { font-size: 1.3em; margin-top: 2em; } h3 { font-size: 1.05em; }
table { border-collapse: collapse; margin: 0.8em 0; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.state { font-weight: bold; }
.changed { color: #a04000; } .added { color: #006a4e; } .removed { color: #8b0000; } .unchanged { color: #666; }
img { max-width: 100%; border: 1px solid #ddd; }
img.single { max-width: min(100%, 520px); }
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
    for f in review
        .figures
        .iter()
        .filter(|f| f.diff.state != State::Unchanged)
    {
        figure_section(&mut out, f);
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
         <th>Numbers moved</th></tr></thead>\n<tbody>\n",
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
        let _ = writeln!(
            out,
            "<tr><td>{shown}</td><td class=\"state {state}\">{state}</td>\
             <td class=\"num\">{numbers}</td></tr>"
        );
    }
    out.push_str("</tbody>\n</table>\n");
}

fn figure_section(out: &mut String, f: &FigureReview) {
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
            png,
            changed_pixels,
            compared_pixels,
            ..
        } => {
            let share = 100.0 * *changed_pixels as f64 / (*compared_pixels).max(1) as f64;
            let _ = writeln!(
                out,
                "<p>{changed_pixels} pixels changed ({share:.2}% of the picture).</p>\n\
                 <img src=\"{}\" alt=\"{name}: before, after and changed pixels\">",
                data_uri(png)
            );
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
    let dash = |v: Option<&str>| v.map_or_else(|| "—".to_owned(), escape);
    for c in numbers.iter().take(MAX_ROWS) {
        let k = &c.key;
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            escape(&k.panel),
            escape(&k.layer),
            escape(&k.group),
            escape(&k.x),
            escape(&k.stat_label()),
            dash(c.old.as_deref()),
            dash(c.new.as_deref()),
            dash(c.difference().as_deref()),
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
    let ops = lines::diff(
        s.old.as_deref().unwrap_or(""),
        s.new.as_deref().unwrap_or(""),
    );
    let mut shown = 0;
    'hunks: for hunk in lines::hunks(&ops, CONTEXT) {
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
