//! An independent cross-check of arithvec's fault simulator with Icarus Verilog.
//!
//! Yosys writes the same flattened netlist twice: as JSON for arithvec and as Verilog
//! (`write_verilog -noattr -noexpr -norename`: every cell stays an instance of Yosys's own
//! gate models in `simcells.v`, named as in the JSON). Each sampled single stuck-at fault is
//! injected into the Verilog with `force` and the vector set is applied; a vector detects the
//! fault when some output the spec checks differs from the fault-free run. Sites:
//! - a stem forces the net the driving cell's `Y` pin (or the input port bit) drives, so
//!   every reader sees it;
//! - a branch into one cell input pin gets its own wire: the test rewrites that one pin's
//!   connection to a new wire `fault_pin_K` assigned from the original net, and forces the
//!   wire, so only that pin sees the fault;
//! - a branch into one output bit replaces that bit of the observed outputs in the
//!   testbench (the net itself also feeds cells, so forcing it would be a stem fault).
//!
//! The fault-free run is also compared with the golden outputs, so the netlist the faults
//! are injected into is known to be the unit.

use std::collections::BTreeSet;
use std::fmt::Write as _;
use std::path::PathBuf;

use arithvec::{
    write_selection, Driver, Fault, FaultSite, Generator, Grader, Inputs, Netlist, Outputs, Spec,
    Word,
};

use crate::util::{directed, expected, grade_lib, have, skipped, spec, Flags, Sandbox, Unit};

/// Yosys's simulation models of its internal gate cells (`$_AND_` and so on).
fn simcells() -> Option<PathBuf> {
    let mut candidates = vec![
        PathBuf::from("/usr/share/yosys/simcells.v"),
        PathBuf::from("/usr/local/share/yosys/simcells.v"),
    ];
    if let Ok(out) = std::process::Command::new("yosys-config")
        .arg("--datdir")
        .output()
    {
        let dir = String::from_utf8_lossy(&out.stdout).trim().to_string();
        if !dir.is_empty() {
            candidates.insert(0, PathBuf::from(dir).join("simcells.v"));
        }
    }
    candidates.into_iter().find(|p| p.is_file())
}

/// True when yosys, iverilog, vvp and Yosys's `simcells.v` are all available (see
/// [`have`] for what happens otherwise).
fn tools() -> Option<PathBuf> {
    if !(have("yosys") && have("iverilog")) {
        return None;
    }
    match simcells() {
        Some(p) => Some(p),
        None => {
            assert!(
                std::env::var_os("CI").is_none(),
                "Yosys's simcells.v was not found and CI is set"
            );
            skipped("Yosys's simcells.v not found; the Icarus cross-check did not run");
            None
        }
    }
}

/// One cell instance of the Verilog netlist: the text span of each pin's connection.
struct Instance {
    /// (pin, expression) in the order written.
    pins: Vec<(String, String)>,
    /// Line index of each pin's connection line.
    lines: Vec<usize>,
}

/// The cell instances of a `write_verilog -noexpr` netlist, by cell name (as in the JSON).
fn instances(lines: &[String]) -> std::collections::HashMap<String, Instance> {
    let mut out = std::collections::HashMap::new();
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i].trim();
        let words: Vec<&str> = line.split_whitespace().collect();
        if words.len() == 3 && words[0].starts_with("\\$_") && words[2] == "(" {
            let name = words[1].trim_start_matches('\\').to_string();
            let mut inst = Instance {
                pins: Vec::new(),
                lines: Vec::new(),
            };
            i += 1;
            while i < lines.len() && lines[i].trim() != ");" {
                let l = lines[i].trim().trim_end_matches(',');
                let open = l.find('(').expect("pin connection");
                let close = l.rfind(')').expect("pin connection");
                inst.pins
                    .push((l[1..open].to_string(), l[open + 1..close].to_string()));
                inst.lines.push(i);
                i += 1;
            }
            out.insert(name, inst);
        }
        i += 1;
    }
    out
}

/// A hierarchical reference to `expr` inside the DUT instance; an escaped identifier keeps
/// the space that ends it.
fn inside_dut(expr: &str) -> String {
    let e = expr.trim_end();
    if e.starts_with('\\') {
        format!("dut.{e} ")
    } else {
        format!("dut.{e}")
    }
}

/// The outputs the testbench observes, LSB first: (port name, width).
fn observed_ports(spec: &Spec, netlist: &Netlist) -> Vec<(String, u32)> {
    let checked: BTreeSet<&str> = spec.outputs().into_iter().map(|(_, p)| p).collect();
    netlist
        .outputs()
        .iter()
        .filter(|p| checked.contains(p.name()))
        .map(|p| (p.name().to_string(), p.width()))
        .collect()
}

fn bits(w: &Word, width: u32) -> String {
    (0..width)
        .rev()
        .map(|i| if w.bit(i) { '1' } else { '0' })
        .collect()
}

/// Simulates `faults` of `netlist` (synthesized to `verilog`, in the sandbox) with Icarus
/// on `vectors`, one after another in one testbench; returns, per fault, the first vector
/// that detects it.
fn icarus_first_detections(
    sb: &Sandbox,
    simcells: &std::path::Path,
    verilog: &str,
    spec: &Spec,
    netlist: &Netlist,
    vectors: &[Inputs],
    faults: &[Fault],
) -> Vec<Option<usize>> {
    let mut lines: Vec<String> = sb.read(verilog).lines().map(str::to_string).collect();
    let cells = instances(&lines);
    let ports = observed_ports(spec, netlist);
    let out_width: u32 = ports.iter().map(|p| p.1).sum();
    let offset_of = |name: &str| {
        let mut at = 0;
        for (p, w) in &ports {
            if p == name {
                return at;
            }
            at += w;
        }
        panic!("port {name} is not observed")
    };

    // Injections: (force target or None for an output-bit branch, observed bit to replace).
    let mut extra_wires = String::new();
    let mut injections: Vec<(Option<String>, Option<u32>)> = Vec::new();
    let mut pin_wires: std::collections::HashMap<(usize, usize), String> = Default::default();
    for (k, f) in faults.iter().enumerate() {
        match f.site {
            FaultSite::Stem(net) => match netlist.driver(net) {
                Driver::Gate(g) => {
                    let gate = &netlist.gates()[g];
                    let inst = &cells[gate.cell_name()];
                    let (_, y) = inst.pins.iter().find(|(p, _)| p == "Y").expect("Y pin");
                    injections.push((Some(inside_dut(y)), None));
                }
                Driver::Input { port, bit } => {
                    let p = &netlist.inputs()[port];
                    let target = if p.width() == 1 {
                        format!("dut.{}", p.name())
                    } else {
                        format!("dut.{}[{bit}]", p.name())
                    };
                    injections.push((Some(target), None));
                }
                Driver::Constant(_) => panic!("constants have no stem faults"),
            },
            FaultSite::GateInput { gate, pin } => {
                // Both faults of one branch share its wire.
                let wire = pin_wires.entry((gate, pin)).or_insert_with(|| {
                    let g = &netlist.gates()[gate];
                    let pin_name = g.kind().input_pins()[pin];
                    let inst = &cells[g.cell_name()];
                    let at = inst
                        .pins
                        .iter()
                        .position(|(p, _)| p == pin_name)
                        .expect("pin");
                    let wire = format!("fault_pin_{k}");
                    let expr = &inst.pins[at].1;
                    writeln!(extra_wires, "  wire {wire};\n  assign {wire} = {expr};").unwrap();
                    let line = inst.lines[at];
                    let rewired = lines[line].replacen(
                        &format!(".{pin_name}({expr})"),
                        &format!(".{pin_name}({wire})"),
                        1,
                    );
                    assert_ne!(rewired, lines[line], "pin {pin_name} of {}", g.cell_name());
                    lines[line] = rewired;
                    wire
                });
                injections.push((Some(format!("dut.{wire}")), None));
            }
            FaultSite::OutputBit { port, bit } => {
                let name = netlist.outputs()[port].name();
                injections.push((None, Some(offset_of(name) + bit)));
            }
        }
    }
    let end = lines
        .iter()
        .rposition(|l| l.trim() == "endmodule")
        .expect("endmodule");
    lines.insert(end, extra_wires);
    sb.write("faulty.v", &(lines.join("\n") + "\n"));

    // Stimulus {a, b, cin} and golden outputs, MSB first, as $readmemb words.
    let w = spec.width;
    let mut stim = String::new();
    for v in vectors {
        writeln!(
            stim,
            "{}{}{}",
            bits(&v.a, w),
            bits(&v.b, w),
            v.carry_in as u8
        )
        .unwrap();
    }
    sb.write("stim.bin", &stim);
    let golden: Vec<Outputs> = expected(spec, vectors);
    let mut exp = String::new();
    for o in &golden {
        let mut word = String::new();
        for (name, width) in ports.iter().rev() {
            let value = match name.as_str() {
                "y" => o.result,
                "co" => Word::from_u64(o.carry_out as u64),
                "ovf" => Word::from_u64(o.overflow as u64),
                "zero" => Word::from_u64(o.zero as u64),
                "neg" => Word::from_u64(o.negative as u64),
                other => panic!("unexpected output {other}"),
            };
            word.push_str(&bits(&value, *width));
        }
        writeln!(exp, "{word}").unwrap();
    }
    sb.write("expected.bin", &exp);

    let observed: Vec<&str> = ports.iter().rev().map(|p| p.0.as_str()).collect();
    let n = vectors.len();
    let module = netlist.module();
    let mut tb = format!(
        "`timescale 1ns/1ns\nmodule tb;\n  reg [{wm}:0] a, b;\n  reg cin;\n",
        wm = w - 1
    );
    for (name, width) in &ports {
        writeln!(tb, "  wire [{}:0] {name};", width - 1).unwrap();
    }
    let mut conns = vec![".a(a)".to_string(), ".b(b)".into(), ".cin(cin)".into()];
    conns.extend(ports.iter().map(|(p, _)| format!(".{p}({p})")));
    write!(
        tb,
        "  {module} dut ({});\n  reg [{sw}:0] stim [0:{last}];\n  reg [{ow}:0] golden [0:{last}];\n  \
         reg [{ow}:0] good [0:{last}];\n  reg [{ow}:0] obs;\n  integer i, first;\n  initial begin\n    \
         $readmemb(\"stim.bin\", stim);\n    $readmemb(\"expected.bin\", golden);\n    \
         for (i = 0; i < {n}; i = i + 1) begin\n      {{a, b, cin}} = stim[i];\n      #1;\n      \
         good[i] = {{{obs}}};\n      if (good[i] !== golden[i]) $display(\"GOLDEN_MISMATCH %0d\", i);\n    end\n",
        conns.join(", "),
        sw = 2 * w,
        ow = out_width - 1,
        last = n - 1,
        obs = observed.join(", "),
    )
    .unwrap();
    for (k, (f, (target, replaced))) in faults.iter().zip(&injections).enumerate() {
        let value = if f.stuck_at { "1'b1" } else { "1'b0" };
        if let Some(t) = target {
            writeln!(tb, "    force {t}= {value};").unwrap();
        }
        write!(
            tb,
            "    first = -1;\n    for (i = 0; i < {n}; i = i + 1) begin\n      {{a, b, cin}} = stim[i];\n      \
             #1;\n      obs = {{{}}};\n",
            observed.join(", ")
        )
        .unwrap();
        if let Some(bit) = replaced {
            writeln!(tb, "      obs[{bit}] = {value};").unwrap();
        }
        writeln!(
            tb,
            "      if (obs !== good[i] && first < 0) first = i;\n    end"
        )
        .unwrap();
        if let Some(t) = target {
            writeln!(tb, "    release {t};").unwrap();
        }
        writeln!(tb, "    $display(\"FAULT {k} %0d\", first);").unwrap();
    }
    tb.push_str("    $finish;\n  end\nendmodule\n");
    sb.write("tb.v", &tb);
    sb.tool(
        "iverilog",
        &[
            "-g2005",
            "-o",
            "sim",
            "tb.v",
            "faulty.v",
            &simcells.display().to_string(),
        ],
    );
    let log = sb.tool("vvp", &["-n", "sim"]);
    assert!(
        !log.contains("GOLDEN_MISMATCH"),
        "the fault-free netlist disagrees with the golden model:\n{log}"
    );
    let mut first = vec![None; faults.len()];
    let mut seen = 0;
    for line in log.lines() {
        let words: Vec<&str> = line.split_whitespace().collect();
        if let ["FAULT", k, v] = words[..] {
            let k: usize = k.parse().expect("fault number");
            let v: i64 = v.parse().expect("vector");
            first[k] = (v >= 0).then_some(v as usize);
            seen += 1;
        }
    }
    assert_eq!(seen, faults.len(), "simulation output:\n{log}");
    first
}

/// A small deterministic generator for sampling (xorshift64*; common practice, no source).
struct Rng(u64);

impl Rng {
    fn below(&mut self, n: usize) -> usize {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as usize % n
    }
}

fn site_kind(f: &Fault) -> usize {
    match f.site {
        FaultSite::Stem(_) => 0,
        FaultSite::GateInput { .. } => 1,
        FaultSite::OutputBit { .. } => 2,
    }
}

/// Picks up to `per_group` faults from `pool` (fault indices), spread over the site kinds:
/// each kind first gets an equal share, the rest is filled at random.
fn sample(pool: &[usize], faults: &[Fault], per_group: usize, rng: &mut Rng) -> Vec<usize> {
    let mut by_kind: [Vec<usize>; 3] = Default::default();
    for &i in pool {
        by_kind[site_kind(&faults[i])].push(i);
    }
    let mut picked = BTreeSet::new();
    for kind in &mut by_kind {
        for _ in 0..(per_group / 3).min(kind.len()) {
            let j = rng.below(kind.len());
            picked.insert(kind.swap_remove(j));
        }
    }
    let mut rest: Vec<usize> = by_kind.concat();
    while picked.len() < per_group && !rest.is_empty() {
        let j = rng.below(rest.len());
        picked.insert(rest.swap_remove(j));
    }
    picked.into_iter().collect()
}

#[test]
fn icarus_agrees_with_the_json_report_on_a_sample_of_faults() {
    let Some(simcells) = tools() else { return };
    let sb = Sandbox::new();
    let unit = Unit::Add;
    let w = 8;
    let spec_file = sb.spec("add8", unit, w, 0, Flags::All);
    let json = sb.synthesize("add8", unit, w);
    let s = spec(unit, w, 0, Flags::All);
    // A deliberately weak set, so that many faults stay undetected: the first eight
    // directed vectors (the cell-exercising seeds).
    let generator = Generator::new(&s, Some(0), None);
    let indices: Vec<u64> = (0..8).collect();
    write_selection(&generator, &s, &sb.path("weak"), &indices).expect("write the subset");
    let report = sb.grade(&spec_file, "weak", &["--netlist", &json]);
    let undetected: BTreeSet<u64> = report["undetected"]
        .as_array()
        .expect("undetected")
        .iter()
        .chain(report["redundant"].as_array().expect("redundant"))
        .map(|e| e["fault_class"].as_u64().expect("fault_class"))
        .collect();
    assert!(!undetected.is_empty());

    let nl = sb.netlist(&json, unit.module());
    let grader = Grader::new(&s, &nl).expect("ports match");
    let list = grader.faults();
    assert_eq!(report["collapsed"].as_u64(), Some(list.collapsed() as u64));
    let all = list.faults();
    let (missed, caught): (Vec<usize>, Vec<usize>) =
        (0..all.len()).partition(|&i| undetected.contains(&(list.class_of(i) as u64)));
    let mut rng = Rng(0x005e_ed0f_fa17);
    let mut chosen = sample(&missed, all, 20, &mut rng);
    let rest = 40 - chosen.len();
    chosen.extend(sample(&caught, all, rest, &mut rng));
    let faults: Vec<Fault> = chosen.iter().map(|&i| all[i]).collect();
    let kinds: BTreeSet<usize> = faults.iter().map(site_kind).collect();
    assert_eq!(kinds.len(), 3, "the sample should hold every kind of site");

    let vectors: Vec<Inputs> = generator.directed()[..8].to_vec();
    let first = icarus_first_detections(
        &sb,
        &simcells,
        "add8.v",
        &s,
        grader.graded_netlist(),
        &vectors,
        &faults,
    );
    // The library's report of the same grading gives each class's first detecting vector.
    let lib = grade_lib(&s, &nl, &vectors);
    let mut disagreements = Vec::new();
    for ((&i, f), icarus) in chosen.iter().zip(&faults).zip(&first) {
        let class = list.class_of(i);
        let arithvec_detects = !undetected.contains(&(class as u64));
        if arithvec_detects != icarus.is_some() || lib.first_detection[class] != *icarus {
            disagreements.push(format!(
                "{f:?} (class {class}): arithvec detected = {arithvec_detects}, first = {:?}; \
                 Icarus first = {icarus:?}",
                lib.first_detection[class]
            ));
        }
    }
    let detected = first.iter().filter(|f| f.is_some()).count();
    eprintln!(
        "Icarus cross-check: {} faults ({detected} detected, {} undetected), {} disagreements",
        faults.len(),
        faults.len() - detected,
        disagreements.len()
    );
    assert!(detected >= 10 && faults.len() - detected >= 10, "{first:?}");
    assert!(disagreements.is_empty(), "{}", disagreements.join("\n"));
}

/// The two faults behind the directed-set changes, confirmed independently: undetected
/// without the vectors that now cover them, detected (at the vector arithvec names) with
/// the full directed set.
#[test]
fn icarus_confirms_the_zero_flag_and_duplicated_carry_findings() {
    let Some(simcells) = tools() else { return };
    for (w, needs) in [(16, "result 1"), (4, "generate then propagate")] {
        let sb = Sandbox::new();
        let name = format!("add{w}");
        let json = sb.synthesize(&name, Unit::Add, w);
        let nl = sb.netlist(&json, "ripple_add");
        let s = spec(Unit::Add, w, 0, Flags::All);
        let model = arithvec::Model::new(&s);
        let full = directed(&s);
        let lacks = |v: &Inputs| match w {
            16 => model.evaluate(v).result != Word::from_u64(1),
            _ => !(v.a.bit(2) && v.b.bit(2) && v.a.bit(3) != v.b.bit(3)),
        };
        let without: Vec<Inputs> = full.iter().copied().filter(lacks).collect();
        let r = grade_lib(&s, &nl, &without);
        assert_eq!(r.undetected.len(), 1, "W={w}: {:?}", r.undetected);
        let grader = Grader::new(&s, &nl).expect("ports");
        let class = r.undetected[0].class;
        let fault = grader.faults().representative(class);
        let sim = |vectors: &[Inputs]| {
            icarus_first_detections(
                &sb,
                &simcells,
                &format!("{name}.v"),
                &s,
                grader.graded_netlist(),
                vectors,
                &[fault],
            )[0]
        };
        assert_eq!(
            sim(&without),
            None,
            "W={w}: Icarus detects {fault:?} without {needs}"
        );
        let with = grade_lib(&s, &nl, &full);
        assert_eq!(
            sim(&full),
            with.first_detection[class],
            "W={w}: {fault:?} with {needs}"
        );
        assert!(with.first_detection[class].is_some());
        eprintln!(
            "W={w}: {fault:?} ({}) needs {needs}: Icarus and arithvec agree",
            r.undetected[0].net
        );
    }
}
