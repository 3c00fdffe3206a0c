//! Corner classes of the shift, rotate and multiply operations: their templates and
//! predicates. The matching constructors are in `corners::construct`.
//!
//! Shifts get the result classes of the adders (the result is N bits) and three of their own:
//! every amount 0..=N and the largest amount value; the bit shifted out last at each source
//! position, at 0 and at 1; and for sra the sign fill of a negative operand at each amount.
//! A multiplier gets every pairing of the special operands, the overflow boundary of its
//! result part, the radix-4 Booth digit seen at each digit position of b, and the operand
//! sign combinations.

use super::*;
use crate::arith::ops::OpUnit;
use crate::spec::{ResultPart, Signedness};

/// A class kind of the extended operations.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum ExtKind {
    /// Bins amount=0..=N, then the largest amount value when it exceeds N.
    ShiftAmount,
    /// Bins bitI=V: the bit shifted out last came from a[I] and was V.
    ShiftOutBit,
    /// sra of a negative operand: bins k=1..=N and past_n.
    SignFill,
    /// Every pair of the special codes: bin i * len + j for (codes[i], codes[j]).
    MulPairs(Vec<Word>),
    /// The product's bit length at and one past the result's (see [`boundary_bin`]).
    MulBoundary,
    /// Radix-4 Booth digit (-2..=+2) at each digit position of b: bin 5 * i + (d + 2).
    BoothDigits,
    /// Sign bits of (a, b): 00, 01, 10, 11.
    MulSigns,
    /// Division: the named cases of [`super::divide::case_labels`].
    DivCases,
    /// Division: the quotient pattern is 2^i, bin i.
    DivQuotientBit,
    /// Division (twos): signs of (a, b) with a non-zero remainder, bin 2 * sa + sb.
    DivSigns,
    /// Division: restoring step at quotient bit i: bin 3i subtract, 3i + 1 restore,
    /// 3i + 2 exact.
    DivStep,
    /// Binary logic: (a[i], b[i]) at each bit, bin 4i + 2a[i] + b[i].
    BitPairs,
    /// min, max: the order cases of [`super::simple::order_labels`], with the special codes
    /// (min, max, +0, -0) they compare.
    ValueOrder(Vec<Word>),
    /// abs: the operand cases of [`super::simple::abs_labels`], with their codes.
    AbsCases(Vec<Word>),
    /// add_sat, sub_sat: the true result at and past max and min (see `classes::sat`).
    SatBoundary,
    /// add_sat, sub_sat: sign bits of (a, b), in range or clamped: bin 2 * (2sa + sb) + clamped.
    SatSigns,
}

/// Labels of the overflow-boundary bins.
fn boundary_labels(unit: &OpUnit) -> Vec<String> {
    let l: &[&str] = match unit.encoding {
        Encoding::Twos => &[
            "positive_top",
            "positive_past",
            "negative_top",
            "negative_past",
            "at_min",
        ],
        _ => &["top_bit", "past_by_one_bit"],
    };
    l.iter().map(|s| s.to_string()).collect()
}

/// Number of radix-4 Booth digits of the multiplier b as the recoder sees it: ceil(N/2) for a
/// signed b; an unsigned b (or a sign-magnitude magnitude) needs one more digit for its top
/// bit (floor(L/2) + 1 for L bits).
pub(crate) fn booth_digits(unit: &OpUnit) -> (u32, bool) {
    let w = unit.width;
    match (unit.encoding, unit.options.signedness) {
        (Encoding::Twos, Some(Signedness::Signed)) => (w.div_ceil(2), true),
        (Encoding::SignMagnitude, _) => ((w - 1) / 2 + 1, false),
        _ => (w / 2 + 1, false),
    }
}

/// The Booth digit at position `i` of the multiplier pattern `x` of `bits` bits, sign-extended
/// when `signed` (triplet x[2i+1], x[2i], x[2i-1], with x[-1] = 0; common practice).
pub(crate) fn booth_digit<B: Bits>(x: B, bits: u32, signed: bool, i: u32) -> i32 {
    let bit = |k: i64| -> bool {
        if k < 0 {
            false
        } else if (k as u32) < bits {
            x.bit(k as u32)
        } else {
            signed && bits > 0 && x.bit(bits - 1)
        }
    };
    let k = 2 * i as i64;
    -2 * bit(k + 1) as i32 + bit(k) as i32 + bit(k - 1) as i32
}

/// The multiplier operand as the recoder sees it: (pattern, bits, signed).
pub(crate) fn booth_operand<B: Bits>(unit: &OpUnit, b: B) -> (B, u32, bool) {
    let w = unit.width;
    match unit.encoding {
        Encoding::SignMagnitude => (b.mask(w - 1), w - 1, false),
        _ => {
            let (_, signed) = booth_digits(unit);
            (b.mask(w), w, signed)
        }
    }
}

/// Bit length of a non-negative value.
fn bit_length<B: Bits>(v: B) -> u32 {
    let mut n = 0;
    for l in (0..B::CAPACITY.div_ceil(64) as usize).rev() {
        let limb = v.limb(l);
        if limb != 0 {
            n = l as u32 * 64 + 64 - limb.leading_zeros();
            break;
        }
    }
    n
}

/// The overflow-boundary bin the exact product `truth` falls in, if any.
pub(crate) fn boundary_bin<B: Bits>(unit: &OpUnit, truth: B) -> Option<u32> {
    let r = unit.result_width();
    match unit.encoding {
        Encoding::Twos => {
            let neg = truth.is_negative();
            let len = if neg {
                bit_length(truth.not()) + 1
            } else {
                bit_length(truth) + 1
            };
            if neg && truth == B::single_bit(r - 1).neg() {
                return Some(4);
            }
            match (neg, len) {
                (false, l) if l == r => Some(0),
                (false, l) if l == r + 1 => Some(1),
                (true, l) if l == r => Some(2),
                (true, l) if l == r + 1 => Some(3),
                _ => None,
            }
        }
        enc => {
            let (mag, r) = if enc == Encoding::SignMagnitude {
                let m = if truth.is_negative() {
                    truth.neg()
                } else {
                    truth
                };
                (m, r - 1)
            } else {
                (truth, r)
            };
            let len = bit_length(mag);
            if len == r {
                Some(0)
            } else if len == r + 1 {
                Some(1)
            } else {
                None
            }
        }
    }
}

/// Adds the classes of an extended operation after the operand classes.
pub(super) fn ext_templates(model: &Model, spec: &Spec, out: &mut Vec<Template>) {
    let Some(unit) = model.unit() else { return };
    let w = spec.width;
    let op = spec.operation;
    if op.is_logic() || op.is_select_value() {
        result_templates(model, spec, out);
        super::simple::simple_templates(model, spec, out);
        return;
    }
    if op.is_saturating() {
        result_templates(model, spec, out);
        super::sat::sat_templates(model, spec, out);
        return;
    }
    if op.is_shift() {
        result_templates(model, spec, out);
        let aw = unit.amount_width();
        let mut labels: Vec<String> = (0..=w).map(|k| format!("amount={k}")).collect();
        if aw >= 64 || (1u64 << aw) - 1 > w as u64 {
            labels.push("amount=max".into());
        }
        out.push((
            "shift.amount".into(),
            "every amount 0..N-1, amount = N and the largest amount value".into(),
            Kind::Ext(ExtKind::ShiftAmount),
            labels,
        ));
        out.push((
            "shift.out_bit".into(),
            "the bit shifted (or rotated) out last, from each position of a, at 0 and at 1".into(),
            Kind::Ext(ExtKind::ShiftOutBit),
            (0..w)
                .flat_map(|i| [format!("bit{i}=0"), format!("bit{i}=1")])
                .collect(),
        ));
        if op == Operation::Sra {
            let mut labels: Vec<String> = (1..=w).map(|k| format!("k={k}")).collect();
            labels.push("past_n".into());
            out.push((
                "sra.sign_fill".into(),
                "sra of a negative operand: sign copies shifted in at each amount, and past N"
                    .into(),
                Kind::Ext(ExtKind::SignFill),
                labels,
            ));
        }
        return;
    }
    if op.is_division() {
        super::divide::div_templates(unit, out);
        return;
    }
    // mul
    let mut codes: Vec<(Word, &str)> = Vec::new();
    for s in [
        Special::Zero,
        Special::One,
        Special::MinusOne,
        Special::Min,
        Special::Max,
    ] {
        if let Some(c) = s.code(model) {
            if !codes.iter().any(|(x, _)| *x == c) {
                codes.push((c, s.id()));
            }
        }
    }
    let labels = codes
        .iter()
        .flat_map(|(_, x)| codes.iter().map(move |(_, y)| format!("a_{x}.b_{y}")))
        .collect();
    out.push((
        "mul.operand_pairs".into(),
        "operands 0, 1, -1, min and max in every pairing".into(),
        Kind::Ext(ExtKind::MulPairs(codes.iter().map(|c| c.0).collect())),
        labels,
    ));
    let r = unit.result_width();
    if r < 2 * w && unit.options.result_part != Some(ResultPart::High) {
        out.push((
            "mul.overflow_boundary".into(),
            format!(
                "the exact product needs exactly the {r} result bits (top) or one bit more \
                 (past), by sign; and the product equal to the result's most negative value"
            ),
            Kind::Ext(ExtKind::MulBoundary),
            boundary_labels(unit),
        ));
    }
    let (digits, _) = booth_digits(unit);
    out.push((
        "mul.booth_digit".into(),
        "radix-4 Booth recoding of b: every digit value -2..+2 at every digit position".into(),
        Kind::Ext(ExtKind::BoothDigits),
        (0..digits)
            .flat_map(|i| {
                ["m2", "m1", "0", "p1", "p2"]
                    .into_iter()
                    .map(move |d| format!("digit{i}={d}"))
            })
            .collect(),
    ));
    if spec.encoding != Encoding::Unsigned {
        out.push((
            "mul.signs".into(),
            "the top (sign) bits of a and b in each combination (b's top bit is a value bit \
             for a signed x unsigned unit)"
                .into(),
            Kind::Ext(ExtKind::MulSigns),
            vec!["a0b0".into(), "a0b1".into(), "a1b0".into(), "a1b1".into()],
        ));
    }
}

/// Whether an extended kind hits any bin, for the kinds where that is cheaper to tell than
/// which bins (the classes-only classification); None for the others.
pub(super) fn ext_hit<B: Bits>(model: &Model, kind: &ExtKind, t: &Trace<B>) -> Option<bool> {
    model.unit()?;
    match kind {
        // A bin at every digit position, at every bit, for every pair of sign bits.
        ExtKind::BoothDigits | ExtKind::BitPairs | ExtKind::MulSigns => Some(true),
        ExtKind::DivStep => super::divide::div_hit(kind, t),
        _ => None,
    }
}

/// The bins of an extended kind that (a, b, trace) hits, pushed with `bin`.
pub(super) fn ext_bins<B: Bits>(
    model: &Model,
    kind: &ExtKind,
    a: B,
    b: B,
    t: &Trace<B>,
    mut bin: impl FnMut(u32),
) {
    let Some(unit) = model.unit() else { return };
    let w = unit.width;
    match kind {
        ExtKind::ShiftAmount => {
            let aw = unit.amount_width();
            let s = t.vb.limb(0);
            let max = if aw >= 64 { u64::MAX } else { (1u64 << aw) - 1 };
            if s <= w as u64 {
                bin(s as u32);
            } else if s == max {
                bin(w + 1);
            }
        }
        ExtKind::ShiftOutBit => {
            let s = t.vb.limb(0);
            let c = t.truth.limb(0);
            let pos = match unit.operation {
                Operation::Shl if (1..=w as u64).contains(&c) => Some(w - c as u32),
                Operation::Shr | Operation::Sra if (1..=w as u64).contains(&c) => {
                    Some(c as u32 - 1)
                }
                Operation::Rol if s != 0 => Some((w - c as u32) % w),
                Operation::Ror if s != 0 => Some((c as u32 + w - 1) % w),
                _ => None,
            };
            if let Some(p) = pos {
                bin(2 * p + t.outputs_flags.carry_out as u32);
            }
        }
        ExtKind::SignFill => {
            let c = t.truth.limb(0);
            if a.bit(w - 1) && c >= 1 {
                bin(if c <= w as u64 { c as u32 - 1 } else { w });
            }
        }
        ExtKind::MulPairs(codes) => {
            let (aw, bw) = (a.to_word(), b.to_word());
            let i = codes.iter().position(|c| *c == aw);
            let j = codes.iter().position(|c| *c == bw);
            if let (Some(i), Some(j)) = (i, j) {
                bin(i as u32 * codes.len() as u32 + j as u32);
            }
        }
        ExtKind::MulBoundary => {
            if let Some(k) = boundary_bin(unit, t.truth) {
                bin(k);
            }
        }
        ExtKind::BoothDigits => {
            let (digits, _) = booth_digits(unit);
            let (x, bits, signed) = booth_operand(unit, b);
            for i in 0..digits {
                let d = booth_digit(x, bits, signed, i);
                bin(5 * i + (d + 2) as u32);
            }
        }
        ExtKind::MulSigns => {
            bin(2 * a.bit(w - 1) as u32 + b.bit(w - 1) as u32);
        }
        ExtKind::DivCases | ExtKind::DivQuotientBit | ExtKind::DivSigns | ExtKind::DivStep => {
            super::divide::div_bins(unit, kind, a, t, bin);
        }
        ExtKind::BitPairs | ExtKind::ValueOrder(_) | ExtKind::AbsCases(_) => {
            super::simple::simple_bins(model, kind, a, b, t, bin);
        }
        ExtKind::SatBoundary | ExtKind::SatSigns => {
            super::sat::sat_bins(model, kind, a, b, t, bin);
        }
    }
}
