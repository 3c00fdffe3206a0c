//! Directed-vector constructors of the shift, rotate and multiply classes (see
//! `classes::ext`). Each bin gets a short list of candidates solved from its definition (an
//! amount and an operand bit for a shifter, powers of two and extremes for a product boundary,
//! the three recoder bits for a Booth digit); the generator keeps the first one the
//! classifier confirms. No search, no randomness.

use crate::arith::bits::{Bits, Wide};
use crate::arith::model::Inputs;
use crate::arith::word::Word;
use crate::corners::classes::{
    alternating, booth_digits, booth_operand, Catalogue, ExtKind, Kind, Operand, Special,
};
use crate::spec::{Encoding, Operation, Signal, Signedness, Spec};

/// Candidates for bin `k` of class `class` of an extended operation.
pub(crate) fn candidates(cat: &Catalogue, spec: &Spec, class: usize, k: u32) -> Vec<Inputs> {
    let c = &cat.classes()[class];
    let model = cat.model();
    let Some(unit) = model.unit() else {
        return Vec::new();
    };
    let w = spec.width;
    let ones = Word::ones(w);
    let top = Word::bit_mask(w - 1);
    let pair = |a: Word, b: Word| Inputs {
        a,
        b,
        ..Inputs::default()
    };
    let code_or = |s: Special, d: Word| s.code(model).unwrap_or(d);
    let mut out: Vec<Inputs> = Vec::new();
    if spec.operation.is_shift() {
        let n = w as u64;
        let aw = spec.signal_width(Signal::Amount);
        let max = if aw >= 64 { u64::MAX } else { (1u64 << aw) - 1 };
        let shift = |a: Word, s: u64| pair(a, Word::from_u64(s));
        match &c.kind {
            Kind::Special(_, _, code) => out.extend([shift(*code, 0), shift(*code, 1)]),
            Kind::Alternating(..) => {
                let p = alternating::<Wide>(w).to_word();
                out.push(shift(if k == 0 { p } else { p.not(w) }, 0));
            }
            Kind::WalkingOne(_) => out.push(shift(Word::bit_mask(k), 0)),
            Kind::WalkingZero(_) => out.push(shift(Word::bit_mask(k).not(w), 0)),
            Kind::ResultPattern(_, code) => out.push(shift(*code, 0)),
            Kind::ResultWalkingOne => out.push(shift(Word::bit_mask(k), 0)),
            Kind::ResultBits => {
                out.push(shift(if k % 2 == 1 { ones } else { Word::ZERO }, 0));
            }
            Kind::ResultZeroFromNonzero => {
                let mut zeros = vec![Word::ZERO];
                zeros.extend(Special::Zero.code(model));
                zeros.extend(Special::NegativeZero.code(model));
                for s in [1, 2, n.saturating_sub(1), n, n + 1, max] {
                    let c = (s % n) as u32;
                    for &z in &zeros {
                        let zw = Wide::from_word(&z);
                        let rot = |k: u32| {
                            if k == 0 {
                                z
                            } else {
                                zw.shl(k).or(zw.shr(w - k)).mask(w).to_word()
                            }
                        };
                        let sc = s.min(n) as u32;
                        for a in [
                            top,
                            Word::from_u64(1),
                            ones,
                            rot(c),
                            rot((w - c) % w),
                            zw.shr(sc).to_word(),
                            zw.shl(sc).mask(w).to_word(),
                        ] {
                            out.push(shift(a, s));
                        }
                    }
                }
            }
            Kind::Ext(ExtKind::ShiftAmount) => {
                let s = if k as u64 <= n { k as u64 } else { max };
                out.push(shift(alternating::<Wide>(w).to_word(), s));
            }
            Kind::Ext(ExtKind::ShiftOutBit) => {
                let (p, v) = (k / 2, k % 2 == 1);
                let counts: Vec<u64> = match spec.operation {
                    Operation::Shl => vec![n - p as u64],
                    Operation::Shr | Operation::Sra => vec![p as u64 + 1],
                    Operation::Rol => vec![(n - p as u64) % n, n],
                    _ => vec![(p as u64 + 1) % n, n],
                };
                let bit = Word::bit_mask(p);
                let operands = if v {
                    [bit, ones]
                } else {
                    [Word::ZERO, bit.not(w)]
                };
                for s in counts {
                    for a in operands {
                        out.push(shift(a, s));
                    }
                }
            }
            Kind::Ext(ExtKind::SignFill) => {
                let counts = if k < w {
                    vec![k as u64 + 1]
                } else {
                    vec![n + 1, max]
                };
                for s in counts {
                    out.extend([shift(top, s), shift(ones, s)]);
                }
            }
            _ => {}
        }
        for v in &mut out {
            v.b = v.b.masked(aw);
        }
        return out;
    }

    // mul
    let one = code_or(Special::One, Word::from_u64(1));
    let zero = code_or(Special::Zero, Word::ZERO);
    let signed_b = unit.options.signedness == Some(Signedness::Signed)
        || spec.encoding == Encoding::SignMagnitude;
    // The pattern of +-(2^i + d) as operand a (signed: b) reads it, when it has one.
    let power = |i: u32, d: i32, negative: bool, on_b: bool| -> Option<Word> {
        let v = Wide::single_bit(i).add(Wide::from_word(&Word::from_u64(d as i64 as u64)).sext(64));
        if v.is_negative() || v.is_zero() {
            return None;
        }
        if on_b && !signed_b {
            let fits = v.shr(w).is_zero();
            return (!negative && fits).then(|| v.to_word());
        }
        model
            .encode_value(if negative { v.neg() } else { v })
            .map(|p| p.to_word())
    };
    let mut extremes: Vec<Word> = Vec::new();
    for s in [
        Special::Zero,
        Special::One,
        Special::MinusOne,
        Special::Min,
        Special::Max,
    ] {
        if let Some(c) = s.code(model) {
            extremes.push(c);
        }
    }
    extremes.extend([ones, top]);
    match &c.kind {
        Kind::Special(operand, _, code) => match operand {
            Operand::A => out.extend([pair(*code, *code), pair(*code, one), pair(*code, zero)]),
            Operand::B => out.extend([pair(*code, *code), pair(one, *code), pair(zero, *code)]),
        },
        Kind::Alternating(operand, _) => {
            let p = alternating::<Wide>(w).to_word();
            let p = if k == 0 { p } else { p.not(w) };
            out.push(match operand {
                Operand::A => pair(p, one),
                Operand::B => pair(one, p),
            });
        }
        Kind::WalkingOne(operand) | Kind::WalkingZero(operand) => {
            let bit = Word::bit_mask(k);
            let x = if matches!(c.kind, Kind::WalkingOne(_)) {
                bit
            } else {
                bit.not(w)
            };
            out.push(match operand {
                Operand::A => pair(x, one),
                Operand::B => pair(one, x),
            });
        }
        Kind::Ext(ExtKind::MulPairs(codes)) => {
            let len = codes.len() as u32;
            out.push(pair(codes[(k / len) as usize], codes[(k % len) as usize]));
        }
        Kind::Ext(ExtKind::MulBoundary) => {
            let r = unit.result_width() as i64;
            for e in (r - 3).max(0)..=r {
                for i in 0..w.min(e as u32 + 1) {
                    let j = e as u32 - i;
                    if j >= w {
                        continue;
                    }
                    for (na, nb) in [(false, false), (true, false), (false, true), (true, true)] {
                        for da in [0, -1, 1] {
                            for db in [0, -1, 1] {
                                if let (Some(a), Some(b)) =
                                    (power(i, da, na, false), power(j, db, nb, true))
                                {
                                    out.push(pair(a, b));
                                }
                            }
                        }
                    }
                }
            }
            for &a in &extremes {
                for &b in &extremes {
                    out.push(pair(a, b));
                }
            }
        }
        Kind::Ext(ExtKind::BoothDigits) => {
            let (digits, _) = booth_digits(unit);
            let (i, d) = (k / 5, k as i32 % 5 - 2);
            if i < digits {
                let (_, bits, _) = booth_operand::<Wide>(unit, Wide::zero());
                for t in 0..8u32 {
                    let (t2, t1, t0) = (t >> 2 & 1, t >> 1 & 1, t & 1);
                    if -2 * t2 as i32 + t1 as i32 + t0 as i32 != d {
                        continue;
                    }
                    let mut b = Word::ZERO;
                    for (pos, on) in [
                        (2 * i as i64 + 1, t2),
                        (2 * i as i64, t1),
                        (2 * i as i64 - 1, t0),
                    ] {
                        if pos >= 0 && (pos as u32) < bits && on == 1 {
                            b.set_bit(pos as u32, true);
                        }
                    }
                    out.push(pair(one, b));
                }
            }
        }
        Kind::Ext(ExtKind::MulSigns) => {
            let (sa, sb) = (k / 2 == 1, k % 2 == 1);
            let pick = |s: bool| if s { [top, ones] } else { [Word::ZERO, one] };
            for a in pick(sa) {
                for b in pick(sb) {
                    out.push(pair(a, b));
                }
            }
        }
        _ => {}
    }
    for v in &mut out {
        v.a = v.a.masked(w);
        v.b = v.b.masked(w);
    }
    out
}

#[cfg(test)]
mod tests {
    use crate::corners::generate::Generator;
    use crate::corners::reachability::assert_reachability_matches_enumeration;
    use crate::spec::{
        Encoding, LargeAmount, NegativeZero, Operation, ResultPart, Signal, Signedness, Spec,
        ZeroFlag,
    };

    /// The extended spec shapes the exhaustive test covers at width `w`.
    fn variants(w: u32) -> Vec<Spec> {
        let mut out = Vec::new();
        for op in [
            Operation::Shl,
            Operation::Shr,
            Operation::Rol,
            Operation::Ror,
        ] {
            for enc in Encoding::ALL {
                let s = Spec::with_defaults(op, enc, w);
                if enc.has_negative_zero() {
                    let mut p = s.clone();
                    p.conventions.negative_zero = NegativeZero::Positive;
                    p.conventions.zero_flag = ZeroFlag::Bits;
                    out.push(p);
                }
                out.push(s);
            }
        }
        out.push(Spec::with_defaults(Operation::Sra, Encoding::Twos, w));
        for op in [Operation::Shl, Operation::Shr, Operation::Sra] {
            let mut s = Spec::with_defaults(op, Encoding::Twos, w);
            if w.is_power_of_two() {
                s.options.as_mut().unwrap().large_amount = Some(LargeAmount::Mask);
                out.push(s.clone());
            }
            s.options.as_mut().unwrap().amount_width = Some(w + 2);
            s.options.as_mut().unwrap().large_amount = Some(LargeAmount::Saturate);
            out.push(s);
        }
        for enc in [Encoding::Unsigned, Encoding::Twos, Encoding::SignMagnitude] {
            let base = Spec::with_defaults(Operation::Mul, enc, w);
            out.push(base.clone());
            for r in 1..2 * w {
                let mut s = base.clone();
                s.options.as_mut().unwrap().result_width = Some(r);
                s.options.as_mut().unwrap().result_part = Some(ResultPart::Low);
                out.push(s.clone());
                if enc != Encoding::SignMagnitude {
                    s.options.as_mut().unwrap().result_part = Some(ResultPart::High);
                    s.ports = crate::spec::Ports::default();
                    for (sig, name) in base.inputs().into_iter().chain(base.outputs()) {
                        if sig != Signal::Overflow {
                            s.ports.set(sig, name);
                        }
                    }
                    out.push(s);
                }
            }
            if enc == Encoding::Twos {
                let mut s = base.clone();
                s.options.as_mut().unwrap().signedness = Some(Signedness::SignedUnsigned);
                out.push(s.clone());
                s.options.as_mut().unwrap().result_width = Some(w);
                s.options.as_mut().unwrap().result_part = Some(ResultPart::Low);
                out.push(s);
            }
        }
        out
    }

    /// At widths 1..=5 every bin some input hits is reachable (a constructor built a vector
    /// for it) and every reachable bin is hit: exhaustive over all operands and amounts.
    #[test]
    fn extended_reachability_matches_exhaustive_enumeration() {
        assert_reachability_matches_enumeration(
            1..=5,
            variants,
            |spec, w| {
                let bw = if spec.operation.is_shift() {
                    spec.signal_width(Signal::Amount)
                } else {
                    w
                };
                1u64 << bw
            },
            |spec, w| format!("{} w{w} {:?}", spec.name, spec.options),
        );
    }

    /// The directed set hits every reachable bin at wide and odd widths too.
    #[test]
    fn extended_directed_sets_hit_every_reachable_bin() {
        for w in [8, 32, 33, 64, 100] {
            for op in Operation::EXTENDED {
                let enc = if op == Operation::Sra {
                    Encoding::Twos
                } else if op == Operation::Mul {
                    Encoding::SignMagnitude
                } else {
                    Encoding::Unsigned
                };
                for enc in [enc, Encoding::Twos] {
                    let spec = Spec::with_defaults(op, enc, w);
                    let g = Generator::new(&spec, Some(0), None);
                    let cat = g.catalogue();
                    let mut reachable = 0;
                    for bin in 0..cat.bin_count() {
                        if cat.is_reachable(bin) {
                            reachable += 1;
                            assert!(g.directed_hits(bin) > 0, "{op} w{w}: {}", cat.bin_id(bin));
                        }
                    }
                    assert!(reachable > w as usize, "{op} {enc} w{w}: {reachable} bins");
                }
            }
        }
    }
}
