//! The injected-bug variants in `tests/hdl/bugs/` run the whole loop on Icarus and must fail
//! `check` with exit 1, and the report must point at the bug: the bins where every hit
//! failed are the ones the bug's header names. Each bug's failure condition is also written
//! down as a predicate on the vector's operands and expected outputs (from the header
//! comment of the bug file), and the set of failing indices must equal the set of vectors
//! meeting it, so a checker that reports the wrong vectors fails too.

use std::collections::{BTreeMap, BTreeSet};

use num_bigint::BigUint;
use num_traits::One;

use crate::flow::{
    all_fail_bins, failing_bins, failing_classes, failures, hdl, output_values, run_loop,
    wrong_ports, Options, Outcome, Simulator, Timing,
};
use crate::spec::{UnitSpec, MODE_ONLY, NO_CARRY_IN, WITH_CARRY_IN};

/// Widths every bug runs at.
const WIDTHS: [u32; 4] = [4, 16, 32, 72];

/// One row of vectors.csv: column name -> value.
type Row = BTreeMap<String, BigUint>;

fn bit(value: &BigUint, k: u32) -> bool {
    value.bit(u64::from(k))
}

fn mask(width: u32) -> BigUint {
    (BigUint::one() << width) - BigUint::one()
}

fn low_bits(value: &BigUint, count: u32) -> BigUint {
    value & mask(count)
}

/// (expected - 1) mod 2^width.
fn minus_one(value: &BigUint, width: u32) -> BigUint {
    (value + mask(width)) & mask(width)
}

/// Runs `spec` on the bug module and asserts exit 1 with exactly the predicted failures.
fn expose(spec: UnitSpec, sources: &[&str], fails: impl Fn(&Row) -> bool) -> Outcome {
    let sources: Vec<_> = sources.iter().map(|f| hdl(f)).collect();
    let options = Options {
        self_check: false,
        max_failures: 1_000_000,
    };
    let outcome = run_loop(&spec, Simulator::Icarus, &sources, options);
    let why = outcome.summary();
    assert_eq!(outcome.check_code, 1, "{why}");
    assert_eq!(outcome.report["verdict"], "fail", "{why}");
    let listed: BTreeSet<u64> = failures(&outcome.report).keys().copied().collect();
    assert_eq!(
        outcome.report["failed"].as_u64(),
        Some(listed.len() as u64),
        "every failure must be listed: {why}"
    );
    let predicted: BTreeSet<u64> = outcome
        .vectors()
        .iter()
        .filter(|row| fails(row))
        .map(|row| u64::try_from(&row["index"]).unwrap())
        .collect();
    assert!(
        !predicted.is_empty(),
        "no vector meets the bug's condition: {why}"
    );
    assert_eq!(
        listed, predicted,
        "failing indices differ from the bug's condition: {why}"
    );
    outcome
}

/// Asserts every bin in `bins` failed on every hit.
fn assert_all_fail(outcome: &Outcome, bins: &[String]) {
    let all_fail = all_fail_bins(&outcome.report);
    for bin in bins {
        assert!(
            all_fail.contains(bin),
            "bin {bin} should fail on every hit; bins that do: {all_fail:?}\n{}",
            outcome.summary()
        );
    }
}

/// Asserts no bin in `bins` has a failure.
fn assert_never_fail(outcome: &Outcome, bins: &[String]) {
    let failing = failing_bins(&outcome.report);
    for bin in bins {
        assert!(
            !failing.contains_key(bin),
            "bin {bin} should have no failures, has {:?}\n{}",
            failing[bin],
            outcome.summary()
        );
    }
}

/// Asserts `check` lists each failure's wrong outputs as exactly `ports`.
fn assert_wrong_ports(outcome: &Outcome, ports: &[&str]) {
    let want: BTreeSet<String> = ports.iter().map(|p| p.to_string()).collect();
    for (index, failure) in failures(&outcome.report) {
        assert_eq!(wrong_ports(failure), want, "vector {index}: {failure}");
    }
}

#[test]
fn stuck_result_bit() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("stuck_result_bit");
    for width in WIDTHS {
        // The header: result bit STUCK = (W-1)/2 is stuck at 0, on the net feeding y and zero.
        let stuck = (width - 1) / 2;
        let spec = UnitSpec::new(
            "kiln_total",
            "add",
            "twos",
            width,
            WITH_CARRY_IN,
            "ripple_add_bug_stuck",
        );
        let outcome = expose(
            spec,
            &["bugs/ripple_add_bug_stuck.v", "full_adder.v"],
            |row| bit(&row["y"], stuck),
        );
        for (index, failure) in failures(&outcome.report) {
            let wrong = wrong_ports(failure);
            assert!(wrong.contains("y"), "vector {index}: {failure}");
            let allowed = BTreeSet::from(["y", "zero"].map(String::from));
            assert!(wrong.is_subset(&allowed), "vector {index}: {failure}");
            let (expected, got) = output_values(failure, "y");
            assert_eq!(expected ^ got, BigUint::one() << stuck, "vector {index}");
        }
        let stuck_bin = format!("result.bits[bit{stuck}=1]");
        assert_all_fail(&outcome, std::slice::from_ref(&stuck_bin));
        // It is the result bit the report ranks first, and the only one failing every hit.
        let result_bits = crate::flow::classes(&outcome.report)
            .iter()
            .find(|c| c["id"] == "result.bits")
            .unwrap();
        assert_eq!(
            result_bits["failing_bins"][0]["bin"].as_str(),
            Some(stuck_bin.as_str()),
            "{}",
            outcome.summary()
        );
        let other_bits: Vec<String> = all_fail_bins(&outcome.report)
            .into_iter()
            .filter(|b| b.starts_with("result.bits[") && *b != stuck_bin)
            .collect();
        assert!(other_bits.is_empty(), "{other_bits:?}");
        assert_never_fail(&outcome, &[format!("result.bits[bit{stuck}=0]")]);
    }
    timing.finish(WIDTHS.len());
}

#[test]
fn overflow_from_carry() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("overflow_from_carry");
    for width in WIDTHS {
        let spec = UnitSpec::new(
            "furnace_heat",
            "add",
            "twos",
            width,
            WITH_CARRY_IN,
            "ripple_add_bug_overflow",
        );
        // ovf reports the carry, so exactly the vectors whose signed overflow and carry
        // disagree fail.
        let outcome = expose(
            spec,
            &["bugs/ripple_add_bug_overflow.v", "full_adder.v"],
            |row| row["ovf"] != row["co"],
        );
        assert_wrong_ports(&outcome, &["ovf"]);
        // A true sum of exactly max + 1 needs two non-negative operands, so it never carries
        // but overflows: the bug fails it every time. A true sum of min - 1 needs two
        // negative operands, so it always carries and overflows: never wrong. (The other two
        // boundaries depend on the operands' signs and can go either way.)
        let bins = |name: &str| -> Vec<String> {
            ["cin0", "cin1"]
                .map(|c| format!("overflow.boundary[{name}.{c}]"))
                .to_vec()
        };
        assert!(failing_classes(&outcome.report).contains("overflow.boundary"));
        assert_all_fail(&outcome, &bins("past_max"));
        assert_never_fail(&outcome, &bins("past_min"));
    }
    timing.finish(WIDTHS.len());
}

#[test]
fn carry_skip_full_chain() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("carry_skip_full_chain");
    for width in WIDTHS {
        let outcome = full_chain_run(width, 300);
        assert_all_fail(
            &outcome,
            &[
                format!("chain.carry_in[k={width}]"),
                "carry.edge[carry.cin1]".to_string(),
            ],
        );
        assert!(
            failing_bins(&outcome.report).contains_key(&format!("chain.length[k={width}]")),
            "{}",
            outcome.summary()
        );
    }
    timing.finish(WIDTHS.len());
}

/// The carry-skip bug of ripple_add_bug_full_chain: co (and ovf) are wrong exactly when every
/// bit propagates (a ^ b = 11..1) and cin = 1; y is never wrong.
fn full_chain_run(width: u32, count: u64) -> Outcome {
    let spec = UnitSpec::new(
        "mill_feed",
        "add",
        "twos",
        width,
        WITH_CARRY_IN,
        "ripple_add_bug_full_chain",
    )
    .count(count);
    let outcome = expose(
        spec,
        &["bugs/ripple_add_bug_full_chain.v", "full_adder.v"],
        |row| (&row["a"] ^ &row["b"]) == mask(width) && row["cin"].is_one(),
    );
    assert_wrong_ports(&outcome, &["co", "ovf"]);
    outcome
}

/// Uniform random vectors essentially never expose the carry-skip bug at 32 bits: one vector
/// (a, b, cin) hits it with probability 2^-32 (all 32 bits propagate) * 1/2 (cin = 1) =
/// 2^-33, about 1.16e-10, so 20,000 vectors expose it with probability about 20,000 * 2^-33
/// = 2.3e-6. The directed set has the full-length chain from the carry-in by construction.
#[test]
fn full_chain_bug_needs_the_directed_set() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("full_chain_bug_needs_the_directed_set");
    let outcome = full_chain_run(32, 20_000);
    let why = outcome.summary();
    assert_eq!(outcome.random(), 20_000, "{why}");
    let directed = outcome.directed();
    // (a) The random part was simulated and checked, and no random vector failed.
    assert_eq!(
        outcome.report["vectors"].as_u64(),
        Some(directed + 20_000),
        "{why}"
    );
    let failing: Vec<u64> = failures(&outcome.report).keys().copied().collect();
    assert!(
        failing.iter().all(|&i| i < directed),
        "a random vector exposed the bug (indices >= {directed}): {failing:?}"
    );
    // (b) The directed set does: exit 1 (asserted by expose), and the full-length chain
    // started by the carry-in fails on every hit.
    assert!(!failing.is_empty(), "{why}");
    assert_all_fail(&outcome, &["chain.carry_in[k=32]".to_string()]);
    timing.finish(1);
}

#[test]
fn broken_borrow_chain() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("broken_borrow_chain");
    for width in WIDTHS {
        // The header: the borrow into bit BREAK = W/2 is tied to 0.
        let brk = width / 2;
        let spec = UnitSpec::new(
            "sluice_drop",
            "sub",
            "twos",
            width,
            WITH_CARRY_IN,
            "ripple_sub_bug_chain",
        );
        // The true borrow into bit BREAK is 1 exactly when the low BREAK bits of a are less
        // than the low BREAK bits of b plus the borrow-in.
        let outcome = expose(
            spec,
            &["bugs/ripple_sub_bug_chain.v", "full_subtractor.v"],
            |row| low_bits(&row["a"], brk) < low_bits(&row["b"], brk) + &row["cin"],
        );
        for (index, failure) in failures(&outcome.report) {
            // Dropping that borrow leaves the difference 2^BREAK too large.
            let (expected, got) = output_values(failure, "y");
            assert_eq!(
                got,
                (expected + (BigUint::one() << brk)) & mask(width),
                "vector {index}"
            );
        }
        // Every cell row of bit BREAK-1 that sends a borrow on fails on every hit ...
        let sending: Vec<String> = ["a0b1c0", "a0b1c1", "a0b0c1", "a1b1c1"]
            .iter()
            .map(|row| format!("cell.rows[bit{}.{row}]", brk - 1))
            .collect();
        assert_all_fail(&outcome, &sending);
        // ... and no row of a lower bit does: the report points at the broken link.
        let lower: Vec<String> = all_fail_bins(&outcome.report)
            .into_iter()
            .filter(|b| {
                b.strip_prefix("cell.rows[bit")
                    .and_then(|rest| rest.split('.').next())
                    .and_then(|n| n.parse::<u32>().ok())
                    .is_some_and(|n| n + 1 < brk)
            })
            .collect();
        assert!(lower.is_empty(), "{lower:?}\n{}", outcome.summary());
        // Any borrow chain longer than W/2 crosses the break, so those bins fail every hit.
        let long_chains: Vec<String> = (brk + 1..=width)
            .map(|k| format!("chain.length[k={k}]"))
            .filter(|b| failing_bins(&outcome.report).contains_key(b))
            .collect();
        assert!(
            long_chains.contains(&format!("chain.length[k={width}]")),
            "{}",
            outcome.summary()
        );
        assert_all_fail(&outcome, &long_chains);
    }
    timing.finish(WIDTHS.len());
}

/// The add-mode and subtract-mode class ids of an add/subtract unit's failures.
fn assert_only_subtract_classes_fail(outcome: &Outcome) {
    let failing = failing_classes(&outcome.report);
    let add_mode: Vec<&String> = failing.iter().filter(|c| !c.starts_with("sub.")).collect();
    assert!(add_mode.is_empty(), "add-mode classes failed: {add_mode:?}");
    for class in ["sub.borrow.edge", "sub.result.bits", "sub.chain.length"] {
        assert!(
            failing.contains(class),
            "{class} passed\n{}",
            outcome.summary()
        );
    }
    // Every subtract-mode vector fails, so the sub-mode carry bins fail on every hit.
    assert_all_fail(
        outcome,
        &[
            "sub.borrow.edge[no_borrow]".to_string(),
            "sub.borrow.edge[borrow]".to_string(),
        ],
    );
}

fn addsub_spec(width: u32, module: &str) -> UnitSpec {
    UnitSpec::new("gate_trim", "addsub", "twos", width, MODE_ONLY, module)
        .convention("carry_out", "carry")
}

#[test]
fn inverted_carry_convention_in_subtract_mode() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("inverted_carry_convention_in_subtract_mode");
    for width in WIDTHS {
        let outcome = expose(
            addsub_spec(width, "addsub_bug_carry_convention"),
            &["bugs/addsub_bug_carry_convention.v", "full_adder.v"],
            |row| row["mode"].is_one(),
        );
        // Only the carry flag is wrong, and it is always the inverse of the raw carry.
        assert_wrong_ports(&outcome, &["co"]);
        assert_only_subtract_classes_fail(&outcome);
    }
    timing.finish(WIDTHS.len());
}

#[test]
fn missing_plus_one_in_subtract_mode() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("missing_plus_one_in_subtract_mode");
    for width in WIDTHS {
        let outcome = expose(
            addsub_spec(width, "addsub_bug_no_plus_one"),
            &["bugs/addsub_bug_no_plus_one.v", "full_adder.v"],
            |row| row["mode"].is_one(),
        );
        for (index, failure) in failures(&outcome.report) {
            let (expected, got) = output_values(failure, "y");
            assert_eq!(got, minus_one(&expected, width), "vector {index}");
        }
        assert_only_subtract_classes_fail(&outcome);
    }
    timing.finish(WIDTHS.len());
}

#[test]
fn missing_end_around_carry() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("missing_end_around_carry");
    for width in WIDTHS {
        let spec = UnitSpec::new(
            "orchard_yield",
            "add",
            "ones",
            width,
            NO_CARRY_IN,
            "ones_add_bug_no_end_around",
        );
        // The end-around carry is the carry out of a + b.
        let outcome = expose(
            spec,
            &["bugs/ones_add_bug_no_end_around.v", "full_adder.v"],
            |row| &row["a"] + &row["b"] > mask(width),
        );
        for (index, failure) in failures(&outcome.report) {
            let (expected, got) = output_values(failure, "y");
            assert_eq!(got, minus_one(&expected, width), "vector {index}");
        }
        assert_all_fail(
            &outcome,
            &[
                "ones.end_around[carry]".to_string(),
                "ones.end_around[carry_full_ripple]".to_string(),
            ],
        );
        assert_never_fail(&outcome, &["ones.end_around[no_carry]".to_string()]);
    }
    timing.finish(WIDTHS.len());
}
