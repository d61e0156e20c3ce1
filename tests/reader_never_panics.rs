//! Property tests: no input, however broken, panics the reader.

use proptest::prelude::*;
use tessera::catalogue::Catalogue;
use tessera::data::{read_assemblage_text, ReadSettings, SidePolicy};

fn column_name() -> impl Strategy<Value = String> {
    prop_oneof![
        Just("id".to_string()),
        Just("ID ".to_string()),
        Just("group".to_string()),
        Just("age".to_string()),
        Just("known_sex".to_string()),
        Just("glabella".to_string()),
        Just("mastoid_l".to_string()),
        Just("mastoid_r".to_string()),
        Just("mastoid".to_string()),
        Just("femur_head_diameter_l".to_string()),
        Just("dna_x_reads".to_string()),
        Just("dna_y_reads".to_string()),
        Just("preauricular_sulcus_r".to_string()),
        "[a-z_]{0,12}",
        ".{0,6}",
    ]
}

fn cell() -> impl Strategy<Value = String> {
    prop_oneof![
        Just(String::new()),
        Just("NA".to_string()),
        Just("3".to_string()),
        Just("3-4".to_string()),
        Just("4/2".to_string()),
        Just("-".to_string()),
        Just("45.5".to_string()),
        Just("45,5".to_string()),
        Just("1e309".to_string()),
        Just("NaN".to_string()),
        Just("-0".to_string()),
        Just("50+".to_string()),
        Just("adult".to_string()),
        Just("\"".to_string()),
        Just("2147483648".to_string()),
        Just("–".to_string()),
        "[0-9.,/+-]{0,8}",
        ".{0,10}",
    ]
}

fn table() -> impl Strategy<Value = String> {
    (
        prop::collection::vec(column_name(), 0..8),
        0usize..6,
        prop::sample::select(vec![",", ";", "\t"]),
    )
        .prop_flat_map(|(header, n_rows, d)| {
            let width = header.len().max(1);
            (
                Just(header),
                prop::collection::vec(prop::collection::vec(cell(), width - 1..width + 2), n_rows),
                Just(d),
                prop::bool::ANY,
            )
        })
        .prop_map(|(header, rows, d, crlf)| {
            let eol = if crlf { "\r\n" } else { "\n" };
            let mut s = header.join(d);
            s.push_str(eol);
            for r in rows {
                s.push_str(&r.join(d));
                s.push_str(eol);
            }
            s
        })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_bytes_never_panic(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        let cat = Catalogue::standard().unwrap();
        let _ = read_assemblage_text("fuzz.csv", &bytes, &cat, &ReadSettings::default());
    }

    #[test]
    fn arbitrary_tables_never_panic_and_problems_are_located(text in table(), both in any::<bool>()) {
        let cat = Catalogue::standard().unwrap();
        let settings = ReadSettings {
            side_policy: if both { SidePolicy::Both } else { SidePolicy::LeftFirst },
            ..ReadSettings::default()
        };
        match read_assemblage_text("fuzz.csv", text.as_bytes(), &cat, &settings) {
            Ok(a) => {
                // Every individual has an id, one slot per trait, and its carried cells.
                for ind in &a.individuals {
                    prop_assert!(!ind.id.is_empty());
                    prop_assert_eq!(ind.observations.len(), cat.len());
                    prop_assert_eq!(ind.carried.len(), a.carried_columns.len());
                }
            }
            Err(e) => {
                prop_assert!(!e.problems.is_empty());
                for p in &e.problems {
                    prop_assert!(!p.expected.is_empty());
                    prop_assert!(!p.to_string().is_empty());
                }
            }
        }
    }
}
