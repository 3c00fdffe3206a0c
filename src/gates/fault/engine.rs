//! The fault-simulation engine: bit-parallel evaluation of a fault's cone over blocks of
//! vectors with fault dropping, chunking under a memory budget, grading, and the exhaustive
//! redundancy proof for faults whose support is small enough to enumerate.

use super::*;

/// A faulty value, valid only while its mark equals the engine's current mark.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Slot {
    pub(super) value: u64,
    pub(super) mark: u32,
}

/// Faulty values of the fault currently simulated, as an overlay on a block's fault-free
/// values, plus scratch space for computing fan-out cones.
pub(super) struct Engine<'a> {
    pub(super) nl: &'a Netlist,
    pub(super) topo: &'a Topology,
    pub(super) faulty: Vec<Slot>,
    pub(super) mark: u32,
    /// The highest gate that reads a net carrying a fault effect: the cone walk stops past
    /// it, because the effect has died out in every lane.
    pub(super) horizon: u32,
    pub(super) gate_seen: Vec<u32>,
    pub(super) seen_mark: u32,
    pub(super) stack: Vec<u32>,
    /// Faulty values of wide passes (allocated on the first one).
    pub(super) faulty_wide: Vec<WideSlot>,
}

impl<'a> Engine<'a> {
    pub(super) fn new(nl: &'a Netlist, topo: &'a Topology) -> Engine<'a> {
        Engine {
            nl,
            topo,
            faulty: vec![Slot::default(); nl.net_count()],
            mark: 0,
            horizon: 0,
            gate_seen: vec![0; nl.gates().len()],
            seen_mark: 0,
            stack: Vec::new(),
            faulty_wide: Vec::new(),
        }
    }

    /// Starts a new fault: every faulty value recorded so far becomes stale.
    pub(super) fn next_mark(&mut self) {
        self.mark = self.mark.wrapping_add(1);
        if self.mark == 0 {
            self.faulty.fill(Slot::default());
            self.faulty_wide.fill(WideSlot::default());
            self.mark = 1;
        }
    }

    /// The gates a fault at `site` can reach, ascending (so in topological order). The gate
    /// whose input pin is faulted is not included: the injection evaluates it.
    pub(super) fn cone_of(&mut self, site: FaultSite, cone: &mut Vec<u32>) {
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
    pub(super) fn set(
        &mut self,
        n: usize,
        value: u64,
        good: &[u64],
        mask: u64,
        detected: &mut u64,
    ) -> bool {
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
    pub(super) fn detect(&mut self, fault: &Fault, cone: &[u32], good: &[u64], mask: u64) -> u64 {
        self.next_mark();
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
pub(super) struct ConeCache {
    pub(super) cones: Vec<Option<Box<[u32]>>>,
    pub(super) words: usize,
    pub(super) scratch: Vec<u32>,
}

/// Cone entries kept in a [`ConeCache`], at most (32 MiB).
pub(super) const CONE_WORD_BUDGET: usize = 1 << 23;

impl ConeCache {
    pub(super) fn new(classes: usize) -> ConeCache {
        ConeCache {
            cones: vec![None; classes],
            words: 0,
            scratch: Vec::new(),
        }
    }

    pub(super) fn get(&mut self, engine: &mut Engine, class: usize, site: FaultSite) -> &[u32] {
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
pub(super) struct Chunk {
    /// (first vector, vector count) of each block.
    pub(super) blocks: Vec<(usize, usize)>,
    /// Block-major net values: block `k` holds `good[k * nets .. (k + 1) * nets]`.
    pub(super) good: Vec<u64>,
    pub(super) nets: usize,
}

impl Chunk {
    pub(super) fn good(&self, block: usize) -> &[u64] {
        &self.good[block * self.nets..(block + 1) * self.nets]
    }
}

/// Net values kept per chunk, at most (32 MiB of words): bounds memory on large netlists.
pub(super) const CHUNK_WORD_BUDGET: usize = 1 << 22;
/// Blocks per chunk when memory allows. Counting blocks rather than vectors gives both
/// modes the same memory footprint, so the serial reference is not slowed by cache misses
/// the bit-parallel run avoids.
pub(super) const CHUNK_BLOCKS: usize = 64;

/// Runs the fault-free simulation chunk by chunk and hands each chunk to `f`; stops early
/// when `f` returns false.
pub(super) fn for_each_chunk(
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

pub(super) fn lane_mask(count: usize) -> u64 {
    if count >= 64 {
        !0
    } else {
        (1u64 << count) - 1
    }
}

/// Calls `f(start, count)` for each block of up to `lanes` consecutive vectors; stops when
/// `f` returns false.
pub(super) fn for_each_block(total: usize, lanes: usize, mut f: impl FnMut(usize, usize) -> bool) {
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
    grade_inner(
        netlist,
        &topo,
        &faults,
        patterns,
        &GradeOptions::default(),
        None,
    )
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
    grade_inner(netlist, &topo, faults, patterns, options, None)
}

/// Progress of a fault simulation: called (from the simulating threads) with the number of
/// fault classes just settled; the calls add up to [`FaultList::collapsed`].
pub type Progress<'p> = &'p (dyn Fn(u64) + Sync);

/// [`grade_with`], reporting each fault class as it is settled (detected, or through every
/// vector undetected) to `progress`, for a progress bar.
pub fn grade_with_progress(
    netlist: &Netlist,
    faults: &FaultList,
    patterns: &PatternSet,
    options: &GradeOptions,
    progress: Progress<'_>,
) -> Result<FaultReport> {
    let topo = Topology::new(netlist);
    grade_inner(netlist, &topo, faults, patterns, options, Some(progress))
}

pub(super) fn grade_inner(
    nl: &Netlist,
    topo: &Topology,
    faults: &FaultList,
    patterns: &PatternSet,
    options: &GradeOptions,
    progress: Option<Progress<'_>>,
) -> Result<FaultReport> {
    faults.check(nl)?;
    patterns.check(nl)?;
    let lanes = options.mode.lanes();
    let classes = faults.collapsed();
    // Each class's first detection depends on nothing but its own fault, so the classes are
    // split between threads and the results are the same on any thread count.
    let first: Vec<Option<usize>> = split_classes(classes, options.threads, |range| {
        first_detections(nl, topo, faults, patterns, options.mode, range, progress)
    })
    .concat();
    let remaining: Vec<usize> = (0..classes).filter(|&c| first[c].is_none()).collect();
    let mut engine = Engine::new(nl, topo);

    let limit = options.proof_limit.min(PROOF_LIMIT_CAP);
    let reps: Vec<Fault> = remaining
        .iter()
        .map(|&c| faults.representative(c))
        .collect();
    let verdicts = classify(&mut engine, &reps, limit, lanes);
    let mut undetected = Vec::new();
    let mut redundant = Vec::new();
    for (&c, verdict) in remaining.iter().zip(verdicts) {
        let entry = describe(nl, topo, faults, c, verdict);
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

/// Runs `f` on contiguous ranges of `0..classes`, one per thread (`threads` 0: one per
/// core), and returns the results in range order. Scoped threads: a panic is passed on.
pub(super) fn split_classes<T: Send>(
    classes: usize,
    threads: usize,
    f: impl Fn(std::ops::Range<usize>) -> T + Sync,
) -> Vec<T> {
    let threads = match threads {
        0 => std::thread::available_parallelism().map_or(1, |n| n.get()),
        n => n,
    }
    .clamp(1, classes.max(1));
    if threads == 1 {
        return vec![f(0..classes)];
    }
    let ranges: Vec<_> = (0..threads)
        .map(|t| classes * t / threads..classes * (t + 1) / threads)
        .collect();
    let f = &f;
    std::thread::scope(|scope| {
        let handles: Vec<_> = ranges
            .into_iter()
            .map(|range| scope.spawn(move || f(range)))
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    })
}

/// The first vector detecting each class of `range` (None: not detected), with fault
/// dropping.
fn first_detections(
    nl: &Netlist,
    topo: &Topology,
    faults: &FaultList,
    patterns: &PatternSet,
    mode: SimulationMode,
    range: std::ops::Range<usize>,
    progress: Option<Progress<'_>>,
) -> Vec<Option<usize>> {
    let settled = |n: usize| {
        if let (Some(p), true) = (progress, n > 0) {
            p(n as u64);
        }
    };
    let lanes = mode.lanes();
    let classes = faults.collapsed();
    let offset = range.start;
    let mut first = vec![None; range.len()];
    let mut remaining: Vec<usize> = range.collect();
    if remaining.is_empty() {
        return first;
    }
    let mut engine = Engine::new(nl, topo);
    let mut cones = ConeCache::new(classes);
    let mut wide = WideChunk::default();
    let use_wide = mode == SimulationMode::BitParallel;
    for_each_chunk(nl, patterns, lanes, |chunk| {
        if use_wide {
            wide.fill(chunk);
        }
        let before = remaining.len();
        remaining.retain(|&c| {
            let rep = faults.representative(c);
            let cone = cones.get(&mut engine, c, rep.site);
            // Whole groups of four blocks in wide passes, the rest block by block; the
            // first lane detected is the same either way.
            for g in 0..wide.groups * use_wide as usize {
                let (good, mask) = wide.group(g);
                let detected = engine.detect_wide(&rep, cone, good, mask);
                if let Some(w) = detected.iter().position(|&d| d != 0) {
                    let start = chunk.blocks[g * WIDE + w].0;
                    first[c - offset] = Some(start + detected[w].trailing_zeros() as usize);
                    return false;
                }
            }
            let done = if use_wide { wide.groups * WIDE } else { 0 };
            for (k, &(start, count)) in chunk.blocks.iter().enumerate().skip(done) {
                let detected = engine.detect(&rep, cone, chunk.good(k), lane_mask(count));
                if detected != 0 {
                    first[c - offset] = Some(start + detected.trailing_zeros() as usize);
                    return false;
                }
            }
            true
        });
        settled(before - remaining.len());
        !remaining.is_empty()
    });
    settled(remaining.len());

    first
}

pub(super) fn describe(
    nl: &Netlist,
    topo: &Topology,
    faults: &FaultList,
    class: usize,
    redundancy: Redundancy,
) -> FaultEntry {
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
    let observed_at = reached_outputs(nl, topo, fault.site)
        .into_iter()
        .map(|flat| {
            let (port, bit) = topo.output_pos[flat];
            nl.outputs()[port].bit_label(bit)
        })
        .collect();
    FaultEntry {
        class,
        observed_at,
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
pub(super) struct Cones {
    pub(super) per_output: Vec<Option<(Vec<u32>, Vec<u32>)>>,
}

impl Cones {
    pub(super) fn new(nl: &Netlist) -> Cones {
        Cones {
            per_output: vec![None; nl.output_nets().len()],
        }
    }

    pub(super) fn cone(
        &mut self,
        nl: &Netlist,
        topo: &Topology,
        flat: usize,
    ) -> &(Vec<u32>, Vec<u32>) {
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
pub(super) fn reached_outputs(nl: &Netlist, topo: &Topology, site: FaultSite) -> Vec<usize> {
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
pub(super) fn exhaustive_word(j: usize, start: u64, count: usize) -> u64 {
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
pub(super) fn classify(
    engine: &mut Engine,
    faults: &[Fault],
    limit: u32,
    lanes: usize,
) -> Vec<Redundancy> {
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
pub(super) fn example_vector(
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
