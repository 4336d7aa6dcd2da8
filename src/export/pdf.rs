//! The drawing as a one-page PDF: svg2pdf converts the drawing into a form object, and this
//! module writes the page around it, the document information and a structure tree that
//! makes the drawing a figure with alternative text (a tagged PDF).
//!
//! Determinism: svg2pdf writes its embedded fonts in hash-map order, so the numbers and the
//! order of their objects change from run to run, and the entries of its resource
//! dictionaries come in hash-map order too. Three passes make the bytes canonical:
//! 1. [`canonical_numbers`]: the drawing's objects are renumbered in the order a walk from the
//!    form object first reaches them (each object's references visited in increasing order —
//!    an order every run agrees on, see there);
//! 2. [`canonical_resource_order`]: the entries of each resource dictionary are sorted;
//! 3. [`sort_objects`]: the objects are written in the order of their numbers.

use std::collections::BTreeMap;

use pdf_writer::{Chunk, Content, Finish, Name, Pdf, Rect, Ref, TextStr};
use usvg::Tree;

use super::About;
use crate::scene::{mm_to_pt, TextForm};

/// The objects this module writes itself; the drawing's objects are numbered after them.
struct Ids {
    catalog: Ref,
    pages: Ref,
    page: Ref,
    content: Ref,
    struct_root: Ref,
    document: Ref,
    figure: Ref,
    info: Ref,
    /// The first number free for the drawing.
    next: Ref,
}

impl Ids {
    fn new() -> Self {
        let mut alloc = Ref::new(1);
        Ids {
            catalog: alloc.bump(),
            pages: alloc.bump(),
            page: alloc.bump(),
            content: alloc.bump(),
            struct_root: alloc.bump(),
            document: alloc.bump(),
            figure: alloc.bump(),
            info: alloc.bump(),
            next: alloc,
        }
    }
}

/// Name of the drawing in the page's resources.
const DRAWING: Name = Name(b"Fig");

/// The whole PDF file of `tree` (in millimetre user units).
pub(super) fn write(tree: &Tree, text: TextForm, about: &About) -> Result<Vec<u8>, String> {
    let options = svg2pdf::ConversionOptions {
        embed_text: text == TextForm::Editable,
        ..svg2pdf::ConversionOptions::default()
    };
    let (drawing, drawing_ref) = svg2pdf::to_chunk(tree, options).map_err(|e| e.to_string())?;
    let ids = Ids::new();
    let (drawing, drawing_ref) = canonical_numbers(&drawing, drawing_ref, ids.next)?;

    let size = tree.size();
    let (width_pt, height_pt) = (
        mm_to_pt(f64::from(size.width())) as f32,
        mm_to_pt(f64::from(size.height())) as f32,
    );
    let mut pdf = Pdf::new();
    write_catalog(&mut pdf, &ids, about);
    write_page(&mut pdf, &ids, drawing_ref, width_pt, height_pt);
    write_structure(&mut pdf, &ids, about);
    write_info(&mut pdf, &ids, about);
    pdf.extend(&drawing);
    sort_objects(&canonical_resource_order(pdf.finish()))
}

fn write_catalog(pdf: &mut Pdf, ids: &Ids, about: &About) {
    let mut catalog = pdf.catalog(ids.catalog);
    catalog.pages(ids.pages);
    // No `/Lang`: the labels are the user's, in a language Figura does not know.
    catalog.mark_info().marked(true);
    catalog.pair(Name(b"StructTreeRoot"), ids.struct_root);
    if about.title.is_some() {
        catalog.viewer_preferences().display_doc_title(true);
    }
}

fn write_page(pdf: &mut Pdf, ids: &Ids, drawing: Ref, width_pt: f32, height_pt: f32) {
    pdf.pages(ids.pages).kids([ids.page]).count(1);
    let mut page = pdf.page(ids.page);
    page.media_box(Rect::new(0.0, 0.0, width_pt, height_pt));
    page.parent(ids.pages);
    page.contents(ids.content);
    page.struct_parents(0);
    page.group()
        .transparency()
        .isolated(true)
        .knockout(false)
        .color_space()
        .device_rgb();
    page.resources().x_objects().pair(DRAWING, drawing);
    page.finish();

    // The drawing is a unit square (svg2pdf's form matrix): scale it to the page, inside the
    // figure's marked content.
    let mut content = Content::new();
    content
        .begin_marked_content_with_properties(Name(b"Figure"))
        .properties()
        .identify(0);
    content.save_state();
    content.transform([width_pt, 0.0, 0.0, height_pt, 0.0, 0.0]);
    content.x_object(DRAWING);
    content.restore_state();
    content.end_marked_content();
    pdf.stream(ids.content, &content.finish());
}

/// Structure tree: a document element holding one figure element, whose content is the
/// page's marked content 0 and whose alternative text is the description (else the title).
fn write_structure(pdf: &mut Pdf, ids: &Ids, about: &About) {
    let mut root = pdf
        .indirect(ids.struct_root)
        .start::<pdf_writer::writers::StructTreeRoot>();
    root.child(ids.document);
    {
        let mut nums = root.insert(Name(b"ParentTree")).dict();
        let mut entries = nums.insert(Name(b"Nums")).array();
        entries.item(0);
        entries.push().array().item(ids.figure);
    }
    root.parent_tree_next_key(1);
    root.finish();

    let mut document = pdf.struct_element(ids.document);
    document.kind(pdf_writer::types::StructRole::Document);
    document.parent(ids.struct_root);
    document.child(ids.figure);
    document.finish();

    let mut figure = pdf.struct_element(ids.figure);
    figure.kind(pdf_writer::types::StructRole::Figure);
    figure.parent(ids.document);
    figure.page(ids.page);
    figure.pair(Name(b"K"), 0);
    if let Some(alt) = about.description.or(about.title) {
        figure.alt(TextStr(alt));
    }
    figure.finish();
}

fn write_info(pdf: &mut Pdf, ids: &Ids, about: &About) {
    let mut info = pdf.document_info(ids.info);
    if let Some(title) = about.title {
        info.title(TextStr(title));
    }
    if let Some(description) = about.description {
        info.subject(TextStr(description));
    }
    if let Some(p) = about.provenance {
        info.creator(TextStr(&p.tool));
        info.producer(TextStr(&p.tool));
        info.pair(Name(b"Provenance"), TextStr(&p.sentence()));
    }
    info.finish();
}

/// Renumbers the drawing's objects from `first`, in the order a walk from `root` reaches them;
/// returns the renumbered chunk and the new number of `root`. A reference to an object the
/// chunk does not hold gets a number too (pdf-writer then lists it as free).
///
/// Each object's references are visited in increasing order of their old numbers. That order
/// is the same in every run: svg2pdf numbers every object in the order it meets them in the
/// drawing, except the four it adds per embedded font while writing the fonts in hash-map
/// order; those four are numbered one after the other, are referenced only from objects of
/// the same font, and come after every other number. So the relative order of the references
/// within any one object never changes.
fn canonical_numbers(chunk: &Chunk, root: Ref, first: Ref) -> Result<(Chunk, Ref), String> {
    let graph = references(chunk)?;
    let mut new_ids: BTreeMap<Ref, Ref> = BTreeMap::new();
    let mut next = first;
    let mut queue = std::collections::VecDeque::from([root]);
    while let Some(old) = queue.pop_front() {
        if new_ids.contains_key(&old) {
            continue;
        }
        new_ids.insert(old, next.bump());
        if let Some(refs) = graph.get(&old) {
            queue.extend(refs.iter().copied());
        }
    }
    // Objects nothing refers to (svg2pdf writes none) follow, in the order of their numbers.
    for &old in graph.keys() {
        new_ids.entry(old).or_insert_with(|| next.bump());
    }
    let renumbered = chunk.renumber(|old| new_ids.get(&old).copied().unwrap_or(old));
    Ok((renumbered, new_ids[&root]))
}

/// Each object of the chunk and the objects it refers to (sorted, without repeats).
///
/// pdf-writer's renumbering reports, object by object, first the object's own number and then
/// every reference in it. Giving each report a new number of its own makes the object
/// boundaries visible: the renumbered chunk's objects are numbered by the report that started
/// them.
fn references(chunk: &Chunk) -> Result<BTreeMap<Ref, Vec<Ref>>, String> {
    let mut reports: Vec<Ref> = Vec::new();
    let probe = chunk.renumber(|old| {
        reports.push(old);
        Ref::new(i32::try_from(reports.len()).unwrap_or(i32::MAX))
    });
    let starts: Vec<usize> = probe.refs().map(|r| r.get() as usize - 1).collect();
    if starts.len() != chunk.refs().len() {
        return Err("the drawing's objects could not be read back".to_string());
    }
    let mut graph = BTreeMap::new();
    for (i, &start) in starts.iter().enumerate() {
        let end = starts.get(i + 1).copied().unwrap_or(reports.len());
        let mut refs = reports[start + 1..end].to_vec();
        refs.sort_unstable();
        refs.dedup();
        graph.insert(reports[start], refs);
    }
    Ok(graph)
}

/// Resource dictionaries whose entries the PDF writer emits in hash order.
const RESOURCE_DICTS: [&[u8]; 6] = [
    b"/ExtGState <<\n",
    b"/XObject <<\n",
    b"/Pattern <<\n",
    b"/Shading <<\n",
    b"/Font <<\n",
    b"/ColorSpace <<\n",
];

/// Sorts the entries of every resource dictionary, so identical figures give identical bytes.
///
/// The PDF writer emits these entries (one `/name reference` per line) in an order that
/// changes from run to run. Sorting the lines of each dictionary moves no byte outside it and
/// keeps its length, so every offset in the cross-reference table stays right. Stream contents
/// are skipped; a dictionary whose lines are not all single entries is left as it is.
fn canonical_resource_order(mut pdf: Vec<u8>) -> Vec<u8> {
    let mut at = 0;
    while at < pdf.len() {
        if pdf[at..].starts_with(b"\nstream\n") {
            at = find(&pdf, b"\nendstream", at + 8).unwrap_or(pdf.len());
            continue;
        }
        let Some(head) = RESOURCE_DICTS.iter().find(|h| pdf[at..].starts_with(h)) else {
            at += 1;
            continue;
        };
        let start = at + head.len();
        let Some(end) = find(&pdf, b">>", start) else {
            break;
        };
        // The block holds whole lines: from `start` to the line that closes the dictionary.
        let block_end = pdf[start..end]
            .iter()
            .rposition(|&b| b == b'\n')
            .map_or(start, |i| start + i + 1);
        let block = &pdf[start..block_end];
        let mut lines: Vec<&[u8]> = block.split_inclusive(|&b| b == b'\n').collect();
        let single_entries = lines.iter().all(|l| {
            let t = l.trim_ascii_start();
            t.starts_with(b"/") && !t.contains(&b'<')
        });
        if single_entries {
            lines.sort_unstable();
            let sorted: Vec<u8> = lines.concat();
            pdf[start..block_end].copy_from_slice(&sorted);
        }
        at = end;
    }
    pdf
}

/// The first position of `needle` in `hay` at or after `from`.
fn find(hay: &[u8], needle: &[u8], from: usize) -> Option<usize> {
    hay.get(from..)?
        .windows(needle.len())
        .position(|w| w == needle)
        .map(|i| from + i)
}

/// The file with its objects in the order of their numbers, and a cross-reference table to
/// match.
///
/// The objects are found through the file's own cross-reference table (as pdf-writer writes
/// it: one section from 0, twenty bytes an entry); each object runs to the start of the next
/// one in the file, the last to the table. Their bytes are moved, never changed; the trailer
/// is kept as it is.
fn sort_objects(pdf: &[u8]) -> Result<Vec<u8>, String> {
    let broken = |what: &str| format!("the PDF's cross-reference table {what}");
    let marker = b"startxref\n";
    let tail = find_last(pdf, marker).ok_or_else(|| broken("is not found"))?;
    let xref_at: usize = std::str::from_utf8(&pdf[tail + marker.len()..])
        .ok()
        .and_then(|s| s.lines().next())
        .and_then(|s| s.parse().ok())
        .ok_or_else(|| broken("has no offset"))?;
    let table = pdf
        .get(xref_at..tail)
        .ok_or_else(|| broken("is misplaced"))?;
    let text = std::str::from_utf8(table).map_err(|_| broken("is not text"))?;
    let mut lines = text.split('\n');
    let (Some("xref"), Some(header)) = (lines.next(), lines.next()) else {
        return Err(broken("has no header"));
    };
    let count: usize = header
        .strip_prefix("0 ")
        .and_then(|n| n.parse().ok())
        .ok_or_else(|| broken("has a bad header"))?;
    let entries_at = "xref\n".len() + header.len() + 1;
    let entries = table
        .get(entries_at..entries_at + 20 * count)
        .ok_or_else(|| broken("is cut short"))?;
    let trailer = &table[entries_at + 20 * count..];
    // (offset, number) of every object in use.
    let mut objects: Vec<(usize, usize)> = Vec::with_capacity(count);
    for (number, entry) in entries.chunks(20).enumerate() {
        if entry.get(17) == Some(&b'n') {
            let offset = std::str::from_utf8(&entry[..10])
                .ok()
                .and_then(|s| s.parse().ok())
                .ok_or_else(|| broken("has a bad entry"))?;
            objects.push((offset, number));
        }
    }
    objects.sort_unstable();
    let body_start = objects.first().map_or(xref_at, |&(offset, _)| offset);
    let mut spans: Vec<(usize, usize, usize)> = objects
        .iter()
        .enumerate()
        .map(|(i, &(offset, number))| {
            let end = objects.get(i + 1).map_or(xref_at, |&(next, _)| next);
            (number, offset, end)
        })
        .collect();
    if spans
        .iter()
        .any(|&(_, start, end)| start > end || end > xref_at)
    {
        return Err(broken("points outside the file"));
    }
    spans.sort_unstable();

    let mut out = Vec::with_capacity(pdf.len());
    out.extend_from_slice(&pdf[..body_start]);
    let mut offsets = vec![None; count];
    for &(number, start, end) in &spans {
        offsets[number] = Some(out.len());
        out.extend_from_slice(&pdf[start..end]);
    }
    let new_xref = out.len();
    out.extend_from_slice(b"xref\n");
    out.extend_from_slice(header.as_bytes());
    out.push(b'\n');
    for (number, entry) in entries.chunks(20).enumerate() {
        match offsets[number] {
            Some(offset) => out.extend_from_slice(format!("{offset:010} 00000 n\r\n").as_bytes()),
            None => out.extend_from_slice(entry),
        }
    }
    out.extend_from_slice(trailer);
    out.extend_from_slice(marker);
    out.extend_from_slice(format!("{new_xref}\n%%EOF").as_bytes());
    Ok(out)
}

/// The last position of `needle` in `hay`.
fn find_last(hay: &[u8], needle: &[u8]) -> Option<usize> {
    hay.windows(needle.len()).rposition(|w| w == needle)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resource_entries_are_sorted_in_place() {
        let pdf = b"3 0 obj\n<<\n  /ExtGState <<\n    /gs2 8 0 R\n    /gs10 16 0 R\n  >>\n>>\nstream\n/ExtGState <<\n /b\n /a\n>>\nendstream\n".to_vec();
        let out = canonical_resource_order(pdf.clone());
        assert_eq!(out.len(), pdf.len());
        let text = String::from_utf8(out).unwrap();
        assert!(
            text.contains("    /gs10 16 0 R\n    /gs2 8 0 R\n  >>"),
            "{text}"
        );
        // Stream contents are never touched.
        assert!(
            text.contains("stream\n/ExtGState <<\n /b\n /a\n>>"),
            "{text}"
        );
    }

    /// A small PDF whose objects are written out of order.
    fn shuffled_pdf() -> Vec<u8> {
        let mut pdf = Pdf::new();
        pdf.indirect(Ref::new(3)).primitive(Name(b"Three"));
        pdf.catalog(Ref::new(1)).pages(Ref::new(2));
        pdf.indirect(Ref::new(2)).primitive(Ref::new(3));
        pdf.finish()
    }

    #[test]
    fn objects_are_put_in_the_order_of_their_numbers() {
        let sorted = sort_objects(&shuffled_pdf()).unwrap();
        let at = |needle: &str| find(&sorted, needle.as_bytes(), 0).unwrap();
        let (one, two, three) = (at("1 0 obj"), at("2 0 obj"), at("3 0 obj"));
        assert!(one < two && two < three);
        // The table points at each object.
        for offset in [one, two, three] {
            at(&format!("{offset:010} 00000 n\r\n"));
        }
        let xref = at("xref\n");
        assert!(sorted.ends_with(format!("startxref\n{xref}\n%%EOF").as_bytes()));
        // Sorting a sorted file changes nothing.
        assert_eq!(sort_objects(&sorted).unwrap(), sorted);
    }

    #[test]
    fn objects_are_numbered_by_a_walk_from_the_root() {
        // Root 10 refers to 12 and 11; 11 refers to 13; written out of order.
        let mut chunk = Chunk::new();
        chunk.indirect(Ref::new(12)).primitive(Name(b"Twelve"));
        chunk
            .indirect(Ref::new(10))
            .array()
            .items([Ref::new(12), Ref::new(11)]);
        chunk.indirect(Ref::new(13)).primitive(Name(b"Thirteen"));
        chunk.indirect(Ref::new(11)).array().item(Ref::new(13));
        let (renumbered, root) = canonical_numbers(&chunk, Ref::new(10), Ref::new(1)).unwrap();
        assert_eq!(root, Ref::new(1));
        // 11 before 12 (smaller old number), then 13 reached through 11.
        let text = String::from_utf8(renumbered.as_bytes().to_vec()).unwrap();
        assert!(text.contains("1 0 obj\n[3 0 R 2 0 R]"), "{text}");
        assert!(text.contains("2 0 obj\n[4 0 R]"), "{text}");
        assert!(text.contains("3 0 obj\n/Twelve"), "{text}");
        assert!(text.contains("4 0 obj\n/Thirteen"), "{text}");
        let numbers: Vec<i32> = renumbered.refs().map(|r| r.get()).collect();
        assert_eq!(
            numbers,
            [3, 1, 4, 2],
            "the objects keep their places until sorted"
        );
    }

    #[test]
    fn a_file_without_a_table_is_refused() {
        assert!(sort_objects(b"%PDF-1.7\n1 0 obj\nnull\nendobj\n").is_err());
    }
}
