//! Writers of small workbooks and Parquet files for `tests/data.rs`.
//!
//! The workbook is written by hand as the Office Open XML parts a spreadsheet program writes
//! (ECMA-376 Part 1, SpreadsheetML: a zip of `[Content_Types].xml`, the package and workbook
//! relationships, `xl/workbook.xml`, `xl/styles.xml`, `xl/sharedStrings.xml` and one
//! `xl/worksheets/sheetN.xml` per sheet), so the reader is tested on the format itself. The
//! Parquet files are written with the `parquet` crate's own low-level writer.

use std::io::{Cursor, Write};
use std::sync::Arc;

use parquet::data_type::{BoolType, ByteArray, ByteArrayType, DoubleType, Int32Type, Int64Type};
use parquet::file::properties::WriterProperties;
use parquet::file::writer::SerializedFileWriter;
use parquet::schema::parser::parse_message_type;

/// One workbook cell.
#[derive(Debug, Clone, Copy)]
pub enum XCell<'a> {
    Num(f64),
    /// Text in the shared-string table.
    Str(&'a str),
    /// Text written in the cell itself.
    Inline(&'a str),
    Bool(bool),
    /// An error value such as `#DIV/0!`.
    Error(&'a str),
    /// A date: the serial day number, shown with the date format 14 (`m/d/yyyy`).
    Date(f64),
}

/// One sheet: its name and its rows (1-based row number, cells as (0-based column, value)).
pub struct Sheet<'a> {
    pub name: &'a str,
    pub rows: Vec<(u32, Vec<(u32, XCell<'a>)>)>,
}

fn escape(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

fn column_letters(column: u32) -> String {
    figura::data::column_letters(column)
}

/// The bytes of an `.xlsx` workbook holding `sheets`.
pub fn xlsx(sheets: &[Sheet]) -> Vec<u8> {
    let mut shared: Vec<String> = Vec::new();
    let mut sheet_xml = Vec::new();
    for sheet in sheets {
        let mut xml = String::from(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>"#,
        );
        for (row, cells) in &sheet.rows {
            xml.push_str(&format!(r#"<row r="{row}">"#));
            for (column, cell) in cells {
                let at = format!("{}{row}", column_letters(*column));
                xml.push_str(&match cell {
                    XCell::Num(v) => format!(r#"<c r="{at}"><v>{v:?}</v></c>"#),
                    XCell::Str(text) => {
                        let index = match shared.iter().position(|s| s == text) {
                            Some(i) => i,
                            None => {
                                shared.push((*text).to_owned());
                                shared.len() - 1
                            }
                        };
                        format!(r#"<c r="{at}" t="s"><v>{index}</v></c>"#)
                    }
                    XCell::Inline(text) => format!(
                        r#"<c r="{at}" t="inlineStr"><is><t>{}</t></is></c>"#,
                        escape(text)
                    ),
                    XCell::Bool(b) => format!(r#"<c r="{at}" t="b"><v>{}</v></c>"#, u8::from(*b)),
                    XCell::Error(e) => format!(r#"<c r="{at}" t="e"><v>{}</v></c>"#, escape(e)),
                    XCell::Date(v) => format!(r#"<c r="{at}" s="1"><v>{v:?}</v></c>"#),
                });
            }
            xml.push_str("</row>");
        }
        xml.push_str("</sheetData></worksheet>");
        sheet_xml.push(xml);
    }
    let main = "http://schemas.openxmlformats.org/spreadsheetml/2006/main";
    let rel = "http://schemas.openxmlformats.org/officeDocument/2006/relationships";
    let mut parts: Vec<(String, String)> = Vec::new();
    let mut overrides = String::new();
    for i in 1..=sheets.len() {
        overrides.push_str(&format!(
            r#"<Override PartName="/xl/worksheets/sheet{i}.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>"#
        ));
    }
    parts.push((
        "[Content_Types].xml".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/styles.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.styles+xml"/><Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"/>{overrides}</Types>"#
        ),
    ));
    parts.push((
        "_rels/.rels".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="{rel}/officeDocument" Target="xl/workbook.xml"/></Relationships>"#
        ),
    ));
    let mut sheet_list = String::new();
    let mut sheet_rels = String::new();
    for (i, sheet) in sheets.iter().enumerate() {
        let n = i + 1;
        sheet_list.push_str(&format!(
            r#"<sheet name="{}" sheetId="{n}" r:id="rId{n}"/>"#,
            escape(sheet.name)
        ));
        sheet_rels.push_str(&format!(
            r#"<Relationship Id="rId{n}" Type="{rel}/worksheet" Target="worksheets/sheet{n}.xml"/>"#
        ));
    }
    let styles_id = sheets.len() + 1;
    let strings_id = sheets.len() + 2;
    parts.push((
        "xl/workbook.xml".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><workbook xmlns="{main}" xmlns:r="{rel}"><sheets>{sheet_list}</sheets></workbook>"#
        ),
    ));
    parts.push((
        "xl/_rels/workbook.xml.rels".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">{sheet_rels}<Relationship Id="rId{styles_id}" Type="{rel}/styles" Target="styles.xml"/><Relationship Id="rId{strings_id}" Type="{rel}/sharedStrings" Target="sharedStrings.xml"/></Relationships>"#
        ),
    ));
    parts.push((
        "xl/styles.xml".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><styleSheet xmlns="{main}"><cellXfs count="2"><xf numFmtId="0" fontId="0" fillId="0" borderId="0"/><xf numFmtId="14" fontId="0" fillId="0" borderId="0" applyNumberFormat="1"/></cellXfs></styleSheet>"#
        ),
    ));
    let strings: String = shared
        .iter()
        .map(|s| format!("<si><t>{}</t></si>", escape(s)))
        .collect();
    parts.push((
        "xl/sharedStrings.xml".into(),
        format!(
            r#"<?xml version="1.0" encoding="UTF-8" standalone="yes"?><sst xmlns="{main}" count="{0}" uniqueCount="{0}">{strings}</sst>"#,
            shared.len()
        ),
    ));
    for (i, xml) in sheet_xml.into_iter().enumerate() {
        parts.push((format!("xl/worksheets/sheet{}.xml", i + 1), xml));
    }
    let mut zip = zip::ZipWriter::new(Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated);
    for (name, text) in parts {
        zip.start_file(name, options).expect("zip entry");
        zip.write_all(text.as_bytes()).expect("zip write");
    }
    zip.finish().expect("zip closes").into_inner()
}

/// One Parquet column: its name and its values (`None` = null).
pub enum PColumn<'a> {
    Int64(&'a str, Vec<Option<i64>>),
    Int32(&'a str, &'a str, Vec<Option<i32>>),
    Double(&'a str, Vec<Option<f64>>),
    Text(&'a str, Vec<Option<&'a str>>),
    Bool(&'a str, Vec<Option<bool>>),
}

impl PColumn<'_> {
    /// The column's line of the schema; `Int32` carries its annotation, e.g. `(DATE)`.
    fn schema(&self) -> String {
        match self {
            PColumn::Int64(name, _) => format!("optional int64 {name};"),
            PColumn::Int32(name, annotation, _) => format!("optional int32 {name} {annotation};"),
            PColumn::Double(name, _) => format!("optional double {name};"),
            PColumn::Text(name, _) => format!("optional binary {name} (STRING);"),
            PColumn::Bool(name, _) => format!("optional boolean {name};"),
        }
    }

    fn len(&self) -> usize {
        match self {
            PColumn::Int64(_, v) => v.len(),
            PColumn::Int32(_, _, v) => v.len(),
            PColumn::Double(_, v) => v.len(),
            PColumn::Text(_, v) => v.len(),
            PColumn::Bool(_, v) => v.len(),
        }
    }
}

/// Definition levels and present values of rows `rows`.
fn split<T: Clone>(values: &[Option<T>], rows: std::ops::Range<usize>) -> (Vec<i16>, Vec<T>) {
    let part = &values[rows];
    let defs = part.iter().map(|v| i16::from(v.is_some())).collect();
    let present = part.iter().flatten().cloned().collect();
    (defs, present)
}

/// The bytes of a Parquet file holding `columns`, with at most `group_rows` rows per row group.
pub fn parquet(columns: &[PColumn], group_rows: usize) -> Vec<u8> {
    let fields: String = columns.iter().map(PColumn::schema).collect();
    let schema =
        Arc::new(parse_message_type(&format!("message table {{ {fields} }}")).expect("schema"));
    let properties = Arc::new(WriterProperties::builder().build());
    let mut out = Vec::new();
    let mut writer = SerializedFileWriter::new(&mut out, schema, properties).expect("writer");
    let n = columns.first().map_or(0, PColumn::len);
    let mut start = 0;
    while start < n {
        let rows = start..(start + group_rows).min(n);
        let mut group = writer.next_row_group().expect("row group");
        for column in columns {
            let mut writer = group.next_column().expect("column").expect("a column");
            match column {
                PColumn::Int64(_, v) => {
                    let (defs, values) = split(v, rows.clone());
                    writer
                        .typed::<Int64Type>()
                        .write_batch(&values, Some(&defs), None)
                }
                PColumn::Int32(_, _, v) => {
                    let (defs, values) = split(v, rows.clone());
                    writer
                        .typed::<Int32Type>()
                        .write_batch(&values, Some(&defs), None)
                }
                PColumn::Double(_, v) => {
                    let (defs, values) = split(v, rows.clone());
                    writer
                        .typed::<DoubleType>()
                        .write_batch(&values, Some(&defs), None)
                }
                PColumn::Text(_, v) => {
                    let (defs, values) = split(v, rows.clone());
                    let values: Vec<ByteArray> = values.into_iter().map(ByteArray::from).collect();
                    writer
                        .typed::<ByteArrayType>()
                        .write_batch(&values, Some(&defs), None)
                }
                PColumn::Bool(_, v) => {
                    let (defs, values) = split(v, rows.clone());
                    writer
                        .typed::<BoolType>()
                        .write_batch(&values, Some(&defs), None)
                }
            }
            .expect("values written");
            writer.close().expect("column closes");
        }
        group.close().expect("row group closes");
        start = rows.end;
    }
    writer.close().expect("file closes");
    out
}
