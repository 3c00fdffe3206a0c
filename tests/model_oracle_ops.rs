//! Oracle tests of the shift, rotate and multiply models against outside references:
//! Rust's own `rotate_left`, `rotate_right`, `checked_shl`, `checked_shr`, `wrapping_mul`
//! and `overflowing_mul` at widths 8, 16, 32, 64 and 128 (the standard library's documented
//! semantics), and num-bigint (`BigInt` multiplication and shifts) at random widths up to 512.

use arithvec::{Encoding, Inputs, Model, ResultPart, Spec, Word};
use num_bigint::{BigInt, BigUint, Sign};
use num_traits::{One, Zero};

fn spec(op: &str, enc: &str, width: u32, extra: &str, ports: &str) -> Spec {
    let text = format!(
        "name = \"oracle\"\noperation = \"{op}\"\nwidth = {width}\nencoding = \"{enc}\"\n{extra}\n[ports]\n{ports}\n"
    );
    Spec::parse(&text, "oracle.toml").unwrap()
}

const SHIFT_PORTS: &str =
    "a = \"a\"\namount = \"s\"\nresult = \"y\"\ncarry_out = \"c\"\nzero = \"z\"\nnegative = \"n\"";

/// A small deterministic generator (xorshift64*), so the tests need no seed files.
struct Lcg(u64);
impl Lcg {
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
        Word::from_limbs(limbs).masked(width)
    }
}

fn eval(m: &Model, a: Word, b: Word) -> arithvec::Outputs {
    m.evaluate(&Inputs {
        a,
        b,
        ..Inputs::default()
    })
}

/// Rust's u128 rotate and checked shifts at 8..128 bits (std: `rotate_left` rotates by
/// n mod BITS; `checked_shl` is None for n >= BITS, which the saturating model maps to 0).
#[test]
fn shifts_match_rust_std() {
    let mut rng = Lcg(0x5eed_0001);
    for w in [8u32, 16, 32, 64, 128] {
        let mask = if w == 128 {
            u128::MAX
        } else {
            (1u128 << w) - 1
        };
        let models: Vec<(&str, Model)> = ["shl", "shr", "rol", "ror"]
            .into_iter()
            .map(|op| (op, Model::new(&spec(op, "unsigned", w, "", SHIFT_PORTS))))
            .collect();
        for _ in 0..3000 {
            let a = rng.word(w).low_u128();
            let s = (rng.next() % (w as u64 + 5)) as u32;
            for (op, m) in &models {
                let o = eval(m, Word::from_u128(a), Word::from_u64(s as u64));
                let y = o.result.low_u128();
                let expect = match *op {
                    "shl" => a.checked_shl(s).unwrap_or(0) & mask,
                    "shr" => a.checked_shr(s).unwrap_or(0),
                    // Rotating within w bits: rotate a w-bit value held in the low bits.
                    "rol" => rot(a, s % w, w, true),
                    _ => rot(a, s % w, w, false),
                };
                assert_eq!(y, expect, "{op} w{w} a={a:#x} s={s}");
                if w == 128 {
                    let std = match *op {
                        "rol" => a.rotate_left(s),
                        "ror" => a.rotate_right(s),
                        _ => y,
                    };
                    assert_eq!(y, std, "{op} against u128::rotate_*");
                }
                // The bit shifted out last (Rust: overflowing shifts keep none; compute it
                // from checked_shr of the original, common practice).
                let carry = match *op {
                    "shl" if (1..=w).contains(&s) => (a >> (w - s)) & 1 == 1,
                    "shr" if (1..=w).contains(&s) => (a >> (s - 1)) & 1 == 1,
                    "rol" => s != 0 && y & 1 == 1,
                    "ror" => s != 0 && (y >> (w - 1)) & 1 == 1,
                    _ => false,
                };
                assert_eq!(o.carry_out, carry, "{op} w{w} a={a:#x} s={s} carry");
            }
        }
    }
    for w in [8u32, 16, 32, 64] {
        let m = Model::new(&spec("rol", "unsigned", w, "", SHIFT_PORTS));
        for _ in 0..2000 {
            let a = rng.word(w).low_u64();
            let s = (rng.next() % 200) as u32;
            let y = eval(&m, Word::from_u64(a), Word::from_u64(s as u64 & 0xff))
                .result
                .low_u64();
            let amount = (s & ((1 << arithvec::default_amount_width(w)) - 1)) % w;
            let expect = match w {
                8 => (a as u8).rotate_left(amount) as u64,
                16 => (a as u16).rotate_left(amount) as u64,
                32 => (a as u32).rotate_left(amount) as u64,
                _ => a.rotate_left(amount),
            };
            assert_eq!(y, expect, "rol w{w} against u{w}::rotate_left");
        }
    }
}

fn rot(a: u128, k: u32, w: u32, left: bool) -> u128 {
    let mask = if w == 128 {
        u128::MAX
    } else {
        (1u128 << w) - 1
    };
    if k == 0 {
        return a;
    }
    let (x, y) = if left { (k, w - k) } else { (w - k, k) };
    ((a << x) | (a >> y)) & mask
}

/// i64/u64 `wrapping_mul` and `overflowing_mul`, and i128/u128 `checked_mul`, against an
/// N-bit result (result_width = N, low part) at 8..64 bits, and the full product at 8..64.
#[test]
fn mul_matches_rust_std() {
    let mut rng = Lcg(0x5eed_0002);
    for w in [8u32, 16, 32, 64] {
        let narrow = |enc: &str| {
            Model::new(&spec(
                "mul",
                enc,
                w,
                &format!("result_width = {w}"),
                "a = \"a\"\nb = \"b\"\nresult = \"p\"\noverflow = \"v\"",
            ))
        };
        let full = |enc: &str| {
            Model::new(&spec(
                "mul",
                enc,
                w,
                "",
                "a = \"a\"\nb = \"b\"\nresult = \"p\"",
            ))
        };
        let (tn, un, tf, uf) = (
            narrow("twos"),
            narrow("unsigned"),
            full("twos"),
            full("unsigned"),
        );
        let sh = 64 - w;
        for _ in 0..5000 {
            let (a, b) = (rng.word(w).low_u64(), rng.word(w).low_u64());
            let (sa, sb) = (((a << sh) as i64) >> sh, ((b << sh) as i64) >> sh);
            let mask = u64::MAX >> sh;
            // Signed: i64 product, then does it fit in w bits?
            let exact = sa as i128 * sb as i128;
            let fits = exact >= -(1i128 << (w - 1)) && exact < (1i128 << (w - 1));
            let o = eval(&tn, Word::from_u64(a), Word::from_u64(b));
            assert_eq!(o.result.low_u64(), sa.wrapping_mul(sb) as u64 & mask);
            assert_eq!(o.overflow, !fits, "twos w{w} {sa}*{sb}");
            if w == 64 {
                assert_eq!(o.overflow, sa.overflowing_mul(sb).1, "i64::overflowing_mul");
            }
            let o = eval(&un, Word::from_u64(a), Word::from_u64(b));
            assert_eq!(o.result.low_u64(), a.wrapping_mul(b) & mask);
            let uexact = a as u128 * b as u128;
            assert_eq!(o.overflow, uexact >> w != 0, "unsigned w{w}");
            if w == 64 {
                assert_eq!(o.overflow, a.overflowing_mul(b).1, "u64::overflowing_mul");
            }
            let o = eval(&tf, Word::from_u64(a), Word::from_u64(b));
            let p2 = (exact as u128)
                & if w == 64 {
                    u128::MAX
                } else {
                    (1u128 << (2 * w)) - 1
                };
            assert_eq!(o.result.low_u128(), p2, "full twos w{w}");
            assert_eq!(
                (sa as i128).checked_mul(sb as i128),
                Some(exact),
                "i128::checked_mul"
            );
            let o = eval(&uf, Word::from_u64(a), Word::from_u64(b));
            assert_eq!(o.result.low_u128(), uexact, "full unsigned w{w}");
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

fn pattern(v: &BigInt, width: u32) -> BigUint {
    let m = BigInt::one() << width;
    (((v % &m) + &m) % &m).to_biguint().unwrap()
}

/// num-bigint at random widths up to 512: the full product, the low and high halves of a
/// narrower result with its overflow, and signed x unsigned (num-bigint's BigInt `*`, `>>`).
#[test]
fn mul_matches_num_bigint_at_random_widths() {
    let mut rng = Lcg(0x5eed_0003);
    for _ in 0..400 {
        let w = 1 + (rng.next() % 512) as u32;
        let r = 1 + (rng.next() % (2 * w as u64).min(512)) as u32;
        for (enc, signedness) in [
            ("twos", "signed"),
            ("twos", "signed_unsigned"),
            ("unsigned", ""),
        ] {
            for part in ["low", "high"] {
                let mut extra = format!("result_width = {r}\n");
                let mut conv = String::new();
                if r < 2 * w {
                    conv.push_str(&format!("result_part = \"{part}\"\n"));
                } else if part == "high" {
                    continue;
                }
                if !signedness.is_empty() {
                    conv.push_str(&format!("signedness = \"{signedness}\"\n"));
                }
                if !conv.is_empty() {
                    extra = format!("{extra}\n[conventions]\n{conv}");
                }
                // [conventions] must follow [ports] in this helper's layout.
                let text = format!(
                    "name = \"o\"\noperation = \"mul\"\nwidth = {w}\nencoding = \"{enc}\"\n{}\n[ports]\na = \"a\"\nb = \"b\"\nresult = \"p\"\n{}",
                    extra.lines().next().unwrap(),
                    extra.lines().skip(1).collect::<Vec<_>>().join("\n")
                );
                let s = Spec::parse(&text, "o.toml").unwrap();
                assert_eq!(
                    s.encoding,
                    if enc == "twos" {
                        Encoding::Twos
                    } else {
                        Encoding::Unsigned
                    }
                );
                let m = Model::new(&s);
                for _ in 0..5 {
                    let (a, b) = (rng.word(w), rng.word(w));
                    let va = to_big(&a, w, enc == "twos");
                    let vb = to_big(&b, w, signedness == "signed");
                    let product = va * vb;
                    let high = s.options.unwrap().result_part == Some(ResultPart::High);
                    let expect = if high {
                        pattern(&(product.clone() >> (2 * w - r)), r)
                    } else {
                        pattern(&product, r)
                    };
                    let got = to_big(&eval(&m, a, b).result, r, false)
                        .to_biguint()
                        .unwrap();
                    assert_eq!(got, expect, "mul {enc} {signedness} w{w} r{r} {part}");
                }
            }
        }
    }
}
