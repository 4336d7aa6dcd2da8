//! `report.md`: the review as Markdown, ready to post as a pull-request comment.
//!
//! A table of every figure and its state, the quoted numbers that changed, then for each
//! changed figure (largest change first) its changed pixels, links to the before and after
//! pictures, and the numbers that moved (rounded to show the change; the exact values are
//! in `index.html`).
//!
//! Pictures: with an image address (`figura diff --image-url URL`, where CI publishes the
//! report folder) every picture is linked there at full size. Without one, the
//! changed-pixels picture of each figure is embedded as a small `data:` PNG preview, as long
//! as the whole report stays under [`EMBED_BUDGET`] bytes (review sites limit the length of a
//! comment, and not every site shows `data:` pictures); the rest are linked by file name,
//! relative to the report folder.
//!
//! Text from specs and data (figure, level and file names) is escaped: every ASCII
//! punctuation character but `/` and `,` is backslash-escaped (CommonMark), so no name can
//! open a link,
//! a picture, HTML (`<script>`), emphasis or a table cell, and `@` is written as an entity
//! so a level name cannot mention anyone.

use std::fmt::Write as _;

use base64::Engine as _;

use super::compare::{StatChange, State};
use super::quotes::QuoteChange;
use super::{picture_files, FigureReview, Picture, Review};

/// At most this many moved numbers are listed per figure (the page lists more).
pub const MAX_ROWS: usize = 50;

/// Largest report, in bytes, that still gets embedded previews.
pub const EMBED_BUDGET: usize = 60_000;

/// Text that Markdown shows as it is: ASCII punctuation backslash-escaped, `@` as an entity,
/// line breaks as spaces.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '@' => out.push_str("&#64;"),
            '\n' | '\r' | '\t' => out.push(' '),
            // `/` and `,` mean nothing to Markdown; every other mark may.
            c if c.is_ascii_punctuation() && c != '/' && c != ',' => {
                out.push('\\');
                out.push(c);
            }
            c if c.is_control() => {}
            other => out.push(other),
        }
    }
    out
}

/// An absent value is shown as a dash.
fn or_dash(value: Option<&str>) -> String {
    value.map_or_else(|| "—".to_owned(), escape)
}

/// The report's text; pictures are linked under `image_url` when given.
pub fn report(review: &Review, image_url: Option<&str>) -> String {
    let mut out = String::from("## Figure changes\n\n");
    let _ = writeln!(
        out,
        "Compared {} (before) with {} (after): {} changed, {} added, {} removed, {} unchanged.\n",
        escape(&review.base),
        escape(&review.head),
        review.count(State::Changed),
        review.count(State::Added),
        review.count(State::Removed),
        review.count(State::Unchanged),
    );
    figure_table(&mut out, review);
    if !review.sources.is_empty() {
        let files: Vec<String> = review.sources.iter().map(|s| escape(&s.path)).collect();
        let _ = writeln!(out, "\nFiles that differ: {}.", files.join(", "));
    }
    quote_table(&mut out, &review.quotes);
    let mut pictures = Pictures {
        url: image_url.map(|u| u.trim_end_matches('/').to_owned()),
        budget: EMBED_BUDGET,
    };
    for f in review
        .figures
        .iter()
        .filter(|f| f.diff.state == State::Changed)
    {
        changed_figure(&mut out, f, &mut pictures);
    }
    out
}

/// How pictures are referred to, and what is left of the size budget.
struct Pictures {
    url: Option<String>,
    budget: usize,
}

impl Pictures {
    fn link(&self, file: &str) -> String {
        match &self.url {
            Some(url) => format!("{url}/{file}"),
            None => file.to_owned(),
        }
    }

    /// The changed-pixels picture: embedded while the budget lasts, else linked.
    fn changed(&mut self, name: &str, preview: &[u8], report_len: usize) -> String {
        let file = &picture_files(name)[2];
        let alt = format!("changed pixels of {}", escape(name));
        if self.url.is_none() {
            let uri = format!(
                "data:image/png;base64,{}",
                base64::engine::general_purpose::STANDARD.encode(preview)
            );
            if report_len + uri.len() + 200 <= self.budget {
                return format!("![{alt}]({uri})");
            }
        }
        format!("![{alt}]({})", self.link(file))
    }
}

fn figure_table(out: &mut String, review: &Review) {
    out.push_str("| Figure | State | Numbers moved | Pixels changed |\n|---|---|---:|---:|\n");
    for f in &review.figures {
        let numbers = match f.diff.state {
            State::Changed => f.diff.numbers.len().to_string(),
            _ => String::new(),
        };
        let pixels = match &f.picture {
            Picture::Diff { changed_pixels, .. } => format!(
                "{changed_pixels} ({:.2}%)",
                100.0 * f.picture.changed_share()
            ),
            Picture::Unavailable => "no picture".to_owned(),
            Picture::None | Picture::Single(_) => String::new(),
        };
        let _ = writeln!(
            out,
            "| {} | {} | {numbers} | {pixels} |",
            escape(&f.diff.name),
            f.diff.state.as_str()
        );
    }
}

fn quote_table(out: &mut String, quotes: &[QuoteChange]) {
    if quotes.is_empty() {
        return;
    }
    out.push_str(
        "\n### Quoted numbers that changed\n\n\
         | Figure | Statistic | Cell | Before | After |\n|---|---|---|---:|---:|\n",
    );
    for q in quotes.iter().take(MAX_ROWS) {
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} | {} |",
            escape(&q.figure),
            escape(&q.stat),
            escape(&q.cell),
            or_dash(q.old.as_deref()),
            or_dash(q.new.as_deref()),
        );
    }
    if quotes.len() > MAX_ROWS {
        let _ = writeln!(
            out,
            "\n…and {} more (see index.html).",
            quotes.len() - MAX_ROWS
        );
    }
}

fn changed_figure(out: &mut String, f: &FigureReview, pictures: &mut Pictures) {
    let name = escape(&f.diff.name);
    let _ = writeln!(out, "\n### {name}\n");
    let differing: Vec<String> = f.diff.differing.iter().map(|d| escape(d)).collect();
    let _ = writeln!(out, "Outputs that differ: {}.\n", differing.join(", "));
    if let Picture::Diff {
        preview,
        changed_pixels,
        ..
    } = &f.picture
    {
        let picture = pictures.changed(&f.diff.name, preview, out.len());
        let [before, after, changed] = picture_files(&f.diff.name);
        let _ = writeln!(
            out,
            "{picture}\n\n{changed_pixels} pixels changed, marked over the new picture. \
             [Before]({}) · [after]({}) · [changed pixels]({}).\n",
            pictures.link(&before),
            pictures.link(&after),
            pictures.link(&changed),
        );
    }
    if f.diff.numbers.is_empty() {
        out.push_str("No number of the summary moved.\n");
    } else {
        number_table(out, &f.diff.numbers);
    }
}

fn number_table(out: &mut String, numbers: &[StatChange]) {
    out.push_str(
        "| Panel | Layer | Group | x | Statistic | Before | After | Difference |\n\
         |---|---|---|---|---|---:|---:|---:|\n",
    );
    for c in numbers.iter().take(MAX_ROWS) {
        let k = &c.key;
        let s = c.shown();
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {} | {} |",
            escape(&k.panel),
            escape(&k.layer),
            escape(&k.group),
            escape(&k.x),
            escape(&k.stat_label()),
            or_dash(s.old.as_deref()),
            or_dash(s.new.as_deref()),
            or_dash(s.difference.as_deref()),
        );
    }
    if numbers.len() > MAX_ROWS {
        let _ = writeln!(
            out,
            "\n…and {} more (see index.html).",
            numbers.len() - MAX_ROWS
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_from_data_cannot_break_out_of_their_cell() {
        assert_eq!(escape("a|b\nc"), "a\\|b c");
        assert_eq!(
            escape("<script>alert(1)</script>"),
            "\\<script\\>alert\\(1\\)\\</script\\>"
        );
        assert_eq!(
            escape("![x](http://e/p.png)"),
            "\\!\\[x\\]\\(http\\://e/p\\.png\\)"
        );
        assert_eq!(escape("@team *x* `y`"), "&#64;team \\*x\\* \\`y\\`");
        assert_eq!(escape("Ünïcode 1"), "Ünïcode 1");
        assert_eq!(or_dash(None), "—");
    }
}
