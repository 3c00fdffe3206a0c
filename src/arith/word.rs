//! Bit vectors of up to 512 bits: the one value type that crosses module boundaries.
//!
//! [`Word`] is a plain unsigned bit pattern (little-endian 64-bit limbs). It knows how to
//! print and parse itself as fixed-width hexadecimal and binary, and nothing about encodings
//! or arithmetic meaning; `encoding` gives patterns their value and `model` does the arithmetic
//! on its own internal integer types (see `bits`).

use std::fmt::Write as _;

/// Number of 64-bit limbs in a [`Word`].
pub const LIMBS: usize = 8;

pub use crate::spec::MAX_WIDTH;

/// An unsigned bit pattern of up to [`MAX_WIDTH`] bits. Bits above the field width are zero
/// wherever arithvec produces a `Word`.
#[derive(Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct Word {
    limbs: [u64; LIMBS],
}

impl std::fmt::Debug for Word {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "Word(0x{})", self.to_hex(self.significant_bits().max(1)))
    }
}

impl Word {
    /// The all-zero pattern.
    pub const ZERO: Word = Word { limbs: [0; LIMBS] };

    /// A word holding `v` in its low 64 bits.
    pub const fn from_u64(v: u64) -> Word {
        let mut limbs = [0; LIMBS];
        limbs[0] = v;
        Word { limbs }
    }

    /// A word holding `v` in its low 128 bits.
    pub const fn from_u128(v: u128) -> Word {
        let mut limbs = [0; LIMBS];
        limbs[0] = v as u64;
        limbs[1] = (v >> 64) as u64;
        Word { limbs }
    }

    /// A word built from little-endian limbs.
    pub const fn from_limbs(limbs: [u64; LIMBS]) -> Word {
        Word { limbs }
    }

    /// The little-endian limbs.
    pub const fn limbs(&self) -> &[u64; LIMBS] {
        &self.limbs
    }

    /// The low 64 bits.
    pub const fn low_u64(&self) -> u64 {
        self.limbs[0]
    }

    /// The low 128 bits.
    pub const fn low_u128(&self) -> u128 {
        self.limbs[0] as u128 | (self.limbs[1] as u128) << 64
    }

    /// The pattern with `width` low bits set.
    pub fn ones(width: u32) -> Word {
        let mut w = Word::ZERO;
        let width = width.min(MAX_WIDTH);
        for (i, limb) in w.limbs.iter_mut().enumerate() {
            let lo = i as u32 * 64;
            if width >= lo + 64 {
                *limb = u64::MAX;
            } else if width > lo {
                *limb = (1u64 << (width - lo)) - 1;
            }
        }
        w
    }

    /// The pattern with only bit `i` set (zero when `i` is out of range).
    pub fn bit_mask(i: u32) -> Word {
        let mut w = Word::ZERO;
        w.set_bit(i, true);
        w
    }

    /// Bit `i` (false when out of range).
    pub fn bit(&self, i: u32) -> bool {
        if i >= MAX_WIDTH {
            return false;
        }
        (self.limbs[(i / 64) as usize] >> (i % 64)) & 1 == 1
    }

    /// Sets or clears bit `i` (ignored when out of range).
    pub fn set_bit(&mut self, i: u32, value: bool) {
        if i >= MAX_WIDTH {
            return;
        }
        let limb = &mut self.limbs[(i / 64) as usize];
        if value {
            *limb |= 1 << (i % 64);
        } else {
            *limb &= !(1 << (i % 64));
        }
    }

    /// This word with every bit at or above `width` cleared.
    #[inline]
    pub fn masked(&self, width: u32) -> Word {
        let mut w = *self;
        let full = (width / 64) as usize;
        if full < LIMBS {
            let rem = width % 64;
            w.limbs[full] &= if rem == 0 { 0 } else { u64::MAX >> (64 - rem) };
            for l in w.limbs[full + 1..].iter_mut() {
                *l = 0;
            }
        }
        w
    }

    /// True when no bit is set.
    pub fn is_zero(&self) -> bool {
        self.limbs.iter().all(|&l| l == 0)
    }

    /// The number of set bits.
    pub fn count_ones(&self) -> u32 {
        self.limbs.iter().map(|l| l.count_ones()).sum()
    }

    /// The position of the highest set bit plus one (0 for the zero word).
    pub fn significant_bits(&self) -> u32 {
        for i in (0..LIMBS).rev() {
            if self.limbs[i] != 0 {
                return i as u32 * 64 + 64 - self.limbs[i].leading_zeros();
            }
        }
        0
    }

    /// The position of the lowest set bit (None for the zero word).
    pub fn lowest_set_bit(&self) -> Option<u32> {
        for i in 0..LIMBS {
            if self.limbs[i] != 0 {
                return Some(i as u32 * 64 + self.limbs[i].trailing_zeros());
            }
        }
        None
    }

    /// Bitwise AND.
    pub fn and(&self, other: &Word) -> Word {
        let mut w = *self;
        for i in 0..LIMBS {
            w.limbs[i] &= other.limbs[i];
        }
        w
    }

    /// Bitwise OR.
    pub fn or(&self, other: &Word) -> Word {
        let mut w = *self;
        for i in 0..LIMBS {
            w.limbs[i] |= other.limbs[i];
        }
        w
    }

    /// Bitwise XOR.
    pub fn xor(&self, other: &Word) -> Word {
        let mut w = *self;
        for i in 0..LIMBS {
            w.limbs[i] ^= other.limbs[i];
        }
        w
    }

    /// Bitwise NOT within `width` bits.
    pub fn not(&self, width: u32) -> Word {
        self.xor(&Word::ones(width))
    }

    /// Iterates over the positions of set bits, lowest first.
    pub fn set_bits(&self) -> SetBits {
        SetBits {
            word: *self,
            limb: 0,
        }
    }

    /// The value as exactly `ceil(width / 4)` lowercase hex digits.
    pub fn to_hex(&self, width: u32) -> String {
        let mut s = String::with_capacity(hex_digits(width) as usize);
        self.write_hex(width, &mut s);
        s
    }

    /// Appends exactly `ceil(width / 4)` lowercase hex digits to `out`.
    pub fn write_hex(&self, width: u32, out: &mut String) {
        for d in (0..hex_digits(width)).rev() {
            let nibble = (self.limbs[(d / 16) as usize] >> ((d % 16) * 4)) & 0xf;
            out.push(HEX[nibble as usize] as char);
        }
    }

    /// The value as exactly `width` binary digits, MSB first.
    pub fn to_bin(&self, width: u32) -> String {
        (0..width)
            .rev()
            .map(|i| if self.bit(i) { '1' } else { '0' })
            .collect()
    }

    /// The value in decimal (unsigned).
    pub fn to_decimal(&self) -> String {
        // Repeated division by 10^19 over the limbs; fine for reports, not a hot path.
        let mut limbs = self.limbs;
        let mut chunks = Vec::new();
        const BASE: u64 = 10_000_000_000_000_000_000;
        loop {
            let mut rem: u128 = 0;
            let mut all_zero = true;
            for i in (0..LIMBS).rev() {
                let cur = (rem << 64) | limbs[i] as u128;
                limbs[i] = (cur / BASE as u128) as u64;
                rem = cur % BASE as u128;
                if limbs[i] != 0 {
                    all_zero = false;
                }
            }
            chunks.push(rem as u64);
            if all_zero {
                break;
            }
        }
        let mut s = String::new();
        for (i, c) in chunks.iter().rev().enumerate() {
            if i == 0 {
                write!(s, "{c}").unwrap();
            } else {
                write!(s, "{c:019}").unwrap();
            }
        }
        s
    }

    /// Parses a hex digit string (no prefix, no separators). Returns None on a non-hex digit
    /// or a value that does not fit in 512 bits.
    pub fn parse_hex(digits: &str) -> Option<Word> {
        Word::parse_radix(digits.as_bytes(), 4)
    }

    /// Parses digits in radix 2^`bits_per_digit` (1 = binary, 4 = hex).
    pub fn parse_radix(digits: &[u8], bits_per_digit: u32) -> Option<Word> {
        let mut w = Word::ZERO;
        let mut pos = 0u32;
        for &c in digits.iter().rev() {
            let v = match c {
                b'0'..=b'9' => c - b'0',
                b'a'..=b'f' => c - b'a' + 10,
                b'A'..=b'F' => c - b'A' + 10,
                _ => return None,
            } as u64;
            if v >> bits_per_digit != 0 {
                return None;
            }
            if v != 0 {
                if pos + (64 - v.leading_zeros()) > MAX_WIDTH {
                    return None;
                }
                w.limbs[(pos / 64) as usize] |= v << (pos % 64);
                if pos % 64 + bits_per_digit > 64 {
                    w.limbs[(pos / 64) as usize + 1] |= v >> (64 - pos % 64);
                }
            }
            pos += bits_per_digit;
        }
        Some(w)
    }

    /// Parses an unsigned decimal digit string. None on a bad digit or a value over 512 bits.
    pub fn parse_decimal(digits: &str) -> Option<Word> {
        if digits.is_empty() {
            return None;
        }
        let mut w = Word::ZERO;
        for c in digits.bytes() {
            if !c.is_ascii_digit() {
                return None;
            }
            // w = w * 10 + digit
            let mut carry = (c - b'0') as u128;
            for limb in w.limbs.iter_mut() {
                let cur = *limb as u128 * 10 + carry;
                *limb = cur as u64;
                carry = cur >> 64;
            }
            if carry != 0 {
                return None;
            }
        }
        Some(w)
    }

    /// Bits `lsb ..= lsb + width - 1` of `self`, shifted down to bit 0.
    pub fn extract(&self, lsb: u32, width: u32) -> Word {
        let mut out = Word::ZERO;
        for i in 0..width {
            if self.bit(lsb + i) {
                out.set_bit(i, true);
            }
        }
        out
    }
}

const HEX: &[u8; 16] = b"0123456789abcdef";

/// The number of hex digits for a field of `width` bits.
pub const fn hex_digits(width: u32) -> u32 {
    width.div_ceil(4)
}

/// Iterator over set bit positions of a [`Word`].
pub struct SetBits {
    word: Word,
    limb: usize,
}

impl Iterator for SetBits {
    type Item = u32;
    fn next(&mut self) -> Option<u32> {
        while self.limb < LIMBS {
            let l = &mut self.word.limbs[self.limb];
            if *l != 0 {
                let tz = l.trailing_zeros();
                *l &= *l - 1;
                return Some(self.limb as u32 * 64 + tz);
            }
            self.limb += 1;
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hex_round_trip_pads_to_width() {
        let w = Word::from_u64(0xab);
        assert_eq!(w.to_hex(16), "00ab");
        assert_eq!(w.to_hex(9), "0ab");
        assert_eq!(Word::parse_hex("00ab"), Some(w));
        let wide = Word::ones(512);
        assert_eq!(wide.to_hex(512), "f".repeat(128));
        assert_eq!(Word::parse_hex(&"f".repeat(128)), Some(wide));
        assert_eq!(Word::parse_hex(&"f".repeat(129)), None);
        assert_eq!(
            Word::parse_hex(&format!("0{}", "f".repeat(128))),
            Some(wide)
        );
    }

    #[test]
    fn binary_parse_crosses_limbs() {
        let s = format!("1{}", "0".repeat(64));
        let w = Word::parse_radix(s.as_bytes(), 1).unwrap();
        assert_eq!(w, Word::bit_mask(64));
        assert_eq!(Word::parse_radix(b"2", 1), None);
    }

    #[test]
    fn decimal_round_trip() {
        // 2^128 = 340282366920938463463374607431768211456 (a well-known constant, from memory,
        // and confirmed by the round trip below).
        let w = Word::bit_mask(128);
        assert_eq!(w.to_decimal(), "340282366920938463463374607431768211456");
        assert_eq!(
            Word::parse_decimal("340282366920938463463374607431768211456"),
            Some(w)
        );
        assert_eq!(Word::ZERO.to_decimal(), "0");
        assert_eq!(Word::from_u64(u64::MAX).to_decimal(), u64::MAX.to_string());
    }

    #[test]
    fn set_bits_iterates_in_order() {
        let mut w = Word::ZERO;
        for i in [0, 63, 64, 200, 511] {
            w.set_bit(i, true);
        }
        assert_eq!(w.set_bits().collect::<Vec<_>>(), vec![0, 63, 64, 200, 511]);
        assert_eq!(w.lowest_set_bit(), Some(0));
        assert_eq!(w.significant_bits(), 512);
    }

    #[test]
    fn ones_and_extract() {
        assert_eq!(Word::ones(0), Word::ZERO);
        assert_eq!(Word::ones(65).count_ones(), 65);
        let w = Word::from_u64(0b1011_0000);
        assert_eq!(w.extract(4, 4), Word::from_u64(0b1011));
    }
}
