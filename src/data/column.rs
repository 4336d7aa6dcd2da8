//! Compact storage of one column's cells: numbers as plain `f64`s and category codes as plain
//! `u32`s, each with a bitmap of missing cells, and distinct texts in one arena.
//!
//! A missing cell costs one bit; a present one its value. A missing number is stored as `0.0`
//! and a missing code as `0` in the value arrays, so the arrays can be handed out whole
//! (`values()`, `codes()`), but only [`Numbers::get`] and [`Codes::get`] say what is missing.

use std::ops::Index;

/// One bit per cell: set when the cell is missing.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct MissingMask {
    words: Vec<u64>,
    len: usize,
    n_missing: usize,
}

impl MissingMask {
    fn with_capacity(n: usize) -> Self {
        MissingMask {
            words: Vec::with_capacity(n.div_ceil(64)),
            ..MissingMask::default()
        }
    }

    fn push(&mut self, missing: bool) {
        let bit = self.len % 64;
        if bit == 0 {
            self.words.push(0);
        }
        if missing {
            if let Some(word) = self.words.last_mut() {
                *word |= 1 << bit;
            }
            self.n_missing += 1;
        }
        self.len += 1;
    }

    /// Whether cell `i` is missing (`false` past the end).
    pub fn is_missing(&self, i: usize) -> bool {
        i < self.len && self.words[i / 64] & (1 << (i % 64)) != 0
    }

    /// Number of missing cells.
    pub fn n_missing(&self) -> usize {
        self.n_missing
    }

    fn shrink_to_fit(&mut self) {
        self.words.shrink_to_fit();
    }
}

/// One column's values with their missing cells: [`Numbers`] or [`Codes`].
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Cells<T> {
    values: Vec<T>,
    missing: MissingMask,
}

/// A numeric column; a missing cell holds `0.0` in [`Cells::values`].
pub type Numbers = Cells<f64>;

/// The codes of a categorical or id column; a missing cell holds `0` in [`Cells::values`].
pub type Codes = Cells<u32>;

impl<T: Copy + Default> Cells<T> {
    pub(super) fn push(&mut self, value: Option<T>) {
        self.values.push(value.unwrap_or_default());
        self.missing.push(value.is_none());
    }

    pub(super) fn shrink_to_fit(&mut self) {
        self.values.shrink_to_fit();
        self.missing.shrink_to_fit();
    }

    /// Builds a column from optional values (for tests and small tables).
    pub fn from_options(values: &[Option<T>]) -> Self {
        let mut cells = Cells {
            values: Vec::with_capacity(values.len()),
            missing: MissingMask::with_capacity(values.len()),
        };
        values.iter().for_each(|v| cells.push(*v));
        cells
    }

    pub fn len(&self) -> usize {
        self.values.len()
    }

    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// The value of row `i`; `None` when it is missing or past the end.
    pub fn get(&self, i: usize) -> Option<T> {
        let value = *self.values.get(i)?;
        (!self.missing.is_missing(i)).then_some(value)
    }

    /// Every row's value, `None` where missing.
    pub fn iter(&self) -> impl ExactSizeIterator<Item = Option<T>> + '_ {
        (0..self.values.len()).map(|i| self.get(i))
    }

    /// The raw values: a missing row holds the type's default (see [`Cells::mask`]).
    pub fn values(&self) -> &[T] {
        &self.values
    }

    pub fn mask(&self) -> &MissingMask {
        &self.missing
    }

    pub fn n_missing(&self) -> usize {
        self.missing.n_missing()
    }
}

/// Distinct texts (levels or ids) held in one arena, addressed by code.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Names {
    text: String,
    /// `ends[code]` is where the text of `code` ends in `text`; it starts where the previous
    /// one ends.
    ends: Vec<usize>,
}

impl Names {
    /// Appends a text; its code is the previous [`Names::len`].
    pub(super) fn push(&mut self, name: &str) {
        self.text.push_str(name);
        self.ends.push(self.text.len());
    }

    pub(super) fn shrink_to_fit(&mut self) {
        self.text.shrink_to_fit();
        self.ends.shrink_to_fit();
    }

    pub fn len(&self) -> usize {
        self.ends.len()
    }

    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The text of `code`.
    pub fn get(&self, code: usize) -> Option<&str> {
        let end = *self.ends.get(code)?;
        let start = code.checked_sub(1).map_or(0, |p| self.ends[p]);
        self.text.get(start..end)
    }

    /// Every text, in code order.
    pub fn iter(&self) -> impl ExactSizeIterator<Item = &str> + '_ {
        (0..self.len()).map(|code| &self[code])
    }

    /// The texts as owned strings, in code order.
    pub fn to_vec(&self) -> Vec<String> {
        self.iter().map(str::to_owned).collect()
    }
}

impl Index<usize> for Names {
    type Output = str;

    /// The text of `code`; panics when there is none, like a slice index.
    fn index(&self, code: usize) -> &str {
        match self.get(code) {
            Some(name) => name,
            None => panic!("no name with code {code} among {}", self.len()),
        }
    }
}

impl<'a> FromIterator<&'a str> for Names {
    fn from_iter<I: IntoIterator<Item = &'a str>>(iter: I) -> Self {
        let mut names = Names::default();
        iter.into_iter().for_each(|n| names.push(n));
        names
    }
}

impl PartialEq<[&str]> for Names {
    fn eq(&self, other: &[&str]) -> bool {
        self.len() == other.len() && self.iter().zip(other).all(|(a, b)| a == *b)
    }
}

impl<const N: usize> PartialEq<[&str; N]> for Names {
    fn eq(&self, other: &[&str; N]) -> bool {
        self == &other[..]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn missing_cells_cost_a_bit_and_read_as_none() {
        let values: Vec<Option<f64>> = (0..130).map(|i| (i % 3 != 0).then_some(i as f64)).collect();
        let numbers = Numbers::from_options(&values);
        assert_eq!(numbers.iter().collect::<Vec<_>>(), values);
        assert_eq!(numbers.n_missing(), 44);
        assert_eq!(numbers.get(130), None);
        assert_eq!(numbers.values()[3], 0.0);
        let codes = Codes::from_options(&[Some(2), None, Some(0)]);
        assert_eq!(codes.iter().collect::<Vec<_>>(), [Some(2), None, Some(0)]);
        assert_eq!(codes.values(), [2, 0, 0]);
    }

    #[test]
    fn names_share_one_arena() {
        let names: Names = ["paper", "", "screen"].into_iter().collect();
        assert_eq!(names.len(), 3);
        assert_eq!(&names[0], "paper");
        assert_eq!(&names[1], "");
        assert_eq!(names.get(2), Some("screen"));
        assert_eq!(names.get(3), None);
        assert_eq!(names, ["paper", "", "screen"]);
    }
}
