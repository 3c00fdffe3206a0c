//! The class templates: which corner classes and bins a spec gets (ids, descriptions, bin
//! labels), before reachability is decided. Ids are dotted lowercase and stable once released.

use super::*;

pub(super) type Template = (String, String, Kind, Vec<String>);

pub(super) fn one_bin() -> Vec<String> {
    vec!["hit".to_string()]
}

pub(super) fn with_carry_in(labels: &[&str], has_carry_in: bool, cin_name: &str) -> Vec<String> {
    if has_carry_in {
        labels
            .iter()
            .flat_map(|l| [format!("{l}.{cin_name}0"), format!("{l}.{cin_name}1")])
            .collect()
    } else {
        labels.iter().map(|l| l.to_string()).collect()
    }
}

/// The candidate classes for one spec and addsub mode.
pub(super) fn class_templates(model: &Model, spec: &Spec, mode: Option<bool>) -> Vec<Template> {
    let w = spec.width;
    let enc = spec.encoding;
    let op = spec.operation;
    let has_cin = spec.has(Signal::CarryIn);
    let subtracting = match op {
        Operation::Sub | Operation::Negate | Operation::Decrement | Operation::Compare => true,
        Operation::AddSub => mode == Some(true),
        _ => false,
    };
    let mut out: Vec<Template> = Vec::new();
    let bits = |f: &dyn Fn(u32) -> String| (0..w).map(f).collect::<Vec<_>>();

    let operands: &[Operand] = if op.is_binary() {
        &[Operand::A, Operand::B]
    } else {
        &[Operand::A]
    };
    for &x in operands {
        let n = x.name();
        let mut seen: Vec<Word> = Vec::new();
        for s in Special::ALL {
            if let Some(code) = s.code(model) {
                if seen.contains(&code) {
                    continue;
                }
                seen.push(code);
                out.push((
                    format!("{n}.{}", s.id()),
                    format!("operand {n} {}", s.describe()),
                    Kind::Special(x, s, code),
                    one_bin(),
                ));
            }
        }
        out.push((
            format!("{n}.alternating"),
            format!("operand {n} is an alternating pattern ..0101 or ..1010"),
            Kind::Alternating(x, alternating::<Wide>(w).to_word()),
            vec!["0101".into(), "1010".into()],
        ));
        out.push((
            format!("{n}.walking_one"),
            format!("operand {n} has exactly one 1 bit, at each position"),
            Kind::WalkingOne(x),
            bits(&|i| format!("bit{i}")),
        ));
        out.push((
            format!("{n}.walking_zero"),
            format!("operand {n} has exactly one 0 bit, at each position"),
            Kind::WalkingZero(x),
            bits(&|i| format!("bit{i}")),
        ));
    }

    if op.is_extended() {
        super::ext::ext_templates(model, spec, &mut out);
        return out;
    }

    if op == Operation::Compare {
        out.push((
            "compare.outcome".into(),
            "each outcome: a < b, a == b, a > b".into(),
            Kind::CompareOutcome,
            vec!["less".into(), "equal".into(), "greater".into()],
        ));
        let mut eq_bins = vec!["same_bits".to_string()];
        if enc.has_negative_zero() {
            eq_bins.push("plus_zero_vs_minus_zero".into());
            eq_bins.push("minus_zero_vs_plus_zero".into());
        }
        out.push((
            "compare.equal".into(),
            "equal values: identical bits, and +0 against -0 where the encoding has both".into(),
            Kind::CompareEqual,
            eq_bins,
        ));
        out.push((
            "compare.off_by_one".into(),
            "values one apart, both ways".into(),
            Kind::CompareOffByOne,
            vec!["a_is_b_minus_1".into(), "a_is_b_plus_1".into()],
        ));
        out.push((
            "compare.signs_differ".into(),
            "top bits differ, where signed and unsigned order disagree".into(),
            Kind::CompareSignsDiffer,
            vec!["a_msb1_b_msb0".into(), "a_msb0_b_msb1".into()],
        ));
        out.push((
            "compare.extremes".into(),
            "min against max and the like".into(),
            Kind::CompareExtremes,
            vec![
                "min_vs_max".into(),
                "max_vs_min".into(),
                "min_vs_min".into(),
                "max_vs_max".into(),
            ],
        ));
        compare_bit_templates(model, spec, &mut out);
        return out;
    }

    result_templates(model, spec, &mut out);
    let cin_name = if subtracting { "bin" } else { "cin" };
    out.push((
        "overflow.boundary".into(),
        "true result exactly at max / one past max / exactly at min / one past min".into(),
        Kind::OverflowBoundary,
        with_carry_in(
            &["at_max", "past_max", "at_min", "past_min"],
            has_cin,
            cin_name,
        ),
    ));

    if enc.is_binary_datapath() && op.is_binary() {
        let (id, desc, labels): (&str, &str, [&str; 2]) = if subtracting {
            (
                "borrow.edge",
                "unsigned borrow-out edge: a - b - bin is exactly 0 (no borrow) or -1 (borrow)",
                ["no_borrow", "borrow"],
            )
        } else {
            (
                "carry.edge",
                "unsigned carry-out edge: a + b + cin is exactly 2^N - 1 (no carry) or 2^N (carry)",
                ["no_carry", "carry"],
            )
        };
        out.push((
            id.into(),
            desc.into(),
            Kind::UnsignedEdge,
            with_carry_in(&labels, has_cin, cin_name),
        ));
    }

    let ripple = model.ripple_view(mode.unwrap_or(false));
    if let Some(view) = ripple {
        let word = if view.cell == Cell::Subtractor {
            "borrow"
        } else {
            "carry"
        };
        out.push((
            "chain.length".into(),
            format!(
                "longest {word} chain, k = 0..N bit positions (a chain starts at a generate \
                 bit or the {word}-in and runs through propagate bits)"
            ),
            Kind::ChainLength,
            (0..=w).map(|k| format!("k={k}")).collect(),
        ));
        let constant_carry_in = matches!(op, Operation::Increment | Operation::Decrement);
        if enc.is_binary_datapath() && (has_cin || constant_carry_in || mode == Some(true)) {
            out.push((
                "chain.carry_in".into(),
                format!("{word} chain started by the {word}-in, k = 0..N bit positions"),
                Kind::ChainFromCarryIn,
                (0..=w).map(|k| format!("k={k}")).collect(),
            ));
        }
        if enc.is_binary_datapath() {
            let cell = if view.cell == Cell::Subtractor {
                "full-subtractor"
            } else {
                "full-adder"
            };
            out.push((
                "cell.rows".into(),
                format!(
                    "every bit's {cell} cell sees each (a, b, {word}-in) row; bins bitI.aXbYcZ \
                     name the cell's own inputs"
                ),
                Kind::CellRows,
                (0..w)
                    .flat_map(|i| {
                        (0..8).map(move |r| {
                            format!("bit{i}.a{}b{}c{}", (r >> 2) & 1, (r >> 1) & 1, r & 1)
                        })
                    })
                    .collect(),
            ));
        }
        if enc == Encoding::Ones {
            out.push((
                "ones.end_around".into(),
                "one's-complement end-around carry: none, taken, and taken rippling through \
                 all low N-1 bits"
                    .into(),
                Kind::EndAroundCarry,
                vec![
                    "no_carry".into(),
                    "carry".into(),
                    "carry_full_ripple".into(),
                ],
            ));
        }
    }
    if enc == Encoding::SignMagnitude && op != Operation::Negate {
        out.push((
            "signmag.effective_add".into(),
            "sign-magnitude effective addition (signs agree): magnitude without and with carry-out"
                .into(),
            Kind::SignMagEffectiveAdd,
            vec!["no_carry".into(), "magnitude_carry".into()],
        ));
        out.push((
            "signmag.effective_sub".into(),
            "sign-magnitude effective subtraction (signs differ): |a| larger, |b| larger, equal"
                .into(),
            Kind::SignMagEffectiveSub,
            vec![
                "a_larger".into(),
                "b_larger".into(),
                "equal_magnitudes".into(),
            ],
        ));
        out.push((
            "signmag.x_plus_minus_x".into(),
            "sign-magnitude x + (-x) with x non-zero: x positive, x negative".into(),
            Kind::SignMagOpposites,
            vec!["x_positive".into(), "x_negative".into()],
        ));
    }
    if enc == Encoding::Offset
        && matches!(op, Operation::Add | Operation::Sub | Operation::AddSub)
        && spec.has(Signal::CarryOut)
    {
        // The two offset datapaths (conventions.offset_carry) carry out of the top bit
        // differently here; a unit built the other way fails in one of these bins.
        out.push((
            "offset.carry_source".into(),
            "offset binary: the inner two's-complement datapath carries (or borrows) out of \
             the top bit and the adder of the codes does not, and the reverse"
                .into(),
            Kind::OffsetCarrySource,
            vec!["inner_only".into(), "codes_only".into()],
        ));
    }
    if enc == Encoding::Offset {
        out.push((
            "offset.midpoint".into(),
            "offset-binary midpoint 10..0 (value 0) on a, b and the result, and its neighbours"
                .into(),
            Kind::OffsetMidpoint,
            vec![
                "a_mid".into(),
                "b_mid".into(),
                "result_mid".into(),
                "result_mid_minus_1".into(),
                "result_mid_plus_1".into(),
            ],
        ));
    }
    out
}

/// The compare classes a comparator's gates need (issue 15): where the operands first differ
/// and in which order, what the lower bits say, equal operands at each special value and the
/// sign bit alone differing. A magnitude comparator is a borrow chain or a prefix tree over
/// per-bit (greater, equal) pairs; its single stuck-at faults show only when every bit above
/// the one at fault is equal and the bits below are set so that the faulty node decides the
/// answer (common practice, no source).
fn compare_bit_templates(model: &Model, spec: &Spec, out: &mut Vec<Template>) {
    let w = spec.width;
    let orders = |_: ()| {
        (0..w)
            .flat_map(|i| [format!("bit{i}.a1b0"), format!("bit{i}.a0b1")])
            .collect::<Vec<_>>()
    };
    out.push((
        "compare.first_difference".into(),
        "a and b agree above bit i and differ first at bit i, with a's bit 1 (a1b0) or 0 (a0b1)"
            .into(),
        Kind::CompareFirstDifference,
        orders(()),
    ));
    out.push((
        "compare.single_bit_difference".into(),
        "a and b differ only at bit i (each input of the equality detector alone unequal)".into(),
        Kind::CompareSingleBit,
        orders(()),
    ));
    out.push((
        "compare.lower_bits_oppose".into(),
        "a and b differ first at bit i and the bits below i, read alone as unsigned, order them \
         the other way"
            .into(),
        Kind::CompareLowerOppose,
        orders(()),
    ));
    let mut seen: Vec<Word> = Vec::new();
    let mut specials = Vec::new();
    let mut labels = Vec::new();
    for s in Special::ALL {
        if let Some(code) = s.code(model) {
            if seen.contains(&code) {
                continue;
            }
            seen.push(code);
            specials.push(code);
            labels.push(s.id().to_string());
        }
    }
    out.push((
        "compare.equal_specials".into(),
        "a and b are the same special value (zero, one, max, min, -1, -0 where they exist)".into(),
        Kind::CompareEqualSpecial(specials),
        labels,
    ));
    if spec.encoding != Encoding::Unsigned {
        out.push((
            "compare.sign_only".into(),
            "a and b differ only in the sign bit: a's sign bit 1 (a1b0) or 0 (a0b1)".into(),
            Kind::CompareSignOnly,
            vec!["a1b0".into(), "a0b1".into()],
        ));
    }
}

/// The result classes of an N-bit result: its value zero from non-zero operands, the special
/// codes, every bit at 0 and 1, and (with a zero flag) the walking one. Shared by the adders
/// and the extended operations.
pub(super) fn result_templates(model: &Model, spec: &Spec, out: &mut Vec<Template>) {
    let w = spec.width;
    let bits = |f: &dyn Fn(u32) -> String| (0..w).map(f).collect::<Vec<_>>();
    out.push((
        "result.zero_from_nonzero".into(),
        "the result's value is zero although an operand is not".into(),
        Kind::ResultZeroFromNonzero,
        one_bin(),
    ));
    let mut seen: Vec<Word> = Vec::new();
    for s in [Special::Max, Special::Min, Special::NegativeZero] {
        if let Some(code) = s.code(model) {
            if seen.contains(&code) {
                continue;
            }
            seen.push(code);
            out.push((
                format!("result.{}", s.id()),
                format!("the result {}", s.describe()),
                Kind::ResultPattern(s, code),
                one_bin(),
            ));
        }
    }
    out.push((
        "result.bits".into(),
        "every result bit seen at 0 and at 1".into(),
        Kind::ResultBits,
        (0..w)
            .flat_map(|i| [format!("bit{i}=0"), format!("bit{i}=1")])
            .collect(),
    ));
    if spec.has(Signal::Zero) {
        // A zero flag is a NOR over the result bits however synthesis builds it; each of its
        // inputs stuck at 0 shows only when that result bit is the sole 1. All-zero plus
        // every one-hot pattern is the complete single stuck-at test of a fan-out-free OR
        // tree (common practice, no source); all-zero results are already in the set.
        out.push((
            "result.walking_one".into(),
            "the result has exactly one 1 bit, at each position (each input of the zero \
             flag's detector alone at 1)"
                .into(),
            Kind::ResultWalkingOne,
            bits(&|i| format!("bit{i}")),
        ));
    }
}
