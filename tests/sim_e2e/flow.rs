//! One turn of the loop in a fresh temporary directory: write the spec, `arithvec gen`,
//! `arithvec testbench`, compile and run the simulator, `arithvec check --require 100
//! --json`, and hand back the exit code with the parsed report and manifest. Also the
//! readers the groups share (vectors.csv, report fields) and the timing line.

use std::collections::{BTreeMap, BTreeSet};
use std::io::Write as _;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::time::Instant;

use num_bigint::BigUint;
use serde_json::Value;

use crate::spec::UnitSpec;
pub use crate::support::hdl;
use crate::support::{require_tools, BIN};

/// The simulators the suite drives.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Simulator {
    /// Icarus Verilog 11 (iverilog + vvp), four-state.
    Icarus,
    /// Verilator 5 (`--binary --timing`), two-state.
    Verilator,
    /// GHDL 2 with VHDL-2008.
    Ghdl,
}

impl Simulator {
    /// The programs this simulator needs on PATH.
    pub fn tools(self) -> &'static [&'static str] {
        match self {
            Simulator::Icarus => &["iverilog", "vvp"],
            Simulator::Verilator => &["verilator"],
            Simulator::Ghdl => &["ghdl"],
        }
    }

    /// True when every program is there (see `support::require_tool` for what a miss means).
    pub fn available(self) -> bool {
        require_tools(self.tools())
    }

    fn hdl_flag(self) -> &'static str {
        match self {
            Simulator::Ghdl => "vhdl",
            _ => "verilog",
        }
    }

    fn testbench_file(self) -> &'static str {
        match self {
            Simulator::Ghdl => "tb.vhd",
            _ => "tb.v",
        }
    }
}

/// How to run one loop.
#[derive(Debug, Clone, Copy)]
pub struct Options {
    /// Emit the testbench with `--self-check` and pass it expected.hex (Verilog only).
    pub self_check: bool,
    /// `--max-failures` for check, so the JSON lists every failure the tests reason about.
    pub max_failures: u64,
}

impl Default for Options {
    fn default() -> Options {
        Options {
            self_check: false,
            max_failures: 10,
        }
    }
}

/// What one loop produced.
pub struct Outcome {
    /// The run's directory; kept alive so tests can read the vector files.
    pub dir: tempfile::TempDir,
    /// The spec that was run.
    pub spec: UnitSpec,
    /// Exit code of `arithvec check`.
    pub check_code: i32,
    /// The JSON report of check.
    pub report: Value,
    /// The vector set's manifest.json.
    pub manifest: Value,
    /// Standard output of the simulation run (self-check summary lines).
    pub sim_stdout: String,
}

fn describe(what: &str, output: &Output) -> String {
    format!(
        "{what}: status {:?}\nstdout:\n{}\nstderr:\n{}",
        output.status.code(),
        String::from_utf8_lossy(&output.stdout),
        String::from_utf8_lossy(&output.stderr)
    )
}

/// Runs `command` in `dir` and panics with its output unless it succeeds.
fn must(dir: &Path, what: &str, command: &mut Command) -> Output {
    let output = command
        .current_dir(dir)
        .output()
        .unwrap_or_else(|e| panic!("{what}: cannot start: {e}"));
    assert!(output.status.success(), "{}", describe(what, &output));
    output
}

fn read_json(path: &Path) -> Value {
    let text = std::fs::read_to_string(path)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// gen, testbench, simulate and check `spec` on `simulator` with the DUT `sources`.
/// Panics when a step before check fails; check's exit code is returned, not judged.
pub fn run_loop(
    spec: &UnitSpec,
    simulator: Simulator,
    sources: &[PathBuf],
    options: Options,
) -> Outcome {
    let dir = tempfile::tempdir().unwrap();
    let root = dir.path();
    std::fs::write(root.join("spec.toml"), spec.to_toml()).unwrap();
    let vectors = root.join("vec");

    must(
        root,
        "arithvec gen",
        Command::new(BIN).args(["gen", "spec.toml", "--out", "vec", "--quiet"]),
    );
    let tb = simulator.testbench_file();
    let mut emit = Command::new(BIN);
    emit.args(["testbench", "spec.toml", "--vectors", "vec", "--quiet"])
        .args(["--hdl", simulator.hdl_flag(), "-o", tb]);
    if options.self_check {
        emit.arg("--self-check");
    }
    must(root, "arithvec testbench", &mut emit);

    let stimulus = vectors.join("stimulus.hex");
    let expected = vectors.join("expected.hex");
    let results = root.join("results.csv");
    let top = format!("tb_{}", spec.name);
    let mut plusargs = vec![
        format!("+stimulus={}", stimulus.display()),
        format!("+results={}", results.display()),
    ];
    if options.self_check {
        plusargs.push(format!("+expected={}", expected.display()));
    }
    let run = match simulator {
        Simulator::Icarus => {
            must(
                root,
                "iverilog",
                Command::new("iverilog")
                    .args(["-g2005", "-o", "sim", tb])
                    .args(sources),
            );
            must(
                root,
                "vvp",
                Command::new("vvp").args(["-n", "sim"]).args(&plusargs),
            )
        }
        Simulator::Verilator => {
            must(
                root,
                "verilator",
                Command::new("verilator")
                    .args([
                        "--binary",
                        "--timing",
                        "-Wno-fatal",
                        "--top-module",
                        &top,
                        tb,
                    ])
                    .args(sources)
                    .args(["-o", "sim"]),
            );
            must(
                root,
                "verilated simulation",
                Command::new(root.join("obj_dir/sim")).args(&plusargs),
            )
        }
        Simulator::Ghdl => {
            assert!(!options.self_check, "the VHDL runs here do not self-check");
            must(
                root,
                "ghdl -a",
                Command::new("ghdl")
                    .args(["-a", "--std=08"])
                    .args(sources)
                    .arg(tb),
            );
            must(
                root,
                "ghdl -e",
                Command::new("ghdl").args(["-e", "--std=08", &top]),
            );
            must(
                root,
                "ghdl -r",
                Command::new("ghdl")
                    .args(["-r", "--std=08", &top])
                    .arg(format!("-gstimulus={}", stimulus.display()))
                    .arg(format!("-gresults={}", results.display())),
            )
        }
    };

    let check = Command::new(BIN)
        .current_dir(root)
        .args([
            "check",
            "spec.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
        ])
        .args(["--require", "100", "--json", "check.json", "--quiet"])
        .args(["--max-failures", &options.max_failures.to_string()])
        .output()
        .unwrap();
    let check_code = check.status.code().expect("check was killed by a signal");
    assert!(
        check_code == 0 || check_code == 1 || check_code == 3,
        "{}",
        describe("arithvec check", &check)
    );
    Outcome {
        spec: spec.clone(),
        check_code,
        report: read_json(&root.join("check.json")),
        manifest: read_json(&vectors.join("manifest.json")),
        sim_stdout: String::from_utf8_lossy(&run.stdout).into_owned(),
        dir,
    }
}

impl Outcome {
    /// A short account of the report for assertion messages.
    pub fn summary(&self) -> String {
        let r = &self.report;
        let mut text = format!(
            "unit {} ({} {} {} bits, module {}), dir {}: check exit {}, verdict {}, \
             {} vectors, {} passed, {} failed, {} unknown, coverage {}\n",
            self.spec.name,
            self.spec.operation,
            self.spec.encoding,
            self.spec.width,
            self.spec.module,
            self.dir.path().display(),
            self.check_code,
            r["verdict"],
            r["vectors"],
            r["passed"],
            r["failed"],
            r["unknown"],
            r["coverage"],
        );
        for class in classes(r) {
            if class["failures"].as_u64() != Some(0) || class["status"] != "covered" {
                text.push_str(&format!(
                    "  class {} status {} failures {}/{} missed {} top failing bins {}\n",
                    class["id"],
                    class["status"],
                    class["failures"],
                    class["hits"],
                    class["missed_bins"],
                    first_items(&class["failing_bins"], 3)
                ));
            }
        }
        text.push_str(&format!(
            "  log problems {}\n  first failures {}",
            r["log_problems"],
            first_items(&r["failures"], 2)
        ));
        text
    }

    /// Number of directed vectors (they come first; random vector j has index directed + j).
    pub fn directed(&self) -> u64 {
        self.manifest["directed"]
            .as_u64()
            .expect("manifest.directed")
    }

    /// Number of random vectors.
    pub fn random(&self) -> u64 {
        self.manifest["random"].as_u64().expect("manifest.random")
    }

    /// Total vectors in the set.
    pub fn total(&self) -> u64 {
        self.manifest["total"].as_u64().expect("manifest.total")
    }

    /// Every row of vectors.csv as (column name -> value); values are parsed as hex.
    pub fn vectors(&self) -> Vec<BTreeMap<String, BigUint>> {
        let text = std::fs::read_to_string(self.dir.path().join("vec/vectors.csv")).unwrap();
        let mut lines = text.lines();
        let header: Vec<&str> = lines
            .next()
            .expect("vectors.csv header")
            .split(',')
            .collect();
        lines
            .map(|line| {
                header
                    .iter()
                    .zip(line.split(','))
                    .filter(|(name, _)| **name != "classes")
                    .map(|(name, value)| {
                        let radix = if *name == "index" { 10 } else { 16 };
                        let parsed = BigUint::parse_bytes(value.as_bytes(), radix)
                            .unwrap_or_else(|| panic!("vectors.csv: {name} = {value:?}"));
                        (name.to_string(), parsed)
                    })
                    .collect()
            })
            .collect()
    }

    /// Asserts the run passed every vector with a complete log and 100% class coverage.
    pub fn assert_clean_pass(&self) {
        let r = &self.report;
        let why = self.summary();
        assert_eq!(self.check_code, 0, "{why}");
        assert_eq!(r["verdict"], "pass", "{why}");
        assert_eq!(r["vectors"].as_u64(), Some(self.total()), "{why}");
        assert_eq!(r["passed"].as_u64(), Some(self.total()), "{why}");
        assert_eq!(r["failed"].as_u64(), Some(0), "{why}");
        assert_eq!(r["unknown"].as_u64(), Some(0), "{why}");
        assert_eq!(r["log_problems"]["missing"].as_u64(), Some(0), "{why}");
        let coverage = &r["coverage"];
        assert!(coverage["total"].as_u64().unwrap() > 0, "{why}");
        assert_eq!(coverage["covered"], coverage["total"], "{why}");
        assert_eq!(coverage["percent"].as_f64(), Some(100.0), "{why}");
        assert_eq!(r["gate"]["met"], true, "{why}");
    }
}

fn first_items(list: &Value, n: usize) -> String {
    match list.as_array() {
        Some(items) => {
            let shown: Vec<String> = items.iter().take(n).map(|v| v.to_string()).collect();
            format!(
                "[{}]{}",
                shown.join(", "),
                if items.len() > n { " ..." } else { "" }
            )
        }
        None => list.to_string(),
    }
}

/// The report's class entries.
pub fn classes(report: &Value) -> &Vec<Value> {
    report["classes"].as_array().expect("report.classes")
}

/// Ids of the classes with at least one failing vector.
pub fn failing_classes(report: &Value) -> BTreeSet<String> {
    classes(report)
        .iter()
        .filter(|c| c["failures"].as_u64().unwrap() > 0)
        .map(|c| c["id"].as_str().unwrap().to_string())
        .collect()
}

/// Every failing bin of every class: bin id -> (hits, failures).
pub fn failing_bins(report: &Value) -> BTreeMap<String, (u64, u64)> {
    classes(report)
        .iter()
        .flat_map(|c| c["failing_bins"].as_array().unwrap())
        .map(|b| {
            (
                b["bin"].as_str().unwrap().to_string(),
                (b["hits"].as_u64().unwrap(), b["failures"].as_u64().unwrap()),
            )
        })
        .collect()
}

/// Bins where every hit failed: the report's pointer at the bug.
pub fn all_fail_bins(report: &Value) -> BTreeSet<String> {
    failing_bins(report)
        .into_iter()
        .filter(|(_, (hits, failures))| hits == failures)
        .map(|(bin, _)| bin)
        .collect()
}

/// The listed failures: index -> the entry.
pub fn failures(report: &Value) -> BTreeMap<u64, &Value> {
    report["failures"]
        .as_array()
        .expect("report.failures")
        .iter()
        .map(|f| (f["index"].as_u64().unwrap(), f))
        .collect()
}

/// The DUT ports a failure got wrong.
pub fn wrong_ports(failure: &Value) -> BTreeSet<String> {
    failure["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|o| o["status"] != "ok")
        .map(|o| o["port"].as_str().unwrap().to_string())
        .collect()
}

/// Expected and actual value of one output of a failure, parsed from hex.
pub fn output_values(failure: &Value, port: &str) -> (BigUint, BigUint) {
    let output = failure["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .find(|o| o["port"] == port)
        .unwrap_or_else(|| panic!("no output {port} in {failure}"));
    let parse = |key: &str| {
        BigUint::parse_bytes(output[key].as_str().unwrap().as_bytes(), 16)
            .unwrap_or_else(|| panic!("{key} of {port} in {failure}"))
    };
    (parse("expected"), parse("got"))
}

/// Measures a test's wall time and prints one `sim_e2e timing:` line when finished.
pub struct Timing {
    name: &'static str,
    start: Instant,
}

impl Timing {
    /// Starts the clock for test `name`.
    pub fn start(name: &'static str) -> Timing {
        Timing {
            name,
            start: Instant::now(),
        }
    }

    /// Prints the elapsed time and how many loops ran.
    pub fn finish(self, loops: usize) {
        // The stderr handle, not eprintln!, so the line shows for passing tests too.
        let _ = writeln!(
            std::io::stderr(),
            "sim_e2e timing: {} {:.1} s ({loops} loops)",
            self.name,
            self.start.elapsed().as_secs_f64()
        );
    }
}
