//! `arithvec prove`: combinational equivalence of a Yosys netlist with the spec, by SAT.

use std::collections::BTreeMap;
use std::io::Write;
use std::path::PathBuf;

use clap::{Args, ValueEnum};

use arithvec::{
    prove_against, write_topped_up, Error, Generator, Netlist, Problem, ProveReport, ProveVerdict,
    TopUpVector,
};

use crate::cli::util::{out, read_spec, stdout_error, Outcome};

pub const PROVE_HELP: &str = "Example:\n  yosys -q -p \"read_verilog my_sub.v; synth -flatten -top my_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json my_sub.json\"\n  arithvec prove unit.toml --netlist my_sub.json --out cex/\n\n\
The reference is arithvec's built-in ripple structure for the spec (add, sub, addsub; \
unsigned or twos) or the --reference netlist, simulated against the golden model first. A SAT solver then decides \
whether any input makes an output the spec names differ.\n\n\
Exit codes: 0 proved; 1 counterexample (with --out, written as a one-vector set that \
`testbench` and `check` take); 2 bad input or no reference for the spec; 3 unknown: the \
conflict budget ran out and nothing was proved.\n\n\
A proof covers combinational equivalence of the named outputs only: not timing, not other \
outputs, not the synthesis flow.";

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum ProveFormat {
    // A table for people (`table` is the old spelling, still accepted as a hidden alias).
    #[value(alias = "table")]
    Text,
    Json,
}

#[derive(Args)]
pub struct ProveArgs {
    /// The operation spec (TOML).
    spec: PathBuf,
    /// Yosys JSON netlist (`write_json`) of the unit.
    #[arg(long)]
    netlist: PathBuf,
    /// Module to prove (default: the spec's [dut] module).
    #[arg(long)]
    module: Option<String>,
    /// A reference netlist (Yosys JSON) to prove against instead of the built-in structure,
    /// for operations and encodings the built-ins do not cover. It is simulated against the
    /// golden model first, like the built-in one.
    #[arg(long, value_name = "FILE")]
    reference: Option<PathBuf>,
    /// Module of --reference (default: the same module name as the netlist's).
    #[arg(long, value_name = "NAME", requires = "reference")]
    reference_module: Option<String>,
    /// Conflict budget: the solver checks it between propagations and stops at the first check
    /// past it; the answer is then "unknown" with the conflicts spent.
    #[arg(long, value_name = "N", default_value_t = 1_000_000,
          value_parser = clap::value_parser!(u64).range(1..))]
    conflicts: u64,
    /// Write a counterexample into this directory as a one-vector set (for `testbench` and
    /// `check`).
    #[arg(long, value_name = "DIR")]
    out: Option<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = ProveFormat::Text)]
    format: ProveFormat,
}

pub fn prove(args: ProveArgs, quiet: bool) -> Result<Outcome, Error> {
    if let Some(dir) = &args.out {
        crate::cli::util::refuse_collisions(
            &[
                ("SPEC", args.spec.as_path()),
                ("--netlist", args.netlist.as_path()),
            ],
            &[("--out", dir)],
        )?;
    }
    let spec = read_spec(&args.spec)?;
    let text = std::fs::read_to_string(&args.netlist).map_err(|e| Error::io(&args.netlist, e))?;
    let module =
        match args
            .module
            .clone()
            .or_else(|| spec.dut.as_ref().map(|d| d.module.clone()))
        {
            Some(m) => m,
            None => return Err(Error::problem(
                Problem::new(
                    args.spec.display().to_string(),
                    "no module to prove: add a [dut] table with module = \"...\" or pass --module",
                )
                .field("dut.module"),
            )),
        };
    let netlist = Netlist::from_yosys_json(&text, &args.netlist.display().to_string(), &module)?;
    let reference = match &args.reference {
        Some(path) => {
            let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
            let m = args
                .reference_module
                .clone()
                .unwrap_or_else(|| module.clone());
            Some(Netlist::from_yosys_json(
                &text,
                &path.display().to_string(),
                &m,
            )?)
        }
        None => None,
    };
    let report = prove_against(&spec, &netlist, reference.as_ref(), args.conflicts)?;
    let mut written = None;
    if let (ProveVerdict::Counterexample(cex), Some(dir)) = (&report.verdict, &args.out) {
        let vector = TopUpVector {
            inputs: spec
                .inputs()
                .into_iter()
                .map(|(s, _)| {
                    (
                        s.key().to_string(),
                        cex.operands.get(s).to_hex(spec.signal_width(s)),
                    )
                })
                .collect::<BTreeMap<_, _>>(),
            fault: "counterexample of `arithvec prove`: the netlist differs from the golden model"
                .into(),
            module: report.module.clone(),
            method: "SAT: satisfying input of the equivalence miter".into(),
        };
        let generator = Generator::new(&spec, Some(0), None);
        let _new_dir = crate::cli::signals::guard_new_dir(dir);
        let _temporaries = crate::cli::signals::guard_vector_set(dir);
        write_topped_up(&generator, &spec, dir, &[], &[vector])?;
        written = Some(dir.display().to_string());
    }
    let mut o = out();
    if args.format == ProveFormat::Json {
        let mut doc = serde_json::to_value(&report).expect("report serialises");
        if let Some(map) = doc.as_object_mut() {
            map.insert("solver".into(), "batsat (CDCL)".into());
            map.insert(
                "out".into(),
                written.clone().map_or(serde_json::Value::Null, Into::into),
            );
            if let Some(d) = &written {
                map.insert("repro".into(), repro(&args, d).into());
            }
        }
        let text = serde_json::to_string_pretty(&doc).expect("json");
        writeln!(o, "{text}").map_err(stdout_error)?;
    } else if !quiet {
        write_text(&mut o, &report, &args, written.as_deref())?;
    }
    o.flush().map_err(stdout_error)?;
    Ok(match report.verdict {
        ProveVerdict::Proved => Outcome::Success,
        ProveVerdict::Counterexample(_) => Outcome::Mismatch,
        ProveVerdict::Unknown => Outcome::CoverageShort,
    })
}

fn repro(args: &ProveArgs, dir: &str) -> String {
    format!(
        "arithvec testbench {s} --vectors {dir} --hdl verilog -o tb.v, simulate it, then \
         arithvec check {s} --log results.csv --vectors {dir}",
        s = args.spec.display()
    )
}

fn write_text(
    o: &mut impl Write,
    r: &ProveReport,
    args: &ProveArgs,
    written: Option<&str>,
) -> Result<(), Error> {
    let w = |o: &mut dyn Write, s: String| writeln!(o, "{s}").map_err(stdout_error);
    w(
        o,
        format!(
            "equivalence of module {} with unit {} on outputs {} ({} input bits, reference: {}, \
             simulated against the golden model on {} vectors)",
            r.module,
            r.unit,
            r.compared.join(", "),
            r.input_bits,
            r.reference,
            r.reference_checked_vectors
        ),
    )?;
    match &r.verdict {
        ProveVerdict::Proved => w(
            o,
            format!(
                "PROVED: {} ({} conflicts of {})",
                r.claim, r.conflicts, r.conflict_budget
            ),
        )?,
        ProveVerdict::Unknown => w(
            o,
            format!(
                "UNKNOWN: budget {} conflicts; the solver stops at the first check past it; \
                 spent: {} conflicts; nothing was proved and no counterexample was found",
                r.conflict_budget, r.conflicts
            ),
        )?,
        ProveVerdict::Counterexample(c) => {
            w(
                o,
                format!(
                    "COUNTEREXAMPLE: the netlist differs from the golden model on {}",
                    c.inputs
                        .iter()
                        .zip(&c.decoded)
                        .map(|((p, h), (_, d))| format!("{p}=0x{h} ({d})"))
                        .collect::<Vec<_>>()
                        .join(" ")
                ),
            )?;
            for out in &c.outputs {
                w(
                    o,
                    format!(
                        "  {} {}: expected 0x{} ({}) got 0x{} ({})",
                        if out.differs { "MISMATCH" } else { "ok      " },
                        out.port,
                        out.expected,
                        out.expected_value,
                        out.got,
                        out.got_value
                    ),
                )?;
            }
            match written {
                Some(d) => w(o, format!("written to {d}; repro: {}", repro(args, d)))?,
                None => w(o, "pass --out DIR to write it as a vector set".into())?,
            }
        }
    }
    if !r.not_compared.is_empty() {
        w(
            o,
            format!(
                "not compared: output{} {} (not in the spec's [ports])",
                if r.not_compared.len() == 1 { "" } else { "s" },
                r.not_compared.join(", ")
            ),
        )?;
    }
    w(o, format!("{}.", r.limits))?;
    Ok(())
}
