use super::*;
use crate::arith::word::Word;
use crate::gates::fault::{detection_matrix, FaultList, PatternSet, SimulationMode};
use crate::gates::netlist::NetlistBuilder;

/// Every input combination of a netlist with few input bits, one vector per combination.
fn exhaustive(nl: &Netlist) -> Vec<Vec<Word>> {
    let bits = nl.input_nets().len();
    (0..1u64 << bits)
        .map(|code| {
            let mut flat = 0;
            nl.inputs()
                .iter()
                .map(|p| {
                    let mut w = Word::ZERO;
                    for bit in 0..p.width() {
                        w.set_bit(bit, code >> (flat + bit as usize) & 1 == 1);
                    }
                    flat += p.width() as usize;
                    w
                })
                .collect()
        })
        .collect()
}

/// The vector (one word per input port) a Sat answer's flat bits describe.
fn vector_of(nl: &Netlist, bits: &[bool]) -> Vec<Word> {
    let mut flat = 0;
    nl.inputs()
        .iter()
        .map(|p| {
            let mut w = Word::ZERO;
            for bit in 0..p.width() {
                w.set_bit(bit, bits[flat + bit as usize]);
            }
            flat += p.width() as usize;
            w
        })
        .collect()
}

/// A netlist of every gate kind over four inputs, with fan-out and a redundant gate.
fn every_kind() -> Netlist {
    let mut b = NetlistBuilder::new("<test>", "every_kind");
    let i = b.input("i", 4);
    let mut outs = Vec::new();
    for (k, kind) in GateKind::ALL.into_iter().enumerate() {
        let ins: Vec<NetId> = (0..kind.arity()).map(|p| i[(k + p) % 4]).collect();
        outs.push(b.gate_net(kind, &format!("g{k}"), &ins, "n", Some(k as i64)));
    }
    // y = n0 | (n0 & i1): the AND is redundant (absorption).
    let and = b.gate_net(GateKind::And, "absorb_and", &[outs[0], i[1]], "m", None);
    let y = b.gate_net(GateKind::Or, "absorb_or", &[outs[0], and], "yy", None);
    outs.push(y);
    b.output("o", &outs);
    b.build().expect("test netlist")
}

/// SAT and exhaustive simulation agree on every collapsed fault (detectable or redundant),
/// and every Sat vector detects its fault. Oracle: the fault simulator, exhaustively.
#[test]
fn fault_miter_agrees_with_exhaustive_simulation() {
    for nl in [
        every_kind(),
        Netlist::ripple_adder(3, true).unwrap(),
        Netlist::ripple_subtractor(3, true).unwrap(),
        Netlist::addsub_unit(3).unwrap(),
    ] {
        let faults = FaultList::new(&nl);
        let all = PatternSet::from_vectors(&nl, &exhaustive(&nl), "exhaustive").unwrap();
        let m = detection_matrix(&nl, &faults, &all, SimulationMode::BitParallel).unwrap();
        let mut redundant = 0;
        for class in 0..faults.collapsed() {
            let fault = faults.representative(class);
            let solved = fault_miter(&nl, fault, 100_000);
            let detectable = m.first_detecting_vector(class).is_some();
            match solved.answer {
                Answer::Sat(bits) => {
                    assert!(detectable, "{}: SAT for an undetectable fault", nl.module());
                    let one =
                        PatternSet::from_vectors(&nl, &[vector_of(&nl, &bits)], "sat").unwrap();
                    let m1 = detection_matrix(&nl, &faults, &one, SimulationMode::Serial).unwrap();
                    assert!(m1.detects(class, 0), "the SAT vector misses its fault");
                }
                Answer::Unsat => {
                    assert!(!detectable, "{}: UNSAT for a detectable fault", nl.module());
                    redundant += 1;
                }
                Answer::Unknown => panic!("budget spent on a tiny netlist"),
            }
        }
        if nl.module() == "every_kind" {
            assert!(redundant > 0, "the absorbed AND gives redundant faults");
        }
    }
}

/// The ripple adder equals itself; an adder and a subtractor differ, and the Sat input is a
/// real difference.
#[test]
fn equivalence_miter_proves_and_refutes() {
    let add = Netlist::ripple_adder(6, false).unwrap();
    let sub = Netlist::ripple_subtractor(6, false).unwrap();
    let outs = vec!["y".to_string(), "co".to_string()];
    assert_eq!(
        equivalence_miter(&add, &add.clone(), &outs, 10_000).answer,
        Answer::Unsat
    );
    match equivalence_miter(&add, &sub, &outs, 10_000).answer {
        Answer::Sat(bits) => {
            let v = vector_of(&add, &bits);
            assert_ne!(add.eval(&v).unwrap(), sub.eval(&v).unwrap());
        }
        other => panic!("expected a counterexample, got {other:?}"),
    }
}

/// An array multiplier (AND partial products summed by ripple rows of full adders),
/// `swap` feeding the operands the other way round: the two are equal (multiplication
/// commutes) but structurally different, a miter SAT solvers find hard.
fn multiplier(width: usize, swap: bool) -> Netlist {
    let mut b = NetlistBuilder::new("<test multiplier>", "mul");
    let x = b.input("a", width as u32);
    let y = b.input("b", width as u32);
    let (x, y) = if swap { (y, x) } else { (x, y) };
    let zero = b.constant(false);
    let mut acc: Vec<NetId> = vec![zero; 2 * width];
    let mut n = 0;
    let mut name = |b: &mut NetlistBuilder, kind, ins: &[NetId]| {
        n += 1;
        b.gate_net(kind, &format!("c{n}"), ins, "w", Some(n))
    };
    for (i, &yi) in y.iter().enumerate() {
        let mut carry = zero;
        for (j, &xj) in x.iter().enumerate() {
            let pp = name(&mut b, GateKind::And, &[xj, yi]);
            let s = acc[i + j];
            let t = name(&mut b, GateKind::Xor, &[s, pp]);
            let sum = name(&mut b, GateKind::Xor, &[t, carry]);
            let g = name(&mut b, GateKind::And, &[s, pp]);
            let c = name(&mut b, GateKind::And, &[t, carry]);
            carry = name(&mut b, GateKind::Or, &[g, c]);
            acc[i + j] = sum;
        }
        acc[i + width] = carry;
    }
    b.output("y", &acc);
    b.build().expect("multiplier")
}

/// The multipliers agree by simulation on a few vectors (the test circuit is right) and
/// the commutativity miter at 12 bits ends Unknown within a budget of 2000 conflicts.
#[test]
fn budget_gives_unknown_on_a_multiplier() {
    let m = multiplier(12, false);
    let s = multiplier(12, true);
    for (a, b) in [(0u64, 0u64), (4095, 4095), (1234, 3071), (77, 2048)] {
        let v = [Word::from_u64(a), Word::from_u64(b)];
        assert_eq!(m.eval(&v).unwrap()[0], Word::from_u64(a * b));
        assert_eq!(s.eval(&v).unwrap()[0], Word::from_u64(a * b));
    }
    let solved = equivalence_miter(&m, &s, &["y".to_string()], 2000);
    assert_eq!(solved.answer, Answer::Unknown);
    assert!(
        (2000..=2200).contains(&solved.conflicts),
        "spent {}",
        solved.conflicts
    );
    // A small multiplier is proved within the same kind of budget.
    let small = equivalence_miter(
        &multiplier(3, false),
        &multiplier(3, true),
        &["y".into()],
        100_000,
    );
    assert_eq!(small.answer, Answer::Unsat);
}
