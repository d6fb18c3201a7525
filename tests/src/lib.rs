//! `sprung-tests`: end-to-end tests that drive the built `sprung` binary, fixture tests, and
//! cross-checks against published values and reference libraries. The tests live in `tests/tests/`.
