//! Oracle tests of the div, rem and divrem models against outside references: Rust's own
//! `checked_div`, `checked_rem`, `div_euclid`, `rem_euclid` and `overflowing_div` on
//! i8..i128 and u8..u128 at widths 8, 16, 32, 64 and 128 (the standard library's documented
//! semantics: `/` and `%` truncate toward zero), and num-bigint (`BigInt` `/` and `%`, which
//! also truncate, and `div_floor` / `mod_floor` from num-integer) at random widths up to 512.

use arithvec::{Inputs, Model, Spec, Word};
use num_bigint::{BigInt, BigUint, Sign};
use num_integer::Integer;
use num_traits::{One, Zero};

const PORTS: &str =
    "a = \"a\"\nb = \"b\"\nquotient = \"q\"\nremainder = \"r\"\ndiv_by_zero = \"dz\"";

fn spec(enc: &str, width: u32, conv: &str) -> Spec {
    let ports = if enc == "twos" {
        format!("{PORTS}\noverflow = \"v\"")
    } else {
        PORTS.to_string()
    };
    let text = format!(
        "name = \"oracle\"\noperation = \"divrem\"\nwidth = {width}\nencoding = \"{enc}\"\n\n[ports]\n{ports}\n\n[conventions]\n{conv}\n"
    );
    Spec::parse(&text, "oracle.toml").unwrap()
}

/// A small deterministic generator (xorshift64*), so the tests need no seed files.
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    /// A random pattern, often with a short value so that quotients are not always 0 or 1.
    fn word(&mut self, width: u32) -> Word {
        let mut limbs = [0u64; 8];
        for l in limbs.iter_mut() {
            *l = self.next();
        }
        let keep = match self.next() % 4 {
            0 => 1 + (self.next() % width as u64) as u32,
            _ => width,
        };
        let w = Word::from_limbs(limbs).masked(keep);
        if self.next().is_multiple_of(8) {
            // A short negative value in twos.
            w.not(width).masked(width)
        } else {
            w
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

/// i128/u128 at 8..128 bits: `checked_div` / `checked_rem` (None for a zero divisor and for
/// min / -1), `overflowing_div` (wraps min / -1 to min, from the std documentation), and
/// `div_euclid` / `rem_euclid` turned into floor rounding (they agree with floor for a
/// positive divisor; for a negative divisor and a non-zero remainder floor is (q - 1, r + b), common practice).
#[test]
fn division_matches_rust_std() {
    let mut rng = Rng(0x5eed_d001);
    for w in [8u32, 16, 32, 64, 128] {
        let trunc = Model::new(&spec("twos", w, "rounding = \"truncate\""));
        let floor = Model::new(&spec("twos", w, "rounding = \"floor\""));
        let uns = Model::new(&spec("unsigned", w, "div_by_zero = \"all_ones\""));
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
        for i in 0..20_000u32 {
            let a = rng.word(w).low_u128();
            let mut b = rng.word(w).low_u128();
            if i.is_multiple_of(50) {
                b = 0;
            }
            if i.is_multiple_of(97) {
                b = mask; // -1
            }
            let (sa, sb) = (sext(a), sext(b));
            let (wa, wb) = (Word::from_u128(a), Word::from_u128(b));
            // Two's complement, truncate.
            let o = eval(&trunc, wa, wb);
            assert_eq!(o.div_by_zero, b == 0);
            if b == 0 {
                assert_eq!(o.result.low_u128(), mask, "all_ones quotient");
                assert_eq!(o.remainder.low_u128(), a, "remainder = dividend");
            } else {
                let min = if w == 128 {
                    i128::MIN
                } else {
                    -(1i128 << (w - 1))
                };
                let overflow = sa == min && sb == -1;
                assert_eq!(o.overflow, overflow, "w{w} {sa}/{sb}");
                let (q, r) = if overflow {
                    (min, 0)
                } else {
                    (sa.checked_div(sb).unwrap(), sa.checked_rem(sb).unwrap())
                };
                if w == 128 {
                    assert_eq!(sa.checked_div(sb).is_none(), overflow, "i128::checked_div");
                    assert_eq!(
                        sa.overflowing_div(sb),
                        (q, overflow),
                        "i128::overflowing_div"
                    );
                }
                assert_eq!(
                    o.result.low_u128(),
                    q as u128 & mask,
                    "trunc w{w} {sa}/{sb}"
                );
                assert_eq!(
                    o.remainder.low_u128(),
                    r as u128 & mask,
                    "trunc w{w} {sa}%{sb}"
                );
                // Floor from div_euclid: q_e * b + r_e = a with 0 <= r_e < |b|; floor keeps
                // the remainder's sign with b's.
                let o = eval(&floor, wa, wb);
                let (qf, rf) = if overflow {
                    (min, 0)
                } else {
                    let (qe, re) = (sa.div_euclid(sb), sa.rem_euclid(sb));
                    if sb < 0 && re != 0 {
                        (qe - 1, re + sb)
                    } else {
                        (qe, re)
                    }
                };
                assert_eq!(
                    o.result.low_u128(),
                    qf as u128 & mask,
                    "floor w{w} {sa}/{sb}"
                );
                assert_eq!(
                    o.remainder.low_u128(),
                    rf as u128 & mask,
                    "floor w{w} {sa}%{sb}"
                );
                assert_eq!(o.overflow, overflow);
            }
            // Unsigned.
            let o = eval(&uns, wa, wb);
            match (a.checked_div(b), a.checked_rem(b)) {
                (Some(q), Some(r)) => {
                    assert_eq!(
                        (o.result.low_u128(), o.remainder.low_u128()),
                        (q, r),
                        "u w{w} {a}/{b}"
                    );
                    assert!(!o.div_by_zero);
                }
                _ => {
                    assert!(o.div_by_zero);
                    assert_eq!(o.result.low_u128(), mask);
                    assert_eq!(o.remainder.low_u128(), a);
                }
            }
        }
    }
}

fn to_big(w: &Word, width: u32, signed: bool) -> BigInt {
    let mut v = BigUint::zero();
    for i in (0..width).rev() {
        v <<= 1;
        if w.bit(i) {
            v += BigUint::one();
        }
    }
    let v = BigInt::from_biguint(Sign::Plus, v);
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

/// num-bigint at random widths 1..=512: truncating `/` and `%` of BigInt, num-integer's
/// `div_floor` and `mod_floor`, every div_by_zero convention and min / -1.
#[test]
fn division_matches_num_bigint_at_random_widths() {
    let mut rng = Rng(0x5eed_d002);
    let mut cases = 0;
    for _ in 0..300 {
        let w = 1 + (rng.next() % 512) as u32;
        for (enc, conv) in [
            ("twos", "rounding = \"truncate\""),
            ("twos", "rounding = \"floor\"\ndiv_by_zero = \"zero\""),
            ("unsigned", "div_by_zero = \"zero\""),
            ("unsigned", ""),
        ] {
            let s = spec(enc, w, conv);
            let m = Model::new(&s);
            let signed = enc == "twos";
            let floor = conv.contains("floor");
            let zero_q = conv.contains("\"zero\"");
            for k in 0..12 {
                let a = rng.word(w);
                let b = match k {
                    0 => Word::ZERO,
                    1 => Word::ones(w),
                    _ => rng.word(w),
                };
                let a = if k == 1 { Word::bit_mask(w - 1) } else { a };
                let (va, vb) = (to_big(&a, w, signed), to_big(&b, w, signed));
                let o = eval(&m, a, b);
                let got_q = to_big(&o.result, w, false);
                let got_r = to_big(&o.remainder, w, false);
                assert_eq!(o.div_by_zero, vb.is_zero());
                if vb.is_zero() {
                    let q = if zero_q {
                        BigInt::zero()
                    } else {
                        pattern(&BigInt::from(-1), w)
                    };
                    assert_eq!(got_q, q, "{enc} w{w} divide by zero");
                    assert_eq!(got_r, pattern(&va, w));
                } else {
                    let (q, r) = if floor {
                        (va.div_floor(&vb), va.mod_floor(&vb))
                    } else {
                        (&va / &vb, &va % &vb)
                    };
                    let fits = !signed || q < (BigInt::one() << (w - 1));
                    if signed {
                        assert_eq!(o.overflow, !fits, "{enc} w{w} overflow");
                    }
                    assert_eq!(got_q, pattern(&q, w), "{enc} {conv} w{w} {va} / {vb}");
                    assert_eq!(got_r, pattern(&r, w), "{enc} {conv} w{w} {va} % {vb}");
                }
                cases += 1;
            }
        }
    }
    assert_eq!(cases, 300 * 4 * 12);
}
