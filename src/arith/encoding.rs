//! What an N-bit pattern means under each encoding: decode, encode, range and special codes.
//!
//! The generic functions work on the model's internal integers (`bits::Bits`), where a value
//! is a two's-complement number at the type's capacity. [`Value`] is the public, printable
//! form used in reports and `repro`. This module knows nothing about operations or files.

use std::fmt;

use crate::arith::bits::{Bits, Wide};
use crate::arith::word::Word;
use crate::spec::Encoding;

/// The value of pattern `p` (low `width` bits) under `enc`.
pub(crate) fn decode<B: Bits>(p: B, width: u32, enc: Encoding) -> B {
    let msb = p.bit(width - 1);
    match enc {
        Encoding::Unsigned => p,
        Encoding::Twos => p.sext(width),
        Encoding::Ones => {
            if msb {
                p.not().mask(width).neg()
            } else {
                p
            }
        }
        Encoding::SignMagnitude => {
            let m = p.mask(width - 1);
            if msb {
                m.neg()
            } else {
                m
            }
        }
        Encoding::Offset => p.sub(B::single_bit(width - 1)),
    }
}

/// The largest representable value.
pub(crate) fn max_value<B: Bits>(width: u32, enc: Encoding) -> B {
    match enc {
        Encoding::Unsigned => B::low_mask(width),
        _ => B::low_mask(width - 1),
    }
}

/// The smallest representable value.
pub(crate) fn min_value<B: Bits>(width: u32, enc: Encoding) -> B {
    match enc {
        Encoding::Unsigned => B::zero(),
        Encoding::Twos | Encoding::Offset => B::single_bit(width - 1).neg(),
        Encoding::Ones | Encoding::SignMagnitude => B::low_mask(width - 1).neg(),
    }
}

/// True when `v` lies in the encoding's range at `width`.
pub(crate) fn representable<B: Bits>(v: B, width: u32, enc: Encoding) -> bool {
    !v.slt(&min_value(width, enc)) && !max_value::<B>(width, enc).slt(&v)
}

/// The pattern for `v` (which must be representable); zero encodes as +0.
pub(crate) fn encode<B: Bits>(v: B, width: u32, enc: Encoding) -> B {
    let neg = v.is_negative();
    match enc {
        Encoding::Unsigned | Encoding::Twos => v.mask(width),
        Encoding::Ones => {
            if neg {
                v.neg().not().mask(width)
            } else {
                v
            }
        }
        Encoding::SignMagnitude => {
            if neg {
                v.neg().or(B::single_bit(width - 1))
            } else {
                v
            }
        }
        Encoding::Offset => v.add(B::single_bit(width - 1)).mask(width),
    }
}

/// The pattern of -0, for encodings that have one.
pub(crate) fn negative_zero<B: Bits>(width: u32, enc: Encoding) -> Option<B> {
    match enc {
        Encoding::Ones => Some(B::low_mask(width)),
        Encoding::SignMagnitude => Some(B::single_bit(width - 1)),
        _ => None,
    }
}

/// True when pattern `p` is -0 under `enc`.
pub(crate) fn is_negative_zero<B: Bits>(p: B, width: u32, enc: Encoding) -> bool {
    negative_zero::<B>(width, enc) == Some(p)
}

/// True when the pattern's sign says negative (the MSB, inverted for offset binary; for
/// unsigned simply the top bit).
pub(crate) fn sign_bit<B: Bits>(p: B, width: u32, enc: Encoding) -> bool {
    p.bit(width - 1) != (enc == Encoding::Offset)
}

/// A decoded value, printable in decimal with a sign; `-0` is kept apart from `0`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Value {
    negative: bool,
    magnitude: Word,
}

impl Value {
    /// Decodes `pattern` (the low `width` bits) under `encoding`.
    pub fn decode(pattern: &Word, width: u32, encoding: Encoding) -> Value {
        let p = Wide::from_word(&pattern.masked(width));
        let v = decode(p, width, encoding);
        let negative_zero = is_negative_zero(p, width, encoding);
        if v.is_negative() {
            Value {
                negative: true,
                magnitude: v.neg().to_word(),
            }
        } else {
            Value {
                negative: negative_zero,
                magnitude: v.to_word(),
            }
        }
    }

    /// True for values below zero, and for -0.
    pub fn is_negative(&self) -> bool {
        self.negative
    }

    /// The absolute value.
    pub fn magnitude(&self) -> &Word {
        &self.magnitude
    }
}

impl fmt::Display for Value {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.negative {
            f.write_str("-")?;
        }
        f.write_str(&self.magnitude.to_decimal())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn show(p: u64, width: u32, enc: Encoding) -> String {
        Value::decode(&Word::from_u64(p), width, enc).to_string()
    }

    /// The 4-bit table of every encoding, as printed in common textbook tables of signed
    /// number representations (common practice, no single source).
    #[test]
    fn four_bit_table() {
        let rows: [(u64, [&str; 5]); 6] = [
            (0b0000, ["0", "0", "0", "0", "-8"]),
            (0b0111, ["7", "7", "7", "7", "-1"]),
            (0b1000, ["8", "-8", "-7", "-0", "0"]),
            (0b1001, ["9", "-7", "-6", "-1", "1"]),
            (0b1110, ["14", "-2", "-1", "-6", "6"]),
            (0b1111, ["15", "-1", "-0", "-7", "7"]),
        ];
        for (p, expect) in rows {
            for (enc, e) in Encoding::ALL.iter().zip(expect) {
                assert_eq!(show(p, 4, *enc), e, "pattern {p:04b} under {enc}");
            }
        }
    }

    #[test]
    fn encode_inverts_decode_over_the_range() {
        for enc in Encoding::ALL {
            for width in 1..=6u32 {
                for p in 0..(1u128 << width) {
                    let v = decode(p, width, enc);
                    assert!(representable(v, width, enc));
                    let back = encode(v, width, enc);
                    if is_negative_zero(p, width, enc) {
                        assert_eq!(back, 0, "-0 encodes back as +0");
                    } else {
                        assert_eq!(back, p, "{enc} width {width} pattern {p}");
                    }
                }
                let above = max_value::<u128>(width, enc).add(1);
                let below = min_value::<u128>(width, enc).sub(1);
                assert!(!representable(above, width, enc));
                assert!(!representable(below, width, enc));
            }
        }
    }
}
