//! `arithvec grade --model transition`: transition-fault coverage of a vector set applied as
//! launch/capture pairs, as a table or one JSON document.

use std::io::Write;

use arithvec::{Error, Grader, Manifest, PairSelection, Problem, TransitionOutcome, VectorSet};

use crate::cli::grade::{GradeArgs, GradeFormat, PairsArg};
use crate::cli::util::{out, stdout_error, Outcome};

/// The pairs graded: the set's designated launch/capture pairs when it has them (a whole,
/// unsharded, unselected `gen --pairs` set) unless `--pairs consecutive`, else every
/// consecutive pair.
fn pair_selection(manifest: &Manifest, arg: PairsArg) -> Result<PairSelection, Error> {
    let designated = manifest
        .pairs
        .as_ref()
        .filter(|_| manifest.selection.is_none() && manifest.shard.is_none());
    match (arg, designated) {
        (PairsArg::Consecutive, _) | (PairsArg::Auto, None) => Ok(PairSelection::Consecutive),
        (PairsArg::Auto | PairsArg::LaunchCapture, Some(p)) => Ok(PairSelection::LaunchCapture {
            first: (p.first_index - manifest.first_index) as usize,
            pairs: p.pairs as usize,
        }),
        (PairsArg::LaunchCapture, None) => Err(Error::problem(
            Problem::new(
                "--pairs",
                "launch-capture needs a whole set written by `gen --pairs` (its manifest \
                 records where the pairs are); this set has no designated pairs",
            )
            .field("pairs"),
        )),
    }
}

/// Grades and reports. `None` when the fault-free netlist is not the spec (the caller
/// reports that as for stuck-at grading).
pub fn grade_transition(
    args: &GradeArgs,
    spec_name: &str,
    manifest: &Manifest,
    set: &VectorSet,
    grader: &Grader,
    quiet: bool,
) -> Result<Option<Outcome>, Error> {
    let pairs = pair_selection(manifest, args.pairs)?;
    let report = match grader.grade_transitions(&set.inputs, &set.expected, pairs)? {
        TransitionOutcome::Graded(r) => r,
        TransitionOutcome::NotTheSpec(_) => return Ok(None),
    };
    let short = args.require.is_some_and(|r| report.coverage_percent < r);
    let mut o = out();
    if args.format == GradeFormat::Json {
        let mut doc = serde_json::to_value(&report).expect("report serialises");
        if let Some(map) = doc.as_object_mut() {
            map.insert("model".into(), "transition".into());
            map.insert("reference".into(), "golden".into());
        }
        let text = serde_json::to_string_pretty(&doc).expect("report serialises");
        writeln!(o, "{text}").map_err(stdout_error)?;
    } else if !quiet {
        writeln!(
            o,
            "transition faults (slow-to-rise, slow-to-fall) of module {} ({} of unit {})",
            report.module,
            crate::cli::util::counted(report.vectors as u64, "vector", "vectors"),
            spec_name
        )
        .map_err(stdout_error)?;
        writeln!(o, "pairs: {}", report.pair_rule).map_err(stdout_error)?;
        let rows = vec![[
            report.vectors.to_string(),
            report.pairs.to_string(),
            report.faults.to_string(),
            report.collapsed.to_string(),
            report.detected.to_string(),
            report.undetected.len().to_string(),
            format!("{:.2}%", report.coverage_percent),
        ]];
        let t = crate::cli::util::table(
            &[
                "vectors",
                "pairs",
                "faults",
                "collapsed",
                "detected",
                "undetected",
                "coverage",
            ],
            &rows,
        );
        writeln!(o, "{t}").map_err(stdout_error)?;
        if !report.unchecked_outputs.is_empty() {
            writeln!(
                o,
                "not observed: {} (not in the spec's [ports]); {} gate{} feeding only {} not \
                 graded",
                report.unchecked_outputs.join(", "),
                report.ungraded_gates,
                if report.ungraded_gates == 1 { "" } else { "s" },
                if report.ungraded_gates == 1 {
                    "them is"
                } else {
                    "them are"
                }
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
                        f.transition.to_string(),
                        f.site.clone(),
                        match &f.driver_cell {
                            Some(c) => format!("{c} ({})", f.driver_type),
                            None => f.driver_type.clone(),
                        },
                        f.launching_pairs.to_string(),
                        f.capturing_pairs.to_string(),
                    ]
                })
                .collect();
            writeln!(o, "undetected transition faults:").map_err(stdout_error)?;
            writeln!(
                o,
                "{}",
                crate::cli::util::table(
                    &[
                        "net",
                        "fault",
                        "site",
                        "driven by",
                        "pairs launching",
                        "pairs capturing"
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
            "a pair detects a transition fault when its launch vector sets the line to the \
             initial value and its capture vector detects the line stuck at that value; \
             faults are collapsed only through buffers and inverters. Whether the pairs run at \
             the unit's rated clock is up to the testbench and the tester. Transition coverage \
             is evidence, not proof."
        )
        .map_err(stdout_error)?;
    }
    o.flush().map_err(stdout_error)?;
    Ok(Some(if short {
        Outcome::CoverageShort
    } else {
        Outcome::Success
    }))
}
