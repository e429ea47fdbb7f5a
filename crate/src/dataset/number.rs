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
    }
}
