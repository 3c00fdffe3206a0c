//! Golden-model cross-check of the shift, rotate and multiply operations against Icarus
//! Verilog's own IEEE 1364 `<<`, `>>`, `>>>` and `*` (IEEE 1364-2005, 5.1.12 shift operators
//! and 5.1.5 arithmetic operators; subsection numbers from memory): the behavioural models
//! `tests/hdl/behav/behav_shift.v` and `behav_mul.v` run the directed set plus 20,000 random
//! vectors at 8, 32, 64 and 100 bits, with the self-checking testbench comparing against
//! expected.hex and `arithvec check` reading the log (both must pass with full coverage).

use crate::flow::{hdl, run_loop, Options, Simulator, Timing};
use crate::spec::UnitSpec;

const WIDTHS: [u32; 4] = [8, 32, 64, 100];
const COUNT: u64 = 20_000;

const SHIFT: &[(&str, &str)] = &[
    ("a", "a"),
    ("amount", "sh"),
    ("result", "y"),
    ("carry_out", "co"),
    ("zero", "zero"),
    ("negative", "neg"),
];

const MUL: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("result", "p"),
    ("zero", "zero"),
    ("negative", "neg"),
];

fn run(spec: UnitSpec, source: &str) {
    let outcome = run_loop(
        &spec,
        Simulator::Icarus,
        &[hdl(source)],
        Options {
            self_check: true,
            ..Options::default()
        },
    );
    let verdict = format!("arithvec-tb: {} vectors, 0 mismatches", outcome.total());
    assert!(
        outcome.sim_stdout.contains(&verdict),
        "{}: the self-checking testbench did not report {verdict:?}:\n{}\n{}",
        spec.name,
        outcome.sim_stdout,
        outcome.summary()
    );
    assert_eq!(outcome.random(), COUNT, "{}", outcome.summary());
    outcome.assert_clean_pass();
}

/// shl, shr, rol, ror (unsigned) and sra (twos) against `<<`, `>>`, `>>>`.
#[test]
fn behav_shift_agrees() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("behav_shift_agrees");
    let mut loops = 0;
    for (op, code, encoding) in [
        ("shl", 0, "unsigned"),
        ("shr", 1, "unsigned"),
        ("sra", 2, "twos"),
        ("rol", 3, "unsigned"),
        ("ror", 4, "unsigned"),
    ] {
        for width in WIDTHS {
            let aw = arithvec::default_amount_width(width) as i64;
            let spec = UnitSpec::new("gantry_shift", op, encoding, width, SHIFT, "behav_shift")
                .parameter("AW", aw)
                .parameter("OP", code)
                .count(COUNT);
            let spec = UnitSpec {
                name: format!("{}_{op}", spec.name),
                ..spec
            };
            run(spec, "behav/behav_shift.v");
            loops += 1;
        }
    }
    timing.finish(loops);
}

/// mul (twos, signed x signed; unsigned) with the full 2N-bit product against `*`.
#[test]
fn behav_mul_agrees() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("behav_mul_agrees");
    let mut loops = 0;
    for (encoding, signed) in [("twos", 1), ("unsigned", 0)] {
        for width in WIDTHS {
            let spec = UnitSpec::new("gantry_mul", "mul", encoding, width, MUL, "behav_mul")
                .parameter("SIGNED", signed)
                .count(COUNT);
            let spec = UnitSpec {
                name: format!("{}_{encoding}", spec.name),
                ..spec
            };
            run(spec, "behav/behav_mul.v");
            loops += 1;
        }
    }
    timing.finish(loops);
}

const DIV_TWOS: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("quotient", "q"),
    ("remainder", "r"),
    ("div_by_zero", "dz"),
    ("overflow", "ovf"),
];

const DIV_UNSIGNED: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("quotient", "q"),
    ("remainder", "r"),
    ("div_by_zero", "dz"),
];

/// divrem (twos, truncate; unsigned) against `/` and `%` (behav_div.v names the two cases it
/// writes out: division by zero and min / -1).
#[test]
fn behav_div_agrees() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("behav_div_agrees");
    let mut loops = 0;
    for (encoding, signed, ports) in [("twos", 1, DIV_TWOS), ("unsigned", 0, DIV_UNSIGNED)] {
        for width in WIDTHS {
            let spec = UnitSpec::new("gantry_div", "divrem", encoding, width, ports, "behav_div")
                .parameter("SIGNED", signed)
                .count(COUNT);
            let spec = UnitSpec {
                name: format!("{}_{encoding}", spec.name),
                ..spec
            };
            run(spec, "behav/behav_div.v");
            loops += 1;
        }
    }
    timing.finish(loops);
}
