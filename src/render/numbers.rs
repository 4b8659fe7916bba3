//! Numbers as text: the one home of every rule a renderer writes a number by. Each rule
//! is named for what it is for; renderers pick a rule and never format a number
//! inline. Undefined values are spelled as each audience expects: "n/a" for machines
//! (the BIDS spelling) and settings, "undefined" for people.
//!
//! | rule | for | how |
//! |---|---|---|
//! | [`exact`] | TSV | shortest decimal that reads back to the same number |
//! | [`plain`] | settings as written | shortest decimal |
//! | [`ratio`] | VIFs and other ratios in tables | 2 decimals; 1 from 100; none from 1000 |
//! | [`ratio_finite`] | the same on the page | as `ratio`, non-finite as undefined |
//! | [`percent_tenths`] | shares in text tables | one decimal |
//! | [`percent_whole`] | shares on the page | whole percent |
//! | [`share_tenths`] | forecast shares | one decimal, "undefined" when missing |
//! | [`score`] | forecast ranking scores | three decimals |
//! | [`prose_vif`] | VIFs in the methods text | one decimal below 9.95, whole above |
//! | [`prose_percent`], [`prose_percent_range`] | shares in the methods text | whole percent, more digits near 0 and 100 |
//! | [`prose_power_of_ten`] | tolerances in the methods text | 10^k when a power of ten |
//! | [`prose_seconds`] | durations in the methods text | at most two decimals, no trailing zeros |
//! | [`axis_vif`] | VIF axis ticks | whole from 10, one decimal below, 1e5 as `1e5` |
//! | [`correlation_cell`] | correlation-map cells | two decimals, more near ±1, no leading zero |

/// A number for machines: full precision, `n/a` when undefined.
pub fn exact(value: Option<f64>) -> String {
    value.map_or_else(|| "n/a".to_string(), |v| v.to_string())
}

/// A setting as the user wrote it ("5", "2.5"); `n/a` if not finite.
pub fn plain(value: f64) -> String {
    if value.is_finite() {
        format!("{value}")
    } else {
        "n/a".to_string()
    }
}

/// A VIF or similar ratio for people: two decimals, fewer digits when large.
pub fn ratio(value: Option<f64>) -> String {
    match value {
        None => "undefined".to_string(),
        Some(v) if v >= 1000.0 => format!("{v:.0}"),
        Some(v) if v >= 100.0 => format!("{v:.1}"),
        Some(v) => format!("{v:.2}"),
    }
}

/// [`ratio`], with non-finite values shown as undefined.
pub fn ratio_finite(value: Option<f64>) -> String {
    ratio(value.filter(|v| v.is_finite()))
}

/// A share in [0, 1] as a percentage with one decimal; "undefined" if not finite.
pub fn percent_tenths(share: f64) -> String {
    if share.is_finite() {
        format!("{:.1}%", 100.0 * share)
    } else {
        "undefined".to_string()
    }
}

/// A share in [0, 1] as a whole percentage; `n/a` if not finite.
pub fn percent_whole(share: f64) -> String {
    if share.is_finite() {
        format!("{:.0}%", share * 100.0)
    } else {
        "n/a".to_string()
    }
}

/// A share in [0, 1] with one decimal; "undefined" when missing or not finite.
pub fn share_tenths(share: Option<f64>) -> String {
    share.map_or_else(|| "undefined".to_string(), percent_tenths)
}

/// A ranking score: three decimals; "undefined" when missing or not finite.
pub fn score(value: Option<f64>) -> String {
    match value.filter(|v| v.is_finite()) {
        Some(v) => format!("{v:.3}"),
        None => "undefined".to_string(),
    }
}

/// VIFs in prose: one decimal below 10, whole numbers from 10 on (1.2, 6.1, 15, 3150).
pub fn prose_vif(value: f64) -> String {
    if value < 9.95 {
        format!("{value:.1}")
    } else {
        format!("{value:.0}")
    }
}

/// A share in prose as a percentage: whole percent, with more digits near 0% and 100% so
/// that a small share is not shown as none and a large one not as all.
pub fn prose_percent(share: f64) -> String {
    format!("{}%", prose_percent_number(share))
}

/// A range of shares in prose: "3–12%", or "-2% to 5%" when it starts below zero.
pub fn prose_percent_range(low: f64, high: f64) -> String {
    if low < 0.0 {
        format!("{} to {}", prose_percent(low), prose_percent(high))
    } else {
        format!(
            "{}–{}%",
            prose_percent_number(low),
            prose_percent_number(high)
        )
    }
}

fn prose_percent_number(share: f64) -> String {
    let p = share * 100.0;
    let size = p.abs();
    if size == 0.0 || size == 100.0 {
        return format!("{p:.0}");
    }
    if size < 1.0 {
        for digits in 1..=2 {
            let text = format!("{p:.digits$}");
            if !text
                .trim_start_matches('-')
                .trim_start_matches(['0', '.'])
                .is_empty()
            {
                return text;
            }
        }
        return if p < 0.0 {
            "-<0.01".to_string()
        } else {
            "<0.01".to_string()
        };
    }
    if size > 99.0 && size < 100.0 {
        for digits in 1..=2 {
            let text = format!("{size:.digits$}");
            if !text.starts_with("100") {
                return if p < 0.0 { format!("-{text}") } else { text };
            }
        }
        return if p < 0.0 {
            "-99.99".to_string()
        } else {
            ">99.99".to_string()
        };
    }
    format!("{p:.0}")
}

/// A tolerance as written in a paper: 10^-6 rather than 0.000001.
pub fn prose_power_of_ten(value: f64) -> String {
    if value > 0.0 && value.is_finite() {
        let exponent = value.log10();
        if (exponent - exponent.round()).abs() < 1e-9 {
            return format!("10^{}", exponent.round() as i64);
        }
    }
    format!("{value:e}")
}

/// Seconds with at most two decimals, no trailing zeros.
pub fn prose_seconds(value: f64) -> String {
    let text = format!("{value:.2}");
    text.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// A tick of a log-scaled VIF axis; empty if not finite.
pub fn axis_vif(value: f64) -> String {
    if !value.is_finite() {
        String::new()
    } else if value >= 1e5 {
        format!("{value:.0e}")
    } else if value >= 10.0 || (value - value.round()).abs() < 1e-9 {
        format!("{value:.0}")
    } else {
        format!("{value:.1}")
    }
}

/// A correlation in a small map cell: two decimals, more near ±1 so that a near-copy
/// (.998) is not shown as an exact one; leading zeros dropped and a true minus sign.
pub fn correlation_cell(r: f64, diagonal: bool) -> String {
    // No "−.00": a value that rounds to zero is shown unsigned.
    let r = if r.abs() < 0.005 { 0.0 } else { r };
    let text = if diagonal && (r - 1.0).abs() < 5e-3 {
        "1".to_string()
    } else if r.abs() >= 0.9995 {
        format!("{r:.4}")
    } else if r.abs() >= 0.995 {
        format!("{r:.3}")
    } else {
        format!("{r:.2}")
    };
    text.replace("0.", ".").replace('-', "\u{2212}")
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
        assert_eq!(ratio_finite(Some(f64::INFINITY)), "undefined");
        assert_eq!(exact(None), "n/a");
        assert_eq!(exact(Some(0.5)), "0.5");
    }

    #[test]
    fn shares_and_scores() {
        assert_eq!(percent_tenths(0.1234), "12.3%");
        assert_eq!(percent_whole(0.126), "13%");
        assert_eq!(percent_whole(f64::NAN), "n/a");
        assert_eq!(share_tenths(None), "undefined");
        assert_eq!(share_tenths(Some(0.5)), "50.0%");
        assert_eq!(score(Some(2.0)), "2.000");
        assert_eq!(score(Some(f64::INFINITY)), "undefined");
        assert_eq!(percent_tenths(f64::NAN), "undefined");
    }

    #[test]
    fn prose_vifs_are_rounded_as_documented() {
        assert_eq!(prose_vif(1.2345), "1.2");
        assert_eq!(prose_vif(6.13), "6.1");
        assert_eq!(prose_vif(9.96), "10");
        assert_eq!(prose_vif(15.2), "15");
        assert_eq!(prose_vif(3150.4), "3150");
    }

    #[test]
    fn prose_shares_keep_digits_near_the_ends() {
        assert_eq!(prose_percent(0.391), "39%");
        assert_eq!(prose_percent(0.002), "0.2%");
        assert_eq!(prose_percent(0.0003), "0.03%");
        assert_eq!(prose_percent(0.00001), "<0.01%");
        assert_eq!(prose_percent(0.9976), "99.8%");
        assert_eq!(prose_percent(0.99996), ">99.99%"); // 99.996 rounds to 100.00
        assert_eq!(prose_percent(0.9996), "99.96%");
        assert_eq!(prose_percent(1.0), "100%");
        assert_eq!(prose_percent(0.0), "0%");
        assert_eq!(prose_percent(-0.02), "-2%");
        assert_eq!(prose_percent_range(0.2, 0.9976), "20–99.8%");
        assert_eq!(prose_percent_range(-0.02, 0.4), "-2% to 40%");
    }

    #[test]
    fn tolerances_are_written_as_powers_of_ten() {
        assert_eq!(prose_power_of_ten(1e-6), "10^-6");
        assert_eq!(prose_power_of_ten(2.5e-7), "2.5e-7");
    }
}
