//! Corner classes of the saturating operations add_sat and sub_sat: their templates and
//! predicates. The constructors are in `corners::construct_sat`.
//!
//! These units get the operand classes, the result classes of the shifters (result patterns
//! max, min and -0, every result bit at 0 and 1, a zero value from non-zero operands, the
//! walking one with a zero port) and two of their own:
//! - `sat.boundary`: the true result T exactly at max, one past it, more than one past and at
//!   the largest value the operation reaches (max + max for add, max - min for sub); the same
//!   four at min. A clamp comparator that is off by one, or that looks at too few bits, fails
//!   on one of these.
//! - `sat.signs`: the sign bits of a and b in each combination, clamped and in range (the
//!   usual overflow detector of a two's-complement saturating adder reads exactly these; for
//!   unsigned the top bits).

use super::*;
use crate::arith::encoding::{max_value, min_value, sign_bit};

/// Labels of the `sat.boundary` bins.
const BOUNDARY: [&str; 8] = [
    "at_max",
    "one_past_max",
    "far_past_max",
    "extreme_max",
    "at_min",
    "one_past_min",
    "far_past_min",
    "extreme_min",
];

/// Adds the saturating classes after the result classes.
pub(super) fn sat_templates(_model: &Model, _spec: &Spec, out: &mut Vec<Template>) {
    out.push((
        "sat.boundary".into(),
        "the true result exactly at max, one past, more than one past and at the largest \
         reachable value; the same at min"
            .into(),
        Kind::Ext(ExtKind::SatBoundary),
        BOUNDARY.iter().map(|s| s.to_string()).collect(),
    ));
    out.push((
        "sat.signs".into(),
        "the sign (top) bits of a and b in each combination, with the result in range and \
         clamped"
            .into(),
        Kind::Ext(ExtKind::SatSigns),
        ["a0b0", "a0b1", "a1b0", "a1b1"]
            .iter()
            .flat_map(|p| [format!("{p}.in_range"), format!("{p}.clamped")])
            .collect(),
    ));
}

/// The largest and smallest true results of the unit: (max side, min side).
pub(crate) fn extremes<B: Bits>(width: u32, enc: Encoding, subtract: bool) -> (B, B) {
    let (lo, hi) = (min_value::<B>(width, enc), max_value::<B>(width, enc));
    if subtract {
        (hi.sub(lo), lo.sub(hi))
    } else {
        (hi.add(hi), lo.add(lo))
    }
}

/// The bins of a saturating kind that (a, b, trace) hits, pushed with `bin`.
pub(super) fn sat_bins<B: Bits>(
    model: &Model,
    kind: &ExtKind,
    a: B,
    b: B,
    t: &Trace<B>,
    mut bin: impl FnMut(u32),
) {
    let (w, enc) = (model.width(), model.encoding());
    let subtract = model.operation() == Operation::SubSat;
    match kind {
        ExtKind::SatBoundary => {
            let (lo, hi) = (min_value::<B>(w, enc), max_value::<B>(w, enc));
            let (top, bottom) = extremes::<B>(w, enc, subtract);
            let x = t.truth;
            if x == hi {
                bin(0);
            }
            if x == hi.add(B::one()) {
                bin(1);
            }
            if hi.add(B::one()).slt(&x) {
                bin(2);
            }
            if x == top {
                bin(3);
            }
            if x == lo {
                bin(4);
            }
            if x == lo.sub(B::one()) {
                bin(5);
            }
            if x.slt(&lo.sub(B::one())) {
                bin(6);
            }
            if x == bottom {
                bin(7);
            }
        }
        ExtKind::SatSigns => {
            let signs = 2 * sign_bit(a, w, enc) as u32 + sign_bit(b, w, enc) as u32;
            bin(2 * signs + t.outputs_flags.overflow as u32);
        }
        _ => {}
    }
}
