//! tangle's numbers against sources outside the project: values printed by a named
//! publication, and values computed by independent routes in `tests/reference/`.

mod checks;
