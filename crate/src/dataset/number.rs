//! Number fields of the CSV files.

use crate::error::shown;

/// Parse a finite decimal number from a CSV field (surrounding spaces allowed,
/// exponents allowed as spreadsheets write them; NaN and infinities refused).
pub(crate) fn parse_number(field: &str) -> Result<f64, String> {
    let t = field.trim();
    if t.is_empty() {
        return Err("expected a number, found an empty field".into());
    }
    let ok_chars = t
        .bytes()
        .all(|b| b.is_ascii_digit() || matches!(b, b'.' | b'-' | b'+' | b'e' | b'E'));
    match t.parse::<f64>() {
        Ok(v) if ok_chars && v.is_finite() => Ok(v),
        _ => Err(format!("expected a finite number, found {}", shown(t))),
    }
}

/// `v` rounded to `decimals` places in its shortest form (no trailing zeros, no `-0`,
/// no floating-point noise such as 1.2999999999999998): numbers in messages and words.
pub fn round_text(v: f64, decimals: i32) -> String {
    if !v.is_finite() {
        return v.to_string();
    }
    let places = decimals.clamp(0, 15);
    let f = 10f64.powi(places);
    let r = (v * f).round() / f;
    let r = if r == 0.0 { 0.0 } else { r };
    let s = format!("{r:.*}", places as usize);
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::parse_number;

    #[test]
    fn numbers() {
        assert_eq!(parse_number(" 0.25 "), Ok(0.25));
        assert_eq!(parse_number("1e-3"), Ok(0.001));
        assert!(parse_number("NaN").is_err());
        assert!(parse_number("inf").is_err());
        assert!(parse_number("").is_err());
        assert!(parse_number("0x10").is_err());
        assert!(parse_number("1,5").is_err());
        assert_eq!(super::round_text(1.2999999999999998, 4), "1.3");
        assert_eq!(super::round_text(1.00512, 4), "1.0051");
        assert_eq!(super::round_text(-0.00001, 4), "0");
    }
}
