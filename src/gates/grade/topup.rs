//! Test top-up: a SAT fault miter per fault the vector set leaves undetected. Sat gives a new
//! vector, fault-simulated at once against every fault still open (so one vector can close
//! several); Unsat proves the fault redundant; a spent conflict budget leaves it "aborted".
//! The whole set (old and new vectors) is then graded again from scratch, and every claim
//! made here is checked against that grade before it is reported.

use serde::Serialize;

use super::{Grader, NetlistMismatch};
use crate::arith::model::{Inputs, Model};
use crate::arith::word::Word;
use crate::error::{Error, Problem, Result};
use crate::gates::fault::{
    detection_matrix_on, grade_with, FaultEntry, FaultReport, GradeOptions, Redundancy,
    SimulationMode,
};
use crate::gates::sat::{fault_miter, Answer};
use crate::sets::vectorset::TopUpVector;

/// How a SAT verdict of redundancy was reached (the report's `method`).
pub const SAT_REDUNDANCY_METHOD: &str =
    "SAT: the fault miter (good and faulty copies of the fault's cone, outputs the spec \
     observes) is unsatisfiable";

/// How an exhaustive verdict of redundancy was reached.
pub const EXHAUSTIVE_REDUNDANCY_METHOD: &str =
    "exhaustive simulation of every combination of the input bits the observing outputs depend on";

/// How a top-up vector was found.
pub const TOP_UP_METHOD: &str = "SAT: satisfying input of the fault miter";

/// What top-up concluded for one fault the set had left undetected.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "status", rename_all = "snake_case")]
pub enum TopUpStatus {
    /// Detected by top-up vector `vector` (0 = the first added), which was made for it
    /// (`targeted`) or for an earlier fault and detects this one too.
    Detected {
        /// Index among the added vectors.
        vector: usize,
        /// True when the vector was made for this fault.
        targeted: bool,
    },
    /// Proven redundant: no input detects it at the observed outputs.
    ProvenRedundant {
        /// How.
        method: String,
    },
    /// The conflict budget ran out before SAT decided: nothing is claimed.
    Aborted {
        /// Conflicts the solver spent (its own count; may pass the budget, which it checks
        /// between propagations).
        conflicts: u64,
        /// The per-fault budget.
        budget: u64,
    },
}

/// One fault the original set left undetected, and what top-up found.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct TopUpFault {
    /// The fault as the grade report names it.
    #[serde(flatten)]
    pub fault: FaultEntry,
    /// What top-up found.
    pub top_up: TopUpStatus,
}

/// The result of top-up. Figures after top-up come from grading the whole new set again.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TopUpReport {
    /// Vectors in the graded set.
    pub vectors_before: usize,
    /// Vectors added.
    pub vectors_added: usize,
    /// Collapsed faults.
    pub collapsed: usize,
    /// Detected by the original set.
    pub detected_before: usize,
    /// Detected by the original set plus the added vectors.
    pub detected: usize,
    /// Proven redundant, by either method.
    pub proven_redundant: usize,
    /// Of those, by exhaustive simulation.
    pub proven_redundant_exhaustive: usize,
    /// Of those, by SAT.
    pub proven_redundant_sat: usize,
    /// Undetected and undecided: the budget ran out.
    pub aborted: usize,
    /// Conflict budget per fault: a limit the solver checks between propagations, so a
    /// solve stops at the first check past it and may spend a few conflicts more.
    pub conflict_budget: u64,
    /// Conflicts the solver actually spent, over every fault's solve (its own count).
    pub conflicts_spent: u64,
    /// Of those, conflicts spent on the faults left aborted.
    pub aborted_conflicts_spent: u64,
    /// detected / collapsed x 100.
    pub coverage_percent: f64,
    /// detected / (collapsed - proven redundant) x 100 (100 when nothing is testable).
    pub testable_coverage_percent: f64,
    /// Every fault the original set left undetected (redundant ones by exhaustive proof
    /// included), with its outcome.
    pub faults: Vec<TopUpFault>,
    /// The added vectors, in order.
    #[serde(skip)]
    pub added: Vec<TopUpVector>,
    /// The added vectors' operands, in order.
    #[serde(skip)]
    pub added_inputs: Vec<Inputs>,
    /// Added vectors on which the fault-free netlist disagrees with the golden model (the
    /// netlist is then not the spec; nothing else here counts).
    #[serde(skip)]
    pub not_the_spec: Vec<NetlistMismatch>,
}

impl Grader<'_> {
    /// The operands a Sat answer's input bits (graded netlist order) describe.
    fn inputs_of(&self, bits: &[bool]) -> Inputs {
        let mut inputs = Inputs::default();
        let mut flat = 0;
        for (port, &sig) in self.netlist.inputs().iter().zip(&self.ports.inputs) {
            let mut w = Word::ZERO;
            for bit in 0..port.width() {
                w.set_bit(bit, bits[flat + bit as usize]);
            }
            flat += port.width() as usize;
            inputs.set(sig, w);
        }
        inputs
    }

    /// SAT on the fault miter of collapsed class `class`: Some(vector) when testable, None
    /// when proven redundant, Err(conflicts) when the budget ran out.
    pub fn sat_test(
        &self,
        class: usize,
        conflict_budget: u64,
    ) -> std::result::Result<Option<Inputs>, u64> {
        self.sat_test_spent(class, conflict_budget).0
    }

    /// [`Grader::sat_test`] with the conflicts the solver spent (its own count), whatever
    /// the answer.
    pub fn sat_test_spent(
        &self,
        class: usize,
        conflict_budget: u64,
    ) -> (std::result::Result<Option<Inputs>, u64>, u64) {
        let solved = fault_miter(
            &self.netlist,
            self.faults.representative(class),
            conflict_budget,
        );
        let r = match solved.answer {
            Answer::Sat(bits) => Ok(Some(self.inputs_of(&bits))),
            Answer::Unsat => Ok(None),
            Answer::Unknown => Err(solved.conflicts),
        };
        (r, solved.conflicts)
    }

    /// Tops up `vectors`, whose grade is `report`, with SAT vectors for the faults it left
    /// undetected; `conflict_budget` bounds each fault's solve.
    pub fn top_up(
        &self,
        vectors: &[Inputs],
        report: &FaultReport,
        conflict_budget: u64,
    ) -> Result<TopUpReport> {
        let module = report.module.clone();
        let mut open: Vec<(FaultEntry, Option<TopUpStatus>)> = report
            .undetected
            .iter()
            .map(|f| (f.clone(), None))
            .collect();
        let mut faults: Vec<TopUpFault> = report
            .redundant
            .iter()
            .map(|f| TopUpFault {
                fault: f.clone(),
                top_up: TopUpStatus::ProvenRedundant {
                    method: EXHAUSTIVE_REDUNDANCY_METHOD.to_string(),
                },
            })
            .collect();
        let model = Model::new(self.spec);
        let mut added = Vec::new();
        let mut added_inputs: Vec<Inputs> = Vec::new();
        let mut conflicts_spent = 0u64;
        for k in 0..open.len() {
            if open[k].1.is_some() {
                continue;
            }
            let class = open[k].0.class;
            let (result, spent) = self.sat_test_spent(class, conflict_budget);
            conflicts_spent += spent;
            let status = match result {
                Err(conflicts) => TopUpStatus::Aborted {
                    conflicts,
                    budget: conflict_budget,
                },
                Ok(None) => TopUpStatus::ProvenRedundant {
                    method: SAT_REDUNDANCY_METHOD.to_string(),
                },
                Ok(Some(inputs)) => {
                    let number = added_inputs.len();
                    // Fault-simulate the new vector against every fault still open.
                    let patterns = self.patterns(std::slice::from_ref(&inputs))?;
                    let m = detection_matrix_on(
                        &self.netlist,
                        &self.faults,
                        &patterns,
                        SimulationMode::BitParallel,
                        self.threads,
                    )?;
                    if !m.detects(class, 0) {
                        return Err(internal(format!(
                            "the SAT vector for class {class} does not detect it in simulation"
                        )));
                    }
                    for (other, status) in open.iter_mut().skip(k + 1) {
                        if status.is_none() && m.detects(other.class, 0) {
                            *status = Some(TopUpStatus::Detected {
                                vector: number,
                                targeted: false,
                            });
                        }
                    }
                    added.push(TopUpVector {
                        inputs: self
                            .spec
                            .inputs()
                            .into_iter()
                            .map(|(s, _)| {
                                (
                                    s.key().to_string(),
                                    inputs.get(s).to_hex(self.spec.signal_width(s)),
                                )
                            })
                            .collect(),
                        fault: describe(&open[k].0),
                        module: module.clone(),
                        method: TOP_UP_METHOD.to_string(),
                    });
                    added_inputs.push(inputs);
                    TopUpStatus::Detected {
                        vector: number,
                        targeted: true,
                    }
                }
            };
            open[k].1 = Some(status);
        }
        // The netlist must still be the spec on the new vectors.
        let expected: Vec<_> = added_inputs.iter().map(|i| model.evaluate(i)).collect();
        let not_the_spec = self.fault_free_mismatches(&added_inputs, &expected)?;
        // Grade the whole set again and hold every claim above against it.
        let mut all = vectors.to_vec();
        all.extend_from_slice(&added_inputs);
        let regrade = grade_with(
            &self.netlist,
            &self.faults,
            &self.patterns(&all)?,
            &GradeOptions {
                threads: self.threads,
                ..GradeOptions::default()
            },
        )?;
        for (f, status) in &open {
            let detected = regrade.first_detection[f.class].is_some();
            let claims = matches!(status, Some(TopUpStatus::Detected { .. }));
            if detected != claims {
                return Err(internal(format!(
                    "top-up says class {} is {}detected but the full set's grade disagrees",
                    f.class,
                    if claims { "" } else { "not " }
                )));
            }
        }
        faults.extend(open.into_iter().map(|(fault, status)| TopUpFault {
            fault,
            top_up: status.expect("every open fault decided"),
        }));
        faults.sort_by_key(|f| f.fault.class);
        let sat_redundant = faults
            .iter()
            .filter(|f| {
                matches!(&f.top_up, TopUpStatus::ProvenRedundant { method } if method == SAT_REDUNDANCY_METHOD)
            })
            .count();
        let exhaustive = report.redundant.len();
        // Exhaustive proofs in the regrade can only be of faults still undetected.
        let still_exhaustive = regrade
            .redundant
            .iter()
            .filter(|e| matches!(e.redundancy, Redundancy::Proven { .. }))
            .count();
        if still_exhaustive < exhaustive {
            return Err(internal(
                "a fault proven redundant by exhaustive simulation was detected".into(),
            ));
        }
        let aborted = faults
            .iter()
            .filter(|f| matches!(f.top_up, TopUpStatus::Aborted { .. }))
            .count();
        let aborted_conflicts_spent = faults
            .iter()
            .map(|f| match f.top_up {
                TopUpStatus::Aborted { conflicts, .. } => conflicts,
                _ => 0,
            })
            .sum();
        let proven = exhaustive + sat_redundant;
        let collapsed = report.collapsed;
        let pct = |n: usize, d: usize| {
            if d == 0 {
                100.0
            } else {
                n as f64 * 100.0 / d as f64
            }
        };
        Ok(TopUpReport {
            vectors_before: vectors.len(),
            vectors_added: added.len(),
            collapsed,
            detected_before: report.detected,
            detected: regrade.detected,
            proven_redundant: proven,
            proven_redundant_exhaustive: exhaustive,
            proven_redundant_sat: sat_redundant,
            aborted,
            conflict_budget,
            conflicts_spent,
            aborted_conflicts_spent,
            coverage_percent: pct(regrade.detected, collapsed),
            testable_coverage_percent: pct(regrade.detected, collapsed - proven),
            faults,
            added,
            added_inputs,
            not_the_spec,
        })
    }
}

/// `net stuck-at-v (site)`.
fn describe(f: &FaultEntry) -> String {
    format!("{} stuck-at-{} ({})", f.net, f.stuck_at, f.site)
}

fn internal(message: String) -> Error {
    Error::problem(Problem::new(
        "top-up",
        format!("internal check failed: {message}"),
    ))
}
