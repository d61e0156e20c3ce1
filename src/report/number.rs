//! How numbers are written, one rule per kind of output: in CSV cells a value that is not a
//! finite number is left empty (statistics packages read an empty cell as missing, while
//! `NaN` or `inf` would be read as text or as a number); in text meant for people (Markdown,
//! LaTeX, the terminal) it is an en dash.

/// A number for a CSV cell with `decimals` places; empty when not finite.
pub fn cell(x: f64, decimals: usize) -> String {
    if x.is_finite() {
        fixed(x, decimals)
    } else {
        String::new()
    }
}

/// A finite `x` with `decimals` places, rounded to nearest as Rust's `{:.N}` rounds the exact
/// binary value, a zero unsigned ([`unsigned_zero`]): the same text as
/// `unsigned_zero(format!("{x:.N}"))` (tests beside, on two million values), made with integer
/// arithmetic where that is certain to round the same way. That is where |x|·10ᴺ < 10⁹ (its
/// product in doubles is then within 6e-8 of the exact one) and the product is not within
/// 1e-6 of a half (so that the error cannot move it across one); the general formatter
/// otherwise. The long tables write millions of such numbers.
fn fixed(x: f64, decimals: usize) -> String {
    const POWERS: [u64; 10] = [
        1,
        10,
        100,
        1_000,
        10_000,
        100_000,
        1_000_000,
        10_000_000,
        100_000_000,
        1_000_000_000,
    ];
    if let Some(&scale) = POWERS.get(decimals) {
        let y = x.abs() * scale as f64;
        if y < 1e9 && ((y - y.floor()) - 0.5).abs() > 1e-6 {
            let n = y.round() as u64;
            let (whole, part) = (n / scale, n % scale);
            let sign = if x < 0.0 && n > 0 { "-" } else { "" };
            return if decimals == 0 {
                format!("{sign}{whole}")
            } else {
                format!("{sign}{whole}.{part:0decimals$}")
            };
        }
    }
    unsigned_zero(format!("{x:.decimals$}"))
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

/// Decimals a P(female) supports: the group hierarchy's are good to about 5e-5
/// (tests/reference_hierarchy.rs), so 4; the one-population posterior's to about 1e-9, so 6.
pub fn probability_decimals(from_hierarchy: bool) -> usize {
    if from_hierarchy {
        4
    } else {
        6
    }
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

/// A number for reading (Markdown, the terminal's prose) with a real minus sign (U+2212), as
/// journals set it; "–" when not finite.
pub fn reading(x: f64, decimals: usize) -> String {
    let s = text(x, decimals);
    match s.strip_prefix('-') {
        Some(rest) => format!("\u{2212}{rest}"),
        None => s,
    }
}

/// [`reading`] without trailing zeros: 0.25, 0.5, 2, 10, −3 (never 2.0 or 10.00), for tick
/// labels and values an analyst typed (a fixed prior of 0.1).
pub fn short(x: f64, decimals: usize) -> String {
    let s = reading(x, decimals);
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A Bayes factor in words: what it compares and by how much, e.g. "the data are 10^88 times
/// as probable if the community was mixed" (`yes` is the hypothesis a positive ln BF favours,
/// `no` the other). Below a factor of 3 either way it says the data hardly tell them apart.
pub fn bayes_factor_words(ln_bf: f64, yes: &str, no: &str) -> String {
    if !ln_bf.is_finite() {
        return "not computed".into();
    }
    let l = ln_bf / std::f64::consts::LN_10;
    let (who, m) = if l >= 0.0 { (yes, l) } else { (no, -l) };
    let factor = if m >= 3.0 {
        format!("10^{m:.0}")
    } else {
        format!("{:.1}", 10f64.powf(m))
    };
    if m < 3f64.log10() {
        format!("the data hardly tell the two apart: they are {factor} times as probable if {who}")
    } else {
        format!("the data are {factor} times as probable if {who}")
    }
}

/// A number for LaTeX: the minus sign in math mode (`$-$0.18`), which typesets as a real minus.
pub fn latex(x: f64, decimals: usize) -> String {
    let s = text(x, decimals);
    match s.strip_prefix('-') {
        Some(rest) => format!("$-${rest}"),
        None => s,
    }
}

/// A number for readable text with `decimals` places; "–" when not finite.
pub fn text(x: f64, decimals: usize) -> String {
    if x.is_finite() {
        fixed(x, decimals)
    } else {
        "–".into()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_bayes_factor_reads_as_what_it_compares() {
        let ln10 = std::f64::consts::LN_10;
        assert_eq!(
            bayes_factor_words(-88.26 * ln10, "one sex", "mixed"),
            "the data are 10^88 times as probable if mixed"
        );
        assert_eq!(
            bayes_factor_words(1.35 * ln10, "they differ", "they share one"),
            "the data are 22.4 times as probable if they differ"
        );
        assert!(bayes_factor_words(-0.14 * ln10, "a", "b").starts_with("the data hardly tell"));
    }

    #[test]
    fn minus_signs_are_real_in_text_and_in_latex() {
        assert_eq!(reading(-0.179, 3), "\u{2212}0.179");
        assert_eq!(reading(0.387, 3), "0.387");
        assert_eq!(latex(-0.179, 3), "$-$0.179");
        assert_eq!(reading(-0.0001, 3), "0.000");
    }

    /// The integer path gives the general formatter's text: on seeded values of every kind
    /// that matters (probabilities, magnitudes from 1e-12 to 1e12, negatives, exact binary
    /// ties such as 0.125, and values a few ulps either side of a decimal half), at 0 to 11
    /// places.
    #[test]
    fn fixed_places_are_the_general_formatters_text() {
        use rand::{RngExt, SeedableRng};
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(41);
        let general = |x: f64, d: usize| unsigned_zero(format!("{x:.d$}"));
        let mut fast = 0usize;
        for k in 0..2_000_000u64 {
            let d = (k % 12) as usize;
            let x: f64 = match k % 6 {
                0 => rng.random(),
                1 => 10f64.powf(rng.random_range(-12.0..12.0)),
                2 => -10f64.powf(rng.random_range(-8.0..6.0)),
                3 => f64::from(rng.random_range(0..4096u32)) / 1024.0,
                4 => {
                    // Near a decimal half at d places, a few ulps off.
                    let half =
                        (f64::from(rng.random_range(0..100_000u32)) + 0.5) / 10f64.powi(d as i32);
                    f64::from_bits(
                        half.to_bits()
                            .wrapping_add_signed(rng.random_range(-3..=3i64)),
                    )
                }
                _ => f64::from(rng.random_range(-1000..1000i32)) * 1e-5,
            };
            let scale = 10f64.powi(d as i32);
            let y = x.abs() * scale;
            fast += usize::from(d <= 9 && y < 1e9 && ((y - y.floor()) - 0.5).abs() > 1e-6);
            assert_eq!(fixed(x, d), general(x, d), "{x:e} at {d} places");
        }
        // Most values take the integer path.
        assert!(fast > 1_000_000, "{fast}");
    }

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
