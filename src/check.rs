//! The checker: judges each result-log row against the golden model, records coverage, and
//! produces the verdict.
//!
//! A row's operands come from the log when it has the operand columns (so logs of stimulus
//! arithvec did not make can be checked and classified), otherwise from the vector set by
//! index. When both are available they must agree; a testbench applying vectors out of step
//! is reported as such. Outputs with x/z bits are *unknown*: counted apart from wrong values,
//! never passing. The checker holds no rows: memory is the coverage counters, a bitmap of
//! seen indices and the first few failures. It reads nothing itself; the caller feeds rows.

use serde::{Deserialize, Serialize};

use crate::classes::Hits;
use crate::coverage::{
    summarise, ClassStatus, ClassSummary, Coverage, CoverageCounts, CoverageSummary,
};
use crate::encoding::Value;
use crate::error::Problem;
use crate::generate::{Generator, RandomStream};
use crate::model::{Inputs, Outputs};
use crate::spec::{Encoding, Signal, Spec};
use crate::vectorset::{spec_identity, Manifest};
use crate::word::Word;

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
}

impl Default for CheckOptions {
    fn default() -> CheckOptions {
        CheckOptions {
            max_failures: 10,
            at_least: 1,
            require: None,
            repro_command: "arithvec repro SPEC".into(),
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
    /// Got, hex (x where a digit had unknown bits).
    pub got: String,
    /// Expected, binary MSB first (fields up to 64 bits).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub expected_bin: Option<String>,
    /// Got, binary MSB first, x for unknown bits (fields up to 64 bits).
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
}

/// Where the checker gets a vector's inputs by index.
struct VectorLookup<'g> {
    generator: &'g Generator,
    first: u64,
    count: u64,
    /// For a selected set: position -> source index.
    selection: Option<Vec<u64>>,
    stream: Option<(u64, RandomStream)>,
}

impl VectorLookup<'_> {
    fn get(&mut self, index: u64) -> Option<Inputs> {
        if index < self.first || index >= self.first + self.count {
            return None;
        }
        let index = match &self.selection {
            Some(map) => *map.get(index as usize)?,
            None => index,
        };
        let d = self.generator.directed().len() as u64;
        if index < d {
            return self.generator.directed().get(index as usize).copied();
        }
        let j = index - d;
        match &mut self.stream {
            Some((next, s)) if *next == j => {
                *next += 1;
                Some(s.next_inputs())
            }
            _ => {
                let mut s = self.generator.random_stream(j);
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
}

/// One log field as read: value bits and the mask of x/z bits.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Observed {
    /// Known bit values (0 where unknown).
    pub bits: Word,
    /// Bits that were x or z.
    pub unknown: Word,
}

/// Streams rows and accumulates the verdict.
pub struct Checker<'g> {
    spec: Spec,
    generator: &'g Generator,
    lookup: Option<VectorLookup<'g>>,
    columns: Vec<Signal>,
    /// The spec's inputs and outputs with their widths, in layout order.
    input_fields: Vec<(Signal, u32)>,
    output_fields: Vec<(Signal, u32)>,
    options: CheckOptions,
    logs: Vec<String>,
    coverage: Coverage,
    hits: Hits,
    seen: Seen,
    max_index_seen: Option<u64>,
    position: u64,
    vectors: u64,
    passed: u64,
    failed: u64,
    unknown: u64,
    failures: Vec<Failure>,
    problems: LogProblems,
    /// Out-of-step rows, first index, first line.
    out_of_step: Option<OutOfStep>,
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
        let lookup = set.map(|m| VectorLookup {
            generator,
            first: m.first_index,
            count: m.vectors,
            selection: m.selection.as_ref().map(|s| s.indices.clone()),
            stream: None,
        });
        let has_all_inputs = spec.inputs().iter().all(|(s, _)| columns.contains(s));
        if !has_all_inputs && lookup.is_none() {
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
        Ok(Checker {
            spec: spec.clone(),
            generator,
            lookup,
            columns: columns.to_vec(),
            input_fields: spec
                .inputs()
                .iter()
                .map(|&(s, _)| (s, s.width(spec.width)))
                .collect(),
            output_fields: spec
                .outputs()
                .iter()
                .map(|&(s, _)| (s, s.width(spec.width)))
                .collect(),
            options,
            logs: Vec::new(),
            coverage: Coverage::new(generator.catalogue()),
            hits: Hits::new(),
            seen: Seen::default(),
            max_index_seen: None,
            // A log without an index column starts at the set's first vector, so a shard's
            // testbench that plays its own stimulus.hex from line one is checked in step.
            position: set.map_or(0, |m| m.first_index),
            vectors: 0,
            passed: 0,
            failed: 0,
            unknown: 0,
            failures: Vec::new(),
            problems: LogProblems::default(),
            out_of_step: None,
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
        let index = index.unwrap_or(self.position);
        self.position += 1;
        if self.seen.mark(index) {
            self.problems.duplicate_count += 1;
            if self.problems.duplicates.len() < 20 {
                self.problems.duplicates.push((index, line));
            }
            return;
        }
        self.max_index_seen = Some(self.max_index_seen.map_or(index, |m| m.max(index)));
        let from_set = match self.lookup.as_mut() {
            Some(l) => {
                let v = l.get(index);
                if v.is_none() {
                    if self.problems.out_of_range.len() < 20 {
                        self.problems.out_of_range.push((index, line));
                    }
                    return;
                }
                v
            }
            None => None,
        };
        // Operands: the log's own where present, else the set's.
        let mut inputs = from_set.unwrap_or_default();
        let mut operand_unknown = false;
        let mut from_log = false;
        for &(sig, _) in &self.input_fields {
            if let Some(o) = field(sig) {
                from_log = true;
                if !o.unknown.is_zero() {
                    operand_unknown = true;
                }
                inputs.set(sig, o.bits);
            }
        }
        if let (Some(set_inputs), true) = (from_set, from_log) {
            if !operand_unknown && !same_inputs(&self.input_fields, &set_inputs, &inputs) {
                let s = self.out_of_step.get_or_insert(OutOfStep {
                    count: 0,
                    first_index: index,
                    first_line: line,
                });
                s.count += 1;
            }
        }
        self.vectors += 1;
        let cat = self.generator.catalogue();
        let expected = cat.evaluate(&inputs, &mut self.hits);
        let alternative = cat.model().alternative(&expected);
        let mut wrong = false;
        let mut unknown = operand_unknown;
        let judge = |exp: &Outputs| {
            let (mut wrong, mut unknown) = (false, false);
            for &(sig, w) in &self.output_fields {
                if let Some(o) = field(sig) {
                    let e = exp.get(sig);
                    if w <= 64 {
                        // Fields up to 64 bits: one limb, no masks to build.
                        let m = u64::MAX >> (64 - w);
                        let unk = o.unknown.low_u64() & m;
                        wrong |= (o.bits.low_u64() ^ e.low_u64()) & !unk & m != 0;
                        unknown |= unk != 0;
                    } else {
                        let e = e.masked(w);
                        let diff = o.bits.xor(&e).and(&o.unknown.not(w)).masked(w);
                        wrong |= !diff.is_zero();
                        unknown |= !o.unknown.masked(w).is_zero();
                    }
                }
            }
            (wrong, unknown)
        };
        if !operand_unknown {
            let (w, u) = judge(&expected);
            wrong = w;
            unknown = u;
            if let (true, Some(alt)) = (w || u, alternative.as_ref()) {
                let (w2, u2) = judge(alt);
                if !w2 && !u2 {
                    wrong = false;
                    unknown = false;
                }
            }
        }
        let failed = wrong || unknown;
        self.coverage.record(&self.hits, failed);
        if wrong {
            self.failed += 1;
        } else if unknown {
            self.unknown += 1;
        } else {
            self.passed += 1;
        }
        if failed && self.failures.len() < self.options.max_failures {
            let f = self.describe(index, line, &inputs, &expected, &field, wrong);
            self.failures.push(f);
        }
    }

    fn describe(
        &self,
        index: u64,
        line: usize,
        inputs: &Inputs,
        expected: &Outputs,
        field: &impl Fn(Signal) -> Option<Observed>,
        wrong: bool,
    ) -> Failure {
        let spec = &self.spec;
        let cat = self.generator.catalogue();
        let inputs_report = spec
            .inputs()
            .into_iter()
            .map(|(sig, port)| {
                let w = sig.width(spec.width);
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
            let w = sig.width(spec.width);
            let e = expected.get(sig).masked(w);
            let unknown = o.unknown.masked(w);
            let diff = o.bits.xor(&e).and(&unknown.not(w)).masked(w);
            let status = if !diff.is_zero() {
                "wrong"
            } else if !unknown.is_zero() {
                "unknown"
            } else {
                "ok"
            };
            let got_hex: String = (0..w.div_ceil(4))
                .rev()
                .map(|d| {
                    let nib = o.bits.extract(d * 4, 4).low_u64();
                    let unk = unknown.extract(d * 4, 4).low_u64();
                    if unk != 0 {
                        'x'
                    } else {
                        char::from_digit(nib as u32, 16).unwrap_or('?')
                    }
                })
                .collect();
            let got_bin = (w <= 64).then(|| {
                (0..w)
                    .rev()
                    .map(|i| {
                        if unknown.bit(i) {
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
        for &c in self.hits.classes() {
            classes.push(cat.classes()[c as usize].id().to_string());
        }
        let seed_part = match self.lookup {
            Some(_) => format!(" --seed {}", self.generator.seed()),
            None => String::new(),
        };
        // In a selected (compacted) set, position `index` is vector `source` of the source set.
        let source = self
            .lookup
            .as_ref()
            .and_then(|l| l.selection.as_ref())
            .and_then(|s| s.get(index as usize).copied())
            .unwrap_or(index);
        Failure {
            index,
            line,
            kind: if wrong { "mismatch" } else { "unknown" }.to_string(),
            inputs: inputs_report,
            outputs,
            classes,
            repro: format!("{} --index {source}{seed_part}", self.options.repro_command),
        }
    }

    /// Ends the check and returns the report.
    pub fn finish(mut self) -> CheckReport {
        if let Some(l) = &self.lookup {
            for i in l.first..l.first + l.count {
                if !self.seen.contains(i) {
                    self.problems.missing += 1;
                    if self.problems.missing_first.len() < 20 {
                        self.problems.missing_first.push(i);
                    }
                }
            }
        }
        self.problems.out_of_step = self.out_of_step.take();
        let counts = self.coverage.totals();
        let _ = &self.columns;
        build_report(
            &self.spec,
            self.generator,
            self.logs,
            (self.vectors, self.passed, self.failed, self.unknown),
            counts,
            self.failures,
            self.problems,
            &self.options,
        )
    }
}

fn same_inputs(fields: &[(Signal, u32)], x: &Inputs, y: &Inputs) -> bool {
    fields
        .iter()
        .all(|&(s, w)| x.get(s).masked(w) == y.get(s).masked(w))
}

fn decoded(sig: Signal, v: &Word, width: u32, enc: Encoding) -> String {
    if matches!(sig, Signal::A | Signal::B | Signal::Result) {
        Value::decode(v, width, enc).to_string()
    } else {
        (v.bit(0) as u8).to_string()
    }
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
    options: &CheckOptions,
) -> CheckReport {
    let (coverage, classes) = summarise(generator.catalogue(), &counts, options.at_least);
    let met = options.require.is_none_or(|r| coverage.percent >= r);
    let verdict = if failed > 0 || unknown > 0 || problems.any() || vectors == 0 {
        Verdict::Fail
    } else if !met {
        Verdict::CoverageShort
    } else {
        Verdict::Pass
    };
    CheckReport {
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
    }
}

/// Combines reports of several runs or shards of one spec into one verdict. Errors (as a
/// message) when the reports are of different specs or arithvec versions.
pub fn merge(
    spec: &Spec,
    generator: &Generator,
    reports: &[(String, CheckReport)],
    options: &CheckOptions,
) -> Result<CheckReport, Problem> {
    let identity = spec_identity(spec);
    let mut counts: Option<CoverageCounts> = None;
    let (mut vectors, mut passed, mut failed, mut unknown) = (0, 0, 0, 0);
    let mut failures = Vec::new();
    let mut problems = LogProblems::default();
    let mut logs = Vec::new();
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
        if r.counts.bin_hits.len() != generator.catalogue().bin_count() {
            return Err(Problem::new(
                name.clone(),
                "report's coverage counts do not match this spec's classes",
            )
            .field("counts"));
        }
        match &mut counts {
            Some(c) => c.add(&r.counts),
            None => counts = Some(r.counts.clone()),
        }
        vectors += r.vectors;
        passed += r.passed;
        failed += r.failed;
        unknown += r.unknown;
        for f in &r.failures {
            if failures.len() < options.max_failures {
                failures.push(f.clone());
            }
        }
        let p = &r.log_problems;
        problems.missing += p.missing;
        problems
            .missing_first
            .extend(p.missing_first.iter().copied());
        problems.missing_first.truncate(20);
        problems.duplicate_count += p.duplicate_count;
        problems.duplicates.extend(p.duplicates.iter().copied());
        problems.duplicates.truncate(20);
        problems.out_of_range.extend(p.out_of_range.iter().copied());
        problems.out_of_range.truncate(20);
        problems.bad_line_count += p.bad_line_count;
        problems.bad_lines.extend(p.bad_lines.iter().cloned());
        problems.bad_lines.truncate(20);
        if problems.out_of_step.is_none() {
            problems.out_of_step = p.out_of_step.clone();
        }
        logs.extend(r.logs.iter().cloned());
    }
    let counts = counts.ok_or_else(|| Problem::new("merge", "no reports given"))?;
    Ok(build_report(
        spec,
        generator,
        logs,
        (vectors, passed, failed, unknown),
        counts,
        failures,
        problems,
        options,
    ))
}

impl CheckReport {
    /// Classes with the given status.
    pub fn classes_with(&self, status: ClassStatus) -> impl Iterator<Item = &ClassSummary> {
        self.classes.iter().filter(move |c| c.status == status)
    }
}
