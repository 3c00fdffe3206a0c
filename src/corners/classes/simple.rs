//! Corner classes of abs, min, max and the logic operations (and, or, xor, not, pass): their
//! templates and predicates. The constructors are in `corners::construct_simple`.
//!
//! These units get the result classes of the shifters (result patterns, every result bit at
//! 0 and 1, a zero value from non-zero operands) and one class each: for a two-input logic
//! unit every (a[i], b[i]) pair at every bit (each gate's truth table); for min and max the
//! order cases (less, greater, the same pattern, min against max both ways, +0 against -0);
//! for abs the operand cases (positive, negative, zero, min, max, -1, -0), where abs of min
//! is the overflow of twos and offset.

use super::*;
use crate::arith::encoding::is_negative_zero;

/// The codes (min, max, +0, -0 where the encoding has it) min and max compare.
fn order_codes(model: &Model) -> Vec<Word> {
    let mut codes = Vec::new();
    for s in [
        Special::Min,
        Special::Max,
        Special::Zero,
        Special::NegativeZero,
    ] {
        if let Some(c) = s.code(model) {
            codes.push(c);
        }
    }
    codes
}

/// Labels of the `minmax.order` bins for `codes` (see [`order_codes`]).
pub(crate) fn order_labels(codes: &[Word]) -> Vec<String> {
    let mut l: Vec<String> = [
        "a_lt_b",
        "a_gt_b",
        "same_pattern",
        "min_vs_max",
        "max_vs_min",
    ]
    .into_iter()
    .map(String::from)
    .collect();
    if codes.len() > 3 {
        l.extend(["zero_vs_neg_zero".into(), "neg_zero_vs_zero".into()]);
    }
    l
}

/// The special operands of `abs.cases` after its three value bins, with their ids.
fn abs_codes(model: &Model) -> Vec<(Word, &'static str)> {
    let mut codes: Vec<(Word, &'static str)> = Vec::new();
    for s in [
        Special::Min,
        Special::Max,
        Special::MinusOne,
        Special::NegativeZero,
    ] {
        if let Some(c) = s.code(model) {
            if !codes.iter().any(|(x, _)| *x == c) {
                codes.push((c, s.id()));
            }
        }
    }
    codes
}

/// Adds the classes of abs, min, max or a logic operation after the result classes.
pub(super) fn simple_templates(model: &Model, spec: &Spec, out: &mut Vec<Template>) {
    let w = spec.width;
    match spec.operation {
        Operation::And | Operation::Or | Operation::Xor => out.push((
            "logic.bit_pairs".into(),
            "every pair (a[i], b[i]) at every bit: each gate's whole truth table".into(),
            Kind::Ext(ExtKind::BitPairs),
            (0..w)
                .flat_map(|i| ["00", "01", "10", "11"].map(|p| format!("bit{i}={p}")))
                .collect(),
        )),
        Operation::Min | Operation::Max => {
            let codes = order_codes(model);
            out.push((
                "minmax.order".into(),
                "a below, above and equal to b; min against max both ways; +0 against -0".into(),
                Kind::Ext(ExtKind::ValueOrder(codes.clone())),
                order_labels(&codes),
            ));
        }
        Operation::Abs => {
            let codes = abs_codes(model);
            let mut labels: Vec<String> = vec!["positive".into(), "negative".into(), "zero".into()];
            labels.extend(codes.iter().map(|(_, id)| format!("a_{id}")));
            out.push((
                "abs.cases".into(),
                "a positive, negative and +0; a min (its abs overflows in twos and offset), \
                 max, -1 and -0"
                    .into(),
                Kind::Ext(ExtKind::AbsCases(codes.into_iter().map(|c| c.0).collect())),
                labels,
            ));
        }
        _ => {}
    }
}

/// The bins of a kind of this file that (a, b, trace) hits, pushed with `bin`.
pub(super) fn simple_bins<B: Bits>(
    model: &Model,
    kind: &ExtKind,
    a: B,
    b: B,
    t: &Trace<B>,
    mut bin: impl FnMut(u32),
) {
    let w = model.width();
    match kind {
        ExtKind::BitPairs => {
            for i in 0..w {
                bin(4 * i + 2 * a.bit(i) as u32 + b.bit(i) as u32);
            }
        }
        ExtKind::ValueOrder(codes) => {
            let (va, vb) = (t.va, t.vb);
            let (aw, bw) = (a.to_word(), b.to_word());
            if va.slt(&vb) {
                bin(0);
            }
            if vb.slt(&va) {
                bin(1);
            }
            if a == b {
                bin(2);
            }
            if aw == codes[0] && bw == codes[1] {
                bin(3);
            }
            if aw == codes[1] && bw == codes[0] {
                bin(4);
            }
            if codes.len() > 3 {
                if aw == codes[2] && bw == codes[3] {
                    bin(5);
                }
                if aw == codes[3] && bw == codes[2] {
                    bin(6);
                }
            }
        }
        ExtKind::AbsCases(codes) => {
            let aw = a.to_word();
            if B::zero().slt(&t.va) {
                bin(0);
            }
            if t.va.is_negative() {
                bin(1);
            }
            if t.va.is_zero() && !is_negative_zero(a, w, model.encoding()) {
                bin(2);
            }
            for (k, c) in codes.iter().enumerate() {
                if aw == *c {
                    bin(3 + k as u32);
                }
            }
        }
        _ => {}
    }
}
