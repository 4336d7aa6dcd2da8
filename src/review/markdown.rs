//! `report.md`: the review as Markdown, ready to paste into a pull-request comment.
//!
//! A table of every figure and its state, then for each changed figure the numbers that moved
//! (old → new, with the difference) and a link to its picture diff. Pictures are linked by
//! file name, relative to the report folder.

use std::fmt::Write as _;

use super::compare::{StatChange, State};
use super::{FigureReview, Picture, Review};

/// At most this many moved numbers are listed per figure (the page lists more).
pub const MAX_ROWS: usize = 50;

/// Text safe inside a table cell.
fn cell(text: &str) -> String {
    text.replace('\\', "\\\\")
        .replace('|', "\\|")
        .replace(['\n', '\r'], " ")
}

fn code(text: &str) -> String {
    format!("`{}`", cell(text))
}

/// An absent value is shown as a dash.
fn or_dash(value: Option<&str>) -> String {
    value.map_or_else(|| "—".to_owned(), cell)
}

/// The report's text.
pub fn report(review: &Review) -> String {
    let mut out = String::from("## Figure changes\n\n");
    let _ = writeln!(
        out,
        "Compared {} (before) with {} (after): {} changed, {} added, {} removed, {} unchanged.\n",
        code(&review.base),
        code(&review.head),
        review.count(State::Changed),
        review.count(State::Added),
        review.count(State::Removed),
        review.count(State::Unchanged),
    );
    figure_table(&mut out, review);
    if !review.sources.is_empty() {
        let files: Vec<String> = review.sources.iter().map(|s| code(&s.path)).collect();
        let _ = writeln!(out, "\nFiles that differ: {}.", files.join(", "));
    }
    for f in review
        .figures
        .iter()
        .filter(|f| f.diff.state == State::Changed)
    {
        changed_figure(&mut out, f);
    }
    out
}

fn figure_table(out: &mut String, review: &Review) {
    out.push_str("| Figure | State | Numbers moved | Picture |\n|---|---|---:|---|\n");
    for f in &review.figures {
        let numbers = match f.diff.state {
            State::Changed => f.diff.numbers.len().to_string(),
            _ => String::new(),
        };
        let picture = match &f.picture {
            Picture::Diff { file, .. } => format!("[{file}]({file})"),
            Picture::Unavailable => "no picture".to_owned(),
            Picture::None | Picture::Single(_) => String::new(),
        };
        let _ = writeln!(
            out,
            "| {} | {} | {numbers} | {picture} |",
            code(&f.diff.name),
            f.diff.state.as_str()
        );
    }
}

fn changed_figure(out: &mut String, f: &FigureReview) {
    let _ = writeln!(out, "\n### {}\n", code(&f.diff.name));
    let _ = writeln!(
        out,
        "Outputs that differ: {}.\n",
        f.diff.differing.join(", ")
    );
    if f.diff.numbers.is_empty() {
        out.push_str("No number of the summary moved.\n");
    } else {
        number_table(out, &f.diff.numbers);
    }
    if let Picture::Diff { file, .. } = &f.picture {
        let _ = writeln!(
            out,
            "\n![{} before, after and changed pixels]({file})",
            f.diff.name
        );
    }
}

fn number_table(out: &mut String, numbers: &[StatChange]) {
    out.push_str(
        "| Panel | Layer | Group | x | Statistic | Before | After | Difference |\n\
         |---|---|---|---|---|---:|---:|---:|\n",
    );
    for c in numbers.iter().take(MAX_ROWS) {
        let k = &c.key;
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {} | {} |",
            cell(&k.panel),
            cell(&k.layer),
            cell(&k.group),
            cell(&k.x),
            cell(&k.stat_label()),
            or_dash(c.old.as_deref()),
            or_dash(c.new.as_deref()),
            or_dash(c.difference().as_deref()),
        );
    }
    if numbers.len() > MAX_ROWS {
        let _ = writeln!(
            out,
            "\n…and {} more (see `index.html`).",
            numbers.len() - MAX_ROWS
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_cannot_break_the_table() {
        assert_eq!(cell("a|b\nc"), "a\\|b c");
        assert_eq!(or_dash(None), "—");
    }
}
