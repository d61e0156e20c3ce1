//! Unit tests of `prior/mod.rs`.

use super::*;

#[test]
fn validation() {
    assert!(Prior::from_yaml(
        "p",
        "name: a\nprovenance: invented for a test\nbeta: {a: 2, b: 3}\n"
    )
    .is_ok());
    assert!(Prior::from_yaml(
        "p",
        "name: a\nprovenance: invented for a test\nbeta: {a: 0, b: 3}\n"
    )
    .is_err());
    assert!(Prior::from_yaml(
        "p",
        "name: a\nprovenance: invented for a test\nfixed: 1.0\n"
    )
    .is_err());
    assert!(Prior::from_yaml(
        "p",
        "name: a\nprovenance: invented for a test\nfixed: 0.4\nbeta: {a: 1, b: 1}\n"
    )
    .is_err());
    assert!(Prior::from_yaml("p", "name: a\nprovenance: x\nfixed: 0.4\n").is_err());
    assert!(Prior::from_yaml(
        "p",
        "name: a\nprovenance: invented for a test\nfixed: .nan\n"
    )
    .is_err());
    let p = Prior::fixed(0.3).unwrap();
    assert_eq!(p.shape, PriorShape::Fixed { pi: 0.3 });
    assert!((p.mirrored().mean() - 0.7).abs() < 1e-15);
}
