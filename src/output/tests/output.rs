//! Unit tests of `output/mod.rs`.

use super::*;

#[test]
fn writes_whole_files_and_refuses_to_overwrite_inputs() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("in.csv");
    std::fs::write(&input, "id\nA\n").unwrap();
    let out = dir.path().join("out.csv");
    write_atomic(&out, b"x,y\n", &[&input]).unwrap();
    assert_eq!(std::fs::read(&out).unwrap(), b"x,y\n");
    assert!(write_atomic(&input, b"oops", &[&input]).is_err());
    assert_eq!(std::fs::read(&input).unwrap(), b"id\nA\n");
    // No temporary files left behind.
    let names: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names.len(), 2);
    assert!(write_atomic(&dir.path().join("no/such/dir/x.csv"), b"", &[]).is_err());
}

#[test]
fn several_files_are_written_all_or_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.csv");
    let b = dir.path().join("no such folder").join("b.csv");
    // The second cannot be written: the first must not appear, and no temporary file stays.
    let e = write_all_atomic(
        &[(a.clone(), b"one".as_slice()), (b, b"two".as_slice())],
        &[],
    );
    assert!(e.is_err());
    assert!(!a.exists());
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    // Both writable: both appear.
    let c = dir.path().join("c.csv");
    write_all_atomic(
        &[
            (a.clone(), b"one".as_slice()),
            (c.clone(), b"two".as_slice()),
        ],
        &[],
    )
    .unwrap();
    assert_eq!(std::fs::read(&a).unwrap(), b"one");
    assert_eq!(std::fs::read(&c).unwrap(), b"two");
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
}
