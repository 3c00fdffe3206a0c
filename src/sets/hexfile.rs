//! `$readmemh` files (IEEE 1364-2005, 17.2.9): packing fields into words, the comment header,
//! and reading words back.
//!
//! arithvec writes exactly ceil(W/4) lowercase hex digits per word, LF line ends, a final
//! newline, `//` comments only and no x/z digits, because simulators differ at the edges of
//! the format (see the DOMAIN notes). The reader accepts what the writer writes plus blank
//! lines and `//` comments anywhere; it does not accept `@address` lines or x/z digits in
//! vector files. Pure formatting and parsing: no file access.

use crate::arith::word::Word;
use crate::sets::layout::WordLayout;

/// Limbs enough for the widest packed word (2 x 512 operand bits + carry-in + mode).
const PACK_LIMBS: usize = 17;

const HEX: &[u8; 16] = b"0123456789abcdef";

/// Packs field values into one `$readmemh` line per the layout.
#[derive(Debug, Clone)]
pub struct Packer {
    layout: WordLayout,
    digits: usize,
}

impl Packer {
    /// A packer for `layout`.
    pub fn new(layout: &WordLayout) -> Packer {
        Packer {
            layout: layout.clone(),
            digits: layout.hex_digits() as usize,
        }
    }

    /// Appends the packed word for `value_of(field)` as hex digits and a newline.
    pub fn push_line(&self, value_of: impl Fn(crate::spec::Signal) -> Word, out: &mut Vec<u8>) {
        if self.layout.width <= 128 {
            let mut packed: u128 = 0;
            for f in &self.layout.fields {
                let mask = if f.width() >= 128 {
                    u128::MAX
                } else {
                    (1u128 << f.width()) - 1
                };
                packed |= (value_of(f.signal).low_u128() & mask) << f.lsb;
            }
            for d in (0..self.digits).rev() {
                out.push(HEX[((packed >> (d * 4)) & 0xf) as usize]);
            }
        } else {
            let mut limbs = [0u64; PACK_LIMBS];
            for f in &self.layout.fields {
                let v = value_of(f.signal);
                for i in v.masked(f.width()).set_bits() {
                    let bit = f.lsb + i;
                    limbs[(bit / 64) as usize] |= 1 << (bit % 64);
                }
            }
            for d in (0..self.digits).rev() {
                let nibble = (limbs[d / 16] >> ((d % 16) * 4)) & 0xf;
                out.push(HEX[nibble as usize]);
            }
        }
        out.push(b'\n');
    }

    /// Splits a line's hex digits back into field values (by layout order). None when the line
    /// has the wrong number of digits, a non-hex digit, or bits set above the word's width.
    pub fn unpack(&self, digits: &str) -> Option<Vec<Word>> {
        let digits = digits.trim();
        if digits.len() != self.digits {
            return None;
        }
        let mut limbs = [0u64; PACK_LIMBS];
        for (i, c) in digits.bytes().rev().enumerate() {
            let v = (c as char).to_digit(16)? as u64;
            limbs[i / 16] |= v << ((i % 16) * 4);
        }
        let bit = |b: u32| (limbs[(b / 64) as usize] >> (b % 64)) & 1 == 1;
        if (self.layout.width..self.digits as u32 * 4).any(bit) {
            return None;
        }
        Some(
            self.layout
                .fields
                .iter()
                .map(|f| {
                    let mut w = Word::ZERO;
                    for i in 0..f.width() {
                        if bit(f.lsb + i) {
                            w.set_bit(i, true);
                        }
                    }
                    w
                })
                .collect(),
        )
    }
}

/// The `//` comment header of a hex file: what it holds and where each field sits.
pub fn header(what: &str, unit: &str, layout: &WordLayout, vectors: u64) -> String {
    let mut s = format!(
        "// arithvec {what} for unit {unit}: {vectors} words, one vector per line\n\
         // word: {} bits as {} hex digits, fields from the most significant end:\n",
        layout.width,
        layout.hex_digits()
    );
    for f in &layout.fields {
        s.push_str(&format!("//   {} [{}:{}]\n", f.name, f.msb, f.lsb));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sets::layout::Layout;
    use crate::spec::{Encoding, Operation, Signal, Spec};

    #[test]
    fn packs_msb_first_and_unpacks() {
        let spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 16);
        let layout = Layout::for_spec(&spec);
        let p = Packer::new(&layout.stimulus);
        let mut out = Vec::new();
        p.push_line(
            |s| match s {
                Signal::A => Word::from_u64(0xabcd),
                Signal::B => Word::from_u64(0x1234),
                _ => Word::from_u64(1),
            },
            &mut out,
        );
        // a << 17 | b << 1 | 1 = 0x1579a2469 (worked by hand).
        assert_eq!(String::from_utf8(out.clone()).unwrap(), "1579a2469\n");
        let fields = p.unpack("1579a2469").unwrap();
        assert_eq!(
            fields,
            vec![
                Word::from_u64(0xabcd),
                Word::from_u64(0x1234),
                Word::from_u64(1)
            ]
        );
        assert_eq!(p.unpack("3579a2469"), None, "bit above the 33-bit word");
        assert_eq!(p.unpack("1579a246"), None);
    }

    #[test]
    fn wide_words_pack_like_narrow_ones() {
        let spec = Spec::with_defaults(Operation::Add, Encoding::Unsigned, 512);
        let layout = Layout::for_spec(&spec);
        let p = Packer::new(&layout.stimulus);
        assert_eq!(layout.stimulus.width, 1025);
        let mut out = Vec::new();
        p.push_line(
            |s| match s {
                Signal::A => Word::ones(512),
                Signal::B => Word::from_u64(2),
                _ => Word::from_u64(1),
            },
            &mut out,
        );
        let line = String::from_utf8(out).unwrap();
        assert_eq!(line.len(), 257 + 1);
        let fields = p.unpack(line.trim_end()).unwrap();
        assert_eq!(fields[0], Word::ones(512));
        assert_eq!(fields[1], Word::from_u64(2));
        assert_eq!(fields[2], Word::from_u64(1));
    }
}
