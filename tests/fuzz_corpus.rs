//! Issue 14: the fuzzers' checked-in corpus (fuzz/corpus/READER/), replayed through the same
//! target functions the AFL++ harness runs (fuzz/src/targets.rs, included here), so every
//! input a fuzzer kept, including any that once crashed a reader, is an ordinary test in CI:
//! each must be read without a panic. scripts/fuzz-readers.sh runs the fuzzers themselves.

#[path = "../fuzz/src/targets.rs"]
#[allow(dead_code)]
mod targets;

use std::path::Path;

type Target = fn(&[u8], &targets::Scratch);

fn replay(reader: &str, target: Target) {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz/corpus")
        .join(reader);
    let mut files: Vec<_> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("corpus {}: {e}", dir.display()))
        .map(|e| e.expect("corpus entry").path())
        .collect();
    files.sort();
    assert!(!files.is_empty(), "the {reader} corpus is empty");
    let scratch_dir = tempfile::tempdir().expect("scratch directory");
    let scratch = targets::Scratch::at(scratch_dir.path());
    for file in &files {
        let data = std::fs::read(file).expect("read corpus file");
        let outcome =
            std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| target(&data, &scratch)));
        assert!(
            outcome.is_ok(),
            "the {reader} reader panicked on {}",
            file.display()
        );
    }
}

#[test]
fn issue14_spec_corpus_reads_without_panic() {
    replay("spec", targets::spec);
}

#[test]
fn issue14_log_corpus_reads_without_panic() {
    replay("log", targets::log);
}

#[test]
fn issue14_manifest_corpus_reads_without_panic() {
    replay("manifest", targets::manifest);
}

#[test]
fn issue14_hex_corpus_reads_without_panic() {
    replay("hex", targets::hex);
}

#[test]
fn issue14_netlist_corpus_reads_without_panic() {
    replay("netlist", targets::netlist);
}
