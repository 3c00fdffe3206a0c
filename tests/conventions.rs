//! Issue 14: one rule for `[conventions]` keys, checked against the golden model. A key is
//! accepted exactly when another value of it changes what the unit is expected to output on
//! some input (the expected outputs, plus the alternative a `negative_zero = "either"` check
//! accepts), over the output ports the spec has. For every operation x encoding x output port
//! (one at a time, and all together) x key x value, at widths 1..4, the model is run on every
//! input and the reader's verdict must agree. The rule itself is common practice for this
//! tool (a spec means one thing); the arithmetic is the golden model's (DEVELOPERS.md).

use std::collections::BTreeSet;

use arithvec::{
    CarryInConvention, CarryOutConvention, Inputs, Model, NegativeZero, OffsetCarry, Outputs,
    Signal, Spec, Word, ZeroFlag,
};

const OPERATIONS: [&str; 7] = [
    "add",
    "sub",
    "addsub",
    "negate",
    "increment",
    "decrement",
    "compare",
];
const ENCODINGS: [&str; 5] = ["unsigned", "twos", "ones", "signmag", "offset"];
const OUTPUTS: [Signal; 8] = [
    Signal::Result,
    Signal::CarryOut,
    Signal::Overflow,
    Signal::Zero,
    Signal::Negative,
    Signal::Less,
    Signal::Equal,
    Signal::Greater,
];
const KEYS: [(&str, &[&str]); 5] = [
    ("carry_out", &["borrow", "carry"]),
    ("carry_in", &["borrow", "carry"]),
    ("negative_zero", &["hardware", "positive", "either"]),
    ("zero_flag", &["value", "bits"]),
    ("offset_carry", &["inner", "codes"]),
];

fn spec_text(
    op: &str,
    enc: &str,
    width: u32,
    ports: &[&str],
    conventions: &[(&str, &str)],
) -> String {
    let mut t = format!(
        "name = \"probe\"\noperation = \"{op}\"\nwidth = {width}\nencoding = \"{enc}\"\n\n[ports]\n"
    );
    for p in ports {
        t.push_str(&format!("{p} = \"p_{p}\"\n"));
    }
    if !conventions.is_empty() {
        t.push_str("\n[conventions]\n");
        for (k, v) in conventions {
            t.push_str(&format!("{k} = \"{v}\"\n"));
        }
    }
    t
}

/// Sets `key = value` on a spec's conventions directly (the reader may refuse the text).
fn set_convention(spec: &mut Spec, key: &str, value: &str) {
    let c = &mut spec.conventions;
    match (key, value) {
        ("carry_out", "borrow") => c.carry_out = CarryOutConvention::Borrow,
        ("carry_out", "carry") => c.carry_out = CarryOutConvention::Carry,
        ("carry_in", "borrow") => c.carry_in = CarryInConvention::Borrow,
        ("carry_in", "carry") => c.carry_in = CarryInConvention::Carry,
        ("negative_zero", "hardware") => c.negative_zero = NegativeZero::Hardware,
        ("negative_zero", "positive") => c.negative_zero = NegativeZero::Positive,
        ("negative_zero", "either") => c.negative_zero = NegativeZero::Either,
        ("zero_flag", "value") => c.zero_flag = ZeroFlag::Value,
        ("zero_flag", "bits") => c.zero_flag = ZeroFlag::Bits,
        ("offset_carry", "inner") => c.offset_carry = OffsetCarry::Inner,
        ("offset_carry", "codes") => c.offset_carry = OffsetCarry::Codes,
        other => panic!("unknown convention {other:?}"),
    }
}

/// What the unit may output on every input, over `outputs`: per input, the set of acceptable
/// output tuples (the model's, and the "either" alternative).
fn behaviour(spec: &Spec, outputs: &[Signal]) -> Vec<BTreeSet<Vec<Word>>> {
    let model = Model::new(spec);
    let w = spec.width;
    let binary = spec.operation.is_binary();
    let has = |s: Signal| spec.ports.get(s).is_some();
    let mut all = Vec::new();
    let pick = |o: &Outputs| outputs.iter().map(|&s| o.get(s)).collect::<Vec<Word>>();
    for a in 0..1u64 << w {
        for b in 0..if binary { 1u64 << w } else { 1 } {
            for cin in 0..if has(Signal::CarryIn) { 2 } else { 1 } {
                for mode in 0..if has(Signal::Mode) { 2 } else { 1 } {
                    let inputs = Inputs {
                        a: Word::from_u64(a),
                        b: Word::from_u64(b),
                        carry_in: cin == 1,
                        mode: mode == 1,
                        select: 0,
                    };
                    let out = model.evaluate(&inputs);
                    let mut set = BTreeSet::from([pick(&out)]);
                    if let Some(alt) = model.alternative(&out) {
                        set.insert(pick(&alt));
                    }
                    all.push(set);
                }
            }
        }
    }
    all
}

/// True when some other value of `key` changes the behaviour of `spec` over `outputs`.
fn has_effect(spec: &Spec, outputs: &[Signal], key: &str, value: &str) -> bool {
    let values = KEYS.iter().find(|(k, _)| *k == key).unwrap().1;
    let mut here = spec.clone();
    set_convention(&mut here, key, value);
    let mine = behaviour(&here, outputs);
    values.iter().filter(|v| **v != value).any(|other| {
        let mut there = spec.clone();
        set_convention(&mut there, key, other);
        behaviour(&there, outputs) != mine
    })
}

#[test]
fn issue14_a_convention_key_is_accepted_exactly_when_it_has_an_effect() {
    let mut checked = 0;
    let mut disagreements = Vec::new();
    for op in OPERATIONS {
        for enc in ENCODINGS {
            for width in 1..=4u32 {
                let mut inputs = vec!["a"];
                if op != "negate" && op != "increment" && op != "decrement" {
                    inputs.push("b");
                }
                if op == "addsub" {
                    inputs.push("mode");
                }
                for with_cin in [false, true] {
                    let mut ins = inputs.clone();
                    if with_cin {
                        ins.push("carry_in");
                    }
                    // Each output alone, then all the operation accepts together.
                    let mut port_sets: Vec<Vec<Signal>> =
                        OUTPUTS.iter().map(|&s| vec![s]).collect();
                    port_sets.push(OUTPUTS.to_vec());
                    for outs in port_sets {
                        let mut ports = ins.clone();
                        ports.extend(outs.iter().map(|s| s.key()));
                        // The base spec: the carry_in convention an addsub with a carry_in
                        // port must state.
                        let base_conv: Vec<(&str, &str)> = if op == "addsub" && with_cin {
                            vec![("carry_in", "borrow")]
                        } else {
                            vec![]
                        };
                        let Ok(base) =
                            Spec::parse(&spec_text(op, enc, width, &ports, &base_conv), "p.toml")
                        else {
                            continue; // ports or carry-in this operation/encoding refuses
                        };
                        let present: Vec<Signal> = outs
                            .iter()
                            .copied()
                            .filter(|&s| base.ports.get(s).is_some())
                            .collect();
                        for (key, values) in KEYS {
                            // The other key each interacts with, unset or set.
                            let partners: &[(&str, &str)] = match key {
                                "negative_zero" => &[("", ""), ("zero_flag", "bits")],
                                "zero_flag" => &[
                                    ("", ""),
                                    ("negative_zero", "positive"),
                                    ("negative_zero", "either"),
                                ],
                                _ => &[("", "")],
                            };
                            for &(pk, pv) in partners {
                                for &value in values {
                                    let mut conv: Vec<(&str, &str)> = base_conv
                                        .iter()
                                        .copied()
                                        .filter(|(k, _)| *k != key)
                                        .collect();
                                    conv.push((key, value));
                                    let mut spec = base.clone();
                                    if !pk.is_empty() {
                                        conv.push((pk, pv));
                                        set_convention(&mut spec, pk, pv);
                                    }
                                    let text = spec_text(op, enc, width, &ports, &conv);
                                    let accepted = Spec::parse(&text, "p.toml").is_ok();
                                    let mut expected = has_effect(&spec, &present, key, value);
                                    if !pk.is_empty() {
                                        let mut with_key = spec.clone();
                                        set_convention(&mut with_key, key, value);
                                        expected &= has_effect(&with_key, &present, pk, pv);
                                    }
                                    // Offset binary has one zero, 10..0; the reader refuses
                                    // zero_flag there ("bits" would flag a non-zero value).
                                    if enc == "offset" && (key == "zero_flag" || pk == "zero_flag")
                                    {
                                        expected = false;
                                    }
                                    checked += 1;
                                    if accepted != expected {
                                        disagreements.push(format!(
                                            "{op} {enc} width {width} outputs {present:?} cin \
                                             {with_cin}: {key} = {value} {} accepted {accepted}, \
                                             has effect {expected}",
                                            if pk.is_empty() {
                                                String::new()
                                            } else {
                                                format!("(with {pk} = {pv})")
                                            }
                                        ));
                                    }
                                }
                            }
                        }
                    }
                }
            }
        }
    }
    assert!(checked > 5000, "only {checked} combinations checked");
    assert!(
        disagreements.is_empty(),
        "{} of {checked} combinations disagree, e.g.:\n{}",
        disagreements.len(),
        disagreements
            .iter()
            .take(40)
            .cloned()
            .collect::<Vec<_>>()
            .join("\n")
    );
}

#[test]
fn issue14_addsub_with_a_carry_in_port_must_say_what_it_means() {
    let ports = ["a", "b", "mode", "carry_in", "result", "carry_out"];
    let err = Spec::parse(&spec_text("addsub", "twos", 8, &ports, &[]), "unit.toml")
        .expect_err("an addsub carry_in without a convention is refused");
    let text = err.to_string();
    for needle in [
        "unit.toml",
        "conventions.carry_in",
        "\"borrow\"",
        "\"carry\"",
        "a + (b ^ m) + cin",
    ] {
        assert!(text.contains(needle), "missing {needle:?} in:\n{text}");
    }
    for choice in ["borrow", "carry"] {
        Spec::parse(
            &spec_text("addsub", "twos", 8, &ports, &[("carry_in", choice)]),
            "unit.toml",
        )
        .unwrap_or_else(|e| panic!("carry_in = {choice} is refused: {e}"));
    }
    // Without a carry_in port nothing needs saying; a sub keeps its documented default.
    Spec::parse(
        &spec_text("addsub", "twos", 8, &["a", "b", "mode", "result"], &[]),
        "u.toml",
    )
    .expect("no carry_in port");
    Spec::parse(
        &spec_text("sub", "twos", 8, &["a", "b", "carry_in", "result"], &[]),
        "u.toml",
    )
    .expect("sub keeps the borrow default");
}

/// Offset binary, 8 bits: 0x80 + 0x80 is 0 + 0 (common practice, no source: code = value +
/// 128). The inner two's-complement adder adds 0x00 + 0x00 and carries 0; an adder of the
/// codes adds 0x80 + 0x80 = 0x100 and carries 1. Both give the code 0x80 (value 0).
#[test]
fn issue14_offset_carry_selects_the_datapath_the_carry_comes_from() {
    let ports = ["a", "b", "result", "carry_out"];
    let inner = Spec::parse(&spec_text("add", "offset", 8, &ports, &[]), "u.toml").unwrap();
    let codes = Spec::parse(
        &spec_text("add", "offset", 8, &ports, &[("offset_carry", "codes")]),
        "u.toml",
    )
    .unwrap();
    let v = |a: u64, b: u64| Inputs {
        a: Word::from_u64(a),
        b: Word::from_u64(b),
        ..Inputs::default()
    };
    let (i, c) = (Model::new(&inner), Model::new(&codes));
    let x = i.evaluate(&v(0x80, 0x80));
    let y = c.evaluate(&v(0x80, 0x80));
    assert_eq!((x.result, x.carry_out), (Word::from_u64(0x80), false));
    assert_eq!((y.result, y.carry_out), (Word::from_u64(0x80), true));
    // 0x00 + 0x00 (-128 + -128): inner 0x80 + 0x80 carries, the codes do not.
    assert!(i.evaluate(&v(0, 0)).carry_out && !c.evaluate(&v(0, 0)).carry_out);
    // Operands whose code MSBs differ carry alike: 0x80 + 0x7f.
    assert_eq!(
        i.evaluate(&v(0x80, 0x7f)).carry_out,
        c.evaluate(&v(0x80, 0x7f)).carry_out
    );
    // Subtracting codes: the borrow is a < b as values (the codes' order is the values').
    let sub = Spec::parse(
        &spec_text(
            "sub",
            "offset",
            8,
            &["a", "b", "result", "carry_out"],
            &[("offset_carry", "codes")],
        ),
        "u.toml",
    )
    .unwrap();
    let s = Model::new(&sub);
    assert!(
        s.evaluate(&v(0x7f, 0x80)).carry_out,
        "-1 - 0 borrows between codes"
    );
    assert!(!s.evaluate(&v(0x80, 0x7f)).carry_out, "0 - -1 does not");
    // The corner class that tells the two apart is in both catalogues, and the directed set
    // reaches both of its bins.
    for spec in [&inner, &codes] {
        let generator = arithvec::Generator::new(spec, Some(0), None);
        let cat = generator.catalogue();
        let (ci, class) = cat
            .classes()
            .iter()
            .enumerate()
            .find(|(_, c)| c.id() == "offset.carry_source")
            .expect("offset.carry_source class");
        assert_eq!(class.bin_count(), 2);
        assert!(cat.is_class_reachable(ci));
        for k in 0..2 {
            assert!(
                generator.directed_hits(class.first_bin() + k) > 0,
                "bin {k} not hit"
            );
        }
    }
}
