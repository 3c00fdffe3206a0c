//! A vector set on disk: `vectors.csv`, `stimulus.hex`, `expected.hex` and `manifest.json`
//! in one directory, written atomically and read back.
//!
//! Writing streams: vectors are produced and formatted in chunks on worker threads and
//! written in order, so memory stays flat however many vectors there are. Every file goes to
//! a temporary name first and is renamed into place only when all of them are complete, the
//! manifest last; an interrupted run leaves the previous set intact. Same spec and seed give
//! byte-identical files (no dates, no host names, fixed formatting).

use std::collections::BTreeMap;
use std::fs::File;
use std::io::{BufRead, BufReader, Write};
use std::path::{Path, PathBuf};

use crossbeam_channel as channel;

use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use crate::arith::model::{Inputs, Outputs};
use crate::arith::word::Word;
use crate::corners::classes::Hits;
use crate::corners::generate::{evaluate_vector, Generator};
use crate::error::{Error, Problem, Result};
use crate::sets::commit::Staging;
use crate::sets::hexfile::{header, Packer};
use crate::sets::layout::{Layout, WordLayout};
use crate::spec::{Signal, Spec};

/// File names inside a vector-set directory.
pub const VECTORS_CSV: &str = "vectors.csv";
/// Packed inputs.
pub const STIMULUS_HEX: &str = "stimulus.hex";
/// Packed expected outputs.
pub const EXPECTED_HEX: &str = "expected.hex";
/// The manifest.
pub const MANIFEST_JSON: &str = "manifest.json";

/// Which slice of the set to write: shard `index` of `count` (0-based).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    /// This shard, 0-based.
    pub index: u64,
    /// Number of shards.
    pub count: u64,
}

impl Shard {
    /// The vector index range of this shard within `total` vectors.
    pub fn range(&self, total: u64) -> std::ops::Range<u64> {
        let at = |i: u64| ((total as u128 * i as u128) / self.count as u128) as u64;
        at(self.index)..at(self.index + 1)
    }
}

/// One file's record in the manifest.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileRecord {
    /// File name inside the directory.
    pub name: String,
    /// Size in bytes.
    pub bytes: u64,
    /// SHA-256, lowercase hex.
    pub sha256: String,
}

/// Field position in the manifest's layout.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct ManifestField {
    /// Port name.
    pub name: String,
    /// arithvec signal key (`a`, `carry_in`, `result`, ...).
    pub signal: String,
    /// Highest bit.
    pub msb: u32,
    /// Lowest bit.
    pub lsb: u32,
}

/// One packed word's layout in the manifest.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct ManifestWord {
    /// Bits per word.
    pub width: u32,
    /// Hex digits per line.
    pub digits: u32,
    /// Fields, highest first.
    pub fields: Vec<ManifestField>,
}

impl ManifestWord {
    pub(crate) fn of(layout: &WordLayout) -> ManifestWord {
        ManifestWord {
            width: layout.width,
            digits: layout.hex_digits(),
            fields: layout
                .fields
                .iter()
                .map(|f| ManifestField {
                    name: f.name.clone(),
                    signal: f.signal.key().to_string(),
                    msb: f.msb,
                    lsb: f.lsb,
                })
                .collect(),
        }
    }
}

/// The manifest's field layouts.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct ManifestLayout {
    /// `stimulus.hex`.
    pub stimulus: ManifestWord,
    /// `expected.hex`.
    pub expected: ManifestWord,
}

/// `manifest.json`: what was generated, from what, and the files' hashes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Manifest {
    /// Always "arithvec".
    pub tool: String,
    /// arithvec's version.
    pub version: String,
    /// The unit name.
    pub unit: String,
    /// The normalised spec (every default filled in).
    pub spec: serde_json::Value,
    /// SHA-256 of the normalised spec without its `[random]` table: the unit's identity.
    pub spec_sha256: String,
    /// The seed used.
    pub seed: u64,
    /// Directed vectors (indices 0..directed).
    pub directed: u64,
    /// Random vectors after them.
    pub random: u64,
    /// directed + random.
    pub total: u64,
    /// The shard this directory holds, if the run was sharded.
    pub shard: Option<Shard>,
    /// First vector index in these files.
    pub first_index: u64,
    /// Vectors in these files.
    pub vectors: u64,
    /// Field layouts.
    pub layout: ManifestLayout,
    /// The files and their hashes.
    pub files: Vec<FileRecord>,
    /// For a set chosen from a larger one (`grade --compact`): which vectors of the source
    /// set these are, in file order. Vector p of these files is source vector `indices[p]`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub selection: Option<Selection>,
    /// For a set holding vectors given from outside (`arithvec import`, `gen --append`):
    /// where they came from and where they sit. Readers take those vectors from
    /// `stimulus.hex` (checked against its SHA-256) instead of regenerating them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub imported: Option<Imported>,
    /// For a set with launch/capture pairs (`gen --pairs`): where they sit. Readers rebuild
    /// them from the spec, as they rebuild the other directed vectors. In a selection it
    /// describes the source set (the selection's own order is its file order).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pairs: Option<PairLayout>,
}

/// The launch/capture pairs of a set (see [`Manifest::pairs`]).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct PairLayout {
    /// Always `launch-capture`: vector `first_index + 2k` is the launch vector of pair k and
    /// `first_index + 2k + 1` its capture vector, applied in consecutive cycles.
    pub layout: String,
    /// Index of the first launch vector (the directed corner vectors come before it).
    pub first_index: u64,
    /// Number of pairs (they take `2 x pairs` vectors, the last of the directed part).
    pub pairs: u64,
    /// The families, in order: `chain` (a carry or borrow launched into chains of every
    /// length) and `cell` (every change of every cell's inputs).
    pub families: Vec<String>,
}

impl PairLayout {
    /// The layout of `generator`'s pairs, if it has any.
    pub fn of(generator: &Generator) -> Option<PairLayout> {
        generator
            .transition_pair_block()
            .map(|(first_index, pairs)| PairLayout {
                layout: PAIR_LAYOUT.to_string(),
                first_index,
                pairs,
                families: vec!["chain".to_string(), "cell".to_string()],
            })
    }
}

/// [`PairLayout::layout`]'s one value.
pub const PAIR_LAYOUT: &str = "launch-capture";

/// The provenance of imported vectors (see [`Manifest::imported`]).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Imported {
    /// The CSV file the vectors were read from, as named on the command line.
    pub file: String,
    /// SHA-256 of that file's bytes when it was read.
    pub csv_sha256: String,
    /// Index of the first imported vector: 0 for `arithvec import`, directed + random for
    /// `gen --append`.
    pub first_index: u64,
    /// How many vectors were imported (they run to the end of the set).
    pub vectors: u64,
}

/// Where imported vectors came from, as given to [`write_imported`].
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ImportSource {
    /// The CSV file, as named on the command line.
    pub file: String,
    /// SHA-256 of its bytes.
    pub sha256: String,
}

/// The provenance of a selected (compacted) vector set.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Selection {
    /// Directed vectors of the source set.
    pub source_directed: u64,
    /// Random vectors of the source set.
    pub source_random: u64,
    /// Source indices, in file order.
    pub indices: Vec<u64>,
    /// Vectors `grade --top-up` added after the selected ones: position `indices.len() + k`
    /// of these files is `top_up[k]`. They are not in the source set, so their operands are
    /// recorded here (and a failing one has no seed index to reproduce it from).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub top_up: Vec<TopUpVector>,
}

/// One vector added by test top-up: its operands and why it was added.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct TopUpVector {
    /// Input values by signal key (`a`, `b`, `carry_in`, `mode`), lowercase hex of the
    /// signal's width.
    pub inputs: BTreeMap<String, String>,
    /// The fault it was made for, as the grade report names it (`net stuck-at-v (site)`).
    pub fault: String,
    /// The netlist module the fault is in.
    pub module: String,
    /// How it was found.
    pub method: String,
}

impl TopUpVector {
    /// The operands, checked against `spec`: every input signal of the spec present, each a
    /// hex value that fits its width, and no other key. `file` and `k` name it in errors.
    pub fn operands(&self, spec: &Spec, file: &str, k: usize) -> Result<Inputs> {
        let mut inputs = Inputs::default();
        let mut problems = Vec::new();
        let field = |key: &str| format!("selection.top_up[{k}].inputs.{key}");
        for (sig, _) in spec.inputs() {
            match self.inputs.get(sig.key()) {
                Some(hex) => match Word::parse_hex(hex) {
                    Some(w) if w.significant_bits() <= spec.signal_width(sig) => inputs.set(sig, w),
                    _ => problems.push(
                        Problem::new(
                            file,
                            format!(
                                "\"{hex}\" is not a hex value of {} bits",
                                spec.signal_width(sig)
                            ),
                        )
                        .field(field(sig.key())),
                    ),
                },
                None => problems.push(
                    Problem::new(file, "the top-up vector lacks this input")
                        .field(field(sig.key())),
                ),
            }
        }
        for key in self.inputs.keys() {
            if !spec.inputs().iter().any(|(s, _)| s.key() == key) {
                problems
                    .push(Problem::new(file, "not an input signal of the spec").field(field(key)));
            }
        }
        if problems.is_empty() {
            Ok(inputs)
        } else {
            Err(Error::input(problems))
        }
    }
}

/// SHA-256 of `bytes` as lowercase hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    hex_of(&Sha256::digest(bytes))
}

/// `bytes` as lowercase hex, two digits a byte (a table look-up: formatting each byte with
/// `format!` cost the hex fuzzer a tenth of every execution, eight digests each).
fn hex_of(bytes: &[u8]) -> String {
    const DIGITS: &[u8; 16] = b"0123456789abcdef";
    let mut s = String::with_capacity(2 * bytes.len());
    for &b in bytes {
        s.push(DIGITS[usize::from(b >> 4)] as char);
        s.push(DIGITS[usize::from(b & 0xf)] as char);
    }
    s
}

/// The unit identity hash: the normalised spec without `[random]` and `[dut]`.
///
/// The identity is what determines the vectors and their files: name (it heads the files),
/// operation, width, encoding, ports and conventions. `[random]`'s count and seed are
/// recorded in the manifest on their own (reports of several seeds merge); `[dut]` only
/// names the module a testbench or netlist instantiates, so changing it leaves the set valid;
/// `[timing]` (clock, latency, handshakes) likewise only shapes the testbench.
pub fn spec_identity(spec: &Spec) -> String {
    let mut v: serde_json::Value = serde_json::from_str(&spec.normalised_json()).expect("json");
    if let Some(o) = v.as_object_mut() {
        o.remove("random");
        o.remove("dut");
        // `[timing]` says how a testbench drives the unit in time, not what the vectors are.
        o.remove("timing");
    }
    sha256_hex(v.to_string().as_bytes())
}

/// Options for [`write`].
#[derive(Default)]
pub struct WriteOptions<'a> {
    /// Write only this shard.
    pub shard: Option<Shard>,
    /// Called now and then with the number of vectors written so far.
    pub progress: Option<&'a mut dyn FnMut(u64)>,
    /// Formatting threads (0: one per core), besides one writer thread per file. The files
    /// are the same for every value.
    pub threads: usize,
}

/// Formats vectors into the three files' bytes.
struct Formatter<'a> {
    generator: &'a Generator,
    stimulus: Packer,
    expected: Packer,
    inputs: Vec<(Signal, u32)>,
    outputs: Vec<(Signal, u32)>,
    /// The fast path for units up to 64 bits whose packed words fit in 256 bits.
    narrow: Option<NarrowRows>,
}

/// Precomputed row shapes for the fast path: hex digits per CSV field and where each field
/// sits in the packed words.
struct NarrowRows {
    /// The CSV's value columns: (signal number, hex digits), inputs then outputs.
    columns: Vec<(usize, usize)>,
    stimulus: NarrowWord,
    expected: NarrowWord,
}

/// Every signal's value (low 64 bits), indexed by `Signal as usize`, so the row writer
/// reads fields by number instead of matching on the signal per field.
#[inline]
fn signal_values(i: &Inputs, o: &Outputs) -> [u64; Signal::ALL.len()] {
    [
        i.a.low_u64(),
        i.b.low_u64(),
        i.carry_in as u64,
        i.mode as u64,
        o.result.low_u64(),
        o.carry_out as u64,
        o.overflow as u64,
        o.zero as u64,
        o.negative as u64,
        o.less as u64,
        o.equal as u64,
        o.greater as u64,
        i.b.low_u64(),
        o.result.low_u64(),
        o.remainder.low_u64(),
        o.div_by_zero as u64,
        i.select as u64,
        o.overflow as u64,
    ]
}

/// One packed word of the fast path: (signal number, lowest bit, mask) per field and its
/// digits. Words up to 128 bits are packed into a `u128`; words up to 256 bits (a 64-bit
/// divider's quotient, remainder and flags) into four 64-bit limbs.
struct NarrowWord {
    fields: Vec<(usize, u32, u64)>,
    digits: usize,
}

impl NarrowWord {
    fn of(layout: &WordLayout) -> Option<NarrowWord> {
        (layout.width <= 256).then(|| NarrowWord {
            fields: layout
                .fields
                .iter()
                .map(|f| {
                    let mask = u64::MAX >> (64 - f.width().min(64));
                    (f.signal as usize, f.lsb, mask)
                })
                .collect(),
            digits: layout.hex_digits() as usize,
        })
    }

    /// The packed word, as [`Packer::push_line`] packs it (words of at most 128 bits).
    #[inline]
    fn pack(&self, values: &[u64; Signal::ALL.len()]) -> u128 {
        let mut packed = 0u128;
        for &(signal, lsb, mask) in &self.fields {
            packed |= ((values[signal] & mask) as u128) << lsb;
        }
        packed
    }

    /// The packed word as four little-endian limbs (words of at most 256 bits).
    #[inline]
    fn pack_limbs(&self, values: &[u64; Signal::ALL.len()]) -> [u64; 4] {
        let mut limbs = [0u64; 4];
        for &(signal, lsb, mask) in &self.fields {
            let v = values[signal] & mask;
            let (limb, shift) = ((lsb / 64) as usize, lsb % 64);
            limbs[limb] |= v << shift;
            if shift > 0 && limb + 1 < 4 {
                limbs[limb + 1] |= v >> (64 - shift);
            }
        }
        limbs
    }

    /// Writes the packed word's hex digits to `line`.
    #[inline]
    fn write(&self, values: &[u64; Signal::ALL.len()], line: &mut Line) {
        if self.digits <= 32 {
            line.hex128(self.pack(values), self.digits);
        } else {
            let limbs = self.pack_limbs(values);
            let top = self.digits.div_ceil(16);
            line.hex(limbs[top - 1], self.digits - 16 * (top - 1));
            for k in (0..top - 1).rev() {
                line.hex(limbs[k], 16);
            }
        }
    }
}

/// Two lowercase hex digits per byte value.
const HEX_PAIRS: [[u8; 2]; 256] = {
    const HEX: &[u8; 16] = b"0123456789abcdef";
    let mut t = [[0u8; 2]; 256];
    let mut i = 0;
    while i < 256 {
        t[i] = [HEX[i >> 4], HEX[i & 15]];
        i += 1;
    }
    t
};

/// The formatted bytes of one chunk.
#[derive(Default)]
struct Chunk {
    csv: Vec<u8>,
    stimulus: Vec<u8>,
    expected: Vec<u8>,
}

impl Formatter<'_> {
    fn format_range(&self, range: std::ops::Range<u64>, chunk: &mut Chunk) {
        let cat = self.generator.catalogue();
        let d = self.generator.directed().len() as u64;
        let mut hits = Hits::new();
        let mut classes = String::new();
        let mut stream = None;
        // Random vectors repeat a handful of class sets; remember their texts, keyed by the
        // set as a bit mask (catalogues of up to 128 classes) or as the list itself.
        let mut cache: Vec<(u128, Vec<u16>, String)> = Vec::new();
        let rows = (range.end - range.start) as usize;
        if let Some(n) = &self.narrow {
            chunk.csv.reserve(rows * 96);
            chunk.stimulus.reserve(rows * (n.stimulus.digits + 1));
            chunk.expected.reserve(rows * (n.expected.digits + 1));
        }
        let appended_from = d + self.generator.random_count();
        // A select unit's `select.switch` bin needs the code of the vector before.
        let select = cat.is_select();
        let mut previous = match (select, range.start) {
            (true, i) if i > 0 => self.generator.vector(i - 1).map(|v| v.select),
            _ => None,
        };
        for index in range {
            let inputs = if index < d {
                self.generator.directed()[index as usize]
            } else if index >= appended_from {
                self.generator.appended()[(index - appended_from) as usize]
            } else {
                stream
                    .get_or_insert_with(|| self.generator.random_stream(index - d))
                    .next_inputs()
            };
            let (outputs, mut mask) = cat.evaluate_class_mask(&inputs, &mut hits);
            if select {
                if let Some(c) = cat.record_switch(previous, inputs.select, &mut hits) {
                    mask = mask.map(|m| m | 1 << c);
                }
                previous = Some(inputs.select);
            }
            let found = cache.iter().position(|(k, set, _)| match mask {
                Some(m) => *k == m,
                None => set.as_slice() == hits.classes(),
            });
            let text = match found {
                Some(i) => &cache[i].2,
                None => {
                    classes.clear();
                    match mask {
                        Some(m) => cat.class_list_of_mask(m, &mut classes),
                        None => cat.class_list(&hits, &mut classes),
                    }
                    if cache.len() < 64 {
                        let set = if mask.is_some() {
                            Vec::new()
                        } else {
                            hits.classes().to_vec()
                        };
                        cache.push((mask.unwrap_or(0), set, classes.clone()));
                        &cache[cache.len() - 1].2
                    } else {
                        &classes
                    }
                }
            };
            match &self.narrow {
                Some(n) => push_row_narrow(n, index, &inputs, &outputs, text, chunk),
                None => self.push_row(index, &inputs, &outputs, text, chunk),
            }
        }
    }

    fn push_row(
        &self,
        index: u64,
        inputs: &Inputs,
        outputs: &Outputs,
        classes: &str,
        chunk: &mut Chunk,
    ) {
        push_decimal(index, &mut chunk.csv);
        for &(s, w) in &self.inputs {
            chunk.csv.push(b',');
            push_hex(&inputs.get(s), w, &mut chunk.csv);
        }
        for &(s, w) in &self.outputs {
            chunk.csv.push(b',');
            push_hex(&outputs.get(s), w, &mut chunk.csv);
        }
        chunk.csv.push(b',');
        chunk.csv.extend_from_slice(classes.as_bytes());
        chunk.csv.push(b'\n');
        self.stimulus
            .push_line(|s| inputs.get(s), &mut chunk.stimulus);
        self.expected
            .push_line(|s| outputs.get(s), &mut chunk.expected);
    }
}

/// A row being built on the stack, appended to its file in one copy.
struct Line {
    bytes: [u8; 256],
    len: usize,
}

impl Line {
    fn new() -> Line {
        Line {
            bytes: [0; 256],
            len: 0,
        }
    }

    #[inline]
    fn byte(&mut self, b: u8) {
        self.bytes[self.len] = b;
        self.len += 1;
    }

    /// The low `digits` hex digits of `v` (at most 32).
    #[inline]
    fn hex128(&mut self, v: u128, digits: usize) {
        if digits > 16 {
            self.hex((v >> 64) as u64, digits - 16);
            self.hex(v as u64, 16);
        } else {
            self.hex(v as u64, digits);
        }
    }

    /// The low `digits` hex digits of `v` (at most 16), two at a time from the right.
    #[inline]
    fn hex(&mut self, v: u64, digits: usize) {
        let start = self.len;
        let mut at = start + digits;
        self.len = at;
        let mut x = v;
        while at >= start + 2 {
            at -= 2;
            self.bytes[at..at + 2].copy_from_slice(&HEX_PAIRS[(x & 0xff) as usize]);
            x >>= 8;
        }
        if at > start {
            self.bytes[start] = HEX_PAIRS[(x & 0xf) as usize][1];
        }
    }

    /// `v` in decimal.
    #[inline]
    fn decimal(&mut self, v: u64) {
        let mut buf = [0u8; 20];
        let mut at = buf.len();
        let mut x = v;
        loop {
            at -= 1;
            buf[at] = b'0' + (x % 10) as u8;
            x /= 10;
            if x == 0 {
                break;
            }
        }
        let n = buf.len() - at;
        self.bytes[self.len..self.len + n].copy_from_slice(&buf[at..]);
        self.len += n;
    }

    fn flush(&mut self, out: &mut Vec<u8>) {
        out.extend_from_slice(&self.bytes[..self.len]);
        self.len = 0;
    }
}

/// [`Formatter::push_row`] for the fast path: the same bytes, written from 64-bit values
/// with a two-digit table into a stack buffer. The buffer's 256 bytes are ample: a row's
/// numbers are the index (at most 20 digits) and the fields of the two packed words (at
/// most 512 bits in at most 17 fields: at most 128 + 17 digits) with their commas, under
/// 190 bytes; a packed word's line is at most 64 digits; the class list is copied after
/// them.
#[inline]
fn push_row_narrow(
    n: &NarrowRows,
    index: u64,
    inputs: &Inputs,
    outputs: &Outputs,
    classes: &str,
    chunk: &mut Chunk,
) {
    let values = signal_values(inputs, outputs);
    let mut line = Line::new();
    line.decimal(index);
    for &(s, digits) in &n.columns {
        line.byte(b',');
        line.hex(values[s], digits);
    }
    line.byte(b',');
    line.flush(&mut chunk.csv);
    chunk.csv.extend_from_slice(classes.as_bytes());
    chunk.csv.push(b'\n');
    n.stimulus.write(&values, &mut line);
    line.byte(b'\n');
    line.flush(&mut chunk.stimulus);
    n.expected.write(&values, &mut line);
    line.byte(b'\n');
    line.flush(&mut chunk.expected);
}

/// The CSV header row (with newline).
pub fn csv_header(spec: &Spec) -> String {
    let mut s = String::from("index");
    for (_, name) in spec.inputs().into_iter().chain(spec.outputs()) {
        s.push(',');
        s.push_str(name);
    }
    s.push_str(",classes\n");
    s
}

/// Formats vector `index` as its CSV row, exactly as in `vectors.csv` (with newline).
pub fn csv_row(generator: &Generator, spec: &Spec, index: u64, inputs: &Inputs) -> String {
    let f = formatter(generator, spec);
    let mut hits = Hits::new();
    let mut classes = String::new();
    // The select.switch bin needs the vector before.
    let previous = index
        .checked_sub(1)
        .filter(|_| generator.catalogue().is_select())
        .and_then(|i| generator.vector(i))
        .map(|v| v.select);
    let outputs = evaluate_vector(
        generator.catalogue(),
        previous,
        inputs,
        &mut hits,
        Some(&mut classes),
    );
    let mut chunk = Chunk::default();
    f.push_row(index, inputs, &outputs, &classes, &mut chunk);
    String::from_utf8(chunk.csv).expect("ascii")
}

fn formatter<'a>(generator: &'a Generator, spec: &Spec) -> Formatter<'a> {
    let layout = Layout::for_spec(spec);
    let columns = spec
        .inputs()
        .into_iter()
        .chain(spec.outputs())
        .map(|(s, _)| (s as usize, spec.signal_width(s).div_ceil(4) as usize))
        .collect();
    let narrow = match (
        spec.width <= 64
            && Signal::ALL
                .into_iter()
                .all(|s| !spec.has(s) || spec.signal_width(s) <= 64),
        NarrowWord::of(&layout.stimulus),
        NarrowWord::of(&layout.expected),
    ) {
        (true, Some(stimulus), Some(expected)) => Some(NarrowRows {
            columns,
            stimulus,
            expected,
        }),
        _ => None,
    };
    Formatter {
        narrow,
        generator,
        stimulus: Packer::new(&layout.stimulus),
        expected: Packer::new(&layout.expected),
        inputs: spec
            .inputs()
            .iter()
            .map(|(s, _)| (*s, spec.signal_width(*s)))
            .collect(),
        outputs: spec
            .outputs()
            .iter()
            .map(|(s, _)| (*s, spec.signal_width(*s)))
            .collect(),
    }
}

fn push_decimal(mut v: u64, out: &mut Vec<u8>) {
    let mut buf = [0u8; 20];
    let mut i = buf.len();
    loop {
        i -= 1;
        buf[i] = b'0' + (v % 10) as u8;
        v /= 10;
        if v == 0 {
            break;
        }
    }
    out.extend_from_slice(&buf[i..]);
}

fn push_hex(w: &Word, width: u32, out: &mut Vec<u8>) {
    const HEX: &[u8; 16] = b"0123456789abcdef";
    let digits = width.div_ceil(4);
    if width <= 64 {
        let v = w.low_u64();
        for d in (0..digits).rev() {
            out.push(HEX[((v >> (d * 4)) & 0xf) as usize]);
        }
    } else {
        let limbs = w.limbs();
        for d in (0..digits).rev() {
            out.push(HEX[((limbs[(d / 16) as usize] >> ((d % 16) * 4)) & 0xf) as usize]);
        }
    }
}

/// Buffers in circulation per file: enough to keep every worker busy while the writers
/// catch up, few enough to keep memory flat.
fn buffers_per_file(threads: usize) -> u64 {
    2 * threads as u64 + 2
}

/// A writer thread's loop: takes chunk `c`'s bytes of one file from any worker, in any
/// order, writes and hashes them in chunk order, and hands each spent buffer back on
/// `free`. `None` in place of bytes says a worker failed: the writer stops. On a write
/// error it stops too; its dropped channels tell the others.
fn write_in_order(
    mut file: PendingFile,
    parts: channel::Receiver<(u64, Option<Vec<u8>>)>,
    free: channel::Sender<Vec<u8>>,
) -> Result<PendingFile> {
    let mut parked = BTreeMap::new();
    let mut next = 0u64;
    for (c, bytes) in parts {
        let Some(bytes) = bytes else {
            let failed = std::io::Error::other("a formatting worker failed");
            return Err(Error::io(&file.tmp, failed));
        };
        parked.insert(c, bytes);
        while let Some(mut bytes) = parked.remove(&next) {
            file.write(&bytes)?;
            next += 1;
            bytes.clear();
            // The dispatcher may have stopped taking buffers back; nothing is lost then.
            let _ = free.send(bytes);
        }
    }
    Ok(file)
}

/// A file being written under a temporary name, hashing as it goes.
struct PendingFile {
    path: PathBuf,
    tmp: PathBuf,
    file: std::io::BufWriter<File>,
    hasher: Sha256,
    bytes: u64,
}

impl PendingFile {
    fn create(dir: &Path, name: &str) -> Result<PendingFile> {
        let path = dir.join(name);
        let tmp = dir.join(format!(".{name}.tmp"));
        let file = File::create(&tmp).map_err(|e| Error::io(&tmp, e))?;
        Ok(PendingFile {
            path,
            tmp,
            file: std::io::BufWriter::with_capacity(1 << 20, file),
            hasher: Sha256::new(),
            bytes: 0,
        })
    }

    fn write(&mut self, data: &[u8]) -> Result<()> {
        self.hasher.update(data);
        self.bytes += data.len() as u64;
        self.file
            .write_all(data)
            .map_err(|e| Error::io(&self.tmp, e))
    }

    /// Flushes and syncs; returns the record. The file keeps its temporary name.
    fn finish(mut self) -> Result<(FileRecord, PathBuf, PathBuf)> {
        self.file.flush().map_err(|e| Error::io(&self.tmp, e))?;
        self.file
            .get_ref()
            .sync_all()
            .map_err(|e| Error::io(&self.tmp, e))?;
        let name = self
            .path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        let record = FileRecord {
            name,
            bytes: self.bytes,
            sha256: hex_of(&self.hasher.finalize()),
        };
        Ok((record, self.tmp, self.path))
    }
}

/// Writes the vector set of `generator` for `spec` into `dir` (created if missing) and
/// returns its manifest.
pub fn write(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    options: WriteOptions<'_>,
) -> Result<Manifest> {
    let source = ImportSource {
        file: "(given by a library caller)".into(),
        sha256: String::new(),
    };
    write_set(generator, spec, dir, options, &source)
}

/// [`write`] for a generator with appended (imported) vectors: the manifest records
/// `source` as their provenance. A shard of such a set is refused: its readers need every
/// imported vector in the files.
pub fn write_imported(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    options: WriteOptions<'_>,
    source: &ImportSource,
) -> Result<Manifest> {
    if options.shard.is_some() {
        return Err(Error::problem(
            Problem::new(
                "--shard",
                "a set with imported vectors is written whole; leave out --shard",
            )
            .field("shard"),
        ));
    }
    write_set(generator, spec, dir, options, source)
}

fn write_set(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    mut options: WriteOptions<'_>,
    source: &ImportSource,
) -> Result<Manifest> {
    // Everything goes into a staging directory beside `dir`, which one rename makes the set
    // (see `sets::commit`); a failure anywhere removes the staging directory (on drop).
    let target = dir;
    let staging = Staging::begin(target)?;
    let dir = staging.path();
    let total = generator.total();
    let range = options.shard.map(|s| s.range(total)).unwrap_or(0..total);
    let first_shard = options.shard.is_none_or(|s| s.index == 0);
    let layout = Layout::for_spec(spec);

    let created = (|| -> Result<_> {
        Ok((
            PendingFile::create(dir, VECTORS_CSV)?,
            PendingFile::create(dir, STIMULUS_HEX)?,
            PendingFile::create(dir, EXPECTED_HEX)?,
        ))
    })();
    let (mut csv, mut stim, mut exp) = match created {
        Ok(files) => files,
        Err(e) => {
            remove_temporaries(dir);
            return Err(e);
        }
    };
    let result = (|| -> Result<[PendingFile; 3]> {
        if first_shard {
            csv.write(csv_header(spec).as_bytes())?;
            stim.write(header("stimulus", &spec.name, &layout.stimulus, total).as_bytes())?;
            exp.write(header("expected outputs", &spec.name, &layout.expected, total).as_bytes())?;
        }
        let formatter = formatter(generator, spec);
        let threads = match options.threads {
            0 => std::thread::available_parallelism().map_or(1, |n| n.get()),
            n => n,
        } as u64;
        // Chunks small enough to keep memory flat, large enough to amortise hand-offs.
        let chunk_len: u64 = if spec.width <= 64 { 16384 } else { 2048 };
        let chunks = (range.end - range.start).div_ceil(chunk_len);
        let chunk_range = |c: u64| {
            let s = range.start + c * chunk_len;
            s..(s + chunk_len).min(range.end)
        };
        // The calling thread hands chunks out in order, each with one buffer per file; any
        // idle worker formats the next chunk; three writer threads, one per file, take the
        // bytes back in chunk order, write and hash them (hashing, the one step that cannot
        // be split, runs on three cores at once) and return the buffers. A chunk is handed
        // out only with buffers, so at most `buffers_per_file` chunks are in flight and
        // memory stays flat; buffers go out in chunk order, so the chunk a writer waits for
        // always has its buffers and nothing can wait forever. The channels are crossbeam's:
        // a closed or dropped end wakes whoever waits on the other.
        let buffers = buffers_per_file(threads as usize);
        std::thread::scope(|scope| {
            let (job_tx, job_rx) = channel::bounded::<(u64, [Vec<u8>; 3])>(threads as usize);
            let mut free_rxs = Vec::new();
            let mut part_txs = Vec::new();
            let mut writers = Vec::new();
            for file in [csv, stim, exp] {
                let (part_tx, part_rx) = channel::unbounded();
                let (free_tx, free_rx) = channel::unbounded();
                writers.push(scope.spawn(move || write_in_order(file, part_rx, free_tx)));
                part_txs.push(part_tx);
                free_rxs.push(free_rx);
            }
            for _ in 0..threads {
                let (job_rx, part_txs) = (job_rx.clone(), part_txs.clone());
                let (formatter, chunk_range) = (&formatter, &chunk_range);
                scope.spawn(move || {
                    for (c, [csv, stimulus, expected]) in job_rx {
                        let mut chunk = Chunk {
                            csv,
                            stimulus,
                            expected,
                        };
                        let formatted =
                            std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
                                formatter.format_range(chunk_range(c), &mut chunk)
                            }));
                        if let Err(panic) = formatted {
                            for tx in &part_txs {
                                let _ = tx.send((c, None));
                            }
                            std::panic::resume_unwind(panic);
                        }
                        // A writer that stopped on an error has dropped its end; the
                        // others still take their parts, so nobody waits for this chunk.
                        let parts = [chunk.csv, chunk.stimulus, chunk.expected];
                        for (tx, bytes) in part_txs.iter().zip(parts) {
                            let _ = tx.send((c, Some(bytes)));
                        }
                    }
                });
            }
            drop((job_rx, part_txs));
            // Progress counts chunks whose vectors.csv bytes are written (they come back in
            // order), so it is the same running sum on any thread count.
            let mut written_chunks = 0u64;
            let mut report = |written_chunks: u64| {
                if let Some(p) = options.progress.as_mut() {
                    p(chunk_range(written_chunks - 1).end - range.start);
                }
            };
            'dispatch: for c in 0..chunks {
                let mut parts: [Vec<u8>; 3] = Default::default();
                if c >= buffers {
                    for (f, free) in free_rxs.iter().enumerate() {
                        // An error means that file's writer stopped: stop handing out.
                        let Ok(buffer) = free.recv() else {
                            break 'dispatch;
                        };
                        parts[f] = buffer;
                        if f == 0 {
                            written_chunks += 1;
                            report(written_chunks);
                        }
                    }
                }
                if job_tx.send((c, parts)).is_err() {
                    break;
                }
            }
            drop(job_tx);
            // The vectors.csv writer ends, dropping its end, when the last chunk is in.
            for _ in free_rxs[0].iter() {
                written_chunks += 1;
                report(written_chunks);
            }
            drop(free_rxs);
            let mut finished = writers.into_iter().map(|w| {
                w.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            });
            let mut next = || finished.next().expect("three writers");
            let (csv, stim, exp) = (next(), next(), next());
            Ok([csv?, stim?, exp?])
        })
    })();
    let finished =
        result.and_then(|[csv, stim, exp]| Ok([csv.finish()?, stim.finish()?, exp.finish()?]));
    let finished = match finished {
        Ok(f) => f,
        Err(e) => {
            remove_temporaries(dir);
            return Err(e);
        }
    };
    let manifest = Manifest {
        tool: "arithvec".into(),
        version: env!("CARGO_PKG_VERSION").into(),
        unit: spec.name.clone(),
        spec: serde_json::from_str(&spec.normalised_json()).expect("json"),
        spec_sha256: spec_identity(spec),
        seed: generator.seed(),
        directed: generator.directed().len() as u64,
        random: generator.random_count(),
        total,
        shard: options.shard,
        first_index: range.start,
        vectors: range.end - range.start,
        layout: ManifestLayout {
            stimulus: ManifestWord::of(&layout.stimulus),
            expected: ManifestWord::of(&layout.expected),
        },
        files: finished.iter().map(|(r, _, _)| r.clone()).collect(),
        selection: None,
        imported: (!generator.appended().is_empty()).then(|| Imported {
            file: source.file.clone(),
            csv_sha256: source.sha256.clone(),
            first_index: generator.directed().len() as u64 + generator.random_count(),
            vectors: generator.appended().len() as u64,
        }),
        pairs: PairLayout::of(generator),
    };
    let mut text = serde_json::to_string_pretty(&manifest).expect("manifest serialises");
    text.push('\n');
    // Files renamed into place so far; a later failure removes them again, so a failed run
    // never leaves a set whose files do not belong together.
    let mut placed: Vec<PathBuf> = Vec::new();
    let published = (|| -> Result<()> {
        let mut mf = PendingFile::create(dir, MANIFEST_JSON)?;
        mf.write(text.as_bytes())?;
        let (_, mtmp, mpath) = mf.finish()?;
        for (_, tmp, path) in &finished {
            std::fs::rename(tmp, path).map_err(|e| Error::io(path, e))?;
            placed.push(path.clone());
        }
        std::fs::rename(&mtmp, &mpath).map_err(|e| Error::io(&mpath, e))
    })();
    if let Err(e) = published {
        for path in &placed {
            let _ = std::fs::remove_file(path);
        }
        remove_temporaries(dir);
        return Err(e);
    }
    staging.commit()?;
    Ok(manifest)
}

/// Removes whatever temporary files an unfinished [`write`] (or [`write_selection`] of the
/// gate-level grader) left in `dir`. The command line calls it when interrupted by a signal.
pub fn remove_temporaries(dir: &Path) {
    for name in [VECTORS_CSV, STIMULUS_HEX, EXPECTED_HEX, MANIFEST_JSON] {
        let _ = std::fs::remove_file(dir.join(format!(".{name}.tmp")));
    }
}

/// A vector set read back from disk: the manifest and, per vector, its inputs and expected
/// outputs as packed in the hex files.
#[derive(Debug, Clone)]
pub struct VectorSet {
    /// The manifest.
    pub manifest: Manifest,
    /// Inputs by position (vector index = `manifest.first_index` + position).
    pub inputs: Vec<Inputs>,
    /// Expected outputs by position.
    pub expected: Vec<Outputs>,
}

/// Reads the manifest of the set in `dir` and verifies the set against it (see
/// [`verify_files`]): every reader of a set goes through here, so a set whose files were
/// edited, truncated or left from another run is refused before anything is judged.
pub fn read_manifest(dir: &Path) -> Result<Manifest> {
    let manifest = read_manifest_unverified(dir)?;
    verify_files(dir, &manifest)?;
    Ok(manifest)
}

/// Reads the manifest of the set in `dir` without looking at the data files (for tools that
/// report on a set's provenance; readers of the data use [`read_manifest`]).
pub fn read_manifest_unverified(dir: &Path) -> Result<Manifest> {
    let path = dir.join(MANIFEST_JSON);
    let text = std::fs::read_to_string(&path).map_err(|e| Error::io(&path, e))?;
    Manifest::from_json(&text, &path.display().to_string())
}

impl Manifest {
    /// Reads a manifest from its JSON text; `file` names it in messages.
    pub fn from_json(text: &str, file: &str) -> Result<Manifest> {
        serde_json::from_str(text).map_err(|e| {
            Error::problem(
                Problem::new(file, format!("not an arithvec manifest: {e}")).at_line(e.line()),
            )
        })
    }
}

/// Checks the data files of the set in `dir` against `manifest`: the manifest must list
/// `vectors.csv`, `stimulus.hex` and `expected.hex` once each, and each file must have the
/// recorded size (checked first, from the file system, so a truncated file is refused at
/// once) and SHA-256 (one streaming pass over the file; the files are hashed on parallel
/// threads). A mismatch is bad input naming the file.
pub fn verify_files(dir: &Path, manifest: &Manifest) -> Result<()> {
    let mpath = dir.join(MANIFEST_JSON).display().to_string();
    let records = listed_records(manifest, &mpath)?;
    for rec in &records {
        let path = dir.join(&rec.name);
        let size = std::fs::metadata(&path)
            .map_err(|e| Error::io(&path, e))?
            .len();
        if size != rec.bytes {
            return Err(size_mismatch(&path, size, rec));
        }
    }
    // Small sets are hashed on this thread: starting threads costs more than hashing a few
    // megabytes (and the readers' fuzzers read small sets millions of times).
    if records.iter().map(|r| r.bytes).sum::<u64>() <= SMALL_SET_BYTES {
        return records
            .iter()
            .try_for_each(|rec| verify_file(&dir.join(&rec.name), rec));
    }
    let results: Vec<Result<()>> = std::thread::scope(|scope| {
        let handles: Vec<_> = records
            .iter()
            .map(|rec| scope.spawn(move || verify_file(&dir.join(&rec.name), rec)))
            .collect();
        handles
            .into_iter()
            .map(|h| h.join().unwrap_or_else(|p| std::panic::resume_unwind(p)))
            .collect()
    });
    results.into_iter().collect()
}

/// The manifest's records of `vectors.csv`, `stimulus.hex` and `expected.hex`, in that order;
/// a file listed twice or not at all is bad input naming the manifest (`mpath`).
fn listed_records<'m>(manifest: &'m Manifest, mpath: &str) -> Result<Vec<&'m FileRecord>> {
    let mut records = Vec::new();
    for name in [VECTORS_CSV, STIMULUS_HEX, EXPECTED_HEX] {
        let mut found = manifest.files.iter().filter(|f| f.name == name);
        match (found.next(), found.next()) {
            (Some(rec), None) => records.push(rec),
            (None, _) => {
                return Err(Error::problem(
                    Problem::new(mpath, format!("lists no {name}; regenerate the set"))
                        .field("files"),
                ))
            }
            (Some(_), Some(_)) => {
                return Err(Error::problem(
                    Problem::new(mpath, format!("lists {name} twice; regenerate the set"))
                        .field("files"),
                ))
            }
        }
    }
    Ok(records)
}

/// The error for a data file whose size is not the one its record gives.
fn size_mismatch(path: &Path, size: u64, rec: &FileRecord) -> Error {
    Error::problem(
        Problem::new(
            path.display().to_string(),
            format!(
                "is {size} bytes but manifest.json records {} (truncated, edited or \
                 from another run?); regenerate the set",
                rec.bytes
            ),
        )
        .field("bytes"),
    )
}

/// The error for a data file whose SHA-256 is not the one its record gives.
fn digest_mismatch(path: &Path, digest: &str, rec: &FileRecord) -> Error {
    Error::problem(
        Problem::new(
            path.display().to_string(),
            format!(
                "does not match manifest.json: SHA-256 {digest}, recorded {} (edited, \
                 truncated or from another run?); regenerate the set",
                rec.sha256
            ),
        )
        .field("sha256"),
    )
}

/// Total size up to which [`verify_files`] hashes the files one after another on the calling
/// thread rather than on a thread each.
const SMALL_SET_BYTES: u64 = 4 << 20;

/// Hashes one file in a single streaming pass and compares it with its record.
fn verify_file(path: &Path, rec: &FileRecord) -> Result<()> {
    use std::io::Read;
    let mut file = File::open(path).map_err(|e| Error::io(path, e))?;
    let mut hasher = Sha256::new();
    let mut buf = vec![0u8; (rec.bytes.clamp(4096, 1 << 20) as usize) + 1];
    let mut bytes = 0u64;
    loop {
        let n = match file.read(&mut buf) {
            Ok(0) => break,
            Ok(n) => n,
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
            Err(e) => return Err(Error::io(path, e)),
        };
        hasher.update(&buf[..n]);
        bytes += n as u64;
    }
    let digest = hex_of(&hasher.finalize());
    if bytes != rec.bytes || digest != rec.sha256 {
        return Err(digest_mismatch(path, &digest, rec));
    }
    Ok(())
}

/// The bytes of a vector set's three data files, for [`VectorSet::from_bytes`].
#[derive(Debug, Clone, Copy)]
pub struct SetBytes<'a> {
    /// `vectors.csv`.
    pub vectors_csv: &'a [u8],
    /// `stimulus.hex`.
    pub stimulus: &'a [u8],
    /// `expected.hex`.
    pub expected: &'a [u8],
}

impl VectorSet {
    /// Reads the set in `dir`, checking it belongs to `spec` (same unit identity and
    /// layout) and that the files match their recorded hashes.
    pub fn read(dir: &Path, spec: &Spec) -> Result<VectorSet> {
        let manifest = read_manifest(dir)?;
        check_identity(dir, &manifest, spec)?;
        let layout = Layout::for_spec(spec);
        let mut sets = Vec::new();
        for (name, word) in [
            (STIMULUS_HEX, &layout.stimulus),
            (EXPECTED_HEX, &layout.expected),
        ] {
            let path = dir.join(name);
            let file = File::open(&path).map_err(|e| Error::io(&path, e))?;
            sets.push(read_words(
                BufReader::new(file),
                &path,
                name,
                word,
                &manifest,
            )?);
        }
        Ok(VectorSet::assemble(manifest, &layout, sets))
    }

    /// Reads a set held in memory, with the checks and the parser of [`VectorSet::read`]:
    /// `manifest` must list the three files once each with their sizes and SHA-256s, belong
    /// to `spec`, and count the words of both hex files. `dir` is where the set is said to
    /// be: messages name its files as [`VectorSet::read`] does.
    pub fn from_bytes(
        dir: &Path,
        manifest: Manifest,
        files: &SetBytes,
        spec: &Spec,
    ) -> Result<VectorSet> {
        let mpath = dir.join(MANIFEST_JSON).display().to_string();
        let records = listed_records(&manifest, &mpath)?;
        let bytes = [files.vectors_csv, files.stimulus, files.expected];
        for (rec, data) in records.iter().zip(bytes) {
            let size = data.len() as u64;
            if size != rec.bytes {
                return Err(size_mismatch(&dir.join(&rec.name), size, rec));
            }
        }
        for (rec, data) in records.iter().zip(bytes) {
            let digest = sha256_hex(data);
            if digest != rec.sha256 {
                return Err(digest_mismatch(&dir.join(&rec.name), &digest, rec));
            }
        }
        check_identity(dir, &manifest, spec)?;
        let layout = Layout::for_spec(spec);
        let mut sets = Vec::new();
        for (name, word, data) in [
            (STIMULUS_HEX, &layout.stimulus, files.stimulus),
            (EXPECTED_HEX, &layout.expected, files.expected),
        ] {
            sets.push(read_words(data, &dir.join(name), name, word, &manifest)?);
        }
        Ok(VectorSet::assemble(manifest, &layout, sets))
    }

    /// The set from the words of its stimulus and expected files (in that order).
    fn assemble(manifest: Manifest, layout: &Layout, mut sets: Vec<Vec<Vec<Word>>>) -> VectorSet {
        let expected_rows = sets.pop().unwrap_or_default();
        let input_rows = sets.pop().unwrap_or_default();
        let inputs = input_rows
            .into_iter()
            .map(|fields| {
                let mut i = Inputs::default();
                for (f, v) in layout.stimulus.fields.iter().zip(fields) {
                    i.set(f.signal, v);
                }
                i
            })
            .collect();
        let expected = expected_rows
            .into_iter()
            .map(|fields| {
                let mut o = Outputs::default();
                for (f, v) in layout.expected.fields.iter().zip(fields) {
                    o.set(f.signal, v);
                }
                o
            })
            .collect();
        VectorSet {
            manifest,
            inputs,
            expected,
        }
    }

    /// The inputs of vector `index`, if the set holds it.
    pub fn get(&self, index: u64) -> Option<&Inputs> {
        let pos = index.checked_sub(self.manifest.first_index)?;
        self.inputs.get(pos as usize)
    }
}

/// Refuses a set whose manifest was written for another spec than `spec`.
fn check_identity(dir: &Path, manifest: &Manifest, spec: &Spec) -> Result<()> {
    if manifest.spec_sha256 == spec_identity(spec) {
        return Ok(());
    }
    Err(Error::problem(
        Problem::new(
            dir.join(MANIFEST_JSON).display().to_string(),
            format!(
                "this vector set was generated from a different spec (unit \"{}\"); \
                 regenerate it with `arithvec gen`",
                manifest.unit
            ),
        )
        .field("spec_sha256"),
    ))
}

/// Parses the set's hex file `name` (`path` names it in messages): its words by field, checked
/// against the file's SHA-256 in the manifest (hashed line by line as read) and the
/// manifest's word count.
fn read_words(
    mut reader: impl BufRead,
    path: &Path,
    name: &str,
    word: &WordLayout,
    manifest: &Manifest,
) -> Result<Vec<Vec<Word>>> {
    let packer = Packer::new(word);
    let mut line = String::new();
    // The manifest's count is not trusted for the allocation: a damaged one could ask
    // for more memory than the machine has (found by fuzzing the manifest reader).
    let mut rows = Vec::with_capacity(manifest.vectors.min(1 << 16) as usize);
    let mut hasher = Sha256::new();
    let mut n = 0;
    loop {
        line.clear();
        let got = reader
            .read_line(&mut line)
            .map_err(|e| Error::io(path, e))?;
        if got == 0 {
            break;
        }
        hasher.update(line.as_bytes());
        n += 1;
        let t = line.trim();
        if t.is_empty() || t.starts_with("//") {
            continue;
        }
        match packer.unpack(t) {
            Some(fields) => rows.push(fields),
            None => {
                return Err(Error::problem(
                    Problem::new(
                        path.display().to_string(),
                        format!(
                            "expected {} hex digits for a {}-bit word, found \"{t}\"",
                            word.hex_digits(),
                            word.width
                        ),
                    )
                    .at_line(n),
                ))
            }
        }
    }
    let digest = hex_of(&hasher.finalize());
    if let Some(rec) = manifest.files.iter().find(|f| f.name == name) {
        if rec.sha256 != digest {
            return Err(Error::problem(Problem::new(
                path.display().to_string(),
                "the file does not match the SHA-256 in manifest.json (edited or \
                 truncated?); regenerate the set",
            )));
        }
    }
    if rows.len() as u64 != manifest.vectors {
        return Err(Error::problem(Problem::new(
            path.display().to_string(),
            format!(
                "holds {} words but manifest.json says {}",
                rows.len(),
                manifest.vectors
            ),
        )));
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spec::{Encoding, Operation};

    /// The fast path writes the same bytes as the general one, for packed words up to 128
    /// bits (one `u128`) and above (four limbs: a 64-bit divider's 129- and 130-bit expected
    /// words, whose fields straddle limb boundaries).
    #[test]
    fn fast_rows_are_the_general_rows() {
        for (op, enc, w) in [
            (Operation::DivRem, Encoding::Twos, 64),
            (Operation::DivRem, Encoding::Unsigned, 64),
            (Operation::Div, Encoding::Twos, 33),
            (Operation::Mul, Encoding::Twos, 32),
            (Operation::Mul, Encoding::Unsigned, 30),
            (Operation::Sub, Encoding::Twos, 32),
        ] {
            let spec = Spec::with_defaults(op, enc, w);
            let g = Generator::new(&spec, Some(300), Some(5));
            let f = formatter(&g, &spec);
            let n = f
                .narrow
                .as_ref()
                .unwrap_or_else(|| panic!("{op:?} {w}: no fast path"));
            assert!(n.stimulus.digits <= 64 && n.expected.digits <= 64);
            let cat = g.catalogue();
            let mut hits = Hits::new();
            let mut wide_words = 0;
            for index in 0..g.total() {
                let inputs = g.vector(index).expect("in the set");
                let mut classes = String::new();
                let outputs = evaluate_vector(cat, None, &inputs, &mut hits, Some(&mut classes));
                let (mut fast, mut general) = (Chunk::default(), Chunk::default());
                push_row_narrow(n, index, &inputs, &outputs, &classes, &mut fast);
                f.push_row(index, &inputs, &outputs, &classes, &mut general);
                assert_eq!(fast.csv, general.csv, "{op:?} {w} row {index}");
                assert_eq!(fast.stimulus, general.stimulus, "{op:?} {w} row {index}");
                assert_eq!(fast.expected, general.expected, "{op:?} {w} row {index}");
                wide_words += (n.expected.digits > 32) as u32;
            }
            if op == Operation::DivRem {
                assert!(
                    wide_words > 0,
                    "{op:?} {w}: the four-limb path was not used"
                );
            }
        }
    }
}
