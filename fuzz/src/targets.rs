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
    FaultList, LogReader, LogRow, Manifest, Netlist, Radix, SetBytes, Spec, VectorSet, Word,
    EXPECTED_HEX, MANIFEST_JSON, STIMULUS_HEX, VECTORS_CSV,
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

/// Data words per hex file of the small sets the manifest and hex targets read. The example
/// sets hold hundreds of words (tens of kilobytes per file): writing and hashing those on
/// every execution made these two targets run at a few hundred executions a second.
const SMALL_WORDS: usize = 6;

/// `vectors.csv` of the small sets. The set reader only checks its size and SHA-256 against
/// the manifest (the CSV is for people), so a short placeholder stands in for it.
const SMALL_CSV: &str = "index,kind\n";

/// An example set cut to its first [`SMALL_WORDS`] words, with a manifest that matches the
/// cut files (count, sizes, SHA-256s), so a seed reaches the hex parser instead of stopping
/// at the first hash check.
pub struct SmallSet {
    /// The example set's name.
    pub name: &'static str,
    /// The cut set's `manifest.json`.
    pub manifest: String,
    /// The cut `stimulus.hex`.
    pub stimulus: String,
    /// The cut `expected.hex`.
    pub expected: String,
}

/// The first `words` data words of an example set's stimulus (`expected` false) or expected
/// file, with the comments before them; when the file holds fewer, its words repeat (so a
/// file of any length can be matched). The files are split into lines once: walking a whole
/// example file on every execution made the hex target slow.
fn cut_example(k: usize, expected: bool, words: usize) -> String {
    struct Split {
        header: String,
        data: Vec<&'static str>,
    }
    static SPLIT: OnceLock<Vec<[Split; 2]>> = OnceLock::new();
    let split = SPLIT.get_or_init(|| {
        let one = |text: &'static str| {
            let mut header = String::new();
            let mut data = Vec::new();
            for line in text.lines() {
                let t = line.trim();
                if t.is_empty() || t.starts_with("//") {
                    if data.is_empty() {
                        header.push_str(line);
                        header.push('\n');
                    }
                } else {
                    data.push(line);
                }
            }
            Split { header, data }
        };
        SETS.iter()
            .map(|set| [one(set.stimulus), one(set.expected)])
            .collect()
    });
    let s = &split[k][usize::from(expected)];
    let mut out = s.header.clone();
    if !s.data.is_empty() {
        for j in 0..words {
            out.push_str(s.data[j % s.data.len()]);
            out.push('\n');
        }
    }
    out
}

/// Data words of a `$readmemh` text as the set reader counts them (blank lines and `//`
/// comments skipped).
fn count_words(text: &str) -> usize {
    text.lines()
        .filter(|l| {
            let t = l.trim();
            !t.is_empty() && !t.starts_with("//")
        })
        .count()
}

/// The example sets' manifests as read, in [`SETS`] order.
fn example_manifests() -> &'static [Manifest] {
    static PARSED: OnceLock<Vec<Manifest>> = OnceLock::new();
    PARSED.get_or_init(|| {
        SETS.iter()
            .map(|s| Manifest::from_json(s.manifest, "manifest.json").expect("example manifest"))
            .collect()
    })
}

/// Sets the manifest's word count and its records of the files to the given contents (the
/// `vectors.csv` record only when `csv` is given).
fn record_files(
    m: &mut Manifest,
    vectors: usize,
    csv: Option<&[u8]>,
    stimulus: &[u8],
    expected: &[u8],
) {
    m.vectors = vectors as u64;
    for rec in &mut m.files {
        let bytes: &[u8] = match (rec.name.as_str(), csv) {
            (VECTORS_CSV, Some(csv)) => csv,
            (STIMULUS_HEX, _) => stimulus,
            (EXPECTED_HEX, _) => expected,
            _ => continue,
        };
        rec.bytes = bytes.len() as u64;
        rec.sha256 = arithvec::sha256_hex(bytes);
    }
}

/// Example set `k`'s manifest rewritten for `vectors` words and the given file contents.
fn manifest_for(k: usize, vectors: usize, stimulus: &[u8], expected: &[u8]) -> String {
    let mut m = example_manifests()[k].clone();
    record_files(
        &mut m,
        vectors,
        Some(SMALL_CSV.as_bytes()),
        stimulus,
        expected,
    );
    serde_json::to_string_pretty(&m).expect("manifest serialises")
}

/// Example set `k`'s manifest as the hex target gives it to the set reader: without its copy
/// of the normalised spec (null; the set reader identifies the spec by `spec_sha256`) and
/// with [`SMALL_CSV`]'s record, both made once; per input only the count and the two hex
/// files' records change.
fn hex_manifest(k: usize, vectors: usize, stimulus: &[u8], expected: &[u8]) -> Manifest {
    static TEMPLATES: OnceLock<Vec<Manifest>> = OnceLock::new();
    let templates = TEMPLATES.get_or_init(|| {
        example_manifests()
            .iter()
            .map(|m| {
                let mut m = m.clone();
                m.spec = serde_json::Value::Null;
                record_files(&mut m, 0, Some(SMALL_CSV.as_bytes()), b"", b"");
                m
            })
            .collect()
    });
    let mut m = templates[k].clone();
    record_files(&mut m, vectors, None, stimulus, expected);
    m
}

/// The example sets cut to [`SMALL_WORDS`] words, in [`SETS`] order.
pub fn small_sets() -> &'static [SmallSet] {
    static SMALL: OnceLock<Vec<SmallSet>> = OnceLock::new();
    SMALL.get_or_init(|| {
        SETS.iter()
            .enumerate()
            .map(|(k, set)| {
                let stimulus = cut_example(k, false, SMALL_WORDS);
                let expected = cut_example(k, true, SMALL_WORDS);
                SmallSet {
                    name: set.name,
                    manifest: manifest_for(
                        k,
                        SMALL_WORDS,
                        stimulus.as_bytes(),
                        expected.as_bytes(),
                    ),
                    stimulus,
                    expected,
                }
            })
            .collect()
    })
}

/// The manifest reader: the input as `manifest.json` beside the small set's files (see
/// [`small_sets`]), read as `arithvec check --vectors` reads a set.
pub fn manifest(data: &[u8], scratch: &Scratch) {
    let _ = manifest_reads(data, scratch);
}

/// [`manifest`], telling whether the set was read (a seed must be).
pub fn manifest_reads(data: &[u8], scratch: &Scratch) -> bool {
    let text = String::from_utf8_lossy(data);
    let k = pick_set(&text);
    let small = &small_sets()[k];
    read_set(
        scratch,
        k,
        data,
        small.stimulus.as_bytes(),
        small.expected.as_bytes(),
    )
}

/// Which hex file an input stands for: an arithvec header names it, else the length decides
/// (so mutated inputs are tried as both).
fn is_stimulus(text: &str, len: usize) -> bool {
    if text.contains("arithvec expected") {
        false
    } else if text.contains("arithvec stimulus") {
        true
    } else {
        len.is_multiple_of(2)
    }
}

/// Most words the other hex file is given to match the input's count (a larger input is
/// still read, and refused on the count).
const MAX_MATCHED_WORDS: usize = 1 << 16;

/// The `$readmemh` reader: the input as the example set's `stimulus.hex` or `expected.hex`,
/// beside a manifest made for it (its size, SHA-256 and word count) and the other file cut
/// or repeated to the same count, so the words themselves are parsed. The set is read from
/// memory (`VectorSet::from_bytes`: the checks and the hex parser of `VectorSet::read`, which
/// `check --vectors` runs): writing it to the file system and reading it back, as the first
/// version did, cost most of each execution.
pub fn hex(data: &[u8], scratch: &Scratch) {
    let _ = hex_reads(data, scratch);
}

/// [`hex`], telling whether the set was read (a seed must be).
pub fn hex_reads(data: &[u8], scratch: &Scratch) -> bool {
    let text = String::from_utf8_lossy(data);
    let k = pick_set(&text);
    let words = count_words(&text).min(MAX_MATCHED_WORDS);
    let stimulus_input = is_stimulus(&text, data.len());
    let other = cut_example(k, stimulus_input, words);
    let (stimulus, expected) = if stimulus_input {
        (data, other.as_bytes())
    } else {
        (other.as_bytes(), data)
    };
    let manifest = hex_manifest(k, words, stimulus, expected);
    let files = SetBytes {
        vectors_csv: SMALL_CSV.as_bytes(),
        stimulus,
        expected,
    };
    VectorSet::from_bytes(scratch.path(), manifest, &files, &units()[k]).is_ok()
}

/// Writes the set's files into the scratch directory and reads it as the command line does;
/// true when the set was read.
fn read_set(
    scratch: &Scratch,
    k: usize,
    manifest: &[u8],
    stimulus: &[u8],
    expected: &[u8],
) -> bool {
    let dir = scratch.path();
    for (name, bytes) in [
        (VECTORS_CSV, SMALL_CSV.as_bytes()),
        (MANIFEST_JSON, manifest),
        (STIMULUS_HEX, stimulus),
        (EXPECTED_HEX, expected),
    ] {
        std::fs::write(dir.join(name), bytes).expect("scratch file");
    }
    // VectorSet::read reads and verifies the manifest first (arithvec::read_manifest).
    VectorSet::read(dir, &units()[k]).is_ok()
}

/// Writes the small sets (see [`small_sets`]) as seeds: `DIR/manifest/NAME.json`,
/// `DIR/hex/NAME.stimulus.hex` and `DIR/hex/NAME.expected.hex`.
pub fn write_set_seeds(dir: &Path) -> std::io::Result<()> {
    std::fs::create_dir_all(dir.join("manifest"))?;
    std::fs::create_dir_all(dir.join("hex"))?;
    for small in small_sets() {
        let name = small.name;
        std::fs::write(dir.join(format!("manifest/{name}.json")), &small.manifest)?;
        std::fs::write(
            dir.join(format!("hex/{name}.stimulus.hex")),
            &small.stimulus,
        )?;
        std::fs::write(
            dir.join(format!("hex/{name}.expected.hex")),
            &small.expected,
        )?;
    }
    Ok(())
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
