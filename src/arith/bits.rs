//! Fixed-capacity two's-complement integers for the golden model's arithmetic.
//!
//! The model is written once, generic over [`Bits`], and instantiated twice: with `u128` (the
//! fast path, used for widths up to 64, where N + 2 bits of headroom fit easily) and with
//! [`Wide`] (576 bits, used above 64 and up to 512). Both hold operands, carries and exact
//! true results (which need N + 2 bits) without ever overflowing, so "true result" means
//! the mathematical value. Tests force the wide path at small widths and compare.

use crate::arith::word::{Word, LIMBS};

/// Integer operations the model needs, at the type's full capacity (wrapping).
pub(crate) trait Bits: Copy + Eq + std::fmt::Debug {
    /// Number of bits held.
    const CAPACITY: u32;
    fn zero() -> Self;
    fn from_bool(b: bool) -> Self;
    fn from_word(w: &Word) -> Self;
    /// The low 512 bits.
    fn to_word(&self) -> Word;
    /// The pattern with the low `width` bits set (`width` <= CAPACITY).
    fn low_mask(width: u32) -> Self;
    fn bit(&self, i: u32) -> bool;
    fn and(self, o: Self) -> Self;
    fn or(self, o: Self) -> Self;
    fn xor(self, o: Self) -> Self;
    fn not(self) -> Self;
    fn add(self, o: Self) -> Self;
    fn sub(self, o: Self) -> Self;
    fn shl(self, n: u32) -> Self;
    fn shr(self, n: u32) -> Self;
    fn is_zero(&self) -> bool;
    /// Signed less-than at full capacity.
    fn slt(&self, o: &Self) -> bool;
    fn trailing_ones(&self) -> u32;
    fn count_ones(&self) -> u32;
    /// 64-bit limb `i` (little-endian; zero past the capacity).
    fn limb(&self, i: usize) -> u64;
    /// The product at full capacity (wrapping).
    fn mul(self, o: Self) -> Self;
    /// Quotient and remainder of non-negative `self` by positive `o` (restoring division,
    /// one quotient bit per step from the top; `o` must not be zero).
    fn udivrem(self, o: Self) -> (Self, Self) {
        let mut q = Self::zero();
        let mut r = Self::zero();
        let leading_zeros = self.not().leading_ones_from_top();
        for i in (0..Self::CAPACITY - leading_zeros).rev() {
            r = r.shl(1).or(Self::from_bool(self.bit(i)));
            if !r.slt(&o) {
                r = r.sub(o);
                q = q.or(Self::single_bit(i));
            }
        }
        (q, r)
    }
    /// The number of leading one bits (from the top of the capacity).
    fn leading_ones_from_top(&self) -> u32 {
        let mut n = 0;
        for l in (0..Self::CAPACITY.div_ceil(64) as usize).rev() {
            let limb = self.limb(l);
            n += limb.leading_ones();
            if limb != u64::MAX {
                break;
            }
        }
        n
    }

    fn neg(self) -> Self {
        Self::zero().sub(self)
    }
    fn one() -> Self {
        Self::from_bool(true)
    }
    fn single_bit(i: u32) -> Self {
        Self::one().shl(i)
    }
    fn mask(self, width: u32) -> Self {
        self.and(Self::low_mask(width))
    }
    fn is_negative(&self) -> bool {
        self.bit(Self::CAPACITY - 1)
    }
    /// Sign-extends the low `width` bits (`width` >= 1).
    fn sext(self, width: u32) -> Self {
        if self.bit(width - 1) {
            self.or(Self::low_mask(width).not())
        } else {
            self.mask(width)
        }
    }
}

impl Bits for u128 {
    const CAPACITY: u32 = 128;
    #[inline]
    fn zero() -> Self {
        0
    }
    #[inline]
    fn from_bool(b: bool) -> Self {
        b as u128
    }
    #[inline]
    fn from_word(w: &Word) -> Self {
        w.low_u128()
    }
    #[inline]
    fn to_word(&self) -> Word {
        Word::from_u128(*self)
    }
    #[inline]
    fn low_mask(width: u32) -> Self {
        if width >= 128 {
            u128::MAX
        } else {
            (1u128 << width) - 1
        }
    }
    #[inline]
    fn bit(&self, i: u32) -> bool {
        i < 128 && (self >> i) & 1 == 1
    }
    #[inline]
    fn and(self, o: Self) -> Self {
        self & o
    }
    #[inline]
    fn or(self, o: Self) -> Self {
        self | o
    }
    #[inline]
    fn xor(self, o: Self) -> Self {
        self ^ o
    }
    #[inline]
    fn not(self) -> Self {
        !self
    }
    #[inline]
    fn add(self, o: Self) -> Self {
        self.wrapping_add(o)
    }
    #[inline]
    fn sub(self, o: Self) -> Self {
        self.wrapping_sub(o)
    }
    #[inline]
    fn shl(self, n: u32) -> Self {
        if n >= 128 {
            0
        } else {
            self << n
        }
    }
    #[inline]
    fn shr(self, n: u32) -> Self {
        if n >= 128 {
            0
        } else {
            self >> n
        }
    }
    #[inline]
    fn is_zero(&self) -> bool {
        *self == 0
    }
    #[inline]
    fn slt(&self, o: &Self) -> bool {
        (*self as i128) < (*o as i128)
    }
    #[inline]
    fn trailing_ones(&self) -> u32 {
        u128::trailing_ones(*self)
    }
    #[inline]
    fn count_ones(&self) -> u32 {
        u128::count_ones(*self)
    }
    #[inline]
    fn mul(self, o: Self) -> Self {
        self.wrapping_mul(o)
    }
    #[inline]
    fn udivrem(self, o: Self) -> (Self, Self) {
        (self / o, self % o)
    }
    #[inline]
    fn limb(&self, i: usize) -> u64 {
        if i < 2 {
            (*self >> (64 * i)) as u64
        } else {
            0
        }
    }
}

/// Number of limbs in [`Wide`]: 512 operand bits plus headroom for carries and signs.
const WIDE_LIMBS: usize = LIMBS + 1;

/// A two's-complement integer of `L` 64-bit limbs (`L` >= 8) for widths above 64.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub(crate) struct WideN<const L: usize>([u64; L]);

/// 576 bits: operands up to 512 bits with headroom for carries and signs.
pub(crate) type Wide = WideN<WIDE_LIMBS>;

/// 1088 bits: the exact products of a multiplier up to 512 x 512 bits, with headroom.
pub(crate) type Huge = WideN<{ 2 * LIMBS + 1 }>;

impl<const L: usize> Bits for WideN<L> {
    const CAPACITY: u32 = 64 * L as u32;
    fn zero() -> Self {
        WideN([0; L])
    }
    fn from_bool(b: bool) -> Self {
        let mut w = Self::zero();
        w.0[0] = b as u64;
        w
    }
    fn from_word(w: &Word) -> Self {
        let mut out = Self::zero();
        out.0[..LIMBS].copy_from_slice(w.limbs());
        out
    }
    fn to_word(&self) -> Word {
        let mut l = [0u64; LIMBS];
        l.copy_from_slice(&self.0[..LIMBS]);
        Word::from_limbs(l)
    }
    fn low_mask(width: u32) -> Self {
        let mut w = Self::zero();
        for (i, limb) in w.0.iter_mut().enumerate() {
            let lo = i as u32 * 64;
            if width >= lo + 64 {
                *limb = u64::MAX;
            } else if width > lo {
                *limb = (1u64 << (width - lo)) - 1;
            }
        }
        w
    }
    fn bit(&self, i: u32) -> bool {
        i < Self::CAPACITY && (self.0[(i / 64) as usize] >> (i % 64)) & 1 == 1
    }
    fn and(mut self, o: Self) -> Self {
        for i in 0..L {
            self.0[i] &= o.0[i];
        }
        self
    }
    fn or(mut self, o: Self) -> Self {
        for i in 0..L {
            self.0[i] |= o.0[i];
        }
        self
    }
    fn xor(mut self, o: Self) -> Self {
        for i in 0..L {
            self.0[i] ^= o.0[i];
        }
        self
    }
    fn not(mut self) -> Self {
        for i in 0..L {
            self.0[i] = !self.0[i];
        }
        self
    }
    fn add(mut self, o: Self) -> Self {
        let mut carry = false;
        for i in 0..L {
            let (s1, c1) = self.0[i].overflowing_add(o.0[i]);
            let (s2, c2) = s1.overflowing_add(carry as u64);
            self.0[i] = s2;
            carry = c1 || c2;
        }
        self
    }
    fn sub(mut self, o: Self) -> Self {
        let mut borrow = false;
        for i in 0..L {
            let (d1, b1) = self.0[i].overflowing_sub(o.0[i]);
            let (d2, b2) = d1.overflowing_sub(borrow as u64);
            self.0[i] = d2;
            borrow = b1 || b2;
        }
        self
    }
    fn shl(self, n: u32) -> Self {
        if n >= Self::CAPACITY {
            return Self::zero();
        }
        let (limbs, bits) = ((n / 64) as usize, n % 64);
        let mut out = Self::zero();
        for i in (limbs..L).rev() {
            let src = i - limbs;
            let mut v = self.0[src] << bits;
            if bits > 0 && src > 0 {
                v |= self.0[src - 1] >> (64 - bits);
            }
            out.0[i] = v;
        }
        out
    }
    fn shr(self, n: u32) -> Self {
        if n >= Self::CAPACITY {
            return Self::zero();
        }
        let (limbs, bits) = ((n / 64) as usize, n % 64);
        let mut out = Self::zero();
        for i in 0..L - limbs {
            let src = i + limbs;
            let mut v = self.0[src] >> bits;
            if bits > 0 && src + 1 < L {
                v |= self.0[src + 1] << (64 - bits);
            }
            out.0[i] = v;
        }
        out
    }
    fn is_zero(&self) -> bool {
        self.0.iter().all(|&l| l == 0)
    }
    fn slt(&self, o: &Self) -> bool {
        let (sn, on) = (self.is_negative(), o.is_negative());
        if sn != on {
            return sn;
        }
        for i in (0..L).rev() {
            if self.0[i] != o.0[i] {
                return self.0[i] < o.0[i];
            }
        }
        false
    }
    fn trailing_ones(&self) -> u32 {
        let mut n = 0;
        for &l in &self.0 {
            let t = l.trailing_ones();
            n += t;
            if t < 64 {
                break;
            }
        }
        n
    }
    fn count_ones(&self) -> u32 {
        self.0.iter().map(|l| l.count_ones()).sum()
    }
    fn limb(&self, i: usize) -> u64 {
        self.0.get(i).copied().unwrap_or(0)
    }
    /// Schoolbook multiplication on 64-bit limbs, wrapping at the capacity.
    fn mul(self, o: Self) -> Self {
        let mut out = [0u64; L];
        for i in 0..L {
            if self.0[i] == 0 {
                continue;
            }
            let mut carry = 0u128;
            for j in 0..L - i {
                let t = self.0[i] as u128 * o.0[j] as u128 + out[i + j] as u128 + carry;
                out[i + j] = t as u64;
                carry = t >> 64;
            }
        }
        WideN(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The two implementations agree on every operation for values that fit in 128 bits
    /// (sign-extended into the wide type).
    #[test]
    fn wide_matches_u128() {
        let samples: [u128; 8] = [
            0,
            1,
            u64::MAX as u128,
            1 << 64,
            u128::MAX,
            0x8000_0000_0000_0000_0000_0000_0000_0000,
            0x1234_5678_9abc_def0_0fed_cba9_8765_4321,
            (1 << 65) + 7,
        ];
        let widen = |v: u128| Wide::from_word(&Word::from_u128(v)).sext(128);
        let narrow = |w: Wide| w.to_word().low_u128();
        for &x in &samples {
            for &y in &samples {
                assert_eq!(narrow(widen(x).add(widen(y))), x.wrapping_add(y));
                assert_eq!(narrow(widen(x).sub(widen(y))), x.wrapping_sub(y));
                assert_eq!(widen(x).slt(&widen(y)), (x as i128) < (y as i128));
                assert_eq!(narrow(widen(x).xor(widen(y))), x ^ y);
            }
            for n in [0, 1, 63, 64, 65, 127] {
                assert_eq!(narrow(widen(x).mask(128).shr(n)), x >> n);
                assert_eq!(narrow(widen(x).shl(n)), x << n);
            }
            assert_eq!(widen(x).mask(128).trailing_ones(), x.trailing_ones());
        }
    }

    #[test]
    fn sign_extension() {
        assert_eq!(0b10u128.sext(2), u128::MAX - 1);
        assert_eq!(0b01u128.sext(2), 1);
        assert!(Wide::low_mask(1).sext(1).is_negative());
    }
}
