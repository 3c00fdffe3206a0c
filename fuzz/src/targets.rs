//! One function per reader that faces files written by other tools or by hand: the spec
//! (TOML), the simulator's result log, the vector set's manifest and its `$readmemh` files,
//! and Yosys JSON netlists. Each takes arbitrary bytes and must return without panicking,
//! whatever the bytes are; errors are the expected outcome for most inputs.
//!
//! The AFL++ binaries in `fuzz/src/bin/` call these in a persistent loop, and the main
//! package's `tests/fuzz_corpus.rs` includes this file to replay the checked-in corpus in CI.
//! Only the library's public API is used here, so the fuzzed paths are the ones the command
//! line takes.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use arithvec::{
    FaultList, LogReader, LogRow, Netlist, Radix, Spec, VectorSet, Word, EXPECTED_HEX,
    MANIFEST_JSON, STIMULUS_HEX,
};

/// A scratch directory for the readers that take a directory (the vector set).
pub struct Scratch {
    dir: PathBuf,
}

impl Scratch {
    /// A fresh directory under the system's temporary directory, removed on drop.
    pub fn new() -> Scratch {
        let dir = std::env::temp_dir().join(format!("arithvec-fuzz-{}", std::process::id()));
        std::fs::create_dir_all(&dir).expect("scratch directory");
        Scratch { dir }
    }

    /// A scratch directory at `dir` (created if missing; left in place on drop).
    pub fn at(dir: &Path) -> Scratch {
        std::fs::create_dir_all(dir).expect("scratch directory");
        Scratch {
            dir: dir.to_path_buf(),
        }
    }

    fn path(&self) -> &Path {
        &self.dir
    }
}

impl Default for Scratch {
    fn default() -> Scratch {
        Scratch::new()
    }
}

/// A checked-in example set: its spec and the files of its `vectors/` directory.
struct ExampleSet {
    name: &'static str,
    spec: &'static str,
    manifest: &'static str,
    stimulus: &'static str,
    expected: &'static str,
}

macro_rules! example_set {
    ($name:literal) => {
        ExampleSet {
            name: $name,
            spec: include_str!(concat!("../../vector-sets/", $name, "/", $name, ".toml")),
            manifest: include_str!(concat!(
                "../../vector-sets/",
                $name,
                "/vectors/manifest.json"
            )),
            stimulus: include_str!(concat!(
                "../../vector-sets/",
                $name,
                "/vectors/stimulus.hex"
            )),
            expected: include_str!(concat!(
                "../../vector-sets/",
                $name,
                "/vectors/expected.hex"
            )),
        }
    };
}

const SETS: [ExampleSet; 4] = [
    example_set!("dose_accumulator"),
    example_set!("frame_checksum"),
    example_set!("level_delta"),
    example_set!("limit_compare"),
];

/// Specs of the HDL reference units, for logs of the encodings the example sets lack.
const UNIT_SPECS: [&str; 5] = [
    include_str!("../../tests/hdl/specs/ones_add.toml"),
    include_str!("../../tests/hdl/specs/signmag_add.toml"),
    include_str!("../../tests/hdl/specs/addsub_unit.toml"),
    include_str!("../../tests/hdl/specs/comparator.toml"),
    include_str!("../../tests/hdl/specs/ripple_add.toml"),
];

/// The specs the log target reads logs for: the example sets' first, in [`SETS`] order, then
/// the HDL reference units'.
fn units() -> &'static [Spec] {
    static UNITS: OnceLock<Vec<Spec>> = OnceLock::new();
    UNITS.get_or_init(|| {
        let mut units = Vec::new();
        for set in &SETS {
            units.push(Spec::parse(set.spec, set.name).expect("example spec parses"));
        }
        for (k, text) in UNIT_SPECS.iter().enumerate() {
            units.push(Spec::parse(text, &format!("unit{k}.toml")).expect("unit spec parses"));
        }
        units
    })
}

/// Picks the example set whose unit name appears in `text`, else one by length (so mutated
/// inputs reach every set).
fn pick_set(text: &str) -> usize {
    SETS.iter()
        .position(|s| text.contains(s.name))
        .unwrap_or(text.len() % SETS.len())
}

/// The spec reader: parse, and when the spec is valid, its normalised TOML must read back
/// to the same spec (the check report and merge rely on that round trip).
pub fn spec(data: &[u8], _scratch: &Scratch) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(spec) = Spec::parse(text, "fuzz.toml") {
        let normalised = spec.to_toml();
        let again = Spec::parse(&normalised, "normalised.toml")
            .unwrap_or_else(|e| panic!("normalised spec does not read back: {e}\n{normalised}"));
        assert_eq!(again.to_toml(), normalised, "normalised spec is not stable");
    }
}

/// The result-log reader, against every spec whose ports the header names: the header, then
/// every row (the same line parser `arithvec check` runs on its worker threads). The radix
/// follows the input's length.
pub fn log(data: &[u8], _scratch: &Scratch) {
    let radix = Radix::ALL[data.len() % Radix::ALL.len()];
    for spec in units() {
        let Ok(mut reader) = LogReader::new(data, "fuzz.log", spec, radix) else {
            continue;
        };
        let mut row = LogRow::new();
        // A row error is reported and reading goes on, as `check --lenient` does.
        loop {
            match reader.read_row(&mut row) {
                Ok(true) => {
                    for signal in reader.columns() {
                        if let Some(value) = row.get(*signal) {
                            let _ = value.is_known();
                        }
                    }
                }
                Ok(false) => break,
                Err(_) => continue,
            }
        }
    }
}

/// The manifest reader: the input as `manifest.json` beside the example set's hex files,
/// read as `arithvec check --vectors` reads a set.
pub fn manifest(data: &[u8], scratch: &Scratch) {
    let text = String::from_utf8_lossy(data);
    let set = &SETS[pick_set(&text)];
    read_set(
        scratch,
        set,
        data,
        set.stimulus.as_bytes(),
        set.expected.as_bytes(),
    );
}

/// The `$readmemh` reader: the input as the example set's `stimulus.hex` (even length) or
/// `expected.hex` (odd length) beside its real manifest and other file.
pub fn hex(data: &[u8], scratch: &Scratch) {
    let text = String::from_utf8_lossy(data);
    let set = &SETS[pick_set(&text)];
    if data.len().is_multiple_of(2) {
        read_set(
            scratch,
            set,
            set.manifest.as_bytes(),
            data,
            set.expected.as_bytes(),
        );
    } else {
        read_set(
            scratch,
            set,
            set.manifest.as_bytes(),
            set.stimulus.as_bytes(),
            data,
        );
    }
}

fn read_set(
    scratch: &Scratch,
    set: &ExampleSet,
    manifest: &[u8],
    stimulus: &[u8],
    expected: &[u8],
) {
    let dir = scratch.path();
    for (name, bytes) in [
        (MANIFEST_JSON, manifest),
        (STIMULUS_HEX, stimulus),
        (EXPECTED_HEX, expected),
    ] {
        std::fs::write(dir.join(name), bytes).expect("scratch file");
    }
    let spec = &units()[SETS.iter().position(|s| s.name == set.name).unwrap_or(0)];
    let _ = arithvec::read_manifest(dir);
    let _ = VectorSet::read(dir, spec);
}

/// The Yosys JSON reader: every module of the file (at most eight), and for a netlist that
/// reads, one evaluation and its fault list.
pub fn netlist(data: &[u8], _scratch: &Scratch) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let mut names: Vec<String> = vec!["top".into()];
    if let Ok(serde_json::Value::Object(file)) = serde_json::from_str::<serde_json::Value>(text) {
        if let Some(serde_json::Value::Object(modules)) = file.get("modules") {
            names = modules.keys().take(8).cloned().collect();
        }
    }
    for name in &names {
        let Ok(netlist) = Netlist::from_yosys_json(text, "fuzz.json", name) else {
            continue;
        };
        let zeros: Vec<Word> = netlist.inputs().iter().map(|_| Word::ZERO).collect();
        let _ = netlist.eval(&zeros);
        let inputs = vec![0x5555_5555_5555_5555u64; netlist.input_nets().len()];
        let mut outputs = vec![0u64; netlist.output_nets().len()];
        let _ = netlist.eval_parallel(&inputs, &mut outputs);
        let faults = FaultList::new(&netlist);
        let _ = faults.collapsed();
    }
}
