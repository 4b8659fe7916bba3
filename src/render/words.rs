//! Words around numbers: counts with their noun, and lists as English writes them.

/// "1 run", "3 runs".
pub fn count(n: usize, one: &str, many: &str) -> String {
    if n == 1 {
        format!("1 {one}")
    } else {
        format!("{n} {many}")
    }
}

/// "a", "a and b", "a, b and c"; empty for no items.
pub fn and_list(items: &[String]) -> String {
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
    fn lists_read_as_english() {
        let items = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        assert_eq!(and_list(&items(&[])), "");
        assert_eq!(and_list(&items(&["a"])), "a");
        assert_eq!(and_list(&items(&["a", "b"])), "a and b");
        assert_eq!(and_list(&items(&["a", "b", "c"])), "a, b and c");
        assert_eq!(count(1, "run", "runs"), "1 run");
        assert_eq!(count(3, "run", "runs"), "3 runs");
    }
}
