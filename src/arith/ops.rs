//! The golden model of the shift, rotate and multiply operations.
//!
//! The rules (DEVELOPERS.md, "Golden model rules", shifts and mul) in one place: every
//! function is generic over `bits::Bits` and runs on `u128` for the fast path and on the wide
//! integers above it (a 1088-bit one for products of up to 512 x 512 bits). Nothing here knows
//! about files or ports.

use crate::arith::bits::Bits;
use crate::arith::encoding::{decode, is_negative_zero, representable, sign_bit};
use crate::spec::{
    DivByZero, Encoding, LargeAmount, NegativeZero, OpOptions, Operation, ResultPart, Rounding,
    Signedness, ZeroFlag,
};

/// What one evaluation of an extended operation produced.
#[derive(Debug, Clone, Copy)]
pub(crate) struct OpResult<B> {
    /// Decoded a (for mul: as the multiplier reads it).
    pub va: B,
    /// The amount (shifts) or the decoded b (mul).
    pub vb: B,
    /// Shifts: the effective shift count; mul: the exact product; division: the exact
    /// quotient (zero when dividing by zero).
    pub truth: B,
    /// The result pattern (result width bits; division: the quotient).
    pub result: B,
    pub carry_out: bool,
    pub overflow: bool,
    pub zero: bool,
    pub negative: bool,
    /// Division: the remainder pattern (zero for the other operations).
    pub remainder: B,
    /// Division: the divisor is zero.
    pub div_by_zero: bool,
    /// Division by zero under `div_by_zero = "dont_care"`.
    pub dont_care: bool,
}

/// The settings of one extended unit.
#[derive(Debug, Clone, Copy)]
pub(crate) struct OpUnit {
    pub operation: Operation,
    pub encoding: Encoding,
    pub width: u32,
    pub options: OpOptions,
    pub negative_zero: NegativeZero,
    pub zero_flag: ZeroFlag,
}

impl OpUnit {
    /// The result port's width.
    pub(crate) fn result_width(&self) -> u32 {
        self.options.result_width.unwrap_or(self.width)
    }

    /// The amount port's width (shifts).
    pub(crate) fn amount_width(&self) -> u32 {
        self.options.amount_width.unwrap_or(1)
    }

    /// The shift count a shl, shr or sra applies for amount value `s` (a rotate applies
    /// `s mod N`): `s` itself when saturating, its low log2(N) bits when masking.
    pub(crate) fn effective_amount(&self, s: u64) -> u64 {
        let n = self.width as u64;
        match self.operation {
            Operation::Rol | Operation::Ror => s % n,
            _ if self.options.large_amount == Some(LargeAmount::Mask) => s & (n - 1),
            _ => s,
        }
    }

    /// Evaluates `a` (the first operand's pattern) with `b` (the amount, or the second
    /// operand's pattern).
    pub(crate) fn evaluate<B: Bits>(&self, a: B, b: B) -> OpResult<B> {
        let w = self.width;
        let a = a.mask(w);
        if self.operation.is_shift() {
            let s = b.mask(self.amount_width().min(64)).limb(0);
            self.shift(a, s)
        } else if self.operation.is_division() {
            self.divide(a, b.mask(w))
        } else if self.operation.is_logic() || self.operation.is_select_value() {
            self.bitwise_or_select(a, b.mask(w))
        } else if self.operation.is_saturating() {
            self.saturate(a, b.mask(w))
        } else {
            self.mul(a, b.mask(w))
        }
    }

    fn shift<B: Bits>(&self, a: B, s: u64) -> OpResult<B> {
        let w = self.width;
        let n = w as u64;
        let mask = B::low_mask(w);
        let e = self.effective_amount(s);
        // Counts above N shift as N + 1 (everything out and one more).
        let c = e.min(n + 1) as u32;
        let sign = a.bit(w - 1);
        let (result, carry_out) = match self.operation {
            Operation::Shl => (a.shl(c).mask(w), (1..=w).contains(&c) && a.bit(w - c)),
            Operation::Shr => (a.shr(c), (1..=w).contains(&c) && a.bit(c - 1)),
            Operation::Sra => {
                let fill = if sign {
                    mask.shr(c).not().and(mask)
                } else {
                    B::zero()
                };
                let out = if c == 0 {
                    false
                } else if c <= w {
                    a.bit(c - 1)
                } else {
                    sign
                };
                (a.shr(c).or(fill), out)
            }
            Operation::Rol | Operation::Ror => {
                let k = if self.operation == Operation::Rol {
                    c
                } else {
                    (w - c) % w
                };
                let r = if k == 0 {
                    a
                } else {
                    a.shl(k).or(a.shr(w - k)).mask(w)
                };
                // The bit rotated out last re-enters at the other end.
                let out = s != 0
                    && r.bit(if self.operation == Operation::Rol {
                        0
                    } else {
                        w - 1
                    });
                (r, out)
            }
            _ => unreachable!("not a shift"),
        };
        let result = self.fix_zero(result, w);
        OpResult {
            va: decode(a, w, self.encoding),
            vb: B::zero().or(limb_value::<B>(s)),
            truth: limb_value::<B>(e.min(u32::MAX as u64)),
            result,
            carry_out,
            overflow: false,
            zero: self.zero_of(result, w),
            negative: sign_bit(result, w, self.encoding),
            remainder: B::zero(),
            div_by_zero: false,
            dont_care: false,
        }
    }

    fn mul<B: Bits>(&self, a: B, b: B) -> OpResult<B> {
        let (w, enc) = (self.width, self.encoding);
        let r = self.result_width();
        let high = self.options.result_part == Some(ResultPart::High);
        let (va, vb, truth, result, overflow) = match enc {
            Encoding::SignMagnitude => {
                let m = w - 1;
                let sign = a.bit(m) != b.bit(m);
                let mag = a.mask(m).mul(b.mask(m));
                let va = decode(a, w, enc);
                let vb = decode(b, w, enc);
                let truth = if sign { mag.neg() } else { mag };
                let kept = mag.mask(r - 1);
                let result = if sign {
                    kept.or(B::single_bit(r - 1))
                } else {
                    kept
                };
                (va, vb, truth, result, !mag.shr(r - 1).is_zero())
            }
            _ => {
                let signed_b = self.options.signedness == Some(Signedness::Signed);
                let va = decode(a, w, enc);
                let vb = if signed_b { decode(b, w, enc) } else { b };
                let truth = va.mul(vb);
                let result = if high {
                    truth.shr(2 * w - r).mask(r)
                } else {
                    truth.mask(r)
                };
                let overflow = !high && !representable(truth, r, enc);
                (va, vb, truth, result, overflow)
            }
        };
        let result = self.fix_zero(result, r);
        OpResult {
            va,
            vb,
            truth,
            result,
            carry_out: false,
            overflow,
            zero: self.zero_of(result, r),
            negative: sign_bit(result, r, enc),
            remainder: B::zero(),
            div_by_zero: false,
            dont_care: false,
        }
    }

    /// abs, min, max and the logic operations. abs is |a| encoded (-0 gives +0); where -min
    /// does not fit (twos, offset) the result is a's own pattern, the wrapped value, with
    /// overflow. min and max return the operand's pattern, a on a tie of values (so +0 against
    /// -0 returns a). The logic operations work on the patterns.
    fn bitwise_or_select<B: Bits>(&self, a: B, b: B) -> OpResult<B> {
        let (w, enc) = (self.width, self.encoding);
        let va = decode(a, w, enc);
        let vb = decode(b, w, enc);
        let mask = B::low_mask(w);
        let (truth, result, overflow) = match self.operation {
            Operation::Abs => {
                let m = if va.is_negative() { va.neg() } else { va };
                if representable(m, w, enc) {
                    (m, crate::arith::encoding::encode(m, w, enc), false)
                } else {
                    (m, a, true)
                }
            }
            Operation::Min => (va, if vb.slt(&va) { b } else { a }, false),
            Operation::Max => (va, if va.slt(&vb) { b } else { a }, false),
            Operation::And => (B::zero(), a.and(b), false),
            Operation::Or => (B::zero(), a.or(b), false),
            Operation::Xor => (B::zero(), a.xor(b), false),
            Operation::Not => (B::zero(), a.not().and(mask), false),
            _ => (B::zero(), a, false),
        };
        OpResult {
            va,
            vb,
            truth,
            result,
            carry_out: false,
            overflow,
            zero: self.zero_of(result, w),
            negative: sign_bit(result, w, enc),
            remainder: B::zero(),
            div_by_zero: false,
            dont_care: false,
        }
    }

    /// div, rem, divrem: the quotient, remainder and flags of dividend `a` by divisor `b`
    /// (DEVELOPERS.md, "Golden model rules", division). The magnitudes are divided, the
    /// quotient takes the sign of a xor b and the remainder the sign of a (truncate); floor
    /// moves a non-zero remainder of the other sign over by one divisor. Only the
    /// two's-complement min / -1 overflows: its quotient 2^(N-1) wraps to min, remainder 0.
    fn divide<B: Bits>(&self, a: B, b: B) -> OpResult<B> {
        let (w, enc) = (self.width, self.encoding);
        let va = decode(a, w, enc);
        let vb = decode(b, w, enc);
        let flags =
            |truth: B, result: B, remainder: B, div_by_zero, dont_care, overflow| OpResult {
                va,
                vb,
                truth,
                result,
                carry_out: false,
                overflow,
                zero: false,
                negative: false,
                remainder,
                div_by_zero,
                dont_care,
            };
        if vb.is_zero() {
            // The files still need a value: the dont_care rows carry the "zero" convention's.
            let q = match self.options.div_by_zero {
                Some(DivByZero::Zero) | Some(DivByZero::DontCare) => B::zero(),
                _ => B::low_mask(w),
            };
            let dont_care = self.options.div_by_zero == Some(DivByZero::DontCare);
            return flags(B::zero(), q, a, true, dont_care, false);
        }
        let (q, r) = divide_values(va, vb, self.options.rounding);
        let overflow = !representable(q, w, enc);
        flags(q, q.mask(w), r.mask(w), false, false, overflow)
    }

    pub(crate) fn fix_zero<B: Bits>(&self, result: B, width: u32) -> B {
        if self.negative_zero == NegativeZero::Positive
            && is_negative_zero(result, width, self.encoding)
        {
            B::zero()
        } else {
            result
        }
    }

    pub(crate) fn zero_of<B: Bits>(&self, result: B, width: u32) -> bool {
        match self.zero_flag {
            ZeroFlag::Value => decode(result, width, self.encoding).is_zero(),
            ZeroFlag::Bits => result.is_zero(),
        }
    }
}

/// The quotient and remainder of values `va` by non-zero `vb` (sign-extended at the full
/// capacity), rounded as `rounding` says (None: unsigned, where both roundings agree).
pub(crate) fn divide_values<B: Bits>(va: B, vb: B, rounding: Option<Rounding>) -> (B, B) {
    let (na, nb) = (va.is_negative(), vb.is_negative());
    let abs = |v: B, n: bool| if n { v.neg() } else { v };
    let (mq, mr) = abs(va, na).udivrem(abs(vb, nb));
    let mut q = abs(mq, na != nb);
    let mut r = abs(mr, na);
    if rounding == Some(Rounding::Floor) && !r.is_zero() && na != nb {
        q = q.sub(B::one());
        r = r.add(vb);
    }
    (q, r)
}

/// `v` as a `B`.
fn limb_value<B: Bits>(v: u64) -> B {
    let mut out = B::zero();
    for i in 0..64 {
        if v >> i & 1 == 1 {
            out = out.or(B::single_bit(i));
        }
    }
    out
}
