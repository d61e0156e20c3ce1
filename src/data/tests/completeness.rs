//! Unit tests of `data/completeness.rs`.

use super::*;
use crate::catalogue::Catalogue;
use crate::data::{read_assemblage_text, ReadSettings};

#[test]
fn counts_traits_regions_groups_and_maturity() {
    let text = "id,group,age,glabella,mastoid_l,mastoid_r,ventral_arc_l,notes\n\
                A,n,30,3,2,,1,x\nB,n,12,,,3-4,,y\nC,s,,,,,,z\n";
    let a = read_assemblage_text(
        "t",
        text.as_bytes(),
        &Catalogue::standard().unwrap(),
        &ReadSettings::default(),
    )
    .unwrap();
    let c = Completeness::of(&a, None);
    assert_eq!(
        (c.individuals, c.adults, c.subadults, c.maturity_unknown),
        (3, 1, 1, 1)
    );
    assert_eq!(c.without_evidence, 1);
    assert_eq!(c.groups.len(), 2);
    assert_eq!(c.groups[0].individuals, 2);
    let mastoid = c.traits.iter().find(|t| t.trait_id == "mastoid").unwrap();
    assert_eq!(
        (
            mastoid.recorded,
            mastoid.as_range,
            mastoid.left,
            mastoid.right
        ),
        (2, 1, 1, 1)
    );
    let cranium = &c.regions[0];
    assert_eq!(
        (cranium.region, cranium.traits_in_file, cranium.individuals),
        (Region::Cranium, 2, 2)
    );
    assert!((cranium.share - 2.0 / 3.0).abs() < 1e-12);
    assert_eq!(c.regions.len(), 2);
}
