//! End-to-end tests of the `arithvec` binary: each test writes small fixtures into a fresh
//! temporary directory, runs the real executable, and checks exit codes, files and reports.
//! One module per subcommand, plus error handling and the shared plumbing in `util`.

mod check;
mod classes;
mod classes_bins;
mod divide;
mod errors;
mod gen;
mod import;
mod machine_output;
mod merge;
mod options;
mod plain_words;
mod plurals;
mod repro;
mod select;
mod select_switch;
mod spec_errors;
#[path = "../support/mod.rs"]
mod support;
mod tables;
mod threads;
mod util;
mod verdict;
mod xz_digits;
