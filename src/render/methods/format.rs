//! Numbers and lists as the methods text writes them.

/// The dependency tolerance as written in a paper: 10^-6 rather than 0.000001.
pub(super) fn tolerance(value: f64) -> String {
    if value > 0.0 && value.is_finite() {
        let exponent = value.log10();
        if (exponent - exponent.round()).abs() < 1e-9 {
            return format!("10^{}", exponent.round() as i64);
        }
    }
    format!("{value:e}")
}

/// VIFs: two significant digits below 10, whole numbers from 10 on (1.2, 6.1, 15, 3150).
pub(super) fn vif(value: f64) -> String {
    if value < 9.95 {
        format!("{value:.1}")
    } else {
        format!("{value:.0}")
    }
}

/// A share as a percentage: whole percent, with more digits near 0% and 100% so that a
/// small share is not shown as none and a large one not as all.
pub(super) fn percent(share: f64) -> String {
    format!("{}%", percent_number(share))
}

pub(super) fn percent_range(low: f64, high: f64) -> String {
    if low < 0.0 {
        format!("{} to {}", percent(low), percent(high))
    } else {
        format!("{}–{}%", percent_number(low), percent_number(high))
    }
}

fn percent_number(share: f64) -> String {
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

pub(super) fn count(n: usize, one: &str, many: &str) -> String {
    if n == 1 {
        format!("1 {one}")
    } else {
        format!("{n} {many}")
    }
}

/// "a", "a and b", "a, b and c".
pub(super) fn list(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vifs_are_rounded_as_documented() {
        assert_eq!(vif(1.2345), "1.2");
        assert_eq!(vif(6.13), "6.1");
        assert_eq!(vif(9.96), "10");
        assert_eq!(vif(15.2), "15");
        assert_eq!(vif(3150.4), "3150");
    }

    #[test]
    fn shares_keep_digits_near_the_ends() {
        assert_eq!(percent(0.391), "39%");
        assert_eq!(percent(0.002), "0.2%");
        assert_eq!(percent(0.0003), "0.03%");
        assert_eq!(percent(0.00001), "<0.01%");
        assert_eq!(percent(0.9976), "99.8%");
        assert_eq!(percent(0.99996), ">99.99%"); // 99.996 rounds to 100.00
        assert_eq!(percent(0.9996), "99.96%");
        assert_eq!(percent(1.0), "100%");
        assert_eq!(percent(0.0), "0%");
        assert_eq!(percent(-0.02), "-2%");
        assert_eq!(percent_range(0.2, 0.9976), "20–99.8%");
        assert_eq!(percent_range(-0.02, 0.4), "-2% to 40%");
    }

    #[test]
    fn lists_read_as_english() {
        let items = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        assert_eq!(list(&items(&[])), "");
        assert_eq!(list(&items(&["a"])), "a");
        assert_eq!(list(&items(&["a", "b"])), "a and b");
        assert_eq!(list(&items(&["a", "b", "c"])), "a, b and c");
    }

    #[test]
    fn tolerance_is_written_as_a_power_of_ten() {
        assert_eq!(tolerance(1e-6), "10^-6");
        assert_eq!(tolerance(2.5e-7), "2.5e-7");
    }
}
