//! `arithvec grade`: single stuck-at fault coverage of a vector set on a gate netlist, and
//! compaction to a smaller set that keeps class and fault coverage.

use std::io::Write;
use std::path::PathBuf;

use clap::{Args, ValueEnum};
use serde::Serialize;

use arithvec::{
    render_grade_html, write_selection, write_topped_up, BuiltinModel, CompactedSet, Error,
    FaultEntry, FaultReport, GradeFault, GradeOutcome, GradeSummary, Grader, Netlist,
    NetlistReference, Problem, Redundancy, TopUpReport, TopUpStatus, TopUpSummary, VectorSet,
};

use crate::cli::check::open_vectors;
use crate::cli::util::{out, parse_percent, read_spec, stdout_error, write_output, Outcome};

pub const GRADE_HELP: &str = "Examples:\n  yosys -q -p \"read_verilog my_sub.v; synth -flatten -top my_sub; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json my_sub.json\"\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json --compact --out vec-min/\n  arithvec grade unit.toml --vectors vec/ --builtin\n  arithvec grade unit.toml --vectors vec/ --netlist my_sub.json --top-up --out vec-topped/\n\n\
The netlist's module is [dut] module unless --module says otherwise; its ports are matched by \
name to the spec's [ports]. The fault-free netlist must reproduce the golden model on every \
vector, or grading stops (exit 1); --reference netlist grades against the netlist's own \
fault-free responses instead (for a unit with a known bug), and every report says so and \
lists where it disagrees with the model. Exit 3 when fault coverage is below --require.\n\n\
Fault coverage, like class coverage, is evidence, not proof; sign-off follows your team's own \
verification plan.";

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum GradeFormat {
    // A table for people (`table` is the old spelling, still accepted as a hidden alias).
    #[value(alias = "table")]
    Text,
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
    #[arg(long, value_enum, default_value_t = GradeFormat::Text)]
    pub(crate) format: GradeFormat,
    /// Fault coverage required, in percent (exit 3 when short).
    #[arg(long, value_name = "PCT", value_parser = parse_percent)]
    pub(crate) require: Option<f64>,
    /// Write the smallest subset found that keeps class and fault coverage to --out.
    #[arg(long, requires = "out", conflicts_with = "top_up")]
    compact: bool,
    /// For every fault the set leaves undetected, ask a SAT solver for a vector that detects
    /// it or a proof that none exists; with --out, write the set plus the new vectors there.
    #[arg(long)]
    top_up: bool,
    /// Conflict budget per fault for --top-up: the solver checks it between propagations and
    /// stops at the first check past it (the fault is then aborted; the report gives the spent count).
    #[arg(long, value_name = "N", default_value_t = 20_000, requires = "top_up",
          value_parser = clap::value_parser!(u64).range(1..))]
    conflicts: u64,
    /// Output directory for --compact or --top-up.
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
    /// Fault model: `stuck-at` (the default) or `transition` (slow-to-rise and slow-to-fall
    /// on every line, each pair's launch vector followed by its capture vector in the next
    /// cycle).
    #[arg(long, value_enum, default_value_t = FaultModel::StuckAt)]
    model: FaultModel,
    /// With --model transition: which vectors form the pairs (auto: the designated pairs of
    /// a `gen --pairs` set, else every vector with the next).
    #[arg(long, value_enum, default_value_t = PairsArg::Auto)]
    pub(crate) pairs: PairsArg,
}

/// The fault model of `grade --model`.
#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum FaultModel {
    /// Single stuck-at-0 and stuck-at-1 faults (the default).
    StuckAt,
    /// Slow-to-rise and slow-to-fall faults, graded on pairs of consecutive vectors.
    Transition,
}

/// Which vectors `grade --model transition` pairs up.
#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum PairsArg {
    /// The set's designated launch/capture pairs when `gen --pairs` wrote it, else every
    /// consecutive pair.
    Auto,
    /// Every vector i with vector i + 1.
    Consecutive,
    /// Only the designated pairs (a set from `gen --pairs`).
    LaunchCapture,
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
    match &f.redundancy {
        Redundancy::Proven { support_bits } => {
            format!("proven redundant ({support_bits} input bits enumerated)")
        }
        Redundancy::Testable { .. } => "testable: the set misses it".to_string(),
        Redundancy::NotProven {
            support_bits,
            limit,
        } => format!(
            "not proven: {support_bits} input {} in its support, over the limit of {limit}",
            if *support_bits == 1 { "bit" } else { "bits" }
        ),
    }
}

/// The output bits a fault can be seen at, with runs of one port's bits shortened
/// (`y[0..3], co`).
fn observed_words(labels: &[String]) -> String {
    if labels.is_empty() {
        return "none".to_string();
    }
    let mut parts: Vec<String> = Vec::new();
    // (port, first bit, last bit) of the run being built.
    let mut run: Option<(String, u64, u64)> = None;
    let flush = |run: &mut Option<(String, u64, u64)>, parts: &mut Vec<String>| {
        if let Some((port, lo, hi)) = run.take() {
            parts.push(if lo == hi {
                format!("{port}[{lo}]")
            } else {
                format!("{port}[{lo}..{hi}]")
            });
        }
    };
    for label in labels {
        let indexed = label
            .strip_suffix(']')
            .and_then(|l| l.rsplit_once('['))
            .and_then(|(port, bit)| bit.parse::<u64>().ok().map(|b| (port.to_string(), b)));
        match indexed {
            Some((port, bit)) => {
                if let Some((p, _, hi)) = &mut run {
                    if *p == port && *hi + 1 == bit {
                        *hi = bit;
                        continue;
                    }
                }
                flush(&mut run, &mut parts);
                run = Some((port, bit, bit));
            }
            None => {
                flush(&mut run, &mut parts);
                parts.push(label.clone());
            }
        }
    }
    flush(&mut run, &mut parts);
    parts.join(", ")
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
        top_up: None,
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
    // A bar of fault classes settled (each simulated against every vector until detected),
    // on stderr and only on a terminal, as for `gen` and `check --vectors`.
    let classes = grader.faults().collapsed() as u64;
    let bar = crate::cli::util::progress_bar_for_work(
        classes,
        classes.saturating_mul(set.inputs.len() as u64),
        quiet || args.model == FaultModel::Transition,
        "fault classes",
    );
    let tick = |n: u64| {
        if let Some(b) = &bar {
            b.inc(n);
        }
    };
    if bar.is_some() {
        grader.set_progress(&tick);
    }
    let index_of = |position: usize| {
        manifest
            .selection
            .as_ref()
            .and_then(|s| s.indices.get(position).copied())
            .unwrap_or(manifest.first_index + position as u64)
    };
    let mut netlist_reference = None;
    if args.model == FaultModel::Transition {
        let unsupported = [
            (args.top_up, "--top-up"),
            (args.compact, "--compact"),
            (args.html.is_some(), "--html"),
            (args.reference == Reference::Netlist, "--reference netlist"),
        ];
        if let Some((_, option)) = unsupported.iter().find(|(on, _)| *on) {
            return Err(Error::problem(
                Problem::new(
                    "--model",
                    format!(
                        "{option} is for stuck-at faults; --model transition grades coverage \
                         only"
                    ),
                )
                .field("model"),
            ));
        }
    } else if args.pairs != PairsArg::Auto {
        return Err(Error::problem(
            Problem::new("--pairs", "--pairs is for --model transition").field("pairs"),
        ));
    }
    let outcome = match args.reference {
        Reference::Golden if args.model == FaultModel::Transition => {
            match crate::cli::transition::grade_transition(
                &args, &spec.name, &manifest, &set, &grader, quiet,
            )? {
                Some(outcome) => return Ok(outcome),
                None => GradeOutcome::NotTheSpec(
                    grader.fault_free_mismatches(&set.inputs, &set.expected)?,
                ),
            }
        }
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
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
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
    if args.out.is_some() && !args.compact && !args.top_up {
        return Err(Error::problem(
            Problem::new("--out", "--out needs --compact or --top-up").field("out"),
        ));
    }
    let short = args.require.is_some_and(|r| report.coverage_percent < r);
    let top_up = if args.top_up {
        let t = grader.top_up(&set.inputs, &report, args.conflicts)?;
        if !t.not_the_spec.is_empty() {
            let mut o = out();
            writeln!(
                o,
                "the fault-free netlist (module {}) disagrees with the golden model on a top-up \
                 vector, so it is not the unit the spec describes; nothing was written:",
                netlist.module()
            )
            .map_err(stdout_error)?;
            for m in &t.not_the_spec {
                let v = &t.added[m.position];
                writeln!(
                    o,
                    "  top-up vector {} ({}): port {} expected 0x{} got 0x{}",
                    m.position,
                    v.inputs
                        .iter()
                        .map(|(k, x)| format!("{k}=0x{x}"))
                        .collect::<Vec<_>>()
                        .join(" "),
                    m.port,
                    m.expected,
                    m.got
                )
                .map_err(stdout_error)?;
            }
            o.flush().map_err(stdout_error)?;
            return Ok(Outcome::Mismatch);
        }
        if let Some(dir) = &args.out {
            let (indices, mut prior) = match &manifest.selection {
                Some(s) => (s.indices.clone(), s.top_up.clone()),
                None => (
                    (0..set.inputs.len() as u64)
                        .map(|p| manifest.first_index + p)
                        .collect(),
                    Vec::new(),
                ),
            };
            prior.extend(t.added.iter().cloned());
            let _new_dir = crate::cli::signals::guard_new_dir(dir);
            let _temporaries = crate::cli::signals::guard_vector_set(dir);
            write_topped_up(&generator, &spec, dir, &indices, &prior)?;
        }
        Some(t)
    } else {
        None
    };
    // Compaction runs before anything is printed so the JSON document can hold its figures.
    let compaction = if args.compact {
        let dir = args.out.as_ref().expect("clap requires --out");
        if manifest
            .selection
            .as_ref()
            .is_some_and(|s| !s.top_up.is_empty())
        {
            return Err(Error::problem(
                Problem::new(
                    args.vectors.display().to_string(),
                    "this set holds top-up vectors; compact the set it was topped up from, \
                     then top up the compacted set",
                )
                .field("compact"),
            ));
        }
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
        if let (Some(t), Some(map)) = (&top_up, doc.as_object_mut()) {
            let mut v = serde_json::to_value(t).expect("top-up serialises");
            if let Some(m) = v.as_object_mut() {
                m.insert("solver".into(), "batsat (CDCL)".into());
                m.insert(
                    "out".into(),
                    args.out
                        .as_ref()
                        .map_or(serde_json::Value::Null, |d| d.display().to_string().into()),
                );
                m.insert(
                    "added_vectors".into(),
                    serde_json::to_value(&t.added).expect("vectors serialise"),
                );
            }
            map.insert("top_up".into(), v);
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
            "single stuck-at faults of module {} ({} of unit {})",
            report.module,
            crate::cli::util::counted(report.vectors as u64, "vector", "vectors"),
            spec.name
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
            let rows: Vec<[String; 6]> = report
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
                        observed_words(&f.observed_at),
                        redundancy_words(f),
                    ]
                })
                .collect();
            writeln!(o, "undetected faults:").map_err(stdout_error)?;
            writeln!(
                o,
                "{}",
                crate::cli::util::table(
                    &[
                        "net",
                        "fault",
                        "site",
                        "driven by",
                        "observable at",
                        "redundancy"
                    ],
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
    if let (Some(t), false) = (&top_up, quiet || args.format == GradeFormat::Json) {
        write_top_up_text(&mut o, t, args.out.as_deref())?;
    }
    if let Some(c) = &compaction {
        if !quiet && args.format != GradeFormat::Json {
            writeln!(
                o,
                "compacted {} to {} ({}) in {}",
                crate::cli::util::counted(c.before, "vector", "vectors"),
                c.after,
                c.method,
                c.out
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
        summary.top_up = top_up.as_ref().map(|t| TopUpSummary {
            vectors_before: t.vectors_before,
            collapsed: t.collapsed,
            detected_by_set: t.detected_before,
            detected_by_top_up: t
                .faults
                .iter()
                .filter(|f| matches!(f.top_up, TopUpStatus::Detected { .. }))
                .count(),
            proven_redundant_exhaustive: t.proven_redundant_exhaustive,
            proven_redundant_sat: t.proven_redundant_sat,
            aborted: t.aborted,
            conflict_budget: t.conflict_budget,
            conflicts_spent: t.conflicts_spent,
            aborted_conflicts_spent: t.aborted_conflicts_spent,
            coverage_percent: t.coverage_percent,
            testable_coverage_percent: t.testable_coverage_percent,
            vectors: t
                .added
                .iter()
                .enumerate()
                .map(|(i, v)| (i, v.fault.clone(), v.method.clone()))
                .collect(),
            out: args.out.as_ref().map(|d| d.display().to_string()),
        });
        write_output(path, render_grade_html(&spec, &summary).as_bytes())?;
    }
    o.flush().map_err(stdout_error)?;
    Ok(if short {
        Outcome::CoverageShort
    } else {
        Outcome::Success
    })
}

/// The text report of `--top-up`.
fn write_top_up_text(
    o: &mut impl Write,
    t: &TopUpReport,
    out_dir: Option<&std::path::Path>,
) -> Result<(), Error> {
    writeln!(
        o,
        "test top-up (SAT fault miter per undetected fault; budget {} conflicts per fault; the \
         solver stops at the first check past it; spent: {} conflicts in all, {} on {} aborted \
         fault{}):",
        t.conflict_budget,
        t.conflicts_spent,
        t.aborted_conflicts_spent,
        t.aborted,
        if t.aborted == 1 { "" } else { "s" }
    )
    .map_err(stdout_error)?;
    let rows = vec![[
        format!("{} + {}", t.vectors_before, t.vectors_added),
        t.collapsed.to_string(),
        format!("{} (was {})", t.detected, t.detected_before),
        format!(
            "{} ({} exhaustive, {} SAT)",
            t.proven_redundant, t.proven_redundant_exhaustive, t.proven_redundant_sat
        ),
        t.aborted.to_string(),
        format!("{:.2}%", t.coverage_percent),
        format!("{:.2}%", t.testable_coverage_percent),
    ]];
    let table = crate::cli::util::table(
        &[
            "vectors",
            "collapsed",
            "detected",
            "proven redundant",
            "aborted",
            "coverage",
            "testable coverage",
        ],
        &rows,
    );
    writeln!(o, "{table}").map_err(stdout_error)?;
    let rows: Vec<[String; 4]> = t
        .faults
        .iter()
        .take(50)
        .map(|f| {
            let outcome = match &f.top_up {
                TopUpStatus::Detected { vector, targeted } => format!(
                    "detected by top-up vector {vector}{}",
                    if *targeted {
                        ""
                    } else {
                        " (made for another fault)"
                    }
                ),
                TopUpStatus::ProvenRedundant { method } => {
                    format!(
                        "proven redundant ({})",
                        method.split(':').next().unwrap_or(method)
                    )
                }
                TopUpStatus::Aborted { conflicts, budget } => {
                    format!(
                        "aborted (budget {budget}, spent {conflicts} conflicts): nothing claimed"
                    )
                }
            };
            [
                f.fault.net.clone(),
                format!("stuck-at-{}", f.fault.stuck_at),
                f.fault.site.clone(),
                outcome,
            ]
        })
        .collect();
    if !rows.is_empty() {
        writeln!(
            o,
            "{}",
            crate::cli::util::table(&["net", "fault", "site", "top-up"], &rows)
        )
        .map_err(stdout_error)?;
        if t.faults.len() > 50 {
            writeln!(
                o,
                "... and {} more (see --format json)",
                t.faults.len() - 50
            )
            .map_err(stdout_error)?;
        }
    }
    writeln!(
        o,
        "testable coverage is detected / (collapsed - proven redundant). A SAT proof of \
         redundancy covers the outputs the spec observes, for every input; an aborted fault is \
         undecided."
    )
    .map_err(stdout_error)?;
    match out_dir {
        Some(d) => writeln!(
            o,
            "wrote the set plus {} top-up vector{} to {}",
            t.vectors_added,
            if t.vectors_added == 1 { "" } else { "s" },
            d.display()
        ),
        None => writeln!(o, "no --out given: nothing written"),
    }
    .map_err(stdout_error)?;
    Ok(())
}
