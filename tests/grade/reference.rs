//! `grade --reference netlist` (issue 15): grading a unit with a known functional bug against
//! its own fault-free responses, on a Yosys netlist of `tests/hdl/bugs/ripple_add_bug_overflow.v`
//! (whose ovf is the raw carry out instead of the two's-complement overflow).

use crate::util::{have, hdl, spec_text, Flags, Sandbox, Unit, SYNTH_STEPS};

/// Synthesizes the buggy adder at `width` to `bug.json` and writes its spec (the reference
/// adder's spec with the buggy module).
fn setup(sb: &Sandbox, width: u32) -> (String, String) {
    let module = "ripple_add_bug_overflow";
    let script = format!(
        "read_verilog {} {}; chparam -set W {width} {module}; {}; write_json bug.json",
        hdl("bugs/ripple_add_bug_overflow.v").display(),
        hdl("full_adder.v").display(),
        SYNTH_STEPS.replace("{top}", module),
    );
    sb.tool("yosys", &["-q", "-p", &script]);
    let text = spec_text(Unit::Add, width, 200, Flags::All)
        .replace("module = \"ripple_add\"", &format!("module = \"{module}\""));
    (sb.write("bug.toml", &text), "bug.json".to_string())
}

#[test]
fn issue15_grade_against_the_netlist_of_a_buggy_adder_says_so_everywhere() {
    if !have("yosys") {
        return;
    }
    let sb = Sandbox::new();
    let (spec, json) = setup(&sb, 8);
    sb.gen(&spec, "vec", &[]);
    // The default is unchanged: the netlist is not the spec, grading stops with exit 1.
    let run = sb.run(&["grade", &spec, "--vectors", "vec", "--netlist", &json]);
    run.expect_code(1)
        .expect_stdout("not the unit the spec describes");

    // The vectors where the bug shows: ovf (golden) differs from co, which the buggy ovf
    // copies. Counted from the set's own golden outputs.
    let csv = sb.read("vec/vectors.csv");
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    let (co, ovf) = (col("co"), col("ovf"));
    let disagreeing: Vec<u64> = lines
        .filter_map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            (f[co] != f[ovf]).then(|| f[0].parse().unwrap())
        })
        .collect();
    assert!(disagreeing.len() > 5, "{disagreeing:?}");

    let run = sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "vec",
        "--netlist",
        &json,
        "--reference",
        "netlist",
        "--format",
        "json",
        "--html",
        "grade.html",
    ]);
    run.expect_code(0)
        .expect_stderr("graded against the netlist's own fault-free responses");
    let doc = run.json();
    assert_eq!(doc["reference"], "netlist");
    let g = &doc["golden_disagreements"];
    assert_eq!(g["vectors"].as_u64().unwrap() as usize, disagreeing.len());
    let listed = g["listed"].as_array().unwrap();
    assert_eq!(listed.len(), disagreeing.len().min(50));
    for (entry, index) in listed.iter().zip(&disagreeing) {
        assert_eq!(entry["port"], "ovf", "{entry}");
        assert_eq!(entry["index"].as_u64().unwrap(), *index, "{entry}");
        assert_ne!(entry["expected"], entry["got"]);
    }
    assert!(doc["detected"].as_u64().unwrap() > 0);
    let html = sb.read("grade.html");
    assert!(html.contains("GRADED AGAINST THE NETLIST, NOT THE GOLDEN MODEL"));
    assert!(html.contains("arithvec grade of grade_add8: GRADED AGAINST THE NETLIST"));
    assert!(html.contains("the netlist's own fault-free responses (--reference netlist)"));

    // The text report opens with the reference and lists the disagreeing vectors.
    let run = sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "vec",
        "--netlist",
        &json,
        "--reference",
        "netlist",
    ]);
    run.expect_code(0)
        .expect_stdout(
            "*** REFERENCE: THE NETLIST'S OWN FAULT-FREE RESPONSES, NOT THE GOLDEN MODEL",
        )
        .expect_stdout(&format!(
            "disagrees with the golden model on {} of",
            disagreeing.len()
        ))
        .expect_stdout(&format!("  vector {}: port ovf golden 0x", disagreeing[0]));

    // The default JSON names its reference too.
    let spec_ok = sb.spec("good", Unit::Add, 8, 50, Flags::All);
    sb.gen(&spec_ok, "vec_ok", &[]);
    let doc = sb.grade(&spec_ok, "vec_ok", &["--builtin"]);
    assert_eq!(doc["reference"], "golden");
    assert!(doc.get("golden_disagreements").is_none());
}
