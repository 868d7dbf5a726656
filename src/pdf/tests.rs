//! The reader on small PDFs written here byte by byte (classic table, cross-reference stream,
//! object stream, appended update), and on damaged and hostile variants.

use super::parts::{compare, document_parts, Change, How};
use super::*;

/// Writes a PDF from object bodies (object `i + 1` is `bodies[i]`) with a classic table.
pub(crate) fn write_pdf(bodies: &[Vec<u8>], trailer: &str) -> Vec<u8> {
    let mut out = b"%PDF-1.7\n%\x80\x80\x80\x80\n".to_vec();
    let mut offsets = Vec::new();
    for (i, b) in bodies.iter().enumerate() {
        offsets.push(out.len());
        out.extend_from_slice(format!("{} 0 obj\n", i + 1).as_bytes());
        out.extend_from_slice(b);
        out.extend_from_slice(b"\nendobj\n");
    }
    let xref = out.len();
    out.extend_from_slice(
        format!("xref\n0 {}\n0000000000 65535 f\r\n", bodies.len() + 1).as_bytes(),
    );
    for o in offsets {
        out.extend_from_slice(format!("{o:010} 00000 n\r\n").as_bytes());
    }
    out.extend_from_slice(
        format!(
            "trailer\n<</Size {}{trailer}>>\nstartxref\n{xref}\n%%EOF",
            bodies.len() + 1
        )
        .as_bytes(),
    );
    out
}

fn stream(dict: &str, data: &[u8]) -> Vec<u8> {
    let mut v = format!("<<{dict}/Length {}>>\nstream\n", data.len()).into_bytes();
    v.extend_from_slice(data);
    v.extend_from_slice(b"\nendstream");
    v
}

/// `b` with the first `from` replaced by `to`.
pub(crate) fn replace_bytes(b: &[u8], from: &[u8], to: &[u8]) -> Vec<u8> {
    let at = b
        .windows(from.len())
        .position(|w| w == from)
        .unwrap_or_else(|| panic!("{} not found", String::from_utf8_lossy(from)));
    let mut v = b.to_vec();
    v.splice(at..at + from.len(), to.iter().copied());
    v
}

fn zlib(data: &[u8]) -> Vec<u8> {
    miniz_oxide::deflate::compress_to_vec_zlib(data, 6)
}

/// A two-page document with an embedded file `data.csv`, a seal-like file `seal.json`, an Info
/// dictionary and XMP metadata.
pub(crate) fn sample() -> Vec<u8> {
    sample_with_seal("seal.json")
}

/// [`sample`] with the seal-like file named `seal`.
pub(crate) fn sample_with_seal(seal: &str) -> Vec<u8> {
    let content1 = zlib(b"BT /F1 12 Tf 72 700 Td (Total 93249 dscfm) Tj ET");
    let bodies = vec![
        // 1 catalog
        format!("<</Type/Catalog/Pages 2 0 R/Metadata 9 0 R/Names<</EmbeddedFiles<</Names[(data.csv)10 0 R({seal})12 0 R]>>>>>>").into_bytes(),
        // 2 page tree
        b"<</Type/Pages/Kids[3 0 R 4 0 R]/Count 2/MediaBox[0 0 612 792]/Resources<</Font<</F1 7 0 R>>>>>>".to_vec(),
        // 3, 4 pages
        b"<</Type/Page/Parent 2 0 R/Contents 5 0 R>>".to_vec(),
        b"<</Type/Page/Parent 2 0 R/Contents 6 0 R>>".to_vec(),
        // 5, 6 contents
        stream("/Filter/FlateDecode", &content1),
        stream("", b"BT /F1 12 Tf 72 700 Td (Page two) Tj ET"),
        // 7 font
        b"<</Type/Font/Subtype/Type1/BaseFont/Helvetica>>".to_vec(),
        // 8 info
        b"<</Title(Flow test)/Author(Dana Ferrow)>>".to_vec(),
        // 9 XMP
        stream("/Type/Metadata/Subtype/XML", b"<x:xmpmeta>Dana Ferrow</x:xmpmeta>"),
        // 10 file spec, 11 its data
        b"<</Type/Filespec/F(data.csv)/UF(data.csv)/EF<</F 11 0 R>>>>".to_vec(),
        stream("/Type/EmbeddedFile/Filter/FlateDecode", &zlib(b"line,point\nA,1\n")),
        // 12 seal spec, 13 its data
        format!("<</Type/Filespec/F({seal})/UF({seal})/EF<</F 13 0 R>>>>").into_bytes(),
        stream("/Type/EmbeddedFile/Filter/FlateDecode", &zlib(b"{}")),
    ];
    write_pdf(&bodies, "/Root 1 0 R/Info 8 0 R")
}

fn parse(b: &[u8]) -> Pdf<'_> {
    Pdf::parse(b, Limits::default()).unwrap()
}

#[test]
fn reads_objects_streams_and_files() {
    let b = sample();
    let pdf = parse(&b);
    assert!(pdf.revisions().single());
    let (_, cat) = pdf.catalog().unwrap();
    assert_eq!(cat.type_name(), Some(b"Catalog".as_slice()));
    let Indirect::Stream(s) = pdf.get(Ref { num: 5, gen: 0 }).unwrap().as_ref().clone() else {
        panic!()
    };
    assert_eq!(
        pdf.decode(&s).unwrap(),
        b"BT /F1 12 Tf 72 700 Td (Total 93249 dscfm) Tj ET"
    );
    let files = parts::embedded_file_specs(&pdf).unwrap();
    let names: Vec<&str> = files.iter().map(|(n, _)| n.as_str()).collect();
    assert_eq!(names, ["data.csv", "seal.json"]);
    // a missing object is null (ISO 32000-1 §7.3.10)
    assert_eq!(
        *pdf.get(Ref { num: 99, gen: 0 }).unwrap(),
        Indirect::Object(Object::Null)
    );
}

#[test]
fn parts_ignore_the_excluded_file_and_name_each_edit() {
    let b = sample();
    let base = document_parts(&parse(&b), "seal.json").unwrap();
    assert_eq!(base.pages.len(), 2);
    assert_eq!(
        base.information.keys().collect::<Vec<_>>(),
        ["Author", "Title"]
    );
    assert!(base.xmp.is_some());
    assert_eq!(base.attachments.len(), 2);

    let edit = |from: &[u8], to: &[u8]| replace_bytes(&b, from, to);
    // same-length edits in place keep every offset valid
    let author = edit(b"(Dana Ferrow)>>", b"(Erin Ferrow)>>");
    let p = document_parts(&parse(&author), "seal.json").unwrap();
    let shown: Vec<String> = compare(&base, &p).iter().map(|c| c.to_string()).collect();
    assert_eq!(shown, ["document information: Author"]);

    let page2 = edit(b"(Page two)", b"(Page 2!!)");
    let p = document_parts(&parse(&page2), "seal.json").unwrap();
    assert_eq!(
        compare(&base, &p),
        [Change::PageContent {
            page: 2,
            how: How::Changed
        }]
    );

    let xmp = edit(b"<x:xmpmeta>Dana", b"<x:xmpmeta>Erin");
    let p = document_parts(&parse(&xmp), "seal.json").unwrap();
    assert_eq!(compare(&base, &p), [Change::Xmp { how: How::Changed }]);

    // a change to the inherited font changes both pages, and the page tree that holds it
    let font = edit(b"/Helvetica>>", b"/Courier>>  ");
    let p = document_parts(&parse(&font), "seal.json").unwrap();
    let shown: Vec<String> = compare(&base, &p).iter().map(|c| c.to_string()).collect();
    assert_eq!(
        shown,
        [
            "page 1 content",
            "page 2 content",
            "the page tree (page order) (/Pages)"
        ]
    );
}

#[test]
fn a_spliced_stream_keeps_every_other_part_and_one_revision() {
    let b = sample();
    let pdf = parse(&b);
    let before = document_parts(&pdf, "seal.json").unwrap();
    let mut dict = Dict::default();
    dict.0
        .push((b"Type".to_vec(), Object::Name(b"EmbeddedFile".to_vec())));
    let payload = b"{\"seal\":\"a longer payload than the placeholder\"}";
    let out = splice::replace_stream(&pdf, 13, &dict, payload).unwrap();
    let after_pdf = parse(&out);
    assert!(after_pdf.revisions().single());
    assert_eq!(document_parts(&after_pdf, "seal.json").unwrap(), before);
    let Indirect::Stream(s) = after_pdf
        .get(Ref { num: 13, gen: 0 })
        .unwrap()
        .as_ref()
        .clone()
    else {
        panic!()
    };
    assert_eq!(after_pdf.decode(&s).unwrap(), payload);
    // every object is still where the new table says
    for n in after_pdf.object_numbers() {
        after_pdf.get(Ref { num: n, gen: 0 }).unwrap();
    }
    // the same inputs give the same bytes
    assert_eq!(
        out,
        splice::replace_stream(&pdf, 13, &dict, payload).unwrap()
    );
}

/// `b` with an incremental update that replaces object `num` by `body`.
pub(crate) fn append_update(b: &[u8], num: u32, body: &[u8]) -> Vec<u8> {
    let pdf = parse(b);
    let prev = pdf.xref_offset();
    let size = pdf.trailer().get(b"Size").and_then(Object::as_int).unwrap();
    let mut out = b.to_vec();
    out.push(b'\n');
    let at = out.len();
    out.extend_from_slice(format!("{num} 0 obj\n").as_bytes());
    out.extend_from_slice(body);
    out.extend_from_slice(b"\nendobj\n");
    let xref = out.len();
    out.extend_from_slice(
        format!(
            "xref\n{num} 1\n{at:010} 00000 n\r\ntrailer\n<</Size {size}/Root 1 0 R/Info 8 0 R/Prev {prev}>>\nstartxref\n{xref}\n%%EOF\n"
        )
        .as_bytes(),
    );
    out
}

#[test]
fn an_appended_update_is_seen_and_read_as_a_viewer_would() {
    let b = sample();
    let base = document_parts(&parse(&b), "seal.json").unwrap();
    let updated = append_update(&b, 6, &stream("", b"BT (Page two, edited) Tj ET"));
    let pdf = parse(&updated);
    let r = pdf.revisions();
    assert!(!r.single());
    assert_eq!(r.sections, 2);
    // the end-of-line marker after the first %%EOF belongs to the first revision
    assert_eq!(r.appended(), updated.len() - b.len() - 1);
    let p = document_parts(&pdf, "seal.json").unwrap();
    assert_eq!(
        compare(&base, &p),
        [Change::PageContent {
            page: 2,
            how: How::Changed
        }]
    );
    // bytes after the end of file also count
    let mut junk = b.clone();
    junk.extend_from_slice(b"\nappended text");
    // white space after %%EOF does not count, anything else does
    assert_eq!(parse(&junk).revisions().trailing, "appendedtext".len());
    assert!(!parse(&junk).revisions().single());
}

#[test]
fn cross_reference_and_object_streams_are_read() {
    // objects 1 (catalog) and 2 (pages) and 3 (page) packed in object stream 4; xref stream 5
    let members = b"<</Type/Catalog/Pages 2 0 R>> <</Type/Pages/Kids[3 0 R]/Count 1>> <</Type/Page/Parent 2 0 R/MediaBox[0 0 10 10]>>";
    let header = b"1 0 2 30 3 66 ";
    let mut objstm = header.to_vec();
    objstm.extend_from_slice(members);
    let mut out = b"%PDF-1.7\n".to_vec();
    let o4 = out.len();
    out.extend_from_slice(b"4 0 obj\n");
    out.extend_from_slice(&stream(
        &format!("/Type/ObjStm/N 3/First {}", header.len()),
        &objstm,
    ));
    out.extend_from_slice(b"\nendobj\n");
    let o5 = out.len();
    // rows: type(1) field2(2) field3(1); predictor 12 rows of 4 bytes
    let rows: Vec<[u8; 4]> = vec![
        [0, 0, 0, 0],
        [2, 0, 4, 0],
        [2, 0, 4, 1],
        [2, 0, 4, 2],
        [1, (o4 >> 8) as u8, o4 as u8, 0],
        [1, (o5 >> 8) as u8, o5 as u8, 0],
    ];
    let mut raw = Vec::new();
    let mut prev = [0u8; 4];
    for r in &rows {
        raw.push(2); // PNG Up
        for i in 0..4 {
            raw.push(r[i].wrapping_sub(prev[i]));
        }
        prev = *r;
    }
    let data = zlib(&raw);
    out.extend_from_slice(b"5 0 obj\n");
    out.extend_from_slice(&stream(
        "/Type/XRef/Size 6/W[1 2 1]/Root 1 0 R/Filter/FlateDecode/DecodeParms<</Predictor 12/Columns 4>>",
        &data,
    ));
    out.extend_from_slice(format!("\nendobj\nstartxref\n{o5}\n%%EOF\n").as_bytes());
    let pdf = parse(&out);
    let (_, cat) = pdf.catalog().unwrap();
    assert_eq!(
        cat.get(b"Pages"),
        Some(&Object::Ref(Ref { num: 2, gen: 0 }))
    );
    let p = document_parts(&pdf, "none").unwrap();
    assert_eq!(p.pages.len(), 1);
}

#[test]
fn damaged_and_hostile_files_end_in_errors() {
    let b = sample();
    // truncated anywhere: damaged, never a panic
    for cut in [20, b.len() / 3, b.len() / 2, b.len() - 40, b.len() - 3] {
        let e = Pdf::parse(&b[..cut], Limits::default())
            .and_then(|p| document_parts(&p, "seal.json").map(|_| ()));
        assert!(matches!(e, Err(PdfError::Damaged(_))), "cut {cut}: {e:?}");
    }
    assert_eq!(
        Pdf::parse(b"line,point\n", Limits::default()).err(),
        Some(PdfError::NotPdf)
    );
    // a stream that inflates beyond the cap
    let bomb = zlib(&vec![0u8; 1 << 20]);
    let bodies = vec![
        b"<</Type/Catalog/Pages 2 0 R>>".to_vec(),
        b"<</Type/Pages/Kids[]/Count 0>>".to_vec(),
        stream("/Filter/FlateDecode", &bomb),
    ];
    let f = write_pdf(&bodies, "/Root 1 0 R");
    let limits = Limits {
        max_stream: 64 << 10,
        ..Limits::default()
    };
    let pdf = Pdf::parse(&f, limits).unwrap();
    let Indirect::Stream(s) = pdf.get(Ref { num: 3, gen: 0 }).unwrap().as_ref().clone() else {
        panic!()
    };
    assert_eq!(
        pdf.decode(&s).unwrap_err().to_string(),
        "a stream inflates beyond the cap of 64 KiB"
    );
    // a page tree that loops, and a /Prev that loops
    let bodies = vec![
        b"<</Type/Catalog/Pages 2 0 R>>".to_vec(),
        b"<</Type/Pages/Kids[2 0 R]/Count 1>>".to_vec(),
    ];
    let f = write_pdf(&bodies, "/Root 1 0 R");
    let e = document_parts(&parse(&f), "x").unwrap_err();
    assert!(e.to_string().contains("loop"), "{e}");
    let xref = parse(&f).xref_offset();
    let looped = replace_bytes(
        &f,
        b"/Root 1 0 R>>",
        format!("/Root 1 0 R/Prev {xref}>>").as_bytes(),
    );
    let e = Pdf::parse(&looped, Limits::default()).err().unwrap();
    assert!(e.to_string().contains("loop"), "{e}");
    // many pages sharing one large resource tree: bounded by the visit cap, not pages × objects
    let mut bodies = vec![
        b"<</Type/Catalog/Pages 2 0 R>>".to_vec(),
        Vec::new(), // the page tree, below
        b"<</Shared[4 0 R 5 0 R 6 0 R 7 0 R 8 0 R 9 0 R]>>".to_vec(),
    ];
    for _ in 0..6 {
        bodies.push(b"<</X 1>>".to_vec());
    }
    let first_page = bodies.len() + 1;
    let pages = 200;
    for _ in 0..pages {
        bodies.push(b"<</Type/Page/Parent 2 0 R/Resources 3 0 R>>".to_vec());
    }
    let kids: Vec<String> = (0..pages)
        .map(|i| format!("{} 0 R", first_page + i))
        .collect();
    bodies[1] = format!("<</Type/Pages/Count {pages}/Kids[{}]>>", kids.join(" ")).into_bytes();
    let f = write_pdf(&bodies, "/Root 1 0 R");
    assert_eq!(document_parts(&parse(&f), "x").unwrap().pages.len(), pages);
    let tight = Limits {
        max_visits: 500,
        ..Limits::default()
    };
    let e = document_parts(&Pdf::parse(&f, tight).unwrap(), "x").unwrap_err();
    assert!(e.to_string().contains("built to be slow"), "{e}");
    // a /Length that lies
    let lying = replace_bytes(&sample(), b"/Length 39>>", b"/Length 45>>");
    assert!(matches!(
        Pdf::parse(&lying, Limits::default()).and_then(|p| document_parts(&p, "").map(|_| ())),
        Err(PdfError::Damaged(_))
    ));
}
