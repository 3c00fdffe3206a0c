//! Coverage accounting: per-bin hit and failure counts, per-class vector counts, and the
//! covered / missed / failing verdict per class.
//!
//! Dense families (cell rows, result bits) hit dozens of bins per vector, so they are counted
//! with bit-sliced counters: plane k holds bit k of every bin's count, and adding a hit mask
//! is a ripple-carry through the planes, 64 bins per machine word. Everything else is a plain
//! counter. Counts are exact and add across runs, which is what `merge` relies on.

use serde::{Deserialize, Serialize};

use crate::classes::{Catalogue, Hits};
use crate::word::{Word, LIMBS};

/// Bit planes per dense counter; a carry out of the top plane adds 2^PLANES to an exact
/// per-bin overflow count, so counts are exact however large.
const PLANES: usize = 16;

#[derive(Debug, Clone)]
struct DenseCounter {
    base: u32,
    stride: u32,
    /// Limb-major: `planes[limb * PLANES + k]` holds bit k of the counts of that limb's bins.
    planes: Vec<u64>,
    /// Per bit position: how many times its plane counter wrapped.
    wraps: Vec<u64>,
}

impl DenseCounter {
    fn new(base: u32, stride: u32) -> DenseCounter {
        DenseCounter {
            base,
            stride,
            planes: vec![0; LIMBS * PLANES],
            wraps: vec![0; LIMBS * 64],
        }
    }

    /// Adds one to the count of every bin whose bit is set in `mask` (low `limbs` limbs).
    #[inline]
    fn add(&mut self, mask: &Word, limbs: usize) {
        for (l, &m) in mask.limbs().iter().enumerate().take(limbs) {
            let mut carry = m;
            let planes = &mut self.planes[l * PLANES..(l + 1) * PLANES];
            for plane in planes.iter_mut() {
                if carry == 0 {
                    break;
                }
                let t = *plane & carry;
                *plane ^= carry;
                carry = t;
            }
            while carry != 0 {
                let b = carry.trailing_zeros() as usize;
                self.wraps[l * 64 + b] += 1;
                carry &= carry - 1;
            }
        }
    }

    fn count(&self, bit: u32) -> u64 {
        let (l, b) = ((bit / 64) as usize, bit % 64);
        let low: u64 = self.planes[l * PLANES..(l + 1) * PLANES]
            .iter()
            .enumerate()
            .map(|(k, p)| ((p >> b) & 1) << k)
            .sum();
        low + (self.wraps[bit as usize] << PLANES)
    }
}

/// Running coverage of one check.
#[derive(Debug, Clone)]
pub struct Coverage {
    bin_hits: Vec<u64>,
    bin_failures: Vec<u64>,
    class_hits: Vec<u64>,
    class_failures: Vec<u64>,
    dense: Vec<DenseCounter>,
    /// Per global bin: the dense counter whose base it is, if any.
    dense_at: Vec<u16>,
    width: u32,
    limbs: usize,
}

impl Coverage {
    /// Empty coverage for `catalogue`.
    pub fn new(catalogue: &Catalogue) -> Coverage {
        Coverage {
            bin_hits: vec![0; catalogue.bin_count()],
            bin_failures: vec![0; catalogue.bin_count()],
            class_hits: vec![0; catalogue.classes().len()],
            class_failures: vec![0; catalogue.classes().len()],
            dense: Vec::new(),
            dense_at: vec![u16::MAX; catalogue.bin_count()],
            width: catalogue.model().width(),
            limbs: catalogue.model().width().div_ceil(64) as usize,
        }
    }

    /// Records one vector's hits; `failed` when its outputs were wrong or unknown.
    pub fn record(&mut self, hits: &Hits, failed: bool) {
        for &b in &hits.bins {
            self.bin_hits[b as usize] += 1;
        }
        for d in &hits.dense {
            let at = self.dense_at[d.base as usize];
            let i = if at == u16::MAX {
                self.dense.push(DenseCounter::new(d.base, d.stride));
                let i = self.dense.len() - 1;
                self.dense_at[d.base as usize] = i as u16;
                i
            } else {
                at as usize
            };
            self.dense[i].add(&d.mask, self.limbs);
        }
        for &c in &hits.classes {
            self.class_hits[c as usize] += 1;
        }
        if failed {
            hits.for_each_bin(|b| self.bin_failures[b] += 1);
            for &c in &hits.classes {
                self.class_failures[c as usize] += 1;
            }
        }
    }

    /// Folds the dense counters into the per-bin counts and returns the totals.
    pub fn totals(mut self) -> CoverageCounts {
        for c in std::mem::take(&mut self.dense) {
            for i in 0..self.width {
                let n = c.count(i);
                if n > 0 {
                    self.bin_hits[(c.base + i * c.stride) as usize] += n;
                }
            }
        }
        CoverageCounts {
            bin_hits: self.bin_hits,
            bin_failures: self.bin_failures,
            class_hits: self.class_hits,
            class_failures: self.class_failures,
        }
    }
}

/// Exact coverage counts, in catalogue order; these add across runs.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct CoverageCounts {
    /// Vectors hitting each global bin.
    pub bin_hits: Vec<u64>,
    /// Failing vectors hitting each global bin.
    pub bin_failures: Vec<u64>,
    /// Vectors hitting each class.
    pub class_hits: Vec<u64>,
    /// Failing vectors hitting each class.
    pub class_failures: Vec<u64>,
}

impl CoverageCounts {
    /// Adds another run's counts (same catalogue).
    pub fn add(&mut self, other: &CoverageCounts) {
        let sum = |a: &mut Vec<u64>, b: &Vec<u64>| {
            for (x, y) in a.iter_mut().zip(b) {
                *x += y;
            }
        };
        sum(&mut self.bin_hits, &other.bin_hits);
        sum(&mut self.bin_failures, &other.bin_failures);
        sum(&mut self.class_hits, &other.class_hits);
        sum(&mut self.class_failures, &other.class_failures);
    }
}

/// A class's coverage verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ClassStatus {
    /// Every reachable bin has at least the required hits and nothing failed.
    Covered,
    /// Some reachable bin is short of hits.
    Missed,
    /// A vector hitting the class failed.
    Failing,
    /// No bin of the class is reachable at this width; not counted.
    Unreachable,
}

/// Per-class summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClassSummary {
    /// Class id.
    pub id: String,
    /// Description.
    pub description: String,
    /// Vectors hitting the class.
    pub hits: u64,
    /// Failing vectors hitting the class.
    pub failures: u64,
    /// Reachable bins.
    pub bins_total: usize,
    /// Reachable bins with enough hits.
    pub bins_covered: usize,
    /// Verdict.
    pub status: ClassStatus,
    /// Bin ids short of hits (at most 20 listed).
    pub missed_bins: Vec<String>,
    /// Bins with failures, worst first (at most 20 listed): id, hits, failures.
    pub failing_bins: Vec<BinFailures>,
}

/// Failures in one bin.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct BinFailures {
    /// Bin id.
    pub bin: String,
    /// Vectors hitting the bin.
    pub hits: u64,
    /// Failing vectors among them.
    pub failures: u64,
}

/// Coverage totals.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CoverageSummary {
    /// Classes covered (with at least one reachable bin).
    pub covered: usize,
    /// Classes with at least one reachable bin.
    pub total: usize,
    /// covered / total, percent.
    pub percent: f64,
    /// Reachable bins with enough hits.
    pub bins_covered: usize,
    /// Reachable bins.
    pub bins_total: usize,
    /// bins_covered / bins_total, percent.
    pub bins_percent: f64,
    /// Hits a bin needs to count as covered.
    pub at_least: u64,
}

fn percent(a: usize, b: usize) -> f64 {
    if b == 0 {
        100.0
    } else {
        // Rounded down to 0.01 so a gate of 100 is never met by rounding up.
        ((a as f64 / b as f64) * 10000.0).floor() / 100.0
    }
}

/// Classifies every class and totals coverage.
pub fn summarise(
    catalogue: &Catalogue,
    counts: &CoverageCounts,
    at_least: u64,
) -> (CoverageSummary, Vec<ClassSummary>) {
    let mut classes = Vec::new();
    let (mut covered, mut total, mut bins_covered, mut bins_total) = (0, 0, 0, 0);
    for (ci, c) in catalogue.classes().iter().enumerate() {
        let reachable: Vec<usize> = catalogue.reachable_bins(ci).collect();
        let good = reachable
            .iter()
            .filter(|&&b| counts.bin_hits[b] >= at_least)
            .count();
        let mut failing: Vec<BinFailures> = reachable
            .iter()
            .filter(|&&b| counts.bin_failures[b] > 0)
            .map(|&b| BinFailures {
                bin: catalogue.bin_id(b),
                hits: counts.bin_hits[b],
                failures: counts.bin_failures[b],
            })
            .collect();
        // Worst first: bins where every hit failed point at the bug.
        failing.sort_by(|x, y| {
            let rx = x.failures as f64 / x.hits.max(1) as f64;
            let ry = y.failures as f64 / y.hits.max(1) as f64;
            ry.total_cmp(&rx).then(y.failures.cmp(&x.failures))
        });
        failing.truncate(20);
        let status = if reachable.is_empty() {
            ClassStatus::Unreachable
        } else if counts.class_failures[ci] > 0 {
            ClassStatus::Failing
        } else if good == reachable.len() {
            ClassStatus::Covered
        } else {
            ClassStatus::Missed
        };
        if !reachable.is_empty() {
            total += 1;
            bins_total += reachable.len();
            bins_covered += good;
            if good == reachable.len() {
                covered += 1;
            }
        }
        classes.push(ClassSummary {
            id: c.id().to_string(),
            description: c.description().to_string(),
            hits: counts.class_hits[ci],
            failures: counts.class_failures[ci],
            bins_total: reachable.len(),
            bins_covered: good,
            status,
            missed_bins: reachable
                .iter()
                .filter(|&&b| counts.bin_hits[b] < at_least)
                .take(20)
                .map(|&b| catalogue.bin_id(b))
                .collect(),
            failing_bins: failing,
        });
    }
    (
        CoverageSummary {
            covered,
            total,
            percent: percent(covered, total),
            bins_covered,
            bins_total,
            bins_percent: percent(bins_covered, bins_total),
            at_least,
        },
        classes,
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bit_sliced_counter_counts_exactly() {
        let mut c = DenseCounter::new(0, 1);
        let mut expect = vec![0u64; 512];
        let mut x: u64 = 0x9e3779b97f4a7c15;
        // Enough additions to wrap the 16 planes several times.
        for round in 0..200_000 {
            let mut limbs = [0u64; LIMBS];
            for l in limbs.iter_mut() {
                x ^= x << 13;
                x ^= x >> 7;
                x ^= x << 17;
                // Dense masks for some rounds so low bins pass 2^16 hits.
                *l = if round % 2 == 0 { u64::MAX } else { x };
            }
            let w = Word::from_limbs(limbs);
            for i in w.set_bits() {
                expect[i as usize] += 1;
            }
            c.add(&w, LIMBS);
        }
        for i in 0..512 {
            assert_eq!(c.count(i), expect[i as usize]);
        }
    }
}
