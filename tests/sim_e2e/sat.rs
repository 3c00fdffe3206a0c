//! The reference saturating adder `tests/hdl/sat_add.v` and its two injected bugs, through the
//! whole loop on Icarus (gen, testbench, simulate, check). The clean unit must pass with full
//! coverage; each bug must fail `check` with exit 1 on exactly the vectors its header's
//! condition names, every such vector in the directed set, and the failing bin the header
//! names must fail on every hit (at 32 and 64 bits the failing vectors are all directed). The bugs' conditions are hit by a uniform random pair with
//! probability 2^-33 and 2^-64 at 32 bits (headers of the bug files).

use std::collections::BTreeSet;

use num_bigint::{BigInt, BigUint, Sign};
use num_traits::One;

use crate::flow::{all_fail_bins, failures, run_loop, Options, Simulator};
use crate::spec::UnitSpec;

const SAT_PORTS: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("result", "y"),
    ("saturated", "sat"),
    ("zero", "zero"),
    ("negative", "neg"),
];

const WIDTHS: [u32; 3] = [8, 32, 64];

fn signed(v: &BigUint, w: u32) -> BigInt {
    let u = BigInt::from_biguint(Sign::Plus, v.clone());
    if v.bit(u64::from(w - 1)) {
        u - (BigInt::one() << w)
    } else {
        u
    }
}

fn spec(width: u32, module: &str) -> UnitSpec {
    UnitSpec::new("clip_mixer", "add_sat", "twos", width, SAT_PORTS, module)
}

#[test]
fn sat_add_passes_with_full_coverage() {
    if !Simulator::Icarus.available() {
        return;
    }
    for w in WIDTHS {
        let sources = [
            crate::support::hdl("sat_add.v"),
            crate::support::hdl("full_adder.v"),
        ];
        let outcome = run_loop(
            &spec(w, "sat_add"),
            Simulator::Icarus,
            &sources,
            Options::default(),
        );
        outcome.assert_clean_pass();
    }
}

/// Runs a bug and checks the failing set equals the vectors meeting `fails(a, b)` (signed
/// values), that all of them are directed, and that `bin` failed on every hit.
fn expose(module: &str, bin: &str, fails: impl Fn(&BigInt, &BigInt, u32) -> bool) {
    for w in WIDTHS {
        let sources = [
            crate::support::hdl(&format!("bugs/{module}.v")),
            crate::support::hdl("full_adder.v"),
        ];
        let options = Options {
            self_check: false,
            max_failures: 1_000_000,
        };
        let outcome = run_loop(&spec(w, module), Simulator::Icarus, &sources, options);
        let why = outcome.summary();
        assert_eq!(outcome.check_code, 1, "{why}");
        let listed: BTreeSet<u64> = failures(&outcome.report).keys().copied().collect();
        let predicted: BTreeSet<u64> = outcome
            .vectors()
            .iter()
            .filter(|r| fails(&signed(&r["a"], w), &signed(&r["b"], w), w))
            .map(|r| u64::try_from(&r["index"]).unwrap())
            .collect();
        assert!(!predicted.is_empty(), "{why}");
        assert_eq!(listed, predicted, "{why}");
        // At 8 bits 300 random pairs may meet the condition too; at 32 and 64 bits they
        // do with probability below 300 * 2^-33.
        assert!(
            w < 32 || listed.iter().all(|&i| i < outcome.directed()),
            "a failing vector is not directed: {why}"
        );
        assert!(all_fail_bins(&outcome.report).contains(bin), "{bin}: {why}");
    }
}

#[test]
fn sat_add_bug_one_past_is_caught_by_the_boundary_class() {
    if !Simulator::Icarus.available() {
        return;
    }
    expose(
        "sat_add_bug_one_past",
        "sat.boundary[one_past_max]",
        |a, b, w| a + b == BigInt::one() << (w - 1),
    );
}

#[test]
fn sat_add_bug_min_min_is_caught_by_the_boundary_class() {
    if !Simulator::Icarus.available() {
        return;
    }
    expose(
        "sat_add_bug_min_min",
        "sat.boundary[extreme_min]",
        |a, b, w| {
            let min = -(BigInt::one() << (w - 1));
            *a == min && *b == min
        },
    );
}
