//! The declared study design checked against the data, once per data block.
//!
//! A data block says who the subjects are and which factors split them into groups (`between`)
//! or were measured on each of them (`within`). Both are claims about the data, checked here
//! before any figure of the block is computed:
//! - a `between` factor is constant within each subject: a subject listed at two of its levels
//!   is an error (F0121) naming the subject, the file and both rows;
//! - a `within` factor has at least one subject measured at two of its levels: when every
//!   subject was measured at one level only (and the data hold two levels or more), the factor
//!   splits subjects into groups and is really a between factor (F0122), named with two
//!   subjects at different levels and a row of each. Subjects measured at only some levels are
//!   fine: those are missing cells.
//!
//! Rows whose factor or subject is missing say nothing about the design and are passed over.
//! Without a declared subject there is nothing to check.

use std::collections::BTreeMap;

use crate::check::plan::{Codebook, VarId};
use crate::data::{Codes, Names, Table};
use crate::diag::{Code, Diagnostic};

use super::levels::codes;
use super::ComputeError;

/// Every design error of `table` under `book` (empty when the data fit the design).
pub fn check_design(book: &Codebook, table: &Table) -> Result<Vec<Diagnostic>, ComputeError> {
    let Some(subject) = book.subject else {
        return Ok(Vec::new());
    };
    let (subjects, names) = codes(table, book, subject)?;
    let design = Design {
        book,
        table,
        subjects,
        names,
    };
    let mut out = Vec::new();
    for &factor in &book.between {
        out.extend(design.between_varies(factor)?);
    }
    for &factor in &book.within {
        out.extend(design.within_never_repeated(factor)?);
    }
    Ok(out)
}

/// The subject column and what messages need.
struct Design<'a> {
    book: &'a Codebook,
    table: &'a Table,
    subjects: &'a Codes,
    names: &'a Names,
}

/// A subject's first row at a level: (level code, table row).
type FirstAt = (u32, usize);

impl Design<'_> {
    /// Each row with both a subject and a level of `factor`: (subject, level, row), in order.
    fn observed(
        &self,
        factor: VarId,
    ) -> Result<impl Iterator<Item = (u32, u32, usize)> + '_, ComputeError> {
        let (levels, _) = codes(self.table, self.book, factor)?;
        Ok(self
            .subjects
            .iter()
            .zip(levels.iter())
            .enumerate()
            .filter_map(|(row, (s, l))| Some((s?, l?, row))))
    }

    /// F0121: the first subject found at two levels of a between factor.
    fn between_varies(&self, factor: VarId) -> Result<Option<Diagnostic>, ComputeError> {
        let mut first: BTreeMap<u32, FirstAt> = BTreeMap::new();
        let mut clash: Option<(u32, FirstAt, FirstAt)> = None;
        let mut clashing: Vec<u32> = Vec::new();
        for (s, level, row) in self.observed(factor)? {
            let &mut (first_level, first_row) = first.entry(s).or_insert((level, row));
            if first_level != level && !clashing.contains(&s) {
                clashing.push(s);
                clash.get_or_insert((s, (first_level, first_row), (level, row)));
            }
        }
        let Some((s, a, b)) = clash else {
            return Ok(None);
        };
        let var = &self.book.var(factor).name;
        let more = match clashing.len() {
            1 => String::new(),
            n => format!(" ({n} subjects are listed at two levels or more)"),
        };
        let d = Diagnostic::new(
            Code::BetweenVariesWithinSubject,
            format!(
                "subject \"{}\" is listed at two levels of the between factor `{var}`: {} and {}",
                &self.names[s as usize],
                self.at(factor, a),
                self.at(factor, b)
            ),
        )
        .with_label(self.book.factor_span(factor), "each subject in one group")
        .with_help(format!(
            "correct the data{more}, or list `{var}` under `within` if each subject was measured at several of its levels"
        ));
        Ok(Some(self.with_rows(d, factor, &[(s, a), (s, b)])))
    }

    /// F0122: a within factor at which every subject has one level only (the data holding two
    /// levels or more).
    fn within_never_repeated(&self, factor: VarId) -> Result<Option<Diagnostic>, ComputeError> {
        let mut first: BTreeMap<u32, FirstAt> = BTreeMap::new();
        for (s, level, row) in self.observed(factor)? {
            match first.get(&s) {
                // Measured at two levels: the factor does vary within subjects.
                Some(&(l, _)) if l != level => return Ok(None),
                Some(_) => {}
                None => {
                    first.insert(s, (level, row));
                }
            }
        }
        // Two subjects at different levels, the first found of each, in row order.
        let mut by_row: Vec<(u32, FirstAt)> = first.into_iter().collect();
        by_row.sort_by_key(|(_, (_, row))| *row);
        let Some(&(s1, a)) = by_row.first() else {
            return Ok(None);
        };
        let Some(&(s2, b)) = by_row.iter().find(|(_, (l, _))| *l != a.0) else {
            return Ok(None);
        };
        let var = &self.book.var(factor).name;
        let d = Diagnostic::new(
            Code::WithinNeverRepeated,
            format!(
                "no subject was measured at two levels of the within factor `{var}`: subject \"{}\" only at {}, subject \"{}\" only at {}",
                &self.names[s1 as usize],
                self.at(factor, a),
                &&self.names[s2 as usize],
                self.at(factor, b)
            ),
        )
        .with_label(self.book.factor_span(factor), "measured on every subject?")
        .with_help(format!(
            "list `{var}` under `between`: each subject was measured at one of its levels"
        ));
        Ok(Some(self.with_rows(d, factor, &[(s1, a), (s2, b)])))
    }

    /// The name of a level of `factor`.
    fn level_name(&self, factor: VarId, level: u32) -> String {
        codes(self.table, self.book, factor)
            .ok()
            .and_then(|(_, levels)| levels.get(level as usize).map(str::to_owned))
            .unwrap_or_default()
    }

    /// `"paper" (reading.csv row 4)`.
    fn at(&self, factor: VarId, (level, row): FirstAt) -> String {
        let name = self.level_name(factor, level);
        let place = self
            .table
            .row_label(row)
            .unwrap_or_else(|| self.table.file_label());
        format!("\"{name}\" ({place})")
    }

    /// Names the data file the rows quoted in the message are in (the message names the
    /// rows; their text is not kept, so they carry no labels).
    fn with_rows(&self, d: Diagnostic, _factor: VarId, _rows: &[(u32, FirstAt)]) -> Diagnostic {
        d.with_file(self.table.path())
    }
}
