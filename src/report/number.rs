//! How numbers are written, one rule per kind of output: in CSV cells a value that is not a
//! finite number is left empty (statistics packages read an empty cell as missing, while
//! `NaN` or `inf` would be read as text or as a number); in text meant for people (Markdown,
//! LaTeX, the terminal) it is an en dash.

/// A number for a CSV cell with `decimals` places; empty when not finite.
pub fn cell(x: f64, decimals: usize) -> String {
    if x.is_finite() {
        unsigned_zero(format!("{x:.decimals$}"))
    } else {
        String::new()
    }
}

/// A number that rounds to zero is written without a sign (`0.000`, never `-0.000`: a
/// negative zero reads as a tiny negative value to a reader and to some parsers).
fn unsigned_zero(s: String) -> String {
    match s.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        _ => s,
    }
}

/// A probability for a CSV cell: six decimals, or two significant digits in scientific form
/// below 1e-6 so that strong evidence does not print as a bare zero; empty when not finite.
pub fn probability(x: f64) -> String {
    probability_to(x, 6)
}

/// A probability for a CSV cell with `decimals` places (for values computed less exactly:
/// the group hierarchy's are good to about 5e-5, so they get 4), in two significant digits
/// of scientific form below 10^−decimals; empty when not finite.
pub fn probability_to(x: f64, decimals: usize) -> String {
    if x > 0.0 && x < 10f64.powi(-(decimals as i32)) {
        format!("{x:.1e}")
    } else {
        cell(x, decimals)
    }
}

/// A number for readable text with `decimals` places; "–" when not finite.
pub fn text(x: f64, decimals: usize) -> String {
    if x.is_finite() {
        unsigned_zero(format!("{x:.decimals$}"))
    } else {
        "–".into()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_value_that_rounds_to_zero_has_no_sign() {
        assert_eq!(cell(-0.0, 6), "0.000000");
        assert_eq!(cell(-1e-9, 4), "0.0000");
        assert_eq!(text(-0.0004, 3), "0.000");
        assert_eq!(cell(-0.0006, 3), "-0.001");
        assert_eq!(probability(-0.0), "0.000000");
    }

    #[test]
    fn a_number_that_is_not_finite_is_missing_in_a_table_and_a_dash_in_text() {
        assert_eq!(cell(0.123456789, 4), "0.1235");
        assert_eq!(cell(f64::NAN, 4), "");
        assert_eq!(cell(f64::INFINITY, 2), "");
        assert_eq!(text(2.25, 1), "2.2");
        assert_eq!(text(f64::NAN, 3), "–");
        assert_eq!(probability(3.2e-9), "3.2e-9");
        assert_eq!(probability(0.5), "0.500000");
        assert_eq!(probability(f64::NAN), "");
    }
}
