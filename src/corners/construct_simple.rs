//! Directed-vector constructors of abs, min, max and the logic operations (see
//! `classes::simple`). A result pattern X is made from operands chosen per operation (X and
//! all ones for and, X and 0 for or, xor and pass, ~X for not, X twice for min and max, X or
//! its negation for abs); the other bins take their operands from their definitions, with a
//! small grid of special patterns as the fallback. The generator keeps the first candidate
//! the classifier confirms. No search, no randomness.

use crate::arith::bits::{Bits, Wide};
use crate::arith::model::Inputs;
use crate::arith::word::Word;
use crate::corners::classes::{alternating, Catalogue, ExtKind, Kind, Operand, Special};
use crate::spec::{Operation, Spec};

/// Candidates for bin `k` of class `class`.
pub(crate) fn candidates(cat: &Catalogue, spec: &Spec, class: usize, k: u32) -> Vec<Inputs> {
    let c = &cat.classes()[class];
    let model = cat.model();
    let w = spec.width;
    let op = spec.operation;
    let ones = Word::ones(w);
    let top = Word::bit_mask(w - 1);
    let one = Word::from_u64(1).masked(w);
    let pair = |a: Word, b: Word| Inputs {
        a,
        b,
        ..Inputs::default()
    };
    // Operands whose result is the pattern `x`.
    let result_is = |x: Word| -> Vec<Inputs> {
        match op {
            Operation::And => vec![pair(x, ones)],
            Operation::Or | Operation::Xor | Operation::Pass => vec![pair(x, Word::ZERO)],
            Operation::Not => vec![pair(x.not(w), Word::ZERO)],
            Operation::Min | Operation::Max => vec![pair(x, x)],
            _ => {
                let v = crate::arith::encoding::decode(Wide::from_word(&x), w, spec.encoding);
                let mut out = vec![pair(x, Word::ZERO)];
                if let Some(p) = model.encode_value(v.neg()) {
                    out.push(pair(p.to_word(), Word::ZERO));
                }
                out
            }
        }
    };
    let mut grid: Vec<Word> = vec![Word::ZERO, one, top, ones, one.not(w), top.not(w)];
    for s in [
        Special::Zero,
        Special::Max,
        Special::Min,
        Special::MinusOne,
        Special::NegativeZero,
    ] {
        grid.extend(s.code(model));
    }
    let all_pairs = || {
        let mut out = Vec::new();
        for &x in &grid {
            for &y in &grid {
                out.push(pair(x, if op.is_binary() { y } else { Word::ZERO }));
            }
        }
        out
    };
    let code = |s: Special| s.code(model);
    let mut out: Vec<Inputs> = Vec::new();
    match &c.kind {
        Kind::Special(operand, _, code) => match operand {
            Operand::A => out.extend([pair(*code, ones), pair(*code, Word::ZERO)]),
            Operand::B => out.extend([pair(ones, *code), pair(Word::ZERO, *code)]),
        },
        Kind::Alternating(operand, _) => {
            let p = alternating::<Wide>(w).to_word();
            let p = if k == 0 { p } else { p.not(w) };
            out.push(match operand {
                Operand::A => pair(p, Word::ZERO),
                Operand::B => pair(Word::ZERO, p),
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
                Operand::A => pair(x, Word::ZERO),
                Operand::B => pair(Word::ZERO, x),
            });
        }
        Kind::ResultPattern(_, code) => out.extend(result_is(*code)),
        Kind::ResultWalkingOne => out.extend(result_is(Word::bit_mask(k))),
        Kind::ResultBits => {
            let (p, v) = (k / 2, k % 2 == 1);
            let bit = Word::bit_mask(p);
            for x in if v {
                [ones, bit]
            } else {
                [Word::ZERO, bit.not(w)]
            } {
                out.extend(result_is(x));
            }
            out.extend(all_pairs());
        }
        Kind::ResultZeroFromNonzero => out.extend(all_pairs()),
        Kind::Ext(ExtKind::BitPairs) => {
            let (i, x, y) = (k / 4, k / 2 % 2 == 1, k % 2 == 1);
            let bit = Word::bit_mask(i);
            let pick = |on: bool, alt: bool| match (on, alt) {
                (true, false) => ones,
                (true, true) => bit,
                (false, false) => Word::ZERO,
                (false, true) => bit.not(w),
            };
            out.extend([
                pair(pick(x, false), pick(y, true)),
                pair(pick(x, true), pick(y, false)),
            ]);
        }
        Kind::Ext(ExtKind::ValueOrder(codes)) => {
            let i = |n: usize| codes.get(n).copied().unwrap_or(Word::ZERO);
            match k {
                0 => out.extend([pair(i(0), i(1)), pair(Word::ZERO, one)]),
                1 => out.extend([pair(i(1), i(0)), pair(one, Word::ZERO)]),
                2 => out.push(pair(
                    alternating::<Wide>(w).to_word(),
                    alternating::<Wide>(w).to_word(),
                )),
                3 => out.push(pair(i(0), i(1))),
                4 => out.push(pair(i(1), i(0))),
                5 => out.push(pair(i(2), i(3))),
                _ => out.push(pair(i(3), i(2))),
            }
            out.extend(all_pairs());
        }
        Kind::Ext(ExtKind::AbsCases(codes)) => {
            match k {
                0 => out.extend(code(Special::Max).map(|m| pair(m, Word::ZERO))),
                1 => out.extend(code(Special::MinusOne).map(|m| pair(m, Word::ZERO))),
                2 => out.extend(code(Special::Zero).map(|m| pair(m, Word::ZERO))),
                _ => out.push(pair(codes[(k - 3) as usize], Word::ZERO)),
            }
            out.extend(all_pairs());
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
    use crate::spec::{Encoding, Operation, Spec, ZeroFlag};

    const OPS: [Operation; 8] = [
        Operation::Abs,
        Operation::Min,
        Operation::Max,
        Operation::And,
        Operation::Or,
        Operation::Xor,
        Operation::Not,
        Operation::Pass,
    ];

    fn variants(w: u32) -> Vec<Spec> {
        let mut out = Vec::new();
        for op in OPS {
            for enc in Encoding::ALL {
                if op.refuses(enc).is_some() {
                    continue;
                }
                let s = Spec::with_defaults(op, enc, w);
                if op.is_logic() {
                    let mut bits = s.clone();
                    bits.conventions.zero_flag = ZeroFlag::Bits;
                    out.push(bits);
                }
                out.push(s);
            }
        }
        out
    }

    /// At widths 1..=5, in every encoding an operation accepts, every bin some input hits is
    /// reachable and every reachable bin is hit by the directed set: exhaustive.
    #[test]
    fn simple_reachability_matches_exhaustive_enumeration() {
        assert_reachability_matches_enumeration(
            1..=5,
            variants,
            |spec, w| {
                if spec.operation.is_binary() {
                    1u64 << w
                } else {
                    1
                }
            },
            |spec, w| format!("{} {:?} w{w}", spec.name, spec.conventions.zero_flag),
        );
    }

    /// At wide widths the operation's own class is reachable in every bin it defines.
    #[test]
    fn simple_directed_sets_hit_their_own_classes_at_wide_widths() {
        for w in [8, 33, 64, 100, 512] {
            for op in OPS {
                for enc in Encoding::ALL {
                    if op.refuses(enc).is_some() {
                        continue;
                    }
                    let spec = Spec::with_defaults(op, enc, w);
                    let g = Generator::new(&spec, Some(0), None);
                    let cat = g.catalogue();
                    for bin in 0..cat.bin_count() {
                        let id = cat.bin_id(bin);
                        let own = ["logic.", "minmax.", "abs.", "result.bits"]
                            .iter()
                            .any(|p| id.starts_with(p));
                        // abs never gives a negative result in ones and signmag, so its
                        // result.bits are checked by the exhaustive test only.
                        let abs_bits = op == Operation::Abs && id.starts_with("result.bits");
                        if own && !abs_bits && !id.contains("neg_zero") {
                            assert!(cat.is_reachable(bin), "{op} {enc} w{w}: {id}");
                            assert!(g.directed_hits(bin) > 0, "{op} {enc} w{w}: {id}");
                        }
                    }
                }
            }
        }
    }
}
