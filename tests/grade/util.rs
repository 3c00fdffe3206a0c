//! The grading tests' own plumbing: specs for the reference units in `tests/hdl/`, Yosys
//! synthesis of those units, and library-side measurements. The sandbox, the runner, the
//! path of the reference hardware and the rule for missing tools (fail when `CI` is set,
//! print a loud SKIPPED line otherwise) come from the shared `tests/support` module.

use std::path::PathBuf;

use arithvec::{Generator, GradeOutcome, Grader, Inputs, Model, Netlist, Outputs, Spec};
use serde_json::Value;

pub use crate::support::{hdl, skipped, Sandbox};

/// The synthesis steps after `read_verilog` and `chparam`: the flow the README documents
/// (Yosys 0.23), flattening the cells and mapping to simple gates.
pub const SYNTH_STEPS: &str =
    "synth -flatten -top {top}; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean";

/// True when `tool` can be started. When it cannot: panics if the `CI` environment variable
/// is set (CI must run every test), otherwise prints a loud SKIPPED line and returns false.
pub fn have(tool: &str) -> bool {
    crate::support::require_tool(tool)
}

/// The reference units graded here.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Unit {
    /// `tests/hdl/ripple_add.v` over `full_adder.v`.
    Add,
    /// `tests/hdl/ripple_sub.v` over `full_subtractor.v`.
    Sub,
}

impl Unit {
    /// Both units.
    pub const ALL: [Unit; 2] = [Unit::Add, Unit::Sub];

    /// The spec's operation.
    pub fn operation(self) -> &'static str {
        match self {
            Unit::Add => "add",
            Unit::Sub => "sub",
        }
    }

    /// The HDL module.
    pub fn module(self) -> &'static str {
        match self {
            Unit::Add => "ripple_add",
            Unit::Sub => "ripple_sub",
        }
    }

    /// The HDL files defining the module.
    pub fn files(self) -> [PathBuf; 2] {
        match self {
            Unit::Add => [hdl("ripple_add.v"), hdl("full_adder.v")],
            Unit::Sub => [hdl("ripple_sub.v"), hdl("full_subtractor.v")],
        }
    }
}

/// Which outputs a spec names.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Flags {
    /// y, co, ovf, zero, neg: every output of the HDL units.
    All,
    /// y, co, ovf only: the HDL units' zero and neg outputs are left unchecked.
    ArithmeticOnly,
}

/// A two's-complement spec for `unit` at `width` whose ports are the HDL module's, with
/// `random` random vectors (seed 1).
pub fn spec_text(unit: Unit, width: u32, random: u64, flags: Flags) -> String {
    let mut text = format!(
        "name = \"grade_{op}{width}\"\noperation = \"{op}\"\nwidth = {width}\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\ncarry_in = \"cin\"\nresult = \"y\"\ncarry_out = \"co\"\n\
         overflow = \"ovf\"\n",
        op = unit.operation()
    );
    if flags == Flags::All {
        text.push_str("zero = \"zero\"\nnegative = \"neg\"\n");
    }
    text.push_str(&format!(
        "\n[random]\ncount = {random}\nseed = 1\n\n[dut]\nmodule = \"{}\"\nparameters = {{ W = {width} }}\n",
        unit.module()
    ));
    text
}

/// The spec of [`spec_text`], parsed by the library.
pub fn spec(unit: Unit, width: u32, random: u64, flags: Flags) -> Spec {
    Spec::parse(&spec_text(unit, width, random, flags), "<test spec>").expect("test spec parses")
}

impl Sandbox {
    /// Writes the spec for `unit` to `NAME.toml` and returns the file name.
    pub fn spec(&self, name: &str, unit: Unit, width: u32, random: u64, flags: Flags) -> String {
        self.write(
            &format!("{name}.toml"),
            &spec_text(unit, width, random, flags),
        )
    }

    /// `arithvec grade SPEC --vectors DIR --format json` plus `source` (such as
    /// `--netlist F` or `--builtin`), expecting exit 0; returns the report.
    #[track_caller]
    pub fn grade(&self, spec: &str, vectors: &str, source: &[&str]) -> Value {
        let mut args = vec!["grade", spec, "--vectors", vectors, "--format", "json"];
        args.extend_from_slice(source);
        let run = self.run(&args);
        run.expect_code(0);
        run.json()
    }

    /// Synthesizes `unit` at `width` with the documented flow and writes `NAME.json` (for
    /// arithvec) and `NAME.v` (the same netlist as Verilog: `-noexpr` keeps every cell an
    /// instance named as in the JSON, `-norename` keeps Yosys's internal net names, so faults
    /// can be located in it by name). Returns the JSON file name.
    pub fn synthesize(&self, name: &str, unit: Unit, width: u32) -> String {
        let [top, cell] = unit.files();
        let script = format!(
            "read_verilog {} {}; chparam -set W {width} {m}; {}; write_json {name}.json; \
             write_verilog -noattr -noexpr -norename {name}.v",
            top.display(),
            cell.display(),
            SYNTH_STEPS.replace("{top}", unit.module()),
            m = unit.module(),
        );
        self.tool("yosys", &["-q", "-p", &script]);
        format!("{name}.json")
    }

    /// Reads the netlist `json` (written by [`Sandbox::synthesize`]) through the library.
    pub fn netlist(&self, json: &str, module: &str) -> Netlist {
        Netlist::from_yosys_json(&self.read(json), json, module).expect("netlist reads")
    }
}

/// The golden outputs of `vectors`.
pub fn expected(spec: &Spec, vectors: &[Inputs]) -> Vec<Outputs> {
    let model = Model::new(spec);
    vectors.iter().map(|v| model.evaluate(v)).collect()
}

/// The directed set of `spec` (no random vectors).
pub fn directed(spec: &Spec) -> Vec<Inputs> {
    Generator::new(spec, Some(0), None).directed().to_vec()
}

/// Grades `vectors` on `netlist` through the library, expecting the fault-free netlist to
/// match the golden model.
pub fn grade_lib(spec: &Spec, netlist: &Netlist, vectors: &[Inputs]) -> arithvec::FaultReport {
    let grader = Grader::new(spec, netlist).expect("ports match");
    match grader
        .grade(vectors, &expected(spec, vectors))
        .expect("grades")
    {
        GradeOutcome::Graded(report) => *report,
        GradeOutcome::NotTheSpec(bad) => panic!("netlist disagrees with the model: {bad:?}"),
    }
}

/// A report's `undetected` entries as (net, stuck_at, site) for messages.
pub fn undetected_summary(report: &Value) -> Vec<String> {
    report["undetected"]
        .as_array()
        .map(|a| {
            a.iter()
                .map(|u| {
                    format!(
                        "{} s-a-{} {} ({})",
                        u["net"].as_str().unwrap_or("?"),
                        u["stuck_at"],
                        u["site"].as_str().unwrap_or("?"),
                        u["redundancy"]["status"].as_str().unwrap_or("?")
                    )
                })
                .collect()
        })
        .unwrap_or_default()
}
