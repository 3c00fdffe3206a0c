//! The comparator's directed vectors, built by construction: for every bit position i and
//! both orders of the first differing bit, the bits above i equal (all 0s and all 1s) and the
//! bits below i equal or ordered against bit i. These are the tests a magnitude comparator's
//! gates need (a borrow chain's cells see generate, kill and propagate with both borrows in;
//! an equality detector sees each bit alone unequal), which class coverage alone does not
//! demand; the generator keeps them through pruning, as it keeps the ripple seeds.
//!
//! Pure functions of the width; no I/O.

use crate::arith::word::Word;

/// The lower-bit setting of a first-difference vector.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Lower {
    /// The bits below i equal to the fill above.
    Fill,
    /// The bits below i ordered against bit i (a's all 0s and b's all 1s when a has the 1).
    Oppose,
    /// The bits below i ordered with bit i (a's all 1s and b's all 0s when a has the 1).
    Agree,
}

/// The operand pair that differs first at bit `i`, with a's bit `a_one`, the bits above `i`
/// all `fill` in both operands and the bits below set by `lower`.
pub(crate) fn first_difference(
    w: u32,
    i: u32,
    a_one: bool,
    fill: bool,
    lower: Lower,
) -> (Word, Word) {
    let (mut a, mut b) = (Word::ZERO, Word::ZERO);
    for j in 0..w {
        let (x, y) = if j > i {
            (fill, fill)
        } else if j == i {
            (a_one, !a_one)
        } else {
            match lower {
                Lower::Fill => (fill, fill),
                Lower::Oppose => (!a_one, a_one),
                Lower::Agree => (a_one, !a_one),
            }
        };
        a.set_bit(j, x);
        b.set_bit(j, y);
    }
    (a, b)
}

const VARIANTS: [(bool, Lower); 4] = [
    (false, Lower::Fill),
    (true, Lower::Fill),
    (false, Lower::Oppose),
    (false, Lower::Agree),
];

/// Every first-difference vector of a `w`-bit comparator, without duplicates: 8w - 4 pairs
/// (at bit 0 the two lower settings coincide).
pub(crate) fn seed_pairs(w: u32) -> Vec<(Word, Word)> {
    let mut out: Vec<(Word, Word)> = Vec::new();
    for i in 0..w {
        for a_one in [true, false] {
            for (fill, lower) in VARIANTS {
                let pair = first_difference(w, i, a_one, fill, lower);
                if !out.contains(&pair) {
                    out.push(pair);
                }
            }
        }
    }
    out
}
