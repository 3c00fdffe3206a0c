//! Shared plumbing for the grading tests: a fresh temporary directory per test, a runner for
//! the real `arithvec` binary, specs for the reference units in `tests/hdl/`, Yosys
//! synthesis of those units, and the rule for missing tools (fail when `CI` is set, print a
//! loud SKIPPED line otherwise).

use std::path::{Path, PathBuf};
use std::process::Command;

use arithvec::{Generator, GradeOutcome, Grader, Inputs, Model, Netlist, Outputs, Spec};
use serde_json::Value;

/// The binary under test, built by Cargo for this test target.
pub const BIN: &str = env!("CARGO_BIN_EXE_arithvec");

/// The synthesis steps after `read_verilog` and `chparam`: the flow the README documents
/// (Yosys 0.23), flattening the cells and mapping to simple gates.
pub const SYNTH_STEPS: &str =
    "synth -flatten -top {top}; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean";

/// A file of the reference hardware.
pub fn hdl(file: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/hdl")
        .join(file)
}

/// True when `tool` can be started. When it cannot: panics if the `CI` environment variable
/// is set (CI must run every test), otherwise prints a loud SKIPPED line and returns false.
pub fn have(tool: &str) -> bool {
    // Both yosys and iverilog take -V (print the version); only whether it starts matters.
    let found = Command::new(tool).arg("-V").output().is_ok();
    if !found {
        assert!(
            std::env::var_os("CI").is_none(),
            "{tool} is not installed and CI is set: this test must run in CI"
        );
        skipped(&format!("{tool} not found; this grading test did not run"));
    }
    found
}

/// Prints a loud SKIPPED line straight to the stderr handle: the harness captures
/// `eprintln!` and would show it only for failing tests.
pub fn skipped(what: &str) {
    use std::io::Write as _;
    let _ = writeln!(std::io::stderr(), "\n*** SKIPPED: {what} ***\n");
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

/// The outcome of one run of the binary.
pub struct Run {
    /// The command line, for messages.
    pub command: String,
    /// The exit code (-1 when killed by a signal).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

impl Run {
    /// Everything about the run, for a failure message.
    pub fn describe(&self) -> String {
        format!(
            "command: {}\nexit code: {}\n--- stdout ---\n{}\n--- stderr ---\n{}",
            self.command, self.code, self.stdout, self.stderr
        )
    }

    /// Asserts the exit code, showing the whole run otherwise.
    #[track_caller]
    pub fn expect_code(&self, expected: i32) -> &Run {
        assert_eq!(
            self.code,
            expected,
            "expected exit code {expected}, got {}\n{}",
            self.code,
            self.describe()
        );
        self
    }

    /// Parses stdout as JSON.
    #[track_caller]
    pub fn json(&self) -> Value {
        serde_json::from_str(&self.stdout)
            .unwrap_or_else(|e| panic!("stdout is not JSON ({e})\n{}", self.describe()))
    }
}

/// A fresh temporary directory for one test; the binary and the tools run inside it.
pub struct Sandbox {
    dir: tempfile::TempDir,
}

impl Sandbox {
    /// A new, empty sandbox.
    pub fn new() -> Sandbox {
        Sandbox {
            dir: tempfile::Builder::new()
                .prefix("arithvec-grade-")
                .tempdir()
                .expect("create a temporary directory"),
        }
    }

    /// The sandbox's root.
    pub fn root(&self) -> &Path {
        self.dir.path()
    }

    /// `rel` inside the sandbox.
    pub fn path(&self, rel: &str) -> PathBuf {
        self.dir.path().join(rel)
    }

    /// Writes `text` to `rel` and returns `rel`.
    pub fn write(&self, rel: &str, text: &str) -> String {
        let p = self.path(rel);
        if let Some(parent) = p.parent() {
            std::fs::create_dir_all(parent).expect("create parent directory");
        }
        std::fs::write(&p, text).unwrap_or_else(|e| panic!("write {}: {e}", p.display()));
        rel.to_string()
    }

    /// Reads `rel` as text.
    pub fn read(&self, rel: &str) -> String {
        let p = self.path(rel);
        std::fs::read_to_string(&p).unwrap_or_else(|e| panic!("read {}: {e}", p.display()))
    }

    /// Runs the binary with `args` in the sandbox; no run may panic, whatever the input.
    pub fn run(&self, args: &[&str]) -> Run {
        let output = Command::new(BIN)
            .args(args)
            .current_dir(self.root())
            .output()
            .expect("start the arithvec binary");
        let run = Run {
            command: format!("arithvec {}", args.join(" ")),
            code: output.status.code().unwrap_or(-1),
            stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
        };
        assert!(
            !run.stderr.contains("panicked"),
            "the binary panicked\n{}",
            run.describe()
        );
        run
    }

    /// Runs an external tool in the sandbox, expecting success; returns its stdout.
    #[track_caller]
    pub fn tool(&self, program: &str, args: &[&str]) -> String {
        let out = Command::new(program)
            .args(args)
            .current_dir(self.root())
            .output()
            .unwrap_or_else(|e| panic!("start {program}: {e}"));
        assert!(
            out.status.success(),
            "{program} {} failed:\n{}\n{}",
            args.join(" "),
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        );
        String::from_utf8_lossy(&out.stdout).into_owned()
    }

    /// Writes the spec for `unit` to `NAME.toml` and returns the file name.
    pub fn spec(&self, name: &str, unit: Unit, width: u32, random: u64, flags: Flags) -> String {
        self.write(
            &format!("{name}.toml"),
            &spec_text(unit, width, random, flags),
        )
    }

    /// `arithvec gen SPEC --out DIR -q` plus `extra`, expecting success.
    #[track_caller]
    pub fn gen(&self, spec: &str, dir: &str, extra: &[&str]) {
        let mut args = vec!["gen", spec, "--out", dir, "-q"];
        args.extend_from_slice(extra);
        self.run(&args).expect_code(0);
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
