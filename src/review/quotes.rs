//! Quoted numbers: the manuscript numbers of each side (read from the `numbers.json` its
//! build wrote), and the addresses whose text changed.
//!
//! A quote is compared by its text — what the manuscript prints — so a number that moved
//! in a digit the text does not show is not listed. A `LAYER.STAT` address is not listed when
//! its short name `STAT` (same cell) is listed with the same change.

use std::collections::BTreeMap;
use std::path::Path;

use super::ReviewError;
use crate::numbers::NumbersFormat;

/// Every quote of one side: (figure, statistic, cell) → text.
pub type Quotes = BTreeMap<(String, String, String), String>;

/// A quoted number whose text changed, appeared or disappeared.
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord)]
pub struct QuoteChange {
    pub figure: String,
    pub stat: String,
    pub cell: String,
    pub old: Option<String>,
    pub new: Option<String>,
}

/// The quotes in an output folder's `numbers.json`; `None` when there is none.
pub fn read(dir: &Path) -> Result<Option<Quotes>, ReviewError> {
    let path = dir.join(NumbersFormat::Json.file_name());
    let Ok(bytes) = std::fs::read(&path) else {
        return Ok(None);
    };
    let json: serde_json::Value = serde_json::from_slice(&bytes)
        .map_err(|e| ReviewError::Summary(format!("{}: {e}", path.display())))?;
    let mut quotes = Quotes::new();
    let Some(figures) = json["figures"].as_object() else {
        return Ok(Some(quotes));
    };
    for (figure, stats) in figures {
        for (stat, cells) in stats.as_object().into_iter().flatten() {
            for (cell, entry) in cells.as_object().into_iter().flatten() {
                if let Some(text) = entry["text"].as_str() {
                    let key = (figure.clone(), stat.clone(), cell.clone());
                    quotes.insert(key, text.to_owned());
                }
            }
        }
    }
    Ok(Some(quotes))
}

/// The quotes whose text differs, by address.
pub fn changes(old: Option<&Quotes>, new: Option<&Quotes>) -> Vec<QuoteChange> {
    if old.is_none() && new.is_none() {
        return Vec::new();
    }
    let empty = Quotes::new();
    let (old, new) = (old.unwrap_or(&empty), new.unwrap_or(&empty));
    let mut keys: Vec<&(String, String, String)> = old.keys().chain(new.keys()).collect();
    keys.sort();
    keys.dedup();
    let changed: Vec<QuoteChange> = keys
        .into_iter()
        .filter(|k| old.get(*k) != new.get(*k))
        .map(|(figure, stat, cell)| {
            let key = (figure.clone(), stat.clone(), cell.clone());
            QuoteChange {
                figure: figure.clone(),
                stat: stat.clone(),
                cell: cell.clone(),
                old: old.get(&key).cloned(),
                new: new.get(&key).cloned(),
            }
        })
        .collect();
    let listed: std::collections::BTreeSet<&QuoteChange> = changed.iter().collect();
    changed
        .iter()
        .filter(|c| {
            let Some((_, short)) = c.stat.split_once('.') else {
                return true;
            };
            let same = QuoteChange {
                stat: short.to_owned(),
                ..(*c).clone()
            };
            !listed.contains(&same)
        })
        .cloned()
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_long_name_is_not_listed_beside_its_short_name() {
        let q = |pairs: &[(&str, &str)]| -> Quotes {
            pairs
                .iter()
                .map(|(stat, text)| (("f".into(), (*stat).into(), "a".into()), (*text).into()))
                .collect()
        };
        let old = q(&[
            ("mean", "243"),
            ("mean.mean", "243"),
            ("n", "24"),
            ("box.median", "230"),
        ]);
        let new = q(&[
            ("mean", "245"),
            ("mean.mean", "245"),
            ("n", "24"),
            ("box.median", "231"),
        ]);
        let shown: Vec<String> = changes(Some(&old), Some(&new))
            .into_iter()
            .map(|c| c.stat)
            .collect();
        assert_eq!(shown, ["box.median", "mean"]);
        assert!(changes(None, None).is_empty());
    }
}
