//! Unit tests of `limits/mod.rs`.

use super::*;

#[test]
fn a_billion_laughs_is_refused_before_it_expands() {
    // Ten levels of ten aliases each: 10^10 values from a few hundred bytes.
    let mut doc = String::from("a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n");
    for k in 1..10 {
        let p = format!("*a{}", k - 1);
        doc.push_str(&format!("a{k}: &a{k} [{}]\n", [p.as_str(); 10].join(", ")));
    }
    let e = check_yaml(&doc).unwrap_err();
    assert!(e.contains("aliases"), "{e}");
    // A few aliases are fine.
    check_yaml("a: &m [1, 2]\nb: *m\nc: *m\n").unwrap();
}

#[test]
fn deep_nesting_is_refused_at_once() {
    let doc = "[".repeat(100_000) + &"]".repeat(100_000);
    let e = check_yaml(&doc).unwrap_err();
    assert!(e.contains("nested more than 64"), "{e}");
    check_yaml(&("[".repeat(10) + &"]".repeat(10))).unwrap();
}

#[test]
fn the_shipped_settings_files_pass() {
    for dir in ["models", "priors"] {
        let d = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(dir);
        for e in std::fs::read_dir(d).unwrap() {
            let p = e.unwrap().path();
            let text = read_settings_text(&p).unwrap();
            check_yaml(&text).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
        }
    }
}

#[cfg(unix)]
#[test]
fn a_stream_without_length_is_read_with_a_bound() {
    // /dev/zero reports length 0 and never ends.
    match read_bounded(Path::new("/dev/zero"), 1 << 16) {
        Err(BoundedReadError::TooLarge { limit }) => assert_eq!(limit, 1 << 16),
        other => panic!("{other:?}"),
    }
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("x");
    std::fs::write(&p, b"12345").unwrap();
    assert_eq!(read_bounded(&p, 5).unwrap(), b"12345");
    assert!(matches!(
        read_bounded(&p, 4),
        Err(BoundedReadError::TooLarge { .. })
    ));
}
