//! The command-line layer (part of the `arithvec` binary, not the library): argument parsing
//! helpers, the `check` and `grade` commands, output files and exit codes.
//!
//! May import only the library's public API (`arithvec::...`) and its own modules.

pub(crate) mod check;
pub(crate) mod grade;
pub(crate) mod import;
pub(crate) mod prove;
pub(crate) mod reach;
pub(crate) mod signals;
pub(crate) mod threads;
pub(crate) mod transition;
pub(crate) mod util;
