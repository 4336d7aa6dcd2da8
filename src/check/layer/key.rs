//! What a layer's marks mean, in words, for the key under a figure ("Large dots: mean, 95% CI").
//!
//! Each layer file has a `key` function that turns its typed options into a [`MarkKey`]; the
//! one dispatch is [`super::Layer::key`]. The words here are shared: the name of an interval
//! and a level written as a percentage.

use super::super::plan::{Bandwidth, BootMethod, ErrorBar};

/// What one layer's marks are, for the key.
#[derive(Debug, Clone, PartialEq)]
pub struct MarkKey {
    /// The marks as a reader sees them, capitalised: "Boxes", "Large dots".
    pub marks: &'static str,
    /// What they show: "median and quartiles, whiskers to 1.5 IQR".
    pub meaning: String,
    /// Its n counts only the subjects with a value in every within cell (a within-subject
    /// interval), not every value of the cell.
    pub complete_subjects: bool,
}

impl MarkKey {
    pub fn new(marks: &'static str, meaning: impl Into<String>) -> MarkKey {
        MarkKey {
            marks,
            meaning: meaning.into(),
            complete_subjects: false,
        }
    }
}

/// What the key of a layer may depend on besides its options.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct KeyContext<'a> {
    /// The y variable is ordinal (medians are levels).
    pub y_ordinal: bool,
    /// The figure shows every value as a dot (box outliers are not drawn twice).
    pub shows_points: bool,
    /// The data's subject, as a word ("participant"), when the data declare one.
    pub subject: Option<&'a str>,
    /// The x and y axes are on a log scale (means are geometric, fits are on the logs).
    pub x_log: bool,
    pub y_log: bool,
}

impl KeyContext<'_> {
    /// The subject as a word, or "subject".
    pub fn subject(&self) -> &str {
        self.subject.unwrap_or("subject")
    }

    /// The subjects: "participants".
    pub fn subjects(&self) -> String {
        plural(self.subject())
    }
}

/// The plural of an English count noun: the regular endings, and the irregular nouns that
/// name observational units most often (leaves, children, mice, people, ...).
pub fn plural(noun: &str) -> String {
    const IRREGULAR: &[(&str, &str)] = &[
        ("child", "children"),
        ("person", "people"),
        ("mouse", "mice"),
        ("man", "men"),
        ("woman", "women"),
        ("tooth", "teeth"),
        ("foot", "feet"),
        ("goose", "geese"),
        ("leaf", "leaves"),
        ("calf", "calves"),
        ("wolf", "wolves"),
        ("fish", "fish"),
        ("sheep", "sheep"),
        ("deer", "deer"),
        ("series", "series"),
        ("species", "species"),
    ];
    let (head, last) = match noun.rsplit_once(' ') {
        Some((head, last)) => (format!("{head} "), last),
        None => (String::new(), noun),
    };
    if let Some((_, p)) = IRREGULAR.iter().find(|(s, _)| *s == last) {
        return format!("{head}{p}");
    }
    let vowel_before_y = last
        .chars()
        .rev()
        .nth(1)
        .is_some_and(|c| "aeiou".contains(c));
    let word = if ["s", "x", "z", "ch", "sh"]
        .iter()
        .any(|e| last.ends_with(e))
    {
        format!("{last}es")
    } else if last.ends_with('y') && !vowel_before_y {
        format!("{}ies", &last[..last.len() - 1])
    } else {
        format!("{last}s")
    };
    format!("{head}{word}")
}

/// A coverage level as a percentage: 0.95 → "95%", 0.975 → "97.5%".
pub fn percent(level: f64) -> String {
    let p = (level * 1000.0).round() / 10.0;
    if p.fract() == 0.0 {
        format!("{p:.0}%")
    } else {
        format!("{p}%")
    }
}

/// An estimate with its error bar: "mean ± SD", "median, 95% bootstrap CI".
pub fn with_error(estimate: &str, error: Option<ErrorBar>) -> String {
    match error {
        None => estimate.to_string(),
        Some(ErrorBar::Sd) => format!("{estimate} ± SD"),
        Some(ErrorBar::Se) => format!("{estimate} ± SE"),
        Some(ErrorBar::Ci { level }) => format!("{estimate}, {} CI", percent(level)),
        Some(ErrorBar::CiWithin { level }) => format!(
            "{estimate}, {} CI (within-subject, Cousineau–Morey)",
            percent(level)
        ),
        Some(ErrorBar::Bootstrap { level, method }) => {
            let how = match method {
                BootMethod::Percentile => "percentile",
                BootMethod::Bca => "BCa",
            };
            format!("{estimate}, {} bootstrap CI ({how})", percent(level))
        }
    }
}

/// A kernel bandwidth rule in words.
pub fn bandwidth(b: Bandwidth) -> String {
    match b {
        Bandwidth::Silverman => "Silverman bandwidth".to_string(),
        Bandwidth::Scott => "Scott bandwidth".to_string(),
        Bandwidth::Fixed(w) => format!("bandwidth {w}"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nouns_take_their_plurals() {
        // English plurals (common practice).
        for (one, many) in [
            ("participant", "participants"),
            ("tray", "trays"),
            ("leaf", "leaves"),
            ("fly", "flies"),
            ("box", "boxes"),
            ("child", "children"),
            ("test plot", "test plots"),
        ] {
            assert_eq!(plural(one), many);
        }
    }

    #[test]
    fn levels_read_as_percentages() {
        assert_eq!(percent(0.95), "95%");
        assert_eq!(percent(0.9), "90%");
        assert_eq!(percent(0.975), "97.5%");
    }

    #[test]
    fn error_bars_are_named() {
        assert_eq!(with_error("mean", Some(ErrorBar::Sd)), "mean ± SD");
        assert_eq!(
            with_error("mean", Some(ErrorBar::CiWithin { level: 0.95 })),
            "mean, 95% CI (within-subject, Cousineau–Morey)"
        );
        assert_eq!(with_error("median", None), "median");
    }
}
