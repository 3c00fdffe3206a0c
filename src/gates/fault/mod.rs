//! Single stuck-at fault grading of a [`Netlist`]: the fault list and its equivalence
//! collapsing, bit-parallel fault simulation with fault dropping (and a serial reference mode
//! running the same code one vector at a time), proofs of redundancy by exhaustive simulation
//! of small cones, and greedy compaction of a vector set that keeps its fault coverage.
//!
//! Fault model (DOMAIN "Manufacturing-test view"; the line definitions are common practice,
//! no single source): a *line* is a stem (a net as its driver sees it: a primary input bit or
//! a gate output) or, for a net read by two or more sinks, each branch to one sink (a gate
//! input pin or a primary output bit). A net read by exactly one sink has no separate branch:
//! the branch is the stem. Each line can be stuck at 0 or at 1, so the full list has
//! `2 x (stems + fan-out branches)` faults. Constant nets are not lines; every gate pin or
//! output bit tied to a constant is its own branch and carries only the fault stuck at the
//! opposite value (stuck at the tied value is the fault-free circuit).
//!
//! A vector detects a fault when some primary output differs from the fault-free circuit.
//!
//! Simulation is parallel-pattern single-fault propagation: for a chunk of up to 64 blocks
//! of 64 vectors the fault-free values are computed once; then each representative fault
//! still undetected is injected and propagated four blocks at a time (`wide`: 256 vectors
//! per pass, a chunk's last blocks one at a time) through its fan-out cone
//! (computed once and cached), in topological order, evaluating only gates with an input
//! that carries the fault effect and stopping once no affected net has readers left. The
//! serial mode runs exactly this code with one vector per block; it exists as the reference
//! for tests and the benchmark. Because the cone walk stops when the effect dies out, and one
//! vector's effect dies sooner than the union of 64, the bit-parallel gain is below 64x.

use std::collections::HashMap;

use serde::Serialize;

use crate::arith::word::{Word, MAX_WIDTH};
use crate::error::{Error, Problem, Result};
use crate::gates::netlist::{Driver, GateKind, NetId, Netlist};

mod engine;
mod matrix;
mod transition;
mod wide;
use engine::*;
pub use engine::{grade, grade_with, grade_with_progress, Progress};
pub(crate) use matrix::detection_matrix_on;
pub use matrix::{compact, detection_matrix, DetectionMatrix};
pub use transition::{
    grade_transitions, PairSelection, TransitionEntry, TransitionFault, TransitionList,
    TransitionReport,
};
use wide::*;

/// Where a stuck-at fault sits.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum FaultSite {
    /// The stem of a net: every reader sees the stuck value.
    Stem(NetId),
    /// The branch into one gate input pin of a net that fans out (or is a constant).
    GateInput {
        /// Index into [`Netlist::gates`].
        gate: usize,
        /// Pin position in [`crate::GateKind::input_pins`] order.
        pin: usize,
    },
    /// The branch into one primary output bit of a net that fans out (or is a constant).
    OutputBit {
        /// Index into [`Netlist::outputs`].
        port: usize,
        /// Bit position within the port, LSB = 0.
        bit: u32,
    },
}

/// One single stuck-at fault.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Fault {
    /// The faulty line.
    pub site: FaultSite,
    /// The stuck value: `false` = stuck-at-0, `true` = stuck-at-1.
    pub stuck_at: bool,
}

/// One reader of a net.
#[derive(Debug, Clone, Copy)]
enum Sink {
    Pin { gate: u32, pin: u8 },
    Output(u32),
}

/// Fan-out structure derived once from a netlist.
struct Topology {
    sinks: Vec<Vec<Sink>>,
    /// The distinct gates reading each net, in gate (topological) order.
    fanout_gates: Vec<Vec<u32>>,
    /// True for nets that drive at least one primary output bit.
    observed: Vec<bool>,
    /// (port, bit) of each flat output position.
    output_pos: Vec<(usize, u32)>,
    /// Flat index of the first bit of each input port.
    input_offsets: Vec<usize>,
    /// The gates in a compact form for the simulation loops.
    sim_gates: Vec<SimGate>,
    /// Per net: the highest-numbered gate reading it (0 when none reads it).
    last_reader: Vec<u32>,
}

/// A gate reduced to what simulation needs, kept small so cone walks stay in cache.
#[derive(Debug, Clone, Copy)]
struct SimGate {
    inputs: [u32; 4],
    output: u32,
    arity: u8,
    kind: GateKind,
}

impl Topology {
    fn new(nl: &Netlist) -> Topology {
        let mut sinks: Vec<Vec<Sink>> = vec![Vec::new(); nl.net_count()];
        let mut fanout_gates: Vec<Vec<u32>> = vec![Vec::new(); nl.net_count()];
        for (g, gate) in nl.gates().iter().enumerate() {
            for (pin, net) in gate.inputs().iter().enumerate() {
                sinks[net.index()].push(Sink::Pin {
                    gate: g as u32,
                    pin: pin as u8,
                });
                let list = &mut fanout_gates[net.index()];
                if list.last() != Some(&(g as u32)) {
                    list.push(g as u32);
                }
            }
        }
        let mut observed = vec![false; nl.net_count()];
        let mut output_pos = Vec::new();
        for (port, p) in nl.outputs().iter().enumerate() {
            for (bit, net) in p.nets().iter().enumerate() {
                sinks[net.index()].push(Sink::Output(output_pos.len() as u32));
                observed[net.index()] = true;
                output_pos.push((port, bit as u32));
            }
        }
        let mut input_offsets = Vec::new();
        let mut at = 0;
        for p in nl.inputs() {
            input_offsets.push(at);
            at += p.nets().len();
        }
        let sim_gates = nl
            .gates()
            .iter()
            .map(|g| {
                // Unused pins repeat pin A, so they always name a real net.
                let mut inputs = [g.inputs()[0].index() as u32; 4];
                for (k, n) in g.inputs().iter().enumerate() {
                    inputs[k] = n.index() as u32;
                }
                SimGate {
                    inputs,
                    output: g.output().index() as u32,
                    arity: g.inputs().len() as u8,
                    kind: g.kind(),
                }
            })
            .collect();
        let last_reader = fanout_gates
            .iter()
            .map(|f| f.last().copied().unwrap_or(0))
            .collect();
        Topology {
            sinks,
            fanout_gates,
            observed,
            output_pos,
            input_offsets,
            sim_gates,
            last_reader,
        }
    }

    fn branch(&self, sink: Sink) -> FaultSite {
        match sink {
            Sink::Pin { gate, pin } => FaultSite::GateInput {
                gate: gate as usize,
                pin: pin as usize,
            },
            Sink::Output(flat) => {
                let (port, bit) = self.output_pos[flat as usize];
                FaultSite::OutputBit { port, bit }
            }
        }
    }

    /// The line a sink reads: its own branch when the net fans out or is a constant,
    /// otherwise the net's stem.
    fn line(&self, nl: &Netlist, net: NetId, sink: Sink) -> FaultSite {
        let constant = matches!(nl.driver(net), Driver::Constant(_));
        if constant || self.sinks[net.index()].len() > 1 {
            self.branch(sink)
        } else {
            FaultSite::Stem(net)
        }
    }
}

/// One structural equivalence rule of a gate: input pin stuck at `input` is equivalent to
/// the output stuck at `output`, or two input pins stuck at the same value are equivalent.
#[derive(Clone, Copy)]
enum Rule {
    ToOutput {
        pin: usize,
        input: bool,
        output: bool,
    },
    Inputs {
        first: usize,
        second: usize,
        value: bool,
    },
}

/// The equivalence rules per gate type. Common practice (the classic structural rules, as in
/// M. Abramovici, M. A. Breuer and A. D. Friedman, "Digital Systems Testing and Testable
/// Design", chapter 4; from memory): an input stuck at the gate's controlling value is
/// equivalent to the output stuck at the controlled response. For AOI/OAI cells the inputs of
/// one inner AND (OR) stuck at its controlling value give the same faulty function, so they
/// are equivalent to each other, and the lone third input of AOI3/OAI3 controls the output.
/// XOR, XNOR, MUX and NMUX have no controlling value: nothing collapses across them.
fn rules(kind: GateKind) -> &'static [Rule] {
    // Macros rather than const fns, so the arrays stay promotable to `'static`.
    macro_rules! to {
        ($pin:expr, $input:expr, $output:expr) => {
            Rule::ToOutput {
                pin: $pin,
                input: $input,
                output: $output,
            }
        };
    }
    macro_rules! pair {
        ($first:expr, $second:expr, $value:expr) => {
            Rule::Inputs {
                first: $first,
                second: $second,
                value: $value,
            }
        };
    }
    match kind {
        GateKind::Buf => &[to!(0, false, false), to!(0, true, true)],
        GateKind::Not => &[to!(0, false, true), to!(0, true, false)],
        GateKind::And => &[to!(0, false, false), to!(1, false, false)],
        GateKind::Nand => &[to!(0, false, true), to!(1, false, true)],
        GateKind::Or => &[to!(0, true, true), to!(1, true, true)],
        GateKind::Nor => &[to!(0, true, false), to!(1, true, false)],
        GateKind::AndNot => &[to!(0, false, false), to!(1, true, false)],
        GateKind::OrNot => &[to!(0, true, true), to!(1, false, true)],
        GateKind::Xor | GateKind::Xnor | GateKind::Mux | GateKind::NMux => &[],
        GateKind::Aoi3 => &[to!(2, true, false), pair!(0, 1, false)],
        GateKind::Oai3 => &[to!(2, false, true), pair!(0, 1, true)],
        GateKind::Aoi4 => &[pair!(0, 1, false), pair!(2, 3, false)],
        GateKind::Oai4 => &[pair!(0, 1, true), pair!(2, 3, true)],
    }
}

/// The full single stuck-at fault list of a netlist and its equivalence classes.
///
/// Collapsing merges faults by the structural rules of each gate (see the module notes and
/// [`FaultList::new`]); fan-out-free branches need no rule because they are their stem.
/// Equivalent faults have the same faulty function, so simulating one representative per
/// class grades the whole class.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FaultList {
    faults: Vec<Fault>,
    class_of: Vec<usize>,
    /// Members of each class; the representative comes first.
    classes: Vec<Vec<usize>>,
    /// Shape of the netlist the list was made for, to refuse a different one.
    shape: (usize, usize, usize),
}

fn shape(nl: &Netlist) -> (usize, usize, usize) {
    (nl.net_count(), nl.gates().len(), nl.output_nets().len())
}

impl FaultList {
    /// Enumerates stuck-at-0 and stuck-at-1 on every line and collapses equivalent faults:
    /// BUF input s-a-v = output s-a-v; NOT input s-a-v = output s-a-~v; AND input s-a-0 =
    /// output s-a-0; NAND input s-a-0 = output s-a-1; OR input s-a-1 = output s-a-1; NOR input
    /// s-a-1 = output s-a-0; ANDNOT (A & ~B) A s-a-0 = B s-a-1 = output s-a-0; ORNOT (A | ~B)
    /// A s-a-1 = B s-a-0 = output s-a-1; AOI3 C s-a-1 = output s-a-0 and A s-a-0 = B s-a-0;
    /// OAI3 C s-a-0 = output s-a-1 and A s-a-1 = B s-a-1; AOI4 A s-a-0 = B s-a-0 and C s-a-0 =
    /// D s-a-0; OAI4 likewise with s-a-1; none across XOR, XNOR, MUX, NMUX. Equivalence is
    /// transitive, so chains of fan-out-free gates collapse further.
    pub fn new(netlist: &Netlist) -> FaultList {
        FaultList::with_topology(netlist, &Topology::new(netlist))
    }

    fn with_topology(nl: &Netlist, topo: &Topology) -> FaultList {
        let mut faults = Vec::new();
        for net in 0..nl.net_count() {
            let id = NetId::from_index(net);
            let sinks = &topo.sinks[net];
            match nl.driver(id) {
                Driver::Constant(value) => {
                    for &sink in sinks {
                        faults.push(Fault {
                            site: topo.branch(sink),
                            stuck_at: !value,
                        });
                    }
                }
                _ => {
                    for stuck_at in [false, true] {
                        faults.push(Fault {
                            site: FaultSite::Stem(id),
                            stuck_at,
                        });
                    }
                    if sinks.len() > 1 {
                        for &sink in sinks {
                            for stuck_at in [false, true] {
                                faults.push(Fault {
                                    site: topo.branch(sink),
                                    stuck_at,
                                });
                            }
                        }
                    }
                }
            }
        }
        let index: HashMap<Fault, usize> =
            faults.iter().enumerate().map(|(i, f)| (*f, i)).collect();
        let mut parent: Vec<usize> = (0..faults.len()).collect();
        fn root(parent: &mut [usize], mut i: usize) -> usize {
            while parent[i] != i {
                parent[i] = parent[parent[i]];
                i = parent[i];
            }
            i
        }
        let mut union = |a: Option<&usize>, b: Option<&usize>| {
            if let (Some(&a), Some(&b)) = (a, b) {
                let (ra, rb) = (root(&mut parent, a), root(&mut parent, b));
                if ra != rb {
                    parent[ra.max(rb)] = ra.min(rb);
                }
            }
        };
        for (g, gate) in nl.gates().iter().enumerate() {
            let pin_line = |pin: usize| {
                let sink = Sink::Pin {
                    gate: g as u32,
                    pin: pin as u8,
                };
                topo.line(nl, gate.inputs()[pin], sink)
            };
            let out = FaultSite::Stem(gate.output());
            for rule in rules(gate.kind()) {
                match *rule {
                    Rule::ToOutput { pin, input, output } => union(
                        index.get(&Fault {
                            site: pin_line(pin),
                            stuck_at: input,
                        }),
                        index.get(&Fault {
                            site: out,
                            stuck_at: output,
                        }),
                    ),
                    Rule::Inputs {
                        first,
                        second,
                        value,
                    } => union(
                        index.get(&Fault {
                            site: pin_line(first),
                            stuck_at: value,
                        }),
                        index.get(&Fault {
                            site: pin_line(second),
                            stuck_at: value,
                        }),
                    ),
                }
            }
        }
        let mut classes: Vec<Vec<usize>> = Vec::new();
        let mut class_of_root: HashMap<usize, usize> = HashMap::new();
        let class_of: Vec<usize> = (0..faults.len())
            .map(|i| {
                let r = root(&mut parent, i);
                let c = *class_of_root.entry(r).or_insert_with(|| {
                    classes.push(Vec::new());
                    classes.len() - 1
                });
                classes[c].push(i);
                c
            })
            .collect();
        // Prefer a stem fault as the representative: it names a net the way a designer
        // thinks of it, and it is the gate output of an AND/OR-style class.
        for members in &mut classes {
            if let Some(pos) = members
                .iter()
                .position(|&m| matches!(faults[m].site, FaultSite::Stem(_)))
            {
                let rep = members.remove(pos);
                members.insert(0, rep);
            }
        }
        FaultList {
            faults,
            class_of,
            classes,
            shape: shape(nl),
        }
    }

    /// The number of faults before collapsing.
    pub fn total(&self) -> usize {
        self.faults.len()
    }

    /// The number of equivalence classes (the collapsed fault count).
    pub fn collapsed(&self) -> usize {
        self.classes.len()
    }

    /// Every fault, uncollapsed, grouped by net.
    pub fn faults(&self) -> &[Fault] {
        &self.faults
    }

    /// The class of fault number `fault`.
    pub fn class_of(&self, fault: usize) -> usize {
        self.class_of[fault]
    }

    /// The faults (indices into [`FaultList::faults`]) of class `class`, representative first.
    pub fn members(&self, class: usize) -> &[usize] {
        &self.classes[class]
    }

    /// The representative fault of class `class` (a stem fault when the class has one).
    pub fn representative(&self, class: usize) -> Fault {
        self.faults[self.classes[class][0]]
    }

    fn check(&self, nl: &Netlist) -> Result<()> {
        if self.shape != shape(nl) {
            return Err(Error::problem(Problem::new(
                nl.source(),
                format!(
                    "the fault list was made for a different netlist than module `{}`",
                    nl.module()
                ),
            )));
        }
        Ok(())
    }
}

/// Test vectors packed for fault simulation: 64 vectors per word, one word per primary
/// input bit per block of 64.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PatternSet {
    count: usize,
    widths: Vec<u32>,
    input_bits: usize,
    /// Block-major: block `b` holds words `b * input_bits ..`, one per input bit.
    words: Vec<u64>,
}

impl PatternSet {
    /// Packs `vectors`, each one [`Word`] per input port of `netlist` in port order.
    /// `source` labels error messages (the vector file, say). Errors: a vector with the wrong
    /// number of values, a value wider than its port, a port wider than [`MAX_WIDTH`].
    pub fn from_vectors(
        netlist: &Netlist,
        vectors: &[Vec<Word>],
        source: &str,
    ) -> Result<PatternSet> {
        const MAX_REPORTED: usize = 20;
        let widths: Vec<u32> = netlist.inputs().iter().map(|p| p.width()).collect();
        let mut problems = Vec::new();
        for p in netlist.inputs() {
            if p.width() > MAX_WIDTH {
                problems.push(
                    Problem::new(
                        source,
                        format!(
                            "port is {} bits wide; at most {MAX_WIDTH} are supported",
                            p.width()
                        ),
                    )
                    .field(format!("port {}", p.name())),
                );
            }
        }
        let input_bits = netlist.input_nets().len();
        let blocks = vectors.len().div_ceil(64);
        let mut words = vec![0u64; blocks * input_bits];
        let mut bad = 0usize;
        for (v, values) in vectors.iter().enumerate() {
            let mut complain = |p: Problem| {
                bad += 1;
                if bad <= MAX_REPORTED {
                    problems.push(p);
                }
            };
            if values.len() != widths.len() {
                complain(
                    Problem::new(
                        source,
                        format!(
                            "has {} values; module `{}` has {} input ports",
                            values.len(),
                            netlist.module(),
                            widths.len()
                        ),
                    )
                    .field(format!("vector {v}")),
                );
                continue;
            }
            let base = (v / 64) * input_bits;
            let lane = v % 64;
            let mut flat = 0;
            for (port, (value, &width)) in netlist.inputs().iter().zip(values.iter().zip(&widths)) {
                if value.significant_bits() > width {
                    complain(
                        Problem::new(
                            source,
                            format!(
                                "value {} does not fit the {width}-bit port",
                                value.to_decimal()
                            ),
                        )
                        .field(format!("vector {v}, port {}", port.name())),
                    );
                }
                for bit in value.set_bits().take_while(|&b| b < width) {
                    words[base + flat + bit as usize] |= 1 << lane;
                }
                flat += width as usize;
            }
        }
        if bad > MAX_REPORTED {
            problems.push(Problem::new(
                source,
                format!("{} more vectors have problems", bad - MAX_REPORTED),
            ));
        }
        if !problems.is_empty() {
            return Err(Error::input(problems));
        }
        Ok(PatternSet {
            count: vectors.len(),
            widths,
            input_bits,
            words,
        })
    }

    /// The number of vectors.
    pub fn len(&self) -> usize {
        self.count
    }

    /// True when there are no vectors.
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// Vector `index` unpacked into one word per input port, or None when out of range.
    pub fn vector(&self, index: usize) -> Option<Vec<Word>> {
        if index >= self.count {
            return None;
        }
        let base = (index / 64) * self.input_bits;
        let mut flat = 0;
        let mut out = Vec::with_capacity(self.widths.len());
        for &width in &self.widths {
            let mut w = Word::ZERO;
            for bit in 0..width {
                w.set_bit(
                    bit,
                    self.words[base + flat + bit as usize] >> (index % 64) & 1 == 1,
                );
            }
            flat += width as usize;
            out.push(w);
        }
        Some(out)
    }

    fn check(&self, nl: &Netlist) -> Result<()> {
        let widths: Vec<u32> = nl.inputs().iter().map(|p| p.width()).collect();
        if widths != self.widths {
            return Err(Error::problem(Problem::new(
                nl.source(),
                format!(
                    "the vectors were packed for different input ports than those of module `{}`",
                    nl.module()
                ),
            )));
        }
        Ok(())
    }

    /// Fills `out` (one word per input bit) with vectors `start .. start + count` in lanes
    /// `0 .. count`; `count` is at most 64 and the range stays inside one block of 64.
    fn load(&self, start: usize, count: usize, out: &mut [u64]) {
        let n = self.input_bits;
        let block = start / 64;
        let row = &self.words[block * n..(block + 1) * n];
        if start.is_multiple_of(64) {
            // Whole or final partial block: lanes beyond `count` are masked off by callers.
            out.copy_from_slice(row);
        } else {
            let shift = start % 64;
            let mask = if count == 64 { !0 } else { (1u64 << count) - 1 };
            for (o, &w) in out.iter_mut().zip(row) {
                *o = (w >> shift) & mask;
            }
        }
    }
}

/// How fault simulation packs vectors.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SimulationMode {
    /// 64 vectors per machine word, four words (256 vectors) per pass through a fault's
    /// cone (parallel-pattern single-fault propagation).
    BitParallel,
    /// One vector at a time through the same code: the reference for tests and benchmarks.
    Serial,
}

impl SimulationMode {
    fn lanes(self) -> usize {
        match self {
            SimulationMode::BitParallel => 64,
            SimulationMode::Serial => 1,
        }
    }
}

/// Settings for [`grade_with`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct GradeOptions {
    /// Bit-parallel (the default) or serial simulation.
    pub mode: SimulationMode,
    /// Undetected faults whose observing outputs depend on at most this many primary input
    /// bits are simulated exhaustively to prove them redundant (default 20; values above 32
    /// count as 32).
    pub proof_limit: u32,
    /// Threads simulating faults, each a share of the fault classes (0, the default: one
    /// per core). The report is the same for every value.
    pub threads: usize,
}

impl Default for GradeOptions {
    fn default() -> GradeOptions {
        GradeOptions {
            mode: SimulationMode::BitParallel,
            proof_limit: 20,
            threads: 0,
        }
    }
}

/// The largest input support an exhaustive redundancy proof will enumerate.
const PROOF_LIMIT_CAP: u32 = 32;

/// An input port value, for reporting a vector.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct PortValue {
    /// The input port.
    pub port: String,
    /// The value, as exactly ceil(width / 4) lowercase hex digits.
    pub hex: String,
}

/// What exhaustive simulation says about a fault the vectors did not detect.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "status", rename_all = "snake_case")]
pub enum Redundancy {
    /// Proven redundant: every combination of the `support_bits` input bits that the fault's
    /// observing outputs depend on was simulated and none detects it, so no vector can.
    Proven {
        /// Input bits enumerated.
        support_bits: usize,
    },
    /// Not redundant: exhaustive simulation found `example`, a vector that detects it
    /// (input bits outside the support are 0). The vector set simply misses it.
    Testable {
        /// Input bits enumerated.
        support_bits: usize,
        /// One detecting vector.
        example: Vec<PortValue>,
    },
    /// Nothing is claimed: the support is wider than the proof limit.
    NotProven {
        /// Input bits the observing outputs depend on.
        support_bits: usize,
        /// The proof limit in force.
        limit: u32,
    },
}

/// One collapsed fault in a report, named the way the netlist names things.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct FaultEntry {
    /// The equivalence-class index (see [`FaultList::members`]). In JSON it is
    /// `fault_class`: "class" means a corner class everywhere else in arithvec.
    #[serde(rename = "fault_class")]
    pub class: usize,
    /// The output bits the fault's effect can reach (such as `y[3]`, `co`), in port order: only
    /// there can a vector observe it.
    pub observed_at: Vec<String>,
    /// The net of the representative fault, such as `carry[5]`.
    pub net: String,
    /// 0 or 1.
    pub stuck_at: u8,
    /// `stem`, `branch into pin B of cell ...` or `branch into output y[3]`.
    pub site: String,
    /// The cell driving the net, as named in the netlist (none for inputs and constants).
    pub driver_cell: Option<String>,
    /// The driving cell's type such as `$_XOR_`, or `input`, or `constant`.
    pub driver_type: String,
    /// How many uncollapsed faults the class holds.
    pub equivalent_faults: usize,
    /// The exhaustive-simulation verdict.
    pub redundancy: Redundancy,
}

/// The result of grading a vector set.
///
/// `coverage_percent` is detected / collapsed x 100 and counts proven-redundant faults as
/// not covered (no vector can detect them, so they stay in the denominator);
/// `testable_coverage_percent` leaves them out: detected / (collapsed - redundant) x 100.
/// Both are 100 when there is nothing to detect. `detected + undetected.len() +
/// redundant.len() == collapsed`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FaultReport {
    /// The graded module.
    pub module: String,
    /// Vectors applied.
    pub vectors: usize,
    /// Faults before collapsing.
    pub faults: usize,
    /// Faults after equivalence collapsing.
    pub collapsed: usize,
    /// Collapsed faults detected by at least one vector.
    pub detected: usize,
    /// detected / collapsed x 100.
    pub coverage_percent: f64,
    /// detected / (collapsed - proven redundant) x 100.
    pub testable_coverage_percent: f64,
    /// Collapsed faults no vector detected and that are not proven redundant.
    pub undetected: Vec<FaultEntry>,
    /// Collapsed faults proven redundant.
    pub redundant: Vec<FaultEntry>,
    /// Output ports of the netlist that were not observed (the spec does not check them),
    /// in port order. Empty when [`grade_with`] grades the netlist as given; the spec-level
    /// grader fills it in.
    pub unchecked_outputs: Vec<String>,
    /// Gates left out of the fault list because they feed only unchecked outputs.
    pub ungraded_gates: usize,
    /// For each collapsed class, the index of the first vector that detects it.
    #[serde(skip)]
    pub first_detection: Vec<Option<usize>>,
}

#[cfg(test)]
mod tests;
