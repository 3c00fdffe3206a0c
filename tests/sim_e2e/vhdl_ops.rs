//! Shifters and dividers on GHDL (issue 11): the VHDL testbench drives numeric_std
//! behavioural units, `tests/hdl/vhdl/numeric_shift.vhd` (numeric_std `shift_left` /
//! `shift_right`) and `numeric_divrem.vhd` (numeric_std `/` and `rem`; IEEE 1076-2008
//! clause 16.8, from memory), and the whole loop (gen, testbench --hdl vhdl, ghdl -a/-e/-r,
//! check --require 100) must pass at 8 and 32 bits. Before the fix the VHDL testbench
//! declared a shift's amount as one std_logic, so GHDL refused to associate it with the
//! unit's `sh : std_logic_vector(AW - 1 downto 0)` port. The shifter's bug variant
//! (`BUG = 1`: sra fills with 0) fails with exit 1 and every failure in `sra.sign_fill`.

use crate::flow::{classes, failures, hdl, run_loop, Options, Simulator, Timing};
use crate::spec::UnitSpec;

const SHIFT: &[(&str, &str)] = &[
    ("a", "a"),
    ("amount", "sh"),
    ("result", "y"),
    ("carry_out", "co"),
    ("zero", "zero"),
    ("negative", "neg"),
];

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

fn shifter(op: &'static str, code: i64, encoding: &'static str, width: u32, bug: i64) -> UnitSpec {
    let aw = arithvec::default_amount_width(width) as i64;
    let spec = UnitSpec::new("ledge_shift", op, encoding, width, SHIFT, "numeric_shift")
        .parameter("AW", aw)
        .parameter("OP", code)
        .parameter("BUG", bug);
    UnitSpec {
        name: format!("{}_{op}{}", spec.name, if bug == 1 { "_bug" } else { "" }),
        ..spec
    }
}

#[test]
fn issue11_vhdl_shifter_passes_on_ghdl() {
    if !Simulator::Ghdl.available() {
        return;
    }
    let timing = Timing::start("issue11_vhdl_shifter");
    let source = hdl("vhdl/numeric_shift.vhd");
    let mut loops = 0;
    for (op, code, encoding) in [
        ("shl", 0, "unsigned"),
        ("shr", 1, "unsigned"),
        ("sra", 2, "twos"),
    ] {
        for width in [8, 32] {
            run_loop(
                &shifter(op, code, encoding, width, 0),
                Simulator::Ghdl,
                std::slice::from_ref(&source),
                Options::default(),
            )
            .assert_clean_pass();
            loops += 1;
        }
    }
    timing.finish(loops);
}

#[test]
fn issue11_vhdl_sra_with_zero_fill_fails_in_sign_fill() {
    if !Simulator::Ghdl.available() {
        return;
    }
    let timing = Timing::start("issue11_vhdl_sra_bug");
    let source = hdl("vhdl/numeric_shift.vhd");
    for width in [8, 32] {
        let outcome = run_loop(
            &shifter("sra", 2, "twos", width, 1),
            Simulator::Ghdl,
            std::slice::from_ref(&source),
            Options::default(),
        );
        let why = outcome.summary();
        let r = &outcome.report;
        assert_eq!(outcome.check_code, 1, "{why}");
        assert_eq!(r["verdict"], "fail", "{why}");
        let failed = r["failed"].as_u64().unwrap();
        assert!(failed > 0, "{why}");
        // Every failure is a negative a shifted by a non-zero amount: the sign-fill class
        // holds them all, and no vector with a non-negative a fails.
        let sign_fill = classes(r)
            .iter()
            .find(|c| c["id"] == "sra.sign_fill")
            .unwrap_or_else(|| panic!("no sra.sign_fill class: {why}"));
        assert_eq!(sign_fill["failures"].as_u64(), Some(failed), "{why}");
        let listed = failures(r);
        assert!(!listed.is_empty(), "{why}");
        for failure in listed.values() {
            let inputs = failure["inputs"].as_array().unwrap();
            let a = inputs.iter().find(|i| i["signal"] == "a").unwrap();
            assert!(
                a["value"].as_str().unwrap().starts_with('-'),
                "a non-negative a failed: {failure}"
            );
            // The amount is reported as the number the hex says (an unsigned count of
            // amount_width bits), not as its low bit.
            let amount = inputs.iter().find(|i| i["signal"] == "amount").unwrap();
            let hex = u64::from_str_radix(amount["hex"].as_str().unwrap(), 16).unwrap();
            assert!(hex > 0, "{failure}");
            assert_eq!(amount["value"], hex.to_string(), "{failure}");
        }
    }
    timing.finish(2);
}

/// divrem (twos with truncate rounding, and unsigned; div_by_zero = "all_ones", the spec
/// default) against numeric_std `/` and `rem` (numeric_divrem.vhd writes out division by
/// zero and min / -1).
#[test]
fn issue11_vhdl_divider_passes_on_ghdl() {
    if !Simulator::Ghdl.available() {
        return;
    }
    let timing = Timing::start("issue11_vhdl_divider");
    let source = hdl("vhdl/numeric_divrem.vhd");
    let mut loops = 0;
    for (encoding, signed, ports) in [("twos", 1, DIV_TWOS), ("unsigned", 0, DIV_UNSIGNED)] {
        for width in [8, 32] {
            let spec = UnitSpec::new(
                "ledge_div",
                "divrem",
                encoding,
                width,
                ports,
                "numeric_divrem",
            )
            .parameter("SIGNED_OPS", signed);
            let spec = UnitSpec {
                name: format!("{}_{encoding}", spec.name),
                ..spec
            };
            run_loop(
                &spec,
                Simulator::Ghdl,
                std::slice::from_ref(&source),
                Options::default(),
            )
            .assert_clean_pass();
            loops += 1;
        }
    }
    timing.finish(loops);
}
