use super::*;

/// Finds a net by its human name (linear; tests only).
fn net_named(nl: &Netlist, name: &str) -> Option<NetId> {
    (0..nl.net_count())
        .map(NetId::from_index)
        .find(|&n| nl.net_name(n) == name)
}

/// Exhaustive check of the built-in units against integer arithmetic at small widths.
#[test]
fn builtin_units_compute_their_arithmetic() {
    for width in 1..=4u32 {
        let mask = (1u64 << width) - 1;
        let adder = Netlist::ripple_adder(width, true).unwrap();
        let sub = Netlist::ripple_subtractor(width, true).unwrap();
        let addsub = Netlist::addsub_unit(width).unwrap();
        let plain_adder = Netlist::ripple_adder(width, false).unwrap();
        let plain_sub = Netlist::ripple_subtractor(width, false).unwrap();
        let signed = |v: u64| -> i64 {
            if v >> (width - 1) & 1 == 1 {
                v as i64 - (1i64 << width)
            } else {
                v as i64
            }
        };
        for a in 0..=mask {
            for b in 0..=mask {
                for c in 0..=1u64 {
                    let w = |v: u64| Word::from_u64(v);
                    // Addition: y = (a + b + c) mod 2^N, co = bit N, ovf when the signed
                    // sum does not fit.
                    let sum = a + b + c;
                    let ovf = {
                        let s = signed(a) + signed(b) + c as i64;
                        s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1)
                    };
                    let expect_add = vec![w(sum & mask), w(sum >> width), w(ovf as u64)];
                    assert_eq!(
                        adder.eval(&[w(a), w(b), w(c)]).unwrap(),
                        expect_add,
                        "add {a} {b} {c}"
                    );
                    if c == 0 {
                        assert_eq!(
                            plain_adder.eval(&[w(a), w(b)]).unwrap(),
                            expect_add,
                            "add {a} {b}"
                        );
                    }
                    // Subtraction with borrow-in: co = borrow, ovf when the signed
                    // difference does not fit.
                    let diff = a as i64 - b as i64 - c as i64;
                    let sovf = {
                        let s = signed(a) - signed(b) - c as i64;
                        s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1)
                    };
                    let expect_sub =
                        vec![w(diff as u64 & mask), w((diff < 0) as u64), w(sovf as u64)];
                    assert_eq!(
                        sub.eval(&[w(a), w(b), w(c)]).unwrap(),
                        expect_sub,
                        "sub {a} {b} {c}"
                    );
                    if c == 0 {
                        assert_eq!(
                            plain_sub.eval(&[w(a), w(b)]).unwrap(),
                            expect_sub,
                            "sub {a} {b}"
                        );
                        assert_eq!(
                            addsub.eval(&[w(a), w(b), w(0)]).unwrap(),
                            expect_add,
                            "addsub + {a} {b}"
                        );
                    } else {
                        // Mode 1: a + ~b + 1; the raw carry is NOT borrow.
                        let got = addsub.eval(&[w(a), w(b), w(1)]).unwrap();
                        let borrow = a < b;
                        let s = signed(a) - signed(b);
                        let ovf = s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1);
                        let expect = vec![
                            w(a.wrapping_sub(b) & mask),
                            w(!borrow as u64),
                            w(ovf as u64),
                        ];
                        assert_eq!(got, expect, "addsub - {a} {b}");
                    }
                }
            }
        }
    }
}

#[test]
fn builtin_names_follow_their_ports() {
    let mut nl = Netlist::ripple_adder(4, true).unwrap();
    let y2 = nl.outputs()[0].nets()[2];
    assert_eq!(nl.net_name(y2), "y[2]");
    let co = nl.outputs()[1].nets()[0];
    assert_eq!(nl.net_name(co), "co");
    let Driver::Gate(g) = nl.driver(net_named(&nl, "carry[2]").unwrap()) else {
        panic!("carry[2] should be driven by a gate");
    };
    assert_eq!(nl.gates()[g].cell_name(), "fa[1].or_carry");
    nl.rename_ports(&[("y", "sum"), ("cin", "c0")]).unwrap();
    assert_eq!(nl.net_name(y2), "sum[2]");
    assert_eq!(nl.outputs()[0].name(), "sum");
    assert_eq!(nl.input_port("c0"), Some(2));
    // Renaming onto an internal net's name or an existing port is refused, atomically.
    let err = nl.rename_ports(&[("a", "carry")]).unwrap_err();
    assert!(err.to_string().contains("internal net"), "{err}");
    let err = nl.rename_ports(&[("a", "b")]).unwrap_err();
    assert!(err.to_string().contains("two ports"), "{err}");
    let err = nl.rename_ports(&[("zz", "q")]).unwrap_err();
    assert!(err.to_string().contains("no port named `zz`"), "{err}");
    assert_eq!(nl.inputs()[0].name(), "a");
    // Swapping two names at once works.
    nl.rename_ports(&[("a", "b"), ("b", "a")]).unwrap();
    assert_eq!(nl.inputs()[0].name(), "b");
}

#[test]
fn builder_sorts_gates_and_reports_loops() {
    let mut b = NetlistBuilder::new("t", "m");
    let i = b.input("i", 1)[0];
    let late = b.net("late", None);
    let early = b.net("early", None);
    // Added in reverse order: `late` reads `early`, which is added second.
    b.gate(GateKind::Not, "n2", &[early], late);
    b.gate(GateKind::Not, "n1", &[i], early);
    b.output("o", &[late]);
    let nl = b.build().unwrap();
    assert_eq!(nl.gates()[0].cell_name(), "n1");
    assert_eq!(
        nl.eval(&[Word::from_u64(1)]).unwrap(),
        vec![Word::from_u64(1)]
    );

    let mut b = NetlistBuilder::new("loop.json", "m");
    let i = b.input("i", 1)[0];
    let x = b.net("x", None);
    let y = b.net("y", None);
    b.gate(GateKind::And, "g1", &[i, y], x);
    b.gate(GateKind::Not, "g2", &[x], y);
    b.output("o", &[x]);
    let err = b.build().unwrap_err();
    let text = err.to_string();
    assert!(text.starts_with("loop.json"), "{text}");
    assert!(
        text.contains("combinational loop") && text.contains("g1") && text.contains("g2"),
        "{text}"
    );

    let mut b = NetlistBuilder::new("t", "m");
    let floating = b.net("floating", None);
    b.output("o", &[floating]);
    let text = b.build().unwrap_err().to_string();
    assert!(
        text.contains("`floating`") && text.contains("nothing drives it"),
        "{text}"
    );
}

#[test]
fn eval_parallel_checks_lengths() {
    let nl = Netlist::ripple_adder(2, false).unwrap();
    let mut out = vec![0; 4];
    assert!(nl.eval_parallel(&[0; 3], &mut out).is_err());
    // Pattern k: a = k & 3, b = k >> 2 & 3 over 16 lanes.
    let mut inputs = [0u64; 4];
    for k in 0..16u64 {
        for (bit, word) in inputs.iter_mut().enumerate() {
            *word |= (k >> bit & 1) << k;
        }
    }
    nl.eval_parallel(&inputs, &mut out).unwrap();
    for k in 0..16u64 {
        let sum = (k & 3) + (k >> 2 & 3);
        let got = (out[0] >> k & 1) | (out[1] >> k & 1) << 1 | (out[2] >> k & 1) << 2;
        assert_eq!(got, sum, "lane {k}");
    }
}

#[test]
fn widths_out_of_range_are_errors() {
    assert!(Netlist::ripple_adder(0, true).is_err());
    assert!(Netlist::ripple_subtractor(MAX_WIDTH + 1, true).is_err());
    assert!(Netlist::addsub_unit(MAX_WIDTH).is_ok());
}

const SMALL: &str = r#"{
  "modules": {
"other": { "ports": {}, "cells": {}, "netnames": {} },
"m": {
  "ports": {
    "a": { "direction": "input", "bits": [ 2, 3 ] },
    "y": { "direction": "output", "bits": [ 4, "1" ] }
  },
  "cells": {
    "$abc$1$x": {
      "hide_name": 1,
      "type": "$_XOR_",
      "port_directions": { "A": "input", "B": "input", "Y": "output" },
      "connections": { "A": [ 2 ], "B": [ 3 ], "Y": [ 4 ] }
    }
  },
  "netnames": {
    "$abc$1$n4": { "hide_name": 1, "bits": [ 4 ] },
    "y": { "hide_name": 0, "bits": [ 4, "1" ] },
    "a": { "hide_name": 0, "bits": [ 2, 3 ], "offset": 4 }
  }
}
  }
}"#;

#[test]
fn reads_a_small_yosys_module() {
    let nl = Netlist::from_yosys_json(SMALL, "small.json", "m").unwrap();
    assert_eq!(nl.inputs()[0].name(), "a");
    assert_eq!(nl.net_name(nl.inputs()[0].nets()[1]), "a[5]");
    assert_eq!(nl.net_name(nl.outputs()[0].nets()[0]), "y[0]");
    assert_eq!(nl.gates()[0].cell_name(), "$abc$1$x");
    assert_eq!(nl.gates()[0].cell_type(), "$_XOR_");
    for a in 0..4u64 {
        let y = nl.eval(&[Word::from_u64(a)]).unwrap();
        assert_eq!(y, vec![Word::from_u64(((a & 1) ^ (a >> 1)) | 2)]);
    }
}

#[test]
fn yosys_errors_name_file_line_and_field() {
    let bad = SMALL.replace("$_XOR_", "$_DFF_P_");
    let err = Netlist::from_yosys_json(&bad, "small.json", "m").unwrap_err();
    let p = &err.problems()[0];
    assert_eq!(p.file, "small.json");
    assert_eq!(p.line, Some(10), "{p}");
    assert!(p.message.contains("storage element"), "{p}");
    let x = SMALL.replace(r#""B": [ 3 ]"#, r#""B": [ "x" ]"#);
    let err = Netlist::from_yosys_json(&x, "small.json", "m").unwrap_err();
    assert!(err.to_string().contains("setundef -zero"), "{err}");
    let err = Netlist::from_yosys_json("{}", "e.json", "m").unwrap_err();
    assert!(err.to_string().contains("no `modules`"), "{err}");
    let hier = SMALL.replace("$_XOR_", "full_adder");
    let err = Netlist::from_yosys_json(&hier, "small.json", "m").unwrap_err();
    assert!(err.to_string().contains("not flattened"), "{err}");
    let missing = SMALL.replace(r#""B": [ 3 ], "#, "");
    let err = Netlist::from_yosys_json(&missing, "small.json", "m").unwrap_err();
    assert!(
        err.to_string().contains("no connection for pin `B`"),
        "{err}"
    );
}
