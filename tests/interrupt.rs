//! An interrupted run leaves no partial output file. Heavy (writes ~250 MB):
//! `cargo test --release --test interrupt -- --ignored`.

use std::process::Command;
use std::time::{Duration, Instant};

#[test]
#[ignore = "heavy: simulates 3 million individuals to catch the write in progress"]
fn sigint_during_a_write_leaves_no_partial_file() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("big.csv");
    let mut child = Command::new(env!("CARGO_BIN_EXE_tessera"))
        .args([
            "simulate",
            "--n",
            "3000000",
            "--missing",
            "dna=0.5",
            "--out",
            out.to_str().unwrap(),
        ])
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let start = Instant::now();
    let mut caught = false;
    while start.elapsed() < Duration::from_secs(300) {
        let partial = std::fs::read_dir(dir.path()).unwrap().any(|e| {
            e.unwrap()
                .file_name()
                .to_string_lossy()
                .ends_with(".partial")
        });
        if partial {
            Command::new("kill")
                .args(["-INT", &child.id().to_string()])
                .status()
                .unwrap();
            caught = true;
            break;
        }
        if child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(Duration::from_millis(2));
    }
    let o = child.wait_with_output().unwrap();
    let status = o.status;
    // The message is true: the write was in progress, so nothing of the run was written.
    let said = String::from_utf8_lossy(&o.stderr);
    assert!(said.contains("nothing of this run was written"), "{said}");
    assert!(
        caught,
        "the write finished before it could be interrupted; nothing was tested"
    );
    assert_eq!(status.code(), Some(130));
    let left: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert!(left.is_empty(), "left behind: {left:?}");
}
