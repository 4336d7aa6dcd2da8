//! The summary table: every number a figure shows, one per row, in a fixed order.
//!
//! Header `panel,layer,group,x,stat,value`. Numbers are written as the shortest text that reads
//! back to the same double (Rust's `Display` for `f64`); an ordinal median is its level's name.
//! The statistic names are the [`Stat`] table's.

use super::layer::Stat;

/// A value in the summary.
#[derive(Debug, Clone, PartialEq)]
pub enum StatValue {
    Number(f64),
    /// A level name (ordinal medians and quartiles).
    Level(String),
}

/// One row of `NAME.summary.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct SummaryRow {
    pub panel: String,
    /// The layer's word.
    pub layer: &'static str,
    pub group: String,
    pub x: String,
    pub stat: Stat,
    pub value: StatValue,
}

/// Where a row's numbers belong: panel, layer, group and x.
#[derive(Debug, Clone)]
pub struct RowKey {
    pub panel: String,
    pub layer: &'static str,
    pub group: String,
    pub x: String,
}

impl RowKey {
    pub fn number(&self, stat: Stat, value: f64) -> SummaryRow {
        self.row(stat, StatValue::Number(value))
    }

    pub fn count(&self, stat: Stat, value: usize) -> SummaryRow {
        self.row(stat, StatValue::Number(value as f64))
    }

    pub fn level(&self, stat: Stat, level: &str) -> SummaryRow {
        self.row(stat, StatValue::Level(level.to_string()))
    }

    /// The same place at another x.
    pub fn at(&self, x: impl Into<String>) -> RowKey {
        RowKey {
            x: x.into(),
            ..self.clone()
        }
    }

    fn row(&self, stat: Stat, value: StatValue) -> SummaryRow {
        SummaryRow {
            panel: self.panel.clone(),
            layer: self.layer,
            group: self.group.clone(),
            x: self.x.clone(),
            stat,
            value,
        }
    }
}

/// Formats a number for the summary: the shortest text that reads back to the same double.
pub fn format_number(v: f64) -> String {
    if v == 0.0 {
        // Normalise -0 to 0.
        return "0".to_string();
    }
    format!("{v}")
}

/// A bin label: `[lo,hi)`, or `[lo,hi]` for the last bin.
pub fn bin_label(lo: f64, hi: f64, last: bool) -> String {
    let close = if last { ']' } else { ')' };
    format!("[{},{}{close}", format_number(lo), format_number(hi))
}

/// Renders the rows as CSV text (RFC 4180 quoting where needed).
pub fn to_csv(rows: &[SummaryRow]) -> String {
    let mut out = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    let header = ["panel", "layer", "group", "x", "stat", "value"];
    // Writing to a Vec cannot fail.
    out.write_record(header).expect("writing to memory");
    for r in rows {
        let value = match &r.value {
            StatValue::Number(v) => format_number(*v),
            StatValue::Level(l) => l.clone(),
        };
        out.write_record([
            r.panel.as_str(),
            r.layer,
            r.group.as_str(),
            r.x.as_str(),
            r.stat.as_str(),
            value.as_str(),
        ])
        .expect("writing to memory");
    }
    let bytes = out.into_inner().expect("writing to memory");
    String::from_utf8(bytes).expect("the fields are UTF-8")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_round_trip() {
        // Shortest round-trip formatting (common practice for exact text interchange).
        for v in [0.1, 1.0 / 3.0, 1e-300, 123456789.125, -2.5] {
            assert_eq!(format_number(v).parse::<f64>().unwrap(), v);
        }
        assert_eq!(format_number(-0.0), "0");
        assert_eq!(format_number(2.0), "2");
    }

    #[test]
    fn fields_with_commas_are_quoted() {
        let key = RowKey {
            panel: String::new(),
            layer: "histogram",
            group: String::new(),
            x: bin_label(0.0, 2.5, false),
        };
        let csv = to_csv(&[key.count(Stat::Count, 3)]);
        assert_eq!(
            csv,
            "panel,layer,group,x,stat,value\n,histogram,,\"[0,2.5)\",count,3\n"
        );
    }
}
