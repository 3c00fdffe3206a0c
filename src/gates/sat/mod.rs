//! SAT encodings of gate netlists: the Tseitin transformation of every gate kind, the fault
//! miter behind test top-up and redundancy proofs, and the equivalence miter behind `prove`.
//!
//! The solver is batsat (a pure-Rust CDCL solver; DEVELOPERS.md says why). Every solve runs
//! under a conflict budget: a call that spends it answers [`Answer::Unknown`] with the count
//! spent, never a guess. The budget counts learnt clauses (one per conflict, except conflicts
//! that learn only a unit), so the solver's own conflict count, which is what is reported,
//! can run a few past it before the search stops.
//!
//! Tseitin transformation (common practice, no source): each gate output gets a fresh
//! variable and clauses that force it to equal the gate's function of its input literals;
//! inverters are free (a negated literal). A miter ORs the XORs of output pairs and asserts
//! the OR, so the formula is satisfiable exactly when some input makes the pairs differ.

use std::cell::Cell;

use batsat::{lbool, Callbacks, ClauseKind, Lit, SolverInterface, SolverOpts};

use crate::gates::fault::{Fault, FaultSite};
use crate::gates::netlist::{Driver, GateKind, NetId, Netlist};

/// Callbacks that stop the search once `limit` conflicts (learnt clauses) were spent.
struct Budget {
    learnt: u64,
    limit: u64,
    stop: Cell<bool>,
}

impl Callbacks for Budget {
    fn on_new_clause(&mut self, _c: &[Lit], kind: ClauseKind) {
        if kind == ClauseKind::Learnt {
            self.learnt += 1;
            if self.learnt >= self.limit {
                self.stop.set(true);
            }
        }
    }

    fn stop(&self) -> bool {
        self.stop.get()
    }
}

/// What one solve found.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Answer {
    /// Satisfiable: one value per primary input bit, in [`Netlist::input_nets`] order (of
    /// the first netlist for a two-netlist miter).
    Sat(Vec<bool>),
    /// Unsatisfiable: no input makes the miter's outputs differ.
    Unsat,
    /// The conflict budget ran out first; nothing is claimed.
    Unknown,
}

/// The answer with the solver's own effort figures.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Solved {
    /// The answer.
    pub answer: Answer,
    /// Conflicts the solver spent.
    pub conflicts: u64,
    /// Variables and clauses of the formula (as the solver holds them).
    pub variables: u32,
    /// Clauses of the formula before solving.
    pub clauses: u64,
}

/// A formula under construction.
pub(crate) struct Cnf {
    solver: batsat::Solver<Budget>,
    truth: Lit,
}

impl Cnf {
    pub(crate) fn new(conflict_budget: u64) -> Cnf {
        let mut solver = batsat::Solver::new(
            SolverOpts::default(),
            Budget {
                learnt: 0,
                limit: conflict_budget.max(1),
                stop: Cell::new(false),
            },
        );
        let truth = Lit::new(solver.new_var_default(), true);
        solver.add_clause_reuse(&mut vec![truth]);
        Cnf { solver, truth }
    }

    fn fresh(&mut self) -> Lit {
        Lit::new(self.solver.new_var_default(), true)
    }

    fn clause(&mut self, lits: &[Lit]) {
        self.solver.add_clause_reuse(&mut lits.to_vec());
    }

    fn constant(&self, value: bool) -> Lit {
        if value {
            self.truth
        } else {
            !self.truth
        }
    }

    /// y = a & b.
    fn and(&mut self, a: Lit, b: Lit) -> Lit {
        if a == b {
            return a;
        }
        let y = self.fresh();
        self.clause(&[!y, a]);
        self.clause(&[!y, b]);
        self.clause(&[y, !a, !b]);
        y
    }

    fn or(&mut self, a: Lit, b: Lit) -> Lit {
        !self.and(!a, !b)
    }

    /// y = a ^ b.
    fn xor(&mut self, a: Lit, b: Lit) -> Lit {
        let y = self.fresh();
        self.clause(&[!y, a, b]);
        self.clause(&[!y, !a, !b]);
        self.clause(&[y, !a, b]);
        self.clause(&[y, a, !b]);
        y
    }

    /// y = s ? b : a.
    fn mux(&mut self, a: Lit, b: Lit, s: Lit) -> Lit {
        let y = self.fresh();
        self.clause(&[s, !a, y]);
        self.clause(&[s, a, !y]);
        self.clause(&[!s, !b, y]);
        self.clause(&[!s, b, !y]);
        // Redundant but helpful: a = b forces y.
        self.clause(&[!a, !b, y]);
        self.clause(&[a, b, !y]);
        y
    }

    /// The literal of `kind` applied to `i` (pin order as [`GateKind::input_pins`]).
    pub(crate) fn gate(&mut self, kind: GateKind, i: &[Lit]) -> Lit {
        match kind {
            GateKind::Buf => i[0],
            GateKind::Not => !i[0],
            GateKind::And => self.and(i[0], i[1]),
            GateKind::Nand => !self.and(i[0], i[1]),
            GateKind::Or => self.or(i[0], i[1]),
            GateKind::Nor => !self.or(i[0], i[1]),
            GateKind::Xor => self.xor(i[0], i[1]),
            GateKind::Xnor => !self.xor(i[0], i[1]),
            GateKind::AndNot => self.and(i[0], !i[1]),
            GateKind::OrNot => self.or(i[0], !i[1]),
            GateKind::Mux => self.mux(i[0], i[1], i[2]),
            GateKind::NMux => !self.mux(i[0], i[1], i[2]),
            GateKind::Aoi3 => {
                let ab = self.and(i[0], i[1]);
                !self.or(ab, i[2])
            }
            GateKind::Oai3 => {
                let ab = self.or(i[0], i[1]);
                !self.and(ab, i[2])
            }
            GateKind::Aoi4 => {
                let ab = self.and(i[0], i[1]);
                let cd = self.and(i[2], i[3]);
                !self.or(ab, cd)
            }
            GateKind::Oai4 => {
                let ab = self.or(i[0], i[1]);
                let cd = self.or(i[2], i[3]);
                !self.and(ab, cd)
            }
        }
    }

    /// Asserts that at least one of the pairs differs.
    fn assert_some_differs(&mut self, pairs: &[(Lit, Lit)]) {
        let mut any = Vec::with_capacity(pairs.len());
        for &(x, y) in pairs {
            if x == y {
                continue; // the same literal can never differ
            }
            any.push(self.xor(x, y));
        }
        // An empty clause makes the formula unsatisfiable, as it should be: nothing can
        // differ.
        if any.is_empty() {
            any.push(!self.truth);
        }
        self.clause(&any);
    }

    /// Solves; `inputs` are the literals whose model values a Sat answer reports.
    fn solve(mut self, inputs: &[Lit]) -> Solved {
        let variables = self.solver.num_vars();
        let clauses = self.solver.num_clauses();
        let r = self.solver.solve_limited(&[]);
        let conflicts = self.solver.num_conflicts();
        let answer = if r == lbool::TRUE {
            Answer::Sat(
                inputs
                    .iter()
                    .map(|&l| self.solver.value_lit(l) == lbool::TRUE)
                    .collect(),
            )
        } else if r == lbool::FALSE {
            Answer::Unsat
        } else {
            Answer::Unknown
        };
        Solved {
            answer,
            conflicts,
            variables,
            clauses,
        }
    }
}

/// Encodes the gates of `nl` that `needed` marks (by gate index), over input literals
/// `inputs` (in [`Netlist::input_nets`] order), into `lits` (indexed by net). Nets whose
/// literal is already set are left as they are.
fn encode_good(cnf: &mut Cnf, nl: &Netlist, inputs: &[Lit], needed: &[bool]) -> Vec<Option<Lit>> {
    let mut lits: Vec<Option<Lit>> = vec![None; nl.net_count()];
    for (net, &l) in nl.input_nets().iter().zip(inputs) {
        lits[net.index()] = Some(l);
    }
    for (n, lit) in lits.iter_mut().enumerate() {
        if let Driver::Constant(v) = nl.driver(NetId::from_index(n)) {
            *lit = Some(cnf.constant(v));
        }
    }
    for (g, gate) in nl.gates().iter().enumerate() {
        if !needed[g] {
            continue;
        }
        let ins: Vec<Lit> = gate
            .inputs()
            .iter()
            .map(|n| lits[n.index()].expect("topological order"))
            .collect();
        lits[gate.output().index()] = Some(cnf.gate(gate.kind(), &ins));
    }
    lits
}

/// Marks the gates in the transitive fan-in of `nets`.
fn fan_in(nl: &Netlist, nets: impl IntoIterator<Item = NetId>) -> Vec<bool> {
    let mut live = vec![false; nl.net_count()];
    for n in nets {
        live[n.index()] = true;
    }
    let mut needed = vec![false; nl.gates().len()];
    for (g, gate) in nl.gates().iter().enumerate().rev() {
        if live[gate.output().index()] {
            needed[g] = true;
            for n in gate.inputs() {
                live[n.index()] = true;
            }
        }
    }
    needed
}

/// The fault miter of `fault` in `nl`: a good copy of the logic the fault can reach, a
/// faulty copy of its fan-out cone sharing the rest, and the assertion that some primary
/// output the fault can reach differs. Sat gives a detecting vector; Unsat proves the fault
/// redundant (no input detects it at these outputs).
pub fn fault_miter(nl: &Netlist, fault: Fault, conflict_budget: u64) -> Solved {
    // Which nets carry the fault effect, and which gate pin or output bit it starts at.
    let mut faulty = vec![false; nl.net_count()];
    let (pin_site, out_site) = match fault.site {
        FaultSite::Stem(net) => {
            faulty[net.index()] = true;
            (None, None)
        }
        FaultSite::GateInput { gate, pin } => (Some((gate, pin)), None),
        FaultSite::OutputBit { port, bit } => (None, Some((port, bit))),
    };
    let mut cone = vec![false; nl.gates().len()];
    for (g, gate) in nl.gates().iter().enumerate() {
        let hit = pin_site.is_some_and(|(pg, _)| pg == g)
            || gate.inputs().iter().any(|n| faulty[n.index()]);
        if hit {
            cone[g] = true;
            faulty[gate.output().index()] = true;
        }
    }
    // Output bits the effect can reach, as (good net, flat position).
    let mut observed: Vec<(NetId, Option<(usize, u32)>)> = Vec::new();
    for (p, port) in nl.outputs().iter().enumerate() {
        for (b, &net) in port.nets().iter().enumerate() {
            let here = out_site == Some((p, b as u32));
            if here || faulty[net.index()] {
                observed.push((net, here.then_some((p, b as u32))));
            }
        }
    }
    let mut cnf = Cnf::new(conflict_budget);
    let inputs: Vec<Lit> = nl.input_nets().iter().map(|_| cnf.fresh()).collect();
    // The good copy: everything feeding an observed output or a cone gate.
    let needed = fan_in(
        nl,
        observed.iter().map(|o| o.0).chain(
            nl.gates()
                .iter()
                .enumerate()
                .filter(|(g, _)| cone[*g])
                .flat_map(|(_, gate)| gate.inputs().iter().copied()),
        ),
    );
    let good = encode_good(&mut cnf, nl, &inputs, &needed);
    let stuck = cnf.constant(fault.stuck_at);
    let mut bad: Vec<Option<Lit>> = good.clone();
    if let FaultSite::Stem(net) = fault.site {
        bad[net.index()] = Some(stuck);
    }
    for (g, gate) in nl.gates().iter().enumerate() {
        if !cone[g] {
            continue;
        }
        let ins: Vec<Lit> = gate
            .inputs()
            .iter()
            .enumerate()
            .map(|(pin, n)| {
                if pin_site == Some((g, pin)) {
                    stuck
                } else {
                    bad[n.index()].expect("topological order")
                }
            })
            .collect();
        bad[gate.output().index()] = Some(cnf.gate(gate.kind(), &ins));
    }
    let pairs: Vec<(Lit, Lit)> = observed
        .iter()
        .map(|&(net, here)| {
            let g = good[net.index()].expect("observed output encoded");
            let f = match here {
                Some(_) => stuck,
                None => bad[net.index()].expect("observed output encoded"),
            };
            (g, f)
        })
        .collect();
    cnf.assert_some_differs(&pairs);
    cnf.solve(&inputs)
}

/// One bit of a reference circuit as a miter compares it: a net, or a flag derived from nets.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum RefBit {
    /// The net itself.
    Net(NetId),
    /// 1 exactly when every listed net is 0 (a zero flag over result bits).
    AllZero(Vec<NetId>),
}

/// The equivalence miter of a reference `a` and a netlist `b` over shared inputs (ports
/// matched by name; `b`'s input ports must all be `a`'s, same widths). `pairs` lists the
/// compared bits: a reference bit and the net of `b` that must equal it. Sat gives an input
/// (in `a`'s [`Netlist::input_nets`] order) on which some pair differs; Unsat proves every
/// pair equal for every input.
pub fn equivalence_miter_bits(
    a: &Netlist,
    b: &Netlist,
    pairs: &[(RefBit, NetId)],
    conflict_budget: u64,
) -> Solved {
    let mut cnf = Cnf::new(conflict_budget);
    let inputs_a: Vec<Lit> = a.input_nets().iter().map(|_| cnf.fresh()).collect();
    // b's input bits take a's literal for the same port and bit.
    let mut by_port = std::collections::HashMap::new();
    let mut flat = 0;
    for port in a.inputs() {
        by_port.insert(port.name().to_string(), flat);
        flat += port.width() as usize;
    }
    let mut inputs_b = Vec::with_capacity(b.input_nets().len());
    for port in b.inputs() {
        let start = by_port[port.name()];
        for bit in 0..port.width() as usize {
            inputs_b.push(inputs_a[start + bit]);
        }
    }
    let ref_nets: Vec<NetId> = pairs
        .iter()
        .flat_map(|(r, _)| match r {
            RefBit::Net(n) => vec![*n],
            RefBit::AllZero(ns) => ns.clone(),
        })
        .collect();
    let la = encode_good(&mut cnf, a, &inputs_a, &fan_in(a, ref_nets));
    let lb = encode_good(
        &mut cnf,
        b,
        &inputs_b,
        &fan_in(b, pairs.iter().map(|p| p.1)),
    );
    let mut lits = Vec::with_capacity(pairs.len());
    for (r, n) in pairs {
        let x = match r {
            RefBit::Net(m) => la[m.index()].expect("encoded"),
            RefBit::AllZero(ns) => {
                let mut any = cnf.constant(false);
                for m in ns {
                    let l = la[m.index()].expect("encoded");
                    any = cnf.or(any, l);
                }
                !any
            }
        };
        lits.push((x, lb[n.index()].expect("encoded")));
    }
    cnf.assert_some_differs(&lits);
    cnf.solve(&inputs_a)
}

/// [`equivalence_miter_bits`] on the output ports named `outputs`, present in both with the
/// same width.
pub fn equivalence_miter(
    a: &Netlist,
    b: &Netlist,
    outputs: &[String],
    conflict_budget: u64,
) -> Solved {
    let mut pairs = Vec::new();
    for name in outputs {
        let pa = &a.outputs()[a.output_port(name).expect("compared port exists")];
        let pb = &b.outputs()[b.output_port(name).expect("compared port exists")];
        for (&x, &y) in pa.nets().iter().zip(pb.nets()) {
            pairs.push((RefBit::Net(x), y));
        }
    }
    equivalence_miter_bits(a, b, &pairs, conflict_budget)
}

#[cfg(test)]
mod tests;
