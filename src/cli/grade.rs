//! `arithvec grade`: single stuck-at fault coverage of a vector set on a gate netlist, and
//! compaction to a smaller set that keeps class and fault coverage.

use std::io::Write;
use std::path::PathBuf;

use clap::{Args, ValueEnum};

use arithvec::{
    render_grade_html, write_selection, BuiltinModel, CompactedSet, Error, FaultEntry, FaultReport,
    GradeFault, GradeOutcome, GradeSummary, Grader, Netlist, Problem, VectorSet,
};

use crate::cli::check::open_vectors;
use crate::cli::util::{out, read_spec, stdout_error, write_atomic, Outcome};

pub const GRADE_HELP: &str = "Examples:\n  yosys -q -p \"read_verilog my_sub.v; synth -flatten -top my_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json my_sub.json\"\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json --compact --out vec-min/\n  arithvec grade unit.toml --vectors vec/ --builtin\n\n\
The netlist's module is [dut] module unless --module says otherwise; its ports are matched by \
name to the spec's [ports]. The fault-free netlist must reproduce the golden model on every \
vector, or grading stops (exit 1). Exit 3 when fault coverage is below --require.\n\n\
Fault coverage, like class coverage, is evidence, not proof; sign-off follows your team's own \
verification plan.";

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum GradeFormat {
    Table,
    Json,
}

#[derive(Args)]
pub struct GradeArgs {
    /// The operation spec (TOML).
    spec: PathBuf,
    /// The vector set to grade.
    #[arg(long)]
    vectors: PathBuf,
    /// Yosys JSON netlist (`write_json`) of the unit.
    #[arg(long, conflicts_with = "builtin", required_unless_present = "builtin")]
    netlist: Option<PathBuf>,
    /// Grade arithvec's own structural model of the operation (ripple adder, ripple-borrow
    /// subtractor or add/sub unit) instead of a netlist file.
    #[arg(long)]
    builtin: bool,
    /// Module to grade (default: the spec's [dut] module).
    #[arg(long)]
    module: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = GradeFormat::Table)]
    format: GradeFormat,
    /// Fault coverage required, in percent (exit 3 when short).
    #[arg(long, value_name = "PCT")]
    require: Option<f64>,
    /// Write the smallest subset found that keeps class and fault coverage to --out.
    #[arg(long, requires = "out")]
    compact: bool,
    /// Output directory for --compact.
    #[arg(long)]
    out: Option<PathBuf>,
    /// Write a self-contained HTML report here.
    #[arg(long, value_name = "FILE")]
    html: Option<PathBuf>,
}

/// The redundancy verdict of a fault in words, as the table and the HTML page show it.
fn redundancy_words(f: &FaultEntry) -> String {
    serde_json::to_value(&f.redundancy)
        .ok()
        .and_then(|v| v.get("status").and_then(|s| s.as_str()).map(str::to_string))
        .unwrap_or_default()
        .replace('_', " ")
}

/// The figures the HTML page shows, from the fault report and the compaction.
fn grade_summary(
    report: &FaultReport,
    args: &GradeArgs,
    seed: u64,
    compacted: Option<CompactedSet>,
) -> GradeSummary {
    GradeSummary {
        module: report.module.clone(),
        vector_set: args.vectors.display().to_string(),
        seed,
        vectors: report.vectors,
        faults: report.faults,
        collapsed: report.collapsed,
        detected: report.detected,
        coverage_percent: report.coverage_percent,
        testable_coverage_percent: report.testable_coverage_percent,
        redundant: report.redundant.len(),
        undetected: report
            .undetected
            .iter()
            .map(|f| GradeFault {
                net: f.net.clone(),
                stuck_at: f.stuck_at,
                site: f.site.clone(),
                driver: match &f.driver_cell {
                    Some(c) => format!("{c} ({})", f.driver_type),
                    None => f.driver_type.clone(),
                },
                redundancy: redundancy_words(f),
            })
            .collect(),
        unchecked_outputs: report.unchecked_outputs.clone(),
        ungraded_gates: report.ungraded_gates,
        require: args.require,
        compacted,
    }
}

pub fn grade(args: GradeArgs, quiet: bool) -> Result<Outcome, Error> {
    let spec = read_spec(&args.spec)?;
    let (manifest, generator) = open_vectors(&args.vectors, &spec)?;
    let set = VectorSet::read(&args.vectors, &spec)?;
    let netlist = match &args.netlist {
        Some(path) => {
            let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
            let module = match args.module.clone().or_else(|| spec.dut.as_ref().map(|d| d.module.clone())) {
                Some(m) => m,
                None => {
                    return Err(Error::problem(
                        Problem::new(
                            args.spec.display().to_string(),
                            "no module to grade: add a [dut] table with module = \"...\" or pass --module",
                        )
                        .field("dut.module"),
                    ))
                }
            };
            Netlist::from_yosys_json(&text, &path.display().to_string(), &module)?
        }
        None => BuiltinModel::for_spec(&spec)?.build(&spec)?,
    };
    let grader = Grader::new(&spec, &netlist)?;
    let report = match grader.grade(&set.inputs, &set.expected)? {
        GradeOutcome::Graded(r) => r,
        GradeOutcome::NotTheSpec(bad) => {
            let mut o = out();
            writeln!(
                o,
                "the fault-free netlist (module {}) does not reproduce the golden model, so it is \
                 not the unit the spec describes; grading stopped. First disagreements:",
                netlist.module()
            )
            .map_err(stdout_error)?;
            for m in &bad {
                let index = manifest
                    .selection
                    .as_ref()
                    .and_then(|s| s.indices.get(m.position).copied())
                    .unwrap_or(manifest.first_index + m.position as u64);
                writeln!(
                    o,
                    "  vector {index}: port {} expected 0x{} got 0x{} (arithvec repro {} --index {index})",
                    m.port,
                    m.expected,
                    m.got,
                    args.spec.display()
                )
                .map_err(stdout_error)?;
            }
            return Ok(Outcome::Mismatch);
        }
    };
    let short = args.require.is_some_and(|r| report.coverage_percent < r);
    let mut o = out();
    if args.format == GradeFormat::Json {
        let text = serde_json::to_string_pretty(&report).expect("report serialises");
        writeln!(o, "{text}").map_err(stdout_error)?;
    } else if !quiet {
        let rows = vec![[
            report.vectors.to_string(),
            report.faults.to_string(),
            report.collapsed.to_string(),
            report.detected.to_string(),
            report.undetected.len().to_string(),
            report.redundant.len().to_string(),
            format!("{:.2}%", report.coverage_percent),
        ]];
        writeln!(
            o,
            "single stuck-at faults of module {} ({} vectors of unit {})",
            report.module, report.vectors, spec.name
        )
        .map_err(stdout_error)?;
        let t = crate::cli::util::table(
            &[
                "vectors",
                "faults",
                "collapsed",
                "detected",
                "undetected",
                "proven redundant",
                "coverage",
            ],
            &rows,
        );
        writeln!(o, "{t}").map_err(stdout_error)?;
        if !report.unchecked_outputs.is_empty() {
            writeln!(
                o,
                "not observed: output{} {} (not in the spec's [ports], so no test compares {}); \
                 {} gate{} feeding only {} {} not graded",
                if report.unchecked_outputs.len() == 1 {
                    ""
                } else {
                    "s"
                },
                report.unchecked_outputs.join(", "),
                if report.unchecked_outputs.len() == 1 {
                    "it"
                } else {
                    "them"
                },
                report.ungraded_gates,
                if report.ungraded_gates == 1 { "" } else { "s" },
                if report.unchecked_outputs.len() == 1 {
                    "it"
                } else {
                    "them"
                },
                if report.ungraded_gates == 1 {
                    "is"
                } else {
                    "are"
                },
            )
            .map_err(stdout_error)?;
        }
        if !report.undetected.is_empty() {
            let rows: Vec<[String; 5]> = report
                .undetected
                .iter()
                .take(50)
                .map(|f| {
                    [
                        f.net.clone(),
                        format!("stuck-at-{}", f.stuck_at),
                        f.site.clone(),
                        match &f.driver_cell {
                            Some(c) => format!("{c} ({})", f.driver_type),
                            None => f.driver_type.clone(),
                        },
                        redundancy_words(f),
                    ]
                })
                .collect();
            writeln!(o, "undetected faults:").map_err(stdout_error)?;
            writeln!(
                o,
                "{}",
                crate::cli::util::table(
                    &["net", "fault", "site", "driven by", "redundancy"],
                    &rows
                )
            )
            .map_err(stdout_error)?;
            if report.undetected.len() > 50 {
                writeln!(
                    o,
                    "... and {} more (see --format json)",
                    report.undetected.len() - 50
                )
                .map_err(stdout_error)?;
            }
        }
        writeln!(
            o,
            "coverage is detected / collapsed faults; faults proven redundant (no input can \
             detect them) stay in the denominator. Fault coverage is evidence, not proof."
        )
        .map_err(stdout_error)?;
    }
    let mut compacted = None;
    if args.compact {
        let dir = args.out.as_ref().expect("clap requires --out");
        let chosen = grader.compact(&generator, &set.inputs)?;
        let source: Vec<u64> = chosen
            .iter()
            .map(|&p| match &manifest.selection {
                Some(s) => s.indices[p],
                None => manifest.first_index + p as u64,
            })
            .collect();
        let m = write_selection(&generator, &spec, dir, &source)?;
        if !quiet {
            writeln!(
                o,
                "compacted {} vectors to {} (greedy set cover: every fault detected and every \
                 bin hit by the full set still is; small, not proven minimum) in {}",
                set.inputs.len(),
                m.vectors,
                dir.display()
            )
            .map_err(stdout_error)?;
        }
        compacted = Some(CompactedSet {
            from: set.inputs.len(),
            to: m.vectors as usize,
            dir: dir.display().to_string(),
        });
    }
    if let Some(path) = &args.html {
        let summary = grade_summary(&report, &args, manifest.seed, compacted);
        write_atomic(path, render_grade_html(&spec, &summary).as_bytes())?;
    }
    o.flush().map_err(stdout_error)?;
    Ok(if short {
        Outcome::CoverageShort
    } else {
        Outcome::Success
    })
}
