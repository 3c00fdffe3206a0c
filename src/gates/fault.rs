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
//! still undetected is injected and propagated block by block through its fan-out cone
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
    /// 64 vectors per machine word (parallel-pattern single-fault propagation).
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
}

impl Default for GradeOptions {
    fn default() -> GradeOptions {
        GradeOptions {
            mode: SimulationMode::BitParallel,
            proof_limit: 20,
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
    /// The class index (see [`FaultList::members`]).
    pub class: usize,
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

/// A faulty value, valid only while its mark equals the engine's current mark.
#[derive(Debug, Clone, Copy, Default)]
struct Slot {
    value: u64,
    mark: u32,
}

/// Faulty values of the fault currently simulated, as an overlay on a block's fault-free
/// values, plus scratch space for computing fan-out cones.
struct Engine<'a> {
    nl: &'a Netlist,
    topo: &'a Topology,
    faulty: Vec<Slot>,
    mark: u32,
    /// The highest gate that reads a net carrying a fault effect: the cone walk stops past
    /// it, because the effect has died out in every lane.
    horizon: u32,
    gate_seen: Vec<u32>,
    seen_mark: u32,
    stack: Vec<u32>,
}

impl<'a> Engine<'a> {
    fn new(nl: &'a Netlist, topo: &'a Topology) -> Engine<'a> {
        Engine {
            nl,
            topo,
            faulty: vec![Slot::default(); nl.net_count()],
            mark: 0,
            horizon: 0,
            gate_seen: vec![0; nl.gates().len()],
            seen_mark: 0,
            stack: Vec::new(),
        }
    }

    /// The gates a fault at `site` can reach, ascending (so in topological order). The gate
    /// whose input pin is faulted is not included: the injection evaluates it.
    fn cone_of(&mut self, site: FaultSite, cone: &mut Vec<u32>) {
        cone.clear();
        let start = match site {
            FaultSite::Stem(n) => n.index() as u32,
            FaultSite::GateInput { gate, .. } => self.topo.sim_gates[gate].output,
            FaultSite::OutputBit { .. } => return,
        };
        self.seen_mark = self.seen_mark.wrapping_add(1);
        if self.seen_mark == 0 {
            self.gate_seen.fill(0);
            self.seen_mark = 1;
        }
        self.stack.clear();
        self.stack.push(start);
        let topo = self.topo;
        while let Some(net) = self.stack.pop() {
            for &g in &topo.fanout_gates[net as usize] {
                if self.gate_seen[g as usize] != self.seen_mark {
                    self.gate_seen[g as usize] = self.seen_mark;
                    cone.push(g);
                    self.stack.push(topo.sim_gates[g as usize].output);
                }
            }
        }
        cone.sort_unstable();
    }

    /// Records a faulty value for net `n` if it differs from the fault-free one in a live
    /// lane; returns whether it did.
    #[inline(always)]
    fn set(&mut self, n: usize, value: u64, good: &[u64], mask: u64, detected: &mut u64) -> bool {
        let diff = (value ^ good[n]) & mask;
        if diff == 0 {
            return false;
        }
        self.faulty[n] = Slot {
            value,
            mark: self.mark,
        };
        if self.topo.observed[n] {
            *detected |= diff;
        }
        self.horizon = self.horizon.max(self.topo.last_reader[n]);
        true
    }

    /// The lanes (within `mask`) in which `fault` makes some primary output differ, given the
    /// block's fault-free values `good` and the fault's fan-out `cone` from
    /// [`Engine::cone_of`]. The cone is walked in topological order; a gate is evaluated only
    /// when one of its inputs carries a fault effect, and the walk ends once no net carrying
    /// an effect has readers left.
    fn detect(&mut self, fault: &Fault, cone: &[u32], good: &[u64], mask: u64) -> u64 {
        self.mark = self.mark.wrapping_add(1);
        if self.mark == 0 {
            self.faulty.fill(Slot::default());
            self.mark = 1;
        }
        self.horizon = 0;
        let stuck = if fault.stuck_at { !0u64 } else { 0 };
        let mut detected = 0u64;
        let topo = self.topo;
        let activated = match fault.site {
            FaultSite::Stem(net) => self.set(net.index(), stuck, good, mask, &mut detected),
            FaultSite::GateInput { gate, pin } => {
                let g = &topo.sim_gates[gate];
                let mut ins = [0u64; 4];
                for k in 0..g.arity as usize {
                    ins[k] = good[g.inputs[k] as usize];
                }
                ins[pin] = stuck;
                self.set(
                    g.output as usize,
                    g.kind.eval(ins),
                    good,
                    mask,
                    &mut detected,
                )
            }
            FaultSite::OutputBit { port, bit } => {
                let net = self.nl.outputs()[port].nets()[bit as usize];
                return (good[net.index()] ^ stuck) & mask;
            }
        };
        if !activated {
            return 0;
        }
        for &g in cone {
            if g > self.horizon {
                break;
            }
            let gate = &topo.sim_gates[g as usize];
            let mut ins = [0u64; 4];
            let mut touched = false;
            for (value, &n) in ins.iter_mut().zip(&gate.inputs[..gate.arity as usize]) {
                let slot = self.faulty[n as usize];
                if slot.mark == self.mark {
                    touched = true;
                    *value = slot.value;
                } else {
                    *value = good[n as usize];
                }
            }
            if touched {
                self.set(
                    gate.output as usize,
                    gate.kind.eval(ins),
                    good,
                    mask,
                    &mut detected,
                );
            }
        }
        detected
    }
}

/// Fan-out cones of the representative faults, kept between chunks while they fit a memory
/// budget (cones of long chains grow with the square of the netlist), recomputed otherwise.
struct ConeCache {
    cones: Vec<Option<Box<[u32]>>>,
    words: usize,
    scratch: Vec<u32>,
}

/// Cone entries kept in a [`ConeCache`], at most (32 MiB).
const CONE_WORD_BUDGET: usize = 1 << 23;

impl ConeCache {
    fn new(classes: usize) -> ConeCache {
        ConeCache {
            cones: vec![None; classes],
            words: 0,
            scratch: Vec::new(),
        }
    }

    fn get(&mut self, engine: &mut Engine, class: usize, site: FaultSite) -> &[u32] {
        if self.cones[class].is_none() {
            engine.cone_of(site, &mut self.scratch);
            if self.words + self.scratch.len() > CONE_WORD_BUDGET {
                return &self.scratch;
            }
            self.words += self.scratch.len();
            self.cones[class] = Some(self.scratch.as_slice().into());
        }
        match &self.cones[class] {
            Some(cone) => cone,
            None => &self.scratch,
        }
    }
}

/// Fault-free values for a run of consecutive blocks of vectors, so each fault's cone is
/// computed once per chunk rather than once per block.
struct Chunk {
    /// (first vector, vector count) of each block.
    blocks: Vec<(usize, usize)>,
    /// Block-major net values: block `k` holds `good[k * nets .. (k + 1) * nets]`.
    good: Vec<u64>,
    nets: usize,
}

impl Chunk {
    fn good(&self, block: usize) -> &[u64] {
        &self.good[block * self.nets..(block + 1) * self.nets]
    }
}

/// Net values kept per chunk, at most (32 MiB of words): bounds memory on large netlists.
const CHUNK_WORD_BUDGET: usize = 1 << 22;
/// Blocks per chunk when memory allows. Counting blocks rather than vectors gives both
/// modes the same memory footprint, so the serial reference is not slowed by cache misses
/// the bit-parallel run avoids.
const CHUNK_BLOCKS: usize = 64;

/// Runs the fault-free simulation chunk by chunk and hands each chunk to `f`; stops early
/// when `f` returns false.
fn for_each_chunk(
    nl: &Netlist,
    patterns: &PatternSet,
    lanes: usize,
    mut f: impl FnMut(&Chunk) -> bool,
) {
    let nets = nl.net_count().max(1);
    let max_blocks = CHUNK_BLOCKS.min(CHUNK_WORD_BUDGET / nets).max(1);
    let initial = nl.initial_values();
    let mut chunk = Chunk {
        blocks: Vec::with_capacity(max_blocks),
        good: Vec::new(),
        nets: nl.net_count(),
    };
    for _ in 0..max_blocks.min(patterns.len().div_ceil(lanes)) {
        chunk.good.extend_from_slice(&initial);
    }
    let mut inputs = vec![0u64; nl.input_nets().len()];
    let mut start = 0;
    // Chunks start at one block and double: with fault dropping most faults fall in the
    // first blocks, and no fault-free work is spent on vectors that are never needed.
    let mut chunk_blocks = 1;
    while start < patterns.len() {
        chunk.blocks.clear();
        while chunk.blocks.len() < chunk_blocks && start < patterns.len() {
            let count = lanes.min(patterns.len() - start);
            let k = chunk.blocks.len();
            patterns.load(start, count, &mut inputs);
            let good = &mut chunk.good[k * chunk.nets..(k + 1) * chunk.nets];
            for (net, &v) in nl.input_nets().iter().zip(&inputs) {
                good[net.index()] = v;
            }
            nl.eval_gates(good);
            chunk.blocks.push((start, count));
            start += count;
        }
        if !f(&chunk) {
            return;
        }
        chunk_blocks = (chunk_blocks * 2).min(max_blocks);
    }
}

fn lane_mask(count: usize) -> u64 {
    if count >= 64 {
        !0
    } else {
        (1u64 << count) - 1
    }
}

/// Calls `f(start, count)` for each block of up to `lanes` consecutive vectors; stops when
/// `f` returns false.
fn for_each_block(total: usize, lanes: usize, mut f: impl FnMut(usize, usize) -> bool) {
    let mut start = 0;
    while start < total {
        let count = lanes.min(total - start);
        if !f(start, count) {
            break;
        }
        start += count;
    }
}

/// Grades `patterns` against every collapsed fault of `netlist` with the default options
/// (bit-parallel, fault dropping, redundancy proofs up to 20 input bits).
pub fn grade(netlist: &Netlist, patterns: &PatternSet) -> Result<FaultReport> {
    let topo = Topology::new(netlist);
    let faults = FaultList::with_topology(netlist, &topo);
    grade_inner(netlist, &topo, &faults, patterns, &GradeOptions::default())
}

/// Grades `patterns` against the collapsed faults of `faults` (made by [`FaultList::new`]
/// for this `netlist`).
///
/// First a fault-free simulation of each block of vectors, then each still-undetected
/// representative fault is propagated through its fan-out cone for that block; a fault is
/// dropped at its first detection, which is recorded in [`FaultReport::first_detection`].
/// Undetected faults then get a redundancy verdict (see [`Redundancy`]).
pub fn grade_with(
    netlist: &Netlist,
    faults: &FaultList,
    patterns: &PatternSet,
    options: &GradeOptions,
) -> Result<FaultReport> {
    let topo = Topology::new(netlist);
    grade_inner(netlist, &topo, faults, patterns, options)
}

fn grade_inner(
    nl: &Netlist,
    topo: &Topology,
    faults: &FaultList,
    patterns: &PatternSet,
    options: &GradeOptions,
) -> Result<FaultReport> {
    faults.check(nl)?;
    patterns.check(nl)?;
    let lanes = options.mode.lanes();
    let classes = faults.collapsed();
    let mut first = vec![None; classes];
    let mut remaining: Vec<usize> = (0..classes).collect();
    let mut engine = Engine::new(nl, topo);
    let mut cones = ConeCache::new(classes);
    for_each_chunk(nl, patterns, lanes, |chunk| {
        remaining.retain(|&c| {
            let rep = faults.representative(c);
            let cone = cones.get(&mut engine, c, rep.site);
            for (k, &(start, count)) in chunk.blocks.iter().enumerate() {
                let detected = engine.detect(&rep, cone, chunk.good(k), lane_mask(count));
                if detected != 0 {
                    first[c] = Some(start + detected.trailing_zeros() as usize);
                    return false;
                }
            }
            true
        });
        !remaining.is_empty()
    });

    let limit = options.proof_limit.min(PROOF_LIMIT_CAP);
    let reps: Vec<Fault> = remaining
        .iter()
        .map(|&c| faults.representative(c))
        .collect();
    let verdicts = classify(&mut engine, &reps, limit, lanes);
    let mut undetected = Vec::new();
    let mut redundant = Vec::new();
    for (&c, verdict) in remaining.iter().zip(verdicts) {
        let entry = describe(nl, faults, c, verdict);
        if matches!(entry.redundancy, Redundancy::Proven { .. }) {
            redundant.push(entry);
        } else {
            undetected.push(entry);
        }
    }
    let detected = classes - remaining.len();
    let percent = |num: usize, den: usize| {
        if den == 0 {
            100.0
        } else {
            num as f64 * 100.0 / den as f64
        }
    };
    Ok(FaultReport {
        module: nl.module().to_string(),
        vectors: patterns.len(),
        faults: faults.total(),
        collapsed: classes,
        detected,
        coverage_percent: percent(detected, classes),
        testable_coverage_percent: percent(detected, classes - redundant.len()),
        undetected,
        redundant,
        unchecked_outputs: Vec::new(),
        ungraded_gates: 0,
        first_detection: first,
    })
}

fn describe(nl: &Netlist, faults: &FaultList, class: usize, redundancy: Redundancy) -> FaultEntry {
    let fault = faults.representative(class);
    let (net, site) = match fault.site {
        FaultSite::Stem(n) => (n, "stem".to_string()),
        FaultSite::GateInput { gate, pin } => {
            let g = &nl.gates()[gate];
            (
                g.inputs()[pin],
                format!(
                    "branch into pin {} of cell `{}`",
                    g.kind().input_pins()[pin],
                    g.cell_name()
                ),
            )
        }
        FaultSite::OutputBit { port, bit } => {
            let p = &nl.outputs()[port];
            (
                p.nets()[bit as usize],
                format!("branch into output {}", p.bit_label(bit)),
            )
        }
    };
    let (driver_cell, driver_type) = match nl.driver(net) {
        Driver::Gate(g) => (
            Some(nl.gates()[g].cell_name().to_string()),
            nl.gates()[g].cell_type().to_string(),
        ),
        Driver::Input { .. } => (None, "input".to_string()),
        Driver::Constant(_) => (None, "constant".to_string()),
    };
    FaultEntry {
        class,
        net: nl.net_name(net),
        stuck_at: fault.stuck_at as u8,
        site,
        driver_cell,
        driver_type,
        equivalent_faults: faults.members(class).len(),
        redundancy,
    }
}

/// Cached transitive fan-in of each primary output bit: its input bits and its gates.
struct Cones {
    per_output: Vec<Option<(Vec<u32>, Vec<u32>)>>,
}

impl Cones {
    fn new(nl: &Netlist) -> Cones {
        Cones {
            per_output: vec![None; nl.output_nets().len()],
        }
    }

    fn cone(&mut self, nl: &Netlist, topo: &Topology, flat: usize) -> &(Vec<u32>, Vec<u32>) {
        self.per_output[flat].get_or_insert_with(|| {
            let mut seen = vec![false; nl.net_count()];
            let mut stack = vec![nl.output_nets()[flat]];
            let (mut inputs, mut gates) = (Vec::new(), Vec::new());
            while let Some(net) = stack.pop() {
                if std::mem::replace(&mut seen[net.index()], true) {
                    continue;
                }
                match nl.driver(net) {
                    Driver::Input { port, bit } => {
                        inputs.push((topo.input_offsets[port] + bit as usize) as u32)
                    }
                    Driver::Gate(g) => {
                        gates.push(g as u32);
                        stack.extend_from_slice(nl.gates()[g].inputs());
                    }
                    Driver::Constant(_) => {}
                }
            }
            inputs.sort_unstable();
            gates.sort_unstable();
            (inputs, gates)
        })
    }
}

/// The flat output bits a fault can reach structurally.
fn reached_outputs(nl: &Netlist, topo: &Topology, site: FaultSite) -> Vec<usize> {
    let start = match site {
        FaultSite::Stem(n) => n,
        FaultSite::GateInput { gate, .. } => nl.gates()[gate].output(),
        FaultSite::OutputBit { port, bit } => {
            let flat = topo
                .output_pos
                .iter()
                .position(|&p| p == (port, bit))
                .unwrap_or(0);
            return vec![flat];
        }
    };
    let mut seen = vec![false; nl.net_count()];
    let mut stack = vec![start];
    let mut outputs = Vec::new();
    while let Some(net) = stack.pop() {
        if std::mem::replace(&mut seen[net.index()], true) {
            continue;
        }
        for sink in &topo.sinks[net.index()] {
            match *sink {
                Sink::Output(flat) => outputs.push(flat as usize),
                Sink::Pin { gate, .. } => stack.push(nl.gates()[gate as usize].output()),
            }
        }
    }
    outputs.sort_unstable();
    outputs.dedup();
    outputs
}

/// Input word `j` of an exhaustive enumeration: lane `l` holds bit `j` of vector `start + l`.
fn exhaustive_word(j: usize, start: u64, count: usize) -> u64 {
    const LANES: [u64; 6] = [
        0xaaaa_aaaa_aaaa_aaaa,
        0xcccc_cccc_cccc_cccc,
        0xf0f0_f0f0_f0f0_f0f0,
        0xff00_ff00_ff00_ff00,
        0xffff_0000_ffff_0000,
        0xffff_ffff_0000_0000,
    ];
    if start.is_multiple_of(64) {
        if j < 6 {
            return LANES[j];
        }
        return if start >> j & 1 == 1 { !0 } else { 0 };
    }
    (0..count).fold(0, |w, l| w | ((start + l as u64) >> j & 1) << l)
}

/// Decides for each undetected fault whether it is redundant, by exhaustive simulation over
/// the support of every output it reaches. Other inputs are held at 0, which is sound because
/// neither the fault-free nor the faulty value of those outputs depends on them. Faults with
/// the same support share one enumeration (and its fault-free simulation); each is dropped
/// from it as soon as a detecting input is found.
fn classify(engine: &mut Engine, faults: &[Fault], limit: u32, lanes: usize) -> Vec<Redundancy> {
    let nl = engine.nl;
    let topo = engine.topo;
    let mut cones = Cones::new(nl);
    let mut verdicts: Vec<Option<Redundancy>> = vec![None; faults.len()];
    // Support (sorted input bits) -> (faults, gates feeding the outputs those faults reach).
    let mut groups: std::collections::BTreeMap<Vec<usize>, (Vec<usize>, Vec<bool>)> =
        Default::default();
    for (i, fault) in faults.iter().enumerate() {
        let outputs = reached_outputs(nl, topo, fault.site);
        let mut in_support = vec![false; nl.input_nets().len()];
        for &o in &outputs {
            for &input in &cones.cone(nl, topo, o).0 {
                in_support[input as usize] = true;
            }
        }
        let support: Vec<usize> = (0..in_support.len()).filter(|&i| in_support[i]).collect();
        if support.len() > limit as usize {
            verdicts[i] = Some(Redundancy::NotProven {
                support_bits: support.len(),
                limit,
            });
            continue;
        }
        let (members, in_cone) = groups
            .entry(support)
            .or_insert_with(|| (Vec::new(), vec![false; nl.gates().len()]));
        members.push(i);
        for &o in &outputs {
            for &g in &cones.cone(nl, topo, o).1 {
                in_cone[g as usize] = true;
            }
        }
    }
    let mut good = nl.initial_values();
    for (support, (members, in_cone)) in groups {
        let gates: Vec<u32> = (0..in_cone.len() as u32)
            .filter(|&g| in_cone[g as usize])
            .collect();
        let fault_cones: Vec<Vec<u32>> = members
            .iter()
            .map(|&i| {
                let mut cone = Vec::new();
                engine.cone_of(faults[i].site, &mut cone);
                cone
            })
            .collect();
        let mut open: Vec<usize> = (0..members.len()).collect();
        for_each_block(1usize << support.len(), lanes, |start, count| {
            for (j, &i) in support.iter().enumerate() {
                good[nl.input_nets()[i].index()] = exhaustive_word(j, start as u64, count);
            }
            for &g in &gates {
                let gate = &nl.gates()[g as usize];
                good[gate.output().index()] = crate::gates::netlist::gate_value(gate, &good);
            }
            open.retain(|&m| {
                let i = members[m];
                let detected = engine.detect(&faults[i], &fault_cones[m], &good, lane_mask(count));
                if detected == 0 {
                    return true;
                }
                let vector = start + detected.trailing_zeros() as usize;
                verdicts[i] = Some(Redundancy::Testable {
                    support_bits: support.len(),
                    example: example_vector(nl, topo, &support, vector),
                });
                false
            });
            !open.is_empty()
        });
        for m in open {
            verdicts[members[m]] = Some(Redundancy::Proven {
                support_bits: support.len(),
            });
        }
    }
    verdicts
        .into_iter()
        .map(|v| {
            v.unwrap_or(Redundancy::NotProven {
                support_bits: 0,
                limit,
            })
        })
        .collect()
}

/// The input vector number `vector` of an exhaustive enumeration of `support` (bit `j` of
/// `vector` drives input bit `support[j]`; other inputs 0), as port values.
fn example_vector(
    nl: &Netlist,
    topo: &Topology,
    support: &[usize],
    vector: usize,
) -> Vec<PortValue> {
    let mut values: Vec<Word> = vec![Word::ZERO; nl.inputs().len()];
    for (j, &i) in support.iter().enumerate() {
        if vector >> j & 1 == 1 {
            let port = topo
                .input_offsets
                .iter()
                .rposition(|&o| o <= i)
                .unwrap_or(0);
            values[port].set_bit((i - topo.input_offsets[port]) as u32, true);
        }
    }
    nl.inputs()
        .iter()
        .zip(values)
        .map(|(p, w)| PortValue {
            port: p.name().to_string(),
            hex: w.to_hex(p.width()),
        })
        .collect()
}

/// Which vectors detect which collapsed faults: one bit per (class, vector), without fault
/// dropping. The input to [`compact`].
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DetectionMatrix {
    vectors: usize,
    classes: usize,
    words_per_row: usize,
    rows: Vec<u64>,
}

impl DetectionMatrix {
    /// The number of vectors (columns).
    pub fn vectors(&self) -> usize {
        self.vectors
    }

    /// The number of collapsed fault classes (rows).
    pub fn classes(&self) -> usize {
        self.classes
    }

    fn row(&self, class: usize) -> &[u64] {
        &self.rows[class * self.words_per_row..(class + 1) * self.words_per_row]
    }

    /// True when vector `vector` detects class `class`.
    pub fn detects(&self, class: usize, vector: usize) -> bool {
        vector < self.vectors && self.row(class)[vector / 64] >> (vector % 64) & 1 == 1
    }

    /// Every vector that detects class `class`, ascending.
    pub fn detecting_vectors(&self, class: usize) -> Vec<usize> {
        let mut out = Vec::new();
        for (w, &bits) in self.row(class).iter().enumerate() {
            let mut bits = bits;
            while bits != 0 {
                out.push(w * 64 + bits.trailing_zeros() as usize);
                bits &= bits - 1;
            }
        }
        out
    }

    /// The first vector that detects class `class`.
    pub fn first_detecting_vector(&self, class: usize) -> Option<usize> {
        self.row(class)
            .iter()
            .enumerate()
            .find(|(_, &b)| b != 0)
            .map(|(w, &b)| w * 64 + b.trailing_zeros() as usize)
    }

    /// The number of classes some vector detects.
    pub fn detected_classes(&self) -> usize {
        (0..self.classes())
            .filter(|&c| self.row(c).iter().any(|&b| b != 0))
            .count()
    }
}

/// Simulates every collapsed fault of `faults` against every vector (no dropping) and
/// records which vectors detect which faults.
pub fn detection_matrix(
    netlist: &Netlist,
    faults: &FaultList,
    patterns: &PatternSet,
    mode: SimulationMode,
) -> Result<DetectionMatrix> {
    faults.check(netlist)?;
    patterns.check(netlist)?;
    let topo = Topology::new(netlist);
    let words_per_row = patterns.len().div_ceil(64);
    let classes = faults.collapsed();
    let mut rows = vec![0u64; classes * words_per_row];
    let reps: Vec<Fault> = (0..classes).map(|c| faults.representative(c)).collect();
    let mut engine = Engine::new(netlist, &topo);
    let mut cones = ConeCache::new(classes);
    for_each_chunk(netlist, patterns, mode.lanes(), |chunk| {
        for (c, rep) in reps.iter().enumerate() {
            let cone = cones.get(&mut engine, c, rep.site);
            for (k, &(start, count)) in chunk.blocks.iter().enumerate() {
                let detected = engine.detect(rep, cone, chunk.good(k), lane_mask(count));
                rows[c * words_per_row + start / 64] |= detected << (start % 64);
            }
        }
        true
    });
    Ok(DetectionMatrix {
        vectors: patterns.len(),
        classes,
        words_per_row,
        rows,
    })
}

/// Picks a subset of the vectors that still detects every fault class the full set detects
/// and still hits every non-empty set in `must_cover` (each a list of vector indices, such as
/// the vectors that reach one corner class: keeping any one of them keeps that class
/// covered). Greedy set cover: repeatedly keep the vector that covers the most requirements
/// not yet covered, the lowest index on ties. Greedy is not minimum (it is within a factor
/// of about ln(requirements) of the optimum; common practice, no source). Returns the kept
/// vector indices in ascending order. An index in `must_cover` beyond the matrix is an error.
pub fn compact(matrix: &DetectionMatrix, must_cover: &[Vec<usize>]) -> Result<Vec<usize>> {
    let mut problems = Vec::new();
    for (s, set) in must_cover.iter().enumerate() {
        if let Some(&bad) = set.iter().find(|&&v| v >= matrix.vectors) {
            problems.push(
                Problem::new(
                    "<compaction>",
                    format!(
                        "vector index {bad} is out of range; there are {} vectors",
                        matrix.vectors
                    ),
                )
                .field(format!("must_cover[{s}]")),
            );
        }
    }
    if !problems.is_empty() {
        return Err(Error::input(problems));
    }
    let mut requirements: Vec<Vec<usize>> = (0..matrix.classes())
        .map(|c| matrix.detecting_vectors(c))
        .chain(must_cover.iter().map(|s| {
            let mut s = s.clone();
            s.sort_unstable();
            s.dedup();
            s
        }))
        .filter(|r| !r.is_empty())
        .collect();
    // Requirements with identical vector sets are one requirement.
    requirements.sort();
    requirements.dedup();
    let mut by_vector: Vec<Vec<u32>> = vec![Vec::new(); matrix.vectors];
    for (r, vs) in requirements.iter().enumerate() {
        for &v in vs {
            by_vector[v].push(r as u32);
        }
    }
    let mut count: Vec<usize> = by_vector.iter().map(Vec::len).collect();
    let mut covered = vec![false; requirements.len()];
    let mut kept = Vec::new();
    // The vector covering the most uncovered requirements, the lowest index on ties.
    let best_vector = |count: &[usize]| {
        count
            .iter()
            .enumerate()
            .max_by(|a, b| a.1.cmp(b.1).then(b.0.cmp(&a.0)))
            .filter(|(_, &n)| n > 0)
            .map(|(v, _)| v)
    };
    while let Some(best) = best_vector(&count) {
        kept.push(best);
        for &r in &by_vector[best] {
            let r = r as usize;
            if !covered[r] {
                covered[r] = true;
                for &v in &requirements[r] {
                    count[v] -= 1;
                }
            }
        }
    }
    kept.sort_unstable();
    Ok(kept)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gates::netlist::NetlistBuilder;

    /// A tiny deterministic generator for test patterns (xorshift64*; common practice).
    struct Rng(u64);
    impl Rng {
        fn next(&mut self) -> u64 {
            self.0 ^= self.0 >> 12;
            self.0 ^= self.0 << 25;
            self.0 ^= self.0 >> 27;
            self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
        }
    }

    fn random_vectors(nl: &Netlist, count: usize, seed: u64) -> Vec<Vec<Word>> {
        let mut rng = Rng(seed | 1);
        (0..count)
            .map(|_| {
                nl.inputs()
                    .iter()
                    .map(|p| {
                        let mut w = Word::ZERO;
                        for bit in 0..p.width() {
                            w.set_bit(bit, rng.next() & 1 == 1);
                        }
                        w
                    })
                    .collect()
            })
            .collect()
    }

    /// Independent oracle: full re-evaluation of the netlist with the fault injected, no
    /// events and no cones. Returns the lanes in which some output differs.
    fn oracle_detects(nl: &Netlist, fault: &Fault, inputs: &[u64], mask: u64) -> u64 {
        let mut good = nl.initial_values();
        for (n, &v) in nl.input_nets().iter().zip(inputs) {
            good[n.index()] = v;
        }
        let mut bad = good.clone();
        nl.eval_gates(&mut good);
        let stuck = if fault.stuck_at { !0 } else { 0 };
        if let FaultSite::Stem(n) = fault.site {
            bad[n.index()] = stuck;
        }
        for (g, gate) in nl.gates().iter().enumerate() {
            let mut ins = [0u64; 4];
            for (k, n) in gate.inputs().iter().enumerate() {
                ins[k] = bad[n.index()];
            }
            if let FaultSite::GateInput { gate: fg, pin } = fault.site {
                if fg == g {
                    ins[pin] = stuck;
                }
            }
            let out = gate.output();
            bad[out.index()] = if fault.site == FaultSite::Stem(out) {
                stuck
            } else {
                gate.kind().eval(ins)
            };
        }
        let mut diff = 0;
        for (p, port) in nl.outputs().iter().enumerate() {
            for (b, n) in port.nets().iter().enumerate() {
                let faulty = match fault.site {
                    FaultSite::OutputBit { port, bit } if port == p && bit as usize == b => stuck,
                    _ => bad[n.index()],
                };
                diff |= faulty ^ good[n.index()];
            }
        }
        diff & mask
    }

    /// A random loop-free netlist over every gate kind, with constants and fan-out.
    fn random_netlist(seed: u64) -> Netlist {
        let mut rng = Rng(seed | 1);
        let mut b = NetlistBuilder::new("<random>", "random");
        let mut nets = b.input("i", 1 + (rng.next() % 6) as u32);
        nets.extend(b.input("j", 1 + (rng.next() % 3) as u32));
        if rng.next().is_multiple_of(4) {
            let c = b.constant(rng.next() & 1 == 1);
            nets.push(c);
        }
        let gates = 3 + rng.next() % 25;
        for g in 0..gates {
            let kind = GateKind::ALL[(rng.next() % GateKind::ALL.len() as u64) as usize];
            let ins: Vec<NetId> = (0..kind.arity())
                .map(|_| nets[(rng.next() % nets.len() as u64) as usize])
                .collect();
            let out = b.gate_net(kind, &format!("g{g}"), &ins, "n", Some(g as i64));
            nets.push(out);
        }
        let outs: Vec<NetId> = (0..1 + rng.next() % 4)
            .map(|_| nets[nets.len() - 1 - (rng.next() % 6) as usize % nets.len()])
            .collect();
        b.output("o", &outs);
        b.build().unwrap()
    }

    #[test]
    fn engine_agrees_with_full_reevaluation() {
        for seed in 1..60u64 {
            let nl = random_netlist(seed * 7919);
            let topo = Topology::new(&nl);
            let faults = FaultList::with_topology(&nl, &topo);
            let vectors = random_vectors(&nl, 100, seed);
            let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
            let mut engine = Engine::new(&nl, &topo);
            let mut cone = Vec::new();
            for_each_chunk(&nl, &patterns, 64, |chunk| {
                for (k, &(start, count)) in chunk.blocks.iter().enumerate() {
                    let mut inputs = vec![0u64; nl.input_nets().len()];
                    patterns.load(start, count, &mut inputs);
                    for f in faults.faults() {
                        engine.cone_of(f.site, &mut cone);
                        let mask = lane_mask(count);
                        assert_eq!(
                            engine.detect(f, &cone, chunk.good(k), mask),
                            oracle_detects(&nl, f, &inputs, mask),
                            "seed {seed} {f:?}"
                        );
                    }
                }
                true
            });
        }
    }

    #[test]
    fn equivalent_faults_have_equal_detection() {
        // Collapsing is only sound if every member of a class is detected by exactly the
        // same vectors as its representative; check it on random netlists exhaustively.
        for seed in 1..40u64 {
            let nl = random_netlist(seed * 104_729);
            let faults = FaultList::new(&nl);
            let n = nl.input_nets().len();
            let mut inputs = vec![0u64; n];
            let total = 1usize << n;
            let mut start = 0;
            while start < total {
                let count = 64.min(total - start);
                for (j, w) in inputs.iter_mut().enumerate() {
                    *w = exhaustive_word(j, start as u64, count);
                }
                for c in 0..faults.collapsed() {
                    let rep = faults.representative(c);
                    let want = oracle_detects(&nl, &rep, &inputs, lane_mask(count));
                    for &m in faults.members(c) {
                        let got =
                            oracle_detects(&nl, &faults.faults()[m], &inputs, lane_mask(count));
                        assert_eq!(
                            got,
                            want,
                            "seed {seed}: {:?} vs {rep:?}",
                            faults.faults()[m]
                        );
                    }
                }
                start += count;
            }
        }
    }

    /// Hand count for the built-in one-bit full adder with carry-in
    /// (p = a ^ b, y = p ^ cin, g = a & b, t = cin & p, co = g | t, ovf = cin ^ co):
    /// - nets with a driver: a, b, cin, p, y, g, t, co, ovf = 9 stems;
    /// - readers: a -> xor_ab, and_ab (2); b -> xor_ab, and_ab (2); cin -> xor_sum, and_cp,
    ///   ovf_xor (3); p -> xor_sum, and_cp (2); co -> output co, ovf_xor (2); y, g, t, ovf
    ///   have one reader each, so no branches: 2 + 2 + 3 + 2 + 2 = 11 branches;
    /// - lines = 9 + 11 = 20, faults = 2 x 20 = 40;
    /// - collapsing: and_ab merges a->and s-a-0, b->and s-a-0 into g s-a-0 (-2); and_cp
    ///   merges cin->and s-a-0, p->and s-a-0 into t s-a-0 (-2); or_carry merges g s-a-1 and
    ///   t s-a-1 into co s-a-1 (-2); the XORs merge nothing: 40 - 6 = 34 classes.
    #[test]
    fn full_adder_fault_counts_match_the_hand_count() {
        let nl = Netlist::ripple_adder(1, true).unwrap();
        let faults = FaultList::new(&nl);
        assert_eq!(faults.total(), 40);
        assert_eq!(faults.collapsed(), 34);
        let stems = faults
            .faults()
            .iter()
            .filter(|f| matches!(f.site, FaultSite::Stem(_)))
            .count();
        assert_eq!(stems, 18);
    }

    #[test]
    fn constant_inputs_get_only_the_opposite_fault_and_can_be_proven_redundant() {
        // o = i & 1: the tied pin's s-a-1 fault is no fault, so only s-a-0 is listed; an
        // extra gate whose output feeds nothing is redundant by structure.
        let mut b = NetlistBuilder::new("t", "m");
        let i = b.input("i", 1)[0];
        let one = b.constant(true);
        let o = b.gate_net(GateKind::And, "and1", &[i, one], "o", None);
        b.gate_net(GateKind::Not, "dangling", &[i], "d", None);
        b.output("o", &[o]);
        let nl = b.build().unwrap();
        let faults = FaultList::new(&nl);
        let tied: Vec<&Fault> = faults
            .faults()
            .iter()
            .filter(|f| matches!(f.site, FaultSite::GateInput { pin: 1, .. }))
            .collect();
        assert_eq!(tied.len(), 1);
        assert!(!tied[0].stuck_at);
        let vectors = vec![vec![Word::from_u64(0)], vec![Word::from_u64(1)]];
        let report = grade(&nl, &PatternSet::from_vectors(&nl, &vectors, "t").unwrap()).unwrap();
        assert!(report.undetected.is_empty(), "{:?}", report.undetected);
        let names: Vec<&str> = report.redundant.iter().map(|e| e.net.as_str()).collect();
        assert_eq!(names, ["d", "d"], "{:?}", report.redundant);
        assert_eq!(report.detected + report.redundant.len(), report.collapsed);
        assert!(report.coverage_percent < 100.0);
        assert_eq!(report.testable_coverage_percent, 100.0);
    }

    #[test]
    fn consensus_term_is_proven_redundant_and_unproven_above_the_limit() {
        // f = a&b | ~a&c | b&c: by the consensus theorem (common practice) the b&c term never
        // decides f, so its AND output stuck-at-0 (with the equivalent input faults) is
        // undetectable, and nothing else is.
        let mut b = NetlistBuilder::new("t", "consensus");
        let a = b.input("a", 1)[0];
        let bb = b.input("b", 1)[0];
        let c = b.input("c", 1)[0];
        let na = b.gate_net(GateKind::Not, "not_a", &[a], "na", None);
        let ab = b.gate_net(GateKind::And, "and_ab", &[a, bb], "ab", None);
        let nac = b.gate_net(GateKind::And, "and_nac", &[na, c], "nac", None);
        let bc = b.gate_net(GateKind::And, "and_bc", &[bb, c], "bc", None);
        let t = b.gate_net(GateKind::Or, "or_t", &[ab, nac], "t", None);
        let f = b.gate_net(GateKind::Or, "or_f", &[t, bc], "f", None);
        b.output("f", &[f]);
        let nl = b.build().unwrap();
        let all: Vec<Vec<Word>> = (0..8u64)
            .map(|v| (0..3).map(|i| Word::from_u64(v >> i & 1)).collect())
            .collect();
        let patterns = PatternSet::from_vectors(&nl, &all, "t").unwrap();
        let report = grade(&nl, &patterns).unwrap();
        assert!(report.undetected.is_empty(), "{:?}", report.undetected);
        assert_eq!(report.redundant.len(), 1, "{:?}", report.redundant);
        let e = &report.redundant[0];
        assert_eq!(
            (e.net.as_str(), e.stuck_at, e.site.as_str()),
            ("bc", 0, "stem")
        );
        assert_eq!(e.driver_cell.as_deref(), Some("and_bc"));
        assert_eq!(e.driver_type, "$_AND_");
        assert_eq!(e.equivalent_faults, 3);
        assert_eq!(e.redundancy, Redundancy::Proven { support_bits: 3 });
        assert_eq!(report.detected + 1, report.collapsed);

        // Below the support size nothing is claimed, and the fault stays undetected.
        let faults = FaultList::new(&nl);
        let options = GradeOptions {
            proof_limit: 2,
            ..GradeOptions::default()
        };
        let report = grade_with(&nl, &faults, &patterns, &options).unwrap();
        assert!(report.redundant.is_empty());
        assert_eq!(report.undetected.len(), 1);
        assert_eq!(
            report.undetected[0].redundancy,
            Redundancy::NotProven {
                support_bits: 3,
                limit: 2
            }
        );
        assert_eq!(report.coverage_percent, report.testable_coverage_percent);
    }

    #[test]
    fn missed_testable_faults_get_an_example_vector() {
        let nl = Netlist::ripple_adder(2, true).unwrap();
        // One all-zero vector leaves most faults undetected; each gets a detecting example.
        let vectors = vec![vec![Word::ZERO, Word::ZERO, Word::ZERO]];
        let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
        let report = grade(&nl, &patterns).unwrap();
        assert!(report.redundant.is_empty());
        assert!(!report.undetected.is_empty());
        for e in &report.undetected {
            let Redundancy::Testable { example, .. } = &e.redundancy else {
                panic!("{e:?} should be testable");
            };
            let values: Vec<Word> = example
                .iter()
                .map(|p| Word::parse_hex(&p.hex).unwrap())
                .collect();
            let check = PatternSet::from_vectors(&nl, &[values], "t").unwrap();
            let matrix = detection_matrix(
                &nl,
                &FaultList::new(&nl),
                &check,
                SimulationMode::BitParallel,
            )
            .unwrap();
            assert!(matrix.detects(e.class, 0), "{e:?}");
        }
    }

    #[test]
    fn compaction_keeps_coverage_and_extra_sets() {
        let nl = Netlist::ripple_adder(4, true).unwrap();
        let faults = FaultList::new(&nl);
        let vectors = random_vectors(&nl, 300, 5);
        let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
        let matrix =
            detection_matrix(&nl, &faults, &patterns, SimulationMode::BitParallel).unwrap();
        let extra = vec![vec![299], vec![7, 8]];
        let kept = compact(&matrix, &extra).unwrap();
        assert!(kept.len() < 40, "{kept:?}");
        assert!(kept.contains(&299));
        assert!(kept.contains(&7) || kept.contains(&8));
        for c in 0..matrix.classes() {
            let before = matrix.first_detecting_vector(c).is_some();
            let after = kept.iter().any(|&v| matrix.detects(c, v));
            assert_eq!(before, after, "class {c}");
        }
        assert!(compact(&matrix, &[vec![300]]).is_err());
    }

    #[test]
    fn pattern_errors_name_the_vector_and_port() {
        let nl = Netlist::ripple_adder(4, false).unwrap();
        let err = PatternSet::from_vectors(&nl, &[vec![Word::from_u64(16), Word::ZERO]], "v.csv")
            .unwrap_err();
        let p = &err.problems()[0];
        assert_eq!(p.file, "v.csv");
        assert_eq!(p.field.as_deref(), Some("vector 0, port a"));
        let err = PatternSet::from_vectors(&nl, &[vec![Word::ZERO]], "v.csv").unwrap_err();
        assert_eq!(err.problems()[0].field.as_deref(), Some("vector 0"));
        let other = Netlist::ripple_adder(4, true).unwrap();
        let patterns =
            PatternSet::from_vectors(&nl, &[vec![Word::ZERO, Word::ZERO]], "v.csv").unwrap();
        assert!(grade(&other, &patterns).is_err());
        assert_eq!(patterns.vector(0), Some(vec![Word::ZERO, Word::ZERO]));
        assert_eq!(patterns.vector(1), None);
    }
}
