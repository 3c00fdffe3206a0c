//! `grade --top-up`: SAT fault miters give a vector for every fault a set leaves undetected or
//! prove it redundant. The offset-binary zero-detector case reaches 100% testable coverage and
//! its topped-up set passes `check` on Icarus; a netlist with a deliberately redundant gate is
//! proven redundant at 32 and 64 bits, where exhaustive simulation cannot; every top-up vector
//! detects the fault it was made for when simulated again; and SAT agrees with the exhaustive
//! redundancy check wherever that one decides (support <= 20 bits).

use arithvec::{
    detection_matrix, GateKind, Generator, Grader, Inputs, NetId, Netlist, NetlistBuilder,
    PatternSet, Redundancy, SimulationMode, Spec, TopUpStatus, Word, SAT_REDUNDANCY_METHOD,
};

use crate::util::{expected, grade_lib, have, hdl, Sandbox};

/// A ripple-carry adder (a + b, carry out `co`) with one deliberately redundant gate: the
/// carry out is `c | (c & a[msb])` for the last carry `c`, which equals `c` (absorption,
/// common practice, no source). So the AND `redundant_and` never shows at the outputs
/// unless it is stuck at 1 or its `c` input is: its output stuck-at-0 (collapsed with both
/// input branches stuck-at-0, 3 faults) and its `a[msb]` branch stuck-at-1 (the AND then
/// passes `c`, and `c | c = c`) are undetectable by any input: 2 classes, 4 faults. The carry
/// out depends on all 2 x width input bits, so at 32 and 64 bits no exhaustive simulation can
/// prove that.
fn adder_with_redundant_gate(width: u32) -> Netlist {
    let mut b = NetlistBuilder::new("<adder with a redundant gate>", "redundant_add");
    let a = b.input("a", width);
    let bb = b.input("b", width);
    let mut carry: Option<NetId> = None;
    let mut y = Vec::new();
    for i in 0..width as usize {
        let k = i as i64;
        let p = b.gate_net(
            GateKind::Xor,
            &format!("p{i}"),
            &[a[i], bb[i]],
            "p",
            Some(k),
        );
        let g = b.gate_net(
            GateKind::And,
            &format!("g{i}"),
            &[a[i], bb[i]],
            "g",
            Some(k),
        );
        match carry {
            None => {
                y.push(p);
                carry = Some(g);
            }
            Some(c) => {
                y.push(b.gate_net(GateKind::Xor, &format!("s{i}"), &[p, c], "s", Some(k)));
                let t = b.gate_net(GateKind::And, &format!("t{i}"), &[p, c], "t", Some(k));
                carry = Some(b.gate_net(GateKind::Or, &format!("c{i}"), &[g, t], "c", Some(k)));
            }
        }
    }
    let c = carry.expect("width >= 1");
    let msb = a[width as usize - 1];
    let r = b.gate_net(GateKind::And, "redundant_and", &[c, msb], "r", None);
    let co = b.gate_net(GateKind::Or, "co_or", &[c, r], "co_net", None);
    b.output("y", &y);
    b.output("co", &[co]);
    b.build().expect("netlist builds")
}

fn add_spec(width: u32, random: u64) -> Spec {
    let text = format!(
        "name = \"redundant_add{width}\"\noperation = \"add\"\nwidth = {width}\nencoding = \
         \"unsigned\"\n\n[ports]\na = \"a\"\nb = \"b\"\nresult = \"y\"\ncarry_out = \"co\"\n\n\
         [random]\ncount = {random}\nseed = 3\n"
    );
    Spec::parse(&text, "<test spec>").expect("spec parses")
}

fn set_of(spec: &Spec) -> Vec<Inputs> {
    let g = Generator::new(spec, None, None);
    (0..g.total())
        .map(|i| g.vector(i).expect("vector"))
        .collect()
}

/// The two redundant classes of the absorbed AND (see [`adder_with_redundant_gate`]).
fn is_absorbed_and_fault(width: u32, entry: &arithvec::FaultEntry) -> bool {
    (entry.net == "r" && entry.stuck_at == 0 && entry.equivalent_faults == 3)
        || (entry.net == format!("a[{}]", width - 1)
            && entry.stuck_at == 1
            && entry.site.contains("redundant_and"))
}

#[test]
fn a_redundant_gate_is_proven_redundant_at_32_and_64_bits() {
    for width in [32, 64] {
        let nl = adder_with_redundant_gate(width);
        let spec = add_spec(width, 200);
        let vectors = set_of(&spec);
        let report = grade_lib(&spec, &nl, &vectors);
        // Exhaustive simulation cannot decide them: the support is every input bit.
        let open: Vec<_> = report
            .undetected
            .iter()
            .filter(|e| is_absorbed_and_fault(width, e))
            .collect();
        assert_eq!(open.len(), 2, "{width} bits: {:?}", report.undetected);
        for e in &open {
            assert!(
                matches!(e.redundancy, Redundancy::NotProven { support_bits, .. } if support_bits == 2 * width as usize),
                "{e:?}"
            );
        }
        let grader = Grader::new(&spec, &nl).expect("ports match");
        let t = grader.top_up(&vectors, &report, 100_000).expect("top-up");
        let sat_proven: Vec<_> = t
            .faults
            .iter()
            .filter(|f| {
                matches!(&f.top_up, TopUpStatus::ProvenRedundant { method } if method == SAT_REDUNDANCY_METHOD)
            })
            .collect();
        assert_eq!(sat_proven.len(), 2, "{width} bits: {:?}", t.faults);
        for f in &sat_proven {
            assert!(is_absorbed_and_fault(width, &f.fault), "{:?}", f.fault);
        }
        assert_eq!(t.aborted, 0);
        assert_eq!(t.detected + t.proven_redundant, t.collapsed, "{t:?}");
        assert_eq!(t.testable_coverage_percent, 100.0);
        assert!(t.coverage_percent < 100.0);
    }
}

/// Every vector top-up adds detects the fault it was made for when simulated again on its
/// own, and the fault-free netlist gives the golden outputs on it.
#[test]
fn every_top_up_vector_detects_its_fault() {
    // A deliberately weak set (directed only, tiny width) leaves many faults to top up.
    for width in [8u32, 24] {
        let nl = adder_with_redundant_gate(width);
        let spec = add_spec(width, 0);
        let vectors: Vec<Inputs> = set_of(&spec).into_iter().take(3).collect();
        let report = grade_lib(&spec, &nl, &vectors);
        assert!(report.undetected.len() > 10, "{}", report.undetected.len());
        let grader = Grader::new(&spec, &nl).expect("ports match");
        let t = grader.top_up(&vectors, &report, 100_000).expect("top-up");
        assert!(t.vectors_added > 0);
        let mut targeted = 0;
        for f in &t.faults {
            if let TopUpStatus::Detected {
                vector,
                targeted: true,
            } = f.top_up
            {
                targeted += 1;
                let v = &t.added_inputs[vector];
                let rows = vec![vec![v.a, v.b]];
                let p = PatternSet::from_vectors(grader.graded_netlist(), &rows, "t").unwrap();
                let m = detection_matrix(
                    grader.graded_netlist(),
                    grader.faults(),
                    &p,
                    SimulationMode::Serial,
                )
                .unwrap();
                assert!(m.detects(f.fault.class, 0), "{:?}", f.fault);
            }
        }
        assert_eq!(targeted, t.vectors_added);
        let exp = expected(&spec, &t.added_inputs);
        assert!(grader
            .fault_free_mismatches(&t.added_inputs, &exp)
            .unwrap()
            .is_empty());
        assert_eq!(t.detected + t.proven_redundant, t.collapsed);
    }
}

/// Where the exhaustive check decides (support <= 20 input bits), SAT says the same: a
/// fault proven redundant by enumeration has an unsatisfiable miter, and a fault enumeration
/// found a vector for has a satisfiable one.
#[test]
fn sat_agrees_with_the_exhaustive_check_at_small_support() {
    let mut proven = 0;
    let mut testable = 0;
    for (width, nl) in [
        (4, adder_with_redundant_gate(4)),
        (8, adder_with_redundant_gate(8)),
        (10, adder_with_redundant_gate(10)),
        (8, Netlist::ripple_adder(8, false).unwrap()),
    ] {
        let mut spec = add_spec(width, 0);
        if nl.module() == "ripple_adder" {
            spec = Spec::parse(
                &format!(
                    "name = \"r\"\noperation = \"add\"\nwidth = {width}\nencoding = \"unsigned\"\n\n\
                     [ports]\na = \"a\"\nb = \"b\"\nresult = \"y\"\ncarry_out = \"co\"\n"
                ),
                "<t>",
            )
            .unwrap();
        }
        let vectors: Vec<Inputs> = vec![Inputs {
            a: Word::from_u64(1),
            b: Word::from_u64(2),
            ..Inputs::default()
        }];
        let report = grade_lib(&spec, &nl, &vectors);
        let grader = Grader::new(&spec, &nl).expect("ports match");
        for e in report.undetected.iter().chain(&report.redundant) {
            let sat = grader.sat_test(e.class, 100_000).expect("decided");
            match &e.redundancy {
                Redundancy::Proven { .. } => {
                    proven += 1;
                    assert!(sat.is_none(), "{e:?}: SAT found {sat:?}");
                }
                Redundancy::Testable { .. } => {
                    testable += 1;
                    assert!(sat.is_some(), "{e:?}: SAT says redundant");
                }
                Redundancy::NotProven { .. } => panic!("support above 20 at {width} bits"),
            }
        }
    }
    // Two redundant classes in each of the three netlists with the absorbed AND.
    assert_eq!(proven, 6, "proven {proven}");
    assert!(testable > 50, "testable {testable}");
}

/// The case that motivated top-up: a 24-bit offset-binary subtractor whose set covers every
/// corner class leaves faults on the zero detector's inputs undetected. Top-up reaches 100%
/// testable coverage; the written set is graded again, and its testbench run on the RTL by
/// Icarus passes `check`.
#[test]
fn offset_zero_detector_reaches_full_testable_coverage() {
    if !(have("yosys") && have("iverilog")) {
        return;
    }
    let sb = Sandbox::new();
    let spec = hdl("specs/behav_offset_sub.toml").display().to_string();
    let rtl = hdl("behav/behav_offset_sub.v").display().to_string();
    sb.tool(
        "yosys",
        &[
            "-q",
            "-p",
            &format!(
                "read_verilog {rtl}; chparam -set W 24 behav_offset_sub; synth -flatten -top \
                 behav_offset_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json sub.json"
            ),
        ],
    );
    sb.gen(&spec, "vec", &[]).expect_code(0);
    let before = sb.grade(&spec, "vec", &["--netlist", "sub.json"]);
    let undetected = before["undetected"].as_array().unwrap().len();
    assert!(
        undetected > 0,
        "the set should leave the zero detector's faults"
    );
    let zero_faults = before["undetected"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["stuck_at"] == 0)
        .count();
    assert!(zero_faults > 10, "{before}");
    let run = sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "vec",
        "--netlist",
        "sub.json",
        "--top-up",
        "--out",
        "vec2",
        "--format",
        "json",
    ]);
    run.expect_code(0);
    let doc = run.json();
    let t = &doc["top_up"];
    assert_eq!(t["testable_coverage_percent"], 100.0, "{t}");
    assert_eq!(t["aborted"], 0);
    let added = t["vectors_added"].as_u64().unwrap();
    assert!(added > 0 && added <= undetected as u64);
    // Every fault the set left has an outcome, and the detected ones name their vector.
    let faults = t["faults"].as_array().unwrap();
    assert_eq!(faults.len(), undetected);
    for f in faults {
        let s = f["top_up"]["status"].as_str().unwrap();
        assert!(s == "detected" || s == "proven_redundant", "{f}");
    }
    // The written set: original vectors then the added ones, with provenance.
    let m = sb.json("vec2/manifest.json");
    let sel = &m["selection"];
    assert_eq!(
        m["vectors"].as_u64().unwrap(),
        before["vectors"].as_u64().unwrap() + added
    );
    let tops = sel["top_up"].as_array().unwrap();
    assert_eq!(tops.len() as u64, added);
    assert!(tops[0]["fault"].as_str().unwrap().contains("stuck-at-"));
    assert_eq!(tops[0]["method"], arithvec::TOP_UP_METHOD);
    // Graded again from the files: what top-up claimed.
    let after = sb.grade(&spec, "vec2", &["--netlist", "sub.json"]);
    assert_eq!(after["detected"], t["detected"]);
    assert_eq!(
        after["detected"].as_u64().unwrap() + t["proven_redundant"].as_u64().unwrap(),
        after["collapsed"].as_u64().unwrap()
    );
    // The set is a valid vector set for testbench and check: simulate the RTL with Icarus.
    sb.run(&[
        "testbench",
        &spec,
        "--vectors",
        "vec2",
        "--hdl",
        "verilog",
        "-o",
        "tb.v",
    ])
    .expect_code(0);
    sb.tool("iverilog", &["-g2005", "-o", "sim", "tb.v", &rtl]);
    sb.tool(
        "vvp",
        &[
            "-n",
            "sim",
            "+stimulus=vec2/stimulus.hex",
            "+results=results.csv",
        ],
    );
    let check = sb.run(&[
        "check",
        &spec,
        "--log",
        "results.csv",
        "--vectors",
        "vec2",
        "--json",
        "check.json",
    ]);
    check.expect_code(0);
    let report = sb.json("check.json");
    assert_eq!(
        report["vectors"].as_u64(),
        m["vectors"].as_u64(),
        "{report}"
    );
    // A wrong result on a top-up vector fails, and its repro says it is a top-up vector.
    let log = sb.read("results.csv");
    let mut lines: Vec<String> = log.lines().map(str::to_string).collect();
    let header: Vec<&str> = lines[0].split(',').map(str::trim).collect();
    let y = header.iter().position(|h| *h == "y").expect("y column");
    let last = lines.len() - 1;
    let mut cells: Vec<String> = lines[last].split(',').map(str::to_string).collect();
    let flipped = if cells[y].trim().ends_with('0') {
        "1"
    } else {
        "0"
    };
    let mut v = cells[y].trim().to_string();
    v.pop();
    v.push_str(flipped);
    cells[y] = v;
    lines[last] = cells.join(",");
    sb.write("bad.csv", &(lines.join("\n") + "\n"));
    let bad = sb.run(&[
        "check",
        &spec,
        "--log",
        "bad.csv",
        "--vectors",
        "vec2",
        "--json",
        "bad.json",
    ]);
    bad.expect_code(1);
    let failures = sb.json("bad.json")["failures"].clone();
    let repro = failures[0]["repro"]
        .as_str()
        .unwrap_or_default()
        .to_string();
    assert!(repro.starts_with("top-up vector"), "{failures}");
    // A manifest whose top-up operands are not values of the spec is refused, naming the
    // field; so is one whose top-up list does not add up to the set's vector count.
    for (name, edit) in [("bad_hex", "hex"), ("bad_count", "count")] {
        let dir = format!("vec_{name}");
        std::fs::create_dir_all(sb.path(&dir)).unwrap();
        for f in ["vectors.csv", "stimulus.hex", "expected.hex"] {
            std::fs::copy(
                sb.path(&format!("vec2/{f}")),
                sb.path(&format!("{dir}/{f}")),
            )
            .unwrap();
        }
        let mut m = sb.json("vec2/manifest.json");
        if edit == "hex" {
            m["selection"]["top_up"][0]["inputs"]["a"] = "zz".into();
        } else {
            m["selection"]["top_up"].as_array_mut().unwrap().pop();
        }
        sb.write(&format!("{dir}/manifest.json"), &m.to_string());
        let run = sb.run(&["check", &spec, "--log", "results.csv", "--vectors", &dir]);
        run.expect_code(2);
        run.expect_stderr(if edit == "hex" {
            "selection.top_up[0].inputs.a"
        } else {
            "top-up vectors but the set holds"
        });
    }
}

/// Appends an array multiplier of `x` by `y` (rows over `y`'s bits) to `b` and returns the
/// low `x.len()` product bits. Cells are named with `tag`.
fn low_product(b: &mut NetlistBuilder, x: &[NetId], y: &[NetId], tag: &str) -> Vec<NetId> {
    let w = x.len();
    let zero = b.constant(false);
    let mut acc = vec![zero; w];
    let mut n = 0;
    for (i, &yi) in y.iter().enumerate() {
        let mut carry = zero;
        for (j, &xj) in x.iter().enumerate().take(w - i) {
            let mut cell = |b: &mut NetlistBuilder, kind, ins: &[NetId]| {
                n += 1;
                b.gate_net(kind, &format!("{tag}{n}"), ins, tag, Some(n))
            };
            let pp = cell(b, GateKind::And, &[xj, yi]);
            let s = acc[i + j];
            let t = cell(b, GateKind::Xor, &[s, pp]);
            let sum = cell(b, GateKind::Xor, &[t, carry]);
            let g = cell(b, GateKind::And, &[s, pp]);
            let c = cell(b, GateKind::And, &[t, carry]);
            carry = cell(b, GateKind::Or, &[g, c]);
            acc[i + j] = sum;
        }
    }
    acc
}

/// An adder whose every result bit is XORed with (a * b)[i] ^ (b * a)[i], two structurally
/// different multipliers: the product bits are equal (multiplication commutes), so the unit
/// still adds, but proving the XOR's faults redundant means proving commutativity, beyond a
/// small conflict budget. Top-up must call those faults aborted, claim nothing about them,
/// and keep its counts adding up.
#[test]
fn a_spent_budget_is_reported_as_aborted() {
    let width = 12usize;
    let mut b = NetlistBuilder::new("<adder with a commutativity miter>", "miter_add");
    let a = b.input("a", width as u32);
    let bb = b.input("b", width as u32);
    let m1 = low_product(&mut b, &a, &bb, "m");
    let m2 = low_product(&mut b, &bb, &a, "n");
    let mut carry: Option<NetId> = None;
    let mut y = Vec::new();
    for i in 0..width {
        let k = Some(i as i64);
        let p = b.gate_net(GateKind::Xor, &format!("p{i}"), &[a[i], bb[i]], "p", k);
        let g = b.gate_net(GateKind::And, &format!("g{i}"), &[a[i], bb[i]], "g", k);
        let s = match carry {
            None => {
                carry = Some(g);
                p
            }
            Some(c) => {
                let s = b.gate_net(GateKind::Xor, &format!("s{i}"), &[p, c], "s", k);
                let t = b.gate_net(GateKind::And, &format!("t{i}"), &[p, c], "t", k);
                carry = Some(b.gate_net(GateKind::Or, &format!("c{i}"), &[g, t], "c", k));
                s
            }
        };
        let d = b.gate_net(GateKind::Xor, &format!("d{i}"), &[m1[i], m2[i]], "d", k);
        y.push(b.gate_net(GateKind::Xor, &format!("yx{i}"), &[s, d], "yy", k));
    }
    b.output("y", &y);
    b.output("co", &[carry.unwrap()]);
    let nl = b.build().expect("netlist builds");
    let spec = add_spec(width as u32, 500);
    let vectors = set_of(&spec);
    // The netlist is the spec (grade_lib checks it on every vector).
    let report = grade_lib(&spec, &nl, &vectors);
    let grader = Grader::new(&spec, &nl).expect("ports match");
    let budget = 300;
    let t = grader.top_up(&vectors, &report, budget).expect("top-up");
    assert!(t.aborted > 0, "{t:?}");
    let mut aborted_spent = 0;
    for f in &t.faults {
        if let TopUpStatus::Aborted {
            conflicts,
            budget: b,
        } = f.top_up
        {
            assert_eq!(b, budget);
            // The reported figure is the solver's own count: the same miter solved again
            // (batsat is deterministic) spends exactly that many.
            let again =
                arithvec::fault_miter(&nl, grader.faults().representative(f.fault.class), budget);
            assert_eq!(again.answer, arithvec::Answer::Unknown);
            assert_eq!(again.conflicts, conflicts, "{f:?}");
            aborted_spent += conflicts;
            // The solver stops at its next budget check once the budget's learnt clauses are
            // counted; conflicts that learn only a unit clause are not in that count, so
            // the solver's own figure may run a little past it.
            assert!(
                conflicts >= budget && conflicts <= budget + budget / 10,
                "{conflicts}"
            );
        }
    }
    assert_eq!(
        t.detected + t.proven_redundant + t.aborted,
        t.collapsed,
        "every fault is detected, proven redundant or aborted"
    );
    assert!(t.testable_coverage_percent < 100.0);
    assert_eq!(t.aborted_conflicts_spent, aborted_spent);
    assert!(t.conflicts_spent >= aborted_spent);
}

/// An 8 x 8 multiplier's faults with a budget of one conflict: most solves stop at the first
/// budget check, some past it. The report gives the solver's spent counts (per aborted fault
/// and in total, in JSON and text) and words the budget as the limit the solver checks; it
/// never claims "at most" the budget.
#[test]
fn top_up_reports_the_conflicts_spent_past_the_budget() {
    if !have("yosys") {
        return;
    }
    let sb = Sandbox::new();
    let spec = sb.write(
        "mul.toml",
        "name = \"lantern_mul\"\noperation = \"mul\"\nwidth = 8\nencoding = \"unsigned\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\nresult = \"p\"\n\n[dut]\nmodule = \"behav_mul\"\n\
         parameters = { W = 8, SIGNED = 0 }\n",
    );
    let rtl = hdl("behav/behav_mul.v").display().to_string();
    sb.tool(
        "yosys",
        &[
            "-q",
            "-p",
            &format!(
                "read_verilog {rtl}; chparam -set W 8 -set SIGNED 0 behav_mul; synth -flatten \
                 -top behav_mul; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json mul.json"
            ),
        ],
    );
    sb.gen(&spec, "vec", &["--count", "0"]).expect_code(0);
    let args = [
        "grade",
        spec.as_str(),
        "--vectors",
        "vec",
        "--netlist",
        "mul.json",
        "--top-up",
        "--conflicts",
        "1",
    ];
    let mut json_args = args.to_vec();
    json_args.extend(["--format", "json"]);
    let run = sb.run(&json_args);
    let doc = run.json();
    let t = &doc["top_up"];
    assert_eq!(t["conflict_budget"], 1);
    let aborted: Vec<u64> = t["faults"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["top_up"]["status"] == "aborted")
        .map(|f| f["top_up"]["conflicts"].as_u64().unwrap())
        .collect();
    assert_eq!(aborted.len() as u64, t["aborted"].as_u64().unwrap());
    assert!(!aborted.is_empty(), "{t}");
    // Some solves run past the budget before the solver's check stops them.
    assert!(aborted.iter().any(|&c| c > 1), "{aborted:?}");
    let sum: u64 = aborted.iter().sum();
    assert_eq!(t["aborted_conflicts_spent"].as_u64().unwrap(), sum);
    let total = t["conflicts_spent"].as_u64().unwrap();
    assert!(total >= sum);
    let text = sb.run(&args);
    text.expect_stdout(&format!(
        "budget 1 conflicts per fault; the solver stops at the first check past it; spent: \
         {total} conflicts in all, {sum} on {} aborted faults",
        aborted.len()
    ));
    text.expect_stdout("aborted (budget 1, spent ");
    assert!(!text.stdout.contains("at most"), "{}", text.stdout);
}
