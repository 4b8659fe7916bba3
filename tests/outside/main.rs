//! tangle's numbers against sources outside the project: values printed by a named
//! publication, and values computed by independent routes in `tests/reference/`.

#[path = "../common/mod.rs"]
mod common;

mod checks;
mod glms;

/// The length guard every check above relies on: an empty or short result is a failure.
#[test]
#[should_panic(expected = "computed and expected: the two lists differ in length")]
fn paired_refuses_lists_of_different_lengths() {
    let computed: Vec<f64> = Vec::new();
    let _ = common::paired(&computed, [1.0, 2.0], "computed and expected");
}
