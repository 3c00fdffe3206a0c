//! Oracle tests of abs, min, max and the logic operations against outside references: Rust's
//! own `overflowing_abs`, `Ord::min`, `Ord::max` and the `&`, `|`, `^`, `!` operators on
//! i8..i128 / u8..u128 at widths 8, 16, 32, 64 and 128 (the standard library's documented
//! semantics), and num-bigint (`BigInt::abs`, ordering, and `&` `|` `^` on BigUint) at random
//! widths up to 512, for two's complement and unsigned.

use arithvec::{Encoding, Inputs, Model, Operation, Spec, Word};
use num_bigint::{BigInt, BigUint, Sign};
use num_traits::{One, Signed};

struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    fn word(&mut self, width: u32) -> Word {
        let mut limbs = [0u64; 8];
        for l in limbs.iter_mut() {
            *l = self.next();
        }
        let w = Word::from_limbs(limbs).masked(width);
        match self.next() % 8 {
            0 => Word::bit_mask(width - 1),
            1 => Word::ZERO,
            _ => w,
        }
    }
}

fn eval(m: &Model, a: Word, b: Word) -> arithvec::Outputs {
    m.evaluate(&Inputs {
        a,
        b,
        ..Inputs::default()
    })
}

fn model(op: Operation, enc: Encoding, w: u32) -> Model {
    Model::new(&Spec::with_defaults(op, enc, w))
}

/// i128/u128 at 8..128 bits (values sign-extended from w bits).
#[test]
fn simple_ops_match_rust_std() {
    let mut rng = Rng(0x5eed_5001);
    for w in [8u32, 16, 32, 64, 128] {
        let mask = if w == 128 {
            u128::MAX
        } else {
            (1u128 << w) - 1
        };
        let sext = |x: u128| -> i128 {
            if w == 128 {
                x as i128
            } else {
                ((x << (128 - w)) as i128) >> (128 - w)
            }
        };
        let abs = model(Operation::Abs, Encoding::Twos, w);
        let smin = model(Operation::Min, Encoding::Twos, w);
        let smax = model(Operation::Max, Encoding::Twos, w);
        let umin = model(Operation::Min, Encoding::Unsigned, w);
        let umax = model(Operation::Max, Encoding::Unsigned, w);
        let and = model(Operation::And, Encoding::Unsigned, w);
        let or = model(Operation::Or, Encoding::Unsigned, w);
        let xor = model(Operation::Xor, Encoding::Unsigned, w);
        let not = model(Operation::Not, Encoding::Unsigned, w);
        for _ in 0..5000 {
            let (a, b) = (rng.word(w).low_u128(), rng.word(w).low_u128());
            let (wa, wb) = (Word::from_u128(a), Word::from_u128(b));
            let (sa, sb) = (sext(a), sext(b));
            let o = eval(&abs, wa, wb);
            // overflowing_abs at the unit's width: min wraps to min with overflow.
            let min = if w == 128 {
                i128::MIN
            } else {
                -(1i128 << (w - 1))
            };
            let (m, over) = if sa == min {
                (sa, true)
            } else {
                sa.overflowing_abs()
            };
            if w == 128 {
                assert_eq!(sa.overflowing_abs(), (m, over), "i128::overflowing_abs");
            }
            assert_eq!(
                (o.result.low_u128(), o.overflow),
                (m as u128 & mask, over),
                "abs w{w} {sa}"
            );
            assert_eq!(
                eval(&smin, wa, wb).result.low_u128(),
                sa.min(sb) as u128 & mask
            );
            assert_eq!(
                eval(&smax, wa, wb).result.low_u128(),
                sa.max(sb) as u128 & mask
            );
            assert_eq!(eval(&umin, wa, wb).result.low_u128(), a.min(b));
            assert_eq!(eval(&umax, wa, wb).result.low_u128(), a.max(b));
            let o = eval(&and, wa, wb);
            assert_eq!(o.result.low_u128(), a & b);
            assert_eq!(o.zero, a & b == 0);
            assert_eq!(eval(&or, wa, wb).result.low_u128(), a | b);
            let o = eval(&xor, wa, wb);
            assert_eq!(o.result.low_u128(), a ^ b);
            assert_eq!(o.negative, (a ^ b) >> (w - 1) & 1 == 1);
            assert_eq!(eval(&not, wa, wb).result.low_u128(), !a & mask);
        }
    }
}

fn big(w: &Word, width: u32, signed: bool) -> BigInt {
    let mut bytes = Vec::new();
    for i in 0..8 {
        bytes.extend_from_slice(&w.extract(64 * i, 64).low_u64().to_le_bytes());
    }
    let v = BigInt::from_biguint(Sign::Plus, BigUint::from_bytes_le(&bytes));
    if signed && w.bit(width - 1) {
        v - (BigInt::one() << width)
    } else {
        v
    }
}

fn pattern(v: &BigInt, width: u32) -> BigInt {
    let m = BigInt::one() << width;
    ((v % &m) + &m) % &m
}

/// num-bigint at random widths 1..=512.
#[test]
fn simple_ops_match_num_bigint_at_random_widths() {
    let mut rng = Rng(0x5eed_5002);
    for _ in 0..200 {
        let w = 1 + (rng.next() % 512) as u32;
        let abs = model(Operation::Abs, Encoding::Twos, w);
        let min = model(Operation::Min, Encoding::Twos, w);
        let max = model(Operation::Max, Encoding::Unsigned, w);
        let and = model(Operation::And, Encoding::Twos, w);
        let or = model(Operation::Or, Encoding::Unsigned, w);
        let xor = model(Operation::Xor, Encoding::Unsigned, w);
        for _ in 0..20 {
            let (a, b) = (rng.word(w), rng.word(w));
            let (sa, sb) = (big(&a, w, true), big(&b, w, true));
            let (ua, ub) = (big(&a, w, false), big(&b, w, false));
            let o = eval(&abs, a, b);
            let fits = sa.abs() < (BigInt::one() << (w - 1));
            assert_eq!(o.overflow, !fits, "abs w{w}");
            assert_eq!(
                big(&o.result, w, false),
                pattern(&sa.abs(), w),
                "abs w{w} {sa}"
            );
            let m = if sb < sa { &sb } else { &sa };
            assert_eq!(big(&eval(&min, a, b).result, w, false), pattern(m, w));
            let m = if ua < ub { &ub } else { &ua };
            assert_eq!(&big(&eval(&max, a, b).result, w, false), m);
            assert_eq!(big(&eval(&and, a, b).result, w, false), &ua & &ub);
            assert_eq!(big(&eval(&or, a, b).result, w, false), &ua | &ub);
            assert_eq!(big(&eval(&xor, a, b).result, w, false), &ua ^ &ub);
        }
    }
}
