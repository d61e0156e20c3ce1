//! Unit tests of `data/source.rs`.

use super::*;

#[test]
fn delimiter_detection() {
    assert_eq!(detect_delimiter("id,glabella,mastoid"), ',');
    assert_eq!(detect_delimiter("id;glabella;mastoid"), ';');
    assert_eq!(detect_delimiter("id\tglabella\tmastoid"), '\t');
    assert_eq!(detect_delimiter("\"a;b\",c,d"), ',');
    assert_eq!(detect_delimiter("id"), ',');
}

#[test]
fn bom_crlf_and_blank_rows() {
    let t = read_text("t.csv", b"\xEF\xBB\xBFid,glabella\r\nA1,3\r\n,\r\nA2,4\r\n").unwrap();
    assert_eq!(t.header, vec!["id", "glabella"]);
    assert_eq!(t.rows.len(), 2);
    assert_eq!(t.rows.get(1).row, 4);
    assert_eq!(t.rows.get(1).cells().collect::<Vec<_>>(), vec!["A2", "4"]);
    assert_eq!(t.rows.get(0).cell(1), "3");
    assert!(!t.decimal_comma);
}

#[test]
fn semicolons_allow_decimal_commas() {
    let t = read_text("t.csv", b"id;femur_head_diameter\nA1;45,5\n").unwrap();
    assert_eq!(t.delimiter, Some(';'));
    assert!(t.decimal_comma);
}

#[test]
fn not_utf8_names_the_offset() {
    let p = read_text("t.csv", b"id,glabella\nA\xE91,3\n").unwrap_err();
    assert_eq!(p[0].kind, ProblemKind::NotUtf8);
    assert_eq!(p[0].row, Some(2));
    assert!(p[0].expected.contains("offset 13"), "{}", p[0].expected);
    let p = read_text("t.csv", b"\xFF\xFEi\0d\0").unwrap_err();
    assert!(p[0].expected.contains("UTF-16"));
}

#[test]
fn every_ragged_row_is_reported() {
    let p = read_text("t.csv", b"id,a,b\n1,2\n3,4,5\n6,7,8,9\n").unwrap_err();
    assert_eq!(p.len(), 2);
    assert_eq!((p[0].row, p[1].row), (Some(2), Some(4)));
    assert!(p[1].expected.contains("decimal comma"));
}

#[test]
fn empty_file() {
    assert_eq!(
        read_text("t.csv", b"").unwrap_err()[0].kind,
        ProblemKind::Empty
    );
    assert_eq!(
        read_text("t.csv", b"\n\n").unwrap_err()[0].kind,
        ProblemKind::Empty
    );
}

#[test]
fn a_workbook_that_unpacks_past_the_limit_is_refused_without_trusting_its_declared_sizes() {
    use std::io::Write;
    let mut bytes = Vec::new();
    {
        let mut z = zip::ZipWriter::new(std::io::Cursor::new(&mut bytes));
        let opts = zip::write::SimpleFileOptions::default()
            .compression_method(zip::CompressionMethod::Deflated);
        z.start_file("xl/sharedStrings.xml", opts).unwrap();
        z.write_all(&vec![b' '; 4 << 20]).unwrap();
        z.finish().unwrap();
    }
    // 4 MiB of spaces compress to a few KB.
    assert!(bytes.len() < 64 << 10);
    let e = check_unpacked_size(&bytes, 1 << 20).unwrap_err();
    assert!(
        e.contains("at most 1 MiB") && e.contains("sharedStrings"),
        "{e}"
    );
    check_unpacked_size(&bytes, 8 << 20).unwrap();
    // Not a zip: left to the workbook reader.
    check_unpacked_size(b"not a zip", 1).unwrap();
}
