//! Fault grading of a vector set against a gate netlist, and compaction.
//!
//! This module ties the spec and its vectors to `netlist` and `fault`: it matches the
//! netlist's ports to the spec's `[ports]`, confirms the fault-free netlist reproduces the
//! golden model on every vector (otherwise the netlist is not the spec and grading stops),
//! grades single stuck-at faults, and chooses a smaller subset that keeps both the class
//! coverage and the fault coverage (greedy set cover: small, not proven minimum). Writing the
//! compacted set is here too, because its manifest records where each vector came from.

use std::borrow::Cow;
use std::path::Path;

use crate::arith::model::{Inputs, Outputs};
use crate::arith::word::Word;
use crate::corners::classes::Hits;
use crate::corners::generate::Generator;
use crate::error::{Error, Problem, Result};
use crate::gates::fault::{
    compact, detection_matrix_on, grade_with, grade_with_progress, DetectionMatrix, FaultList,
    FaultReport, GradeOptions, PatternSet, SimulationMode,
};
use crate::gates::netlist::Netlist;
use crate::sets::commit::Staging;
use crate::sets::hexfile::{header, Packer};
use crate::sets::layout::Layout;
use crate::sets::vectorset::{
    csv_header, csv_row, sha256_hex, spec_identity, FileRecord, Manifest, ManifestLayout,
    ManifestWord, Selection, TopUpVector, EXPECTED_HEX, MANIFEST_JSON, STIMULUS_HEX, VECTORS_CSV,
};
use crate::spec::{Encoding, Operation, Signal, Spec};

mod topup;
mod transition;
pub use topup::{
    TopUpFault, TopUpReport, TopUpStatus, EXHAUSTIVE_REDUNDANCY_METHOD, SAT_REDUNDANCY_METHOD,
    TOP_UP_METHOD,
};
pub use transition::TransitionOutcome;

/// The structural models arithvec can grade without a netlist file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum BuiltinModel {
    /// Ripple-carry adder of full-adder cells (add).
    RippleAdder,
    /// Ripple-borrow subtractor of full-subtractor cells (sub).
    RippleSubtractor,
    /// Adder with b XOR mode and mode as carry-in (addsub).
    AddSubUnit,
}

impl BuiltinModel {
    /// The built-in model matching the spec's operation.
    pub fn for_spec(spec: &Spec) -> Result<BuiltinModel> {
        let ok_encoding = matches!(spec.encoding, Encoding::Unsigned | Encoding::Twos);
        let model = match spec.operation {
            Operation::Add if ok_encoding => BuiltinModel::RippleAdder,
            Operation::Sub if ok_encoding => BuiltinModel::RippleSubtractor,
            Operation::AddSub if ok_encoding && !spec.has(Signal::CarryIn) => {
                BuiltinModel::AddSubUnit
            }
            _ => {
                return Err(Error::problem(
                    Problem::new(
                        "--builtin",
                        format!(
                            "there is no built-in structural model for {} in {} encoding{}; \
                             built-ins cover add and sub (unsigned or twos) and addsub without a \
                             carry_in port; pass --netlist with a Yosys JSON netlist instead",
                            spec.operation,
                            spec.encoding,
                            if spec.operation == Operation::AddSub {
                                " with these ports"
                            } else {
                                ""
                            }
                        ),
                    )
                    .field("builtin"),
                ))
            }
        };
        Ok(model)
    }

    /// Builds the model at the spec's width, with the spec's port names.
    pub fn build(self, spec: &Spec) -> Result<Netlist> {
        let w = spec.width;
        let mut n = match self {
            BuiltinModel::RippleAdder => Netlist::ripple_adder(w, spec.has(Signal::CarryIn))?,
            BuiltinModel::RippleSubtractor => {
                Netlist::ripple_subtractor(w, spec.has(Signal::CarryIn))?
            }
            BuiltinModel::AddSubUnit => Netlist::addsub_unit(w)?,
        };
        let pairs = [
            ("a", Signal::A),
            ("b", Signal::B),
            ("cin", Signal::CarryIn),
            ("mode", Signal::Mode),
            ("y", Signal::Result),
            ("co", Signal::CarryOut),
            ("ovf", Signal::Overflow),
        ];
        let renames: Vec<(&str, &str)> = pairs
            .iter()
            .filter(|(old, _)| n.input_port(old).is_some() || n.output_port(old).is_some())
            .filter_map(|(old, sig)| spec.ports.get(*sig).map(|new| (*old, new)))
            .collect();
        n.rename_ports(&renames)?;
        Ok(n)
    }
}

/// How the netlist's ports line up with the spec's signals.
#[derive(Debug, Clone)]
struct PortMap {
    /// Per netlist input port: the spec signal feeding it.
    inputs: Vec<Signal>,
    /// Per netlist output port: the spec signal it must equal, if the spec has it.
    outputs: Vec<Option<Signal>>,
}

fn match_ports(spec: &Spec, netlist: &Netlist) -> Result<PortMap> {
    let src = netlist.source().to_string();
    let mut problems = Vec::new();
    if spec.ports.has_ranges() {
        // Bundled ports (`s[15:0]`) are matched by the testbenches and the checker; the
        // gate-level grader matches whole ports only, so it says so instead of guessing.
        return Err(Error::problem(
            Problem::new(
                &src,
                "the spec maps roles to bit ranges of ports (e.g. s[15:0]); grading a netlist \
                 with bundled ports is not supported yet: grade a netlist whose ports are the \
                 roles' own",
            )
            .field("ports"),
        ));
    }
    let by_name = |name: &str| {
        spec.inputs()
            .into_iter()
            .chain(spec.outputs())
            .find(|(_, p)| *p == name)
            .map(|(s, _)| s)
    };
    let mut inputs = Vec::new();
    for port in netlist.inputs() {
        match by_name(port.name()).filter(|s| s.is_input()) {
            Some(sig) => {
                let w = spec.signal_width(sig);
                if port.width() != w {
                    problems.push(
                        Problem::new(
                            &src,
                            format!(
                                "input port is {} bits wide; the spec's {} is {w}",
                                port.width(),
                                sig.key()
                            ),
                        )
                        .field(format!("port {}", port.name())),
                    );
                }
                inputs.push(sig);
            }
            None => problems.push(
                Problem::new(
                    &src,
                    "input port is not one of the spec's [ports] inputs; the vectors cannot \
                     drive it",
                )
                .field(format!("port {}", port.name())),
            ),
        }
    }
    for (sig, name) in spec.inputs() {
        if netlist.input_port(name).is_none() {
            problems.push(
                Problem::new(
                    &src,
                    format!(
                        "module `{}` has no input port \"{name}\" (the spec's {})",
                        netlist.module(),
                        sig.key()
                    ),
                )
                .field(format!("port {name}")),
            );
        }
    }
    let mut outputs = Vec::new();
    for port in netlist.outputs() {
        let sig = by_name(port.name()).filter(|s| !s.is_input());
        if let Some(s) = sig {
            if port.width() != spec.signal_width(s) {
                problems.push(
                    Problem::new(
                        &src,
                        format!(
                            "output port is {} bits wide; the spec's {} is {}",
                            port.width(),
                            s.key(),
                            spec.signal_width(s)
                        ),
                    )
                    .field(format!("port {}", port.name())),
                );
            }
        }
        outputs.push(sig);
    }
    if !outputs.iter().any(Option::is_some) {
        problems.push(Problem::new(
            &src,
            format!(
                "module `{}` has no output port named in the spec's [ports]",
                netlist.module()
            ),
        ));
    }
    if problems.is_empty() {
        Ok(PortMap { inputs, outputs })
    } else {
        Err(Error::input(problems))
    }
}

/// The fault-free netlist disagreed with the golden model.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct NetlistMismatch {
    /// Position in the vector set.
    pub position: usize,
    /// The output port.
    pub port: String,
    /// Golden value, hex.
    pub expected: String,
    /// Netlist value, hex.
    pub got: String,
}

/// What grading found.
#[derive(Debug)]
pub enum GradeOutcome {
    /// The netlist reproduces the golden model; here is the fault report.
    Graded(Box<FaultReport>),
    /// The fault-free netlist is not the spec: the first disagreements (at most 10).
    NotTheSpec(Vec<NetlistMismatch>),
}

/// A netlist prepared for grading one spec's vectors.
///
/// Only the output ports the spec names are observed: the vectors carry expected values for
/// those alone, and a testbench made from the spec compares nothing else, so a fault that
/// shows only on another output (a zero flag the spec leaves out, say) would escape every
/// check. Such outputs, and the gates feeding only them, are left out of grading and listed
/// in the report.
pub struct Grader<'a> {
    spec: &'a Spec,
    netlist: Cow<'a, Netlist>,
    ports: PortMap,
    faults: FaultList,
    unchecked_outputs: Vec<String>,
    ungraded_gates: usize,
    /// Fault-simulation threads (0: one per core).
    threads: usize,
    /// Told of each fault class settled while grading (a progress bar).
    progress: Option<crate::gates::fault::Progress<'a>>,
}

impl<'a> Grader<'a> {
    /// Matches the netlist to the spec and builds its fault list over the logic the spec's
    /// outputs observe.
    pub fn new(spec: &'a Spec, netlist: &'a Netlist) -> Result<Grader<'a>> {
        let ports = match_ports(spec, netlist)?;
        let checked: Vec<usize> = (0..ports.outputs.len())
            .filter(|&o| ports.outputs[o].is_some())
            .collect();
        let unchecked_outputs: Vec<String> = netlist
            .outputs()
            .iter()
            .zip(&ports.outputs)
            .filter(|(_, sig)| sig.is_none())
            .map(|(p, _)| p.name().to_string())
            .collect();
        let (graded, ports) = if unchecked_outputs.is_empty() {
            (Cow::Borrowed(netlist), ports)
        } else {
            let ports = PortMap {
                inputs: ports.inputs,
                outputs: ports.outputs.into_iter().filter(Option::is_some).collect(),
            };
            (Cow::Owned(netlist.restricted_to_outputs(&checked)), ports)
        };
        let ungraded_gates = netlist.gates().len() - graded.gates().len();
        let faults = FaultList::new(&graded);
        Ok(Grader {
            spec,
            netlist: graded,
            ports,
            faults,
            unchecked_outputs,
            ungraded_gates,
            threads: 0,
            progress: None,
        })
    }

    /// Sets the threads that simulate faults (0, the default: one per core). Reports,
    /// matrices and compactions are the same for every value.
    pub fn set_threads(&mut self, threads: usize) {
        self.threads = threads;
    }

    /// Reports grading progress to `progress`: it is called with the number of fault classes
    /// just settled, adding up to [`FaultList::collapsed`] per grading run.
    pub fn set_progress(&mut self, progress: crate::gates::fault::Progress<'a>) {
        self.progress = Some(progress);
    }

    /// The netlist as graded: only the outputs the spec checks and the gates feeding them.
    pub fn graded_netlist(&self) -> &Netlist {
        &self.netlist
    }

    /// The netlist's output ports the spec does not check (not observed when grading).
    pub fn unchecked_outputs(&self) -> &[String] {
        &self.unchecked_outputs
    }

    /// The fault list of the graded netlist.
    pub fn faults(&self) -> &FaultList {
        &self.faults
    }

    fn patterns(&self, vectors: &[Inputs]) -> Result<PatternSet> {
        let rows: Vec<Vec<Word>> = vectors
            .iter()
            .map(|v| self.ports.inputs.iter().map(|&s| v.get(s)).collect())
            .collect();
        PatternSet::from_vectors(&self.netlist, &rows, "vector set")
    }

    /// Simulates the fault-free netlist on every vector and compares with `expected`.
    pub fn fault_free_mismatches(
        &self,
        vectors: &[Inputs],
        expected: &[Outputs],
    ) -> Result<Vec<NetlistMismatch>> {
        self.mismatches_up_to(vectors, expected, 10)
            .map(|(_, list)| list)
    }

    /// Every vector on which the fault-free netlist disagrees with `expected`: how many
    /// vectors disagree, and the first `limit` disagreements (one per output port).
    pub fn fault_free_disagreements(
        &self,
        vectors: &[Inputs],
        expected: &[Outputs],
        limit: usize,
    ) -> Result<(usize, Vec<NetlistMismatch>)> {
        let (_, list) = self.mismatches_up_to(vectors, expected, usize::MAX)?;
        let mut positions: Vec<usize> = list.iter().map(|m| m.position).collect();
        positions.dedup();
        Ok((positions.len(), list.into_iter().take(limit).collect()))
    }

    fn mismatches_up_to(
        &self,
        vectors: &[Inputs],
        expected: &[Outputs],
        limit: usize,
    ) -> Result<(usize, Vec<NetlistMismatch>)> {
        let mut out = Vec::new();
        for (p, (v, e)) in vectors.iter().zip(expected).enumerate() {
            let values: Vec<Word> = self.ports.inputs.iter().map(|&s| v.get(s)).collect();
            let got = self.netlist.eval(&values)?;
            for ((port, sig), g) in self
                .netlist
                .outputs()
                .iter()
                .zip(&self.ports.outputs)
                .zip(got)
            {
                let Some(sig) = sig else { continue };
                let w = self.spec.signal_width(*sig);
                let want = e.get(*sig).masked(w);
                if e.is_specified(*sig) && g.masked(w) != want {
                    out.push(NetlistMismatch {
                        position: p,
                        port: port.name().to_string(),
                        expected: want.to_hex(w),
                        got: g.masked(w).to_hex(w),
                    });
                    if out.len() >= limit {
                        return Ok((out.len(), out));
                    }
                }
            }
        }
        Ok((out.len(), out))
    }

    /// Grades the vectors (after the fault-free check).
    pub fn grade(&self, vectors: &[Inputs], expected: &[Outputs]) -> Result<GradeOutcome> {
        let bad = self.fault_free_mismatches(vectors, expected)?;
        if !bad.is_empty() {
            return Ok(GradeOutcome::NotTheSpec(bad));
        }
        self.grade_against_netlist(vectors)
            .map(GradeOutcome::Graded)
    }

    /// Grades the vectors against the netlist's own fault-free responses, without the
    /// fault-free check against the golden model: a fault counts as detected when some
    /// observed output differs from the fault-free netlist's, whatever the model expects.
    /// For a unit with a known functional bug; the caller must say loudly that the golden
    /// model was not the reference (see [`Grader::fault_free_disagreements`]).
    pub fn grade_against_netlist(&self, vectors: &[Inputs]) -> Result<Box<FaultReport>> {
        let patterns = self.patterns(vectors)?;
        let options = GradeOptions {
            threads: self.threads,
            ..GradeOptions::default()
        };
        let mut report = match self.progress {
            Some(p) => grade_with_progress(&self.netlist, &self.faults, &patterns, &options, p)?,
            None => grade_with(&self.netlist, &self.faults, &patterns, &options)?,
        };
        report.unchecked_outputs = self.unchecked_outputs.clone();
        report.ungraded_gates = self.ungraded_gates;
        Ok(Box::new(report))
    }

    /// Which of `vectors` detect which collapsed faults of [`Grader::faults`] (no fault
    /// dropping); no fault-free check is made here.
    pub fn detection_matrix(&self, vectors: &[Inputs]) -> Result<DetectionMatrix> {
        let patterns = self.patterns(vectors)?;
        detection_matrix_on(
            &self.netlist,
            &self.faults,
            &patterns,
            SimulationMode::BitParallel,
            self.threads,
        )
    }

    /// Positions of a subset of `vectors` that keeps every fault the whole set detects
    /// detected and every bin the whole set hits hit (greedy set cover; not proven minimum).
    pub fn compact(&self, generator: &Generator, vectors: &[Inputs]) -> Result<Vec<usize>> {
        let matrix = self.detection_matrix(vectors)?;
        let cat = generator.catalogue();
        let mut by_bin: Vec<Vec<usize>> = vec![Vec::new(); cat.bin_count()];
        let mut hits = Hits::new();
        for (p, v) in vectors.iter().enumerate() {
            cat.evaluate(v, &mut hits);
            hits.for_each_bin(|b| {
                if cat.is_reachable(b) {
                    by_bin[b].push(p);
                }
            });
        }
        let must: Vec<Vec<usize>> = by_bin.into_iter().filter(|s| !s.is_empty()).collect();
        let mut chosen = compact(&matrix, &must)?;
        chosen.sort_unstable();
        Ok(chosen)
    }
}

/// Writes the vectors at `source_indices` of `generator`'s set (in that order) as a new
/// vector set in `dir`, with a manifest recording the selection. Files are written to
/// temporary names and renamed into place.
pub fn write_selection(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    source_indices: &[u64],
) -> Result<Manifest> {
    write_topped_up(generator, spec, dir, source_indices, &[])
}

/// [`write_selection`] followed by the vectors test top-up added (`top_up`, in order): the
/// manifest's selection lists them with the fault each was made for, so `check` and
/// `testbench` take the set like any other.
pub fn write_topped_up(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    source_indices: &[u64],
    top_up: &[TopUpVector],
) -> Result<Manifest> {
    if !generator.appended().is_empty() {
        // A selection's readers regenerate its source set, which imported vectors are not
        // part of; refuse rather than write a set whose vectors check could not rebuild.
        return Err(Error::problem(Problem::new(
            if top_up.is_empty() {
                "--compact"
            } else {
                "--top-up"
            },
            "the vector set holds imported vectors, and writing a selection or a topped-up \
             copy of such a set is not supported yet; grade it without --compact and \
             --top-up --out",
        )));
    }
    let mut added = Vec::with_capacity(top_up.len());
    for (k, t) in top_up.iter().enumerate() {
        added.push(t.operands(spec, "top-up", k)?);
    }
    // Written into a staging directory that one rename makes the set (`sets::commit`).
    let staging = Staging::begin(dir)?;
    let layout = Layout::for_spec(spec);
    let stim = Packer::new(&layout.stimulus);
    let exp = Packer::new(&layout.expected);
    let n = (source_indices.len() + added.len()) as u64;
    let mut csv = csv_header(spec).into_bytes();
    let mut s = header("stimulus", &spec.name, &layout.stimulus, n).into_bytes();
    let mut e = header("expected outputs", &spec.name, &layout.expected, n).into_bytes();
    let mut hits = Hits::new();
    let mut directed = 0;
    for (p, &i) in source_indices.iter().enumerate() {
        let inputs = generator.vector(i).ok_or_else(|| {
            Error::problem(Problem::new(
                "compaction",
                format!("vector {i} is not in the set"),
            ))
        })?;
        if i < generator.directed().len() as u64 {
            directed += 1;
        }
        let outputs = generator.catalogue().evaluate(&inputs, &mut hits);
        csv.extend_from_slice(csv_row(generator, spec, p as u64, &inputs).as_bytes());
        stim.push_line(|sig| inputs.get(sig), &mut s);
        exp.push_line(|sig| outputs.get(sig), &mut e);
    }
    for (k, inputs) in added.iter().enumerate() {
        let p = source_indices.len() + k;
        let outputs = generator.catalogue().evaluate(inputs, &mut hits);
        csv.extend_from_slice(csv_row(generator, spec, p as u64, inputs).as_bytes());
        stim.push_line(|sig| inputs.get(sig), &mut s);
        exp.push_line(|sig| outputs.get(sig), &mut e);
    }
    let files = [(VECTORS_CSV, csv), (STIMULUS_HEX, s), (EXPECTED_HEX, e)];
    let records: Vec<FileRecord> = files
        .iter()
        .map(|(name, bytes)| FileRecord {
            name: name.to_string(),
            bytes: bytes.len() as u64,
            sha256: sha256_hex(bytes),
        })
        .collect();
    let manifest = Manifest {
        tool: "arithvec".into(),
        version: env!("CARGO_PKG_VERSION").into(),
        unit: spec.name.clone(),
        spec: serde_json::from_str(&spec.normalised_json()).expect("json"),
        spec_sha256: spec_identity(spec),
        seed: generator.seed(),
        directed,
        random: n - directed,
        total: n,
        shard: None,
        first_index: 0,
        vectors: n,
        layout: ManifestLayout {
            stimulus: ManifestWord::of(&layout.stimulus),
            expected: ManifestWord::of(&layout.expected),
        },
        files: records,
        selection: Some(Selection {
            source_directed: generator.directed().len() as u64,
            source_random: generator.random_count(),
            indices: source_indices.to_vec(),
            top_up: top_up.to_vec(),
        }),
        imported: None,
        pairs: crate::sets::vectorset::PairLayout::of(generator),
    };
    let mut text = serde_json::to_string_pretty(&manifest).expect("manifest serialises");
    text.push('\n');
    let all = files
        .into_iter()
        .chain(std::iter::once((MANIFEST_JSON, text.into_bytes())));
    for (name, bytes) in all {
        let path = staging.path().join(name);
        std::fs::File::create(&path)
            .and_then(|mut f| {
                std::io::Write::write_all(&mut f, &bytes)?;
                f.sync_all()
            })
            .map_err(|e| Error::io(&path, e))?;
    }
    staging.commit()?;
    Ok(manifest)
}
