//! Corner classes of div, rem and divrem: their templates and predicates. The matching
//! constructors are in `corners::construct_divide`.
//!
//! Every division unit gets the same classes, whichever of quotient and remainder it shows:
//! the named cases (divisor 0, dividend 0, min / -1, |a| < |b|, a = b, a = -b, remainder zero
//! and |remainder| = |b| - 1), every quotient pattern with one bit set, the operand sign
//! combinations with a non-zero remainder (where truncate and floor differ), and the step of a
//! restoring divider at each quotient bit: the trial subtraction kept, kept with a zero partial
//! remainder, or undone. A divider that computes the quotient another way (non-restoring,
//! SRT) still sees these operands; the bins name the restoring steps because they are
//! defined without a choice of algorithm.

use super::*;
use crate::arith::ops::OpUnit;

/// Labels of the `div.cases` bins for `unit`, in bin order.
pub(crate) fn case_labels(unit: &OpUnit) -> Vec<&'static str> {
    let mut l = vec![
        "divisor_zero",
        "dividend_zero",
        "a_lt_b",
        "a_eq_b",
        "rem_zero",
        "rem_max",
    ];
    if unit.encoding == Encoding::Twos {
        l.extend(["min_by_minus_one", "a_eq_minus_b"]);
    }
    l
}

/// Adds the division classes after the operand classes.
pub(super) fn div_templates(unit: &OpUnit, out: &mut Vec<Template>) {
    let w = unit.width;
    out.push((
        "div.cases".into(),
        "divisor 0, dividend 0, |a| < |b|, a = b, remainder 0 with |b| > 1, |remainder| = \
         |b| - 1; in twos also min / -1 and a = -b"
            .into(),
        Kind::Ext(ExtKind::DivCases),
        case_labels(unit).into_iter().map(String::from).collect(),
    ));
    out.push((
        "div.quotient_bit".into(),
        "the quotient (of a non-zero divisor) has exactly one 1 bit, at each position".into(),
        Kind::Ext(ExtKind::DivQuotientBit),
        (0..w).map(|i| format!("bit{i}")).collect(),
    ));
    if unit.encoding == Encoding::Twos {
        out.push((
            "div.signs".into(),
            "the signs of a and b in each combination, with a non-zero remainder (where \
             truncate and floor rounding differ)"
                .into(),
            Kind::Ext(ExtKind::DivSigns),
            vec![
                "a_pos.b_pos".into(),
                "a_pos.b_neg".into(),
                "a_neg.b_pos".into(),
                "a_neg.b_neg".into(),
            ],
        ));
    }
    out.push((
        "div.restoring_step".into(),
        "restoring division of |a| by |b|, at the step of each quotient bit: the trial \
         subtraction kept, kept leaving a zero partial remainder, or undone"
            .into(),
        Kind::Ext(ExtKind::DivStep),
        (0..w)
            .flat_map(|i| {
                [
                    format!("bit{i}=subtract"),
                    format!("bit{i}=restore"),
                    format!("bit{i}=exact"),
                ]
            })
            .collect(),
    ));
}

/// |v| of a value at full capacity.
fn magnitude<B: Bits>(v: B) -> B {
    if v.is_negative() {
        v.neg()
    } else {
        v
    }
}

/// The bins of a division kind that (a, trace) hits, pushed with `bin`.
pub(super) fn div_bins<B: Bits>(
    unit: &OpUnit,
    kind: &ExtKind,
    a: B,
    t: &Trace<B>,
    mut bin: impl FnMut(u32),
) {
    let w = unit.width;
    let (va, vb) = (t.va, t.vb);
    let by_zero = t.outputs_flags.div_by_zero;
    let (ma, mb) = (magnitude(va), magnitude(vb));
    match kind {
        ExtKind::DivCases => {
            if by_zero {
                bin(0);
                return;
            }
            let r = decode(t.remainder, w, unit.encoding);
            let mr = magnitude(r);
            let big_b = B::one().slt(&mb);
            if va.is_zero() {
                bin(1);
            }
            if !va.is_zero() && ma.slt(&mb) {
                bin(2);
            }
            if !va.is_zero() && va == vb {
                bin(3);
            }
            if r.is_zero() && !t.truth.is_zero() && big_b {
                bin(4);
            }
            if big_b && mr == mb.sub(B::one()) {
                bin(5);
            }
            if unit.encoding == Encoding::Twos {
                if a == B::single_bit(w - 1) && vb == B::one().neg() {
                    bin(6);
                }
                if !va.is_zero() && va == vb.neg() {
                    bin(7);
                }
            }
        }
        ExtKind::DivQuotientBit if !by_zero && t.result.count_ones() == 1 => {
            bin(t.result.trailing_zeros_in(w));
        }
        ExtKind::DivSigns if !by_zero && !t.remainder.is_zero() => {
            bin(2 * va.is_negative() as u32 + vb.is_negative() as u32);
        }
        ExtKind::DivStep => {
            if by_zero {
                return;
            }
            if B::CAPACITY <= 128 {
                // Native division and multiplication: with q = |a| / |b| and rf = |a| % |b|,
                // the trial subtraction at step i is kept exactly when q has bit i, and the
                // partial remainder after it is floor((|b| * (q mod 2^i) + rf) / 2^i)
                // (|a| = |b| * q + rf, split q at bit i), so the step is exact when that is
                // zero. The same bins as the step-by-step loop below, which the wide types
                // keep (their multiplication costs more than the loop).
                let (q, rf) = ma.udivrem(mb);
                for i in (0..w).rev() {
                    if q.bit(i) {
                        bin(3 * i);
                        if mb.mul(q.mask(i)).add(rf).shr(i).is_zero() {
                            bin(3 * i + 2);
                        }
                    } else {
                        bin(3 * i + 1);
                    }
                }
                return;
            }
            let mut r = B::zero();
            for i in (0..w).rev() {
                r = r.shl(1).or(B::from_bool(ma.bit(i)));
                if r.slt(&mb) {
                    bin(3 * i + 1);
                } else {
                    bin(3 * i);
                    if r == mb {
                        bin(3 * i + 2);
                    }
                    r = r.sub(mb);
                }
            }
        }
        _ => {}
    }
}

/// Whether a division kind hits any bin, when that is cheaper to tell than its bins: the
/// restoring step hits a bin at every quotient bit of every division by a non-zero divisor.
pub(super) fn div_hit<B: Bits>(kind: &ExtKind, t: &Trace<B>) -> Option<bool> {
    match kind {
        ExtKind::DivStep => Some(!t.outputs_flags.div_by_zero),
        _ => None,
    }
}

/// The position of the lowest set bit of a pattern with exactly one set bit below `w`.
trait LowestBit {
    fn trailing_zeros_in(&self, w: u32) -> u32;
}

impl<B: Bits> LowestBit for B {
    fn trailing_zeros_in(&self, w: u32) -> u32 {
        (0..w).find(|&i| self.bit(i)).unwrap_or(w)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The restoring-step bins of the native path (quotient bits and the closed form of the
    /// partial remainder) are those of the step-by-step loop the wide type runs: every
    /// operand pair at widths 1..=6, random and special pairs up to 64 bits, in unsigned and
    /// twos, truncate and floor.
    #[test]
    fn native_restoring_steps_match_the_loop() {
        let mut x: u64 = 0x9e37_79b9_7f4a_7c15;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        for enc in [Encoding::Unsigned, Encoding::Twos] {
            for floor in [false, true] {
                if floor && enc == Encoding::Unsigned {
                    continue;
                }
                for w in [1u32, 2, 3, 4, 5, 6, 7, 8, 13, 31, 32, 33, 63, 64] {
                    let mut spec = Spec::with_defaults(Operation::DivRem, enc, w);
                    if floor {
                        if let Some(o) = spec.options.as_mut() {
                            o.rounding = Some(crate::spec::Rounding::Floor);
                        }
                    }
                    let cat = Catalogue::candidates(&spec);
                    let model = &cat.model;
                    let unit = model.unit().expect("a division unit");
                    let mask = u64::MAX >> (64 - w);
                    let pairs: Vec<(u64, u64)> = if w <= 6 {
                        (0..=mask)
                            .flat_map(|a| (0..=mask).map(move |b| (a, b)))
                            .collect()
                    } else {
                        let specials = [0, 1, 2, 3, mask, mask >> 1, !(mask >> 1) & mask];
                        let mut v: Vec<(u64, u64)> = specials
                            .iter()
                            .flat_map(|&a| specials.iter().map(move |&b| (a, b)))
                            .collect();
                        for _ in 0..3000 {
                            let (a, b, s) = (next() & mask, next() & mask, next());
                            // Small divisors give long quotients with exact steps.
                            v.push((a, if s & 1 == 1 { b >> (s % w as u64) } else { b }));
                            // Dividends that are multiples of the divisor end exactly.
                            let q = next() & (mask >> (s % w as u64));
                            v.push((b.wrapping_mul(q) & mask, b));
                        }
                        v
                    };
                    for (a, b) in pairs {
                        let inputs = Inputs {
                            a: Word::from_u64(a),
                            b: Word::from_u64(b),
                            carry_in: false,
                            mode: false,
                            select: 0,
                        };
                        let narrow_trace = model.trace::<u128>(&inputs);
                        let wide_trace = model.trace::<Wide>(&inputs);
                        let mut native = Vec::new();
                        div_bins(unit, &ExtKind::DivStep, a as u128, &narrow_trace, |k| {
                            native.push(k)
                        });
                        let mut looped = Vec::new();
                        let wa = Wide::from_word(&inputs.a);
                        div_bins(unit, &ExtKind::DivStep, wa, &wide_trace, |k| looped.push(k));
                        native.sort_unstable();
                        looped.sort_unstable();
                        assert_eq!(
                            native, looped,
                            "{enc:?} floor {floor} width {w} {a:#x} / {b:#x}"
                        );
                        assert_eq!(
                            div_hit(&ExtKind::DivStep, &narrow_trace),
                            Some(!native.is_empty())
                        );
                    }
                }
            }
        }
    }
}
