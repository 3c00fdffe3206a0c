//! Directed-vector constructors of the division classes (see `classes::divide`). Each bin
//! gets a short list of operand pairs solved from its definition (a power of two over 1 for
//! a quotient bit or a restoring step, max - 1 over max for the largest remainder, small
//! odd values with signs for the sign combinations); the generator keeps the first one the
//! classifier confirms. No search, no randomness.

use crate::arith::bits::{Bits, Wide};
use crate::arith::model::{Inputs, Model};
use crate::arith::word::Word;
use crate::corners::classes::{alternating, case_labels, Catalogue, ExtKind, Kind, Operand};
use crate::spec::Spec;

/// The pattern of value `v` (may be negative), when the unit's encoding has it.
fn value(model: &Model, v: i64) -> Option<Word> {
    model
        .encode_value(Wide::from_word(&Word::from_u64(v as u64)).sext(64))
        .map(|p| p.to_word())
}

/// The pattern of `sign * m` for a magnitude `m` given as a wide value.
fn signed(model: &Model, m: Wide, negative: bool) -> Option<Word> {
    model
        .encode_value(if negative { m.neg() } else { m })
        .map(|p| p.to_word())
}

/// Candidates for bin `k` of division class `class`.
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
    let val = |v: i64| value(model, v);
    let one = val(1).unwrap_or(Word::from_u64(1));
    let max = Wide::from_word(&model_max(model));
    let mut out: Vec<Inputs> = Vec::new();
    // Pairs of values, kept where both exist.
    let mut values = |list: &[(Option<Word>, Option<Word>)]| {
        for (a, b) in list {
            if let (Some(a), Some(b)) = (a, b) {
                out.push(pair(*a, *b));
            }
        }
    };
    let maxw = signed(model, max, false);
    let max_less_one = signed(model, max.sub(Wide::one()), false);
    let min = Some(model_min(model));
    match &c.kind {
        Kind::Special(operand, _, code) => match operand {
            Operand::A => values(&[
                (Some(*code), Some(one)),
                (Some(*code), Some(*code)),
                (Some(*code), Some(ones)),
            ]),
            Operand::B => values(&[
                (Some(one), Some(*code)),
                (Some(*code), Some(*code)),
                (Some(ones), Some(*code)),
            ]),
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
        Kind::Ext(ExtKind::DivCases) => match case_labels(unit)[k as usize] {
            "divisor_zero" => values(&[
                (Some(ones), Some(Word::ZERO)),
                (Some(top), Some(Word::ZERO)),
            ]),
            "dividend_zero" => values(&[
                (Some(Word::ZERO), Some(ones)),
                (Some(Word::ZERO), Some(one)),
            ]),
            "a_lt_b" => values(&[
                (max_less_one, maxw),
                (val(1), val(2)),
                (val(1), min),
                (val(-1), val(2)),
                (val(1), val(-2)),
            ]),
            "a_eq_b" => values(&[
                (maxw, maxw),
                (min, min),
                (val(1), val(1)),
                (val(-1), val(-1)),
            ]),
            "rem_zero" => values(&[
                (min, val(2)),
                (Some(top), val(2)),
                (val(2), val(2)),
                (val(-2), val(2)),
                (val(2), val(-2)),
                (val(-2), val(-2)),
                (min, min),
            ]),
            "rem_max" => values(&[
                (max_less_one, maxw),
                (val(1), val(2)),
                (val(-1), val(2)),
                (val(1), val(-2)),
                (val(-1), val(-2)),
                (val(2), val(3)),
            ]),
            "min_by_minus_one" => values(&[(min, val(-1))]),
            _ => values(&[
                (maxw, signed(model, max, true)),
                (val(1), val(-1)),
                (val(-1), val(1)),
            ]),
        },
        Kind::Ext(ExtKind::DivQuotientBit) => {
            let p = Wide::single_bit(k);
            let three = Wide::from_word(&Word::from_u64(3));
            values(&[
                (signed(model, p.mul(three).add(Wide::one()), false), val(3)),
                (Some(Word::bit_mask(k)), Some(one)),
                (Some(Word::bit_mask(k)), val(-1)),
            ]);
        }
        Kind::Ext(ExtKind::DivSigns) => {
            let (na, nb) = (k / 2 == 1, k % 2 == 1);
            let small = |m: i64| Wide::from_word(&Word::from_u64(m as u64));
            for (ma, mb) in [(max, small(2)), (small(3), small(2)), (small(1), small(2))] {
                values(&[(signed(model, ma, na), signed(model, mb, nb))]);
            }
            if na {
                values(&[(min, signed(model, small(3), nb))]);
            }
        }
        Kind::Ext(ExtKind::DivStep) => {
            let (i, step) = (k / 3, k % 3);
            let bit = Word::bit_mask(i);
            match step {
                0 | 2 => values(&[(Some(bit), Some(one)), (Some(bit), val(-1))]),
                _ => values(&[
                    (Some(bit), val(2)),
                    (Some(Word::ZERO), Some(one)),
                    (Some(Word::ZERO), Some(ones)),
                ]),
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

/// The largest value's pattern.
fn model_max(model: &Model) -> Word {
    let (w, enc) = (model.width(), model.encoding());
    crate::arith::encoding::max_value::<Wide>(w, enc).to_word()
}

/// The smallest value's pattern (0 for unsigned).
fn model_min(model: &Model) -> Word {
    let (w, enc) = (model.width(), model.encoding());
    let v = crate::arith::encoding::min_value::<Wide>(w, enc);
    model
        .encode_value(v)
        .map(|p| p.to_word())
        .unwrap_or(Word::ZERO)
}

#[cfg(test)]
mod tests {
    use crate::corners::generate::Generator;
    use crate::corners::reachability::assert_reachability_matches_enumeration;
    use crate::spec::{DivByZero, Encoding, Operation, Rounding, Spec};

    /// The division spec shapes the exhaustive test covers at width `w`.
    fn variants(w: u32) -> Vec<Spec> {
        let mut out = Vec::new();
        for op in [Operation::Div, Operation::Rem, Operation::DivRem] {
            for enc in [Encoding::Unsigned, Encoding::Twos] {
                for dz in [DivByZero::AllOnes, DivByZero::Zero, DivByZero::DontCare] {
                    let roundings: &[Option<Rounding>] = if enc == Encoding::Twos {
                        &[Some(Rounding::Truncate), Some(Rounding::Floor)]
                    } else {
                        &[None]
                    };
                    for &r in roundings {
                        let mut s = Spec::with_defaults(op, enc, w);
                        let o = s.options.as_mut().unwrap();
                        o.div_by_zero = Some(dz);
                        o.rounding = r;
                        out.push(s);
                    }
                }
            }
        }
        out
    }

    /// At widths 1..=6 every bin some input hits is reachable (a constructor built a vector
    /// for it) and every reachable bin is hit: exhaustive over all operand pairs.
    #[test]
    fn division_reachability_matches_exhaustive_enumeration() {
        assert_reachability_matches_enumeration(
            1..=6,
            variants,
            |_, w| 1u64 << w,
            |spec, w| format!("{} w{w} {:?}", spec.name, spec.options),
        );
    }

    /// At wide and odd widths every division class bin is reachable, so the directed set
    /// hits all of them (the classes have no bin that only small widths reach).
    #[test]
    fn division_directed_sets_hit_every_bin_at_wide_widths() {
        for w in [8, 32, 33, 64, 100, 512] {
            for enc in [Encoding::Unsigned, Encoding::Twos] {
                let spec = Spec::with_defaults(Operation::DivRem, enc, w);
                let g = Generator::new(&spec, Some(0), None);
                let cat = g.catalogue();
                for bin in 0..cat.bin_count() {
                    let id = cat.bin_id(bin);
                    if id.starts_with("div.") {
                        assert!(cat.is_reachable(bin), "{enc} w{w}: {id} unreachable");
                        assert!(g.directed_hits(bin) > 0, "{enc} w{w}: {id}");
                    }
                }
            }
        }
    }
}
