//! Combinational equivalence of a netlist with the spec: a reference circuit from the
//! built-in ripple structures (checked against the golden model by simulation before it is
//! trusted), a SAT miter over every output the spec names, and a verdict that says exactly
//! what it covers: proved (Unsat: equal on every input combination), a counterexample (Sat,
//! decoded like `check`'s mismatches and confirmed by simulating both sides), or unknown (the
//! conflict budget ran out; nothing is claimed).

use serde::Serialize;

use crate::arith::encoding::Value;
use crate::arith::model::{Inputs, Model};
use crate::arith::word::Word;
use crate::corners::generate::Generator;
use crate::error::{Error, Problem, Result};
use crate::gates::grade::{BuiltinModel, Grader};
use crate::gates::netlist::{NetId, Netlist};
use crate::gates::sat::{equivalence_miter_bits, Answer, RefBit};
use crate::spec::{Signal, Spec};

/// Vectors of the spec's own set (directed first) the reference is simulated on at most.
const REFERENCE_CHECK_VECTORS: u64 = 4096;

/// What `prove` claims when it proves.
pub const PROOF_CLAIM: &str = "combinational equivalence: for every combination of the input \
    bits, each compared output of the netlist equals the reference circuit (the built-in ripple \
    structure, or the --reference netlist), which agreed with the golden model on every \
    simulated vector";

/// What `prove` never claims.
pub const PROOF_LIMITS: &str = "not proved: timing (delays, glitches, clocking), outputs the \
    spec does not name, the synthesis flow that produced the netlist, and the reference's \
    agreement with the golden model beyond the simulated vectors";

/// One output of a counterexample.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct CounterOutput {
    /// The spec's port name.
    pub port: String,
    /// The golden model's value, hex.
    pub expected: String,
    /// The netlist's value, hex.
    pub got: String,
    /// The golden value decoded in the spec's encoding (results) or as a flag bit.
    pub expected_value: String,
    /// The netlist's value decoded the same way.
    pub got_value: String,
    /// True when the two differ.
    pub differs: bool,
}

/// A vector on which the netlist and the golden model disagree.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Counterexample {
    /// Input values by port name, hex.
    pub inputs: Vec<(String, String)>,
    /// Inputs decoded (operands in the spec's encoding).
    pub decoded: Vec<(String, String)>,
    /// Every compared output.
    pub outputs: Vec<CounterOutput>,
    /// The operands, for writing a vector set.
    #[serde(skip)]
    pub operands: Inputs,
}

/// The verdict.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "status", rename_all = "snake_case")]
pub enum ProveVerdict {
    /// Unsat: equal on every input.
    Proved,
    /// Sat: a counterexample.
    Counterexample(Box<Counterexample>),
    /// The budget ran out.
    Unknown,
}

/// The result of [`prove`].
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct ProveReport {
    /// The netlist's module.
    pub module: String,
    /// The unit (spec name).
    pub unit: String,
    /// The reference circuit.
    pub reference: String,
    /// Vectors the reference was simulated on against the golden model (all agreed).
    pub reference_checked_vectors: u64,
    /// Output ports compared (the spec's).
    pub compared: Vec<String>,
    /// Netlist output ports not compared (not in the spec's [ports]).
    pub not_compared: Vec<String>,
    /// Input bits: the proof covers 2^input_bits combinations.
    pub input_bits: usize,
    /// The verdict.
    pub verdict: ProveVerdict,
    /// Conflicts spent.
    pub conflicts: u64,
    /// The budget.
    pub conflict_budget: u64,
    /// Variables of the miter formula.
    pub variables: u32,
    /// Clauses of the miter formula.
    pub clauses: u64,
    /// What a proof claims.
    pub claim: &'static str,
    /// What is never claimed.
    pub limits: &'static str,
}

/// Proves `dut` equivalent to the spec on every output the spec names, or finds a
/// counterexample, within `conflict_budget` conflicts.
pub fn prove(spec: &Spec, dut: &Netlist, conflict_budget: u64) -> Result<ProveReport> {
    prove_against(spec, dut, None, conflict_budget)
}

/// [`prove`] against `reference` instead of the built-in structure when one is given (a
/// netlist with the spec's ports, checked against the golden model by simulation in the same
/// way before it is trusted).
pub fn prove_against(
    spec: &Spec,
    dut: &Netlist,
    reference: Option<&Netlist>,
    conflict_budget: u64,
) -> Result<ProveReport> {
    // The netlist's ports must be the spec's (the grader's matching rules).
    let grader = Grader::new(spec, dut)?;
    let missing: Vec<Problem> = spec
        .outputs()
        .into_iter()
        .filter(|(_, name)| dut.output_port(name).is_none())
        .map(|(sig, name)| {
            Problem::new(
                dut.source(),
                format!(
                    "module `{}` has no output port \"{name}\" (the spec's {}); nothing can be \
                     proved about it",
                    dut.module(),
                    sig.key()
                ),
            )
            .field(format!("port {name}"))
        })
        .collect();
    if !missing.is_empty() {
        return Err(Error::input(missing));
    }
    let (reference, described) = match reference {
        Some(r) => {
            // Same port rules as the netlist under proof.
            Grader::new(spec, r)?;
            (
                r.clone(),
                format!(
                    "netlist {} from {} ({}-bit)",
                    r.module(),
                    r.source(),
                    spec.width
                ),
            )
        }
        None => {
            let built = builtin_reference(spec)?;
            let d = format!("built-in {} ({}-bit)", built.module(), spec.width);
            (built, d)
        }
    };
    let result_port = spec.ports.get(Signal::Result).map(str::to_string);
    // Each spec output as reference bits.
    let mut compared = Vec::new();
    let mut pairs: Vec<(RefBit, NetId)> = Vec::new();
    for (sig, name) in spec.outputs() {
        let dut_port = &dut.outputs()[dut.output_port(name).expect("checked above")];
        let bits = reference_bits(&reference, sig, name, result_port.as_deref())?;
        for (r, &d) in bits.into_iter().zip(dut_port.nets()) {
            pairs.push((r, d));
        }
        compared.push(name.to_string());
    }
    // The reference must reproduce the golden model before it is trusted.
    let golden = Model::new(spec);
    let generator = Generator::new(spec, None, None);
    let n = generator.total().min(REFERENCE_CHECK_VECTORS);
    for i in 0..n {
        let v = generator.vector(i).expect("index below total");
        let got = reference_outputs(spec, &reference, &v, result_port.as_deref())?;
        let want = golden.evaluate(&v);
        for (sig, name, value) in got {
            let w = spec.signal_width(sig);
            if value.masked(w) != want.get(sig).masked(w) {
                return Err(Error::problem(
                    Problem::new(
                        "prove",
                        format!(
                            "the built-in reference ({}) disagrees with the golden model on \
                             vector {i} at port {name} (expected 0x{}, reference 0x{}): this \
                             spec's conventions are outside what the built-in structures model, \
                             so nothing was proved",
                            reference.module(),
                            want.get(sig).masked(w).to_hex(w),
                            value.masked(w).to_hex(w)
                        ),
                    )
                    .field(format!("port {name}")),
                ));
            }
        }
    }
    let solved = equivalence_miter_bits(&reference, dut, &pairs, conflict_budget);
    let verdict = match solved.answer {
        Answer::Unsat => ProveVerdict::Proved,
        Answer::Unknown => ProveVerdict::Unknown,
        Answer::Sat(bits) => {
            let cex = counterexample(spec, &reference, dut, &bits)?;
            ProveVerdict::Counterexample(Box::new(cex))
        }
    };
    let not_compared = grader.unchecked_outputs().to_vec();
    Ok(ProveReport {
        module: dut.module().to_string(),
        unit: spec.name.clone(),
        reference: described,
        reference_checked_vectors: n,
        compared,
        not_compared,
        input_bits: dut.input_nets().len(),
        verdict,
        conflicts: solved.conflicts,
        conflict_budget,
        variables: solved.variables,
        clauses: solved.clauses,
        claim: PROOF_CLAIM,
        limits: PROOF_LIMITS,
    })
}

/// The reference bits of spec output `sig` (port `name`): the reference's port of that name,
/// or a zero flag / negative flag derived from the result.
fn reference_bits(
    reference: &Netlist,
    sig: Signal,
    name: &str,
    result: Option<&str>,
) -> Result<Vec<RefBit>> {
    if let Some(p) = reference.output_port(name) {
        return Ok(reference.outputs()[p]
            .nets()
            .iter()
            .map(|&n| RefBit::Net(n))
            .collect());
    }
    let y = result
        .and_then(|r| reference.output_port(r))
        .map(|p| &reference.outputs()[p]);
    match (sig, y) {
        (Signal::Zero, Some(y)) => Ok(vec![RefBit::AllZero(y.nets().to_vec())]),
        (Signal::Negative, Some(y)) => Ok(vec![RefBit::Net(*y.nets().last().expect("width >= 1"))]),
        _ => Err(Error::problem(
            Problem::new(
                "prove",
                format!(
                    "the built-in reference has no {} output (port {name}); nothing was proved",
                    sig.key()
                ),
            )
            .field(format!("port {name}")),
        )),
    }
}

/// The reference's value of every spec output on `v`, by simulation.
fn reference_outputs(
    spec: &Spec,
    reference: &Netlist,
    v: &Inputs,
    result: Option<&str>,
) -> Result<Vec<(Signal, String, Word)>> {
    let values: Vec<Word> = reference
        .inputs()
        .iter()
        .map(|p| v.get(signal_of_input(spec, p.name())))
        .collect();
    let outs = reference.eval(&values)?;
    let mut got = Vec::new();
    for (sig, name) in spec.outputs() {
        let word = match reference.output_port(name) {
            Some(p) => outs[p],
            None => {
                let p = result
                    .and_then(|r| reference.output_port(r))
                    .expect("reference_bits checked the result port");
                let y = outs[p];
                let w = reference.outputs()[p].width();
                match sig {
                    Signal::Zero => Word::from_u64(y.masked(w).is_zero() as u64),
                    _ => Word::from_u64(y.bit(w - 1) as u64),
                }
            }
        };
        got.push((sig, name.to_string(), word));
    }
    Ok(got)
}

fn signal_of_input(spec: &Spec, port: &str) -> Signal {
    spec.inputs()
        .into_iter()
        .find(|(_, p)| *p == port)
        .map(|(s, _)| s)
        .expect("reference ports carry the spec's names")
}

fn decode(spec: &Spec, sig: Signal, v: &Word) -> String {
    let w = spec.signal_width(sig);
    if matches!(sig, Signal::A | Signal::B | Signal::Result) {
        Value::decode(v, w, spec.encoding).to_string()
    } else {
        (v.bit(0) as u8).to_string()
    }
}

/// Decodes a Sat answer and confirms it by simulation: the netlist must differ from the
/// golden model on it (and the reference must not).
fn counterexample(
    spec: &Spec,
    reference: &Netlist,
    dut: &Netlist,
    bits: &[bool],
) -> Result<Counterexample> {
    let mut operands = Inputs::default();
    let mut flat = 0;
    for p in reference.inputs() {
        let mut w = Word::ZERO;
        for bit in 0..p.width() {
            w.set_bit(bit, bits[flat + bit as usize]);
        }
        flat += p.width() as usize;
        operands.set(signal_of_input(spec, p.name()), w);
    }
    let want = Model::new(spec).evaluate(&operands);
    let values: Vec<Word> = dut
        .inputs()
        .iter()
        .map(|p| operands.get(signal_of_input(spec, p.name())))
        .collect();
    let got = dut.eval(&values)?;
    let mut outputs = Vec::new();
    for (sig, name) in spec.outputs() {
        let w = spec.signal_width(sig);
        let g = got[dut.output_port(name).expect("checked")].masked(w);
        let e = want.get(sig).masked(w);
        outputs.push(CounterOutput {
            port: name.to_string(),
            expected: e.to_hex(w),
            got: g.to_hex(w),
            expected_value: decode(spec, sig, &e),
            got_value: decode(spec, sig, &g),
            differs: e != g,
        });
    }
    if !outputs.iter().any(|o| o.differs) {
        return Err(Error::problem(Problem::new(
            "prove",
            "internal check failed: the SAT counterexample does not differ from the golden \
             model in simulation (the reference disagrees with the golden model there); \
             nothing was proved",
        )));
    }
    let inputs = spec
        .inputs()
        .into_iter()
        .map(|(s, n)| (n.to_string(), operands.get(s).to_hex(spec.signal_width(s))))
        .collect();
    let decoded = spec
        .inputs()
        .into_iter()
        .map(|(s, n)| (n.to_string(), decode(spec, s, &operands.get(s))))
        .collect();
    Ok(Counterexample {
        inputs,
        decoded,
        outputs,
        operands,
    })
}

/// The built-in ripple structure of the spec's operation, with the spec's port names.
fn builtin_reference(spec: &Spec) -> Result<Netlist> {
    let model = BuiltinModel::for_spec(spec).map_err(|_| {
        Error::problem(
            Problem::new(
                "prove",
                format!(
                    "no built-in reference structure for {} in {} encoding{}: prove covers add \
                     and sub (unsigned or twos) and addsub without carry_in; nothing was proved",
                    spec.operation,
                    spec.encoding,
                    if spec.has(Signal::CarryIn) {
                        " with these ports"
                    } else {
                        ""
                    }
                ),
            )
            .field("operation"),
        )
    })?;
    model.build(spec)
}
