//! The golden model of the saturating operations `add_sat` and `sub_sat`.
//!
//! The rule (DEVELOPERS.md, "Golden model rules", saturating add and subtract): T is the true
//! sum or difference of the decoded operands. When T is representable the result is the
//! pattern the encoding's ordinary adder (subtractor) without carry-in produces, so the zero
//! rules of one's complement and sign-magnitude are those of add and sub; otherwise the result
//! is the encoding's max (T above it) or min (T below it) and `saturated` is 1. Ones'
//! complement and sign-magnitude clamp to +-(2^(N-1) - 1). Generic over `bits::Bits`; nothing
//! here knows about files or ports.

use crate::arith::bits::Bits;
use crate::arith::encoding::{decode, encode, max_value, min_value, sign_bit};
use crate::arith::ops::{OpResult, OpUnit};
use crate::spec::{Encoding, Operation};

impl OpUnit {
    /// add_sat and sub_sat of the patterns `a` and `b` (masked to N bits).
    pub(crate) fn saturate<B: Bits>(&self, a: B, b: B) -> OpResult<B> {
        let (w, enc) = (self.width, self.encoding);
        let subtract = self.operation == Operation::SubSat;
        let va = decode(a, w, enc);
        let vb = decode(b, w, enc);
        let truth = if subtract { va.sub(vb) } else { va.add(vb) };
        let (lo, hi) = (min_value::<B>(w, enc), max_value::<B>(w, enc));
        let (result, saturated) = if truth.slt(&lo) {
            (encode(lo, w, enc), true)
        } else if hi.slt(&truth) {
            (encode(hi, w, enc), true)
        } else {
            (in_range(a, b, truth, w, enc, subtract), false)
        };
        let result = self.fix_zero(result, w);
        OpResult {
            va,
            vb,
            truth,
            result,
            carry_out: false,
            overflow: saturated,
            zero: self.zero_of(result, w),
            negative: sign_bit(result, w, enc),
            remainder: B::zero(),
            div_by_zero: false,
            dont_care: false,
        }
    }
}

/// The pattern of a representable true result `truth`, as the encoding's ordinary adder
/// gives it: one's complement adds a and b (or ~b) with end-around carry, so x + (-x) is -0;
/// sign-magnitude gives a zero the sign of a (DEVELOPERS.md, signmag add); the others have one
/// pattern per value.
fn in_range<B: Bits>(a: B, b: B, truth: B, w: u32, enc: Encoding, subtract: bool) -> B {
    match enc {
        Encoding::Ones => {
            let y = if subtract { b.not().mask(w) } else { b };
            let raw = a.add(y);
            let carry = raw.bit(w);
            raw.mask(w).add(B::from_bool(carry)).mask(w)
        }
        Encoding::SignMagnitude if truth.is_zero() => a.and(B::single_bit(w - 1)),
        _ => encode(truth, w, enc),
    }
}

#[cfg(test)]
mod tests {
    use crate::arith::model::{Inputs, Model};
    use crate::arith::word::Word;
    use crate::spec::{Encoding, Operation, Signal, Spec};

    fn run(op: Operation, enc: Encoding, w: u32, a: u64, b: u64) -> (u64, bool) {
        let m = Model::new(&Spec::with_defaults(op, enc, w));
        let o = m.evaluate(&Inputs {
            a: Word::from_u64(a),
            b: Word::from_u64(b),
            ..Inputs::default()
        });
        (o.result.low_u64(), o.get(Signal::Saturated).bit(0))
    }

    /// Worked 8-bit cases (common practice, no source; values worked by hand).
    #[test]
    fn eight_bit_cases() {
        use Encoding::*;
        use Operation::*;
        let cases: &[(Operation, Encoding, u64, u64, u64, bool)] = &[
            (AddSat, Unsigned, 200, 100, 255, true),
            (AddSat, Unsigned, 200, 55, 255, false),
            (SubSat, Unsigned, 5, 6, 0, true),
            (AddSat, Twos, 0x7f, 1, 0x7f, true),
            (AddSat, Twos, 0x80, 0xff, 0x80, true),
            (SubSat, Twos, 0x80, 1, 0x80, true),
            (SubSat, Twos, 0, 0x80, 0x7f, true),
            (AddSat, Twos, 0x7e, 1, 0x7f, false),
            // Offset: 0xff is +127, 0x00 is -128.
            (AddSat, Offset, 0xff, 0x81, 0xff, true),
            (SubSat, Offset, 0x00, 0x81, 0x00, true),
            // Ones: +127 + 1 clamps to 0x7f; -127 + -1 (0x80 + 0xfe) clamps to -127 = 0x80.
            (AddSat, Ones, 0x7f, 1, 0x7f, true),
            (AddSat, Ones, 0x80, 0xfe, 0x80, true),
            // x + (-x) through the end-around adder is -0.
            (AddSat, Ones, 5, 0xfa, 0xff, false),
            // Sign-magnitude: -127 - 1 clamps to 0xff; 5 + (-5) is +0, (-5) + 5 is -0.
            (SubSat, SignMagnitude, 0xff, 1, 0xff, true),
            (AddSat, SignMagnitude, 5, 0x85, 0x00, false),
            (AddSat, SignMagnitude, 0x85, 5, 0x80, false),
        ];
        for &(op, enc, a, b, want, sat) in cases {
            assert_eq!(
                run(op, enc, 8, a, b),
                (want, sat),
                "{op} {enc} {a:#x} {b:#x}"
            );
        }
    }
}
