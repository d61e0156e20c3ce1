//! The references of a methods section, taken from what the run used: the trait catalogue's
//! `source` fields name the works behind each trait ("Walker (2008) Am J Phys Anthropol
//! 136:39-50; Buikstra & Ubelaker (1994) Standards."), and the works whose full reference
//! is known here are written out in full; any other is listed as the catalogue writes it.

/// Full references of works cited by the shipped catalogue, by citation key (authors as the
/// catalogue writes them, then the year).
const FULL_REFERENCES: &[(&str, &str)] = &[
    ("Walker 2008", "Walker, P. L. (2008). American Journal of Physical Anthropology, 136, 39–50."),
    ("Klales, Ousley & Vollner 2012", "Klales, A. R., Ousley, S. D., & Vollner, J. M. (2012). American Journal of Physical Anthropology, 149, 104–114."),
    ("Phenice 1969", "Phenice, T. W. (1969). American Journal of Physical Anthropology, 30, 297–301."),
    ("Walker 2005", "Walker, P. L. (2005). American Journal of Physical Anthropology, 127, 385–391."),
    ("Buikstra & Ubelaker 1994", "Buikstra, J. E., & Ubelaker, D. H. (Eds.). (1994). Standards for data collection from human skeletal remains. Arkansas Archeological Survey Research Series 44."),
    ("Skoglund et al. 2013", "Skoglund, P., et al. (2013). Journal of Archaeological Science, 40, 4477–4482."),
];

/// The citation keys in a source text, in order: every "Name (Year)", "Name & Name (Year)",
/// "Name, Name & Name (Year)" or "Name et al. (Year)", with the run of author words read back
/// from the year to the first word that is not part of a name.
pub fn citation_keys(source: &str) -> Vec<(String, String)> {
    let mut keys = Vec::new();
    for segment in source.split(';') {
        let segment = segment.trim().trim_end_matches('.');
        let mut rest = segment;
        let mut offset = 0;
        while let Some(open) = rest.find('(') {
            let after = &rest[open + 1..];
            let year: String = after.chars().take_while(char::is_ascii_digit).collect();
            if year.len() == 4 && after[4..].starts_with(')') {
                let before = &segment[..offset + open];
                let authors = author_run(before);
                if !authors.is_empty() {
                    // As written: from the first author to the end of the segment.
                    let start = before.rfind(authors.as_str()).unwrap_or(0);
                    keys.push((format!("{authors} {year}"), segment[start..].to_string()));
                }
            }
            offset += open + 1;
            rest = &rest[open + 1..];
        }
    }
    keys
}

/// The author words at the end of `before`: capitalised words, `&`, `et` and `al.`, joined
/// as written; a word ending in `;`, `:` or `.` (other than `al.`) ends the run.
fn author_run(before: &str) -> String {
    let mut words: Vec<&str> = Vec::new();
    for w in before.split_whitespace().rev() {
        let is_name =
            w.chars().next().is_some_and(char::is_uppercase) && !w.ends_with([';', ':', '.', ')']);
        if is_name || w == "&" || w == "et" || w == "al." {
            words.push(w);
        } else {
            break;
        }
    }
    while words
        .last()
        .is_some_and(|w| *w == "&" || *w == "et" || *w == "al.")
    {
        words.pop();
    }
    words.reverse();
    words.join(" ").trim_end_matches(',').to_string()
}

/// The reference for a key: the full form when known, else the catalogue's own text.
pub fn reference(key: &str, as_written: &str) -> String {
    FULL_REFERENCES
        .iter()
        .find(|(k, _)| *k == key)
        .map(|(_, full)| full.to_string())
        .unwrap_or_else(|| format!("{as_written}."))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys_are_read_from_the_shipped_catalogue_s_source_texts() {
        let k = citation_keys(
            "Klales, Ousley & Vollner (2012) Am J Phys Anthropol 149:104-114, after Phenice (1969).",
        );
        let names: Vec<&str> = k.iter().map(|(k, _)| k.as_str()).collect();
        assert_eq!(names, ["Klales, Ousley & Vollner 2012", "Phenice 1969"]);
        let k = citation_keys(
            "Buikstra & Ubelaker (1994) Standards; sex differences in the canines: Zorba et al. (2011).",
        );
        let names: Vec<&str> = k.iter().map(|(k, _)| k.as_str()).collect();
        assert_eq!(names, ["Buikstra & Ubelaker 1994", "Zorba et al. 2011"]);
        assert_eq!(reference(&k[1].0, &k[1].1), "Zorba et al. (2011).");
        let k = citation_keys("Buikstra & Ubelaker (1994) Standards (grades from memory).");
        assert_eq!(k.len(), 1);
        assert!(citation_keys("common practice").is_empty());
    }

    #[test]
    fn an_unknown_work_is_listed_as_the_catalogue_writes_it() {
        let k = citation_keys("Stewart (1979) Essentials of Forensic Anthropology.");
        assert_eq!(k[0].0, "Stewart 1979");
        assert_eq!(
            reference(&k[0].0, &k[0].1),
            "Stewart (1979) Essentials of Forensic Anthropology."
        );
        assert!(reference("Walker 2008", "x").starts_with("Walker, P. L. (2008)"));
    }

    #[test]
    fn every_work_the_shipped_catalogue_cites_is_found() {
        let c = crate::catalogue::Catalogue::standard().unwrap();
        for d in c.traits() {
            let keys = citation_keys(&d.source);
            assert!(
                !keys.is_empty(),
                "`{}`: no citation in {:?}",
                d.id,
                d.source
            );
        }
    }
}
