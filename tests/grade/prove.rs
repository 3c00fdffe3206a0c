//! `arithvec prove`: the project's ripple units and Yosys-synthesised behavioural adders and
//! subtractors are proved equivalent to their specs at 8, 32 and 64 bits; every injected bug
//! of `tests/hdl/bugs` gets a counterexample that `check` confirms on Icarus; a multiplier
//! miter beyond the budget ends "unknown" within it.

use crate::util::{have, hdl, Sandbox, SYNTH_STEPS};

/// Synthesizes `top` from `files` (with `W` set to `width`, plus `params`) to `out`.
fn synth(sb: &Sandbox, files: &[&str], top: &str, params: &str, out: &str) {
    let paths: Vec<String> = files.iter().map(|f| hdl(f).display().to_string()).collect();
    let script = format!(
        "read_verilog {}; chparam {params} {top}; {}; write_json {out}",
        paths.join(" "),
        SYNTH_STEPS.replace("{top}", top)
    );
    sb.tool("yosys", &["-q", "-p", &script]);
}

/// The spec file `specs/NAME.toml` at `width` (W and width replaced), written to the sandbox.
fn spec_at(sb: &Sandbox, name: &str, width: u32) -> String {
    let text = std::fs::read_to_string(hdl(&format!("specs/{name}.toml"))).expect("spec");
    let text = text
        .replace("width = 16", &format!("width = {width}"))
        .replace("W = 16", &format!("W = {width}"));
    sb.write(&format!("{name}_{width}.toml"), &text)
}

#[test]
fn ripple_units_and_behavioural_netlists_are_proved_at_8_32_64() {
    if !have("yosys") {
        return;
    }
    let sb = Sandbox::new();
    let units: [(&str, &[&str], &str); 4] = [
        ("ripple_add", &["ripple_add.v", "full_adder.v"], ""),
        ("ripple_sub", &["ripple_sub.v", "full_subtractor.v"], ""),
        ("behav_add", &["behav/behav_add.v"], "-set SIGNED 1"),
        ("behav_sub", &["behav/behav_sub.v"], "-set SIGNED 1"),
    ];
    for (module, files, extra) in units {
        let spec_name = if module.starts_with("behav") {
            format!("{module}_twos")
        } else {
            module.to_string()
        };
        for width in [8, 32, 64] {
            let spec = spec_at(&sb, &spec_name, width);
            let json = format!("{module}_{width}.json");
            synth(
                &sb,
                files,
                module,
                &format!("-set W {width} {extra}"),
                &json,
            );
            let run = sb.run(&["prove", &spec, "--netlist", &json, "--format", "json"]);
            run.expect_code(0);
            let r = run.json();
            assert_eq!(r["verdict"]["status"], "proved", "{module} at {width}: {r}");
            // Every output of the spec was compared: y, co, ovf, zero, neg.
            assert_eq!(r["compared"].as_array().unwrap().len(), 5, "{r}");
            assert_eq!(r["input_bits"], 2 * width + 1);
            assert!(r["reference_checked_vectors"].as_u64().unwrap() > 1000);
            assert!(r["limits"].as_str().unwrap().contains("timing"));
        }
    }
    // The text report says what was proved and what was not.
    let spec = spec_at(&sb, "behav_sub_twos", 8);
    let text = sb.run(&["prove", &spec, "--netlist", "behav_sub_8.json"]);
    text.expect_code(0);
    text.expect_stdout("PROVED: combinational equivalence");
    text.expect_stdout("not proved: timing");
}

#[test]
fn every_injected_bug_gets_a_counterexample_that_check_confirms_on_icarus() {
    if !(have("yosys") && have("iverilog")) {
        return;
    }
    let sb = Sandbox::new();
    let bugs: [(&str, &str, Option<&str>); 7] = [
        ("addsub_bug_carry_convention", "full_adder.v", None),
        ("addsub_bug_no_plus_one", "full_adder.v", None),
        (
            "ones_add_bug_no_end_around",
            "full_adder.v",
            Some("ones_add"),
        ),
        ("ripple_add_bug_full_chain", "full_adder.v", None),
        ("ripple_add_bug_overflow", "full_adder.v", None),
        ("ripple_add_bug_stuck", "full_adder.v", None),
        ("ripple_sub_bug_chain", "full_subtractor.v", None),
    ];
    for (bug, cell, reference) in bugs {
        let spec = hdl(&format!("specs/{bug}.toml")).display().to_string();
        let rtl = format!("bugs/{bug}.v");
        synth(&sb, &[&rtl, cell], bug, "-set W 16", &format!("{bug}.json"));
        let mut args = vec![
            "prove".to_string(),
            spec.clone(),
            "--netlist".into(),
            format!("{bug}.json"),
            "--out".into(),
            format!("cex_{bug}"),
            "--format".into(),
            "json".into(),
        ];
        // One's complement has no built-in structure: the bug-free unit, synthesised, is
        // the reference (simulated against the golden model first).
        if let Some(r) = reference {
            synth(
                &sb,
                &[&format!("{r}.v"), cell],
                r,
                "-set W 16",
                &format!("{r}.json"),
            );
            args.extend(["--reference".into(), format!("{r}.json")]);
            args.extend(["--reference-module".into(), r.to_string()]);
        }
        let argv: Vec<&str> = args.iter().map(String::as_str).collect();
        let run = sb.run(&argv);
        run.expect_code(1);
        let r = run.json();
        assert_eq!(r["verdict"]["status"], "counterexample", "{bug}: {r}");
        let outputs = r["verdict"]["outputs"].as_array().unwrap();
        assert!(outputs.iter().any(|o| o["differs"] == true), "{r}");
        // The counterexample set runs on the buggy RTL in Icarus and check fails on it.
        let dir = format!("cex_{bug}");
        let tb = format!("tb_{bug}.v");
        sb.run(&[
            "testbench",
            &spec,
            "--vectors",
            &dir,
            "--hdl",
            "verilog",
            "-o",
            &tb,
        ])
        .expect_code(0);
        let sim = format!("sim_{bug}");
        sb.tool(
            "iverilog",
            &[
                "-g2005",
                "-o",
                &sim,
                &tb,
                &hdl(&rtl).display().to_string(),
                &hdl(cell).display().to_string(),
            ],
        );
        let log = format!("results_{bug}.csv");
        sb.tool(
            "vvp",
            &[
                "-n",
                &sim,
                &format!("+stimulus={dir}/stimulus.hex"),
                &format!("+results={log}"),
            ],
        );
        let json = format!("check_{bug}.json");
        let check = sb.run(&[
            "check",
            &spec,
            "--log",
            &log,
            "--vectors",
            &dir,
            "--json",
            &json,
        ]);
        check.expect_code(1);
        let report = sb.json(&json);
        assert_eq!(report["vectors"], 1, "{report}");
        assert_eq!(report["failed"], 1, "{bug}: {report}");
        // check finds wrong exactly the ports prove named as differing.
        let differing: Vec<&str> = outputs
            .iter()
            .filter(|o| o["differs"] == true)
            .map(|o| o["port"].as_str().unwrap())
            .collect();
        let wrong: Vec<&str> = report["failures"][0]["outputs"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|o| o["status"] == "wrong")
            .map(|o| o["port"].as_str().unwrap())
            .collect();
        assert_eq!(wrong, differing, "{bug}: {report}");
        assert!(report["failures"][0]["repro"]
            .as_str()
            .unwrap()
            .starts_with("top-up vector 0"));
    }
}

#[test]
fn a_multiplier_beyond_the_budget_ends_unknown_within_it() {
    if !have("yosys") {
        return;
    }
    let sb = Sandbox::new();
    let spec = sb.write(
        "mul.toml",
        "name = \"lantern_mul\"\noperation = \"mul\"\nwidth = 16\nencoding = \"unsigned\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\nresult = \"p\"\n\n[dut]\nmodule = \"behav_mul\"\n\
         parameters = { W = 16, SIGNED = 0 }\n",
    );
    synth(
        &sb,
        &["behav/behav_mul.v"],
        "behav_mul",
        "-set W 16 -set SIGNED 0",
        "mul.json",
    );
    synth(
        &sb,
        &["array_mul.v", "full_adder.v"],
        "array_mul",
        "-set W 16",
        "amul.json",
    );
    let run = sb.run(&[
        "prove",
        &spec,
        "--netlist",
        "mul.json",
        "--reference",
        "amul.json",
        "--reference-module",
        "array_mul",
        "--conflicts",
        "3000",
        "--format",
        "json",
    ]);
    run.expect_code(3);
    let r = run.json();
    assert_eq!(r["verdict"]["status"], "unknown", "{r}");
    // The search stops within a few conflicts of the budget (see `gates::sat`).
    let spent = r["conflicts"].as_u64().unwrap();
    assert!((3000..=3300).contains(&spent), "{r}");
    assert_eq!(r["conflict_budget"], 3000);
    // The array multiplier reference agreed with the golden model before it was used.
    assert!(r["reference_checked_vectors"].as_u64().unwrap() > 1000);
    let text = sb.run(&[
        "prove",
        &spec,
        "--netlist",
        "mul.json",
        "--reference",
        "amul.json",
        "--reference-module",
        "array_mul",
        "--conflicts",
        "3000",
    ]);
    text.expect_code(3);
    text.expect_stdout("UNKNOWN");
    text.expect_stdout("nothing was proved");
    // The budget is worded as the limit the solver checks, with the real spent count.
    text.expect_stdout(&format!(
        "budget 3000 conflicts; the solver stops at the first check past it; spent: {spent} conflicts"
    ));
    assert!(!text.stdout.contains("at most"), "{}", text.stdout);
}
