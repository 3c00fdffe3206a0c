//! `arithvec grade`: single stuck-at fault coverage of a vector set on a gate netlist, and
//! compaction to a smaller set that keeps class and fault coverage.

use std::io::Write;
use std::path::PathBuf;

use clap::{Args, ValueEnum};
use serde::Serialize;

use arithvec::{
    render_grade_html, write_selection, BuiltinModel, CompactedSet, Error, FaultEntry, FaultReport,
    GradeFault, GradeOutcome, GradeSummary, Grader, Netlist, NetlistReference, Problem, VectorSet,
};

use crate::cli::check::open_vectors;
use crate::cli::util::{out, parse_percent, read_spec, stdout_error, write_output, Outcome};

pub const GRADE_HELP: &str = "Examples:\n  yosys -q -p \"read_verilog my_sub.v; synth -flatten -top my_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json my_sub.json\"\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json --compact --out vec-min/\n  arithvec grade unit.toml --vectors vec/ --builtin\n\n\
The netlist's module is [dut] module unless --module says otherwise; its ports are matched by \
name to the spec's [ports]. The fault-free netlist must reproduce the golden model on every \
vector, or grading stops (exit 1); --reference netlist grades against the netlist's own \
fault-free responses instead (for a unit with a known bug), and every report says so and \
lists where it disagrees with the model. Exit 3 when fault coverage is below --require.\n\n\
Fault coverage, like class coverage, is evidence, not proof; sign-off follows your team's own \
verification plan.";

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum GradeFormat {
    Table,
    Json,
}

/// How `--compact` chooses its subset (the text line and the JSON `compaction.method`).
const COMPACTION_METHOD: &str = "greedy set cover: every fault detected and every bin hit by \
     the full set still is; small, not proven minimum";

/// The `compaction` object of `grade --format json --compact`.
#[derive(Serialize)]
struct Compaction {
    /// Vectors in the graded set.
    before: u64,
    /// Vectors in the compacted set written to `out`.
    after: u64,
    method: &'static str,
    out: String,
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
    #[arg(long, value_name = "PCT", value_parser = parse_percent)]
    require: Option<f64>,
    /// Write the smallest subset found that keeps class and fault coverage to --out.
    #[arg(long, requires = "out")]
    compact: bool,
    /// Output directory for --compact.
    #[arg(long)]
    out: Option<PathBuf>,
    #[command(flatten)]
    threads: crate::cli::threads::ThreadsArg,
    /// Write a self-contained HTML report here.
    #[arg(long, value_name = "FILE")]
    html: Option<PathBuf>,
    /// What a faulty netlist's outputs are compared with: `golden` (the fault-free netlist
    /// must reproduce the golden model on every vector, else grading stops with exit 1) or
    /// `netlist` (its own fault-free responses, to grade a unit with a known functional bug;
    /// every report says so and lists the vectors where it disagrees with the model).
    #[arg(long, value_enum, default_value_t = Reference::Golden)]
    reference: Reference,
}

/// The reference responses of `grade --reference`.
#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum Reference {
    /// The golden model (the default).
    Golden,
    /// The netlist's own fault-free responses.
    Netlist,
}

/// Disagreements of the fault-free netlist with the golden model listed in reports.
const LISTED_DISAGREEMENTS: usize = 50;

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
        netlist_reference: None,
    }
}

pub fn grade(args: GradeArgs, quiet: bool) -> Result<Outcome, Error> {
    if let Some(dir) = &args.out {
        let mut inputs: Vec<(&str, &std::path::Path)> =
            vec![("SPEC", &args.spec), ("--vectors", &args.vectors)];
        if let Some(n) = &args.netlist {
            inputs.push(("--netlist", n));
        }
        crate::cli::util::refuse_collisions(&inputs, &[("--out", dir)])?;
    }
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
            let netlist = Netlist::from_yosys_json(&text, &path.display().to_string(), &module)?;
            // Every output the spec names must be in the netlist, as every input must: a
            // spec output the netlist lacks could never be compared, so grading without it
            // would overstate. The built-in models build no zero or negative flag, so the
            // check is for netlist files only.
            let missing: Vec<Problem> = spec
                .outputs()
                .into_iter()
                .filter(|(_, name)| netlist.output_port(name).is_none())
                .map(|(sig, name)| {
                    Problem::new(
                        path.display().to_string(),
                        format!(
                            "module `{}` has no output port \"{name}\" (the spec's {}); rename \
                             the port or remove it from the spec's [ports]",
                            netlist.module(),
                            sig.key()
                        ),
                    )
                    .field(format!("port {name}"))
                })
                .collect();
            if !missing.is_empty() {
                return Err(Error::input(missing));
            }
            netlist
        }
        None => BuiltinModel::for_spec(&spec)?.build(&spec)?,
    };
    let mut grader = Grader::new(&spec, &netlist)?;
    grader.set_threads(args.threads.resolve()?);
    let index_of = |position: usize| {
        manifest
            .selection
            .as_ref()
            .and_then(|s| s.indices.get(position).copied())
            .unwrap_or(manifest.first_index + position as u64)
    };
    let mut netlist_reference = None;
    let outcome = match args.reference {
        Reference::Golden => grader.grade(&set.inputs, &set.expected)?,
        Reference::Netlist => {
            let (count, listed) = grader.fault_free_disagreements(
                &set.inputs,
                &set.expected,
                LISTED_DISAGREEMENTS,
            )?;
            netlist_reference = Some(NetlistReference {
                disagreeing_vectors: count,
                listed: listed
                    .into_iter()
                    .map(|m| (index_of(m.position), m.port, m.expected, m.got))
                    .collect(),
            });
            GradeOutcome::Graded(grader.grade_against_netlist(&set.inputs)?)
        }
    };
    let report = match outcome {
        GradeOutcome::Graded(r) => r,
        GradeOutcome::NotTheSpec(bad) => {
            let mut o = out();
            if args.format == GradeFormat::Json {
                // One document on stdout, as for a graded netlist: a consumer parsing it sees
                // why there are no fault figures.
                let disagreements: Vec<serde_json::Value> = bad
                    .iter()
                    .map(|m| {
                        let index = index_of(m.position);
                        serde_json::json!({
                            "index": index,
                            "port": m.port,
                            "expected": m.expected,
                            "got": m.got,
                            "repro": format!("arithvec repro {} --index {index}", args.spec.display()),
                        })
                    })
                    .collect();
                let doc = serde_json::json!({
                    "module": netlist.module(),
                    "status": "not_the_spec",
                    "message": "the fault-free netlist does not reproduce the golden model, so it is \
                                not the unit the spec describes; grading stopped",
                    "disagreements": disagreements,
                });
                let text = serde_json::to_string_pretty(&doc).expect("json");
                writeln!(o, "{text}").map_err(stdout_error)?;
                o.flush().map_err(stdout_error)?;
                return Ok(Outcome::Mismatch);
            }
            writeln!(
                o,
                "the fault-free netlist (module {}) does not reproduce the golden model, so it is \
                 not the unit the spec describes; grading stopped. First disagreements:",
                netlist.module()
            )
            .map_err(stdout_error)?;
            for m in &bad {
                let index = index_of(m.position);
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
    // Compaction runs before anything is printed so the JSON document can hold its figures.
    let compaction = if args.compact {
        let dir = args.out.as_ref().expect("clap requires --out");
        let chosen = grader.compact(&generator, &set.inputs)?;
        let source: Vec<u64> = chosen
            .iter()
            .map(|&p| match &manifest.selection {
                Some(s) => s.indices[p],
                None => manifest.first_index + p as u64,
            })
            .collect();
        let _new_dir = crate::cli::signals::guard_new_dir(dir);
        let _temporaries = crate::cli::signals::guard_vector_set(dir);
        let m = write_selection(&generator, &spec, dir, &source)?;
        Some(Compaction {
            before: set.inputs.len() as u64,
            after: m.vectors,
            method: COMPACTION_METHOD,
            out: dir.display().to_string(),
        })
    } else {
        None
    };
    let mut o = out();
    if let Some(r) = &netlist_reference {
        // Loud on stderr whatever the format, so a log of the run shows it too.
        eprintln!(
            "warning: graded against the netlist's own fault-free responses (--reference \
             netlist), not the golden model; the fault-free netlist disagrees with the model \
             on {} of {} vectors",
            r.disagreeing_vectors,
            set.inputs.len()
        );
    }
    if args.format == GradeFormat::Json {
        let mut doc = serde_json::to_value(&report).expect("report serialises");
        if let Some(map) = doc.as_object_mut() {
            map.insert(
                "reference".into(),
                match args.reference {
                    Reference::Golden => "golden",
                    Reference::Netlist => "netlist",
                }
                .into(),
            );
            if let Some(r) = &netlist_reference {
                let listed: Vec<serde_json::Value> = r
                    .listed
                    .iter()
                    .map(|(index, port, expected, got)| {
                        serde_json::json!({
                            "index": index,
                            "port": port,
                            "expected": expected,
                            "got": got,
                        })
                    })
                    .collect();
                map.insert(
                    "golden_disagreements".into(),
                    serde_json::json!({
                        "note": "graded against the netlist's own fault-free responses, not the \
                                 golden model; these vectors show where the netlist disagrees \
                                 with the model",
                        "vectors": r.disagreeing_vectors,
                        "listed": listed,
                    }),
                );
            }
        }
        if let (Some(c), Some(map)) = (&compaction, doc.as_object_mut()) {
            map.insert(
                "compaction".into(),
                serde_json::to_value(c).expect("compaction serialises"),
            );
        }
        let text = serde_json::to_string_pretty(&doc).expect("report serialises");
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
        if let Some(r) = &netlist_reference {
            writeln!(
                o,
                "*** REFERENCE: THE NETLIST'S OWN FAULT-FREE RESPONSES, NOT THE GOLDEN MODEL \
                 (--reference netlist) ***"
            )
            .map_err(stdout_error)?;
            if r.disagreeing_vectors == 0 {
                writeln!(
                    o,
                    "the fault-free netlist agrees with the golden model on all {} vectors",
                    set.inputs.len()
                )
                .map_err(stdout_error)?;
            } else {
                writeln!(
                    o,
                    "the fault-free netlist disagrees with the golden model on {} of {} vectors \
                     (it does not implement the spec); first disagreements:",
                    r.disagreeing_vectors,
                    set.inputs.len()
                )
                .map_err(stdout_error)?;
                for (index, port, want, got) in &r.listed {
                    writeln!(
                        o,
                        "  vector {index}: port {port} golden 0x{want} netlist 0x{got}"
                    )
                    .map_err(stdout_error)?;
                }
            }
        }
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
    if let Some(c) = &compaction {
        if !quiet && args.format != GradeFormat::Json {
            writeln!(
                o,
                "compacted {} vectors to {} ({}) in {}",
                c.before, c.after, c.method, c.out
            )
            .map_err(stdout_error)?;
        }
    }
    let compacted = compaction.as_ref().map(|c| CompactedSet {
        from: c.before as usize,
        to: c.after as usize,
        dir: c.out.clone(),
    });
    if let Some(path) = &args.html {
        let mut summary = grade_summary(&report, &args, manifest.seed, compacted);
        summary.netlist_reference = netlist_reference;
        write_output(path, render_grade_html(&spec, &summary).as_bytes())?;
    }
    o.flush().map_err(stdout_error)?;
    Ok(if short {
        Outcome::CoverageShort
    } else {
        Outcome::Success
    })
}
