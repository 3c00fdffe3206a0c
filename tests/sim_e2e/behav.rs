//! Golden-model cross-check against the simulator's own arithmetic: the behavioural models in
//! `tests/hdl/behav/` compute with the language's `+`, `-`, relational operators and
//! `$signed` (IEEE 1364-2005, clause 5 "Expressions": 5.1.5 arithmetic operators, 5.1.7
//! relational operators, 5.4.1 expression bit lengths, 5.5.1-5.5.2 expression types and
//! evaluation; the subsection numbers are from memory, as the models' headers say), and
//! Icarus Verilog 11 runs them over 100,000 random vectors (plus the directed set) per
//! operation, encoding and width.
//!
//! Both sides judge: the testbench is emitted with `--self-check`, so Icarus compares its
//! own outputs with arithvec's expected.hex and fails the run on any mismatch, and
//! `arithvec check` then reads the log and must agree with every row, with 100% class
//! coverage.
//!
//! Cost, measured on the 2-core machine with a release build (Icarus 11): a 100-bit run of
//! 100,000 vectors simulates in about 3 s; the 56 runs (7 operations x 2 encodings x 4
//! widths) took 54 s wall with two test threads (per operation 8 to 25 s, addsub the
//! slowest). That fits the CI budget, so unsigned runs at the full 100,000 too.

use crate::flow::{hdl, run_loop, Options, Simulator, Timing};
use crate::spec::{UnitSpec, COMPARE, MODE_AND_CARRY_IN, UNARY, WITH_CARRY_IN};

/// Widths: a byte, a word, the u128 fast path's edge and beyond it.
const WIDTHS: [u32; 4] = [8, 32, 64, 100];

/// Random vectors per run.
const COUNT: u64 = 100_000;

/// Runs behav_<operation> in both encodings at every width.
fn agrees(
    unit: &str,
    operation: &'static str,
    ports: &'static [(&'static str, &'static str)],
    test: &'static str,
) {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start(test);
    let module = format!("behav_{operation}");
    let source = hdl(&format!("behav/{module}.v"));
    let mut loops = 0;
    for (encoding, signed) in [("twos", 1), ("unsigned", 0)] {
        for width in WIDTHS {
            let mut spec = UnitSpec::new(unit, operation, encoding, width, ports, &module)
                .parameter("SIGNED", signed)
                .count(COUNT);
            if operation == "addsub" {
                // behav_addsub subtracts cin as a borrow-in when mode = 1.
                spec = spec.convention("carry_in", "borrow");
            }
            let options = Options {
                self_check: true,
                ..Options::default()
            };
            let outcome = run_loop(
                &spec,
                Simulator::Icarus,
                std::slice::from_ref(&source),
                options,
            );
            let verdict = format!("arithvec-tb: {} vectors, 0 mismatches", outcome.total());
            assert!(
                outcome.sim_stdout.contains(&verdict),
                "the self-checking testbench did not report {verdict:?}:\n{}\n{}",
                outcome.sim_stdout,
                outcome.summary()
            );
            assert_eq!(outcome.random(), COUNT, "{}", outcome.summary());
            outcome.assert_clean_pass();
            loops += 1;
        }
    }
    timing.finish(loops);
}

#[test]
fn behav_add_agrees() {
    agrees("quay_sum", "add", WITH_CARRY_IN, "behav_add_agrees");
}

#[test]
fn behav_sub_agrees() {
    agrees("quay_gap", "sub", WITH_CARRY_IN, "behav_sub_agrees");
}

#[test]
fn behav_addsub_agrees() {
    agrees(
        "quay_trim",
        "addsub",
        MODE_AND_CARRY_IN,
        "behav_addsub_agrees",
    );
}

#[test]
fn behav_negate_agrees() {
    agrees("quay_flip", "negate", UNARY, "behav_negate_agrees");
}

#[test]
fn behav_increment_agrees() {
    agrees("quay_step", "increment", UNARY, "behav_increment_agrees");
}

#[test]
fn behav_decrement_agrees() {
    agrees("quay_back", "decrement", UNARY, "behav_decrement_agrees");
}

#[test]
fn behav_compare_agrees() {
    agrees("quay_rank", "compare", COMPARE, "behav_compare_agrees");
}
