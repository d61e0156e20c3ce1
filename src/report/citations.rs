//! The references of a methods section, taken from what the run used: the trait catalogue's
//! `source` fields name the works behind each trait ("Walker (2008) Am J Phys Anthropol
//! 136:39-50; Buikstra & Ubelaker (1994) Standards."), and the works whose full reference
//! is known here are written out in full; any other is listed as the catalogue writes it.

/// Full references (APA style, with titles) of every work the shipped catalogue and the
/// methods text cite, by citation key (authors as the catalogue writes them, then the year).
/// Where each entry was checked: "seen" is the article's first page or an index record read by
/// the developers; "from memory" is recalled and should be checked against the source.
const FULL_REFERENCES: &[(&str, &str)] = &[
    // Seen (the article's first page).
    ("Walker 2008", "Walker, P. L. (2008). Sexing skulls using discriminant function analysis of visually assessed traits. American Journal of Physical Anthropology, 136, 39–50."),
    // From memory.
    ("Klales, Ousley & Vollner 2012", "Klales, A. R., Ousley, S. D., & Vollner, J. M. (2012). A revised method of sexing the human innominate using Phenice's nonmetric traits and statistical methods. American Journal of Physical Anthropology, 149, 104–114."),
    // Seen (title, journal, volume and first page in a published reference list).
    ("Phenice 1969", "Phenice, T. W. (1969). A newly developed visual method of sexing the os pubis. American Journal of Physical Anthropology, 30, 297–301."),
    // From memory.
    // From memory (journal, volume and pages seen in REFERENCES.md; the title recalled).
    ("Bruzek 2002", "Bruzek, J. (2002). A method for visual determination of sex, using the human hip bone. American Journal of Physical Anthropology, 117, 157–168."),
    // From memory.
    ("Ferembach et al. 1980", "Ferembach, D., Schwidetzky, I., & Stloukal, M. (1980). Recommendations for age and sex diagnoses of skeletons. Journal of Human Evolution, 9, 517–549."),
    // From memory.
    ("Moore-Jansen, Ousley & Jantz 1994", "Moore-Jansen, P. M., Ousley, S. D., & Jantz, R. L. (1994). Data collection procedures for forensic skeletal material (3rd ed.). Report of Investigations 48. Knoxville: University of Tennessee, Department of Anthropology."),
    // From memory.
    ("Washburn 1948", "Washburn, S. L. (1948). Sex differences in the pubic bone. American Journal of Physical Anthropology, 6, 199–208."),
    // From memory.
    ("Hillson et al. 2005", "Hillson, S., FitzGerald, C., & Flinn, H. (2005). Alternative dental measurements: Proposals and relationships with other measurements. American Journal of Physical Anthropology, 126, 413–426."),
    // From memory.
    ("Loth & Henneberg 1996", "Loth, S. R., & Henneberg, M. (1996). Mandibular ramus flexure: A new morphologic indicator of sexual dimorphism in the human skeleton. American Journal of Physical Anthropology, 99, 473–485."),
    ("Walker 2005", "Walker, P. L. (2005). Greater sciatic notch morphology: Sex, age, and population differences. American Journal of Physical Anthropology, 127, 385–391."),
    // Common practice (the trade's standard manual).
    ("Buikstra & Ubelaker 1994", "Buikstra, J. E., & Ubelaker, D. H. (Eds.). (1994). Standards for data collection from human skeletal remains. Arkansas Archeological Survey Research Series 44. Fayetteville: Arkansas Archeological Survey."),
    // From memory.
    ("Stewart 1979", "Stewart, T. D. (1979). Essentials of forensic anthropology, especially as developed in the United States. Springfield, IL: Charles C. Thomas."),
    // From memory.
    ("Black 1978", "Black, T. K. (1978). A new method for assessing the sex of fragmentary skeletal remains: Femoral shaft circumference. American Journal of Physical Anthropology, 48, 227–231."),
    // Seen (the article's first page).
    ("Zorba et al. 2011", "Zorba, E., Moraitis, K., & Manolis, S. K. (2011). Sexual dimorphism in permanent teeth of modern Greeks. Forensic Science International, 210, 74–81."),
    // From memory.
    ("Skoglund et al. 2013", "Skoglund, P., Storå, J., Götherström, A., & Jakobsson, M. (2013). Accurate sex identification of ancient human remains using DNA shotgun sequencing. Journal of Archaeological Science, 40, 4477–4482."),
    // From memory (journal, volume and article number seen in REFERENCES.md; the authors and
    // title recalled).
    ("Mittnik et al. 2016", "Mittnik, A., Wang, C.-C., Svoboda, J., & Krause, J. (2016). A molecular approach to the sexing of the triple burial at the Upper Paleolithic site of Dolní Věstonice. PLoS ONE, 11, e0163019."),
    // Seen (the article's first page).
    ("Noussios et al. 2019", "Noussios, G., Theologou, K., Chouridis, P., Karavasilis, G., Alafostergios, G., & Katsourakis, A. (2019). A rare morphological study concerning the longest bone of the human anatomy in the population of the Northern Greece. Journal of Clinical Medicine Research, 11, 740–744."),
    // From memory.
    ("Konigsberg & Hens 1998", "Konigsberg, L. W., & Hens, S. M. (1998). Use of ordinal categorical variables in skeletal assessment of sex from the cranium. American Journal of Physical Anthropology, 107, 97–112."),
    // From memory.
    ("Genz 1992", "Genz, A. (1992). Numerical computation of multivariate normal probabilities. Journal of Computational and Graphical Statistics, 1, 141–149."),
    // From memory.
    ("Curnow & Dunnett 1962", "Curnow, R. N., & Dunnett, C. W. (1962). The numerical evaluation of certain multivariate normal integrals. Annals of Mathematical Statistics, 33, 571–579."),
    // From memory.
    ("Piessens et al. 1983", "Piessens, R., de Doncker-Kapenga, E., Überhuber, C. W., & Kahaner, D. K. (1983). QUADPACK: A subroutine package for automatic integration. Berlin: Springer."),
    // From memory.
    ("Genz 2004", "Genz, A. (2004). Numerical computation of rectangular bivariate and trivariate normal and t probabilities. Statistics and Computing, 14, 251–260."),
    // From memory.
    ("McCullagh 1980", "McCullagh, P. (1980). Regression models for ordinal data. Journal of the Royal Statistical Society, Series B, 42, 109–142."),
    // From memory.
    ("Olsson 1979", "Olsson, U. (1979). Maximum likelihood estimation of the polychoric correlation coefficient. Psychometrika, 44, 443–460."),
    // From memory.
    ("Olsson, Drasgow & Dorans 1982", "Olsson, U., Drasgow, F., & Dorans, N. J. (1982). The polyserial correlation coefficient. Psychometrika, 47, 337–347."),
    // From memory. The article's title names a computer program for this job, which this
    // project does not name; the entry gives authors, journal and pages, and says so.
    ("Bruzek et al. 2017", "Bruzek, J., Santos, F., Dutailly, B., Murail, P., & Cunha, E. (2017). Validation and reliability of the sex estimation of the human os coxae [title shortened; the full title is in the journal]. American Journal of Physical Anthropology, 164, 440–449."),
    // Common practice (the guideline's own title).
    ("ENFSI 2015", "ENFSI. (2015). ENFSI guideline for evaluative reporting in forensic science. European Network of Forensic Science Institutes."),
    // From memory.
    ("Tanner & Wong 1987", "Tanner, M. A., & Wong, W. H. (1987). The calculation of posterior distributions by data augmentation. Journal of the American Statistical Association, 82, 528–540."),
    // From memory.
    // From memory (mortality by sex).
    ("Gompertz 1825", "Gompertz, B. (1825). On the nature of the function expressive of the law of human mortality, and on a new mode of determining the value of life contingencies. Philosophical Transactions of the Royal Society of London, 115, 513–583."),
    ("Makeham 1860", "Makeham, W. M. (1860). On the law of mortality and the construction of annuity tables. The Assurance Magazine, and Journal of the Institute of Actuaries, 8, 301–310."),
    ("Wood et al. 2002", "Wood, J. W., Holman, D. J., O'Connor, K. A., & Ferrell, R. J. (2002). Mortality models for paleodemography. In R. D. Hoppa & J. W. Vaupel (Eds.), Paleodemography: Age distributions from skeletal samples (pp. 129–168). Cambridge: Cambridge University Press."),
    ("Rubin 1987", "Rubin, D. B. (1987). Multiple imputation for nonresponse in surveys. New York: Wiley."),
    // From memory (the sex ratio against a reference).
    ("Kass & Raftery 1995", "Kass, R. E., & Raftery, A. E. (1995). Bayes factors. Journal of the American Statistical Association, 90, 773–795."),
    // From memory (the life tables by sex).
    ("Chiang 1984", "Chiang, C. L. (1984). The life table and its applications. Malabar, FL: Krieger."),
    ("Acsádi & Nemeskéri 1970", "Acsádi, G., & Nemeskéri, J. (1970). History of human life span and mortality. Budapest: Akadémiai Kiadó."),
    ("Rubin 1981", "Rubin, D. B. (1981). The Bayesian bootstrap. The Annals of Statistics, 9, 130–134."),
    // From memory.
    ("Andridge & Little 2010", "Andridge, R. R., & Little, R. J. A. (2010). A review of hot deck imputation for survey non-response. International Statistical Review, 78, 40–64."),
    ("Wood et al. 1992", "Wood, J. W., Milner, G. R., Harpending, H. C., & Weiss, K. M. (1992). The osteological paradox: Problems of inferring prehistoric health from skeletal samples. Current Anthropology, 33, 343–370."),
    // From memory.
    ("Gelman et al. 2013", "Gelman, A., Carlin, J. B., Stern, H. S., Dunson, D. B., Vehtari, A., & Rubin, D. B. (2013). Bayesian data analysis (3rd ed.). Boca Raton, FL: CRC Press."),
];

/// The full reference of a work by its key ("Genz 2004"). Every key the methods text cites is
/// in [`FULL_REFERENCES`]; the unit test `every_work_the_methods_cite_has_a_full_reference`
/// holds that.
pub fn work(key: &str) -> String {
    FULL_REFERENCES
        .iter()
        .find(|(k, _)| *k == key)
        .map(|(_, full)| full.to_string())
        .unwrap_or_else(|| format!("{key}."))
}

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
        assert!(reference(&k[1].0, &k[1].1).starts_with("Zorba, E., Moraitis, K., & Manolis"));
        let k = citation_keys("Buikstra & Ubelaker (1994) Standards (grades from memory).");
        assert_eq!(k.len(), 1);
        assert!(citation_keys("common practice").is_empty());
    }

    #[test]
    fn an_unknown_work_is_listed_as_the_catalogue_writes_it() {
        let k = citation_keys("Ashgrove (2031) Notes on the Mirefold pelves.");
        assert_eq!(k[0].0, "Ashgrove 2031");
        assert_eq!(
            reference(&k[0].0, &k[0].1),
            "Ashgrove (2031) Notes on the Mirefold pelves."
        );
        assert!(reference("Walker 2008", "x").starts_with("Walker, P. L. (2008)"));
    }

    #[test]
    fn every_work_the_shipped_catalogue_cites_has_a_full_reference_with_a_title() {
        let c = crate::catalogue::Catalogue::standard().unwrap();
        for d in c.traits() {
            for (key, _) in citation_keys(&d.source) {
                let full = FULL_REFERENCES.iter().find(|(k, _)| *k == key);
                let Some((_, full)) = full else {
                    panic!("`{}` cites {key}, which has no full reference", d.id)
                };
                // Author list, year in parentheses, then a title sentence before the source.
                let after_year = full.split_once("). ").map(|(_, t)| t).unwrap_or("");
                assert!(after_year.len() > 20, "{key}: no title in {full:?}");
            }
        }
    }

    #[test]
    fn every_work_is_listed_once() {
        for (i, (k, _)) in FULL_REFERENCES.iter().enumerate() {
            assert!(
                FULL_REFERENCES[i + 1..].iter().all(|(other, _)| other != k),
                "{k} twice"
            );
        }
        assert_eq!(work("Ashgrove 2031"), "Ashgrove 2031.");
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
