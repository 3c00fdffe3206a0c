//! The bulk oracle: more than a million random cases of the golden model against num-bigint
//! (`BigInt` `+`, `-`, `*`, `/`, `%`, `<<`, `>>`, the library's documented arbitrary-precision
//! semantics) at random widths 1..=512, split over five tests so the harness runs them in
//! parallel. Each test counts its cases and asserts the count, so a loop that silently ran
//! short fails. The exact per-operation rules are tested in model_oracle*.rs; this file is
//! about volume.

use arithvec::{Encoding, Inputs, Model, Operation, Signal, Spec, Word};
use num_bigint::{BigInt, BigUint, Sign};
use num_traits::{One, Zero};

/// Cases per test; five tests make 1,300,000.
const CASES: u64 = 260_000;

/// xorshift64*, so the tests need no seed files.
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
        let keep = if self.next().is_multiple_of(4) {
            1 + (self.next() % width as u64) as u32
        } else {
            width
        };
        Word::from_limbs(limbs).masked(keep)
    }
    fn width(&mut self) -> u32 {
        1 + (self.next() % 512) as u32
    }
}

fn unsigned(w: &Word) -> BigInt {
    let mut bytes = Vec::with_capacity(64);
    for i in 0..8 {
        bytes.extend_from_slice(&w.extract(64 * i, 64).low_u64().to_le_bytes());
    }
    BigInt::from_biguint(Sign::Plus, BigUint::from_bytes_le(&bytes))
}

fn value(w: &Word, width: u32, signed: bool) -> BigInt {
    let v = unsigned(&w.masked(width));
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

fn eval(m: &Model, a: Word, b: Word) -> arithvec::Outputs {
    m.evaluate(&Inputs {
        a,
        b,
        ..Inputs::default()
    })
}

/// Runs `per_width` cases at each of many random widths until `CASES` are done.
fn bulk(seed: u64, ops: &[(Operation, Encoding)], mut case: impl FnMut(&Spec, &Model, &mut Rng)) {
    let mut rng = Rng(seed);
    let mut done = 0u64;
    while done < CASES {
        let w = rng.width();
        for &(op, enc) in ops {
            let s = Spec::with_defaults(op, enc, w);
            let m = Model::new(&s);
            for _ in 0..50 {
                case(&s, &m, &mut rng);
                done += 1;
            }
        }
    }
    assert!(done >= CASES, "{done} cases");
}

#[test]
fn bulk_add_sub_against_num_bigint() {
    let ops = [
        (Operation::Add, Encoding::Unsigned),
        (Operation::Add, Encoding::Twos),
        (Operation::Sub, Encoding::Unsigned),
        (Operation::Sub, Encoding::Twos),
    ];
    bulk(0xb01c_0001, &ops, |s, m, rng| {
        let w = s.width;
        let signed = s.encoding == Encoding::Twos;
        let (a, b) = (rng.word(w), rng.word(w));
        let (va, vb) = (value(&a, w, signed), value(&b, w, signed));
        let t = if s.operation == Operation::Add {
            &va + &vb
        } else {
            &va - &vb
        };
        let o = eval(m, a, b);
        assert_eq!(unsigned(&o.result), pattern(&t, w), "{} w{w}", s.name);
        let (lo, hi) = if signed {
            (-(BigInt::one() << (w - 1)), (BigInt::one() << (w - 1)) - 1)
        } else {
            (BigInt::zero(), (BigInt::one() << w) - 1)
        };
        assert_eq!(o.overflow, t < lo || t > hi, "{} w{w} overflow", s.name);
    });
}

#[test]
fn bulk_mul_against_num_bigint() {
    let ops = [
        (Operation::Mul, Encoding::Unsigned),
        (Operation::Mul, Encoding::Twos),
    ];
    bulk(0xb01c_0002, &ops, |s, m, rng| {
        let w = s.width;
        let r = s.signal_width(Signal::Result);
        let signed = s.encoding == Encoding::Twos;
        let (a, b) = (rng.word(w), rng.word(w));
        let p = value(&a, w, signed) * value(&b, w, signed);
        let o = eval(m, a, b);
        assert_eq!(unsigned(&o.result), pattern(&p, r), "{} w{w} r{r}", s.name);
    });
}

#[test]
fn bulk_divrem_against_num_bigint() {
    let ops = [
        (Operation::DivRem, Encoding::Unsigned),
        (Operation::DivRem, Encoding::Twos),
    ];
    bulk(0xb01c_0003, &ops, |s, m, rng| {
        let w = s.width;
        let signed = s.encoding == Encoding::Twos;
        let (a, b) = (rng.word(w), rng.word(w));
        let (va, vb) = (value(&a, w, signed), value(&b, w, signed));
        let o = eval(m, a, b);
        assert_eq!(o.div_by_zero, vb.is_zero());
        if vb.is_zero() {
            // div_by_zero = "all_ones" (the default): quotient all ones, remainder = a.
            assert_eq!(unsigned(&o.result), pattern(&BigInt::from(-1), w));
            assert_eq!(unsigned(&o.remainder), pattern(&va, w));
        } else {
            // BigInt `/` and `%` truncate toward zero (num-bigint's documentation).
            let (q, r) = (&va / &vb, &va % &vb);
            assert_eq!(
                unsigned(&o.result),
                pattern(&q, w),
                "{} w{w} {va}/{vb}",
                s.name
            );
            assert_eq!(
                unsigned(&o.remainder),
                pattern(&r, w),
                "{} w{w} {va}%{vb}",
                s.name
            );
        }
    });
}

#[test]
fn bulk_shifts_against_num_bigint() {
    let ops = [
        (Operation::Shl, Encoding::Unsigned),
        (Operation::Shr, Encoding::Unsigned),
        (Operation::Sra, Encoding::Twos),
        (Operation::Rol, Encoding::Unsigned),
        (Operation::Ror, Encoding::Unsigned),
    ];
    bulk(0xb01c_0004, &ops, |s, m, rng| {
        let w = s.width;
        let aw = s.signal_width(Signal::Amount);
        let a = rng.word(w);
        let k = rng.next() % (w as u64 + 3);
        let k = if aw < 64 { k & ((1 << aw) - 1) } else { k };
        let o = eval(m, a, Word::from_u64(k));
        let ua = unsigned(&a);
        let k32 = k as usize;
        let expect = match s.operation {
            // The default large_amount = "saturate": an amount of N or more shifts all out.
            Operation::Shl => pattern(&(&ua << k32), w),
            Operation::Shr => &ua >> k32,
            Operation::Sra => pattern(&(value(&a, w, true) >> k32), w),
            Operation::Rol | Operation::Ror => {
                let r = (k % w as u64) as usize;
                let left = if s.operation == Operation::Rol {
                    r
                } else {
                    (w as usize - r) % w as usize
                };
                pattern(&((&ua << left) | (&ua >> (w as usize - left))), w)
            }
            _ => unreachable!(),
        };
        assert_eq!(unsigned(&o.result), expect, "{} w{w} k{k}", s.name);
    });
}

/// add_sat and sub_sat in every encoding: the decoded result equals the exact BigInt sum or
/// difference clamped to the encoding's range, and `saturated` says whether it was clamped.
/// Unsigned, twos and offset have one pattern per value, so their patterns are compared too.
#[test]
fn bulk_sat_against_num_bigint() {
    let mut ops = Vec::new();
    for enc in [
        Encoding::Unsigned,
        Encoding::Twos,
        Encoding::Ones,
        Encoding::SignMagnitude,
        Encoding::Offset,
    ] {
        ops.push((Operation::AddSat, enc));
        ops.push((Operation::SubSat, enc));
    }
    bulk(0xb01c_0005, &ops, |s, m, rng| {
        let w = s.width;
        let enc = s.encoding;
        let (a, b) = (rng.word(w), rng.word(w));
        let (va, vb) = (decoded(&a, w, enc), decoded(&b, w, enc));
        let t = if s.operation == Operation::AddSat {
            &va + &vb
        } else {
            &va - &vb
        };
        let top = BigInt::one() << (w - 1);
        let (lo, hi) = match enc {
            Encoding::Unsigned => (BigInt::zero(), (BigInt::one() << w) - 1),
            Encoding::Twos | Encoding::Offset => (-top.clone(), &top - 1),
            _ => (BigInt::one() - &top, &top - 1),
        };
        let clamped = t.clone().max(lo).min(hi);
        let o = eval(m, a, b);
        let got = decoded(&o.result, w, enc);
        assert_eq!(got, clamped, "{} w{w} {va} {vb}", s.name);
        assert_eq!(
            o.get(Signal::Saturated).bit(0),
            t != clamped,
            "{} w{w}",
            s.name
        );
        if matches!(enc, Encoding::Unsigned | Encoding::Twos) {
            assert_eq!(unsigned(&o.result), pattern(&clamped, w), "{} w{w}", s.name);
        }
        if enc == Encoding::Offset {
            assert_eq!(unsigned(&o.result), pattern(&(&clamped + &top), w));
        }
    });
}

/// The value of a w-bit pattern under `enc` (DEVELOPERS.md, "Values of an N-bit pattern").
fn decoded(p: &Word, w: u32, enc: Encoding) -> BigInt {
    let u = unsigned(&p.masked(w));
    let top = BigInt::one() << (w - 1);
    let msb = p.bit(w - 1);
    match enc {
        Encoding::Unsigned => u,
        Encoding::Twos => value(p, w, true),
        Encoding::Ones if msb => u - ((BigInt::one() << w) - 1),
        Encoding::SignMagnitude if msb => -(u - top),
        Encoding::Offset => u - top,
        _ => u,
    }
}
