//! Seat rules and thresholds as datasets give them (`seat_rule` and `threshold` in the
//! manifest and in a district's GeoJSON properties); the allocation itself is
//! [`crate::model::seats`].

use serde::Serialize;
use serde_json::Value;

/// How a district's seats are shared.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SeatRule {
    /// The party with most votes takes all the district's seats.
    #[default]
    Winner,
    /// Highest averages, divisors 1, 2, 3, …
    Dhondt,
    /// Highest averages, divisors 1, 3, 5, …
    SainteLague,
    /// Largest remainders with the Hare quota.
    Hare,
}

/// Largest threshold a dataset or district may set, percent.
pub const MAX_THRESHOLD: f64 = 50.0;

impl SeatRule {
    /// Every rule, in the order the documentation lists them.
    pub const ALL: [SeatRule; 4] = [
        SeatRule::Winner,
        SeatRule::Dhondt,
        SeatRule::SainteLague,
        SeatRule::Hare,
    ];

    /// The id used in `dataset.json` and the GeoJSON.
    pub fn id(self) -> &'static str {
        match self {
            SeatRule::Winner => "winner",
            SeatRule::Dhondt => "dhondt",
            SeatRule::SainteLague => "sainte_lague",
            SeatRule::Hare => "hare",
        }
    }

    /// A name for readers.
    pub fn name(self) -> &'static str {
        match self {
            SeatRule::Winner => "winner takes all",
            SeatRule::Dhondt => "D'Hondt",
            SeatRule::SainteLague => "Sainte-Laguë",
            SeatRule::Hare => "largest remainders (Hare quota)",
        }
    }

    /// The rule with this id.
    ///
    /// ```
    /// use stratamap::dataset::SeatRule;
    /// assert_eq!(SeatRule::from_id("sainte_lague"), Some(SeatRule::SainteLague));
    /// assert_eq!(SeatRule::from_id("D'Hondt"), None);
    /// ```
    pub fn from_id(id: &str) -> Option<SeatRule> {
        SeatRule::ALL.into_iter().find(|r| r.id() == id)
    }

    /// The ids, for messages: `"winner", "dhondt", "sainte_lague" or "hare"`.
    pub fn expected() -> String {
        let ids: Vec<String> = SeatRule::ALL
            .iter()
            .map(|r| format!("\"{}\"", r.id()))
            .collect();
        format!(
            "{} or {}",
            ids[..ids.len() - 1].join(", "),
            ids[ids.len() - 1]
        )
    }

    /// Whether the rule shares seats proportionally.
    pub fn is_proportional(self) -> bool {
        self != SeatRule::Winner
    }
}

/// Read a `seat_rule` value.
pub(crate) fn parse_rule(v: &Value) -> Result<SeatRule, String> {
    match v.as_str().and_then(SeatRule::from_id) {
        Some(r) => Ok(r),
        None => Err(format!(
            "expected {}, found {}",
            SeatRule::expected(),
            super::shown_value(v)
        )),
    }
}

/// Read a `threshold` value: a percentage from 0 to [`MAX_THRESHOLD`].
pub(crate) fn parse_threshold(v: &Value) -> Result<f64, String> {
    match v.as_f64() {
        Some(t) if t.is_finite() && (0.0..=MAX_THRESHOLD).contains(&t) => Ok(t),
        _ => Err(format!(
            "expected a percentage of the district's votes from 0 to {MAX_THRESHOLD}, found {}",
            super::shown_value(v)
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn values() {
        assert_eq!(parse_rule(&json!("hare")), Ok(SeatRule::Hare));
        assert_eq!(
            parse_rule(&json!("Hare")).unwrap_err(),
            r#"expected "winner", "dhondt", "sainte_lague" or "hare", found "Hare""#
        );
        assert!(parse_rule(&json!(1)).is_err());
        assert_eq!(parse_threshold(&json!(5)), Ok(5.0));
        assert_eq!(parse_threshold(&json!(0.5)), Ok(0.5));
        assert!(parse_threshold(&json!(-1)).is_err());
        assert!(parse_threshold(&json!(50.5)).is_err());
        assert!(parse_threshold(&json!("5")).is_err());
    }
}
