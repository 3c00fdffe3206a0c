//! SAT top-up and equivalence proofs: (1) `grade --top-up` of the 24-bit offset-binary
//! subtractor with a zero flag (2000 random vectors, seed 7, as `tests/hdl/specs/
//! behav_offset_sub.toml`), (2) the 64-bit equivalence proof of an adder against the built-in
//! ripple reference. Goal: each under 10 s here. The netlists are built with the library
//! (so the bench needs no Yosys): the offset subtractor as ripple-borrow cells with the MSB
//! inverted and a zero detector; the adder with majority-gate carries (co = ab | ac | bc),
//! a different structure from the reference's (g | c & p). When `yosys` is on the PATH the
//! Yosys-synthesised behavioural 64-bit subtractor (`tests/hdl/behav/behav_sub.v`) is proved
//! too. Run with `cargo bench --bench proofs`. Not a test: timings on shared machines are
//! noisy (each figure is the fastest of three runs).

use std::time::{Duration, Instant};

use arithvec::{
    prove, BuiltinModel, GateKind, Generator, GradeOutcome, Grader, Inputs, Model, NetId, Netlist,
    NetlistBuilder, PairSelection, ProveVerdict, Spec, TransitionOutcome,
};

const GOAL: Duration = Duration::from_secs(10);

fn timed<T>(runs: usize, mut f: impl FnMut() -> T) -> (T, Duration) {
    let mut best = Duration::MAX;
    let mut value = None;
    for _ in 0..runs.max(1) {
        let start = Instant::now();
        value = Some(f());
        best = best.min(start.elapsed());
    }
    (value.expect("at least one run"), best)
}

/// a - b in offset binary: ripple-borrow full subtractors, the MSB inverted (offset binary is
/// two's complement with the MSB inverted; common practice, no source), and zero = the
/// result is 10...0.
fn offset_subtractor(width: usize) -> Netlist {
    let mut b = NetlistBuilder::new("<bench offset subtractor>", "offset_sub");
    let a = b.input("a", width as u32);
    let bb = b.input("b", width as u32);
    let mut borrow: Option<NetId> = None;
    let mut d = Vec::new();
    for i in 0..width {
        let k = Some(i as i64);
        let x = b.gate_net(GateKind::Xor, &format!("x{i}"), &[a[i], bb[i]], "x", k);
        let g = b.gate_net(GateKind::AndNot, &format!("g{i}"), &[bb[i], a[i]], "g", k);
        match borrow {
            None => {
                d.push(x);
                borrow = Some(g);
            }
            Some(c) => {
                d.push(b.gate_net(GateKind::Xor, &format!("d{i}"), &[x, c], "d", k));
                let t = b.gate_net(GateKind::AndNot, &format!("t{i}"), &[c, x], "t", k);
                borrow = Some(b.gate_net(GateKind::Or, &format!("c{i}"), &[g, t], "c", k));
            }
        }
    }
    let msb = d[width - 1];
    let y_msb = b.gate_net(GateKind::Not, "msb_inv", &[msb], "ym", None);
    let mut y = d.clone();
    y[width - 1] = y_msb;
    // zero: every difference bit 0, i.e. y = 10...0.
    let mut any = d[0];
    for (i, &bit) in d.iter().enumerate().skip(1) {
        any = b.gate_net(
            GateKind::Or,
            &format!("z{i}"),
            &[any, bit],
            "z",
            Some(i as i64),
        );
    }
    let zero = b.gate_net(GateKind::Not, "zero_inv", &[any], "zero_net", None);
    b.output("y", &y);
    b.output("zero", &[zero]);
    b.build().expect("bench netlist")
}

/// A ripple adder with majority-gate carries and a carry-in: y, co, ovf as the built-in's.
fn majority_adder(width: usize) -> Netlist {
    let mut b = NetlistBuilder::new("<bench majority adder>", "maj_add");
    let a = b.input("a", width as u32);
    let bb = b.input("b", width as u32);
    let mut c = b.input("cin", 1)[0];
    let mut y = Vec::new();
    let mut into_msb = c;
    for i in 0..width {
        let k = Some(i as i64);
        if i == width - 1 {
            into_msb = c;
        }
        let p = b.gate_net(GateKind::Xnor, &format!("p{i}"), &[a[i], bb[i]], "p", k);
        y.push(b.gate_net(GateKind::Xnor, &format!("s{i}"), &[p, c], "s", k));
        let ab = b.gate_net(GateKind::And, &format!("ab{i}"), &[a[i], bb[i]], "ab", k);
        let ac = b.gate_net(GateKind::And, &format!("ac{i}"), &[a[i], c], "ac", k);
        let bc = b.gate_net(GateKind::And, &format!("bc{i}"), &[bb[i], c], "bc", k);
        let o = b.gate_net(GateKind::Or, &format!("o{i}"), &[ab, ac], "o", k);
        c = b.gate_net(GateKind::Or, &format!("m{i}"), &[o, bc], "m", k);
    }
    let ovf = b.gate_net(GateKind::Xor, "ovf_x", &[into_msb, c], "ovf_net", None);
    b.output("y", &y);
    b.output("co", &[c]);
    b.output("ovf", &[ovf]);
    b.build().expect("bench netlist")
}

/// Transition grading of the built-in 64-bit ripple adder: its `gen --pairs` set (designated
/// pairs) and 10,000 random vectors taken as consecutive pairs.
fn transition_bench() {
    let spec = Spec::parse(
        "name = \"bench_add64\"\noperation = \"add\"\nwidth = 64\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\ncarry_in = \"cin\"\nresult = \"y\"\ncarry_out = \"co\"\n\
         overflow = \"ovf\"\n\n[random]\ncount = 10000\nseed = 3\n",
        "<bench>",
    )
    .expect("spec");
    let nl = BuiltinModel::for_spec(&spec)
        .expect("built-in")
        .build(&spec)
        .expect("builds");
    let grader = Grader::new(&spec, &nl).expect("ports");
    let model = Model::new(&spec);
    let g = Generator::new(&spec, Some(0), None)
        .with_transition_pairs(&spec)
        .expect("pairs");
    let (first, pairs) = g.transition_pair_block().expect("pairs");
    let sets = [
        (
            "gen --pairs set, designated pairs",
            (0..g.total())
                .map(|i| g.vector(i).expect("v"))
                .collect::<Vec<_>>(),
            PairSelection::LaunchCapture {
                first: first as usize,
                pairs: pairs as usize,
            },
        ),
        (
            "10,000 random vectors, consecutive pairs",
            {
                let r = Generator::new(&spec, None, None);
                let mut stream = r.random_stream(0);
                (0..10_000).map(|_| stream.next_inputs()).collect()
            },
            PairSelection::Consecutive,
        ),
    ];
    for (what, vectors, selection) in sets {
        let expected: Vec<_> = vectors.iter().map(|v| model.evaluate(v)).collect();
        let (outcome, t) = timed(3, || {
            grader
                .grade_transitions(&vectors, &expected, selection)
                .expect("grades")
        });
        let report = match outcome {
            TransitionOutcome::Graded(r) => r,
            TransitionOutcome::NotTheSpec(bad) => panic!("not the spec: {bad:?}"),
        };
        println!(
            "transition grading, built-in 64-bit ripple adder, {what}: {} pairs, {} of {} \
             collapsed faults ({:.2}%): {:.3} s (goal < {} s: {})",
            report.pairs,
            report.detected,
            report.collapsed,
            report.coverage_percent,
            t.as_secs_f64(),
            GOAL.as_secs(),
            if t < GOAL { "met" } else { "MISSED" }
        );
    }
}

fn main() {
    transition_bench();
    // (1) Top-up of the offset case.
    let spec = Spec::parse(
        "name = \"bench_offset_sub\"\noperation = \"sub\"\nwidth = 24\nencoding = \"offset\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\nresult = \"y\"\nzero = \"zero\"\n\n\
         [random]\ncount = 2000\nseed = 7\n",
        "<bench>",
    )
    .expect("spec");
    let nl = offset_subtractor(24);
    let g = Generator::new(&spec, None, None);
    let vectors: Vec<Inputs> = (0..g.total()).map(|i| g.vector(i).expect("v")).collect();
    let model = Model::new(&spec);
    let expected: Vec<_> = vectors.iter().map(|v| model.evaluate(v)).collect();
    let grader = Grader::new(&spec, &nl).expect("ports");
    let report = match grader.grade(&vectors, &expected).expect("grades") {
        GradeOutcome::Graded(r) => *r,
        GradeOutcome::NotTheSpec(bad) => panic!("bench netlist is not the spec: {bad:?}"),
    };
    let (t, top_up_time) = timed(3, || {
        grader
            .top_up(&vectors, &report, 20_000)
            .expect("top-up runs")
    });
    println!(
        "top-up, 24-bit offset subtractor: {} undetected of {} -> {} vectors added, {} proven \
         redundant, {} aborted, testable coverage {:.2}%: {:.3} s (goal < {} s: {})",
        report.undetected.len(),
        report.collapsed,
        t.vectors_added,
        t.proven_redundant,
        t.aborted,
        t.testable_coverage_percent,
        top_up_time.as_secs_f64(),
        GOAL.as_secs(),
        if top_up_time < GOAL { "met" } else { "MISSED" }
    );

    // (2) The 64-bit equivalence proof.
    let spec64 = Spec::parse(
        "name = \"bench_add64\"\noperation = \"add\"\nwidth = 64\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\ncarry_in = \"cin\"\nresult = \"y\"\ncarry_out = \"co\"\n\
         overflow = \"ovf\"\n",
        "<bench>",
    )
    .expect("spec");
    let dut = majority_adder(64);
    let (r, proof_time) = timed(3, || prove(&spec64, &dut, 1_000_000).expect("prove runs"));
    println!(
        "equivalence proof, 64-bit majority-carry adder vs built-in ripple: {} ({} conflicts, \
         {} variables, {} clauses): {:.3} s (goal < {} s: {})",
        match r.verdict {
            ProveVerdict::Proved => "proved",
            ProveVerdict::Counterexample(_) => "COUNTEREXAMPLE",
            ProveVerdict::Unknown => "unknown",
        },
        r.conflicts,
        r.variables,
        r.clauses,
        proof_time.as_secs_f64(),
        GOAL.as_secs(),
        if proof_time < GOAL && r.verdict == ProveVerdict::Proved {
            "met"
        } else {
            "MISSED"
        }
    );
    yosys_proof();
}

/// The Yosys-synthesised behavioural 64-bit subtractor, when Yosys is installed.
fn yosys_proof() {
    let dir = std::env::temp_dir().join(format!("arithvec-bench-proofs-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let json = dir.join("behav_sub64.json");
    let rtl = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hdl/behav/behav_sub.v");
    let script = format!(
        "read_verilog {}; chparam -set W 64 -set SIGNED 1 behav_sub; synth -flatten -top \
         behav_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json {}",
        rtl.display(),
        json.display()
    );
    let ran = std::process::Command::new("yosys")
        .args(["-q", "-p", &script])
        .status();
    if !matches!(ran, Ok(s) if s.success()) {
        println!("equivalence proof, Yosys behavioural 64-bit subtractor: SKIPPED (no yosys)");
        let _ = std::fs::remove_dir_all(&dir);
        return;
    }
    let text = std::fs::read_to_string(&json).expect("netlist");
    let nl = Netlist::from_yosys_json(&text, "behav_sub64.json", "behav_sub").expect("reads");
    let spec = Spec::parse(
        "name = \"bench_sub64\"\noperation = \"sub\"\nwidth = 64\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\ncarry_in = \"cin\"\nresult = \"y\"\ncarry_out = \"co\"\n\
         overflow = \"ovf\"\nzero = \"zero\"\nnegative = \"neg\"\n\n[conventions]\n\
         carry_out = \"borrow\"\ncarry_in = \"borrow\"\n",
        "<bench>",
    )
    .expect("spec");
    let (r, t) = timed(3, || prove(&spec, &nl, 1_000_000).expect("prove runs"));
    println!(
        "equivalence proof, Yosys behavioural 64-bit subtractor vs built-in ripple: {} ({} \
         conflicts): {:.3} s (goal < {} s: {})",
        if r.verdict == ProveVerdict::Proved {
            "proved"
        } else {
            "NOT PROVED"
        },
        r.conflicts,
        t.as_secs_f64(),
        GOAL.as_secs(),
        if t < GOAL && r.verdict == ProveVerdict::Proved {
            "met"
        } else {
            "MISSED"
        }
    );
    let _ = std::fs::remove_dir_all(&dir);
}
