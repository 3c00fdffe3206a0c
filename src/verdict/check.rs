//! The checker: judges each result-log row against the golden model, records coverage, and
//! produces the verdict.
//!
//! A row's operands come from the log when it has the operand columns (so logs of stimulus
//! arithvec did not make can be checked and classified), otherwise from the vector set by
//! index. When both are available they must agree; a testbench applying vectors out of step
//! is reported as such. Outputs with x/z bits are *unknown*: counted apart from wrong values,
//! never passing. The checker holds no rows: memory is the coverage counters, a bitmap of
//! seen indices and the first few failures. It reads nothing itself; the caller feeds rows.

use std::collections::BTreeMap;
use std::io::BufRead;
use std::sync::Arc;

use crossbeam_channel as channel;

use serde::{Deserialize, Serialize};

use crate::arith::encoding::Value;
use crate::arith::model::{Inputs, Outputs};
use crate::arith::word::{Word, LIMBS, MAX_WIDTH};
use crate::corners::classes::Hits;
use crate::corners::generate::{Generator, RandomStream};
use crate::error::Error;
use crate::error::Problem;
use crate::sets::vectorset::{sha256_hex, spec_identity, Manifest};
use crate::sim::log::{find_newline, LineFormat, LineOutcome, LogReader, LogRow};
use crate::spec::{Encoding, Signal, Spec};
use crate::verdict::coverage::{
    summarise, ClassStatus, ClassSummary, Coverage, CoverageCounts, CoverageSummary,
};
use crate::verdict::seen::{self, RunRecord, SeenIndices, SetIdentity};

/// The plain statement every report carries.
pub const EVIDENCE_NOTE: &str = "Coverage of corner classes is evidence, not proof of \
correctness: it shows which arithmetic situations the vectors exercised and that the unit \
answered them as the golden model does. Sign-off follows the team's own verification plan.";

/// Options of a check.
#[derive(Debug, Clone)]
pub struct CheckOptions {
    /// Failures kept in detail (the rest are counted).
    pub max_failures: usize,
    /// Hits a bin needs to count as covered.
    pub at_least: u64,
    /// Class-coverage gate in percent.
    pub require: Option<f64>,
    /// The command that reproduces a vector, up to the index (e.g. `arithvec repro unit.toml`).
    pub repro_command: String,
    /// Threads judging and classifying rows (0: one per core, at most 8; 1: all on the
    /// calling thread). The report is the same for every value.
    pub threads: usize,
    /// Compare only these outputs (the user narrowed the check on purpose; the reports say
    /// so). None, the default: every output the spec names must be compared, and an output
    /// the log lacks fails the run ("outputs never compared").
    pub outputs: Option<Vec<Signal>>,
}

impl Default for CheckOptions {
    fn default() -> CheckOptions {
        CheckOptions {
            max_failures: 10,
            at_least: 1,
            require: None,
            repro_command: "arithvec repro SPEC".into(),
            threads: 0,
            outputs: None,
        }
    }
}

/// One field of a value in a failure report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FieldValueReport {
    /// The DUT's port name.
    pub port: String,
    /// arithvec's signal key.
    pub signal: String,
    /// Hex, zero-padded to the field width.
    pub hex: String,
    /// Decoded under the spec's encoding (multi-bit fields) or 0/1.
    pub value: String,
}

/// One output of a failing vector.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OutputReport {
    /// The DUT's port name.
    pub port: String,
    /// arithvec's signal key.
    pub signal: String,
    /// "ok", "wrong" or "unknown".
    pub status: String,
    /// Expected, hex.
    pub expected: String,
    /// Got, hex; a digit with unknown bits is x, z, X or Z (see `unknown_digit` in
    /// src/verdict/check.rs: lowercase when all of the digit's bits are unknown, z only for
    /// high impedance).
    pub got: String,
    /// Expected, binary MSB first (fields up to 64 bits).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub expected_bin: Option<String>,
    /// Got, binary MSB first, x or z for unknown bits (fields up to 64 bits).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub got_bin: Option<String>,
    /// Bit positions that differ (known bits only).
    pub differing_bits: Vec<u32>,
    /// Bit positions that were x/z.
    pub unknown_bits: Vec<u32>,
    /// Expected value decoded under the spec's encoding.
    pub expected_value: String,
    /// Got value decoded under each encoding (multi-bit fields with no unknown bits): a
    /// misread encoding is a common cause of false failures.
    pub got_as: Vec<(String, String)>,
}

/// One failing (wrong or unknown) vector.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Failure {
    /// Vector index.
    pub index: u64,
    /// Line in the log.
    pub line: usize,
    /// "mismatch" or "unknown".
    pub kind: String,
    /// The operands checked.
    pub inputs: Vec<FieldValueReport>,
    /// Every output in the log.
    pub outputs: Vec<OutputReport>,
    /// The vector's classes.
    pub classes: Vec<String>,
    /// The command that regenerates the vector.
    pub repro: String,
}

/// Where the testbench fell out of step with the vector set.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct OutOfStep {
    /// Rows whose operands differ from the vector of their index.
    pub count: u64,
    /// First such index.
    pub first_index: u64,
    /// Its line.
    pub first_line: usize,
}

/// Problems with the log's completeness.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct LogProblems {
    /// Vectors of the set with no row in the log.
    pub missing: u64,
    /// The first missing indices (at most 20).
    pub missing_first: Vec<u64>,
    /// Rows whose index was already seen: (index, line), at most 20.
    pub duplicates: Vec<(u64, usize)>,
    /// Total duplicate rows.
    pub duplicate_count: u64,
    /// Rows whose index is outside the vector set: (index, line), at most 20.
    pub out_of_range: Vec<(u64, usize)>,
    /// Unparseable lines (with `--lenient`), at most 20 listed.
    pub bad_lines: Vec<String>,
    /// Total unparseable lines.
    pub bad_line_count: u64,
    /// Operands out of step with the vector set.
    pub out_of_step: Option<OutOfStep>,
    /// In a merged report: index ranges that more than one merged run checked (at most 20;
    /// their rows are counted in `duplicate_count`).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub overlapping: Vec<[u64; 2]>,
}

impl LogProblems {
    fn any(&self) -> bool {
        self.missing > 0
            || self.duplicate_count > 0
            || !self.out_of_range.is_empty()
            || self.out_of_step.is_some()
    }
}

/// The gate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CoverageGate {
    /// Required class coverage, percent.
    pub require: Option<f64>,
    /// Whether it was met.
    pub met: bool,
}

/// The verdict of a check or merge.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    /// Every vector passed, the log is complete, and the gate is met.
    Pass,
    /// A mismatch, an unknown output, or an incomplete or inconsistent log.
    Fail,
    /// Everything passed but coverage is short of the gate.
    CoverageShort,
}

/// The full result of a check; also the `--json` document (see DEVELOPERS.md for the schema).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CheckReport {
    /// Always "arithvec".
    pub tool: String,
    /// arithvec's version.
    pub version: String,
    /// Unit name.
    pub unit: String,
    /// Unit identity (spec without `[random]`), for merge.
    pub spec_sha256: String,
    /// The normalised spec as TOML, so `merge` can rebuild the class catalogue.
    pub spec_toml: String,
    /// The logs checked.
    pub logs: Vec<String>,
    /// Rows checked.
    pub vectors: u64,
    /// Rows whose outputs all matched.
    pub passed: u64,
    /// Rows with a wrong known output bit.
    pub failed: u64,
    /// Rows with unknown (x/z) outputs and no wrong known bit.
    pub unknown: u64,
    /// Coverage totals.
    pub coverage: CoverageSummary,
    /// Per-class results.
    pub classes: Vec<ClassSummary>,
    /// The first failures in detail.
    pub failures: Vec<Failure>,
    /// Log completeness.
    pub log_problems: LogProblems,
    /// The gate.
    pub gate: CoverageGate,
    /// Verdict.
    pub verdict: Verdict,
    /// The evidence-not-proof statement.
    pub note: String,
    /// Exact coverage counts, for merge.
    pub counts: CoverageCounts,
    /// Which indices of which vector set were checked, exactly (one entry per set).
    pub seen: Vec<SeenIndices>,
    /// The check runs this report is made of (one for a check; every merged run for merge).
    pub runs: Vec<RunRecord>,
    /// Per output port of the spec: whether it was compared, and how many rows had it wrong
    /// or unknown (the headline tally).
    #[serde(default)]
    pub output_ports: Vec<OutputTally>,
    /// True when the user narrowed the comparison on purpose (`--outputs`): ports with
    /// `compared: false` were left out deliberately, not forgotten.
    #[serde(default)]
    pub outputs_narrowed: bool,
    /// Why the verdict is what it is, one short reason each ("4 mismatches (co: 4)").
    #[serde(default)]
    pub verdict_reasons: Vec<String>,
    /// The vector set's seed, when a set was given.
    #[serde(default)]
    pub seed: Option<u64>,
    /// A select unit: per carried operation, the output ports compared on its rows (empty
    /// for other units).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub operation_outputs: Vec<OperationOutputs>,
    /// A clocked unit (`[timing]`): the results' count and order, and the reset sample
    /// (see `verdict::timing`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub timing: Option<crate::verdict::timing::TimingReport>,
}

/// The output ports compared on the rows of one operation of a select unit.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct OperationOutputs {
    /// The operation's name.
    pub operation: String,
    /// Its select code.
    pub code: u32,
    /// The DUT's output ports compared on its rows, in port order.
    pub compared: Vec<String>,
    /// Output ports the unit has that this operation does not define and that are not
    /// compared on its rows.
    pub not_compared: Vec<String>,
}

/// The per-operation output lists of a select unit (only ports some row compared).
pub(crate) fn operation_outputs(spec: &Spec, ports: &[OutputTally]) -> Vec<OperationOutputs> {
    let Some(select) = &spec.select else {
        return Vec::new();
    };
    let zero = select.undefined_outputs == crate::spec::UndefinedOutputs::Zero;
    select
        .codes
        .iter()
        .map(|&(op, code)| {
            let (mut compared, mut not_compared) = (Vec::new(), Vec::new());
            for (sig, port) in spec.outputs() {
                if !ports.iter().any(|p| p.port == port && p.compared) {
                    continue;
                }
                if zero || Spec::defines(op, sig, spec.encoding) {
                    compared.push(port.to_string());
                } else {
                    not_compared.push(port.to_string());
                }
            }
            OperationOutputs {
                operation: op.name().to_string(),
                code,
                compared,
                not_compared,
            }
        })
        .collect()
}

/// One output port's line in the headline tally.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct OutputTally {
    /// The DUT's port name.
    pub port: String,
    /// arithvec's signal key.
    pub signal: String,
    /// Whether the log's values of this port were compared with the model.
    pub compared: bool,
    /// Rows where a known bit of this port was wrong.
    pub wrong: u64,
    /// Rows where this port had x/z bits (and operands were known).
    pub unknown: u64,
}

/// Where a worker gets a vector's inputs by index: the directed list, or the random stream,
/// which is read sequentially while the indices run in order (the usual case).
#[derive(Default)]
struct VectorLookup {
    stream: Option<(u64, RandomStream)>,
}

impl VectorLookup {
    fn get(&mut self, generator: &Generator, index: u64) -> Option<Inputs> {
        let d = generator.directed().len() as u64;
        if index < d {
            return generator.directed().get(index as usize).copied();
        }
        let j = index - d;
        if j >= generator.random_count() && !generator.appended().is_empty() {
            // An imported vector (`arithvec import`, `gen --append`).
            let k = usize::try_from(j - generator.random_count()).ok()?;
            return generator.appended().get(k).copied();
        }
        match &mut self.stream {
            Some((next, s)) if *next == j => {
                *next += 1;
                Some(s.next_inputs())
            }
            _ => {
                let mut s = generator.random_stream(j);
                let v = s.next_inputs();
                self.stream = Some((j + 1, s));
                Some(v)
            }
        }
    }
}

/// Seen indices: a bitmap that grows as needed for indices below [`Seen::DENSE`] (32 MiB at
/// most), and a set for the rare larger ones, so a stray huge index in a log cannot make the
/// checker allocate without bound.
#[derive(Default)]
struct Seen {
    words: Vec<u64>,
    sparse: std::collections::BTreeSet<u64>,
}

impl Seen {
    const DENSE: u64 = 1 << 28;

    /// Marks `i`; returns true when it was already marked.
    fn mark(&mut self, i: u64) -> bool {
        if i >= Self::DENSE {
            return !self.sparse.insert(i);
        }
        let w = (i / 64) as usize;
        if w >= self.words.len() {
            self.words.resize(w + 1, 0);
        }
        let bit = 1u64 << (i % 64);
        let was = self.words[w] & bit != 0;
        self.words[w] |= bit;
        was
    }

    fn contains(&self, i: u64) -> bool {
        if i >= Self::DENSE {
            return self.sparse.contains(&i);
        }
        self.words
            .get((i / 64) as usize)
            .is_some_and(|w| w & (1 << (i % 64)) != 0)
    }

    /// Every marked index as inclusive ranges, ascending, joined where adjacent.
    fn ranges(&self) -> Vec<[u64; 2]> {
        let mut ranges = Vec::new();
        seen::bitmap_ranges(&self.words, &mut ranges);
        // The sparse indices are all at or above DENSE, so after the bitmap's.
        for &i in &self.sparse {
            seen::push_range(&mut ranges, i, i);
        }
        ranges
    }
}

/// How a hex digit of a logged value is shown when some of its bits are unknown (`unk`, the
/// digit's unknown bits; `z`, those that were high impedance; `in_field`, the digit's bits
/// inside the field): `z` when every bit is z, `x` when every bit is unknown and none is z;
/// when only some bits are unknown, `Z` if those are all z and `X` otherwise (as Verilog `%h`
/// prints a partly unknown digit; IEEE 1364-2005 17.1.1.3, from memory); a digit holding
/// both x and z bits shows `X`, since x is the stronger claim (the value is not known). The
/// binary form (`got_bin`) shows every bit as 0, 1, x or z. None when the digit is known.
pub(crate) fn unknown_digit(unk: u64, z: u64, in_field: u64) -> Option<char> {
    if unk == 0 {
        return None;
    }
    let all_z = z == unk;
    Some(match (unk == in_field, all_z) {
        (true, true) => 'z',
        (true, false) => 'x',
        (false, true) => 'Z',
        (false, false) => 'X',
    })
}

/// One log field as read: value bits and the mask of x/z bits.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Observed {
    /// Known bit values (0 where unknown).
    pub bits: Word,
    /// Bits that were x or z.
    pub unknown: Word,
    /// The unknown bits that were z (high impedance); the other unknown bits were x.
    pub z: Word,
}

/// What every worker reads and nobody changes during a check.
struct Shared {
    spec: Spec,
    generator: Generator,
    /// The vector set's range (first index, count), when a set was given.
    set: Option<(u64, u64)>,
    /// For a selected (compacted) set: position -> source index.
    selection: Option<Vec<u64>>,
    /// For a topped-up set: the operands of the positions after the selected ones.
    top_up: Vec<Inputs>,
    /// The spec's inputs, then its outputs, with their widths, in layout order. A staged row
    /// holds one value per entry.
    fields: Vec<(Signal, u32)>,
    /// How many of `fields` are inputs.
    inputs: usize,
    /// Every output of the spec (signal, port name) and whether it is compared (it is in
    /// `fields`).
    outputs: Vec<(Signal, String, bool)>,
    /// The vector set's seed, when a set was given.
    seed: Option<u64>,
    options: CheckOptions,
    /// 64-bit limbs stored per value (the unit's width in limbs).
    limbs: usize,
}

impl Shared {
    /// The index in the source set of vector `index` of this set (they differ only for a
    /// selected set).
    fn source_index(&self, index: u64) -> Option<u64> {
        match &self.selection {
            Some(map) => map.get(index as usize).copied(),
            None => Some(index),
        }
    }

    /// For a topped-up set, the number of the top-up vector at position `index`.
    fn top_up_number(&self, index: u64) -> Option<usize> {
        let selected = self.selection.as_ref()?.len() as u64;
        let k = index.checked_sub(selected)? as usize;
        (k < self.top_up.len()).then_some(k)
    }

    /// u64 entries one staged row takes: bits and unknown mask per field. Where the unknown
    /// mask is set the bits slot holds 1 for a z bit and 0 for an x bit (every comparison
    /// masks unknown bits out), so x and z stay apart at no extra space.
    fn row_stride(&self) -> usize {
        self.fields.len() * 2 * self.limbs
    }

    /// The observed value of field `k` of a staged row.
    fn observed(&self, values: &[u64], k: usize) -> Observed {
        let l = self.limbs;
        let mut bits = [0u64; LIMBS];
        let mut unknown = [0u64; LIMBS];
        bits[..l].copy_from_slice(&values[k * 2 * l..k * 2 * l + l]);
        unknown[..l].copy_from_slice(&values[k * 2 * l + l..(k + 1) * 2 * l]);
        let (raw, unknown) = (Word::from_limbs(bits), Word::from_limbs(unknown));
        Observed {
            bits: raw.and(&unknown.not(MAX_WIDTH)),
            unknown,
            z: raw.and(&unknown),
        }
    }
}

/// One row waiting to be judged; its field values are in the batch's `values`.
#[derive(Clone, Copy)]
struct Staged {
    line: usize,
    index: u64,
    /// The log gave the index (else it is the row's position, set on admission).
    given: bool,
    /// Bit k: field k of [`Shared::fields`] was in the log.
    present: u32,
}

/// Rows handed to a worker together, in log order.
#[derive(Default)]
struct Batch {
    seq: u64,
    rows: Vec<Staged>,
    values: Vec<u64>,
}

/// What a worker found in one batch; merged in batch order.
#[derive(Default)]
struct Verdicts {
    seq: u64,
    vectors: u64,
    passed: u64,
    failed: u64,
    unknown: u64,
    /// The batch's first failures (at most `max_failures`), in log order.
    failures: Vec<Failure>,
    out_of_step: Option<OutOfStep>,
    /// Per compared output (in `fields` order after the inputs): rows wrong, rows unknown.
    ports: Vec<(u64, u64)>,
}

/// A worker's own state: its coverage share and scratch space.
struct Worker {
    coverage: Coverage,
    hits: Hits,
    lookup: VectorLookup,
    /// Scratch row for parsing.
    row: LogRow,
    /// A spent batch to parse into (sequential checks).
    spare_batch: Batch,
    /// A select unit's last row judged: (index, select code), for `select.switch`.
    previous: Option<(u64, u32)>,
}

impl Worker {
    fn new(shared: &Shared) -> Worker {
        Worker {
            coverage: Coverage::new(shared.generator.catalogue()),
            hits: Hits::new(),
            lookup: VectorLookup::default(),
            row: LogRow::new(),
            spare_batch: Batch::default(),
            previous: None,
        }
    }

    /// Judges and classifies every row of `batch`.
    fn run(&mut self, shared: &Shared, batch: &Batch) -> Verdicts {
        let mut v = Verdicts {
            seq: batch.seq,
            ..Verdicts::default()
        };
        let stride = shared.row_stride();
        for (r, row) in batch.rows.iter().enumerate() {
            let values = &batch.values[r * stride..(r + 1) * stride];
            self.row(shared, row, values, &mut v);
        }
        v
    }

    fn row(&mut self, shared: &Shared, row: &Staged, values: &[u64], v: &mut Verdicts) {
        let (index, line) = (row.index, row.line);
        let present = |k: usize| row.present >> k & 1 == 1;
        let narrow = shared.limbs == 1;
        let from_set = match shared.set {
            Some(_) => match shared.top_up_number(index) {
                Some(k) => Some(shared.top_up[k]),
                None => shared
                    .source_index(index)
                    .and_then(|i| self.lookup.get(&shared.generator, i)),
            },
            None => None,
        };
        // Operands: the log's own where present, else the set's.
        let mut inputs = from_set.unwrap_or_default();
        let mut operand_unknown = false;
        let mut from_log = false;
        for (k, &(sig, _)) in shared.fields[..shared.inputs].iter().enumerate() {
            if present(k) {
                from_log = true;
                if narrow {
                    operand_unknown |= values[k * 2 + 1] != 0;
                    inputs.set(sig, Word::from_u64(values[k * 2] & !values[k * 2 + 1]));
                } else {
                    let o = shared.observed(values, k);
                    operand_unknown |= !o.unknown.is_zero();
                    inputs.set(sig, o.bits.and(&o.unknown.not(MAX_WIDTH)));
                }
            }
        }
        if let (Some(set_inputs), true) = (from_set, from_log) {
            let input_fields = &shared.fields[..shared.inputs];
            if !operand_unknown && !same_inputs(input_fields, &set_inputs, &inputs) {
                let s = v.out_of_step.get_or_insert(OutOfStep {
                    count: 0,
                    first_index: index,
                    first_line: line,
                });
                s.count += 1;
            }
        }
        v.vectors += 1;
        let cat = shared.generator.catalogue();
        let expected = cat.evaluate_for_coverage(&inputs, &mut self.hits);
        if cat.is_select() {
            // select.switch: the code of the vector applied just before, from the row before
            // in the log when it is that vector, else from the set.
            let before = index.checked_sub(1).and_then(|i| match self.previous {
                Some((p, code)) if p == i => Some(code),
                _ => {
                    let k = match shared.set {
                        Some(_) => shared.source_index(i)?,
                        None => i,
                    };
                    shared.generator.vector(k).map(|v| v.select)
                }
            });
            cat.record_switch(before, inputs.select, &mut self.hits);
            self.previous = Some((index, inputs.select));
        }
        let mut wrong = false;
        let mut unknown = operand_unknown;
        let model = cat.model();
        let judge = |exp: &Outputs| {
            let (mut wrong, mut unknown) = (false, false);
            for (k, &(sig, w)) in shared.fields.iter().enumerate().skip(shared.inputs) {
                // A select unit's outputs the selected operation does not define are not
                // compared (unless the spec says the unit drives them 0).
                if !present(k) || !exp.is_specified(sig) || !model.compares(&inputs, sig) {
                    continue;
                }
                if w <= 64 {
                    // Fields up to 64 bits: one limb, no masks to build.
                    let m = u64::MAX >> (64 - w);
                    let l = shared.limbs;
                    let (bits, unk) = (values[k * 2 * l], values[k * 2 * l + l] & m);
                    wrong |= (bits ^ exp.get_low(sig)) & !unk & m != 0;
                    unknown |= unk != 0;
                } else {
                    let o = shared.observed(values, k);
                    let e = exp.get(sig).masked(w);
                    let diff = o.bits.xor(&e).and(&o.unknown.not(w)).masked(w);
                    wrong |= !diff.is_zero();
                    unknown |= !o.unknown.masked(w).is_zero();
                }
            }
            (wrong, unknown)
        };
        if !operand_unknown {
            let (w, u) = judge(&expected);
            wrong = w;
            unknown = u;
            if w || u {
                if let Some(alt) = model.alternative_for(&inputs, &expected) {
                    let (w2, u2) = judge(&alt);
                    if !w2 && !u2 {
                        wrong = false;
                        unknown = false;
                    }
                }
            }
        }
        let failed = wrong || unknown;
        if failed && !operand_unknown {
            tally_ports(
                shared,
                values,
                row.present,
                &inputs,
                &expected,
                &mut v.ports,
            );
        }
        self.coverage.record(&self.hits, failed);
        if wrong {
            v.failed += 1;
        } else if unknown {
            v.unknown += 1;
        } else {
            v.passed += 1;
        }
        if failed && v.failures.len() < shared.options.max_failures {
            let field = |sig: Signal| {
                let k = shared.fields.iter().position(|&(s, _)| s == sig)?;
                present(k).then(|| shared.observed(values, k))
            };
            let f = describe(
                shared, &self.hits, index, line, &inputs, &expected, &field, wrong,
            );
            v.failures.push(f);
        }
    }
}

/// Adds a failing row to the per-port tally: for each compared output, whether a known bit
/// differs from the model or a bit is x/z. Only failing rows come here, so the cost is off
/// the hot path.
fn tally_ports(
    shared: &Shared,
    values: &[u64],
    present: u32,
    inputs: &Inputs,
    expected: &Outputs,
    ports: &mut Vec<(u64, u64)>,
) {
    let model = shared.generator.catalogue().model();
    let outputs = &shared.fields[shared.inputs..];
    if ports.len() < outputs.len() {
        ports.resize(outputs.len(), (0, 0));
    }
    for (j, &(sig, w)) in outputs.iter().enumerate() {
        let k = shared.inputs + j;
        if present >> k & 1 == 0 || !expected.is_specified(sig) || !model.compares(inputs, sig) {
            continue;
        }
        let o = shared.observed(values, k);
        let unknown = o.unknown.masked(w);
        let e = expected.get(sig).masked(w);
        let diff = o.bits.xor(&e).and(&unknown.not(w)).masked(w);
        if !diff.is_zero() {
            ports[j].0 += 1;
        } else if !unknown.is_zero() {
            ports[j].1 += 1;
        }
    }
}

/// Rows per batch: enough to make hand-offs rare, few enough to keep memory small.
fn batch_rows(limbs: usize) -> usize {
    (4096 / limbs).max(256)
}

/// Verdicts merged so far, batch by batch in order.
struct Merger {
    verdicts: Verdicts,
    /// The sequence number of the next batch to merge.
    next: u64,
    max_failures: usize,
}

impl Merger {
    fn merge(&mut self, v: Verdicts) {
        let m = &mut self.verdicts;
        m.vectors += v.vectors;
        m.passed += v.passed;
        m.failed += v.failed;
        m.unknown += v.unknown;
        if m.ports.len() < v.ports.len() {
            m.ports.resize(v.ports.len(), (0, 0));
        }
        for (sum, (wrong, unknown)) in m.ports.iter_mut().zip(v.ports) {
            sum.0 += wrong;
            sum.1 += unknown;
        }
        let room = self.max_failures.saturating_sub(m.failures.len());
        m.failures.extend(v.failures.into_iter().take(room));
        if let Some(s) = v.out_of_step {
            match &mut m.out_of_step {
                Some(first) => first.count += s.count,
                None => m.out_of_step = Some(s),
            }
        }
        self.next += 1;
    }
}

/// Whole log lines read by the calling thread, to be parsed by a worker.
#[derive(Default)]
struct Block {
    seq: u64,
    /// The lines, LF line ends kept.
    bytes: Vec<u8>,
    first_line: usize,
}

/// A parsed block: its rows staged in log order (index not yet admitted) and its malformed
/// lines, each with the number of rows before it in the block.
struct Parsed {
    block: Block,
    batch: Batch,
    bad: Vec<(usize, Problem)>,
}

/// Work for a pool thread.
enum Job {
    Parse(Block, Batch, Arc<LineFormat>, Arc<str>),
    Judge(Batch),
    /// Panics on the worker, to test that a failing worker cannot hang the caller.
    #[cfg(test)]
    Fail,
}

/// Finished work from a pool thread.
enum Done {
    Parsed(Parsed),
    Judged(Verdicts, Batch),
    /// The job panicked (a bug); the caller passes the panic on.
    Panicked(Box<dyn std::any::Any + Send>),
}

impl Worker {
    /// Does one pool job.
    fn job(&mut self, shared: &Shared, job: Job) -> Done {
        match job {
            Job::Parse(block, batch, format, file) => {
                Done::Parsed(self.parse(shared, block, batch, &format, &file))
            }
            Job::Judge(batch) => Done::Judged(self.run(shared, &batch), batch),
            #[cfg(test)]
            Job::Fail => panic!("a test job failed on purpose"),
        }
    }

    /// Parses the lines of `block` into a batch of staged rows.
    fn parse(
        &mut self,
        shared: &Shared,
        block: Block,
        mut batch: Batch,
        format: &LineFormat,
        file: &str,
    ) -> Parsed {
        batch.rows.clear();
        batch.values.clear();
        let mut bad = Vec::new();
        let mut rest = &block.bytes[..];
        let mut line_no = block.first_line;
        while !rest.is_empty() {
            let (line, next) = match find_newline(rest) {
                Some(end) => (&rest[..end], &rest[end + 1..]),
                None => (rest, &rest[rest.len()..]),
            };
            rest = next;
            match format.parse_line(line, line_no, file, &mut self.row) {
                LineOutcome::Skipped => {}
                LineOutcome::Row => {
                    let present = stage_fields(shared, &self.row, &mut batch.values);
                    batch.rows.push(Staged {
                        line: line_no,
                        index: self.row.index.unwrap_or(0),
                        given: self.row.index.is_some(),
                        present,
                    });
                }
                LineOutcome::Bad(problem) => bad.push((batch.rows.len(), *problem)),
            }
            line_no += 1;
        }
        Parsed { block, batch, bad }
    }
}

/// Copies the values of the spec's fields from a log row into `values` (bits then unknown
/// mask, [`Shared::limbs`] limbs each); returns the presence mask.
#[inline]
fn stage_fields(shared: &Shared, row: &LogRow, values: &mut Vec<u64>) -> u32 {
    let l = shared.limbs;
    let start = values.len();
    values.resize(start + shared.row_stride(), 0);
    let staged = &mut values[start..];
    let mut present = 0u32;
    for (k, &(sig, _)) in shared.fields.iter().enumerate() {
        if let Some(f) = row.get(sig) {
            present |= 1 << k;
            let at = k * 2 * l;
            if l == 1 {
                staged[at] = f.bits.low_u64() | f.z.low_u64();
                staged[at + 1] = f.unknown.low_u64();
            } else {
                let raw = f.bits.or(&f.z);
                staged[at..at + l].copy_from_slice(&raw.limbs()[..l]);
                staged[at + l..at + 2 * l].copy_from_slice(&f.unknown.limbs()[..l]);
            }
        }
    }
    present
}

/// Bytes of log read per block: a few thousand lines of a narrow unit.
const BLOCK_BYTES: usize = 256 * 1024;

/// The worker threads of a parallel check and the work handed to them.
///
/// Jobs go out on one bounded multi-consumer channel (any idle worker takes the next one;
/// a full queue makes the caller wait, which bounds memory) and every job comes back as
/// exactly one message on the results channel, a worker's panic included. The caller blocks
/// only on `results.recv()` while a message it knows of is outstanding, so no wake-up can be
/// lost and nothing polls. The pool holds no results sender: once the jobs channel is closed
/// and the workers have drained it, the results channel disconnects, which is how
/// [`Checker::finish`] knows every job is back.
struct Pool {
    jobs: Option<channel::Sender<Job>>,
    results: channel::Receiver<Done>,
    workers: Vec<std::thread::JoinHandle<Coverage>>,
    /// Verdicts received out of order, waiting for their turn.
    parked: BTreeMap<u64, Verdicts>,
    /// Parsed blocks received out of order, waiting for their turn.
    parsed: BTreeMap<u64, Parsed>,
    /// Spent buffers, for reuse.
    spare_batches: Vec<Batch>,
    spare_blocks: Vec<Block>,
}

impl Pool {
    fn start(shared: &Arc<Shared>, threads: usize) -> Pool {
        // A few jobs queued per worker keep them busy and memory bounded.
        let (job_tx, job_rx) = channel::bounded::<Job>(2 * threads);
        let (result_tx, results) = channel::unbounded();
        let workers = (0..threads)
            .map(|_| {
                let shared = Arc::clone(shared);
                let job_rx = job_rx.clone();
                let result_tx = result_tx.clone();
                std::thread::spawn(move || {
                    let mut worker = Worker::new(&shared);
                    for job in job_rx {
                        // A panic (a bug: workers do not fail on input) is sent back like
                        // any other result, so the caller never waits for a reply that
                        // cannot come.
                        let done = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
                            worker.job(&shared, job)
                        }))
                        .unwrap_or_else(Done::Panicked);
                        let stop = matches!(done, Done::Panicked(_));
                        if result_tx.send(done).is_err() || stop {
                            break;
                        }
                    }
                    worker.coverage
                })
            })
            .collect();
        Pool {
            jobs: Some(job_tx),
            results,
            workers,
            parked: BTreeMap::new(),
            parsed: BTreeMap::new(),
            spare_batches: Vec::new(),
            spare_blocks: Vec::new(),
        }
    }

    /// Parsed blocks handed out and not yet taken back in order beyond which the caller
    /// waits.
    fn blocks_ahead(&self) -> u64 {
        2 * self.workers.len() as u64 + 1
    }

    /// Queues `job`, waiting while the queue is full.
    fn send(&mut self, job: Job) {
        let sent = self
            .jobs
            .as_ref()
            .is_some_and(|jobs| jobs.send(job).is_ok());
        if !sent {
            // Only possible when every worker is gone, each after sending back its panic:
            // receive() passes it on.
            loop {
                let _ = self.receive();
            }
        }
    }

    /// Files finished work: parsed blocks wait for the caller, verdicts are merged as soon
    /// as their turn has come.
    fn accept(&mut self, done: Done, merger: &mut Merger) {
        match done {
            Done::Parsed(p) => {
                self.parsed.insert(p.block.seq, p);
            }
            Done::Judged(verdicts, mut batch) => {
                batch.rows.clear();
                batch.values.clear();
                self.spare_batches.push(batch);
                self.parked.insert(verdicts.seq, verdicts);
                while let Some(v) = self.parked.remove(&merger.next) {
                    merger.merge(v);
                }
            }
            Done::Panicked(panic) => std::panic::resume_unwind(panic),
        }
    }

    /// Files whatever work is done, without waiting.
    fn accept_ready(&mut self, merger: &mut Merger) {
        while let Ok(done) = self.results.try_recv() {
            self.accept(done, merger);
        }
    }

    /// Waits for the next job to come back (the caller knows one is outstanding).
    fn receive(&mut self) -> Done {
        match self.results.recv() {
            Ok(Done::Panicked(panic)) => std::panic::resume_unwind(panic),
            Ok(done) => done,
            // Every worker ended: they end only when the jobs channel is closed or after
            // sending back a panic, which would have come first.
            Err(_) => panic!("the check workers stopped with work outstanding"),
        }
    }

    /// Closes the queue, files every outstanding result and returns the workers' coverage.
    fn close(mut self, merger: &mut Merger) -> Vec<Coverage> {
        self.jobs = None;
        while let Ok(done) = self.results.recv() {
            self.accept(done, merger);
        }
        self.workers
            .into_iter()
            .map(|w| {
                w.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    }
}

/// Where [`Checker::check_log`] stands with the log's lines.
struct Intake {
    lenient: bool,
    /// Malformed lines kept for the caller (not lenient).
    bad_lines: Vec<Problem>,
    /// Reading stopped at too many malformed lines.
    stopped: bool,
    /// Rows read so far.
    rows: u64,
}

/// Streams rows and accumulates the verdict.
///
/// Rows are staged in batches; a batch is judged and classified on a worker thread (or on
/// the calling thread when `threads` is 1) and its verdicts are merged in batch order. What
/// depends on row order (index positions, duplicates, out-of-range rows) is decided when the
/// row arrives; everything else is either a sum (counts, coverage) or taken in batch order
/// (the first failures, the first out-of-step row), so reports are identical whatever the
/// number of threads.
pub struct Checker<'g> {
    shared: Arc<Shared>,
    generator: &'g Generator,
    logs: Vec<String>,
    seen: Seen,
    /// The vector set the indices refer to, when one was given.
    set_identity: Option<SetIdentity>,
    position: u64,
    problems: LogProblems,
    /// The batch being filled.
    batch: Batch,
    batch_rows: usize,
    /// Bytes of log per block in [`Checker::check_log`].
    block_bytes: usize,
    next_seq: u64,
    merger: Merger,
    /// The worker pool, or None for a sequential check.
    pool: Option<Pool>,
    /// The sequential check's worker.
    local: Option<Worker>,
}

impl<'g> Checker<'g> {
    /// A checker for logs with `columns` (the signals present, besides `index`). `generator`
    /// regenerates vectors by index; `set` is the manifest of the vector set the testbench
    /// applied, when given, which enables the out-of-step and missing-vector checks and lets
    /// a log without operand columns be checked.
    pub fn new(
        spec: &Spec,
        generator: &'g Generator,
        set: Option<&Manifest>,
        columns: &[Signal],
        options: CheckOptions,
    ) -> Result<Checker<'g>, Problem> {
        let has_all_inputs = spec.inputs().iter().all(|(s, _)| columns.contains(s));
        if !has_all_inputs && set.is_none() {
            let missing: Vec<&str> = spec
                .inputs()
                .into_iter()
                .filter(|(s, _)| !columns.contains(s))
                .map(|(_, n)| n)
                .collect();
            return Err(Problem::new(
                "<log>",
                format!(
                    "the log has no column for input(s) {}; pass --vectors DIR so operands \
                     can be taken from the vector set by index",
                    missing.join(", ")
                ),
            ));
        }
        if !spec.outputs().iter().any(|(s, _)| columns.contains(s)) {
            return Err(Problem::new(
                "<log>",
                "the log has no output column to check",
            ));
        }
        // The outputs to compare: those the user chose, or every output of the spec. A
        // chosen output the log lacks is bad input; an unchosen one the log lacks fails the
        // run in the report ("outputs never compared").
        if let Some(chosen) = &options.outputs {
            let absent: Vec<&str> = spec
                .outputs()
                .into_iter()
                .filter(|(s, _)| chosen.contains(s) && !columns.contains(s))
                .map(|(_, n)| n)
                .collect();
            if !absent.is_empty() {
                return Err(Problem::new(
                    "<log>",
                    format!(
                        "--outputs names {}, but the log has no column for it; the log's \
                         header must name every output to compare",
                        absent.join(", ")
                    ),
                )
                .field("outputs"));
            }
        }
        let outputs: Vec<(Signal, String, bool)> = spec
            .outputs()
            .into_iter()
            .map(|(s, n)| {
                let wanted = options.outputs.as_ref().is_none_or(|c| c.contains(&s));
                (s, n.to_string(), wanted && columns.contains(&s))
            })
            .collect();
        let threads = match options.threads {
            0 => std::thread::available_parallelism().map_or(1, |n| n.get().min(8)),
            n => n,
        };
        let mut top_up = Vec::new();
        if let Some(sel) = set.and_then(|m| m.selection.as_ref()) {
            for (k, t) in sel.top_up.iter().enumerate() {
                let operands = t
                    .operands(spec, "manifest.json", k)
                    .map_err(|e| Problem::new("manifest.json", e.to_string()))?;
                top_up.push(operands);
            }
        }
        let inputs = spec.inputs();
        let shared = Arc::new(Shared {
            spec: spec.clone(),
            generator: generator.clone(),
            set: set.map(|m| (m.first_index, m.vectors)),
            selection: set.and_then(|m| m.selection.as_ref().map(|s| s.indices.clone())),
            top_up,
            fields: inputs
                .iter()
                .map(|&(s, _)| s)
                .chain(outputs.iter().filter(|o| o.2).map(|o| o.0))
                .map(|s| (s, spec.signal_width(s)))
                .collect(),
            inputs: inputs.len(),
            outputs,
            seed: set.map(|m| m.seed),
            options,
            limbs: Signal::ALL
                .into_iter()
                .filter(|&s| spec.has(s))
                .map(|s| spec.signal_width(s))
                .max()
                .unwrap_or(spec.width)
                .max(spec.width)
                .div_ceil(64) as usize,
        });
        let (pool, local) = if threads > 1 {
            (Some(Pool::start(&shared, threads)), None)
        } else {
            (None, Some(Worker::new(&shared)))
        };
        Ok(Checker {
            batch_rows: batch_rows(shared.limbs),
            block_bytes: BLOCK_BYTES,
            generator,
            logs: Vec::new(),
            seen: Seen::default(),
            set_identity: set.map(set_identity),
            // A log without an index column starts at the set's first vector, so a shard's
            // testbench that plays its own stimulus.hex from line one is checked in step.
            position: set.map_or(0, |m| m.first_index),
            problems: LogProblems::default(),
            batch: Batch::default(),
            next_seq: 0,
            merger: Merger {
                verdicts: Verdicts::default(),
                next: 0,
                max_failures: shared.options.max_failures,
            },
            pool,
            local,
            shared,
        })
    }

    /// Names a log being checked (for the report).
    pub fn add_log(&mut self, name: &str) {
        self.logs.push(name.to_string());
    }

    /// Records an unparseable line (lenient mode).
    pub fn bad_line(&mut self, problem: &Problem) {
        self.problems.bad_line_count += 1;
        if self.problems.bad_lines.len() < 20 {
            self.problems.bad_lines.push(problem.to_string());
        }
    }

    /// Checks one row. `field` gives the observed value of a signal present in the log.
    pub fn row(
        &mut self,
        line: usize,
        index: Option<u64>,
        field: impl Fn(Signal) -> Option<Observed>,
    ) {
        let Some(index) = self.admit(line, index) else {
            return;
        };
        let shared = Arc::clone(&self.shared);
        let l = shared.limbs;
        let mut present = 0u32;
        for (k, &(sig, _)) in shared.fields.iter().enumerate() {
            match field(sig) {
                Some(o) => {
                    present |= 1 << k;
                    let raw = o.bits.or(&o.z.and(&o.unknown));
                    self.batch.values.extend_from_slice(&raw.limbs()[..l]);
                    self.batch.values.extend_from_slice(&o.unknown.limbs()[..l]);
                }
                None => self.batch.values.extend(std::iter::repeat_n(0, 2 * l)),
            }
        }
        self.stage(line, index, present);
    }

    /// Checks one row as read by a [`LogReader`]: the same as [`Checker::row`] with the
    /// row's fields, without copying whole words.
    pub fn log_row(&mut self, row: &LogRow) {
        let Some(index) = self.admit(row.line, row.index) else {
            return;
        };
        let present = stage_fields(&self.shared, row, &mut self.batch.values);
        self.stage(row.line, index, present);
    }

    /// Checks every remaining row of `reader`'s log: this thread reads blocks of lines, the
    /// worker threads parse, judge and classify them (all on this thread when `threads` is
    /// 1). Malformed lines are counted in the report when `lenient` (as by
    /// [`Checker::bad_line`]); otherwise the first 20 are returned and reading stops at the
    /// 21st, the log being bad input. `progress` is called now and then with the number of
    /// rows read so far. Gives the same report as feeding every row to [`Checker::log_row`].
    pub fn check_log<R: BufRead>(
        &mut self,
        reader: &mut LogReader<R>,
        lenient: bool,
        mut progress: impl FnMut(u64),
    ) -> Result<Vec<Problem>, Error> {
        // Rows staged one by one before this go first.
        self.dispatch();
        let format = reader.line_format();
        let file: Arc<str> = Arc::from(reader.file());
        let mut intake = Intake {
            lenient,
            bad_lines: Vec::new(),
            stopped: false,
            rows: 0,
        };
        let mut pool = self.pool.take();
        let result = if pool.is_none() {
            self.check_log_here(reader, &format, &file, &mut intake, &mut progress)
        } else {
            self.check_log_pooled(
                &mut pool,
                reader,
                &format,
                &file,
                &mut intake,
                &mut progress,
            )
        };
        self.pool = pool;
        result.map(|()| intake.bad_lines)
    }

    /// The sequential [`Checker::check_log`].
    fn check_log_here<R: BufRead>(
        &mut self,
        reader: &mut LogReader<R>,
        format: &LineFormat,
        file: &str,
        intake: &mut Intake,
        progress: &mut impl FnMut(u64),
    ) -> Result<(), Error> {
        let mut block = Block::default();
        while !intake.stopped {
            let Some(first) = reader.read_block(&mut block.bytes, self.block_bytes)? else {
                break;
            };
            block.first_line = first;
            let Some(worker) = self.local.as_mut() else {
                break;
            };
            let spare = std::mem::take(&mut worker.spare_batch);
            let parsed = worker.parse(&self.shared, block, spare, format, file);
            block = self.take_parsed(&mut None, parsed, intake);
            progress(intake.rows);
        }
        Ok(())
    }

    /// The parallel [`Checker::check_log`]: blocks are parsed in any order and taken back in
    /// log order, so admission (indices, duplicates) sees rows exactly as a sequential read.
    fn check_log_pooled<R: BufRead>(
        &mut self,
        pool: &mut Option<Pool>,
        reader: &mut LogReader<R>,
        format: &Arc<LineFormat>,
        file: &Arc<str>,
        intake: &mut Intake,
        progress: &mut impl FnMut(u64),
    ) -> Result<(), Error> {
        // Blocks are numbered as sent; `next_parsed` is the next one to take back in order.
        let (mut next_block, mut next_parsed) = (0u64, 0u64);
        let mut end = false;
        loop {
            let Some(p) = pool.as_mut() else {
                return Ok(());
            };
            // Keep the workers fed, with a bounded number of blocks ahead.
            while !end && !intake.stopped && next_block - next_parsed < p.blocks_ahead() {
                let mut block = p.spare_blocks.pop().unwrap_or_default();
                match reader.read_block(&mut block.bytes, self.block_bytes)? {
                    Some(first) => {
                        block.first_line = first;
                        block.seq = next_block;
                        next_block += 1;
                        let batch = p.spare_batches.pop().unwrap_or_default();
                        p.send(Job::Parse(
                            block,
                            batch,
                            Arc::clone(format),
                            Arc::clone(file),
                        ));
                    }
                    None => end = true,
                }
            }
            while let Some(parsed) = pool.as_mut().and_then(|p| p.parsed.remove(&next_parsed)) {
                next_parsed += 1;
                let block = self.take_parsed(pool, parsed, intake);
                if let Some(p) = pool.as_mut() {
                    p.spare_blocks.push(block);
                }
                progress(intake.rows);
            }
            let Some(p) = pool.as_mut() else {
                return Ok(());
            };
            // Every block sent is taken back (a stopped intake admits nothing), so no parsed
            // block is left for a later call; a block not yet taken back is on its way, so
            // the wait below always ends.
            if (end || intake.stopped) && next_parsed == next_block {
                return Ok(());
            }
            let done = p.receive();
            p.accept(done, &mut self.merger);
        }
    }

    /// Admits the rows of a parsed block in order, handles its malformed lines, and hands the
    /// admitted rows on to be judged. Returns the block's buffer for reuse.
    fn take_parsed(
        &mut self,
        pool: &mut Option<Pool>,
        parsed: Parsed,
        intake: &mut Intake,
    ) -> Block {
        let Parsed {
            block,
            mut batch,
            bad,
        } = parsed;
        let stride = self.shared.row_stride();
        let mut bad = bad.into_iter().peekable();
        let mut kept = 0;
        let rows = batch.rows.len();
        for r in 0..=rows {
            while let Some((_, problem)) = bad.next_if(|(at, _)| *at == r) {
                if intake.lenient {
                    self.bad_line(&problem);
                } else if intake.bad_lines.len() < 20 {
                    intake.bad_lines.push(problem);
                } else {
                    intake.stopped = true;
                    break;
                }
            }
            if intake.stopped || r == rows {
                break;
            }
            let row = batch.rows[r];
            intake.rows += 1;
            if let Some(index) = self.admit(row.line, row.given.then_some(row.index)) {
                batch.rows[kept] = Staged { index, ..row };
                if kept != r {
                    batch
                        .values
                        .copy_within(r * stride..(r + 1) * stride, kept * stride);
                }
                kept += 1;
            }
        }
        batch.rows.truncate(kept);
        batch.values.truncate(kept * stride);
        if let Some(spent) = self.submit(pool, batch) {
            if let Some(worker) = self.local.as_mut() {
                worker.spare_batch = spent;
            }
        }
        block
    }

    /// The order-dependent part of a row: its index, duplicates and out-of-range indices.
    /// Returns the index when the row is to be judged.
    fn admit(&mut self, line: usize, index: Option<u64>) -> Option<u64> {
        let index = index.unwrap_or(self.position);
        self.position += 1;
        if self.seen.mark(index) {
            self.problems.duplicate_count += 1;
            if self.problems.duplicates.len() < 20 {
                self.problems.duplicates.push((index, line));
            }
            return None;
        }
        if let Some((first, count)) = self.shared.set {
            if index < first || index >= first + count {
                if self.problems.out_of_range.len() < 20 {
                    self.problems.out_of_range.push((index, line));
                }
                return None;
            }
        }
        Some(index)
    }

    fn stage(&mut self, line: usize, index: u64, present: u32) {
        self.batch.rows.push(Staged {
            line,
            index,
            given: true,
            present,
        });
        if self.batch.rows.len() >= self.batch_rows {
            self.dispatch();
        }
    }

    /// Hands the current batch to a worker (or judges it here when sequential).
    fn dispatch(&mut self) {
        if self.batch.rows.is_empty() {
            return;
        }
        let mut pool = self.pool.take();
        let spare = pool
            .as_mut()
            .and_then(|p| p.spare_batches.pop())
            .unwrap_or_default();
        let batch = std::mem::replace(&mut self.batch, spare);
        if let Some(spent) = self.submit(&mut pool, batch) {
            self.batch = spent;
        }
        self.pool = pool;
    }

    /// Judges `batch` on the pool, or here when there is none; returns the batch's buffer
    /// when it is free again at once (judged here, or empty).
    fn submit(&mut self, pool: &mut Option<Pool>, mut batch: Batch) -> Option<Batch> {
        if batch.rows.is_empty() {
            return Some(batch);
        }
        batch.seq = self.next_seq;
        self.next_seq += 1;
        match pool {
            None => {
                let worker = self.local.as_mut()?;
                let verdicts = worker.run(&self.shared, &batch);
                self.merger.merge(verdicts);
                batch.rows.clear();
                batch.values.clear();
                Some(batch)
            }
            Some(pool) => {
                // The bounded queue makes this wait while the workers are behind.
                pool.send(Job::Judge(batch));
                pool.accept_ready(&mut self.merger);
                None
            }
        }
    }

    /// Ends the check and returns the report.
    pub fn finish(mut self) -> CheckReport {
        self.dispatch();
        let mut counts: Option<CoverageCounts> = None;
        let mut add = |c: Coverage| {
            let totals = c.totals();
            match &mut counts {
                Some(sum) => sum.add(&totals),
                None => counts = Some(totals),
            }
        };
        if let Some(worker) = self.local.take() {
            add(worker.coverage);
        }
        if let Some(pool) = self.pool.take() {
            pool.close(&mut self.merger).into_iter().for_each(&mut add);
        }
        let counts = counts.unwrap_or_else(|| Coverage::new(self.generator.catalogue()).totals());
        if let Some((first, count)) = self.shared.set {
            for i in first..first + count {
                if !self.seen.contains(i) {
                    self.problems.missing += 1;
                    if self.problems.missing_first.len() < 20 {
                        self.problems.missing_first.push(i);
                    }
                }
            }
        }
        let merged = std::mem::take(&mut self.merger.verdicts);
        self.problems.out_of_step = merged.out_of_step;
        // Only rows judged count as seen: indices outside the set were marked but not judged.
        let ranges = match self.shared.set {
            Some((first, count)) => seen::clip(&self.seen.ranges(), first, count),
            None => self.seen.ranges(),
        };
        let seen = vec![SeenIndices {
            set: self.set_identity.take(),
            count: seen::count(&ranges).unwrap_or(u64::MAX),
            ranges,
        }];
        let mut compared = merged.ports.iter();
        let output_ports = self
            .shared
            .outputs
            .iter()
            .map(|(sig, port, is_compared)| {
                let (wrong, unknown) = if *is_compared {
                    compared.next().copied().unwrap_or((0, 0))
                } else {
                    (0, 0)
                };
                OutputTally {
                    port: port.clone(),
                    signal: sig.key().to_string(),
                    compared: *is_compared,
                    wrong,
                    unknown,
                }
            })
            .collect();
        let outputs = OutputsSeen {
            ports: output_ports,
            narrowed: self.shared.options.outputs.is_some(),
            seed: self.shared.seed,
        };
        build_report(
            &self.shared.spec,
            self.generator,
            std::mem::take(&mut self.logs),
            (merged.vectors, merged.passed, merged.failed, merged.unknown),
            counts,
            merged.failures,
            std::mem::take(&mut self.problems),
            outputs,
            &self.shared.options,
            seen,
            None,
        )
    }
}

/// The identity of the vector set `m` describes (for a selected set, its own positions).
fn set_identity(m: &Manifest) -> SetIdentity {
    match &m.selection {
        Some(s) => {
            let mut list: Vec<String> = s.indices.iter().map(u64::to_string).collect();
            // Top-up vectors are part of the set's identity: their operands, in order.
            list.extend(s.top_up.iter().map(|t| {
                let ops: Vec<String> = t.inputs.iter().map(|(k, v)| format!("{k}={v}")).collect();
                format!("top_up:{}", ops.join(";"))
            }));
            SetIdentity {
                seed: m.seed,
                directed: s.source_directed,
                random: s.source_random,
                total: m.vectors,
                selection_sha256: Some(sha256_hex(list.join(",").as_bytes())),
                imported_sha256: None,
            }
        }
        None => SetIdentity {
            seed: m.seed,
            directed: m.directed,
            random: m.random,
            total: m.total,
            selection_sha256: None,
            // Two sets with imported vectors are the same set only with the same stimulus.
            imported_sha256: m.imported.as_ref().and_then(|_| {
                m.files
                    .iter()
                    .find(|f| f.name == crate::sets::vectorset::STIMULUS_HEX)
                    .map(|f| f.sha256.clone())
            }),
        },
    }
}

#[allow(clippy::too_many_arguments)]
fn describe(
    shared: &Shared,
    hits: &Hits,
    index: u64,
    line: usize,
    inputs: &Inputs,
    expected: &Outputs,
    field: &impl Fn(Signal) -> Option<Observed>,
    wrong: bool,
) -> Failure {
    let spec = &shared.spec;
    let cat = shared.generator.catalogue();
    let inputs_report = spec
        .inputs()
        .into_iter()
        .map(|(sig, port)| {
            let w = spec.signal_width(sig);
            let v = inputs.get(sig);
            FieldValueReport {
                port: port.to_string(),
                signal: sig.key().to_string(),
                hex: v.to_hex(w),
                value: decoded(sig, &v, w, spec.encoding),
            }
        })
        .collect();
    let mut outputs = Vec::new();
    for (sig, port) in spec.outputs() {
        let Some(o) = field(sig) else { continue };
        if !cat.model().compares(inputs, sig) {
            continue;
        }
        let w = spec.signal_width(sig);
        let e = expected.get(sig).masked(w);
        let unknown = o.unknown.masked(w);
        let diff = o.bits.xor(&e).and(&unknown.not(w)).masked(w);
        let status = if !expected.is_specified(sig) {
            "ok"
        } else if !diff.is_zero() {
            "wrong"
        } else if !unknown.is_zero() {
            "unknown"
        } else {
            "ok"
        };
        let z = o.z.and(&unknown);
        let got_hex: String = (0..w.div_ceil(4))
            .rev()
            .map(|d| {
                let nib = o.bits.extract(d * 4, 4).low_u64();
                let unk = unknown.extract(d * 4, 4).low_u64();
                let in_field = Word::ones(w).extract(d * 4, 4).low_u64();
                unknown_digit(unk, z.extract(d * 4, 4).low_u64(), in_field)
                    .unwrap_or_else(|| char::from_digit(nib as u32, 16).unwrap_or('?'))
            })
            .collect();
        let got_bin = (w <= 64).then(|| {
            (0..w)
                .rev()
                .map(|i| {
                    if z.bit(i) {
                        'z'
                    } else if unknown.bit(i) {
                        'x'
                    } else if o.bits.bit(i) {
                        '1'
                    } else {
                        '0'
                    }
                })
                .collect()
        });
        let got_as = if w > 1 && unknown.is_zero() && status == "wrong" {
            Encoding::ALL
                .iter()
                .map(|&enc| {
                    (
                        enc.name().to_string(),
                        Value::decode(&o.bits, w, enc).to_string(),
                    )
                })
                .collect()
        } else {
            Vec::new()
        };
        outputs.push(OutputReport {
            port: port.to_string(),
            signal: sig.key().to_string(),
            status: status.to_string(),
            expected: e.to_hex(w),
            got: got_hex,
            expected_bin: (w <= 64).then(|| e.to_bin(w)),
            got_bin,
            differing_bits: diff.set_bits().collect(),
            unknown_bits: unknown.set_bits().collect(),
            expected_value: decoded(sig, &e, w, spec.encoding),
            got_as,
        });
    }
    let mut classes = Vec::new();
    for &c in hits.classes() {
        classes.push(cat.classes()[c as usize].id().to_string());
    }
    // Always the seed (the spec's may change later), and the count when the set's differs
    // from the spec's, so the command names this vector whatever the spec says tomorrow.
    let mut seed_part = format!(" --seed {}", shared.generator.seed());
    if shared.generator.random_count() != shared.spec.random.count {
        seed_part.push_str(&format!(" --count {}", shared.generator.random_count()));
    }
    if shared.generator.transition_pair_block().is_some() {
        // The pairs sit between the corner vectors and the random ones.
        seed_part.push_str(" --pairs");
    }
    // In a selected (compacted) set, position `index` is vector `source` of the source set.
    let source = shared.source_index(index).unwrap_or(index);
    let generated = shared.generator.directed().len() as u64 + shared.generator.random_count();
    let repro = match shared.top_up_number(index) {
        // A top-up vector is in no seeded set: its operands (above, and in the manifest)
        // are the reproduction.
        Some(k) => format!(
            "top-up vector {k}: not from the seed; apply the operands above (manifest.json \
             selection.top_up[{k}])"
        ),
        None if source >= generated && !shared.generator.appended().is_empty() => format!(
            "(imported vector {} of the set; repro cannot rebuild it: see row {index} of the \
             set's vectors.csv)",
            source - generated
        ),
        None => format!(
            "{} --index {source}{seed_part}",
            shared.options.repro_command
        ),
    };
    Failure {
        index,
        line,
        kind: if wrong { "mismatch" } else { "unknown" }.to_string(),
        inputs: inputs_report,
        outputs,
        classes,
        repro,
    }
}

fn same_inputs(fields: &[(Signal, u32)], x: &Inputs, y: &Inputs) -> bool {
    fields
        .iter()
        .all(|&(s, w)| x.get(s).masked(w) == y.get(s).masked(w))
}

fn decoded(sig: Signal, v: &Word, width: u32, enc: Encoding) -> String {
    if matches!(
        sig,
        Signal::A | Signal::B | Signal::Result | Signal::Quotient | Signal::Remainder
    ) {
        Value::decode(v, width, enc).to_string()
    } else {
        (v.bit(0) as u8).to_string()
    }
}

/// What a report says about the spec's outputs.
struct OutputsSeen {
    ports: Vec<OutputTally>,
    narrowed: bool,
    seed: Option<u64>,
}

#[allow(clippy::too_many_arguments)]
fn build_report(
    spec: &Spec,
    generator: &Generator,
    logs: Vec<String>,
    (vectors, passed, failed, unknown): (u64, u64, u64, u64),
    counts: CoverageCounts,
    failures: Vec<Failure>,
    problems: LogProblems,
    outputs: OutputsSeen,
    options: &CheckOptions,
    seen: Vec<SeenIndices>,
    runs: Option<Vec<RunRecord>>,
) -> CheckReport {
    let (coverage, classes) = summarise(
        generator.catalogue(),
        &counts,
        options.at_least,
        (vectors, failed + unknown),
    );
    let met = options.require.is_none_or(|r| coverage.percent >= r);
    // An output the spec names that no row compared fails the run, unless the user left
    // it out on purpose.
    let never_compared = !outputs.narrowed && outputs.ports.iter().any(|p| !p.compared);
    let verdict = if failed > 0 || unknown > 0 || problems.any() || vectors == 0 || never_compared {
        Verdict::Fail
    } else if !met {
        Verdict::CoverageShort
    } else {
        Verdict::Pass
    };
    let reasons = verdict_reasons(
        verdict,
        (vectors, failed, unknown),
        &problems,
        &outputs,
        &coverage,
        options.require,
    );
    let per_operation = operation_outputs(spec, &outputs.ports);
    let mut report = CheckReport {
        tool: "arithvec".into(),
        version: env!("CARGO_PKG_VERSION").into(),
        unit: spec.name.clone(),
        spec_sha256: spec_identity(spec),
        spec_toml: spec.to_toml(),
        logs,
        vectors,
        passed,
        failed,
        unknown,
        coverage,
        classes,
        failures,
        log_problems: problems,
        gate: CoverageGate {
            require: options.require,
            met,
        },
        verdict,
        note: EVIDENCE_NOTE.into(),
        counts,
        output_ports: outputs.ports,
        outputs_narrowed: outputs.narrowed,
        verdict_reasons: reasons,
        seed: outputs.seed,
        operation_outputs: per_operation,
        seen,
        runs: Vec::new(),
        timing: None,
    };
    report.runs = match runs {
        Some(runs) => runs,
        None => {
            // A check is one run; its id is the hash of everything else it reports.
            let text = serde_json::to_string(&report).expect("report serialises");
            vec![RunRecord {
                id: sha256_hex(text.as_bytes()),
                logs: report.logs.clone(),
                vectors: report.vectors,
                passed: report.passed,
                failed: report.failed,
                unknown: report.unknown,
            }]
        }
    };
    report
}

/// Per-port counts as "co: 4, y: 1" (ports with a count only).
fn port_counts(ports: &[OutputTally], count: impl Fn(&OutputTally) -> u64) -> String {
    ports
        .iter()
        .filter(|p| count(p) > 0)
        .map(|p| format!("{}: {}", p.port, count(p)))
        .collect::<Vec<_>>()
        .join(", ")
}

fn plural(n: u64, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// The reasons behind a verdict, most fundamental first: what was not compared, what is
/// missing or out of step, then what was wrong.
fn verdict_reasons(
    verdict: Verdict,
    (vectors, failed, unknown): (u64, u64, u64),
    p: &LogProblems,
    outputs: &OutputsSeen,
    coverage: &CoverageSummary,
    require: Option<f64>,
) -> Vec<String> {
    let mut r = Vec::new();
    let not_compared: Vec<&str> = outputs
        .ports
        .iter()
        .filter(|o| !o.compared)
        .map(|o| o.port.as_str())
        .collect();
    if !not_compared.is_empty() && !outputs.narrowed {
        r.push(format!(
            "outputs never compared: {}",
            not_compared.join(", ")
        ));
    }
    if vectors == 0 {
        r.push("the log has no rows to check".into());
    }
    if p.missing > 0 {
        r.push(format!(
            "log incomplete ({} of {} rows)",
            vectors,
            vectors.saturating_add(p.missing)
        ));
    }
    if let Some(o) = &p.out_of_step {
        r.push(format!("out of step at line {}", o.first_line));
    }
    if failed > 0 {
        let by_port = port_counts(&outputs.ports, |o| o.wrong);
        r.push(if by_port.is_empty() {
            plural(failed, "mismatch", "mismatches")
        } else {
            format!("{} ({by_port})", plural(failed, "mismatch", "mismatches"))
        });
    }
    if unknown > 0 {
        let by_port = port_counts(&outputs.ports, |o| o.unknown);
        let what = plural(
            unknown,
            "row with unknown (x/z) values",
            "rows with unknown (x/z) values",
        );
        r.push(if by_port.is_empty() {
            what
        } else {
            format!("{what} ({by_port})")
        });
    }
    if p.duplicate_count > 0 {
        let at = p.duplicates.first().map_or(String::new(), |(i, l)| {
            format!(", first index {i} at line {l}")
        });
        r.push(format!(
            "log repeats {}{at}",
            plural(p.duplicate_count, "index", "indices")
        ));
    }
    if let Some((i, l)) = p.out_of_range.first() {
        r.push(format!(
            "rows outside the vector set (first index {i} at line {l})"
        ));
    }
    if verdict == Verdict::CoverageShort {
        if let Some(req) = require {
            r.push(format!(
                "class coverage {:.2}% is below the required {req}%",
                coverage.percent
            ));
        }
    }
    r
}

/// Combines reports of several runs or shards of one spec into one verdict. Errors (as a
/// problem naming the report) when the reports are of different specs or arithvec versions,
/// when a report is inconsistent (its counts do not add up, its seen indices are malformed),
/// when one run is given twice (naming both reports), or when a sum overflows.
///
/// Counts and coverage are sums over the runs. Completeness is judged over the union: the
/// runs of one vector set (same seed and counts, sharded or not) must together see every
/// index of the set exactly once; indices seen by several runs are duplicates. Runs checked
/// without a vector set are kept apart (their indices are the logs' own labels).
pub fn merge(
    spec: &Spec,
    generator: &Generator,
    reports: &[(String, CheckReport)],
    options: &CheckOptions,
) -> Result<CheckReport, Problem> {
    let identity = spec_identity(spec);
    let mut counts: Option<CoverageCounts> = None;
    let (mut vectors, mut passed, mut failed, mut unknown) = (0u64, 0u64, 0u64, 0u64);
    let mut failures = Vec::new();
    let mut problems = LogProblems::default();
    let mut logs = Vec::new();
    let mut runs: Vec<RunRecord> = Vec::new();
    // Run id -> the report it came from.
    let mut run_files: BTreeMap<String, &str> = BTreeMap::new();
    // Seen indices per vector set, and the set-less entries as they are.
    let mut by_set: BTreeMap<SetIdentity, Vec<&[[u64; 2]]>> = BTreeMap::new();
    let mut unlabelled: Vec<SeenIndices> = Vec::new();
    let overflow = |name: &str, field: &str| {
        Problem::new(
            name.to_string(),
            format!("the merged {field} does not fit in 64 bits; a report is corrupt"),
        )
        .field(field)
    };
    let mut ports: Option<Vec<OutputTally>> = None;
    let mut narrowed = false;
    let mut seed = None;
    for (name, r) in reports {
        if r.spec_sha256 != identity {
            return Err(Problem::new(
                name.clone(),
                format!(
                    "report is for unit \"{}\" with a different spec (spec_sha256 {}); \
                     refusing to merge reports of different specs",
                    r.unit, r.spec_sha256
                ),
            )
            .field("spec_sha256"));
        }
        if r.version != env!("CARGO_PKG_VERSION") {
            return Err(Problem::new(
                name.clone(),
                format!(
                    "report was written by arithvec {}; this is {} and its class catalogue may \
                     differ; re-run the check",
                    r.version,
                    env!("CARGO_PKG_VERSION")
                ),
            )
            .field("version"));
        }
        let cat = generator.catalogue();
        let c = &r.counts;
        if c.bin_hits.len() != cat.bin_count()
            || c.bin_failures.len() != cat.bin_count()
            || c.class_hits.len() != cat.classes().len()
            || c.class_failures.len() != cat.classes().len()
        {
            return Err(Problem::new(
                name.clone(),
                "report's coverage counts do not match this spec's classes",
            )
            .field("counts"));
        }
        check_consistent(name, r)?;
        for run in &r.runs {
            if let Some(other) = run_files.insert(run.id.clone(), name) {
                return Err(Problem::new(
                    name.clone(),
                    format!(
                        "{other} and {name} both hold the run of log(s) {} (run id {}); \
                         the same run must not be merged twice",
                        run.logs.join(", "),
                        run.id
                    ),
                )
                .field("runs"));
            }
            runs.push(run.clone());
        }
        match &mut counts {
            Some(sum) => {
                if !sum.checked_add(&r.counts) {
                    return Err(overflow(name, "counts"));
                }
            }
            None => counts = Some(r.counts.clone()),
        }
        let add =
            |a: u64, b: u64, field: &str| a.checked_add(b).ok_or_else(|| overflow(name, field));
        vectors = add(vectors, r.vectors, "vectors")?;
        passed = add(passed, r.passed, "passed")?;
        failed = add(failed, r.failed, "failed")?;
        unknown = add(unknown, r.unknown, "unknown")?;
        for f in &r.failures {
            if failures.len() < options.max_failures {
                failures.push(f.clone());
            }
        }
        let p = &r.log_problems;
        problems.duplicate_count = add(
            problems.duplicate_count,
            p.duplicate_count,
            "duplicate_count",
        )?;
        problems.duplicates.extend(p.duplicates.iter().copied());
        problems.duplicates.truncate(20);
        problems.out_of_range.extend(p.out_of_range.iter().copied());
        problems.out_of_range.truncate(20);
        problems.bad_line_count = add(problems.bad_line_count, p.bad_line_count, "bad_line_count")?;
        problems.bad_lines.extend(p.bad_lines.iter().cloned());
        problems.bad_lines.truncate(20);
        if problems.out_of_step.is_none() {
            problems.out_of_step = p.out_of_step.clone();
        }
        for entry in &r.seen {
            match &entry.set {
                Some(set) => by_set.entry(set.clone()).or_default().push(&entry.ranges),
                None => unlabelled.push(entry.clone()),
            }
        }
        logs.extend(r.logs.iter().cloned());
        // An output is compared in the merge only when every run compared it.
        match &mut ports {
            None => ports = Some(r.output_ports.clone()),
            Some(sum) => {
                for p in sum.iter_mut() {
                    match r.output_ports.iter().find(|q| q.signal == p.signal) {
                        Some(q) => {
                            p.compared &= q.compared;
                            p.wrong = add(p.wrong, q.wrong, "output_ports")?;
                            p.unknown = add(p.unknown, q.unknown, "output_ports")?;
                        }
                        None => p.compared = false,
                    }
                }
            }
        }
        narrowed |= r.outputs_narrowed;
        seed = seed.or(r.seed);
    }
    let counts = counts.ok_or_else(|| Problem::new("merge", "no reports given"))?;
    // Completeness and duplicates over the union, per vector set.
    let mut seen = Vec::new();
    for (set, lists) in by_set {
        let union = seen::unite(&lists, 20);
        let (missing, first) = seen::gaps(&union.ranges, set.total, 20);
        problems.missing = problems
            .missing
            .checked_add(missing)
            .ok_or_else(|| overflow("merge", "missing"))?;
        if problems.missing_first.len() < 20 {
            problems.missing_first.extend(first);
            problems.missing_first.truncate(20);
        }
        problems.duplicate_count = problems
            .duplicate_count
            .checked_add(union.overlap_count)
            .ok_or_else(|| overflow("merge", "duplicate_count"))?;
        problems.overlapping.extend(union.overlaps);
        problems.overlapping.truncate(20);
        seen.push(SeenIndices {
            set: Some(set),
            count: seen::count(&union.ranges).unwrap_or(u64::MAX),
            ranges: union.ranges,
        });
    }
    seen.extend(unlabelled);
    let outputs = OutputsSeen {
        ports: ports.unwrap_or_default(),
        narrowed,
        seed,
    };
    Ok(build_report(
        spec,
        generator,
        logs,
        (vectors, passed, failed, unknown),
        counts,
        failures,
        problems,
        outputs,
        options,
        seen,
        Some(runs),
    ))
}

/// Refuses a report whose own numbers disagree: rows that do not add up, seen indices that
/// are malformed, outside their set, or not as many as the rows checked.
fn check_consistent(name: &str, r: &CheckReport) -> Result<(), Problem> {
    let bad = |field: &str, why: String| Err(Problem::new(name.to_string(), why).field(field));
    let judged = r
        .passed
        .checked_add(r.failed)
        .and_then(|n| n.checked_add(r.unknown));
    if judged != Some(r.vectors) {
        return bad(
            "vectors",
            format!(
                "passed {} + failed {} + unknown {} is not vectors {}; the report is corrupt",
                r.passed, r.failed, r.unknown, r.vectors
            ),
        );
    }
    if r.runs.is_empty() {
        return bad("runs", "the report lists no runs; re-run the check".into());
    }
    let mut seen_total = 0u64;
    for (k, entry) in r.seen.iter().enumerate() {
        if let Some(why) = seen::malformed(&entry.ranges) {
            return bad("seen", format!("seen entry {k}: {why}"));
        }
        let n = seen::count(&entry.ranges);
        if n != Some(entry.count) {
            return bad(
                "seen",
                format!(
                    "seen entry {k}: its ranges hold {} indices, not its count {}",
                    n.map_or("more than 2^64".into(), |n| n.to_string()),
                    entry.count
                ),
            );
        }
        if let (Some(set), Some(last)) = (&entry.set, entry.ranges.last()) {
            if last[1] >= set.total {
                return bad(
                    "seen",
                    format!(
                        "seen entry {k}: index {} is outside its set of {} vectors",
                        last[1], set.total
                    ),
                );
            }
        }
        seen_total = match seen_total.checked_add(entry.count) {
            Some(t) => t,
            None => return bad("seen", "the seen counts overflow".into()),
        };
    }
    if seen_total != r.vectors {
        return bad(
            "seen",
            format!(
                "the report saw {seen_total} indices but checked {} vectors; the report is corrupt",
                r.vectors
            ),
        );
    }
    Ok(())
}

impl CheckReport {
    /// Classes with the given status.
    pub fn classes_with(&self, status: ClassStatus) -> impl Iterator<Item = &ClassSummary> {
        self.classes.iter().filter(move |c| c.status == status)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sets::vectorset::{write, WriteOptions};
    use crate::sim::log::Radix;
    use crate::spec::{Encoding, Operation};

    /// A log of `generator`'s vectors with every kind of trouble: wrong and unknown outputs,
    /// unknown operands, duplicates, an index past the set, operands out of step, missing
    /// rows, comments, blank lines and (when `bad`) malformed lines.
    fn troubled_log(spec: &Spec, generator: &Generator, bad: bool) -> String {
        let names: Vec<&str> = spec
            .inputs()
            .into_iter()
            .chain(spec.outputs())
            .map(|(_, n)| n)
            .collect();
        let mut log = format!("index,{}\n", names.join(","));
        let cat = generator.catalogue();
        let mut hits = Hits::new();
        let total = generator.total();
        let w = spec.width;
        for i in 0..total + 40 {
            if i % 50 == 7 {
                continue;
            }
            let index = match i {
                i if i >= total + 39 => total + 5,
                i if i >= total => i - total,
                i => i,
            };
            let mut v = generator.vector(index.min(total - 1)).expect("vector");
            if i % 333 == 5 {
                v.a = Word::from_u64(i * 7919).masked(w);
            }
            let o = cat.evaluate(&v, &mut hits);
            let mut fields: Vec<String> = spec
                .inputs()
                .iter()
                .map(|(s, _)| v.get(*s).to_hex(s.width(w)))
                .collect();
            if i % 401 == 3 {
                fields[0] = "x".repeat(fields[0].len());
            }
            for (k, (s, _)) in spec.outputs().iter().enumerate() {
                let sw = s.width(w);
                let mut value = o.get(*s);
                if i % 41 == 0 && k == 0 {
                    value = value.xor(&Word::from_u64(1 << (i % sw as u64))).masked(sw);
                }
                let mut hex = value.to_hex(sw);
                if i % 67 == 1 && k == 1 {
                    hex = "z".repeat(hex.len());
                }
                fields.push(hex);
            }
            log.push_str(&format!("{index},{}\n", fields.join(",")));
            if i % 97 == 3 {
                log.push_str("// a comment\n\n");
            }
            if bad && i % 89 == 11 {
                log.push_str(&format!("{index},zz\n"));
            }
        }
        log
    }

    fn checker<'g>(
        spec: &Spec,
        generator: &'g Generator,
        manifest: &Manifest,
        columns: &[Signal],
        threads: usize,
        tiny: bool,
    ) -> Checker<'g> {
        let options = CheckOptions {
            max_failures: 7,
            threads,
            ..CheckOptions::default()
        };
        let mut c =
            Checker::new(spec, generator, Some(manifest), columns, options).expect("checker");
        if tiny {
            // Many small blocks and batches, so order and merging are exercised hard.
            c.block_bytes = 300;
            c.batch_rows = 5;
        }
        c.add_log("log.csv");
        c
    }

    /// Every way of feeding a checker, on any number of threads, gives the sequential report.
    #[test]
    fn parallel_reports_equal_sequential() {
        let mut spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 12);
        spec.name = "parallel_check".into();
        let generator = Generator::new(&spec, Some(3000), Some(11));
        let dir = tempfile::tempdir().expect("temp dir");
        let manifest = write(&generator, &spec, dir.path(), WriteOptions::default()).expect("set");
        let text = troubled_log(&spec, &generator, true);
        let reader =
            || LogReader::new(text.as_bytes(), "log.csv", &spec, Radix::Hex).expect("header");
        let columns = reader().columns().to_vec();

        let mut reference = checker(&spec, &generator, &manifest, &columns, 1, false);
        let mut r = reader();
        let bad = reference.check_log(&mut r, true, |_| {}).expect("read");
        assert!(bad.is_empty(), "lenient: bad lines go into the report");
        let reference = reference.finish();
        assert!(reference.failed > 0 && reference.unknown > 0);
        assert!(reference.failures.len() == 7);
        let p = &reference.log_problems;
        assert!(p.duplicate_count > 0 && !p.out_of_range.is_empty() && p.missing > 0);
        assert!(p.out_of_step.is_some() && p.bad_line_count > 0);
        let expected = serde_json::to_string(&reference).expect("json");

        for (threads, tiny) in [
            (1, true),
            (2, false),
            (2, true),
            (3, true),
            (8, true),
            (8, false),
        ] {
            let mut c = checker(&spec, &generator, &manifest, &columns, threads, tiny);
            let mut r = reader();
            c.check_log(&mut r, true, |_| {}).expect("read");
            let got = serde_json::to_string(&c.finish()).expect("json");
            assert_eq!(got, expected, "check_log, {threads} threads, tiny {tiny}");

            // Row by row, through both row APIs.
            for closure in [false, true] {
                let mut c = checker(&spec, &generator, &manifest, &columns, threads, tiny);
                let mut r = reader();
                let mut row = LogRow::new();
                loop {
                    match r.read_row(&mut row) {
                        Ok(true) if closure => c.row(row.line, row.index, |s| {
                            row.get(s).map(|f| Observed {
                                bits: f.bits,
                                unknown: f.unknown,
                                z: f.z,
                            })
                        }),
                        Ok(true) => c.log_row(&row),
                        Ok(false) => break,
                        Err(crate::sim::log::RowError::Line(p)) => c.bad_line(&p),
                        Err(crate::sim::log::RowError::Io(e)) => panic!("{e}"),
                    }
                }
                let got = serde_json::to_string(&c.finish()).expect("json");
                assert_eq!(
                    got, expected,
                    "rows, {threads} threads, tiny {tiny}, closure {closure}"
                );
            }
        }
    }

    /// Without leniency the first 20 malformed lines come back, the same on every thread count.
    #[test]
    fn bad_lines_are_the_first_twenty_in_order() {
        let spec = Spec::with_defaults(Operation::Add, Encoding::Unsigned, 8);
        let generator = Generator::new(&spec, Some(3000), Some(2));
        let dir = tempfile::tempdir().expect("temp dir");
        let manifest = write(&generator, &spec, dir.path(), WriteOptions::default()).expect("set");
        let text = troubled_log(&spec, &generator, true);
        let mut sequential: Vec<String> = Vec::new();
        let mut r = LogReader::new(text.as_bytes(), "log.csv", &spec, Radix::Hex).expect("log");
        let mut row = LogRow::new();
        loop {
            match r.read_row(&mut row) {
                Ok(true) => {}
                Ok(false) => break,
                Err(crate::sim::log::RowError::Line(p)) if sequential.len() < 20 => {
                    sequential.push(p.to_string())
                }
                Err(_) => break,
            }
        }
        assert_eq!(sequential.len(), 20);
        for (threads, tiny) in [(1, false), (1, true), (2, true), (3, true), (8, true)] {
            let mut r = LogReader::new(text.as_bytes(), "log.csv", &spec, Radix::Hex).expect("log");
            let columns = r.columns().to_vec();
            let mut c = checker(&spec, &generator, &manifest, &columns, threads, tiny);
            let bad = c.check_log(&mut r, false, |_| {}).expect("read");
            let bad: Vec<String> = bad.iter().map(|p| p.to_string()).collect();
            assert_eq!(bad, sequential, "{threads} threads, tiny {tiny}");
        }
    }

    /// A worker that panics (a bug) has its panic passed on to the caller, in place of a
    /// check that waits for a reply that cannot come; the other workers' replies still count.
    #[test]
    fn a_failing_worker_cannot_hang_the_check() {
        let spec = Spec::with_defaults(Operation::Add, Encoding::Unsigned, 8);
        let generator = Generator::new(&spec, Some(500), Some(4));
        let dir = tempfile::tempdir().expect("temp dir");
        let manifest = write(&generator, &spec, dir.path(), WriteOptions::default()).expect("set");
        let text = troubled_log(&spec, &generator, false);
        for threads in [2, 3, 8] {
            let mut r = LogReader::new(text.as_bytes(), "log.csv", &spec, Radix::Hex).expect("log");
            let columns = r.columns().to_vec();
            let mut c = checker(&spec, &generator, &manifest, &columns, threads, true);
            c.check_log(&mut r, true, |_| {}).expect("read");
            if let Some(pool) = c.pool.as_mut() {
                pool.send(Job::Fail);
            }
            let finished = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| c.finish()));
            let panic = finished.expect_err("the worker's panic reaches the caller");
            let message = panic.downcast_ref::<&str>().copied().unwrap_or_default();
            assert_eq!(message, "a test job failed on purpose", "{threads} threads");
        }
    }
}
