//! Number formatting shared by the text renderers.

/// A VIF or similar ratio for people: two decimals, fewer digits when large.
pub fn ratio(value: Option<f64>) -> String {
    match value {
        None => "undefined".to_string(),
        Some(v) if v >= 1000.0 => format!("{v:.0}"),
        Some(v) if v >= 100.0 => format!("{v:.1}"),
        Some(v) => format!("{v:.2}"),
    }
}

/// A number for machines: full precision, `n/a` when undefined (the BIDS spelling).
pub fn exact(value: Option<f64>) -> String {
    value.map_or_else(|| "n/a".to_string(), |v| v.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratios_keep_sensible_digits() {
        assert_eq!(ratio(Some(1.234567)), "1.23");
        assert_eq!(ratio(Some(123.456)), "123.5");
        assert_eq!(ratio(Some(12345.6)), "12346");
        assert_eq!(ratio(None), "undefined");
        assert_eq!(exact(None), "n/a");
        assert_eq!(exact(Some(0.5)), "0.5");
    }
}
