//! The fuzz targets of arithvec's readers. `targets.rs` is shared with the main package's
//! `tests/fuzz_corpus.rs`, which replays the checked-in corpus through the same functions.

#[path = "targets.rs"]
pub mod targets;
