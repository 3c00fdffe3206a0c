use super::*;
use crate::spec::{CarryInConvention, CarryOutConvention};

/// A dense hit as (base, stride, slot, mask limbs).
type DenseSnapshot = (u32, u32, u16, Vec<u64>);

/// Everything a classification produced, in a comparable form.
fn snapshot(hits: &Hits) -> (Vec<u32>, Vec<DenseSnapshot>, Vec<u16>) {
    let dense = (0..hits.dense.len())
        .map(|i| {
            let d = hits.dense[i];
            (d.base, d.stride, d.slot, hits.mask(i).to_vec())
        })
        .collect();
    (hits.bins.clone(), dense, hits.classes.clone())
}

/// The compiled fast path gives exactly the generic predicates' hits, in the same order,
/// for every operation, encoding and convention at widths up to 64.
#[test]
fn narrow_path_matches_generic_predicates() {
    let mut x: u64 = 0x2545f4914f6cdd1d;
    let mut next = || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        x
    };
    for op in Operation::ALL {
        for enc in Encoding::ALL {
            for w in [1u32, 2, 3, 4, 7, 8, 31, 32, 33, 63, 64] {
                for conv in 0..2 {
                    let mut spec = Spec::with_defaults(op, enc, w);
                    if conv == 1 {
                        spec.conventions.carry_in = CarryInConvention::Carry;
                        spec.conventions.carry_out = CarryOutConvention::Carry;
                    }
                    let cat = Catalogue::candidates(&spec);
                    let mask = u64::MAX >> (64 - w);
                    let specials: Vec<u64> = [0, 1, mask, mask >> 1, !(mask >> 1) & mask]
                        .into_iter()
                        .collect();
                    let (mut narrow, mut generic) = (Hits::new(), Hits::new());
                    for i in 0..600 {
                        let pick = |r: u64, i: u64| {
                            if i.is_multiple_of(3) {
                                specials[(r % specials.len() as u64) as usize]
                            } else {
                                r & mask
                            }
                        };
                        let (ra, rb, rf) = (next(), next(), next());
                        let inputs = Inputs {
                            a: Word::from_u64(pick(ra, i)),
                            b: Word::from_u64(pick(rb, i / 2)),
                            carry_in: rf & 1 == 1,
                            mode: rf & 2 == 2,
                            select: 0,
                        };
                        let t = cat.model.trace::<u128>(&inputs);
                        cat.classify_narrow(&inputs, &t, &mut narrow, Detail::Bins);
                        cat.classify::<u128>(&inputs, &t, &mut generic, Detail::Bins);
                        assert_eq!(
                            snapshot(&narrow),
                            snapshot(&generic),
                            "{op:?} {enc:?} width {w} conventions {conv} {inputs:?}"
                        );
                        // Classes only: the same classes (bins are not all recorded).
                        let (mut cheap, mut full) = (Hits::new(), Hits::new());
                        cat.classify_narrow(&inputs, &t, &mut cheap, Detail::ClassesOnly);
                        cat.classify::<u128>(&inputs, &t, &mut full, Detail::ClassesOnly);
                        assert_eq!(cheap.classes, full.classes, "{op:?} {enc:?} {w}");
                        assert_eq!(cheap.classes, generic.classes, "{op:?} {enc:?} {w}");
                        // Coverage recording: the same bins as a set, the same classes.
                        let mut any_order = Hits::new();
                        cat.evaluate_for_coverage(&inputs, &mut any_order);
                        let (mut x, mut y) = (Vec::new(), Vec::new());
                        any_order.for_each_bin(|b| x.push(b));
                        generic.for_each_bin(|b| y.push(b));
                        x.sort_unstable();
                        y.sort_unstable();
                        assert_eq!(x, y, "coverage bins {op:?} {enc:?} {w} {inputs:?}");
                        assert_eq!(any_order.classes, generic.classes);
                        let (_, mask) = cat.evaluate_class_mask(&inputs, &mut cheap);
                        let want = generic.classes.iter().fold(0u128, |m, &c| m | 1 << c);
                        assert_eq!(mask, Some(want), "class mask {op:?} {enc:?} {w}");
                    }
                }
            }
        }
    }
}
