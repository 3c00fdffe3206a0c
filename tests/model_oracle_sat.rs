//! Oracle tests of add_sat and sub_sat against Rust's own `saturating_add` and
//! `saturating_sub` on i8..i128 and u8..u128 (the standard library's documented semantics:
//! "saturating at the numeric bounds instead of overflowing") at widths 8, 16, 32, 64 and 128,
//! with the `saturated` flag checked against `checked_add` / `checked_sub` returning None.
//! num-bigint at random widths up to 512 is in model_oracle_bulk.rs.

use arithvec::{Encoding, Inputs, Model, Operation, Signal, Spec, Word};

struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    /// A random w-bit pattern, often near the ends of the range (0, the top bit, all ones,
    /// max) so saturation happens in both directions.
    fn pattern(&mut self, w: u32) -> u128 {
        let mask = if w == 128 { u128::MAX } else { (1 << w) - 1 };
        let r = ((self.next() as u128) << 64 | self.next() as u128) & mask;
        let top = 1u128 << (w - 1);
        match self.next() % 8 {
            0 => top,
            1 => top - 1 - (self.next() % 4) as u128,
            2 => mask - (self.next() % 4) as u128,
            3 => (self.next() % 4) as u128,
            _ => r,
        }
    }
}

fn word(x: u128) -> Word {
    Word::from_u128(x)
}

/// Runs the model on (a, b): (result pattern, saturated).
fn eval(m: &Model, a: u128, b: u128) -> (u128, bool) {
    let o = m.evaluate(&Inputs {
        a: word(a),
        b: word(b),
        ..Inputs::default()
    });
    (o.result.low_u128(), o.get(Signal::Saturated).bit(0))
}

macro_rules! against_std {
    ($rng:expr, $w:expr, $u:ty, $i:ty) => {{
        let w: u32 = $w;
        let mask: u128 = if w == 128 { u128::MAX } else { (1 << w) - 1 };
        let specs = [
            (Operation::AddSat, Encoding::Unsigned),
            (Operation::SubSat, Encoding::Unsigned),
            (Operation::AddSat, Encoding::Twos),
            (Operation::SubSat, Encoding::Twos),
        ];
        let models: Vec<Model> = specs
            .iter()
            .map(|&(op, enc)| Model::new(&Spec::with_defaults(op, enc, w)))
            .collect();
        for _ in 0..20_000 {
            let (a, b) = ($rng.pattern(w), $rng.pattern(w));
            let (ua, ub) = (a as $u, b as $u);
            let (sa, sb) = (ua as $i, ub as $i);
            let want = [
                (ua.saturating_add(ub) as u128, ua.checked_add(ub).is_none()),
                (ua.saturating_sub(ub) as u128, ua.checked_sub(ub).is_none()),
                (
                    sa.saturating_add(sb) as $u as u128,
                    sa.checked_add(sb).is_none(),
                ),
                (
                    sa.saturating_sub(sb) as $u as u128,
                    sa.checked_sub(sb).is_none(),
                ),
            ];
            for (k, m) in models.iter().enumerate() {
                let (got, sat) = eval(m, a, b);
                assert_eq!(
                    (got & mask, sat),
                    want[k],
                    "{:?} {:?} w{w} a={a:#x} b={b:#x}",
                    specs[k].0,
                    specs[k].1
                );
            }
        }
    }};
}

#[test]
fn sat_ops_match_rust_saturating_arithmetic() {
    let mut rng = Rng(0x5a7_0001);
    against_std!(rng, 8, u8, i8);
    against_std!(rng, 16, u16, i16);
    against_std!(rng, 32, u32, i32);
    against_std!(rng, 64, u64, i64);
    against_std!(rng, 128, u128, i128);
}

/// Offset binary is two's complement with the top bit inverted (common practice, no source):
/// an offset add_sat is the two's-complement one with the operands' and result's top bits
/// inverted. The reference here is Rust's exact `i128` sum clamped with `i128::clamp` to the
/// N-bit signed range (the standard library's documented semantics).
#[test]
fn offset_sat_matches_rust_through_the_top_bit_inversion() {
    let mut rng = Rng(0x5a7_0002);
    for w in [8u32, 32, 64] {
        let top = 1u128 << (w - 1);
        let mask = (1u128 << w) - 1;
        let sext = |x: u128| ((x << (128 - w)) as i128) >> (128 - w);
        let (lo, hi) = (-(top as i128), top as i128 - 1);
        for op in [Operation::AddSat, Operation::SubSat] {
            let m = Model::new(&Spec::with_defaults(op, Encoding::Offset, w));
            for _ in 0..20_000 {
                let (a, b) = (rng.pattern(w), rng.pattern(w));
                let (sa, sb) = (sext(a ^ top), sext(b ^ top));
                // i128 holds the exact sum of two 64-bit values; clamp it as i64 would.
                let t = if op == Operation::AddSat {
                    sa + sb
                } else {
                    sa - sb
                };
                let clamped = t.clamp(lo, hi);
                let want = ((clamped as u128) & mask) ^ top;
                assert_eq!(
                    eval(&m, a, b),
                    (want, t != clamped),
                    "{op:?} w{w} {a:#x} {b:#x}"
                );
            }
        }
    }
}
