//! `grade --compact`: the compacted set is smaller, keeps the full set's fault coverage
//! (graded again), and keeps 100% class coverage, judged by `arithvec check` on the log of a
//! real simulation (arithvec's own testbench run by Icarus Verilog on the RTL of
//! `tests/hdl/`).

use serde_json::Value;

use crate::util::{have, hdl, Flags, Sandbox, Unit};

/// The vector count a set's manifest records.
fn manifest_vectors(sb: &Sandbox, dir: &str) -> u64 {
    let m: Value = serde_json::from_str(&sb.read(&format!("{dir}/manifest.json"))).expect("json");
    m["vectors"].as_u64().expect("vectors")
}

/// Runs arithvec's testbench for the set in `dir` on the unit's RTL with Icarus and returns
/// the result log's file name.
fn simulate(sb: &Sandbox, spec: &str, dir: &str, unit: Unit) -> String {
    let tb = format!("tb_{dir}.v");
    sb.run(&[
        "testbench",
        spec,
        "--vectors",
        dir,
        "--hdl",
        "verilog",
        "-o",
        &tb,
    ])
    .expect_code(0);
    let [top, cell] = unit.files();
    let sim = format!("sim_{dir}");
    sb.tool(
        "iverilog",
        &[
            "-g2005",
            "-o",
            &sim,
            &tb,
            &top.display().to_string(),
            &cell.display().to_string(),
        ],
    );
    let log = format!("results_{dir}.csv");
    sb.tool(
        "vvp",
        &[
            "-n",
            &sim,
            &format!("+stimulus={dir}/stimulus.hex"),
            &format!("+results={log}"),
        ],
    );
    log
}

#[test]
fn compaction_keeps_fault_and_class_coverage_in_a_smaller_set() {
    if !(have("yosys") && have("iverilog")) {
        return;
    }
    assert!(hdl("ripple_add.v").is_file());
    let sb = Sandbox::new();
    for unit in Unit::ALL {
        let name = unit.operation();
        let spec = sb.spec(name, unit, 16, 300, Flags::All);
        let full = format!("{name}_full");
        let min = format!("{name}_min");
        sb.gen(&spec, &full, &[]);
        let json = sb.synthesize(name, unit, 16);
        let before = sb.grade(&spec, &full, &["--netlist", &json]);
        let run = sb.run(&[
            "grade",
            &spec,
            "--vectors",
            &full,
            "--netlist",
            &json,
            "--compact",
            "--out",
            &min,
        ]);
        run.expect_code(0);
        assert!(run.stdout.contains("compacted"), "{}", run.describe());
        let (n_full, n_min) = (manifest_vectors(&sb, &full), manifest_vectors(&sb, &min));
        let after = sb.grade(&spec, &min, &["--netlist", &json]);
        eprintln!(
            "{}: {n_full} vectors -> {n_min}; faults detected {} -> {} of {}",
            unit.module(),
            before["detected"],
            after["detected"],
            after["collapsed"]
        );
        assert!(n_min < n_full, "{n_min} !< {n_full}");
        assert_eq!(after["vectors"].as_u64(), Some(n_min));
        assert_eq!(after["detected"], before["detected"]);
        assert_eq!(after["coverage_percent"], before["coverage_percent"]);

        // Class coverage of the compacted set, from a real simulation's log.
        let log = simulate(&sb, &spec, &min, unit);
        let check = sb.run(&[
            "check",
            &spec,
            "--log",
            &log,
            "--vectors",
            &min,
            "--require",
            "100",
        ]);
        check.expect_code(0);
    }
}

#[test]
fn the_class_gate_fails_a_set_that_keeps_only_fault_coverage() {
    // Control for the test above: `check --require 100` does reject a set that misses
    // classes, so its exit 0 there means something. The weak set is the seed part alone.
    if !have("iverilog") {
        return;
    }
    let sb = Sandbox::new();
    let unit = Unit::Add;
    let spec = sb.spec("add", unit, 16, 0, Flags::All);
    let s = crate::util::spec(unit, 16, 0, Flags::All);
    let generator = arithvec::Generator::new(&s, Some(0), None);
    let seeds: Vec<u64> = (0..12).collect();
    arithvec::write_selection(&generator, &s, &sb.path("seeds"), &seeds).expect("write");
    let graded = sb.grade(&spec, "seeds", &["--builtin"]);
    assert_eq!(graded["detected"], graded["collapsed"]);
    let log = simulate(&sb, &spec, "seeds", unit);
    let check = sb.run(&[
        "check",
        &spec,
        "--log",
        &log,
        "--vectors",
        "seeds",
        "--require",
        "100",
    ]);
    check.expect_code(3);
}

#[test]
fn builtin_compaction_is_smaller_and_keeps_coverage() {
    let sb = Sandbox::new();
    for unit in Unit::ALL {
        let name = unit.operation();
        let spec = sb.spec(name, unit, 32, 500, Flags::ArithmeticOnly);
        let full = format!("{name}_full");
        let min = format!("{name}_min");
        sb.gen(&spec, &full, &[]);
        let run = sb.run(&[
            "grade",
            &spec,
            "--vectors",
            &full,
            "--builtin",
            "--compact",
            "--out",
            &min,
            "-q",
        ]);
        run.expect_code(0);
        let after = sb.grade(&spec, &min, &["--builtin", "--require", "100"]);
        assert!(manifest_vectors(&sb, &min) < manifest_vectors(&sb, &full));
        assert_eq!(after["detected"], after["collapsed"]);
    }
}
