//! Coverage accounting: per-bin hit and failure counts, per-class vector counts, and the
//! covered / missed / failing verdict per class.
//!
//! Dense families (cell rows, result bits) hit dozens of bins per vector, so they are counted
//! in byte lanes: eight bins share a machine word, one byte each, and adding a hit mask takes
//! one table look-up and one add per eight bins; every 255 adds the lanes are folded into
//! exact 64-bit totals. Everything else is a plain counter. Counts are exact and add across runs, which is what `merge` relies on.

use serde::{Deserialize, Serialize};

use crate::corners::classes::{Catalogue, Hits};

/// Adds a byte lane takes before the lanes are folded into the exact totals (a lane byte
/// holds at most 255).
const LANE_LIMIT: u32 = 255;

/// `SPREAD[b]` has byte k equal to bit k of `b`: eight bins' hits, one per byte lane.
const SPREAD: [u64; 256] = {
    let mut t = [0u64; 256];
    let mut b = 0;
    while b < 256 {
        let mut k = 0;
        while k < 8 {
            t[b] |= ((b as u64 >> k) & 1) << (8 * k);
            k += 1;
        }
        b += 1;
    }
    t
};

/// Hit counts of one dense family (bins `base + i * stride`).
#[derive(Debug, Clone)]
struct DenseCounter {
    base: u32,
    stride: u32,
    /// Byte lanes: bin bit `8 * j + k` counts in byte k of `lanes[j]`, so one table look-up
    /// and one add count eight bins.
    lanes: Vec<u64>,
    /// Adds since the lanes were last folded into `totals`.
    pending: u32,
    /// Exact counts folded out of the lanes, per bit position.
    totals: Vec<u64>,
}

impl DenseCounter {
    fn new(base: u32, stride: u32, width: u32) -> DenseCounter {
        let lanes = width.div_ceil(8) as usize;
        DenseCounter {
            base,
            stride,
            lanes: vec![0; lanes],
            pending: 0,
            totals: vec![0; lanes * 8],
        }
    }

    /// Adds one to the count of every bin whose bit is set in `mask` (little-endian limbs).
    #[inline]
    fn add(&mut self, mask: &[u64]) {
        if let [limb] = *mask {
            // Units up to 64 bits: one limb, at most eight lanes.
            let mut m = limb;
            for lane in self.lanes.iter_mut() {
                *lane += SPREAD[(m & 0xff) as usize];
                m >>= 8;
            }
        } else {
            for (lanes, &limb) in self.lanes.chunks_mut(8).zip(mask) {
                let mut m = limb;
                for lane in lanes {
                    *lane += SPREAD[(m & 0xff) as usize];
                    m >>= 8;
                }
            }
        }
        self.pending += 1;
        if self.pending == LANE_LIMIT {
            self.fold();
        }
    }

    fn fold(&mut self) {
        for (j, lane) in self.lanes.iter_mut().enumerate() {
            for k in 0..8 {
                self.totals[8 * j + k] += (*lane >> (8 * k)) & 0xff;
            }
            *lane = 0;
        }
        self.pending = 0;
    }

    fn count(&self, bit: u32) -> u64 {
        let (j, k) = ((bit / 8) as usize, bit % 8);
        self.totals[bit as usize] + ((self.lanes[j] >> (8 * k)) & 0xff)
    }
}

/// Running coverage of one check.
#[derive(Debug, Clone)]
pub struct Coverage {
    bin_hits: Vec<u64>,
    bin_failures: Vec<u64>,
    class_hits: Vec<u64>,
    class_failures: Vec<u64>,
    /// One counter per dense family of the catalogue, indexed by the hit's slot.
    dense: Vec<DenseCounter>,
    width: u32,
}

impl Coverage {
    /// Empty coverage for `catalogue`.
    pub fn new(catalogue: &Catalogue) -> Coverage {
        let width = catalogue.model().width();
        Coverage {
            bin_hits: vec![0; catalogue.bin_count()],
            bin_failures: vec![0; catalogue.bin_count()],
            class_hits: vec![0; catalogue.classes().len()],
            class_failures: vec![0; catalogue.classes().len()],
            dense: catalogue
                .dense_families()
                .iter()
                .map(|&(base, stride)| DenseCounter::new(base, stride, width))
                .collect(),
            width: catalogue.model().width(),
        }
    }

    /// Records one vector's hits; `failed` when its outputs were wrong or unknown.
    pub fn record(&mut self, hits: &Hits, failed: bool) {
        for &b in &hits.bins {
            self.bin_hits[b as usize] += 1;
        }
        let limbs = hits.limbs.max(1);
        for (d, mask) in hits.dense.iter().zip(hits.masks.chunks_exact(limbs)) {
            if let Some(counter) = self.dense.get_mut(d.slot as usize) {
                counter.add(mask);
            }
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

    /// Adds another report's counts, refusing (false, and `self` unchanged) when the lists
    /// differ in length or a sum does not fit in 64 bits: merged counts are exact or absent.
    pub fn checked_add(&mut self, other: &CoverageCounts) -> bool {
        let sum = |a: &[u64], b: &[u64]| -> Option<Vec<u64>> {
            if a.len() != b.len() {
                return None;
            }
            a.iter().zip(b).map(|(x, y)| x.checked_add(*y)).collect()
        };
        let (Some(bh), Some(bf), Some(ch), Some(cf)) = (
            sum(&self.bin_hits, &other.bin_hits),
            sum(&self.bin_failures, &other.bin_failures),
            sum(&self.class_hits, &other.class_hits),
            sum(&self.class_failures, &other.class_failures),
        ) else {
            return false;
        };
        *self = CoverageCounts {
            bin_hits: bh,
            bin_failures: bf,
            class_hits: ch,
            class_failures: cf,
        };
        true
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
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BinFailures {
    /// Bin id.
    pub bin: String,
    /// Vectors hitting the bin.
    pub hits: u64,
    /// Failing vectors among them.
    pub failures: u64,
    /// How unlikely so many failures in this bin are by chance: -log10 of the probability
    /// that a bin hit by `hits` of the run's vectors catches at least `failures` failing
    /// vectors when failures fall on vectors at random (see [`surprise`]); 0 when the bin
    /// fails no more often than the run as a whole. Rounded to 0.01.
    #[serde(default)]
    pub surprise: f64,
}

/// ln(n!): exact below 32, Stirling's series above (error below 1e-10 there).
fn ln_factorial(n: u64) -> f64 {
    if n < 32 {
        return (2..=n).map(|k| (k as f64).ln()).sum();
    }
    let x = n as f64;
    x * x.ln() - x + 0.5 * (2.0 * std::f64::consts::PI * x).ln() + 1.0 / (12.0 * x)
        - 1.0 / (360.0 * x * x * x)
}

/// The ranking score of a failing bin: -log10 P(X >= failures) for X ~ Binomial(hits, p)
/// with p = failing / vectors, the run's failure rate. A bin that every vector hits fails
/// exactly as often as the run and scores 0; a rare bin whose every hit failed scores high,
/// more so the more hits it has and the rarer failures are in the run. No threshold: every
/// bin failing more often than chance predicts scores above 0. The tail is summed term by
/// term from `failures` upward (at most 10,000 terms; the terms shrink geometrically there).
pub fn surprise(hits: u64, failures: u64, vectors: u64, failing: u64) -> f64 {
    if failures == 0 || hits == 0 || vectors == 0 || failing >= vectors {
        return 0.0;
    }
    let p = failing as f64 / vectors as f64;
    let (h, f) = (hits, failures.min(hits));
    if (f as f64) <= h as f64 * p {
        return 0.0;
    }
    let ln_term = ln_factorial(h) - ln_factorial(f) - ln_factorial(h - f)
        + f as f64 * p.ln()
        + (h - f) as f64 * (-p).ln_1p();
    // The sum of the tail's terms relative to the first.
    let ratio = p / (1.0 - p);
    let (mut sum, mut term, mut k) = (1.0f64, 1.0f64, f);
    while k < h && k - f < 10_000 {
        term *= (h - k) as f64 / (k + 1) as f64 * ratio;
        sum += term;
        if term < sum * 1e-17 {
            break;
        }
        k += 1;
    }
    let score = -(ln_term + sum.ln()) / std::f64::consts::LN_10;
    (score.max(0.0) * 100.0).round() / 100.0
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

/// The order of failing bins: highest surprise first, then more failures, then bin id.
pub fn rank_failing_bins(x: &BinFailures, y: &BinFailures) -> std::cmp::Ordering {
    y.surprise
        .total_cmp(&x.surprise)
        .then(y.failures.cmp(&x.failures))
        .then(x.bin.cmp(&y.bin))
}

/// Classifies every class and totals coverage.
/// `(vectors, failing)` are the run's rows and its failing rows, which rank failing bins
/// (see [`surprise`]).
pub fn summarise(
    catalogue: &Catalogue,
    counts: &CoverageCounts,
    at_least: u64,
    (vectors, failing_rows): (u64, u64),
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
                surprise: surprise(
                    counts.bin_hits[b],
                    counts.bin_failures[b],
                    vectors,
                    failing_rows,
                ),
            })
            .collect();
        // Worst ratio first (bins where every hit failed), then by surprise; the text
        // report's strongest pointers re-rank this list by surprise alone.
        failing.sort_by(|x, y| {
            let rx = x.failures as f64 / x.hits.max(1) as f64;
            let ry = y.failures as f64 / y.hits.max(1) as f64;
            ry.total_cmp(&rx).then_with(|| rank_failing_bins(x, y))
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
    fn lane_counter_counts_exactly() {
        for width in [1u32, 7, 8, 33, 64, 65, 200, 512] {
            let limbs = width.div_ceil(64) as usize;
            let mut c = DenseCounter::new(0, 1, width);
            let mut expect = vec![0u64; width as usize];
            let mut x: u64 = 0x9e3779b97f4a7c15;
            // Enough additions to fold the lanes many times, with dense masks in some rounds
            // so some bins pass 255 hits between folds of others.
            for round in 0..3000 {
                let mut limbs_v = vec![0u64; limbs];
                for (l, v) in limbs_v.iter_mut().enumerate() {
                    x ^= x << 13;
                    x ^= x >> 7;
                    x ^= x << 17;
                    *v = if round % 3 == 0 { u64::MAX } else { x };
                    let top = width - 64 * l as u32;
                    if top < 64 {
                        *v &= (1u64 << top) - 1;
                    }
                }
                for (i, e) in expect.iter_mut().enumerate() {
                    *e += (limbs_v[i / 64] >> (i % 64)) & 1;
                }
                c.add(&limbs_v);
            }
            for i in 0..width {
                assert_eq!(c.count(i), expect[i as usize], "width {width} bit {i}");
            }
        }
    }
}
