//! Directed-vector constructors of add_sat and sub_sat (see `classes::sat`). A
//! `sat.boundary` bin names a true result T (max, max + 1, max + 2 or the largest reachable,
//! and the same at min); the constructor solves a +- b = T with b taken from max, min, 0, 1
//! and -1 and a = T -+ b, keeping the pairs where both are representable. `sat.signs` and
//! every other class take the special-pattern grid and the constructions of
//! `construct_simple` (a result pattern X is made as X + 0). The generator keeps the first
//! candidate the classifier confirms. No search, no randomness.

use crate::arith::bits::{Bits, Wide};
use crate::arith::encoding::{decode, encode, max_value, min_value, negative_zero, representable};
use crate::arith::model::Inputs;
use crate::corners::classes::{sat_extremes, Catalogue, ExtKind, Kind};
use crate::spec::{Operation, Spec};

/// Candidates for bin `k` of class `class`.
pub(crate) fn candidates(cat: &Catalogue, spec: &Spec, class: usize, k: u32) -> Vec<Inputs> {
    let c = &cat.classes()[class];
    let (w, enc) = (spec.width, spec.encoding);
    let subtract = spec.operation == Operation::SubSat;
    let (lo, hi) = (min_value::<Wide>(w, enc), max_value::<Wide>(w, enc));
    let one = Wide::one();
    let zero_code = encode(Wide::zero(), w, enc);
    // Operand pairs (patterns) whose true result is `t`, b from a few fixed values.
    let solve = |t: Wide, out: &mut Vec<Inputs>| {
        for vb in [Wide::zero(), one, one.neg(), hi, lo] {
            let va = if subtract { t.add(vb) } else { t.sub(vb) };
            if representable(va, w, enc) && representable(vb, w, enc) {
                out.push(pair(encode(va, w, enc), encode(vb, w, enc)));
            }
        }
    };
    // Operands whose result is the pattern `x`: x with +0 (for -0 itself too: -0 +- +0 is
    // -0 in both encodings that have one), then sums of the same value.
    let result_is = |x: Wide, out: &mut Vec<Inputs>| {
        out.push(pair(x, zero_code));
        solve(decode(x, w, enc), out);
    };
    // Every pairing of the special patterns: the fallback of the other classes.
    let grid = || {
        let top = Wide::single_bit(w - 1);
        let mut codes = vec![
            Wide::zero(),
            one.mask(w),
            top,
            Wide::low_mask(w),
            one.not().mask(w),
            top.not().mask(w),
            encode(hi, w, enc),
            encode(lo, w, enc),
            zero_code,
        ];
        codes.extend(negative_zero::<Wide>(w, enc));
        codes.extend(representable(one.neg(), w, enc).then(|| encode(one.neg(), w, enc)));
        let mut out = Vec::new();
        for &x in &codes {
            for &y in &codes {
                out.push(pair(x, y));
            }
        }
        out
    };
    let mut out = Vec::new();
    match &c.kind {
        Kind::Ext(ExtKind::SatBoundary) => {
            let (top, bottom) = sat_extremes::<Wide>(w, enc, subtract);
            let two = one.add(one);
            let targets: Vec<Wide> = match k {
                0 => vec![hi],
                1 => vec![hi.add(one)],
                2 => vec![hi.add(two), top],
                3 => vec![top],
                4 => vec![lo],
                5 => vec![lo.sub(one)],
                6 => vec![lo.sub(two), bottom],
                _ => vec![bottom],
            };
            for t in targets {
                solve(t, &mut out);
            }
        }
        Kind::ResultPattern(_, code) => result_is(Wide::from_word(code), &mut out),
        Kind::ResultWalkingOne => result_is(Wide::single_bit(k), &mut out),
        Kind::ResultBits => {
            let bit = Wide::single_bit(k / 2);
            let xs = if k % 2 == 1 {
                [Wide::low_mask(w), bit]
            } else {
                [Wide::zero(), bit.not().mask(w)]
            };
            for x in xs {
                result_is(x, &mut out);
            }
            out.extend(grid());
        }
        Kind::ResultZeroFromNonzero | Kind::Ext(ExtKind::SatSigns) => {
            solve(Wide::zero(), &mut out);
            out.extend(grid());
        }
        // The operand classes depend on the operands only.
        _ => return crate::corners::construct_simple::candidates(cat, spec, class, k),
    }
    out
}

fn pair(a: Wide, b: Wide) -> Inputs {
    Inputs {
        a: a.to_word(),
        b: b.to_word(),
        ..Inputs::default()
    }
}

#[cfg(test)]
mod tests {
    use crate::arith::model::Inputs;
    use crate::arith::word::Word;
    use crate::corners::classes::Hits;
    use crate::corners::generate::Generator;
    use crate::spec::{Encoding, NegativeZero, Operation, Spec, ZeroFlag};

    fn variants(w: u32) -> Vec<Spec> {
        let mut out = Vec::new();
        for op in Operation::SATURATING {
            for enc in Encoding::ALL {
                if op.refuses(enc).is_some() {
                    continue;
                }
                let s = Spec::with_defaults(op, enc, w);
                if enc.has_negative_zero() {
                    let mut bits = s.clone();
                    bits.conventions.zero_flag = ZeroFlag::Bits;
                    out.push(bits);
                    let mut positive = s.clone();
                    positive.conventions.negative_zero = NegativeZero::Positive;
                    out.push(positive);
                }
                out.push(s);
            }
        }
        out
    }

    /// At widths 1..=5, in every encoding, every bin some input hits is reachable and every
    /// reachable bin is hit by the directed set: exhaustive over all operand pairs.
    #[test]
    fn sat_reachability_matches_exhaustive_enumeration() {
        let mut failures = Vec::new();
        for w in 1..=5u32 {
            for spec in variants(w) {
                let g = Generator::new(&spec, Some(0), None);
                let cat = g.catalogue();
                let mut seen = vec![false; cat.bin_count()];
                let mut hits = Hits::new();
                for a in 0..1u64 << w {
                    for b in 0..1u64 << w {
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
                            "{} {:?} {:?} w{w}: bin {} hit by enumeration = {was_seen}, \
                             reachable = {}",
                            spec.name,
                            spec.conventions.zero_flag,
                            spec.conventions.negative_zero,
                            cat.bin_id(bin),
                            cat.is_reachable(bin)
                        ));
                    }
                    if cat.is_reachable(bin) && g.directed_hits(bin) == 0 {
                        failures.push(format!("{} w{w}: {} not hit", spec.name, cat.bin_id(bin)));
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

    /// At wide widths every bin of the boundary and sign classes that the operation can reach
    /// is reachable and hit; the bins no input reaches are the ones named here.
    #[test]
    fn sat_directed_sets_hit_their_own_classes_at_wide_widths() {
        for w in [8, 32, 33, 64, 100, 512] {
            for op in Operation::SATURATING {
                for enc in Encoding::ALL {
                    let spec = Spec::with_defaults(op, enc, w);
                    let g = Generator::new(&spec, Some(0), None);
                    let cat = g.catalogue();
                    let mut own = 0;
                    for bin in 0..cat.bin_count() {
                        let id = cat.bin_id(bin);
                        if !id.starts_with("sat.") {
                            continue;
                        }
                        own += 1;
                        // Unsigned: an add never goes below 0 and a sub never above max;
                        // two top bits set always clamp an add, two clear never do; a sub
                        // with a's top bit clear and b's set always clamps and the reverse
                        // never does. Signed: an add of mixed signs and a sub of equal signs
                        // never clamp (common practice, no source; simple counting).
                        let mixed = id.contains("a0b1") || id.contains("a1b0");
                        let unreachable = match (enc == Encoding::Unsigned, op) {
                            (true, Operation::AddSat) => {
                                id.contains("past_min")
                                    || id.contains("a0b0.clamped")
                                    || id.contains("a1b1.in_range")
                            }
                            (true, _) => {
                                id.contains("past_max")
                                    || id.contains("a0b1.in_range")
                                    || id.contains("a1b0.clamped")
                            }
                            (false, Operation::AddSat) => mixed && id.contains("clamped"),
                            (false, _) => !mixed && id.contains("signs") && id.contains("clamped"),
                        };
                        assert_eq!(cat.is_reachable(bin), !unreachable, "{op} {enc} w{w}: {id}");
                        if !unreachable {
                            assert!(g.directed_hits(bin) > 0, "{op} {enc} w{w}: {id}");
                        }
                    }
                    assert_eq!(own, 16, "{op} {enc} w{w}");
                }
            }
        }
    }
}
