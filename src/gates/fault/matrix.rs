//! The detection matrix (which vectors detect which collapsed faults, without dropping) and
//! greedy compaction of a vector set to one that detects the same faults.

use super::*;

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

    pub(super) fn row(&self, class: usize) -> &[u64] {
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
    detection_matrix_on(netlist, faults, patterns, mode, 1)
}

/// [`detection_matrix`] on `threads` threads (0: one per core), each simulating a
/// contiguous range of classes; the matrix is the same on any thread count.
pub(crate) fn detection_matrix_on(
    netlist: &Netlist,
    faults: &FaultList,
    patterns: &PatternSet,
    mode: SimulationMode,
    threads: usize,
) -> Result<DetectionMatrix> {
    faults.check(netlist)?;
    patterns.check(netlist)?;
    let topo = Topology::new(netlist);
    let words_per_row = patterns.len().div_ceil(64);
    let classes = faults.collapsed();
    let parts = split_classes(classes, threads, |range| {
        matrix_rows(netlist, &topo, faults, patterns, mode, range)
    });
    Ok(DetectionMatrix {
        vectors: patterns.len(),
        classes,
        words_per_row,
        rows: parts.concat(),
    })
}

/// The matrix rows of the classes in `range`.
fn matrix_rows(
    netlist: &Netlist,
    topo: &Topology,
    faults: &FaultList,
    patterns: &PatternSet,
    mode: SimulationMode,
    range: std::ops::Range<usize>,
) -> Vec<u64> {
    let words_per_row = patterns.len().div_ceil(64);
    let classes = faults.collapsed();
    let offset = range.start;
    let mut rows = vec![0u64; range.len() * words_per_row];
    let reps: Vec<(usize, Fault)> = range.map(|c| (c, faults.representative(c))).collect();
    let mut engine = Engine::new(netlist, topo);
    let mut cones = ConeCache::new(classes);
    let mut wide = WideChunk::default();
    let use_wide = mode == SimulationMode::BitParallel;
    for_each_chunk(netlist, patterns, mode.lanes(), |chunk| {
        if use_wide {
            wide.fill(chunk);
        }
        let done = if use_wide { wide.groups * WIDE } else { 0 };
        for &(c, ref rep) in &reps {
            let cone = cones.get(&mut engine, c, rep.site);
            let row = (c - offset) * words_per_row;
            // Whole groups of four 64-vector blocks in wide passes, the rest block by block.
            for g in 0..done / WIDE {
                let (good, mask) = wide.group(g);
                let detected = engine.detect_wide(rep, cone, good, mask);
                for (w, &d) in detected.iter().enumerate() {
                    let start = chunk.blocks[g * WIDE + w].0;
                    rows[row + start / 64] |= d;
                }
            }
            for (k, &(start, count)) in chunk.blocks.iter().enumerate().skip(done) {
                let detected = engine.detect(rep, cone, chunk.good(k), lane_mask(count));
                rows[row + start / 64] |= detected << (start % 64);
            }
        }
        true
    });
    rows
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
