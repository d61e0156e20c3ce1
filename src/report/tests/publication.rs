//! Unit tests of `report/publication.rs`.

use super::*;

#[test]
fn names_from_the_users_files_cannot_break_latex_or_markdown_tables() {
    // Every LaTeX special character (Lamport 1994, LaTeX: A Document Preparation System,
    // section 2.2.1 lists # $ % & ~ _ ^ \ { } as special; from memory).
    assert_eq!(
        tex(r"zone {A} ~ ^ & % $ # _ \ end"),
        r"zone \{A\} \textasciitilde{} \textasciicircum{} \& \% \$ \# \_ \textbackslash{} end"
    );
    assert_eq!(tex("north"), "north");
    assert_eq!(md("a|b\nc"), r"a\|b c");
    assert_eq!(md(r"x\y"), r"x\\y");
}

#[test]
fn short_citations_from_apa_references() {
    assert_eq!(
        short_citation("Noussios, G., Theologou, K., Chouridis, P., & Katsourakis, A. (2019). A study. J, 11, 740-744."),
        "Noussios et al., 2019"
    );
    assert_eq!(
        short_citation("Olsson, U., & Drasgow, F. (1982). Title."),
        "Olsson & Drasgow, 1982"
    );
    assert_eq!(
        short_citation("Walker, P. L. (2008). Title."),
        "Walker, 2008"
    );
    assert_eq!(short_citation("A lab's table"), "A lab's table");
}
