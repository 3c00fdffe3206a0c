//! Renders a [`CheckReport`] for people (tables) and for CI dashboards (JUnit XML).
//!
//! Pure functions from a report to text; the caller writes files. JUnit XML is built with the
//! quick-junit library: one test suite per unit, one test case per corner class (failing for
//! mismatches and for missed bins, skipped when unreachable at this width), plus one case for
//! the log's completeness.

use quick_junit::{NonSuccessKind, Report, TestCase, TestCaseStatus, TestSuite};
use tabled::builder::Builder;
use tabled::settings::Style;

use crate::verdict::check::{CheckReport, Verdict};
use crate::verdict::coverage::ClassStatus;

fn table(header: &[&str], rows: Vec<Vec<String>>) -> String {
    let mut b = Builder::default();
    b.push_record(header.iter().map(|h| h.to_string()));
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.to_string()
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
    let mut telling: Vec<&crate::verdict::coverage::BinFailures> = failing
        .iter()
        .flat_map(|k| k.failing_bins.iter())
        .filter(|b| b.failures == b.hits && b.hits > 1)
        .collect();
    telling.sort_by(|x, y| y.hits.cmp(&x.hits).then(x.bin.cmp(&y.bin)));
    if !telling.is_empty() {
        let list: Vec<String> = telling
            .iter()
            .take(8)
            .map(|b| format!("{} ({}/{})", b.bin, b.failures, b.hits))
            .collect();
        s.push_str(&format!(
            "strongest pointers (bins where every hit failed, most hits first): {}\n",
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
                    "             differing bits: {:?}\n",
                    o.differing_bits
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
            "... and {more} more failing vectors (raise --max-failures to see them)\n"
        ));
    }
    let p = &r.log_problems;
    if p.missing > 0 {
        s.push_str(&format!(
            "\nlog is missing {} vectors of the set; first: {:?}\n",
            p.missing, p.missing_first
        ));
    }
    if p.duplicate_count > 0 {
        s.push_str(&format!(
            "log repeats {} indices (index, line): {:?}\n",
            p.duplicate_count, p.duplicates
        ));
    }
    if !p.out_of_range.is_empty() {
        s.push_str(&format!(
            "log has indices outside the vector set (index, line): {:?}\n",
            p.out_of_range
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
    format!(
        "verdict: {word}: {} passed, {} failed, {} unknown{gate}",
        r.passed, r.failed, r.unknown
    )
}

/// JUnit XML: one test case per corner class, plus one for the log's completeness.
pub fn render_junit(r: &CheckReport) -> String {
    let mut report = Report::new("arithvec");
    let mut suite = TestSuite::new(format!("arithvec.{}", r.unit));
    for k in &r.classes {
        let status = match k.status {
            ClassStatus::Covered => TestCaseStatus::success(),
            ClassStatus::Unreachable => {
                let mut s = TestCaseStatus::skipped();
                s.set_message("no bin of this class is reachable at this width");
                s
            }
            ClassStatus::Failing => {
                let mut s = TestCaseStatus::non_success(NonSuccessKind::Failure);
                s.set_message(format!(
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
                let mut s = TestCaseStatus::non_success(NonSuccessKind::Failure);
                s.set_message(format!(
                    "coverage: {} of {} bins reached {} hits",
                    k.bins_covered, k.bins_total, r.coverage.at_least
                ));
                s.set_description(format!("missed bins: {}", k.missed_bins.join(" ")));
                s
            }
        };
        let mut case = TestCase::new(k.id.clone(), status);
        case.set_classname(format!("arithvec.{}", r.unit));
        suite.add_test_case(case);
    }
    let p = &r.log_problems;
    let complete = !(p.missing > 0
        || p.duplicate_count > 0
        || p.out_of_step.is_some()
        || !p.out_of_range.is_empty());
    let status = if complete {
        TestCaseStatus::success()
    } else {
        let mut s = TestCaseStatus::non_success(NonSuccessKind::Failure);
        s.set_message(format!(
            "log incomplete or inconsistent: {} missing, {} duplicate, {} out of range, out of step: {}",
            p.missing,
            p.duplicate_count,
            p.out_of_range.len(),
            p.out_of_step.as_ref().map_or("no".to_string(), |o| format!("from index {}", o.first_index))
        ));
        s
    };
    let mut case = TestCase::new("log.complete", status);
    case.set_classname(format!("arithvec.{}", r.unit));
    suite.add_test_case(case);
    report.add_test_suite(suite);
    report.to_string().unwrap_or_default()
}
