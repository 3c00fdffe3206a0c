//! Transition (gross delay) faults: slow-to-rise and slow-to-fall on every line, graded on
//! pairs of vectors applied in consecutive cycles.
//!
//! Model (common practice, as in Abramovici, Breuer and Friedman, "Digital Systems Testing
//! and Testable Design", the transition-fault chapter; from memory): the lines are the
//! stuck-at model's lines (stems and fan-out branches; lines tied to a constant never change
//! and carry no transition fault). A slow-to-rise fault on line L is detected by the pair
//! (launch, capture) when the launch vector sets L to 0 in the fault-free circuit and the
//! capture vector detects L stuck-at-0 (so L should rise, and its late value is still 0 when
//! the outputs are sampled). Slow-to-fall likewise with 1 and stuck-at-1. The launch vector
//! sees the fault-free circuit: the transition it caused before settles within the cycle.
//!
//! Collapsing: only through buffers and inverters. A BUF input's slow-to-rise is its
//! output's slow-to-rise (the same launch condition and, by stuck-at equivalence, the same
//! capture condition); a NOT input's slow-to-rise is its output's slow-to-fall. Across an
//! AND-type gate the stuck-at equivalence of input and output does not carry over: the
//! output can be 0 in the launch vector with the input at 1, so the input fault only
//! dominates the output fault, and dominance is not used (it would change what the
//! coverage figure counts). Fan-out-free branches are their stem already.
//!
//! Simulation: the detection matrix of the stuck-at faults (bit-parallel, 64 vectors a word,
//! [`super::detection_matrix_on`]) gives every vector that detects each capture fault; the
//! fault-free values of every line come from one bit-parallel pass. A pair starting at
//! vector p detects a transition fault when bit p of the launch condition and bit p + 1 of
//! the capture row are set: a shift and an AND per 64 pairs.

use super::*;

/// One transition fault.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct TransitionFault {
    /// The faulty line.
    pub site: FaultSite,
    /// True: slow-to-rise; false: slow-to-fall.
    pub rising: bool,
}

impl TransitionFault {
    /// The stuck-at fault the capture vector must detect: slow-to-rise behaves as stuck-at-0
    /// in the capture cycle, slow-to-fall as stuck-at-1.
    pub fn capture_fault(&self) -> Fault {
        Fault {
            site: self.site,
            stuck_at: !self.rising,
        }
    }

    /// The fault-free value the launch vector must set on the line (0 for slow-to-rise).
    pub fn initial_value(&self) -> bool {
        !self.rising
    }
}

/// Every transition fault of a netlist and its equivalence classes (see the module notes).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TransitionList {
    faults: Vec<TransitionFault>,
    class_of: Vec<usize>,
    classes: Vec<Vec<usize>>,
    shape: (usize, usize, usize),
}

impl TransitionList {
    /// Enumerates slow-to-rise and slow-to-fall on every line that is not tied to a
    /// constant, and collapses through BUF and NOT gates.
    pub fn new(netlist: &Netlist) -> TransitionList {
        let topo = Topology::new(netlist);
        TransitionList::with_topology(netlist, &topo)
    }

    fn with_topology(nl: &Netlist, topo: &Topology) -> TransitionList {
        let mut faults = Vec::new();
        for net in 0..nl.net_count() {
            let id = NetId::from_index(net);
            if matches!(nl.driver(id), Driver::Constant(_)) {
                continue;
            }
            let sinks = &topo.sinks[net];
            let mut sites = vec![FaultSite::Stem(id)];
            if sinks.len() > 1 {
                sites.extend(sinks.iter().map(|&s| topo.branch(s)));
            }
            for site in sites {
                for rising in [true, false] {
                    faults.push(TransitionFault { site, rising });
                }
            }
        }
        let index: HashMap<TransitionFault, usize> =
            faults.iter().enumerate().map(|(i, f)| (*f, i)).collect();
        let mut parent: Vec<usize> = (0..faults.len()).collect();
        fn root(parent: &mut [usize], mut i: usize) -> usize {
            while parent[i] != i {
                parent[i] = parent[parent[i]];
                i = parent[i];
            }
            i
        }
        for (g, gate) in nl.gates().iter().enumerate() {
            let inverting = match gate.kind() {
                GateKind::Buf => false,
                GateKind::Not => true,
                _ => continue,
            };
            let sink = Sink::Pin {
                gate: g as u32,
                pin: 0,
            };
            let input = topo.line(nl, gate.inputs()[0], sink);
            for rising in [true, false] {
                let a = index.get(&TransitionFault {
                    site: input,
                    rising,
                });
                let b = index.get(&TransitionFault {
                    site: FaultSite::Stem(gate.output()),
                    rising: rising != inverting,
                });
                if let (Some(&a), Some(&b)) = (a, b) {
                    let (ra, rb) = (root(&mut parent, a), root(&mut parent, b));
                    if ra != rb {
                        parent[ra.max(rb)] = ra.min(rb);
                    }
                }
            }
        }
        let mut class_of = vec![0; faults.len()];
        let mut classes: Vec<Vec<usize>> = Vec::new();
        let mut class_of_root: HashMap<usize, usize> = HashMap::new();
        for (i, class) in class_of.iter_mut().enumerate() {
            let r = root(&mut parent, i);
            let c = *class_of_root.entry(r).or_insert_with(|| {
                classes.push(Vec::new());
                classes.len() - 1
            });
            classes[c].push(i);
            *class = c;
        }
        TransitionList {
            faults,
            class_of,
            classes,
            shape: shape(nl),
        }
    }

    /// Faults before collapsing (two per line).
    pub fn total(&self) -> usize {
        self.faults.len()
    }

    /// Equivalence classes.
    pub fn collapsed(&self) -> usize {
        self.classes.len()
    }

    /// Every fault, uncollapsed.
    pub fn faults(&self) -> &[TransitionFault] {
        &self.faults
    }

    /// The class of fault number `fault`.
    pub fn class_of(&self, fault: usize) -> usize {
        self.class_of[fault]
    }

    /// The faults of class `class`, representative first.
    pub fn members(&self, class: usize) -> &[usize] {
        &self.classes[class]
    }

    /// The representative fault of class `class`.
    pub fn representative(&self, class: usize) -> TransitionFault {
        self.faults[self.classes[class][0]]
    }
}

/// Which vectors of a set form the (launch, capture) pairs that are graded.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum PairSelection {
    /// Every vector with the next one: pairs (i, i + 1) for i = 0 .. n - 2, as a testbench
    /// applying the vectors back to back in consecutive cycles applies them.
    Consecutive,
    /// Only the designated pairs of a `gen --pairs` set: (first + 2k, first + 2k + 1) for
    /// k = 0 .. pairs - 1.
    LaunchCapture {
        /// Position of the first launch vector.
        first: usize,
        /// Number of pairs.
        pairs: usize,
    },
}

impl PairSelection {
    /// The rule in words, for reports.
    pub fn describe(&self) -> String {
        match self {
            PairSelection::Consecutive => "every vector i with vector i + 1 (consecutive cycles \
                                           of a back-to-back testbench)"
                .to_string(),
            PairSelection::LaunchCapture { first, pairs } => format!(
                "the {pairs} designated launch/capture pairs of the set: vectors {first} + 2k \
                 launch, {first} + 2k + 1 capture"
            ),
        }
    }
}

/// One collapsed transition fault the pairs did not detect.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct TransitionEntry {
    /// Class index in the transition fault list.
    pub fault_class: usize,
    /// The net of the representative fault.
    pub net: String,
    /// `slow-to-rise` or `slow-to-fall`.
    pub transition: &'static str,
    /// `stem`, `branch into pin B of cell ...` or `branch into output y[3]`.
    pub site: String,
    /// The cell driving the net (none for inputs).
    pub driver_cell: Option<String>,
    /// The driving cell's type, or `input`.
    pub driver_type: String,
    /// Uncollapsed faults in the class.
    pub equivalent_faults: usize,
    /// Pairs whose launch vector sets the line to the initial value.
    pub launching_pairs: usize,
    /// Pairs whose capture vector detects the stuck-at fault of the initial value.
    pub capturing_pairs: usize,
}

/// Transition-fault coverage of a set applied as pairs.
///
/// `coverage_percent` is detected / collapsed x 100 (100 when there is nothing to detect).
/// No fault is called redundant here: a transition fault is untestable exactly when its
/// capture stuck-at fault is redundant or its line can never hold the initial value, and
/// `grade --top-up` (stuck-at) is where redundancy is proven.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TransitionReport {
    /// The graded module.
    pub module: String,
    /// Vectors in the set.
    pub vectors: usize,
    /// Pairs graded.
    pub pairs: usize,
    /// How the pairs were formed.
    pub pair_rule: String,
    /// Transition faults before collapsing.
    pub faults: usize,
    /// After collapsing.
    pub collapsed: usize,
    /// Collapsed faults some pair detects.
    pub detected: usize,
    /// detected / collapsed x 100.
    pub coverage_percent: f64,
    /// The collapsed faults no pair detects.
    pub undetected: Vec<TransitionEntry>,
    /// Output ports not observed (filled in by the spec-level grader).
    pub unchecked_outputs: Vec<String>,
    /// Gates feeding only unobserved outputs, not graded.
    pub ungraded_gates: usize,
    /// Per class: the launch position of the first pair detecting it.
    #[serde(skip)]
    pub first_detection: Vec<Option<usize>>,
}

/// Grades `list` on `patterns` taken as pairs by `pairs`, with `stuck` the stuck-at fault
/// list of the same netlist (the capture faults) and `threads` simulation threads (0: one
/// per core). Errors: lists of another netlist, designated pairs past the set's end.
pub fn grade_transitions(
    netlist: &Netlist,
    list: &TransitionList,
    stuck: &FaultList,
    patterns: &PatternSet,
    pairs: PairSelection,
    threads: usize,
) -> Result<TransitionReport> {
    if list.shape != shape(netlist) {
        return Err(Error::problem(Problem::new(
            netlist.source(),
            format!(
                "the transition fault list was made for a different netlist than module `{}`",
                netlist.module()
            ),
        )));
    }
    let n = patterns.len();
    let words = n.div_ceil(64).max(1);
    // Bit p set: the pair (p, p + 1) is graded.
    let mut starts = vec![0u64; words];
    let mut pair_count = 0;
    let mut mark = |p: usize| {
        starts[p / 64] |= 1 << (p % 64);
    };
    match pairs {
        PairSelection::Consecutive => {
            for p in 0..n.saturating_sub(1) {
                mark(p);
                pair_count += 1;
            }
        }
        PairSelection::LaunchCapture { first, pairs } => {
            if first + 2 * pairs > n {
                return Err(Error::problem(
                    Problem::new(
                        "vector set",
                        format!(
                            "{pairs} launch/capture pairs from position {first} need {} vectors; \
                             the set has {n}",
                            first + 2 * pairs
                        ),
                    )
                    .field("pairs"),
                ));
            }
            for k in 0..pairs {
                mark(first + 2 * k);
                pair_count += 1;
            }
        }
    }
    let matrix = detection_matrix_on(
        netlist,
        stuck,
        patterns,
        SimulationMode::BitParallel,
        threads,
    )?;
    // Fault-free value of every net per vector, 64 vectors a word.
    let nets = netlist.net_count();
    let mut values = vec![0u64; nets * words];
    for_each_chunk(netlist, patterns, 64, |chunk| {
        for (k, &(start, count)) in chunk.blocks.iter().enumerate() {
            let good = chunk.good(k);
            for net in 0..nets {
                values[net * words + start / 64] = good[net] & lane_mask(count);
            }
        }
        true
    });
    let stuck_index: HashMap<Fault, usize> = stuck
        .faults()
        .iter()
        .enumerate()
        .map(|(i, f)| (*f, i))
        .collect();
    let lane_ok = |w: usize| {
        let valid = n - w * 64;
        lane_mask(valid.min(64))
    };
    let mut first_detection = Vec::with_capacity(list.collapsed());
    let mut undetected = Vec::new();
    for c in 0..list.collapsed() {
        let rep = list.representative(c);
        let net = line_net(netlist, rep.site);
        let row = stuck_index
            .get(&rep.capture_fault())
            .map(|&i| matrix.row(stuck.class_of(i)));
        let mut first = None;
        let (mut launching, mut capturing) = (0, 0);
        for w in 0..words {
            let v = values[net.index() * words + w];
            let launch = if rep.initial_value() { v } else { !v } & lane_ok(w);
            let capture_next = match row {
                Some(r) => (r[w] >> 1) | r.get(w + 1).map_or(0, |&x| x << 63),
                None => 0,
            };
            launching += (starts[w] & launch).count_ones() as usize;
            capturing += (starts[w] & capture_next).count_ones() as usize;
            let detected = starts[w] & launch & capture_next;
            if first.is_none() && detected != 0 {
                first = Some(w * 64 + detected.trailing_zeros() as usize);
            }
        }
        if first.is_none() {
            undetected.push(entry(netlist, list, c, rep, launching, capturing));
        }
        first_detection.push(first);
    }
    let collapsed = list.collapsed();
    let detected = collapsed - undetected.len();
    Ok(TransitionReport {
        module: netlist.module().to_string(),
        vectors: n,
        pairs: pair_count,
        pair_rule: pairs.describe(),
        faults: list.total(),
        collapsed,
        detected,
        coverage_percent: if collapsed == 0 {
            100.0
        } else {
            detected as f64 * 100.0 / collapsed as f64
        },
        undetected,
        unchecked_outputs: Vec::new(),
        ungraded_gates: 0,
        first_detection,
    })
}

/// The net a line carries.
fn line_net(nl: &Netlist, site: FaultSite) -> NetId {
    match site {
        FaultSite::Stem(n) => n,
        FaultSite::GateInput { gate, pin } => nl.gates()[gate].inputs()[pin],
        FaultSite::OutputBit { port, bit } => nl.outputs()[port].nets()[bit as usize],
    }
}

fn entry(
    nl: &Netlist,
    list: &TransitionList,
    class: usize,
    fault: TransitionFault,
    launching_pairs: usize,
    capturing_pairs: usize,
) -> TransitionEntry {
    let net = line_net(nl, fault.site);
    let site = match fault.site {
        FaultSite::Stem(_) => "stem".to_string(),
        FaultSite::GateInput { gate, pin } => {
            let g = &nl.gates()[gate];
            format!(
                "branch into pin {} of cell `{}`",
                g.kind().input_pins()[pin],
                g.cell_name()
            )
        }
        FaultSite::OutputBit { port, bit } => {
            format!("branch into output {}", nl.outputs()[port].bit_label(bit))
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
    TransitionEntry {
        fault_class: class,
        net: nl.net_name(net),
        transition: if fault.rising {
            "slow-to-rise"
        } else {
            "slow-to-fall"
        },
        site,
        driver_cell,
        driver_type,
        equivalent_faults: list.members(class).len(),
        launching_pairs,
        capturing_pairs,
    }
}
