//! Test support for the constructor modules (`construct*.rs`): the exhaustive check that the
//! catalogue's reachability matches what enumerating every operand pair hits, and that the
//! directed set hits every reachable bin.

use crate::arith::model::Inputs;
use crate::arith::word::Word;
use crate::corners::classes::Hits;
use crate::corners::generate::Generator;
use crate::spec::Spec;

/// For every width in `widths` and every spec `variants` gives at that width: evaluates
/// every `a` below 2^w and every `b` below `b_count(spec, w)`, and checks that a bin is hit
/// exactly when the catalogue calls it reachable (collected, and reported together under
/// `label(spec, w)`) and that the directed set hits every reachable bin (asserted at once).
pub(crate) fn assert_reachability_matches_enumeration(
    widths: std::ops::RangeInclusive<u32>,
    variants: fn(u32) -> Vec<Spec>,
    b_count: fn(&Spec, u32) -> u64,
    label: fn(&Spec, u32) -> String,
) {
    let mut failures = Vec::new();
    for w in widths {
        for spec in variants(w) {
            let g = Generator::new(&spec, Some(0), None);
            let cat = g.catalogue();
            let mut seen = vec![false; cat.bin_count()];
            let mut hits = Hits::new();
            for a in 0..1u64 << w {
                for b in 0..b_count(&spec, w) {
                    let v = Inputs {
                        a: Word::from_u64(a),
                        b: Word::from_u64(b),
                        ..Inputs::default()
                    };
                    cat.evaluate(&v, &mut hits);
                    hits.for_each_bin(|b| seen[b] = true);
                }
            }
            for (bin, &was_seen) in seen.iter().enumerate() {
                if was_seen != cat.is_reachable(bin) {
                    failures.push(format!(
                        "{}: bin {} hit by enumeration = {was_seen}, reachable = {}",
                        label(&spec, w),
                        cat.bin_id(bin),
                        cat.is_reachable(bin)
                    ));
                }
                if cat.is_reachable(bin) {
                    assert!(g.directed_hits(bin) > 0, "{}", cat.bin_id(bin));
                }
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} mismatches:\n{}",
        failures.len(),
        failures[..failures.len().min(40)].join("\n")
    );
}
