//! Renders a [`CheckReport`] for people (tables) and for CI dashboards (JUnit XML).
//!
//! Pure functions from a report to text; the caller writes files. JUnit XML is built with the
//! quick-junit library: one test suite per unit with a case for the gate, one per output port,
//! one per corner class and one for the log's completeness (see [`render_junit_timed`]); the
//! file has a failure exactly when the exit code is not 0.

use quick_junit::{NonSuccessKind, Report, TestCase, TestCaseStatus, TestSuite};

use crate::verdict::check::{CheckReport, Verdict};
use crate::verdict::coverage::ClassStatus;

fn table(header: &[&str], rows: Vec<Vec<String>>) -> String {
    crate::verdict::table::render_table(header, rows)
}

/// Which classes the text report lists.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ClassRows {
    /// Every class.
    All,
    /// Only classes not covered (missed or failing).
    Problems,
}

/// The human-readable report.
pub fn render_text(r: &CheckReport, rows: ClassRows) -> String {
    let mut s = String::new();
    let c = &r.coverage;
    s.push_str(&format!(
        "arithvec check of unit {} ({})\n",
        r.unit,
        r.logs.join(", ")
    ));
    s.push_str(&table(
        &[
            "vectors",
            "passed",
            "failed",
            "unknown",
            "classes covered",
            "bins covered",
        ],
        vec![vec![
            r.vectors.to_string(),
            r.passed.to_string(),
            r.failed.to_string(),
            r.unknown.to_string(),
            format!("{} / {} ({:.2}%)", c.covered, c.total, c.percent),
            format!(
                "{} / {} ({:.2}%)",
                c.bins_covered, c.bins_total, c.bins_percent
            ),
        ]],
    ));
    s.push('\n');
    s.push_str(&output_tally_line(r));
    s.push('\n');
    let class_rows: Vec<Vec<String>> = r
        .classes
        .iter()
        .filter(|k| k.status != ClassStatus::Unreachable)
        .filter(|k| rows == ClassRows::All || k.status != ClassStatus::Covered)
        .map(|k| {
            let status = match k.status {
                ClassStatus::Covered => "covered".to_string(),
                ClassStatus::Missed => {
                    format!("missed ({} of {} bins)", k.bins_covered, k.bins_total)
                }
                ClassStatus::Failing => "failing".to_string(),
                ClassStatus::Unreachable => "unreachable".to_string(),
            };
            vec![
                k.id.clone(),
                k.hits.to_string(),
                k.failures.to_string(),
                status,
            ]
        })
        .collect();
    if !class_rows.is_empty() {
        s.push_str(&table(&["class", "hits", "failures", "status"], class_rows));
        s.push('\n');
    }
    for k in r.classes.iter().filter(|k| k.status == ClassStatus::Missed) {
        if !k.missed_bins.is_empty() {
            s.push_str(&format!(
                "missed in {}: {}{}\n",
                k.id,
                k.missed_bins.join(" "),
                if k.bins_total - k.bins_covered > k.missed_bins.len() {
                    " ..."
                } else {
                    ""
                }
            ));
        }
    }
    let failing: Vec<_> = r
        .classes
        .iter()
        .filter(|k| k.status == ClassStatus::Failing)
        .collect();
    // Strongest pointers: failing bins ranked by how unlikely their failures are by chance
    // (DEVELOPERS.md, "Ranking failing bins"); a bin failing no more often than the run as
    // a whole (surprise 0) points nowhere and is left out.
    let mut telling: Vec<&crate::verdict::coverage::BinFailures> = failing
        .iter()
        .flat_map(|k| k.failing_bins.iter())
        .filter(|b| b.surprise > 0.0)
        .collect();
    telling.sort_by(|x, y| crate::verdict::coverage::rank_failing_bins(x, y));
    if !telling.is_empty() {
        let list: Vec<String> = telling
            .iter()
            .take(8)
            .map(|b| {
                format!(
                    "{} ({}/{}, surprise {:.2})",
                    b.bin, b.failures, b.hits, b.surprise
                )
            })
            .collect();
        s.push_str(&format!(
            "strongest pointers (failing bins least likely by chance; surprise = -log10 of \
             the chance of that many failures in the bin): {}\n",
            list.join(", ")
        ));
    }
    if !failing.is_empty() {
        s.push_str("failing bins per class, worst first (failures/hits):\n");
        for k in failing {
            let list: Vec<String> = k
                .failing_bins
                .iter()
                .take(6)
                .map(|b| format!("{} ({}/{})", b.bin, b.failures, b.hits))
                .collect();
            s.push_str(&format!("  {}: {}\n", k.id, list.join(", ")));
        }
    }
    if let Some(line) = crate::verdict::bitmap::bit_map_line(r) {
        s.push_str(&format!("{line}\n"));
    }
    for f in &r.failures {
        s.push_str(&format!(
            "\n{} at vector {} (log line {})\n",
            f.kind, f.index, f.line
        ));
        for i in &f.inputs {
            s.push_str(&format!("  {:<10} 0x{}  = {}\n", i.port, i.hex, i.value));
        }
        for o in &f.outputs {
            if o.status == "ok" {
                continue;
            }
            s.push_str(&format!(
                "  {:<10} expected 0x{} ({})  got 0x{}  [{}]\n",
                o.port, o.expected, o.expected_value, o.got, o.status
            ));
            if let (Some(e), Some(g)) = (&o.expected_bin, &o.got_bin) {
                if e.len() > 1 {
                    let marks: String = e
                        .chars()
                        .zip(g.chars())
                        .map(|(a, b)| if a != b { '^' } else { ' ' })
                        .collect();
                    s.push_str(&format!("             expected {e}\n             got      {g}\n                      {marks}\n"));
                }
            } else if !o.differing_bits.is_empty() {
                s.push_str(&format!(
                    "             differing bits: {}\n",
                    list_numbers(&o.differing_bits)
                ));
            }
            if !o.got_as.is_empty() {
                let list: Vec<String> = o.got_as.iter().map(|(e, v)| format!("{e} {v}")).collect();
                s.push_str(&format!("             got read as: {}\n", list.join(", ")));
            }
        }
        s.push_str(&format!(
            "  classes: {}\n  reproduce: {}\n",
            f.classes.join(" "),
            f.repro
        ));
    }
    let more = r.failed + r.unknown - r.failures.len() as u64;
    if more > 0 {
        s.push_str(&format!(
            "... and {more} more failing {} (raise --max-failures to see them)\n",
            plural(more, "vector", "vectors")
        ));
    }
    let p = &r.log_problems;
    if p.missing > 0 {
        s.push_str(&format!(
            "\nlog is missing {} {} of the set; first: {}\n",
            p.missing,
            plural(p.missing, "vector", "vectors"),
            list_numbers(&p.missing_first)
        ));
    }
    if p.duplicate_count > 0 {
        s.push_str(&format!(
            "log repeats {} {}: {}\n",
            p.duplicate_count,
            plural(p.duplicate_count, "index", "indices"),
            list_lines(&p.duplicates)
        ));
    }
    if !p.overlapping.is_empty() {
        let ranges: Vec<String> = p
            .overlapping
            .iter()
            .map(|r| format!("{}..={}", r[0], r[1]))
            .collect();
        s.push_str(&format!(
            "merged runs checked these indices more than once: {}\n",
            ranges.join(", ")
        ));
    }
    if !p.out_of_range.is_empty() {
        s.push_str(&format!(
            "log has indices outside the vector set: {}\n",
            list_lines(&p.out_of_range)
        ));
    }
    if let Some(o) = &p.out_of_step {
        s.push_str(&format!(
            "testbench out of step: {} rows carry operands that are not those of their index, \
             starting at index {} (log line {}); the testbench applies vectors out of order or \
             logs them shifted\n",
            o.count, o.first_index, o.first_line
        ));
    }
    if p.bad_line_count > 0 {
        s.push_str(&format!(
            "{} unparseable lines skipped (--lenient):\n",
            p.bad_line_count
        ));
        for l in &p.bad_lines {
            s.push_str(&format!("  {l}\n"));
        }
    }
    s.push_str(&format!("\n{}\n", r.note));
    s.push_str(&verdict_line(r));
    s.push('\n');
    s
}

/// The headline tally: per output port, rows wrong and unknown, or why it was not compared.
fn output_tally_line(r: &CheckReport) -> String {
    if r.output_ports.is_empty() {
        return String::new();
    }
    let parts: Vec<String> = r
        .output_ports
        .iter()
        .map(|p| {
            if p.compared {
                format!("{} {} wrong, {} unknown", p.port, p.wrong, p.unknown)
            } else if r.outputs_narrowed {
                format!("{} not compared (left out by --outputs)", p.port)
            } else {
                format!("{} NEVER COMPARED (no column in the log)", p.port)
            }
        })
        .collect();
    let mut line = format!("outputs: {}\n", parts.join("; "));
    for o in &r.operation_outputs {
        line.push_str(&format!(
            "  {} (code 0x{:x}) compared: {}{}\n",
            o.operation,
            o.code,
            if o.compared.is_empty() {
                "nothing".to_string()
            } else {
                o.compared.join(", ")
            },
            if o.not_compared.is_empty() {
                String::new()
            } else {
                format!("; not defined, not compared: {}", o.not_compared.join(", "))
            }
        ));
    }
    line
}

/// The one-line verdict.
pub fn verdict_line(r: &CheckReport) -> String {
    let gate = match r.gate.require {
        Some(req) => format!(
            "; class coverage {:.2}% against a requirement of {req}%",
            r.coverage.percent
        ),
        None => format!("; class coverage {:.2}%", r.coverage.percent),
    };
    let word = match r.verdict {
        Verdict::Pass => "PASS",
        Verdict::Fail => "FAIL",
        Verdict::CoverageShort => "COVERAGE SHORT",
    };
    let reasons = if r.verdict_reasons.is_empty() {
        String::new()
    } else {
        format!("{}; ", r.verdict_reasons.join("; "))
    };
    let narrowed = narrowing(r).map_or(String::new(), |n| format!("; {n}"));
    format!(
        "verdict: {word}: {reasons}{} passed, {} failed, {} unknown{gate}{narrowed}",
        r.passed, r.failed, r.unknown
    )
}

/// "only y, co compared (--outputs); not compared: ovf, zero" when the user narrowed the check.
fn narrowing(r: &CheckReport) -> Option<String> {
    if !r.outputs_narrowed {
        return None;
    }
    let list = |compared: bool| {
        r.output_ports
            .iter()
            .filter(|p| p.compared == compared)
            .map(|p| p.port.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    };
    Some(format!(
        "only {} compared (--outputs); not compared: {}",
        list(true),
        list(false)
    ))
}

/// JUnit XML without times (see [`render_junit_timed`]).
pub fn render_junit(r: &CheckReport) -> String {
    render_junit_timed(r, None)
}

/// JUnit XML that agrees with the exit code: a test case for the gate itself (failing
/// exactly when the exit code is not 0), one per output port (failing when it had wrong or
/// unknown values or was never compared; skipped when left out on purpose with `--outputs`),
/// one per corner class and one for the log's completeness. A missed class is a failure only
/// when a coverage requirement is set and not met (exit 3); otherwise it is skipped with the
/// reason. `<properties>` carry the spec hash, seed, tool version, requirement and the
/// outputs compared. `elapsed` is the check's wall time: the suite and the gate case get it;
/// the other cases were judged in the same single pass and get 0.
pub fn render_junit_timed(r: &CheckReport, elapsed: Option<std::time::Duration>) -> String {
    let classname = format!("arithvec.{}", r.unit);
    let mut report = Report::new("arithvec");
    let mut suite = TestSuite::new(classname.clone());
    suite.add_property(("tool", r.tool.as_str()));
    suite.add_property(("version", r.version.as_str()));
    suite.add_property(("unit", r.unit.as_str()));
    suite.add_property(("spec_sha256", r.spec_sha256.as_str()));
    suite.add_property((
        "seed",
        r.seed
            .map_or("none (no vector set given)".to_string(), |s| s.to_string())
            .as_str(),
    ));
    suite.add_property((
        "require",
        r.gate
            .require
            .map_or("none".to_string(), |q| format!("{q}%"))
            .as_str(),
    ));
    let compared: Vec<&str> = r
        .output_ports
        .iter()
        .filter(|p| p.compared)
        .map(|p| p.port.as_str())
        .collect();
    suite.add_property(("outputs_compared", compared.join(",").as_str()));
    suite.add_property((
        "outputs_narrowed",
        if r.outputs_narrowed { "true" } else { "false" },
    ));
    let zero = std::time::Duration::ZERO;
    let add = |suite: &mut TestSuite, name: String, status: TestCaseStatus, time| {
        let mut case = TestCase::new(name, status);
        case.set_classname(classname.clone());
        case.set_time(time);
        suite.add_test_case(case);
    };
    let failure = |message: String| {
        let mut s = TestCaseStatus::non_success(NonSuccessKind::Failure);
        s.set_message(message);
        s
    };
    let skipped = |message: String| {
        let mut s = TestCaseStatus::skipped();
        s.set_message(message);
        s
    };
    // The gate: the verdict and its exit code.
    let gate = match r.verdict {
        Verdict::Pass => TestCaseStatus::success(),
        _ => failure(verdict_line(r)),
    };
    add(&mut suite, "gate".into(), gate, elapsed.unwrap_or(zero));
    for p in &r.output_ports {
        let status = if !p.compared && r.outputs_narrowed {
            skipped(format!(
                "{} was left out of the comparison by --outputs",
                p.port
            ))
        } else if !p.compared {
            failure(format!(
                "{} was never compared: the log has no column for it",
                p.port
            ))
        } else if p.wrong > 0 || p.unknown > 0 {
            failure(format!(
                "{} {} wrong, {} unknown",
                p.port, p.wrong, p.unknown
            ))
        } else {
            TestCaseStatus::success()
        };
        add(&mut suite, format!("output.{}", p.port), status, zero);
    }
    let coverage_gated = r.verdict == Verdict::CoverageShort;
    for k in &r.classes {
        let status = match k.status {
            ClassStatus::Covered => TestCaseStatus::success(),
            ClassStatus::Unreachable => {
                skipped("no bin of this class is reachable at this width".into())
            }
            ClassStatus::Failing => {
                let mut s = failure(format!(
                    "{} of {} vectors in this class failed",
                    k.failures, k.hits
                ));
                let bins: Vec<String> = k
                    .failing_bins
                    .iter()
                    .map(|b| format!("{} {}/{}", b.bin, b.failures, b.hits))
                    .collect();
                s.set_description(format!("failing bins (failures/hits): {}", bins.join(", ")));
                s
            }
            ClassStatus::Missed => {
                let message = format!(
                    "coverage: {} of {} bins reached {} hits",
                    k.bins_covered, k.bins_total, r.coverage.at_least
                );
                let mut s = if coverage_gated {
                    failure(message)
                } else {
                    skipped(match r.gate.require {
                        None => format!("{message}; not a failure: no coverage requirement set"),
                        Some(q) => format!(
                            "{message}; not a failure: class coverage {:.2}% meets the \
                             requirement of {q}%",
                            r.coverage.percent
                        ),
                    })
                };
                s.set_description(format!("missed bins: {}", k.missed_bins.join(" ")));
                s
            }
        };
        add(&mut suite, k.id.clone(), status, zero);
    }
    let p = &r.log_problems;
    let complete = !(p.missing > 0
        || p.duplicate_count > 0
        || p.out_of_step.is_some()
        || !p.out_of_range.is_empty());
    let status = if complete {
        TestCaseStatus::success()
    } else {
        failure(format!(
            "log incomplete or inconsistent: {} missing, {} duplicate, {} out of range, out of step: {}",
            p.missing,
            p.duplicate_count,
            p.out_of_range.len(),
            p.out_of_step.as_ref().map_or("no".to_string(), |o| format!("from index {}", o.first_index))
        ))
    };
    add(&mut suite, "log.complete".into(), status, zero);
    if let Some(t) = elapsed {
        suite.set_time(t);
    }
    report.add_test_suite(suite);
    report.to_string().unwrap_or_default()
}

/// `word` for one, `words` otherwise.
pub(crate) fn plural(count: u64, one: &'static str, many: &'static str) -> &'static str {
    if count == 1 {
        one
    } else {
        many
    }
}

/// Numbers for people: `99, 100, 101` (not Rust's `[99, 100, 101]`).
pub(crate) fn list_numbers<T: std::fmt::Display>(items: &[T]) -> String {
    items
        .iter()
        .map(|i| i.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// (index, log line) pairs for people: `48 (line 102), 49 (line 103)`.
pub(crate) fn list_lines(items: &[(u64, usize)]) -> String {
    items
        .iter()
        .map(|(index, line)| format!("{index} (line {line})"))
        .collect::<Vec<_>>()
        .join(", ")
}
