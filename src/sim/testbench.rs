//! Testbench emitters: turn a spec into a Verilog-2005 or VHDL-2008 testbench that applies
//! `stimulus.hex` to the DUT and writes the result log that `arithvec check` reads.
//!
//! This module owns the generated testbench text and nothing else: it does no file I/O (the
//! CLI writes the text atomically) and no arithmetic. Every packed-word position comes from
//! [`Layout`], so the testbench slices exactly the fields the hex writer packed. The emitted
//! file opens with a comment block naming the unit and giving the commands that compile and
//! run it; everything else is plain IEEE 1364-2005 or IEEE 1076-2008 with two exceptions
//! that are documented where they are emitted: the Verilog self-check ends with `$fatal`
//! (an IEEE 1800 task that Icarus 11 and Verilator 5 both accept in Verilog-2005 sources),
//! and one Verilator lint waiver.
//!
//! The testbench's own signals are named after arithvec's signal keys (`s_a`, `s_result`,
//! ...), never after the DUT's port names, so a port name can only clash with a reserved
//! word of the language; that, and VHDL's stricter identifier rules, are checked here.

use std::collections::BTreeMap;
use std::fmt::Write as _;

use crate::error::{Error, Problem, Result};
use crate::sets::layout::{Field, Layout, WordLayout};
use crate::spec::{DivByZero, Dut, NegativeZero, ParamValue, Signal, Spec, VhdlType};

mod clocked;

/// The hardware description language of an emitted testbench.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Hdl {
    /// IEEE 1364-2005 Verilog, run on Icarus Verilog 11 and Verilator 5.
    Verilog,
    /// IEEE 1076-2008 VHDL, run on GHDL 2.
    Vhdl,
}

impl Hdl {
    /// The usual file extension, without the dot.
    pub fn extension(self) -> &'static str {
        match self {
            Hdl::Verilog => "v",
            Hdl::Vhdl => "vhd",
        }
    }
}

/// What to emit.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TestbenchOptions {
    /// The language.
    pub hdl: Hdl,
    /// How many vectors the stimulus file holds (the manifest's `vectors`).
    pub vectors: u64,
    /// The global index of the stimulus file's first vector (the manifest's `first_index`;
    /// non-zero for a shard), so the log names every vector by its index in the whole set.
    pub first_index: u64,
    /// How long to wait after applying a vector before sampling the outputs,
    /// in nanoseconds (the Verilog testbench opens with `` `timescale 1ns / 1ps ``). At least 1.
    pub settle: u32,
    /// Also load `expected.hex`, compare, count mismatches and fail the run on any.
    pub self_check: bool,
    /// Clocked units with `valid_in` only: drop valid_in on about one cycle in K (seeded
    /// pseudo-random cycles, `--stall-every K`). None: never.
    pub stall_every: Option<u32>,
    /// The stall generator's seed (the vector set's seed).
    pub stall_seed: u64,
}

impl TestbenchOptions {
    /// Options for `vectors` vectors in `hdl`, settling 1 time unit, without self-check.
    pub fn new(hdl: Hdl, vectors: u64) -> TestbenchOptions {
        TestbenchOptions {
            hdl,
            vectors,
            first_index: 0,
            settle: 1,
            self_check: false,
            stall_every: None,
            stall_seed: 0,
        }
    }
}

/// The name of the testbench module or entity for `spec`: `tb_` and the unit name with every
/// character other than a letter or digit turned into `_` (runs of `_` collapsed, no
/// trailing `_`, so the result is also a basic VHDL identifier).
pub fn testbench_name(spec: &Spec) -> String {
    let mut name = String::from("tb_");
    for c in spec.name.chars() {
        let c = if c.is_ascii_alphanumeric() { c } else { '_' };
        if !(c == '_' && name.ends_with('_')) {
            name.push(c);
        }
    }
    while name.ends_with('_') && name.len() > 3 {
        name.pop();
    }
    if name == "tb_" {
        name.push_str("unit");
    }
    name
}

/// The file name the header comment's commands assume: [`testbench_name`] plus the
/// language's extension, e.g. `tb_pump_delta.v`.
pub fn testbench_file_name(spec: &Spec, hdl: Hdl) -> String {
    format!("{}.{}", testbench_name(spec), hdl.extension())
}

/// The largest vector count a testbench accepts: loop indices and array bounds are 32-bit
/// signed integers in both languages, and the Verilog loop index must be able to step one
/// past the last vector without overflowing.
pub const MAX_TESTBENCH_VECTORS: u64 = i32::MAX as u64 - 1;

/// How many mismatching vectors the self-check describes one by one before it only counts.
const MISMATCH_REPORT_LIMIT: u32 = 10;

/// Longest file path a Verilog plusarg can carry: the path registers hold this many bytes.
const PLUSARG_BYTES: u32 = 1024;

/// Emits the testbench text for `spec`.
///
/// The testbench reads `options.vectors` packed words from the stimulus file (plusarg
/// `+stimulus=` / generic `stimulus`, default `stimulus.hex`), applies each to the DUT named
/// by the spec's `[dut]` table, waits `options.settle` time units and writes one CSV row per
/// vector to the results file (`+results=` / `results`, default `results.csv`): a header
/// `index,<input ports>,<output ports>` and then the index in decimal and every field in hex.
///
/// With `options.self_check` it also reads the expected file (`+expected=` / `expected`,
/// default `expected.hex`), compares the outputs bit-exactly (unknown bits mismatch), prints
/// `arithvec-tb: N vectors, M mismatches` and, when M > 0, fails the run: the Verilog
/// testbench calls `$fatal` (vvp then exits with status 1; a Verilator binary aborts, status
/// 134), the VHDL one reports with severity failure (GHDL exits with status 1).
/// A spec with `conventions.negative_zero = "either"` accepts two result patterns for a zero,
/// which a bit-exact comparison cannot express, so self-check is refused for it: run without
/// self-check and let `arithvec check` judge the log.
///
/// Errors: the spec has no `[dut]` table; `vectors` is 0 or above
/// [`MAX_TESTBENCH_VECTORS`]; `settle` is 0 or above `i32::MAX`; a port, module or parameter
/// name is a reserved word of the language (or, for VHDL, not a basic identifier or equal to
/// another name but for case); an integer parameter is outside the 32-bit range of VHDL
/// integers and Verilog plain integers; a string parameter holds characters other than
/// printable ASCII.
pub fn emit_testbench(spec: &Spec, options: &TestbenchOptions) -> Result<String> {
    let plan = Plan::new(spec, options)?;
    if spec.timing.is_some() {
        return Ok(match options.hdl {
            Hdl::Verilog => plan.clocked_verilog(),
            Hdl::Vhdl => plan.clocked_vhdl(),
        });
    }
    Ok(match options.hdl {
        Hdl::Verilog => plan.verilog(),
        Hdl::Vhdl => plan.vhdl(),
    })
}

/// Everything the emitters need, validated.
struct Plan<'a> {
    spec: &'a Spec,
    dut: &'a Dut,
    options: &'a TestbenchOptions,
    layout: Layout,
    name: String,
    file_name: String,
}

/// Where problems found in the spec are reported: the spec's file name is not known here, so
/// the unit name stands in for it.
fn spec_source(spec: &Spec) -> String {
    format!("spec \"{}\"", spec.name)
}

impl<'a> Plan<'a> {
    fn new(spec: &'a Spec, options: &'a TestbenchOptions) -> Result<Plan<'a>> {
        let source = spec_source(spec);
        let Some(dut) = spec.dut.as_ref() else {
            return Err(Error::problem(
                Problem::new(
                    source,
                    "a testbench needs the DUT's name: add a [dut] table with \
                     module = \"<module or entity name>\"",
                )
                .field("dut"),
            ));
        };
        let layout = Layout::for_spec(spec);
        let mut problems = Vec::new();
        if options.vectors == 0 {
            problems.push(Problem::new(
                "--vectors",
                "a testbench needs at least one vector",
            ));
        } else if options.vectors > MAX_TESTBENCH_VECTORS {
            problems.push(Problem::new(
                "--vectors",
                format!(
                    "{} vectors is more than a testbench can index ({MAX_TESTBENCH_VECTORS})",
                    options.vectors
                ),
            ));
        }
        let last = options
            .first_index
            .checked_add(options.vectors.saturating_sub(1));
        // VHDL integers are 32-bit (GHDL), so the logged index must stay below 2^31 there;
        // the Verilog testbench keeps the first index in 64 bits.
        if options.hdl == Hdl::Vhdl && last.is_none_or(|l| l > i32::MAX as u64) {
            problems.push(Problem::new(
                "--vectors",
                format!(
                    "vectors {}..{} of the set go past the largest index a VHDL testbench can \
                     log ({}); use the Verilog testbench or smaller shards",
                    options.first_index,
                    last.map_or("2^64".to_string(), |l| l.to_string()),
                    i32::MAX
                ),
            ));
        } else if last.is_none() {
            problems.push(Problem::new(
                "--vectors",
                "the shard's first index plus its vector count overflows",
            ));
        }
        if options.settle == 0 || options.settle > i32::MAX as u32 {
            problems.push(Problem::new(
                "--settle",
                format!(
                    "the settle time must be 1..={} time units, got {}",
                    i32::MAX,
                    options.settle
                ),
            ));
        }
        if options.self_check && spec.conventions.negative_zero == NegativeZero::Either {
            problems.push(
                Problem::new(
                    source.clone(),
                    "self-check compares result bits exactly, but negative_zero = \"either\" \
                     accepts two zero patterns; emit the testbench without self-check and \
                     judge its log with `arithvec check`",
                )
                .field("conventions.negative_zero"),
            );
        }
        let free_quotient = spec.options.and_then(|o| o.div_by_zero) == Some(DivByZero::DontCare)
            && (spec.has(Signal::Quotient) || spec.has(Signal::Remainder));
        if options.self_check && free_quotient {
            problems.push(
                Problem::new(
                    source.clone(),
                    "self-check compares every expected bit, but div_by_zero = \"dont_care\" \
                     leaves the quotient and remainder of a division by zero unspecified; emit \
                     the testbench without self-check and judge its log with `arithvec check`",
                )
                .field("conventions.div_by_zero"),
            );
        }
        if options.self_check
            && spec
                .select
                .as_ref()
                .is_some_and(|s| s.undefined_outputs == crate::spec::UndefinedOutputs::Unchecked)
        {
            problems.push(
                Problem::new(
                    source.clone(),
                    "self-check compares every output, but a select unit's outputs that the selected operation does not define are not compared; emit the testbench without self-check and judge its log with `arithvec check`, or set [conventions] undefined_outputs = \"zero\"",
                )
                .field("conventions.undefined_outputs"),
            );
        }
        match (&spec.timing, options.stall_every) {
            (Some(_), _) if options.self_check => problems.push(
                Problem::new(
                    "--self-check",
                    "a clocked unit's testbench does not self-check; judge its log with \
                     `arithvec check`, which also checks the results' count and order",
                )
                .field("self_check"),
            ),
            (None, Some(_)) => problems.push(
                Problem::new(
                    "--stall-every",
                    "stalls need a clocked unit with valid_in ([timing] valid_in = \"<port>\")",
                )
                .field("stall_every"),
            ),
            (Some(t), Some(_)) if t.valid_in.is_none() => problems.push(
                Problem::new(
                    "--stall-every",
                    "stalls drop valid_in, but [timing] names no valid_in port",
                )
                .field("stall_every"),
            ),
            (_, Some(0)) => problems
                .push(Problem::new("--stall-every", "must be at least 1").field("stall_every")),
            _ => {}
        }
        if layout.stimulus.fields.is_empty() || layout.expected.fields.is_empty() {
            problems.push(
                Problem::new(
                    source.clone(),
                    "a testbench needs at least one input and one output port",
                )
                .field("ports"),
            );
        }
        let name = testbench_name(spec);
        check_names(spec, dut, &name, options.hdl, &source, &mut problems);
        if !problems.is_empty() {
            return Err(Error::input(problems));
        }
        Ok(Plan {
            spec,
            dut,
            options,
            layout,
            file_name: testbench_file_name(spec, options.hdl),
            name,
        })
    }

    /// The DUT's source file as named in the header's commands.
    fn dut_file(&self) -> String {
        format!("{}.{}", self.dut.module, self.options.hdl.extension())
    }

    /// The log's header row.
    fn csv_header(&self) -> String {
        let mut header = String::from("index");
        for f in self.all_fields() {
            header.push(',');
            header.push_str(&f.name);
        }
        header
    }

    /// Inputs then outputs, in log-column order.
    fn all_fields(&self) -> impl Iterator<Item = &Field> {
        self.layout
            .stimulus
            .fields
            .iter()
            .chain(self.layout.expected.fields.iter())
    }

    /// The comment lines shared by both languages: what the file is and what it does.
    fn description(&self) -> Vec<String> {
        let spec = self.spec;
        let mut lines = vec![
            format!(
                "Testbench generated by arithvec for unit \"{}\" (operation {}, encoding {}, \
                 {} bits).",
                spec.name,
                spec.operation.name(),
                spec.encoding.name(),
                spec.width
            ),
            "Regenerate it rather than editing it.".to_string(),
            String::new(),
            format!(
                "It applies each of the {} vectors of the stimulus file to {} {}, waits {} {}",
                self.options.vectors,
                match self.options.hdl {
                    Hdl::Verilog => "module",
                    Hdl::Vhdl => "entity",
                },
                self.dut.module,
                self.options.settle,
                "ns",
            ),
            "and writes one CSV row per vector to the results file, for `arithvec check`."
                .to_string(),
        ];
        if self.options.self_check {
            lines.push(
                "Self-check: it also compares the outputs with the expected file, prints"
                    .to_string(),
            );
            lines.push(
                "\"arithvec-tb: N vectors, M mismatches\" and fails the run when M > 0."
                    .to_string(),
            );
        }
        lines.push(String::new());
        lines.push(format!(
            "Stimulus word, {} bits ({} hex digits a line): {}.",
            self.layout.stimulus.width,
            self.layout.stimulus.hex_digits(),
            describe_fields(&self.layout.stimulus)
        ));
        lines.push(format!(
            "Expected word, {} bits ({} hex digits a line): {}.",
            self.layout.expected.width,
            self.layout.expected.hex_digits(),
            describe_fields(&self.layout.expected)
        ));
        lines.push(String::new());
        lines
    }

    /// The DUT's port connections, in log-column order: (DUT port, testbench signal). A
    /// bundled port (roles mapped to bit ranges of it, see `spec::ports`) is connected once,
    /// to its own bundle signal, where its first role would be.
    fn connections(&self) -> Vec<(String, String)> {
        let mut list: Vec<(String, String)> = Vec::new();
        for f in self.all_fields() {
            match self.spec.ports.range(f.signal) {
                Some(r) => {
                    if !list.iter().any(|(p, _)| *p == r.port) {
                        list.push((r.port.clone(), bundle_signal(&r.port)));
                    }
                }
                None => list.push((f.name.clone(), signal_name(f))),
            }
        }
        list
    }

    /// The VHDL port map's connections: `connections` with each port's direction and, for a
    /// vector port, its VHDL type from `[dut] vhdl_types`.
    fn vhdl_connections(&self) -> Vec<VhdlConnection> {
        let inputs: Vec<String> = self
            .layout
            .stimulus
            .fields
            .iter()
            .map(|f| match self.spec.ports.range(f.signal) {
                Some(r) => r.port,
                None => f.name.clone(),
            })
            .collect();
        let bundles: Vec<String> = self
            .spec
            .ports
            .bundles()
            .into_iter()
            .map(|b| b.port)
            .collect();
        let vectors: Vec<String> = self
            .all_fields()
            .filter(|f| is_vector(f) && self.spec.ports.range(f.signal).is_none())
            .map(|f| f.name.clone())
            .chain(bundles)
            .collect();
        self.connections()
            .into_iter()
            .map(|(port, signal)| {
                let ty = if vectors.contains(&port) {
                    self.dut.vhdl_types.of(&port)
                } else {
                    VhdlType::StdLogicVector
                };
                VhdlConnection {
                    input: inputs.contains(&port),
                    ty,
                    port,
                    signal,
                }
            })
            .collect()
    }

    /// The header's lines on the DUT's port types.
    fn vhdl_port_types_note(&self) -> Vec<String> {
        let typed: Vec<String> = self
            .vhdl_connections()
            .into_iter()
            .filter(|c| c.ty != VhdlType::StdLogicVector)
            .map(|c| format!("{} {}", c.port, c.ty.name()))
            .collect();
        let mut lines = vec![
            "DUT ports: std_logic_vector for operands and result (even at width 1), std_logic"
                .to_string(),
            "for the one-bit signals.".to_string(),
        ];
        if !typed.is_empty() {
            lines[1] =
                "for the one-bit signals, except these numeric_std ports ([dut] vhdl_types),"
                    .to_string();
            lines.push(format!("converted at the port map: {}.", typed.join(", ")));
        }
        lines
    }

    /// Verilog declarations of the bundle signals and the assignments between them and the
    /// roles' signals; an input bundle's gap bits are driven 0.
    fn verilog_bundles(&self, out: &mut String) {
        let bundles = self.spec.ports.bundles();
        if bundles.is_empty() {
            return;
        }
        out.push_str("  // Ports that bundle several roles (bit ranges in the spec's [ports]).\n");
        for b in bundles {
            let wire = bundle_signal(&b.port);
            let _ = writeln!(
                out,
                "  wire {}{wire};  // port {}",
                verilog_range(b.width),
                b.port
            );
            let select = |msb: u32, lsb: u32| {
                if b.width == 1 {
                    String::new()
                } else if msb == lsb {
                    format!("[{lsb}]")
                } else {
                    format!("[{msb}:{lsb}]")
                }
            };
            let mut next = 0;
            for &(signal, msb, lsb) in &b.members {
                let role = format!("s_{}", signal.key());
                if b.input {
                    if lsb > next {
                        let _ = writeln!(
                            out,
                            "  assign {wire}{} = {}'b0;",
                            select(lsb - 1, next),
                            lsb - next
                        );
                    }
                    let _ = writeln!(out, "  assign {wire}{} = {role};", select(msb, lsb));
                } else {
                    let _ = writeln!(out, "  assign {role} = {wire}{};", select(msb, lsb));
                }
                next = msb + 1;
            }
        }
    }

    /// VHDL concurrent assignments between the bundle signals and the roles' signals.
    fn vhdl_bundle_assignments(&self, out: &mut String) {
        for b in self.spec.ports.bundles() {
            let sig = bundle_signal(&b.port);
            let _ = writeln!(out, "  -- Port {} bundles several roles.", b.port);
            let mut next = 0;
            for &(signal, msb, lsb) in &b.members {
                let role = format!("s_{}", signal.key());
                let slice = if is_vector_signal(signal) {
                    format!("({msb} downto {lsb})")
                } else {
                    format!("({lsb})")
                };
                if b.input {
                    if lsb > next {
                        let _ = writeln!(
                            out,
                            "  {sig}({} downto {next}) <= (others => '0');",
                            lsb - 1
                        );
                    }
                    let _ = writeln!(out, "  {sig}{slice} <= {role};");
                } else {
                    let _ = writeln!(out, "  {role} <= {sig}{slice};");
                }
                next = msb + 1;
            }
        }
        out.push('\n');
    }

    fn verilog(&self) -> String {
        let mut out = String::new();
        let check = self.options.self_check;
        let mut header = self.description();
        let plusargs = if check {
            "+stimulus=stimulus.hex +results=results.csv +expected=expected.hex"
        } else {
            "+stimulus=stimulus.hex +results=results.csv"
        };
        let dut_file = self.dut_file();
        header.extend([
            // No comment line may start with the word "verilator": Verilator reads such
            // comments as directives and rejects unknown ones. Hence the "$ " prompts.
            "With Icarus Verilog 11:".to_string(),
            format!(
                "  $ iverilog -g2005 -s {} -o sim {} {dut_file}",
                self.name, self.file_name
            ),
            format!("  $ vvp sim {plusargs}"),
            "With Verilator 5:".to_string(),
            format!(
                "  $ verilator --binary --timing -Wno-fatal --top-module {} {} {dut_file} -o sim",
                self.name, self.file_name
            ),
            format!("  $ obj_dir/sim {plusargs}"),
            format!(
                "Replace {dut_file} with the file(s) defining module {}. Every plusarg is optional",
                self.dut.module
            ),
            format!(
                "(the values shown are the defaults); paths may be up to {PLUSARG_BYTES} characters."
            ),
            format!(
                "-s / --top-module name {} as the only top, so test modules in the DUT's files",
                self.name
            ),
            "do not run as extra tops. SystemVerilog DUT sources (.sv, or any file using".to_string(),
            "logic, always_comb, always_ff, interfaces or packages) need -g2012 in place of".to_string(),
            "-g2005 with Icarus; Verilator reads them as they are.".to_string(),
        ]);
        if check {
            header.push(
                "On a mismatch the run ends with $fatal: vvp exits with status 1, the Verilator"
                    .to_string(),
            );
            header.push("binary aborts (status 134).".to_string());
        }
        for line in header {
            if line.is_empty() {
                out.push_str("//\n");
            } else {
                let _ = writeln!(out, "// {line}");
            }
        }
        out.push('\n');
        // The settle delay is in nanoseconds, as in the VHDL testbench. A DUT file without a
        // `timescale keeps the simulator's default; both simulators accept the mix.
        out.push_str("`timescale 1ns / 1ps\n\n");

        let stim = &self.layout.stimulus;
        let exp = &self.layout.expected;
        let vectors = self.options.vectors;
        // Verilator's DECLFILENAME lint (on with -Wall) wants the file named after the module;
        // the commands above do name it so, but a user may save it under another name.
        out.push_str("/* verilator lint_off DECLFILENAME */\n");
        let _ = writeln!(out, "module {};", self.name);
        out.push_str("  // Vector count and packed word widths, from arithvec's layout.\n");
        let _ = writeln!(out, "  localparam integer VECTORS = {vectors};");
        if self.options.first_index > 0 {
            let _ = writeln!(
                out,
                "  // Global index of the first vector: this set is a shard, and the log names\n\
                 \x20 // every vector by its index in the whole set.\n\
                 \x20 localparam [63:0] FIRST_INDEX = 64'd{};",
                self.options.first_index
            );
        }
        let _ = writeln!(out, "  localparam integer STIMULUS_BITS = {};", stim.width);
        if check {
            let _ = writeln!(out, "  localparam integer EXPECTED_BITS = {};", exp.width);
        }
        out.push('\n');
        out.push_str(
            "  // One bit wider than the packed word: the top bit marks a word $readmemh has not\n\
             \x20 // written, which works on two-state Verilator as well as on four-state Icarus.\n",
        );
        out.push_str("  reg [STIMULUS_BITS:0] v_stimulus [0:VECTORS-1];\n");
        out.push_str("  reg [STIMULUS_BITS:0] v_word;\n");
        if check {
            out.push_str("  reg [EXPECTED_BITS:0] v_expected [0:VECTORS-1];\n");
            out.push_str("  reg [EXPECTED_BITS:0] v_expected_word;\n");
        }
        let _ = writeln!(
            out,
            "  // File names from plusargs, as strings of up to {PLUSARG_BYTES} characters."
        );
        let path_regs: &[&str] = if check {
            &["stimulus", "results", "expected"]
        } else {
            &["stimulus", "results"]
        };
        for p in path_regs {
            let _ = writeln!(out, "  reg [8*{PLUSARG_BYTES}-1:0] v_{p}_path;");
        }
        out.push_str("  integer v_fd;\n  integer v_index;\n");
        if check {
            out.push_str("  integer v_mismatches;\n");
        }
        out.push('\n');
        out.push_str("  // DUT inputs, driven from the stimulus word.\n");
        for f in &stim.fields {
            let _ = writeln!(
                out,
                "  reg {}{};  // port {}",
                verilog_range(f.width()),
                signal_name(f),
                f.name
            );
        }
        out.push_str("  // DUT outputs.\n");
        for f in &exp.fields {
            let _ = writeln!(
                out,
                "  wire {}{};  // port {}",
                verilog_range(f.width()),
                signal_name(f),
                f.name
            );
        }
        self.verilog_bundles(&mut out);
        if check {
            out.push_str("  // The outputs packed like a word of the expected file.\n");
            let packed: Vec<String> = exp.fields.iter().map(signal_name).collect();
            let _ = writeln!(
                out,
                "  wire [EXPECTED_BITS-1:0] v_got = {{{}}};",
                packed.join(", ")
            );
        }
        out.push('\n');
        let _ = write!(out, "  {} ", self.dut.module);
        if !self.dut.parameters.is_empty() {
            out.push_str("#(\n");
            let params: Vec<String> = self
                .dut
                .parameters
                .iter()
                .map(|(k, v)| format!("    .{k}({})", verilog_value(v)))
                .collect();
            out.push_str(&params.join(",\n"));
            out.push_str("\n  ) ");
        }
        out.push_str("v_dut (\n");
        let ports: Vec<String> = self
            .connections()
            .into_iter()
            .map(|(port, signal)| format!("    .{port}({signal})"))
            .collect();
        out.push_str(&ports.join(",\n"));
        out.push_str("\n  );\n\n");

        out.push_str("  initial begin\n");
        for (p, default) in [
            ("stimulus", "stimulus.hex"),
            ("results", "results.csv"),
            ("expected", "expected.hex"),
        ] {
            if path_regs.contains(&p) {
                let _ = writeln!(
                    out,
                    "    if (!$value$plusargs(\"{p}=%s\", v_{p}_path)) v_{p}_path = \"{default}\";"
                );
            }
        }
        Self::verilog_load(&mut out, "stimulus", "STIMULUS_BITS", "v_word");
        if check {
            Self::verilog_load(&mut out, "expected", "EXPECTED_BITS", "v_expected_word");
            out.push_str("    v_mismatches = 0;\n");
        }
        out.push_str(
            "    v_fd = $fopen(v_results_path, \"w\");\n\
             \x20   if (v_fd == 0) $fatal(1, \"arithvec-tb: cannot write %0s\", v_results_path);\n",
        );
        let _ = writeln!(out, "    $fdisplay(v_fd, \"{}\");", self.csv_header());
        out.push_str("    for (v_index = 0; v_index < VECTORS; v_index = v_index + 1) begin\n");
        out.push_str("      v_word = v_stimulus[v_index];\n");
        for f in &stim.fields {
            let _ = writeln!(
                out,
                "      {} = v_word{};",
                signal_name(f),
                verilog_select(f)
            );
        }
        let _ = writeln!(out, "      #{};", self.options.settle);
        let formats: Vec<&str> = self.all_fields().map(|_| "%h").collect();
        let args: Vec<String> = self.all_fields().map(signal_name).collect();
        let logged = self.verilog_logged_index();
        let _ = writeln!(
            out,
            "      $fdisplay(v_fd, \"%0d,{}\", {logged}, {});",
            formats.join(","),
            args.join(", ")
        );
        if check {
            let _ = writeln!(
                out,
                "      v_expected_word = v_expected[v_index];\n\
                 \x20     // !== so that x and z outputs count as mismatches.\n\
                 \x20     if (v_got !== v_expected_word[EXPECTED_BITS-1:0]) begin\n\
                 \x20       v_mismatches = v_mismatches + 1;\n\
                 \x20       if (v_mismatches <= {MISMATCH_REPORT_LIMIT}) begin\n\
                 \x20         // One line per output port that differs."
            );
            for f in &exp.fields {
                let select = verilog_select(f);
                let _ = writeln!(
                    out,
                    "          if ({sig} !== v_expected_word{select})\n\
                     \x20           $display(\"arithvec-tb: vector %0d: {port} = %h, expected %h\",\n\
                     \x20                    {logged}, {sig}, v_expected_word{select});",
                    sig = signal_name(f),
                    port = f.name,
                );
            }
            out.push_str("        end\n      end\n");
        }
        out.push_str("    end\n    $fclose(v_fd);\n");
        if check {
            out.push_str(
                "    // One summary line, singular for a count of one (\"1 vector, 1 mismatch\").\n\
                 \x20   if (VECTORS == 1) $write(\"arithvec-tb: 1 vector, \");\n\
                 \x20   else $write(\"arithvec-tb: %0d vectors, \", VECTORS);\n\
                 \x20   if (v_mismatches == 1) $display(\"1 mismatch\");\n\
                 \x20   else $display(\"%0d mismatches\", v_mismatches);\n\
                 \x20   // $fatal is IEEE 1800 (20.10); Icarus 11 and Verilator 5 accept it in\n\
                 \x20   // Verilog-2005 sources, and it is the only portable way to a failing exit status.\n\
                 \x20   if (v_mismatches > 0)\n\
                 \x20     $fatal(1, \"arithvec-tb: mismatched vectors: %0d of %0d\", v_mismatches, VECTORS);\n",
            );
        } else {
            out.push_str(
                "    $display(\"arithvec-tb: %0d vectors applied, log in %0s\", VECTORS, v_results_path);\n",
            );
        }
        out.push_str("    $finish;\n  end\nendmodule\n");
        out.push_str("/* verilator lint_on DECLFILENAME */\n");
        out
    }

    /// The Verilog expression of the logged (global) index of vector `v_index`.
    fn verilog_logged_index(&self) -> &'static str {
        if self.options.first_index > 0 {
            "FIRST_INDEX + v_index"
        } else {
            "v_index"
        }
    }

    /// The VHDL expression of the logged (global) index of vector `v_index`.
    fn vhdl_logged_index(&self) -> &'static str {
        if self.options.first_index > 0 {
            "c_first_index + v_index"
        } else {
            "v_index"
        }
    }

    /// Emits the load of one hex file into its array, with the check that every word was read.
    fn verilog_load(out: &mut String, what: &str, bits: &str, word: &str) {
        // A file that cannot be opened is named with the plusarg that gives it, before
        // $readmemh (which on Icarus only warns about it).
        let _ = writeln!(
            out,
            "    v_fd = $fopen(v_{what}_path, \"r\");\n\
             \x20   if (v_fd == 0)\n\
             \x20     $fatal(1, \"arithvec-tb: cannot read the {what} file %0s; give the vector set's \
             {what}.hex with +{what}=DIR/{what}.hex\", v_{what}_path);\n\
             \x20   $fclose(v_fd);"
        );
        let _ = writeln!(
            out,
            "    for (v_index = 0; v_index < VECTORS; v_index = v_index + 1)\n\
             \x20     v_{what}[v_index] = {{1'b1, {{{bits}{{1'b0}}}}}};\n\
             \x20   $readmemh(v_{what}_path, v_{what});\n\
             \x20   for (v_index = 0; v_index < VECTORS; v_index = v_index + 1) begin\n\
             \x20     {word} = v_{what}[v_index];\n\
             \x20     if ({word}[{bits}] !== 1'b0)\n\
             \x20       $fatal(1, \"arithvec-tb: %0s holds %0d words; expected %0d\",\n\
             \x20              v_{what}_path, v_index, VECTORS);\n\
             \x20   end"
        );
    }

    fn vhdl(&self) -> String {
        let mut out = String::new();
        let check = self.options.self_check;
        let mut header = self.description();
        let generics = if check {
            "-gstimulus=stimulus.hex -gresults=results.csv -gexpected=expected.hex"
        } else {
            "-gstimulus=stimulus.hex -gresults=results.csv"
        };
        let dut_file = self.dut_file();
        header.extend([
            "With GHDL 2 (VHDL-2008):".to_string(),
            format!("  $ ghdl -a --std=08 {dut_file} {}", self.file_name),
            format!("  $ ghdl -e --std=08 {}", self.name),
            format!("  $ ghdl -r --std=08 {} {generics}", self.name),
            format!(
                "Replace {dut_file} with the file(s) defining entity {}. Every generic is optional",
                self.dut.module
            ),
            "(the values shown are the defaults).".to_string(),
        ]);
        header.extend(self.vhdl_port_types_note());
        if check {
            header.push(
                "On a mismatch the run ends with a severity failure report (GHDL exit status 1)."
                    .to_string(),
            );
        }
        for line in header {
            if line.is_empty() {
                out.push_str("--\n");
            } else {
                let _ = writeln!(out, "-- {line}");
            }
        }
        out.push('\n');

        let stim = &self.layout.stimulus;
        let exp = &self.layout.expected;
        let name = &self.name;
        out.push_str("library ieee;\nuse ieee.std_logic_1164.all;\n");
        if self
            .vhdl_connections()
            .iter()
            .any(|c| c.ty != VhdlType::StdLogicVector)
        {
            // For the DUT's unsigned / signed ports ([dut] vhdl_types).
            out.push_str("use ieee.numeric_std.all;\n");
        }
        out.push_str("use std.textio.all;\n\n");
        let _ = writeln!(out, "entity {name} is\n  generic (");
        let mut generic_lines = vec![
            "    stimulus : string := \"stimulus.hex\"".to_string(),
            "    results : string := \"results.csv\"".to_string(),
        ];
        if check {
            generic_lines.push("    expected : string := \"expected.hex\"".to_string());
        }
        out.push_str(&generic_lines.join(";\n"));
        let _ = writeln!(out, "\n  );\nend entity {name};\n");

        let _ = writeln!(out, "architecture arithvec of {name} is");
        let _ = writeln!(
            out,
            "  -- Vector count and packed word widths, from arithvec's layout.\n\
             \x20 constant c_vectors : natural := {};\n\
             \x20 constant c_stimulus_bits : natural := {};\n\
             \x20 constant c_stimulus_digits : natural := {};",
            self.options.vectors,
            stim.width,
            stim.hex_digits()
        );
        if self.options.first_index > 0 {
            let _ = writeln!(
                out,
                "  -- Global index of the first vector: this set is a shard, and the log names\n\
                 \x20 -- every vector by its index in the whole set.\n\
                 \x20 constant c_first_index : natural := {};",
                self.options.first_index
            );
        }
        if check {
            let _ = writeln!(
                out,
                "  constant c_expected_bits : natural := {};\n\
                 \x20 constant c_expected_digits : natural := {};",
                exp.width,
                exp.hex_digits()
            );
        }
        out.push('\n');
        for (what, fields) in [("inputs", &stim.fields), ("outputs", &exp.fields)] {
            let _ = writeln!(out, "  -- DUT {what}.");
            // Inputs start at 0 rather than U so the DUT sees no metavalues before the
            // first vector is applied.
            let initial = what == "inputs";
            for f in fields {
                let init = match (initial, is_vector(f)) {
                    (false, _) => "",
                    (true, true) => " := (others => '0')",
                    (true, false) => " := '0'",
                };
                let _ = writeln!(
                    out,
                    "  signal {} : {}{init};  -- port {}",
                    signal_name(f),
                    vhdl_type(f),
                    f.name
                );
            }
        }
        for b in self.spec.ports.bundles() {
            let _ = writeln!(
                out,
                "  signal {} : std_logic_vector({} downto 0);  -- bundled port {}",
                bundle_signal(&b.port),
                b.width - 1,
                b.port
            );
        }
        out.push_str(VHDL_HELPERS);
        if check {
            out.push_str(VHDL_COUNT_HELPER);
        }
        out.push_str("begin\n");
        let _ = writeln!(out, "  v_dut : entity work.{}", self.dut.module);
        if !self.dut.parameters.is_empty() {
            let params: Vec<String> = self
                .dut
                .parameters
                .iter()
                .map(|(k, v)| format!("      {k} => {}", vhdl_value(v)))
                .collect();
            let _ = writeln!(out, "    generic map (\n{}\n    )", params.join(",\n"));
        }
        let ports: Vec<String> = self
            .vhdl_connections()
            .into_iter()
            .map(|c| c.port_map_line())
            .collect();
        let _ = writeln!(out, "    port map (\n{}\n    );\n", ports.join(",\n"));
        self.vhdl_bundle_assignments(&mut out);

        out.push_str("  p_apply : process\n");
        out.push_str(
            "    file v_stimulus_file : text;\n\
             \x20   file v_results_file : text;\n\
             \x20   variable v_status : file_open_status;\n\
             \x20   variable v_line : line;\n\
             \x20   variable v_found : boolean;\n\
             \x20   variable v_stimulus_line : natural := 0;\n\
             \x20   variable v_word : std_logic_vector(4 * c_stimulus_digits - 1 downto 0);\n",
        );
        if check {
            out.push_str(
                "    file v_expected_file : text;\n\
                 \x20   variable v_expected_line : natural := 0;\n\
                 \x20   variable v_expected_word : std_logic_vector(4 * c_expected_digits - 1 downto 0);\n\
                 \x20   variable v_got : std_logic_vector(c_expected_bits - 1 downto 0);\n\
                 \x20   variable v_mismatches : natural := 0;\n",
            );
        }
        out.push_str("  begin\n");
        let mut files = vec![("stimulus", "read_mode")];
        if check {
            files.push(("expected", "read_mode"));
        }
        files.push(("results", "write_mode"));
        for (f, mode) in files {
            let how = if mode == "read_mode" {
                format!(
                    " & \" (the {f} file); give the vector set's {f}.hex with -g{f}=DIR/{f}.hex\""
                )
            } else {
                String::new()
            };
            let _ = writeln!(
                out,
                "    file_open(v_status, v_{f}_file, {f}, {mode});\n\
                 \x20   assert v_status = open_ok\n\
                 \x20     report \"arithvec-tb: cannot open \" & {f}{how} severity failure;"
            );
        }
        let _ = writeln!(
            out,
            "    write(v_line, string'(\"{}\"));\n    writeline(v_results_file, v_line);",
            self.csv_header()
        );
        out.push_str("    for v_index in 0 to c_vectors - 1 loop\n");
        self.vhdl_read(&mut out, "stimulus", "v_word", stim);
        if check {
            self.vhdl_read(&mut out, "expected", "v_expected_word", exp);
        }
        for f in &stim.fields {
            let _ = writeln!(out, "      {} <= v_word{};", signal_name(f), vhdl_select(f));
        }
        let _ = writeln!(out, "      wait for {} ns;", self.options.settle);
        let _ = writeln!(
            out,
            "      write(v_line, integer'image({}));",
            self.vhdl_logged_index()
        );
        for f in self.all_fields() {
            let _ = writeln!(
                out,
                "      write(v_line, string'(\",\"));\n      hwrite(v_line, f_digits({}));",
                signal_name(f)
            );
        }
        out.push_str("      writeline(v_results_file, v_line);\n");
        if check {
            let logged = self.vhdl_logged_index();
            let packed: Vec<String> = exp.fields.iter().map(signal_name).collect();
            let lone = exp.fields.len() == 1 && !is_vector(&exp.fields[0]);
            if lone {
                // A lone one-bit output is a std_logic, not a vector: place it in bit 0.
                let _ = writeln!(out, "      v_got(0) := {};", packed[0]);
            } else {
                let _ = writeln!(out, "      v_got := {};", packed.join(" & "));
            }
            let _ = writeln!(
                out,
                "      -- to_x01 reads L and H as 0 and 1, as to_hstring does for the log; U, X, Z, W\n\
                 \x20     -- and - become X and so mismatch.\n\
                 \x20     if to_x01(v_got) /= v_expected_word(c_expected_bits - 1 downto 0) then\n\
                 \x20       v_mismatches := v_mismatches + 1;\n\
                 \x20       if v_mismatches <= {MISMATCH_REPORT_LIMIT} then\n\
                 \x20         -- One report per output port that differs."
            );
            for f in &exp.fields {
                let select = vhdl_select(f);
                let sig = signal_name(f);
                let _ = writeln!(
                    out,
                    "          if to_x01({sig}) /= v_expected_word{select} then\n\
                     \x20           report \"arithvec-tb: vector \" & integer'image({logged}) & \": {port} = \"\n\
                     \x20             & to_hstring(f_digits({sig})) & \", expected \"\n\
                     \x20             & to_hstring(f_digits(v_expected_word{select})) severity warning;\n\
                     \x20         end if;",
                    port = f.name,
                );
            }
            out.push_str("        end if;\n      end if;\n");
        }
        out.push_str("    end loop;\n");
        let mut trailing = vec![("stimulus", "v_word")];
        if check {
            trailing.push(("expected", "v_expected_word"));
        }
        for (f, word) in trailing {
            let _ = writeln!(
                out,
                "    p_next_word(v_{f}_file, {f}, v_{f}_line, {word}, v_found);\n\
                 \x20   assert not v_found\n\
                 \x20     report \"arithvec-tb: \" & {f} & \" holds more than \" & integer'image(c_vectors)\n\
                 \x20       & \" words\" severity failure;\n\
                 \x20   file_close(v_{f}_file);"
            );
        }
        out.push_str("    file_close(v_results_file);\n");
        if check {
            out.push_str(
                "    report \"arithvec-tb: \" & f_count(c_vectors, \"vector\", \"vectors\") & \", \"\n\
                 \x20     & f_count(v_mismatches, \"mismatch\", \"mismatches\");\n\
                 \x20   assert v_mismatches = 0\n\
                 \x20     report \"arithvec-tb: mismatched vectors: \" & integer'image(v_mismatches)\n\
                 \x20       & \" of \" & integer'image(c_vectors) severity failure;\n",
            );
        } else {
            out.push_str(
                "    report \"arithvec-tb: \" & integer'image(c_vectors) & \" vectors applied, log in \"\n\
                 \x20     & results;\n",
            );
        }
        out.push_str("    wait;\n  end process p_apply;\nend architecture arithvec;\n");
        out
    }

    /// Emits the read of the next word of one hex file, with its checks.
    fn vhdl_read(&self, out: &mut String, what: &str, word: &str, layout: &WordLayout) {
        let _ = writeln!(
            out,
            "      p_next_word(v_{what}_file, {what}, v_{what}_line, {word}, v_found);\n\
             \x20     assert v_found\n\
             \x20       report \"arithvec-tb: \" & {what} & \" holds \" & integer'image(v_index)\n\
             \x20         & \" words; expected \" & integer'image(c_vectors) severity failure;"
        );
        let pad = 4 * layout.hex_digits() - layout.width;
        if pad > 0 {
            let zeros = "0".repeat(pad as usize);
            let _ = writeln!(
                out,
                "      assert {word}({word}'left downto {}) = \"{zeros}\"\n\
                 \x20       report \"arithvec-tb: \" & {what} & \" line \" & integer'image(v_{what}_line)\n\
                 \x20         & \": the word is wider than {} bits\" severity failure;",
                layout.width, layout.width
            );
        }
    }
}

/// The subprograms every VHDL testbench declares: digit padding for `hwrite` and the reader
/// that skips comment lines.
/// The self-check's count formatter: "1 vector", "2 vectors" (singular for one).
const VHDL_COUNT_HELPER: &str = "
  -- A count with its noun, singular for one: \"1 mismatch\", \"2 mismatches\".
  function f_count(n : natural; one, many : string) return string is
  begin
    if n = 1 then
      return integer'image(n) & \" \" & one;
    end if;
    return integer'image(n) & \" \" & many;
  end function;
";

const VHDL_HELPERS: &str = r#"
  -- Widens a value to whole hex digits so that hwrite prints exactly ceil(width / 4)
  -- digits, padding like to_hstring (IEEE 1076-2008, 16.7): with 'Z' when the leftmost
  -- bit is 'Z' (so an all-Z field prints Z digits), else with '0'.
  function f_digits(value : std_logic_vector) return std_logic_vector is
    constant c_digits : natural := (value'length + 3) / 4;
    variable v_normal : std_logic_vector(value'length - 1 downto 0) := value;
    variable v_result : std_logic_vector(4 * c_digits - 1 downto 0);
  begin
    if v_normal(v_normal'left) = 'Z' then
      v_result := (others => 'Z');
    else
      v_result := (others => '0');
    end if;
    v_result(value'length - 1 downto 0) := v_normal;
    return v_result;
  end function f_digits;

  function f_digits(value : std_logic) return std_logic_vector is
    variable v_vector : std_logic_vector(0 downto 0);
  begin
    v_vector(0) := value;
    return f_digits(v_vector);
  end function f_digits;

  -- Reads the next word of a hex file into word (whose width is 4 bits per digit), skipping
  -- blank lines and // comment lines; found is false at the end of the file. A line that is
  -- not exactly one word of hex digits stops the run, naming the file (name) and the line.
  procedure p_next_word(file f : text; name : string; line_number : inout natural;
                        word : out std_logic_vector; found : out boolean) is
    variable v_line : line;
    variable v_char : character;
    variable v_good : boolean;
  begin
    found := false;
    while not endfile(f) loop
      readline(f, v_line);
      line_number := line_number + 1;
      while v_line'length > 0 and (v_line(v_line'left) = ' ' or v_line(v_line'left) = HT
                                   or v_line(v_line'left) = CR) loop
        read(v_line, v_char);
      end loop;
      if v_line'length = 0 then
        next;
      end if;
      if v_line'length >= 2 and v_line(v_line'left) = '/' then
        if v_line(v_line'left + 1) = '/' then
          next;
        end if;
      end if;
      hread(v_line, word, v_good);
      assert v_good
        report "arithvec-tb: " & name & ":" & integer'image(line_number) & ": expected "
          & integer'image(word'length / 4) & " hex digits" severity failure;
      while v_line'length > 0 and (v_line(v_line'left) = ' ' or v_line(v_line'left) = HT
                                   or v_line(v_line'left) = CR) loop
        read(v_line, v_char);
      end loop;
      assert v_line'length = 0
        report "arithvec-tb: " & name & ":" & integer'image(line_number)
          & ": unexpected text after the word" severity failure;
      found := true;
      return;
    end loop;
  end procedure p_next_word;

"#;

/// One port of the VHDL port map.
struct VhdlConnection {
    port: String,
    signal: String,
    input: bool,
    ty: VhdlType,
}

impl VhdlConnection {
    /// `port => signal`, converted when the DUT's port is unsigned or signed: the actual is
    /// converted for an input, the formal for an output (the testbench's signals stay
    /// std_logic_vector).
    fn port_map_line(&self) -> String {
        let (port, signal) = (&self.port, &self.signal);
        match (self.ty, self.input) {
            (VhdlType::StdLogicVector, _) => format!("      {port} => {signal}"),
            (ty, true) => format!("      {port} => {}({signal})", ty.name()),
            (_, false) => format!("      std_logic_vector({port}) => {signal}"),
        }
    }
}

/// The testbench's own name for the signal carried by `field`.
fn signal_name(field: &Field) -> String {
    format!("s_{}", field.signal.key())
}

fn describe_fields(layout: &WordLayout) -> String {
    layout
        .fields
        .iter()
        .map(|f| {
            if f.width() == 1 {
                format!("{} [{}]", f.name, f.lsb)
            } else {
                format!("{} [{}:{}]", f.name, f.msb, f.lsb)
            }
        })
        .collect::<Vec<_>>()
        .join(", ")
}

fn verilog_range(width: u32) -> String {
    if width == 1 {
        String::new()
    } else {
        format!("[{}:0] ", width - 1)
    }
}

fn verilog_select(field: &Field) -> String {
    if field.width() == 1 {
        format!("[{}]", field.lsb)
    } else {
        format!("[{}:{}]", field.msb, field.lsb)
    }
}

fn vhdl_select(field: &Field) -> String {
    if !is_vector(field) {
        format!("({})", field.lsb)
    } else {
        format!("({} downto {})", field.msb, field.lsb)
    }
}

fn vhdl_type(field: &Field) -> String {
    if is_vector(field) {
        format!("std_logic_vector({} downto 0)", field.width() - 1)
    } else {
        "std_logic".to_string()
    }
}

fn verilog_value(value: &ParamValue) -> String {
    match value {
        ParamValue::Int(n) => n.to_string(),
        ParamValue::Str(s) => {
            let mut out = String::from("\"");
            for c in s.chars() {
                match c {
                    '"' => out.push_str("\\\""),
                    '\\' => out.push_str("\\\\"),
                    c => out.push(c),
                }
            }
            out.push('"');
            out
        }
    }
}

fn vhdl_value(value: &ParamValue) -> String {
    match value {
        ParamValue::Int(n) => n.to_string(),
        ParamValue::Str(s) => format!("\"{}\"", s.replace('"', "\"\"")),
    }
}

/// Operands, a shift's amount and the result are vectors at every width (a VHDL DUT declares
/// them as std_logic_vector even at width 1), and so is a select unit's code; the flags are
/// single bits.
fn is_vector(field: &Field) -> bool {
    is_vector_signal(field.signal)
}

fn is_vector_signal(signal: Signal) -> bool {
    matches!(
        signal,
        Signal::A
            | Signal::B
            | Signal::Amount
            | Signal::Result
            | Signal::Quotient
            | Signal::Remainder
            | Signal::Select
    )
}

/// The testbench's signal for a bundled DUT port (`b_` and the port name: the testbench's
/// other names start with `s_`, `v_`, `c_` or `p_`, so it cannot clash).
fn bundle_signal(port: &str) -> String {
    format!("b_{port}")
}

/// Checks the names that appear in the emitted text: the DUT module, its parameters and its
/// ports. The testbench's own names never collide with them (see the module comment).
fn check_names(
    spec: &Spec,
    dut: &Dut,
    tb_name: &str,
    hdl: Hdl,
    source: &str,
    problems: &mut Vec<Problem>,
) {
    let check = |name: &str, field: String, problems: &mut Vec<Problem>| {
        if let Some(why) = unusable_identifier(name, hdl) {
            problems.push(Problem::new(source, format!("\"{name}\" {why}")).field(field));
        }
    };
    check(&dut.module, "dut.module".to_string(), problems);
    for name in dut.parameters.keys() {
        check(name, format!("dut.parameters.{name}"), problems);
    }
    let mut hdl_ports: Vec<(Signal, &str)> = Vec::new();
    for (signal, _) in spec.inputs().into_iter().chain(spec.outputs()) {
        let port = spec.ports.hdl_port(signal).unwrap_or_default();
        if !hdl_ports.iter().any(|(_, p)| *p == port) {
            hdl_ports.push((signal, port));
        }
    }
    for &(signal, port) in &hdl_ports {
        check(port, format!("ports.{}", signal.key()), problems);
    }
    let fold = |s: &str| match hdl {
        Hdl::Verilog => s.to_string(),
        Hdl::Vhdl => s.to_ascii_lowercase(),
    };
    if fold(&dut.module) == fold(tb_name) {
        problems.push(
            Problem::new(
                source,
                format!(
                    "the DUT module \"{}\" has the testbench's own name; rename the unit or the module",
                    dut.module
                ),
            )
            .field("dut.module"),
        );
    }
    if hdl == Hdl::Vhdl {
        // VHDL names are case-insensitive: ports or generics that differ only in case are one.
        let mut seen: BTreeMap<String, String> = BTreeMap::new();
        for &(signal, port) in &hdl_ports {
            let key = format!("ports.{}", signal.key());
            if let Some(other) = seen.insert(fold(port), key.clone()) {
                problems.push(
                    Problem::new(
                        source,
                        format!(
                            "VHDL names ignore case, so \"{port}\" is the same port as {other}"
                        ),
                    )
                    .field(key),
                );
            }
        }
        let mut seen: BTreeMap<String, &str> = BTreeMap::new();
        for name in dut.parameters.keys() {
            if let Some(other) = seen.insert(fold(name), name) {
                problems.push(
                    Problem::new(
                        source,
                        format!("VHDL names ignore case, so generic \"{name}\" is \"{other}\""),
                    )
                    .field(format!("dut.parameters.{name}")),
                );
            }
        }
    }
    for (name, value) in &dut.parameters {
        let field = format!("dut.parameters.{name}");
        match value {
            ParamValue::Int(n) if i32::try_from(*n).is_err() => problems.push(
                Problem::new(
                    source,
                    format!(
                        "{n} is outside the 32-bit range of VHDL integers and plain Verilog \
                         integer constants"
                    ),
                )
                .field(field),
            ),
            ParamValue::Str(s) if !s.chars().all(|c| c == ' ' || c.is_ascii_graphic()) => problems
                .push(
                    Problem::new(
                        source,
                        "string parameters may hold printable ASCII characters only",
                    )
                    .field(field),
                ),
            _ => {}
        }
    }
}

/// Why `name` cannot be written as a plain identifier in `hdl`, if it cannot.
fn unusable_identifier(name: &str, hdl: Hdl) -> Option<String> {
    match hdl {
        Hdl::Verilog => {
            if is_listed(VERILOG_KEYWORDS, name) {
                Some("is a reserved word in Verilog (IEEE 1364-2005 Annex B)".to_string())
            } else if is_listed(SYSTEMVERILOG_KEYWORDS, name) {
                Some(
                    "is a reserved word in SystemVerilog (IEEE 1800-2017 Annex B), which \
                     Verilator applies to .v files by default"
                        .to_string(),
                )
            } else {
                None
            }
        }
        Hdl::Vhdl => {
            let lower = name.to_ascii_lowercase();
            if is_listed(VHDL_KEYWORDS, &lower) {
                Some("is a reserved word in VHDL (IEEE 1076-2008, 15.10)".to_string())
            } else if name.starts_with('_') || name.ends_with('_') || name.contains("__") {
                Some(
                    "is not a basic VHDL identifier (IEEE 1076-2008, 15.4.2: no leading, \
                     trailing or doubled '_')"
                        .to_string(),
                )
            } else {
                None
            }
        }
    }
}

/// True when `name` is one of the space-separated `words`.
fn is_listed(words: &str, name: &str) -> bool {
    words.split_ascii_whitespace().any(|w| w == name)
}

/// IEEE 1364-2005 Annex B, "List of keywords" (from memory), space-separated.
const VERILOG_KEYWORDS: &str =
    "always and assign automatic begin buf bufif0 bufif1 case casex casez cell cmos config \
     deassign default defparam design disable edge else end endcase endconfig endfunction \
     endgenerate endmodule endprimitive endspecify endtable endtask event for force forever \
     fork function generate genvar highz0 highz1 if ifnone incdir include initial inout input \
     instance integer join large liblist library localparam macromodule medium module nand \
     negedge nmos nor noshowcancelled not notif0 notif1 or output parameter pmos posedge \
     primitive pull0 pull1 pulldown pullup pulsestyle_onevent pulsestyle_ondetect rcmos real \
     realtime reg release repeat rnmos rpmos rtran rtranif0 rtranif1 scalared showcancelled \
     signed small specify specparam strong0 strong1 supply0 supply1 table task time tran \
     tranif0 tranif1 tri tri0 tri1 triand trior trireg unsigned use uwire vectored wait wand \
     weak0 weak1 while wire wor xnor xor";

/// The keywords IEEE 1800-2017 Annex B adds to Verilog's (from memory), space-separated.
const SYSTEMVERILOG_KEYWORDS: &str =
    "accept_on alias always_comb always_ff always_latch assert assume before bind bins binsof \
     bit break byte chandle checker class clocking const constraint context continue cover \
     covergroup coverpoint cross dist do endchecker endclass endclocking endgroup endinterface \
     endpackage endprogram endproperty endsequence enum eventually expect export extends extern \
     final first_match foreach forkjoin global iff ignore_bins illegal_bins implements implies \
     import inside int interconnect interface intersect join_any join_none let local logic \
     longint matches modport nettype new nexttime null package packed priority program property \
     protected pure rand randc randcase randsequence ref reject_on restrict return s_always \
     s_eventually s_nexttime s_until s_until_with sequence shortint shortreal soft solve static \
     string strong struct super sync_accept_on sync_reject_on tagged this throughout \
     timeprecision timeunit type typedef union unique unique0 until until_with untyped var \
     virtual void wait_order weak wildcard with within";

/// IEEE 1076-2008 15.10, "Reserved words" (from memory), space-separated.
const VHDL_KEYWORDS: &str =
    "abs access after alias all and architecture array assert assume assume_guarantee attribute \
     begin block body buffer bus case component configuration constant context cover default \
     disconnect downto else elsif end entity exit fairness file for force function generate \
     generic group guarded if impure in inertial inout is label library linkage literal loop \
     map mod nand new next nor not null of on open or others out package parameter port \
     postponed procedure process property protected pure range record register reject release \
     rem report restrict restrict_guarantee return rol ror select sequence severity shared \
     signal sla sll sra srl strong subtype then to transport type unaffected units until use \
     variable vmode vprop vunit wait when while with xnor xor";

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spec::{Encoding, Operation};

    const SUB16: &str = r#"
name = "pump-delta.v2"
operation = "sub"
width = 16
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
parameters = { W = 16, STYLE = "say \"fast\"" }
"#;

    fn sub16() -> Spec {
        Spec::parse(SUB16, "sub16.toml").unwrap()
    }

    fn emit(spec: &Spec, hdl: Hdl, self_check: bool) -> String {
        let mut options = TestbenchOptions::new(hdl, 8);
        options.self_check = self_check;
        emit_testbench(spec, &options).unwrap()
    }

    fn problems(spec: &Spec, options: &TestbenchOptions) -> Vec<Problem> {
        emit_testbench(spec, options)
            .unwrap_err()
            .problems()
            .to_vec()
    }

    #[test]
    fn names_are_sanitised_to_identifiers_valid_in_both_languages() {
        let mut spec = sub16();
        assert_eq!(testbench_name(&spec), "tb_pump_delta_v2");
        spec.name = "a--b.".to_string();
        assert_eq!(testbench_name(&spec), "tb_a_b");
        spec.name = "...".to_string();
        assert_eq!(testbench_name(&spec), "tb_unit");
        assert_eq!(
            testbench_file_name(&sub16(), Hdl::Vhdl),
            "tb_pump_delta_v2.vhd"
        );
    }

    #[test]
    fn verilog_header_names_the_unit_and_both_simulators_commands() {
        let text = emit(&sub16(), Hdl::Verilog, true);
        let header: Vec<&str> = text.lines().take_while(|l| l.starts_with("//")).collect();
        assert!(
            header[0].starts_with("// Testbench generated by arithvec for unit \"pump-delta.v2\"")
        );
        let joined = header.join("\n");
        for command in [
            "//   $ iverilog -g2005 -s tb_pump_delta_v2 -o sim tb_pump_delta_v2.v sub_w.v",
            "//   $ vvp sim +stimulus=stimulus.hex +results=results.csv +expected=expected.hex",
            "//   $ verilator --binary --timing -Wno-fatal --top-module tb_pump_delta_v2 \
             tb_pump_delta_v2.v sub_w.v -o sim",
            "//   $ obj_dir/sim +stimulus=stimulus.hex +results=results.csv +expected=expected.hex",
        ] {
            assert!(joined.contains(command), "missing {command:?} in\n{joined}");
        }
        // Verilator takes any comment starting with its name for a directive, so no comment
        // line may start with it, even when the DUT's name does.
        let mut spec = sub16();
        spec.dut.as_mut().unwrap().module = "verilator_unit".to_string();
        let text = emit(&spec, Hdl::Verilog, true);
        assert!(text.contains("Replace verilator_unit.v with the file(s)"));
        for line in text.lines() {
            if let Some(rest) = line.trim_start().strip_prefix("//") {
                assert!(
                    !rest
                        .trim_start()
                        .to_ascii_lowercase()
                        .starts_with("verilator"),
                    "{line}"
                );
            }
        }
    }

    #[test]
    fn verilog_reads_plusargs_and_slices_fields_per_layout() {
        let spec = sub16();
        let text = emit(&spec, Hdl::Verilog, false);
        for p in [
            "$value$plusargs(\"stimulus=%s\", v_stimulus_path)) v_stimulus_path = \"stimulus.hex\";",
            "$value$plusargs(\"results=%s\", v_results_path)) v_results_path = \"results.csv\";",
        ] {
            assert!(text.contains(p), "{p}");
        }
        assert!(!text.contains("expected=%s"));
        let layout = Layout::for_spec(&spec);
        // The layout puts a highest: a [32:17], b [16:1], bin [0].
        let slices: Vec<(u32, u32)> = layout
            .stimulus
            .fields
            .iter()
            .map(|f| (f.msb, f.lsb))
            .collect();
        assert_eq!(slices, [(32, 17), (16, 1), (0, 0)]);
        assert!(text.contains("s_a = v_word[32:17];"));
        assert!(text.contains("s_b = v_word[16:1];"));
        assert!(text.contains("s_carry_in = v_word[0];"));
        assert!(text.contains("localparam integer STIMULUS_BITS = 33;"));
        assert!(text.contains("$fdisplay(v_fd, \"index,a,b,bin,d,bout,v,z,n\");"));
        assert!(text
            .contains("\"%0d,%h,%h,%h,%h,%h,%h,%h,%h\", v_index, s_a, s_b, s_carry_in, s_result,"));
        assert!(text.contains("    .W(16)"));
        assert!(text.contains("    .STYLE(\"say \\\"fast\\\"\")"));
        assert!(text.contains("    .bin(s_carry_in),"));
        assert!(text.contains("      #1;\n"));
        assert!(text.contains("\n`timescale 1ns / 1ps\n"));
        assert!(!text.contains("$fatal(1, \"arithvec-tb: %0d of"));
    }

    #[test]
    fn verilog_self_check_compares_with_case_inequality_and_fails() {
        let text = emit(&sub16(), Hdl::Verilog, true);
        assert!(text.contains("$value$plusargs(\"expected=%s\", v_expected_path)) v_expected_path = \"expected.hex\";"));
        assert!(text.contains("wire [EXPECTED_BITS-1:0] v_got = {s_result, s_carry_out, s_overflow, s_zero, s_negative};"));
        assert!(text.contains("if (v_got !== v_expected_word[EXPECTED_BITS-1:0]) begin"));
        assert!(text.contains("else $write(\"arithvec-tb: %0d vectors, \", VECTORS);"));
        assert!(text.contains("if (v_mismatches == 1) $display(\"1 mismatch\");"));
        assert!(text.contains("if (v_mismatches > 0)\n      $fatal(1,"));
    }

    #[test]
    fn vhdl_uses_generics_textio_and_layout_slices() {
        let spec = sub16();
        let text = emit(&spec, Hdl::Vhdl, true);
        assert!(text.starts_with("-- Testbench generated by arithvec for unit \"pump-delta.v2\""));
        for needle in [
            "--   $ ghdl -a --std=08 sub_w.vhd tb_pump_delta_v2.vhd",
            "--   $ ghdl -e --std=08 tb_pump_delta_v2",
            "--   $ ghdl -r --std=08 tb_pump_delta_v2 -gstimulus=stimulus.hex -gresults=results.csv \
             -gexpected=expected.hex",
            "entity tb_pump_delta_v2 is",
            "    stimulus : string := \"stimulus.hex\";",
            "    results : string := \"results.csv\";",
            "    expected : string := \"expected.hex\"",
            "v_dut : entity work.sub_w",
            "      STYLE => \"say \"\"fast\"\"\",\n      W => 16\n",
            "      bin => s_carry_in,",
            "signal s_a : std_logic_vector(15 downto 0) := (others => '0');  -- port a",
            "signal s_carry_in : std_logic := '0';  -- port bin",
            "signal s_result : std_logic_vector(15 downto 0);  -- port d",
            "s_a <= v_word(32 downto 17);",
            "s_b <= v_word(16 downto 1);",
            "s_carry_in <= v_word(0);",
            "assert v_word(v_word'left downto 33) = \"000\"",
            "wait for 1 ns;",
            "write(v_line, string'(\"index,a,b,bin,d,bout,v,z,n\"));",
            "hwrite(v_line, f_digits(s_result));",
            "v_got := s_result & s_carry_out & s_overflow & s_zero & s_negative;",
            "severity failure",
        ] {
            assert!(text.contains(needle), "missing {needle:?}");
        }
        let plain = emit(&spec, Hdl::Vhdl, false);
        assert!(!plain.contains("expected : string"));
        assert!(!plain.contains("v_mismatches"));
    }

    #[test]
    fn width_one_operands_stay_vectors_in_vhdl() {
        let mut spec = Spec::with_defaults(Operation::Increment, Encoding::Unsigned, 1);
        spec.dut = Some(Dut {
            module: "inc1".to_string(),
            parameters: BTreeMap::new(),
            vhdl_types: Default::default(),
        });
        let text = emit(&spec, Hdl::Vhdl, true);
        assert!(text.contains("signal s_a : std_logic_vector(0 downto 0) := (others => '0');"));
        assert!(text.contains("s_a <= v_word(0 downto 0);"));
        assert!(text.contains("signal s_carry_out : std_logic;"));
    }

    #[test]
    fn refuses_a_spec_without_dut() {
        let spec = Spec::with_defaults(Operation::Add, Encoding::Twos, 8);
        let p = problems(&spec, &TestbenchOptions::new(Hdl::Verilog, 4));
        assert_eq!(p.len(), 1);
        assert_eq!(p[0].field.as_deref(), Some("dut"));
        assert!(p[0].message.contains("add a [dut] table with module = "));
    }

    #[test]
    fn refuses_self_check_when_either_zero_is_accepted() {
        let mut spec = Spec::with_defaults(Operation::Add, Encoding::Ones, 8);
        spec.dut = sub16().dut;
        spec.conventions.negative_zero = NegativeZero::Either;
        let mut options = TestbenchOptions::new(Hdl::Verilog, 4);
        assert!(emit_testbench(&spec, &options).is_ok());
        options.self_check = true;
        let p = problems(&spec, &options);
        assert_eq!(p[0].field.as_deref(), Some("conventions.negative_zero"));
        assert!(p[0].message.contains("without self-check"));
    }

    #[test]
    fn refuses_impossible_options() {
        let spec = sub16();
        let mut options = TestbenchOptions::new(Hdl::Vhdl, 0);
        options.settle = 0;
        let p = problems(&spec, &options);
        assert_eq!(p[0].file, "--vectors");
        assert_eq!(p[1].file, "--settle");
        options.vectors = MAX_TESTBENCH_VECTORS + 1;
        options.settle = 1;
        assert_eq!(problems(&spec, &options)[0].file, "--vectors");
    }

    #[test]
    fn refuses_names_the_language_cannot_take() {
        let mut spec = sub16();
        spec.ports.set(Signal::A, "reg");
        spec.ports.set(Signal::B, "logic");
        let p = problems(&spec, &TestbenchOptions::new(Hdl::Verilog, 1));
        assert_eq!(p[0].field.as_deref(), Some("ports.a"));
        assert!(p[0].message.contains("IEEE 1364-2005"));
        assert_eq!(p[1].field.as_deref(), Some("ports.b"));
        assert!(p[1].message.contains("SystemVerilog"));
        // Both are fine in VHDL ...
        assert!(emit_testbench(&spec, &TestbenchOptions::new(Hdl::Vhdl, 1)).is_ok());
        // ... which has its own reserved words, identifier rules and case folding.
        let mut spec = sub16();
        spec.ports.set(Signal::A, "Signal");
        spec.ports.set(Signal::B, "b__x");
        spec.ports.set(Signal::Zero, "N");
        let p = problems(&spec, &TestbenchOptions::new(Hdl::Vhdl, 1));
        let fields: Vec<&str> = p.iter().filter_map(|p| p.field.as_deref()).collect();
        assert_eq!(fields, ["ports.a", "ports.b", "ports.negative"]);
        assert!(emit_testbench(&spec, &TestbenchOptions::new(Hdl::Vhdl, 1))
            .unwrap_err()
            .to_string()
            .contains("spec \"pump-delta.v2\": ports.a: \"Signal\" is a reserved word in VHDL"));
    }

    #[test]
    fn refuses_parameters_outside_32_bits_and_a_dut_named_like_the_testbench() {
        let mut spec = sub16();
        let dut = spec.dut.as_mut().unwrap();
        dut.module = "tb_pump_delta_v2".to_string();
        dut.parameters
            .insert("W".to_string(), ParamValue::Int(1 << 40));
        dut.parameters
            .insert("NOTE".to_string(), ParamValue::Str("tab\there".to_string()));
        let p = problems(&spec, &TestbenchOptions::new(Hdl::Verilog, 1));
        let fields: Vec<&str> = p.iter().filter_map(|p| p.field.as_deref()).collect();
        assert_eq!(
            fields,
            ["dut.module", "dut.parameters.NOTE", "dut.parameters.W"]
        );
    }

    #[test]
    fn vhdl_converts_numeric_std_ports_at_the_port_map() {
        let text = format!("{SUB16}vhdl_types = {{ a = \"signed\", d = \"unsigned\" }}\n");
        let spec = Spec::parse(&text, "t.toml").unwrap();
        let vhdl = emit(&spec, Hdl::Vhdl, true);
        for line in [
            "use ieee.numeric_std.all;",
            "      a => signed(s_a),",
            "      b => s_b,",
            "      std_logic_vector(d) => s_result,",
            "      bout => s_carry_out,",
            "converted at the port map: a signed, d unsigned.",
        ] {
            assert!(vhdl.contains(line), "missing {line:?} in\n{vhdl}");
        }
        // The testbench's own signals stay std_logic_vector.
        assert!(vhdl.contains("signal s_a : std_logic_vector(15 downto 0) := (others => '0');"));
        // Without the key nothing is converted and numeric_std is not used.
        let plain = emit(&sub16(), Hdl::Vhdl, true);
        assert!(!plain.contains("numeric_std"));
        assert!(plain.contains("      a => s_a,"));
        assert!(plain.contains("      d => s_result,"));
        // Verilog ignores the key.
        assert_eq!(
            emit(&spec, Hdl::Verilog, true),
            emit(&sub16(), Hdl::Verilog, true)
        );
    }

    #[test]
    fn vhdl_declares_a_shift_amount_as_a_vector() {
        // amount_width 2 and 1: the amount is a vector at every width, like the operands.
        for (width, aw) in [(4, 2), (1, 1)] {
            let text = format!(
                "name = \"crank\"\noperation = \"shl\"\nwidth = {width}\n\
                 encoding = \"unsigned\"\namount_width = {aw}\n\n[ports]\na = \"a\"\n\
                 amount = \"sh\"\nresult = \"y\"\n\n[dut]\nmodule = \"crank\"\n"
            );
            let spec = Spec::parse(&text, "t.toml").unwrap();
            let vhdl = emit(&spec, Hdl::Vhdl, true);
            let hi = aw - 1;
            for line in [
                format!("signal s_amount : std_logic_vector({hi} downto 0) := (others => '0');"),
                format!("s_amount <= v_word({hi} downto 0);"),
            ] {
                assert!(vhdl.contains(&line), "missing {line:?} in\n{vhdl}");
            }
        }
    }
}
