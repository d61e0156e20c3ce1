//! Unit tests of `output/mod.rs`.

use super::*;

fn set(files: &[(String, &[u8])]) -> OutputSet {
    files.iter().map(|(n, b)| (n.clone(), b.to_vec())).collect()
}

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

#[cfg(unix)]
#[test]
fn a_target_that_is_not_a_regular_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    // A device: never replaced (as root, `--out /dev/null` would otherwise delete it).
    let e = write_atomic(Path::new("/dev/null"), b"x", &[]).unwrap_err();
    assert!(e.to_string().contains("not a regular file"), "{e}");
    use std::os::unix::fs::FileTypeExt;
    assert!(std::fs::symlink_metadata("/dev/null")
        .unwrap()
        .file_type()
        .is_char_device());
    // A folder and a symlink named as a file target.
    let sub = dir.path().join("sub");
    std::fs::create_dir(&sub).unwrap();
    assert!(write_atomic(&sub, b"x", &[]).is_err());
    let victim = dir.path().join("victim.txt");
    std::fs::write(&victim, "keep").unwrap();
    let link = dir.path().join("link.csv");
    std::os::unix::fs::symlink(&victim, &link).unwrap();
    let e = write_atomic(&link, b"x", &[]).unwrap_err();
    assert!(e.to_string().contains("symbolic link"), "{e}");
    assert_eq!(std::fs::read_to_string(&victim).unwrap(), "keep");
    // A file named as a folder target.
    let e = write_folder(
        &victim,
        &set(&[("a.csv".into(), b"1".as_slice())]),
        "test",
        &[],
    )
    .unwrap_err();
    assert!(e.to_string().contains("not a folder"), "{e}");
}

#[cfg(unix)]
#[test]
fn temporary_names_are_unpredictable_so_a_planted_symlink_is_never_followed() {
    let dir = tempfile::tempdir().unwrap();
    let victim = dir.path().join("victim.txt");
    std::fs::write(&victim, "keep").unwrap();
    // The old predictable temporary name.
    let planted = dir
        .path()
        .join(format!(".out.csv.{}.partial", std::process::id()));
    std::os::unix::fs::symlink(&victim, &planted).unwrap();
    let out = dir.path().join("out.csv");
    write_atomic(&out, b"new", &[]).unwrap();
    assert_eq!(std::fs::read_to_string(&victim).unwrap(), "keep");
    assert_eq!(std::fs::read(&out).unwrap(), b"new");
    // Ordinary permissions, not owner-only.
    use std::os::unix::fs::PermissionsExt;
    let mode = std::fs::metadata(&out).unwrap().permissions().mode();
    assert_eq!(mode & 0o600, 0o600);
}

fn names_in(dir: &Path) -> Vec<String> {
    let mut v = Vec::new();
    list_files(dir, Path::new(""), &mut v).unwrap();
    v.sort();
    v
}

#[test]
fn a_folder_holds_exactly_one_runs_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("results").join("run");
    let first = [
        ("a.csv".to_string(), b"1".as_slice()),
        ("draws.csv".to_string(), b"d".as_slice()),
        ("figures/f.svg".to_string(), b"<svg/>".as_slice()),
    ];
    write_folder(&out, &set(&first), "test", &[]).unwrap();
    assert_eq!(
        names_in(&out),
        [MANIFEST, "a.csv", "draws.csv", "figures/f.svg"]
    );
    // A rerun without draws: the old draws do not stay beside the new files.
    write_folder(
        &out,
        &set(&[("a.csv".to_string(), b"2".as_slice())]),
        "test",
        &[],
    )
    .unwrap();
    assert_eq!(names_in(&out), [MANIFEST, "a.csv"]);
    assert_eq!(std::fs::read(out.join("a.csv")).unwrap(), b"2");
    // Nothing left beside the folder (staging and the previous run removed).
    assert_eq!(
        names_in(&dir.path().join("results")),
        [format!("run/{MANIFEST}"), "run/a.csv".into()]
    );
    // A file of the user's in the folder: the run is refused and nothing is touched.
    std::fs::write(out.join("notes.txt"), "mine").unwrap();
    let e = write_folder(
        &out,
        &set(&[("a.csv".to_string(), b"3".as_slice())]),
        "test",
        &[],
    )
    .unwrap_err();
    assert!(e.to_string().contains("notes.txt"), "{e}");
    assert_eq!(std::fs::read(out.join("a.csv")).unwrap(), b"2");
    assert_eq!(
        std::fs::read_to_string(out.join("notes.txt")).unwrap(),
        "mine"
    );
    // A folder of someone else's (no manifest) is refused; an empty one is used.
    let other = dir.path().join("other");
    std::fs::create_dir(&other).unwrap();
    std::fs::write(other.join("thesis.docx"), "x").unwrap();
    assert!(write_folder(
        &other,
        &set(&[("a.csv".to_string(), b"1".as_slice())]),
        "t",
        &[]
    )
    .is_err());
    let empty = dir.path().join("empty");
    std::fs::create_dir(&empty).unwrap();
    write_folder(
        &empty,
        &set(&[("a.csv".to_string(), b"1".as_slice())]),
        "t",
        &[],
    )
    .unwrap();
    // An input inside the output folder is refused (the run would replace it).
    let input = out.join("a.csv");
    std::fs::remove_file(out.join("notes.txt")).unwrap();
    let e = write_folder(
        &out,
        &set(&[("b.csv".to_string(), b"1".as_slice())]),
        "t",
        &[&input],
    )
    .unwrap_err();
    assert!(e.to_string().contains("inside this output folder"), "{e}");
    assert!(input.exists());
}

#[test]
fn a_folder_that_cannot_be_written_whole_is_left_as_it_was() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("run");
    write_folder(
        &out,
        &set(&[("a.csv".to_string(), b"1".as_slice())]),
        "test",
        &[],
    )
    .unwrap();
    // Two files of one name cannot both be created: the run fails half-way.
    let bad = [
        ("b.csv".to_string(), b"2".as_slice()),
        ("b.csv".to_string(), b"3".as_slice()),
    ];
    assert!(write_folder(&out, &set(&bad), "test", &[]).is_err());
    assert_eq!(names_in(&out), [MANIFEST, "a.csv"]);
    assert_eq!(
        names_in(dir.path()),
        [format!("run/{MANIFEST}"), "run/a.csv".into()]
    );
}

#[test]
fn a_folder_named_relatively_is_swapped_in_beside_itself() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("a").join("..").join("run");
    std::fs::create_dir(dir.path().join("a")).unwrap();
    write_folder(
        &out,
        &set(&[("x.csv".to_string(), b"1".as_slice())]),
        "t",
        &[],
    )
    .unwrap();
    write_folder(
        &out,
        &set(&[("y.csv".to_string(), b"2".as_slice())]),
        "t",
        &[],
    )
    .unwrap();
    assert_eq!(names_in(&dir.path().join("run")), [MANIFEST, "y.csv"]);
    assert_eq!(names_in(&dir.path().join("a")), Vec::<String>::new());
}
