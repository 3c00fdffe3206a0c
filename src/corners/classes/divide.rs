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

/// The position of the lowest set bit of a pattern with exactly one set bit below `w`.
trait LowestBit {
    fn trailing_zeros_in(&self, w: u32) -> u32;
}

impl<B: Bits> LowestBit for B {
    fn trailing_zeros_in(&self, w: u32) -> u32 {
        (0..w).find(|&i| self.bit(i)).unwrap_or(w)
    }
}
