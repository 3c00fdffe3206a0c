//! Which vectors a report covers, exactly: the seen indices as compact ranges, the vector set
//! they index, and the runs a report is made of. `merge` uses them to decide completeness,
//! duplicates and coverage over the union of runs instead of adding up per-run counts.
//!
//! Pure data and interval arithmetic; no I/O.

use serde::{Deserialize, Serialize};

/// The vector set a report's indices refer to: index i means vector i of this set.
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
pub struct SetIdentity {
    /// The random seed.
    pub seed: u64,
    /// Directed vectors (indices 0..directed).
    pub directed: u64,
    /// Random vectors after them.
    pub random: u64,
    /// The indices of the whole set are 0..total (for a selected set: its positions).
    pub total: u64,
    /// For a selected (compacted) set: SHA-256 of its source indices, so two different
    /// selections of one source set are not taken for the same set.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub selection_sha256: Option<String>,
    /// For a set with imported vectors: SHA-256 of its `stimulus.hex`, so two sets with
    /// different imported vectors are not taken for the same set.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub imported_sha256: Option<String>,
}

/// The indices a report's rows had, for one vector set.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SeenIndices {
    /// The vector set; None when the log was checked without `--vectors` (its indices are then
    /// the log's own labels, and no completeness can be judged).
    pub set: Option<SetIdentity>,
    /// How many indices were seen; each was judged once, so the counts of a report's entries
    /// add up to its `vectors`.
    pub count: u64,
    /// The seen indices as inclusive `[first, last]` ranges, ascending, disjoint and not
    /// adjacent (so the list is exact and as short as it can be).
    pub ranges: Vec<[u64; 2]>,
}

/// One check run that went into a report.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct RunRecord {
    /// SHA-256 of the check report the run produced (without its `runs`): the same log checked
    /// the same way has the same id, which is how `merge` recognises a run given twice.
    pub id: String,
    /// The run's logs.
    pub logs: Vec<String>,
    /// Its rows checked, passed, failed and unknown.
    pub vectors: u64,
    /// Rows whose outputs all matched.
    pub passed: u64,
    /// Rows with a wrong known bit.
    pub failed: u64,
    /// Rows with unknown outputs and no wrong known bit.
    pub unknown: u64,
}

/// Appends the inclusive range `[first, last]` to ascending `ranges`, joining it to the last
/// range when they touch or overlap.
pub(crate) fn push_range(ranges: &mut Vec<[u64; 2]>, first: u64, last: u64) {
    if let Some(prev) = ranges.last_mut() {
        if first <= prev[1].saturating_add(1) {
            prev[1] = prev[1].max(last);
            return;
        }
    }
    ranges.push([first, last]);
}

/// The runs of set bits of a bitmap (bit i of word w is index 64·w + i) as inclusive ranges.
pub(crate) fn bitmap_ranges(words: &[u64], ranges: &mut Vec<[u64; 2]>) {
    for (w, &word) in words.iter().enumerate() {
        let base = w as u64 * 64;
        let mut rest = word;
        while rest != 0 {
            let start = rest.trailing_zeros();
            let len = (!(rest >> start)).trailing_zeros().min(64 - start);
            push_range(ranges, base + start as u64, base + (start + len - 1) as u64);
            let mask = if len == 64 {
                u64::MAX
            } else {
                ((1u64 << len) - 1) << start
            };
            rest &= !mask;
        }
    }
}

/// The ranges of `ranges` (ascending, disjoint) inside `[first, first + count)`.
pub(crate) fn clip(ranges: &[[u64; 2]], first: u64, count: u64) -> Vec<[u64; 2]> {
    let Some(end) = first.checked_add(count) else {
        return ranges.to_vec();
    };
    if count == 0 {
        return Vec::new();
    }
    ranges
        .iter()
        .filter(|r| r[1] >= first && r[0] < end)
        .map(|r| [r[0].max(first), r[1].min(end - 1)])
        .collect()
}

/// Indices in `ranges`; None if that does not fit in a u64.
pub(crate) fn count(ranges: &[[u64; 2]]) -> Option<u64> {
    ranges
        .iter()
        .try_fold(0u64, |n, r| n.checked_add(r[1] - r[0])?.checked_add(1))
}

/// Why a list of ranges is not a valid `ranges` field, if it is not.
pub(crate) fn malformed(ranges: &[[u64; 2]]) -> Option<String> {
    for (k, r) in ranges.iter().enumerate() {
        if r[0] > r[1] {
            return Some(format!("range {k} [{}, {}] runs backwards", r[0], r[1]));
        }
        if k > 0 && ranges[k - 1][1].saturating_add(1) >= r[0] {
            return Some(format!(
                "range {k} [{}, {}] is not after the one before it, or touches it",
                r[0], r[1]
            ));
        }
    }
    None
}

/// The union of several ascending, disjoint range lists, and the ranges where they overlap.
pub(crate) struct Union {
    /// The union, ascending, disjoint and not adjacent.
    pub ranges: Vec<[u64; 2]>,
    /// Indices in more than one list, counted once per extra list holding them.
    pub overlap_count: u64,
    /// Ranges of indices held by more than one list, ascending (at most `keep`).
    pub overlaps: Vec<[u64; 2]>,
}

/// Unites `lists`, keeping at most `keep` overlap ranges. Overlap counts saturate (they are
/// bounded by the sum of the lists' counts, which the caller has already checked).
pub(crate) fn unite(lists: &[&[[u64; 2]]], keep: usize) -> Union {
    let mut all: Vec<[u64; 2]> = lists.iter().flat_map(|l| l.iter().copied()).collect();
    all.sort_unstable();
    let mut ranges: Vec<[u64; 2]> = Vec::new();
    let mut overlaps: Vec<[u64; 2]> = Vec::new();
    let mut overlap_count = 0u64;
    for [first, last] in all {
        if let Some(prev) = ranges.last_mut() {
            if first <= prev[1] {
                // [first, min(last, prev.last)] is already in the union.
                let o_last = last.min(prev[1]);
                overlap_count = overlap_count.saturating_add(o_last - first + 1);
                if overlaps.len() < keep
                    || overlaps
                        .last()
                        .is_some_and(|o| first <= o[1].saturating_add(1))
                {
                    push_range(&mut overlaps, first, o_last);
                    overlaps.truncate(keep);
                }
                prev[1] = prev[1].max(last);
                continue;
            }
        }
        push_range(&mut ranges, first, last);
    }
    Union {
        ranges,
        overlap_count,
        overlaps,
    }
}

/// The first `keep` indices of `0..total` that `ranges` (ascending, disjoint) lacks, and how
/// many it lacks in all.
pub(crate) fn gaps(ranges: &[[u64; 2]], total: u64, keep: usize) -> (u64, Vec<u64>) {
    let mut first = Vec::new();
    let mut missing = 0u64;
    let mut next = 0u64;
    let mut gap = |from: u64, to: u64, first: &mut Vec<u64>| {
        // [from, to) is missing.
        missing += to - from;
        let mut i = from;
        while i < to && first.len() < keep {
            first.push(i);
            i += 1;
        }
    };
    for r in ranges {
        if r[0] >= total {
            break;
        }
        if r[0] > next {
            gap(next, r[0], &mut first);
        }
        next = r[1].saturating_add(1).min(total);
    }
    if next < total {
        gap(next, total, &mut first);
    }
    (missing, first)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bitmap_runs_become_joined_ranges() {
        let mut r = Vec::new();
        // Bits 0..=63 of word 0, bits 0..=2 and 5 of word 1, bit 63 of word 2, word 3 full.
        bitmap_ranges(&[u64::MAX, 0b100111, 1 << 63, u64::MAX], &mut r);
        assert_eq!(r, vec![[0, 66], [69, 69], [191, 255]]);
        assert_eq!(count(&r), Some(67 + 1 + 65));
        assert_eq!(malformed(&r), None);
    }

    #[test]
    fn union_counts_overlaps_and_gaps() {
        let a = [[0, 9], [20, 29]];
        let b = [[5, 14], [30, 30]];
        let u = unite(&[&a, &b], 20);
        assert_eq!(u.ranges, vec![[0, 14], [20, 30]]);
        assert_eq!(u.overlap_count, 5);
        assert_eq!(u.overlaps, vec![[5, 9]]);
        let (missing, first) = gaps(&u.ranges, 40, 3);
        assert_eq!(missing, 5 + 9);
        assert_eq!(first, vec![15, 16, 17]);
        let same = unite(&[&a, &a], 20);
        assert_eq!(same.overlap_count, 20);
        assert_eq!(same.overlaps, vec![[0, 9], [20, 29]]);
    }

    #[test]
    fn clipping_and_malformed_lists() {
        assert_eq!(clip(&[[0, 9], [15, 30]], 5, 20), vec![[5, 9], [15, 24]]);
        assert!(malformed(&[[3, 2]]).is_some());
        assert!(malformed(&[[0, 4], [5, 9]]).is_some(), "adjacent ranges");
        assert!(malformed(&[[0, 4], [3, 9]]).is_some(), "overlapping ranges");
        assert_eq!(count(&[[0, u64::MAX]]), None);
    }
}
