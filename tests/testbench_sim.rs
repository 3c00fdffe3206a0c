//! Runs emitted testbenches on the real simulators (Icarus Verilog 11, Verilator 5, GHDL 2)
//! against small behavioural DUTs written here, and compares the result logs byte for byte
//! with rows computed in Rust.
//!
//! The stimulus and expected files are packed by hand from the layout (the vector generator
//! is not used), so a slicing mistake in the testbench shows up as a wrong row. A missing
//! simulator fails the test when the `CI` environment variable is set and otherwise prints a
//! loud `SKIPPED:` line.

use std::fmt::Write as _;
use std::io::Write as _;
use std::process::{Command, Output};

use arithvec::{emit_testbench, testbench_file_name, testbench_name, Hdl, Layout, Spec};
use arithvec::{TestbenchOptions, WordLayout};
use num_bigint::BigUint;

/// True when `tool` runs; otherwise fails under CI or prints a SKIPPED line.
fn have(tool: &str) -> bool {
    let found = Command::new(tool)
        .arg(if tool == "iverilog" {
            "-V"
        } else {
            "--version"
        })
        .output()
        .is_ok();
    if !found {
        if std::env::var_os("CI").is_some() {
            panic!("{tool} not found and CI is set: the simulator tests must run");
        }
        // Written to the stderr handle rather than with eprintln!, which the test harness
        // captures and shows only for failing tests.
        let _ = writeln!(
            std::io::stderr(),
            "\n*** SKIPPED: {tool} not found; the simulator test did not run ***\n"
        );
    }
    found
}

/// A vector: one value per field of the layout, in layout order.
type Row = Vec<BigUint>;

/// Packs `values` into one `$readmemh` line per the layout (first field highest).
fn pack(layout: &WordLayout, values: &[BigUint]) -> String {
    assert_eq!(layout.fields.len(), values.len());
    let mut word = BigUint::default();
    for (f, v) in layout.fields.iter().zip(values) {
        assert!(
            v.bits() <= u64::from(f.width()),
            "{} does not fit {}",
            v,
            f.name
        );
        word |= v << f.lsb;
    }
    format!("{:0w$x}", word, w = layout.hex_digits() as usize)
}

fn hex_file(layout: &WordLayout, rows: &[Row]) -> String {
    let mut text = String::from("// hand-packed test vectors\n// second comment line\n");
    for r in rows {
        text.push_str(&pack(layout, r));
        text.push('\n');
    }
    text
}

/// The log `arithvec check` expects: `index,<ports>` then decimal index and padded hex.
fn expected_log(layout: &Layout, inputs: &[Row], outputs: &[Row], upper: bool) -> String {
    let mut text = String::from("index");
    for f in layout.stimulus.fields.iter().chain(&layout.expected.fields) {
        text.push(',');
        text.push_str(&f.name);
    }
    text.push('\n');
    for (i, (ins, outs)) in inputs.iter().zip(outputs).enumerate() {
        let _ = write!(text, "{i}");
        let fields = layout.stimulus.fields.iter().chain(&layout.expected.fields);
        for (f, v) in fields.zip(ins.iter().chain(outs)) {
            let digits = f.width().div_ceil(4) as usize;
            let hex = format!("{:0digits$x}", v);
            text.push(',');
            text.push_str(&if upper { hex.to_uppercase() } else { hex });
        }
        text.push('\n');
    }
    text
}

fn big(v: u128) -> BigUint {
    BigUint::from(v)
}

/// One simulator run's outcome.
struct Run {
    output: Output,
    log: String,
}

impl Run {
    fn stdout(&self) -> String {
        String::from_utf8_lossy(&self.output.stdout).into_owned()
    }

    fn describe(&self) -> String {
        format!(
            "status {:?}\nstdout:\n{}\nstderr:\n{}",
            self.output.status.code(),
            self.stdout(),
            String::from_utf8_lossy(&self.output.stderr)
        )
    }
}

fn must(output: std::io::Result<Output>, what: &str) -> Output {
    let output = output.unwrap_or_else(|e| panic!("{what}: {e}"));
    assert!(
        output.status.success(),
        "{what} failed: {}\n{}",
        String::from_utf8_lossy(&output.stdout),
        String::from_utf8_lossy(&output.stderr)
    );
    output
}

/// Files for one run: the testbench, the DUT and the hex files, in a fresh directory.
struct Bench {
    dir: tempfile::TempDir,
    spec: Spec,
    hdl: Hdl,
}

impl Bench {
    fn new(
        spec: &Spec,
        options: &TestbenchOptions,
        dut_source: &str,
        files: &[(&str, &str)],
    ) -> Bench {
        let dir = tempfile::tempdir().unwrap();
        let text = emit_testbench(spec, options).unwrap();
        let bench = Bench {
            dir,
            spec: spec.clone(),
            hdl: options.hdl,
        };
        std::fs::write(bench.path(&bench.tb_file()), text).unwrap();
        std::fs::write(bench.path(&bench.dut_file()), dut_source).unwrap();
        for (name, content) in files {
            let path = bench.path(name);
            std::fs::create_dir_all(path.parent().unwrap()).unwrap();
            std::fs::write(path, content).unwrap();
        }
        bench
    }

    fn path(&self, name: &str) -> std::path::PathBuf {
        self.dir.path().join(name)
    }

    fn tb_file(&self) -> String {
        testbench_file_name(&self.spec, self.hdl)
    }

    fn dut_file(&self) -> String {
        format!("dut.{}", self.hdl.extension())
    }

    fn top(&self) -> String {
        testbench_name(&self.spec)
    }

    fn cmd(&self, program: &str) -> Command {
        let mut c = Command::new(program);
        c.current_dir(self.dir.path());
        c
    }

    fn finish(&self, output: Output, results: &str) -> Run {
        let log = std::fs::read_to_string(self.path(results)).unwrap_or_default();
        Run { output, log }
    }

    /// Compiles with Icarus (`-g2005`) and runs vvp with `plusargs`.
    fn icarus(&self, plusargs: &[&str], results: &str) -> Run {
        must(
            self.cmd("iverilog")
                .args(["-g2005", "-o", "sim_icarus"])
                .arg(self.tb_file())
                .arg(self.dut_file())
                .output(),
            "iverilog",
        );
        let out = self
            .cmd("vvp")
            .arg("sim_icarus")
            .args(plusargs)
            .output()
            .unwrap();
        self.finish(out, results)
    }

    /// Builds with Verilator (`--binary --timing`) and runs the binary with `plusargs`.
    fn verilator(&self, plusargs: &[&str], results: &str) -> Run {
        let top = self.top();
        must(
            self.cmd("verilator")
                .args(["--binary", "--timing", "-Wno-fatal", "--top-module", &top])
                .arg(self.tb_file())
                .arg(self.dut_file())
                .args(["-o", "sim"])
                .output(),
            "verilator",
        );
        let out = self.cmd("obj_dir/sim").args(plusargs).output().unwrap();
        self.finish(out, results)
    }

    /// Analyses, elaborates and runs with GHDL (`--std=08`) with `generics`.
    fn ghdl(&self, generics: &[&str], results: &str) -> Run {
        let top = self.top();
        must(
            self.cmd("ghdl")
                .args(["-a", "--std=08"])
                .arg(self.dut_file())
                .arg(self.tb_file())
                .output(),
            "ghdl -a",
        );
        must(
            self.cmd("ghdl").args(["-e", "--std=08", &top]).output(),
            "ghdl -e",
        );
        let out = self
            .cmd("ghdl")
            .args(["-r", "--std=08", &top])
            .args(generics)
            .output()
            .unwrap();
        self.finish(out, results)
    }
}

fn assert_ok(run: &Run, log: &str, sim: &str) {
    assert!(run.output.status.success(), "{sim}: {}", run.describe());
    assert_eq!(run.log, log, "{sim} log differs; {}", run.describe());
}

// ---------------------------------------------------------------------------------------
// 16-bit two's-complement subtractor with borrow-in.

const SUB_SPEC: &str = r#"
name = "pump-delta.v2"
operation = "sub"
width = WIDTH
encoding = "twos"

[ports]
a = "a"
b = "b"
carry_in = "bin"
result = "d"
carry_out = "bout"
overflow = "v"
zero = "z"
negative = "n"

[dut]
module = "sub_w"
parameters = { W = WIDTH }
"#;

/// A behavioural W-bit subtractor whose parameter default (3) is wrong on purpose, so the
/// test also shows the `#(.W(...))` override reached the instance.
const SUB_VERILOG: &str = r#"
module sub_w #(parameter W = 3) (
  input [W-1:0] a, input [W-1:0] b, input bin,
  output [W-1:0] d, output bout, output v, output z, output n
);
  wire [W:0] raw = {1'b0, a} - {1'b0, b} - {{W{1'b0}}, bin};
  assign d = raw[W-1:0];
  assign bout = raw[W];
  assign v = (a[W-1] != b[W-1]) && (d[W-1] != a[W-1]);
  assign z = (d == {W{1'b0}});
  assign n = d[W-1];
endmodule
"#;

const SUB_VHDL: &str = r#"
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity sub_w is
  generic (W : positive := 3);
  port (
    a, b : in std_logic_vector(W - 1 downto 0);
    bin : in std_logic;
    d : out std_logic_vector(W - 1 downto 0);
    bout, v, z, n : out std_logic
  );
end entity sub_w;

architecture behavioural of sub_w is
  signal raw : unsigned(W downto 0);
begin
  raw <= resize(unsigned(a), W + 1) - resize(unsigned(b), W + 1) - (to_unsigned(0, W) & bin);
  d <= std_logic_vector(raw(W - 1 downto 0));
  bout <= raw(W);
  v <= (a(W - 1) xor b(W - 1)) and (raw(W - 1) xor a(W - 1));
  z <= '1' when raw(W - 1 downto 0) = 0 else '0';
  n <= raw(W - 1);
end architecture behavioural;
"#;

fn sub_spec(width: u32) -> Spec {
    Spec::parse(&SUB_SPEC.replace("WIDTH", &width.to_string()), "sub.toml").unwrap()
}

/// (inputs, outputs) rows for a W-bit subtractor, computed with Rust integer arithmetic.
fn sub_vectors(width: u32) -> (Vec<Row>, Vec<Row>) {
    let mask = (1u64 << width) - 1;
    let top = 1u64 << (width - 1);
    let cases: Vec<(u64, u64, u64)> = vec![
        (0, 0, 0),
        (0, 0, 1),
        (top, 1, 0),
        (top - 1, mask, 0),
        (mask, mask, 1),
        (0x1234 & mask, 0x0fed & mask, 1),
        (5, 5, 0),
        (top, top - 1, 1),
    ];
    let mut ins = Vec::new();
    let mut outs = Vec::new();
    for (a, b, bin) in cases {
        let raw = (a as i64) - (b as i64) - (bin as i64);
        let d = (raw as u64) & mask;
        let bout = u64::from(raw < 0);
        let sign = |x: u64| x & top != 0;
        let v = u64::from(sign(a) != sign(b) && sign(d) != sign(a));
        let z = u64::from(d == 0);
        let n = u64::from(sign(d));
        ins.push(vec![big(a.into()), big(b.into()), big(bin.into())]);
        outs.push(vec![
            big(d.into()),
            big(bout.into()),
            big(v.into()),
            big(z.into()),
            big(n.into()),
        ]);
    }
    (ins, outs)
}

#[test]
fn sub16_with_borrow_in_on_icarus_and_verilator() {
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let stim = hex_file(&layout.stimulus, &ins);
    // A non-default stimulus file name, so the plusarg is what finds it.
    let bench = Bench::new(&spec, &options, SUB_VERILOG, &[("vec/in.hex", &stim)]);
    let log = expected_log(&layout, &ins, &outs, false);
    let args = ["+stimulus=vec/in.hex", "+results=vec/out.csv"];
    if have("iverilog") {
        assert_ok(&bench.icarus(&args, "vec/out.csv"), &log, "icarus");
    }
    if have("verilator") {
        assert_ok(&bench.verilator(&args, "vec/out.csv"), &log, "verilator");
    }
}

#[test]
fn default_file_names_are_used_without_plusargs() {
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VERILOG,
        &[("stimulus.hex", &hex_file(&layout.stimulus, &ins))],
    );
    if have("iverilog") {
        let run = bench.icarus(&[], "results.csv");
        assert_ok(&run, &expected_log(&layout, &ins, &outs, false), "icarus");
    }
}

#[test]
fn short_stimulus_file_stops_the_run_on_both_simulators() {
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, _) = sub_vectors(16);
    // The testbench is told about one vector more than the file holds.
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64 + 1);
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VERILOG,
        &[("stimulus.hex", &hex_file(&layout.stimulus, &ins))],
    );
    let expect = format!(
        "stimulus.hex holds {} words; expected {}",
        ins.len(),
        ins.len() + 1
    );
    if have("iverilog") {
        let run = bench.icarus(&[], "results.csv");
        assert!(!run.output.status.success(), "{}", run.describe());
        assert!(run.describe().contains(&expect), "{}", run.describe());
    }
    if have("verilator") {
        let run = bench.verilator(&[], "results.csv");
        assert!(!run.output.status.success(), "{}", run.describe());
        assert!(run.describe().contains(&expect), "{}", run.describe());
    }
}

// ---------------------------------------------------------------------------------------
// Self-check: one deliberately wrong expected line.

fn expected_hex_with_one_wrong_line(layout: &Layout, outs: &[Row], wrong: usize) -> String {
    let mut bad = outs.to_vec();
    // Flip the zero flag of one vector.
    let z = layout
        .expected
        .fields
        .iter()
        .position(|f| f.name == "z")
        .unwrap();
    bad[wrong][z] = big(1) - &bad[wrong][z];
    hex_file(&layout.expected, &bad)
}

#[test]
fn self_check_counts_one_mismatch_and_fails_the_run() {
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let mut options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    options.self_check = true;
    let stim = hex_file(&layout.stimulus, &ins);
    let good = hex_file(&layout.expected, &outs);
    let bad = expected_hex_with_one_wrong_line(&layout, &outs, 3);
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VERILOG,
        &[
            ("stimulus.hex", &stim),
            ("good.hex", &good),
            ("bad.hex", &bad),
        ],
    );
    let log = expected_log(&layout, &ins, &outs, false);
    let n = ins.len();
    let pass = format!("arithvec-tb: {n} vectors, 0 mismatches");
    // Exactly "1 mismatch" (issue 9, item 20: singular for one), not "1 mismatches".
    let fail = format!("arithvec-tb: {n} vectors, 1 mismatch\n");
    type Sim<'a> = (&'a str, Box<dyn Fn(&[&str]) -> Run + 'a>);
    let mut sims: Vec<Sim> = Vec::new();
    if have("iverilog") {
        sims.push((
            "icarus",
            Box::new(|a: &[&str]| bench.icarus(a, "results.csv")),
        ));
    }
    if have("verilator") {
        sims.push((
            "verilator",
            Box::new(|a: &[&str]| bench.verilator(a, "results.csv")),
        ));
    }
    for (sim, run) in &sims {
        let ok = run(&["+expected=good.hex"]);
        assert_ok(&ok, &log, sim);
        assert!(ok.stdout().contains(&pass), "{sim}: {}", ok.describe());

        let bad_run = run(&["+expected=bad.hex"]);
        assert!(
            bad_run.stdout().contains(&fail),
            "{sim}: {}",
            bad_run.describe()
        );
        assert!(
            // Issue 9 item 22: one line per differing port, "vector 3: PORT = got, expected".
            bad_run
                .describe()
                .lines()
                .any(|l| l.contains("arithvec-tb: vector 3: ")
                    && l.contains(" = ")
                    && l.contains(", expected ")),
            "{sim}: {}",
            bad_run.describe()
        );
        let code = bad_run.output.status.code();
        eprintln!("{sim}: exit status on a mismatch: {code:?}");
        assert!(
            !bad_run.output.status.success(),
            "{sim}: {}",
            bad_run.describe()
        );
        // The log is still complete.
        assert_eq!(bad_run.log, log, "{sim}");
    }
}

// ---------------------------------------------------------------------------------------
// 8-bit unsigned add/sub unit with mode.

const ADDSUB_SPEC: &str = r#"
name = "mixer_acc"
operation = "addsub"
width = 8
encoding = "unsigned"

[ports]
a = "x"
b = "y"
carry_in = "ci"
mode = "sub"
result = "s"
carry_out = "co"

[conventions]
# mode 1 computes x - y - ci: the port is a borrow-in, and co the borrow-out.
carry_in = "borrow"

[dut]
module = "mixer_addsub"
"#;

const ADDSUB_VERILOG: &str = r#"
module mixer_addsub (
  input [7:0] x, input [7:0] y, input ci, input sub,
  output [7:0] s, output co
);
  wire [8:0] sum = {1'b0, x} + {1'b0, y} + {8'b0, ci};
  wire [8:0] diff = {1'b0, x} - {1'b0, y} - {8'b0, ci};
  assign s = sub ? diff[7:0] : sum[7:0];
  assign co = sub ? diff[8] : sum[8];
endmodule
"#;

#[test]
fn addsub_with_mode_on_icarus_and_verilator() {
    let spec = Spec::parse(ADDSUB_SPEC, "addsub.toml").unwrap();
    let layout = Layout::for_spec(&spec);
    let mut ins = Vec::new();
    let mut outs = Vec::new();
    for (a, b, ci, mode) in [
        (0u32, 0u32, 0u32, 0u32),
        (0xff, 0x01, 0, 0),
        (0xff, 0xff, 1, 0),
        (0x00, 0x01, 0, 1),
        (0x80, 0x7f, 1, 1),
        (0x10, 0x10, 1, 1),
        (0x3c, 0xa5, 1, 0),
    ] {
        let raw = if mode == 0 {
            (a + b + ci) as i32
        } else {
            a as i32 - b as i32 - ci as i32
        };
        let s = (raw & 0xff) as u128;
        let co = if mode == 0 {
            (raw >> 8) & 1
        } else {
            (raw < 0) as i32
        } as u128;
        ins.push(vec![
            big(a.into()),
            big(b.into()),
            big(ci.into()),
            big(mode.into()),
        ]);
        outs.push(vec![big(s), big(co)]);
    }
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let bench = Bench::new(
        &spec,
        &options,
        ADDSUB_VERILOG,
        &[("stimulus.hex", &hex_file(&layout.stimulus, &ins))],
    );
    let log = expected_log(&layout, &ins, &outs, false);
    let args = ["+stimulus=stimulus.hex", "+results=results.csv"];
    if have("iverilog") {
        assert_ok(&bench.icarus(&args, "results.csv"), &log, "icarus");
    }
    if have("verilator") {
        assert_ok(&bench.verilator(&args, "results.csv"), &log, "verilator");
    }
}

// ---------------------------------------------------------------------------------------
// 8-bit two's-complement comparator.

const CMP_SPEC: &str = r#"
name = "level_cmp"
operation = "compare"
width = 8
encoding = "twos"

[ports]
a = "a"
b = "b"
less = "lt"
equal = "eq"
greater = "gt"

[dut]
module = "level_cmp8"
"#;

const CMP_VERILOG: &str = r#"
module level_cmp8 (input [7:0] a, input [7:0] b, output lt, output eq, output gt);
  assign lt = $signed(a) < $signed(b);
  assign eq = a == b;
  assign gt = $signed(a) > $signed(b);
endmodule
"#;

#[test]
fn compare_on_icarus_and_verilator() {
    let spec = Spec::parse(CMP_SPEC, "cmp.toml").unwrap();
    let layout = Layout::for_spec(&spec);
    let mut ins = Vec::new();
    let mut outs = Vec::new();
    for (a, b) in [
        (0u8, 0u8),
        (0x7f, 0x80),
        (0x80, 0x7f),
        (0xff, 0x00),
        (0x01, 0xff),
        (0x42, 0x42),
    ] {
        let (sa, sb) = (a as i8, b as i8);
        ins.push(vec![big(a.into()), big(b.into())]);
        outs.push(vec![
            big(u128::from(sa < sb)),
            big(u128::from(sa == sb)),
            big(u128::from(sa > sb)),
        ]);
    }
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let bench = Bench::new(
        &spec,
        &options,
        CMP_VERILOG,
        &[("stimulus.hex", &hex_file(&layout.stimulus, &ins))],
    );
    let log = expected_log(&layout, &ins, &outs, false);
    if have("iverilog") {
        assert_ok(&bench.icarus(&[], "results.csv"), &log, "icarus");
    }
    if have("verilator") {
        assert_ok(&bench.verilator(&[], "results.csv"), &log, "verilator");
    }
}

// ---------------------------------------------------------------------------------------
// 512-bit adder: a 1025-bit stimulus word.

const ADD512_SPEC: &str = r#"
name = "wide_sum"
operation = "add"
width = 512
encoding = "unsigned"

[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "sum"
carry_out = "cout"

[dut]
module = "add_w"
parameters = { W = 512 }
"#;

const ADD_VERILOG: &str = r#"
module add_w #(parameter W = 4) (
  input [W-1:0] a, input [W-1:0] b, input cin, output [W-1:0] sum, output cout
);
  assign {cout, sum} = {1'b0, a} + {1'b0, b} + {{W{1'b0}}, cin};
endmodule
"#;

#[test]
fn add512_with_1025_bit_stimulus_on_icarus_and_verilator() {
    let spec = Spec::parse(ADD512_SPEC, "add.toml").unwrap();
    let layout = Layout::for_spec(&spec);
    assert_eq!(layout.stimulus.width, 1025);
    let ones = (BigUint::from(1u8) << 512u32) - 1u8;
    let top = BigUint::from(1u8) << 511u32;
    // A deterministic pseudo-random 512-bit pattern (splitmix-style mixing of a counter).
    let pattern = |seed: u64| {
        let mut v = BigUint::default();
        let mut x = seed;
        for _ in 0..8 {
            x = x.wrapping_add(0x9e37_79b9_7f4a_7c15);
            let mut z = x;
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            v = (v << 64u32) | BigUint::from(z ^ (z >> 31));
        }
        v
    };
    let cases = vec![
        (BigUint::default(), BigUint::default(), 0u8),
        (ones.clone(), BigUint::default(), 1),
        (ones.clone(), ones.clone(), 1),
        (top.clone(), top.clone(), 0),
        (pattern(1), pattern(2), 0),
        (pattern(3), pattern(4), 1),
    ];
    let mut ins = Vec::new();
    let mut outs = Vec::new();
    for (a, b, cin) in cases {
        let raw = &a + &b + BigUint::from(cin);
        let sum = &raw & &ones;
        let cout = &raw >> 512u32;
        ins.push(vec![a, b, BigUint::from(cin)]);
        outs.push(vec![sum, cout]);
    }
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let stim = hex_file(&layout.stimulus, &ins);
    assert_eq!(stim.lines().nth(2).unwrap().len(), 257);
    let bench = Bench::new(&spec, &options, ADD_VERILOG, &[("stimulus.hex", &stim)]);
    let log = expected_log(&layout, &ins, &outs, false);
    if have("iverilog") {
        assert_ok(&bench.icarus(&[], "results.csv"), &log, "icarus");
    }
    if have("verilator") {
        assert_ok(&bench.verilator(&[], "results.csv"), &log, "verilator");
    }
}

// ---------------------------------------------------------------------------------------
// Verilator lint.

#[test]
fn verilator_wall_lint_is_clean_on_the_testbench() {
    if !have("verilator") {
        return;
    }
    let cases = [
        (sub_spec(16), SUB_VERILOG, false),
        (sub_spec(16), SUB_VERILOG, true),
        (
            Spec::parse(ADD512_SPEC, "add.toml").unwrap(),
            ADD_VERILOG,
            true,
        ),
        (
            Spec::parse(CMP_SPEC, "cmp.toml").unwrap(),
            CMP_VERILOG,
            true,
        ),
        (
            Spec::parse(ADDSUB_SPEC, "addsub.toml").unwrap(),
            ADDSUB_VERILOG,
            false,
        ),
    ];
    for (spec, dut, self_check) in cases {
        let mut options = TestbenchOptions::new(Hdl::Verilog, 8);
        options.self_check = self_check;
        let bench = Bench::new(&spec, &options, dut, &[]);
        let out = bench
            .cmd("verilator")
            .args([
                "--lint-only",
                "-Wall",
                "--timing",
                "--top-module",
                &bench.top(),
            ])
            .arg(bench.tb_file())
            .arg(bench.dut_file())
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        let tb_file = bench.tb_file();
        let tb_warnings: Vec<&str> = stderr
            .lines()
            .filter(|l| l.starts_with('%') && l.contains(&tb_file))
            .collect();
        assert!(
            tb_warnings.is_empty(),
            "{} self_check {self_check}: lint warnings on the testbench:\n{stderr}",
            spec.name
        );
        // The filter above is not vacuous: the DUT file, named unlike its module, does warn.
        assert!(
            stderr.contains("DECLFILENAME") && stderr.contains("dut.v"),
            "{stderr}"
        );
    }
}

// ---------------------------------------------------------------------------------------
// VHDL on GHDL.

#[test]
fn vhdl_sub_on_ghdl_at_16_and_13_bits() {
    if !have("ghdl") {
        return;
    }
    for width in [16, 13] {
        let spec = sub_spec(width);
        let layout = Layout::for_spec(&spec);
        let (ins, outs) = sub_vectors(width);
        let options = TestbenchOptions::new(Hdl::Vhdl, ins.len() as u64);
        let bench = Bench::new(
            &spec,
            &options,
            SUB_VHDL,
            &[("in.hex", &hex_file(&layout.stimulus, &ins))],
        );
        let run = bench.ghdl(&["-gstimulus=in.hex", "-gresults=out.csv"], "out.csv");
        assert_ok(
            &run,
            &expected_log(&layout, &ins, &outs, true),
            &format!("ghdl W={width}"),
        );
    }
}

#[test]
fn vhdl_self_check_on_ghdl() {
    if !have("ghdl") {
        return;
    }
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let mut options = TestbenchOptions::new(Hdl::Vhdl, ins.len() as u64);
    options.self_check = true;
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VHDL,
        &[
            ("stimulus.hex", &hex_file(&layout.stimulus, &ins)),
            ("expected.hex", &hex_file(&layout.expected, &outs)),
            (
                "bad.hex",
                &expected_hex_with_one_wrong_line(&layout, &outs, 5),
            ),
        ],
    );
    let log = expected_log(&layout, &ins, &outs, true);
    let n = ins.len();
    let ok = bench.ghdl(&[], "results.csv");
    assert_ok(&ok, &log, "ghdl");
    assert!(ok
        .describe()
        .contains(&format!("arithvec-tb: {n} vectors, 0 mismatches")));
    let bad = bench.ghdl(&["-gexpected=bad.hex"], "results.csv");
    eprintln!(
        "ghdl: exit status on a mismatch: {:?}",
        bad.output.status.code()
    );
    assert!(!bad.output.status.success(), "{}", bad.describe());
    assert!(
        bad.describe()
            .contains(&format!("arithvec-tb: {n} vectors, 1 mismatch\n")),
        "{}",
        bad.describe()
    );
    assert!(
        bad.describe()
            .lines()
            .any(|l| l.contains("arithvec-tb: vector 5: ")
                && l.contains(" = ")
                && l.contains(", expected ")),
        "{}",
        bad.describe()
    );
    assert_eq!(bad.log, log);
}

/// A subtractor with unknown bits on purpose: the top digit of d is all 'Z', bit 0 of d is
/// 'X', v is 'Z' and n is never driven ('U').
const SUB_VHDL_UNKNOWNS: &str = r#"
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity sub_w is
  generic (W : positive := 3);
  port (
    a, b : in std_logic_vector(W - 1 downto 0);
    bin : in std_logic;
    d : out std_logic_vector(W - 1 downto 0);
    bout, v, z, n : out std_logic
  );
end entity sub_w;

architecture broken of sub_w is
  signal raw : unsigned(W downto 0);
begin
  raw <= resize(unsigned(a), W + 1) - resize(unsigned(b), W + 1) - (to_unsigned(0, W) & bin);
  d(W - 1 downto W - 4) <= (others => 'Z');
  d(W - 5 downto 1) <= std_logic_vector(raw(W - 5 downto 1));
  d(0) <= 'X';
  bout <= raw(W);
  v <= 'Z';
  z <= '1' when raw(W - 1 downto 0) = 0 else '0';
end architecture broken;
"#;

#[test]
fn vhdl_unknown_outputs_print_as_x_and_z_digits() {
    if !have("ghdl") {
        return;
    }
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let options = TestbenchOptions::new(Hdl::Vhdl, ins.len() as u64);
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VHDL_UNKNOWNS,
        &[("stimulus.hex", &hex_file(&layout.stimulus, &ins))],
    );
    let run = bench.ghdl(&[], "results.csv");
    assert!(run.output.status.success(), "{}", run.describe());
    let mut want = String::from("index,a,b,bin,d,bout,v,z,n\n");
    for (i, (inp, out)) in ins.iter().zip(&outs).enumerate() {
        let d = format!("{:04X}", out[0]);
        let _ = writeln!(
            want,
            "{i},{:04X},{:04X},{:X},Z{}X,{:X},Z,{:X},X",
            inp[0],
            inp[1],
            inp[2],
            &d[1..3],
            out[1],
            out[3]
        );
    }
    assert_eq!(run.log, want, "{}", run.describe());
}

#[test]
fn emitted_files_reference_their_own_names() {
    // The header's commands name the file the tests write, so they can be pasted.
    let spec = sub_spec(16);
    let text = emit_testbench(&spec, &TestbenchOptions::new(Hdl::Verilog, 1)).unwrap();
    let file = testbench_file_name(&spec, Hdl::Verilog);
    assert_eq!(file, "tb_pump_delta_v2.v");
    assert!(
        text.contains(&format!(
            "$ iverilog -g2005 -s tb_pump_delta_v2 -o sim {file} sub_w.v"
        )),
        "{text}"
    );
}

#[test]
fn vhdl_malformed_stimulus_stops_the_run_naming_the_file() {
    if !have("ghdl") {
        return;
    }
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, _) = sub_vectors(16);
    let good = hex_file(&layout.stimulus, &ins);
    let short: String = good
        .lines()
        .take(ins.len() + 1)
        .map(|l| format!("{l}\n"))
        .collect();
    let long = format!("{good}{}\n", pack(&layout.stimulus, &ins[0]));
    // Line 5 (the third word, after two comment lines) loses a digit.
    let bad_line: String = good
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == 4 {
                format!("{}\n", &l[1..])
            } else {
                format!("{l}\n")
            }
        })
        .collect();
    let options = TestbenchOptions::new(Hdl::Vhdl, ins.len() as u64);
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VHDL,
        &[
            ("short.hex", &short),
            ("long.hex", &long),
            ("bad.hex", &bad_line),
        ],
    );
    let n = ins.len();
    for (file, message) in [
        (
            "short.hex",
            format!("short.hex holds {} words; expected {n}", n - 1),
        ),
        ("long.hex", format!("long.hex holds more than {n} words")),
        ("bad.hex", "bad.hex:5: expected 9 hex digits".to_string()),
        ("missing.hex", "cannot open missing.hex".to_string()),
    ] {
        let run = bench.ghdl(&[&format!("-gstimulus={file}")], "results.csv");
        assert!(!run.output.status.success(), "{file}: {}", run.describe());
        assert!(
            run.describe().contains(&message),
            "{file}: {}",
            run.describe()
        );
    }
}

/// The W-bit subtractor with its negative output left undriven, so Icarus sees z.
const SUB_VERILOG_FLOATING_N: &str = r#"
module sub_w #(parameter W = 3) (
  input [W-1:0] a, input [W-1:0] b, input bin,
  output [W-1:0] d, output bout, output v, output z, output n
);
  wire [W:0] raw = {1'b0, a} - {1'b0, b} - {{W{1'b0}}, bin};
  assign d = raw[W-1:0];
  assign bout = raw[W];
  assign v = (a[W-1] != b[W-1]) && (d[W-1] != a[W-1]);
  assign z = (d == {W{1'b0}});
endmodule
"#;

#[test]
fn icarus_self_check_counts_z_outputs_as_mismatches() {
    if !have("iverilog") {
        return;
    }
    let spec = sub_spec(16);
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let mut options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    options.self_check = true;
    let bench = Bench::new(
        &spec,
        &options,
        SUB_VERILOG_FLOATING_N,
        &[
            ("stimulus.hex", &hex_file(&layout.stimulus, &ins)),
            ("expected.hex", &hex_file(&layout.expected, &outs)),
        ],
    );
    let run = bench.icarus(&[], "results.csv");
    assert!(!run.output.status.success(), "{}", run.describe());
    let n = ins.len();
    assert!(
        run.stdout()
            .contains(&format!("arithvec-tb: {n} vectors, {n} mismatches")),
        "{}",
        run.describe()
    );
    // The log shows the floating output as a z digit in the last column.
    let want = expected_log(&layout, &ins, &outs, false);
    let want: String = want
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == 0 {
                format!("{l}\n")
            } else {
                format!("{}z\n", &l[..l.len() - 1])
            }
        })
        .collect();
    assert_eq!(run.log, want, "{}", run.describe());
}

// ---------------------------------------------------------------------------------------
// Issue 15: the header's commands name the testbench as the only top, so a DUT file that
// carries its own test module (tests/hdl/shapes/sub_with_test.v, whose extra top calls
// $finish at time 0) does not end the run before any vector is applied.

/// The commands in the testbench's header comment (`//   $ ...` lines), split into words.
fn header_commands(text: &str) -> Vec<Vec<String>> {
    text.lines()
        .take_while(|l| l.starts_with("//"))
        .filter_map(|l| l.strip_prefix("//   $ "))
        .map(|l| l.split_whitespace().map(str::to_string).collect())
        .collect()
}

#[test]
fn issue15_header_commands_run_a_dut_file_with_its_own_test_module() {
    let spec_text = SUB_SPEC
        .replace("WIDTH", "16")
        .replace("module = \"sub_w\"", "module = \"sub_with_test\"");
    let spec = Spec::parse(&spec_text, "sub.toml").unwrap();
    let layout = Layout::for_spec(&spec);
    let (ins, outs) = sub_vectors(16);
    let options = TestbenchOptions::new(Hdl::Verilog, ins.len() as u64);
    let text = emit_testbench(&spec, &options).unwrap();
    assert!(text.contains("\n`timescale 1ns / 1ps\n"), "{text}");
    assert!(text.contains("need -g2012 in place of"), "{text}");
    let commands = header_commands(&text);
    assert_eq!(commands.len(), 4, "{commands:?}");
    assert!(commands[0]
        .windows(2)
        .any(|w| w == ["-s", "tb_pump_delta_v2"]));
    assert!(commands[2]
        .windows(2)
        .any(|w| w == ["--top-module", "tb_pump_delta_v2"]));
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join(testbench_file_name(&spec, Hdl::Verilog)),
        &text,
    )
    .unwrap();
    std::fs::write(
        dir.path().join("sub_with_test.v"),
        include_str!("hdl/shapes/sub_with_test.v"),
    )
    .unwrap();
    std::fs::write(
        dir.path().join("stimulus.hex"),
        hex_file(&layout.stimulus, &ins),
    )
    .unwrap();
    let want = expected_log(&layout, &ins, &outs, false);
    let run = |words: &[String]| {
        let mut c = Command::new(&words[0]);
        c.args(&words[1..]).current_dir(dir.path());
        c.output().unwrap()
    };
    for (sim, build, exec) in [("iverilog", 0, 1), ("verilator", 2, 3)] {
        if !have(sim) {
            continue;
        }
        let _ = std::fs::remove_file(dir.path().join("results.csv"));
        must(Ok(run(&commands[build])), sim);
        let out = run(&commands[exec]);
        let log = std::fs::read_to_string(dir.path().join("results.csv")).unwrap_or_default();
        let run = Run { output: out, log };
        assert!(
            !run.stdout().contains("extra top ran"),
            "{sim}: {}",
            run.describe()
        );
        assert_ok(&run, &want, sim);
    }
}
