//! The order pass of a clocked unit's check: did the unit give one result per vector, in
//! order, and were its outputs known after reset?
//!
//! The clocked testbench (`sim::testbench::clocked`) logs results in the order they came,
//! naming the k-th result after the k-th vector issued. A unit that drops, repeats or
//! reorders results therefore shows up as rows whose outputs are another vector's result, and
//! as fewer or more rows than vectors. Judged row by row, that is a flood of mismatches that
//! hides the cause; this pass names the cause instead: "fewer results than vectors", "more
//! results than vectors" or "results out of order", which replace the mismatch, missing-row
//! and out-of-range reasons they explain in the verdict line (the failing rows stay in the
//! report as evidence). A row is "displaced" when its known outputs differ from its own
//! vector's expected outputs but equal those of a vector at most [`WINDOW`] places away.
//!
//! It also reads the bench's comment lines (`# arithvec-tb: ...`): the reset sample and the
//! time-out. Memory is constant: counters and the first displaced row.

use std::io::BufRead;

use serde::{Deserialize, Serialize};

use crate::arith::model::{Model, Outputs};
use crate::corners::generate::Generator;
use crate::sim::log::LogRow;
use crate::spec::{Signal, Spec};
use crate::verdict::check::CheckReport;

/// How far from its own index a displaced row's result is looked for.
pub const WINDOW: u64 = 8;

/// The marker every bench comment line the pass reads starts with.
const MARKER: &str = "# arithvec-tb:";

/// A row holding another vector's result.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Displaced {
    /// The row's index (the vector whose result it should hold).
    pub index: u64,
    /// Its line in the log.
    pub line: usize,
    /// The vector whose result it holds.
    pub holds: u64,
}

/// The order pass's findings (the `timing` object of the JSON report).
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct TimingReport {
    /// Result rows in the log.
    pub results: u64,
    /// Vectors the testbench applied.
    pub vectors: u64,
    /// The testbench's time-out line, if it timed out.
    pub timeout: Option<String>,
    /// Rows holding another vector's result.
    pub displaced: u64,
    /// The first of them.
    pub first_displaced: Option<Displaced>,
    /// The reset sample, as (port, value) pairs, when the log has one.
    pub reset_sample: Option<Vec<(String, String)>>,
    /// Whether `check --reset-known` required the outputs known after reset.
    pub reset_required: bool,
    /// Ports with unknown (x/z/u) digits in the reset sample.
    pub reset_unknown: Vec<String>,
    /// The reasons for a failing verdict this pass found (empty: count, order and reset
    /// are fine).
    pub reasons: Vec<String>,
}

/// The bench's comment lines: reset sample and time-out.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Markers {
    /// The reset sample's (port, value) pairs.
    pub reset_sample: Option<Vec<(String, String)>>,
    /// The time-out line, without the marker.
    pub timeout: Option<String>,
}

/// Reads the bench's comment lines from a log.
pub fn scan_markers<R: BufRead>(reader: R) -> std::io::Result<Markers> {
    let mut markers = Markers::default();
    for line in reader.lines() {
        let line = line?;
        let Some(rest) = line.trim_start().strip_prefix(MARKER) else {
            continue;
        };
        let rest = rest.trim();
        if let Some(sample) = rest.strip_prefix("reset sample:") {
            let pairs = sample
                .split_whitespace()
                .filter_map(|p| p.split_once('='))
                .map(|(k, v)| (k.to_string(), v.to_string()))
                .collect();
            markers.reset_sample = Some(pairs);
        } else if rest.starts_with("timeout:") {
            markers.timeout = Some(rest.to_string());
        }
    }
    Ok(markers)
}

/// The row-by-row half of the pass.
pub struct TimingPass<'g> {
    model: Model,
    generator: &'g Generator,
    outputs: Vec<Signal>,
    first_index: u64,
    vectors: u64,
    results: u64,
    position: u64,
    displaced: u64,
    first_displaced: Option<Displaced>,
}

impl<'g> TimingPass<'g> {
    /// A pass over a log of `vectors` results starting at global index `first_index`.
    pub fn new(
        spec: &Spec,
        generator: &'g Generator,
        first_index: u64,
        vectors: u64,
    ) -> TimingPass<'g> {
        TimingPass {
            model: Model::new(spec),
            outputs: spec.outputs().into_iter().map(|(s, _)| s).collect(),
            generator,
            first_index,
            vectors,
            results: 0,
            position: first_index,
            displaced: 0,
            first_displaced: None,
        }
    }

    fn expected(&self, index: u64) -> Option<Outputs> {
        if index < self.first_index || index >= self.first_index + self.vectors {
            return None;
        }
        self.generator
            .vector(index)
            .map(|v| self.model.evaluate(&v))
    }

    /// True when every known output of `row` equals `expected`'s and none is unknown.
    fn matches(&self, row: &LogRow, expected: &Outputs) -> bool {
        self.outputs.iter().all(|&s| match row.get(s) {
            None => true,
            Some(_) if !expected.is_specified(s) => true,
            Some(v) => v.is_known() && v.bits == expected.get(s),
        })
    }

    /// Takes one result row.
    pub fn row(&mut self, row: &LogRow) {
        self.results += 1;
        let index = row.index.unwrap_or(self.position);
        self.position = index.saturating_add(1);
        let Some(own) = self.expected(index) else {
            return;
        };
        if self.matches(row, &own) {
            return;
        }
        let lo = index.saturating_sub(WINDOW);
        for j in lo..=index.saturating_add(WINDOW) {
            if j == index {
                continue;
            }
            if let Some(other) = self.expected(j) {
                if self.matches(row, &other) {
                    self.displaced += 1;
                    if self.first_displaced.is_none() {
                        self.first_displaced = Some(Displaced {
                            index,
                            line: row.line,
                            holds: j,
                        });
                    }
                    return;
                }
            }
        }
    }

    /// The findings, with the bench's markers; `reset_known` is `check --reset-known`.
    pub fn finish(self, markers: Markers, reset_known: bool) -> TimingReport {
        let mut reasons = Vec::new();
        let timed_out = markers
            .timeout
            .as_ref()
            .map_or(String::new(), |_| "; the testbench timed out".to_string());
        if self.results < self.vectors {
            let dropped = match &self.first_displaced {
                Some(d) if d.holds > d.index => format!(
                    "; vector {}'s result never came, later results are shifted",
                    d.index
                ),
                _ => String::new(),
            };
            reasons.push(format!(
                "fewer results than vectors ({} of {}{timed_out}{dropped})",
                self.results, self.vectors
            ));
        } else if self.results > self.vectors {
            reasons.push(format!(
                "more results than vectors ({} for {} vectors)",
                self.results, self.vectors
            ));
        }
        let mut reset_unknown = Vec::new();
        if reset_known {
            match &markers.reset_sample {
                None => reasons.push(
                    "no reset sample in the log (the clocked testbench logs one when [timing] \
                     names a reset port)"
                        .to_string(),
                ),
                Some(pairs) => {
                    reset_unknown = pairs
                        .iter()
                        .filter(|(_, v)| v.chars().any(|c| !c.is_ascii_hexdigit()))
                        .map(|(p, _)| p.clone())
                        .collect();
                    if !reset_unknown.is_empty() {
                        reasons.push(format!(
                            "outputs unknown after reset: {}",
                            reset_unknown.join(", ")
                        ));
                    }
                }
            }
        }
        TimingReport {
            results: self.results,
            vectors: self.vectors,
            timeout: markers.timeout,
            displaced: self.displaced,
            first_displaced: self.first_displaced,
            reset_sample: markers.reset_sample,
            reset_required: reset_known,
            reset_unknown,
            reasons,
        }
    }
}

/// Puts the pass's findings into `report`: a count or order problem fails the run and
/// replaces the reasons it explains (mismatches, missing rows, rows outside the set); an
/// unknown reset output fails it too.
pub fn apply_timing(report: &mut CheckReport, timing: TimingReport) {
    let mut timing = timing;
    // With the right count, rows holding a nearby vector's result mean reordering only when
    // they are most of the failing rows; a few coincidences among many mismatches (a unit
    // that computes wrongly) stay mismatches.
    if timing.results == timing.vectors
        && timing.displaced > 0
        && timing.displaced.saturating_mul(2) >= report.failed.max(1)
    {
        let first = timing.first_displaced.as_ref().map_or(String::new(), |d| {
            format!(
                "; the row for vector {} (line {}) holds vector {}'s result",
                d.index, d.line, d.holds
            )
        });
        timing.reasons.insert(
            0,
            format!(
                "results out of order ({} of {} rows hold another vector's result{first})",
                timing.displaced, timing.vectors
            ),
        );
    }
    if !timing.reasons.is_empty() {
        let sequence = timing.results != timing.vectors
            || timing.reasons[0].starts_with("results out of order");
        if sequence {
            report.verdict_reasons.retain(|r| {
                !(r.starts_with("log incomplete")
                    || r.starts_with("rows outside the vector set")
                    || r.contains("mismatch"))
            });
        }
        let mut reasons = timing.reasons.clone();
        reasons.append(&mut report.verdict_reasons);
        report.verdict_reasons = reasons;
        report.verdict = crate::verdict::check::Verdict::Fail;
    }
    report.timing = Some(timing);
}
