//! Combinational gate netlists: reading Yosys `write_json` output, building the structural
//! reference units (ripple adder, ripple subtractor, add/sub unit), and bit-parallel
//! evaluation of 64 input patterns per machine word.
//!
//! A [`Netlist`] owns its nets (one per bit-level wire, each with a human name such as `y[3]`
//! or `carry[5]` and exactly one driver), its primary input and output ports (bit nets listed
//! LSB first) and its gates in topological order, so that evaluating the gates front to back
//! always finds every gate input already computed. Fault grading (`fault`) builds on the
//! structure kept here; this module knows nothing about faults.

use std::cmp::Reverse;
use std::collections::{BTreeMap, BinaryHeap, HashMap};
use std::fmt;

use serde::de::{Deserializer, MapAccess, Visitor};
use serde::Deserialize;

use crate::arith::word::{Word, MAX_WIDTH};
use crate::error::{Error, Problem, Result};

mod builtin;
mod yosys;

/// The index of one bit-level net in a [`Netlist`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct NetId(u32);

impl NetId {
    /// The net's position in the netlist's net table, usable as an array index.
    pub fn index(self) -> usize {
        self.0 as usize
    }

    /// The net at position `index` of a netlist's net table.
    pub(crate) fn from_index(index: usize) -> NetId {
        NetId(index as u32)
    }
}

/// The simple gate types a netlist may hold. Pin order is Yosys' (`A`, `B`, `C`, `D`, `S`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum GateKind {
    /// `$_BUF_`: Y = A.
    Buf,
    /// `$_NOT_`: Y = ~A.
    Not,
    /// `$_AND_`: Y = A & B.
    And,
    /// `$_NAND_`: Y = ~(A & B).
    Nand,
    /// `$_OR_`: Y = A | B.
    Or,
    /// `$_NOR_`: Y = ~(A | B).
    Nor,
    /// `$_XOR_`: Y = A ^ B.
    Xor,
    /// `$_XNOR_`: Y = ~(A ^ B).
    Xnor,
    /// `$_ANDNOT_`: Y = A & ~B.
    AndNot,
    /// `$_ORNOT_`: Y = A | ~B.
    OrNot,
    /// `$_MUX_`: Y = S ? B : A (pins A, B, S).
    Mux,
    /// `$_NMUX_`: Y = ~(S ? B : A) (pins A, B, S).
    NMux,
    /// `$_AOI3_`: Y = ~((A & B) | C).
    Aoi3,
    /// `$_OAI3_`: Y = ~((A | B) & C).
    Oai3,
    /// `$_AOI4_`: Y = ~((A & B) | (C & D)).
    Aoi4,
    /// `$_OAI4_`: Y = ~((A | B) & (C | D)).
    Oai4,
}

impl GateKind {
    /// Every gate kind.
    pub const ALL: [GateKind; 16] = [
        GateKind::Buf,
        GateKind::Not,
        GateKind::And,
        GateKind::Nand,
        GateKind::Or,
        GateKind::Nor,
        GateKind::Xor,
        GateKind::Xnor,
        GateKind::AndNot,
        GateKind::OrNot,
        GateKind::Mux,
        GateKind::NMux,
        GateKind::Aoi3,
        GateKind::Oai3,
        GateKind::Aoi4,
        GateKind::Oai4,
    ];

    /// The Yosys cell type name, such as `$_AND_`.
    pub fn yosys_type(self) -> &'static str {
        match self {
            GateKind::Buf => "$_BUF_",
            GateKind::Not => "$_NOT_",
            GateKind::And => "$_AND_",
            GateKind::Nand => "$_NAND_",
            GateKind::Or => "$_OR_",
            GateKind::Nor => "$_NOR_",
            GateKind::Xor => "$_XOR_",
            GateKind::Xnor => "$_XNOR_",
            GateKind::AndNot => "$_ANDNOT_",
            GateKind::OrNot => "$_ORNOT_",
            GateKind::Mux => "$_MUX_",
            GateKind::NMux => "$_NMUX_",
            GateKind::Aoi3 => "$_AOI3_",
            GateKind::Oai3 => "$_OAI3_",
            GateKind::Aoi4 => "$_AOI4_",
            GateKind::Oai4 => "$_OAI4_",
        }
    }

    /// The kind for a Yosys cell type name, if it is one of the supported simple gates.
    pub fn from_yosys_type(name: &str) -> Option<GateKind> {
        GateKind::ALL.into_iter().find(|k| k.yosys_type() == name)
    }

    /// The input pin names in the order [`Gate::inputs`] lists them.
    pub fn input_pins(self) -> &'static [&'static str] {
        match self {
            GateKind::Buf | GateKind::Not => &["A"],
            GateKind::Mux | GateKind::NMux => &["A", "B", "S"],
            GateKind::Aoi3 | GateKind::Oai3 => &["A", "B", "C"],
            GateKind::Aoi4 | GateKind::Oai4 => &["A", "B", "C", "D"],
            _ => &["A", "B"],
        }
    }

    /// The number of inputs.
    pub fn arity(self) -> usize {
        self.input_pins().len()
    }

    /// Evaluates the gate on 64 patterns at once: bit `k` of every word is pattern `k`.
    /// Unused trailing inputs are ignored.
    #[inline]
    pub fn eval(self, inputs: [u64; 4]) -> u64 {
        let [a, b, c, d] = inputs;
        match self {
            GateKind::Buf => a,
            GateKind::Not => !a,
            GateKind::And => a & b,
            GateKind::Nand => !(a & b),
            GateKind::Or => a | b,
            GateKind::Nor => !(a | b),
            GateKind::Xor => a ^ b,
            GateKind::Xnor => !(a ^ b),
            GateKind::AndNot => a & !b,
            GateKind::OrNot => a | !b,
            GateKind::Mux => (a & !c) | (b & c),
            GateKind::NMux => !((a & !c) | (b & c)),
            GateKind::Aoi3 => !((a & b) | c),
            GateKind::Oai3 => !((a | b) & c),
            GateKind::Aoi4 => !((a & b) | (c & d)),
            GateKind::Oai4 => !((a | b) & (c | d)),
        }
    }
}

impl fmt::Display for GateKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.yosys_type())
    }
}

/// One gate: a kind, its input nets in pin order, its output net and its cell name.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Gate {
    kind: GateKind,
    inputs: [NetId; 4],
    output: NetId,
    name: String,
}

impl Gate {
    /// The gate type.
    pub fn kind(&self) -> GateKind {
        self.kind
    }

    /// The input nets, in the pin order of [`GateKind::input_pins`].
    pub fn inputs(&self) -> &[NetId] {
        &self.inputs[..self.kind.arity()]
    }

    /// The net the gate drives.
    pub fn output(&self) -> NetId {
        self.output
    }

    /// The cell name (as Yosys named it, or the built-in unit's own name).
    pub fn cell_name(&self) -> &str {
        &self.name
    }

    /// The cell type as Yosys names it, such as `$_XOR_`.
    pub fn cell_type(&self) -> &'static str {
        self.kind.yosys_type()
    }
}

/// What drives a net.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Driver {
    /// Bit `bit` (0 = LSB) of input port number `port`.
    Input {
        /// Index into [`Netlist::inputs`].
        port: usize,
        /// Bit position within the port, LSB = 0.
        bit: u32,
    },
    /// The output of gate number `gate` (an index into [`Netlist::gates`]).
    Gate(usize),
    /// A constant 0 (`false`) or 1 (`true`).
    Constant(bool),
}

/// A primary input or output port: a name and its bit nets, LSB first.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Port {
    name: String,
    /// The entry of the netlist's name table the port's nets are named after, when they are.
    name_slot: Option<u32>,
    nets: Vec<NetId>,
    /// The declared index of the LSB (Yosys `offset`), used only for labels.
    offset: i64,
    /// True for ports declared `[0:N]` (Yosys `upto`), used only for labels.
    upto: bool,
}

impl Port {
    /// The port name.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The bit nets, LSB first.
    pub fn nets(&self) -> &[NetId] {
        &self.nets
    }

    /// The number of bits.
    pub fn width(&self) -> u32 {
        self.nets.len() as u32
    }

    /// A human label for bit `bit` (LSB = 0): `y[3]`, or just `co` for a one-bit port.
    pub fn bit_label(&self, bit: u32) -> String {
        if self.nets.len() == 1 {
            return self.name.clone();
        }
        format!(
            "{}[{}]",
            self.name,
            declared_index(self.offset, self.upto, self.nets.len(), bit as usize)
        )
    }
}

/// The declared index of position `i` (LSB = 0) of a `width`-bit signal.
fn declared_index(offset: i64, upto: bool, width: usize, i: usize) -> i64 {
    if upto {
        offset + (width - 1 - i) as i64
    } else {
        offset + i as i64
    }
}

/// A net's human name: an entry of the name table plus an optional bit index.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct NetName {
    slot: u32,
    index: Option<i64>,
}

#[derive(Debug, Clone, PartialEq, Eq)]
struct NetInfo {
    name: NetName,
    driver: Driver,
}

/// A combinational gate netlist with named nets, ports and topologically ordered gates.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Netlist {
    source: String,
    module: String,
    names: Vec<String>,
    nets: Vec<NetInfo>,
    inputs: Vec<Port>,
    outputs: Vec<Port>,
    gates: Vec<Gate>,
    input_nets: Vec<NetId>,
    output_nets: Vec<NetId>,
}

impl Netlist {
    /// The file (or built-in description) the netlist came from, used in error messages.
    pub fn source(&self) -> &str {
        &self.source
    }

    /// The module name.
    pub fn module(&self) -> &str {
        &self.module
    }

    /// The primary input ports, in declaration order.
    pub fn inputs(&self) -> &[Port] {
        &self.inputs
    }

    /// The primary output ports, in declaration order.
    pub fn outputs(&self) -> &[Port] {
        &self.outputs
    }

    /// Every primary input bit net: the ports' nets concatenated in port order, LSB first.
    pub fn input_nets(&self) -> &[NetId] {
        &self.input_nets
    }

    /// Every primary output bit net: the ports' nets concatenated in port order, LSB first.
    pub fn output_nets(&self) -> &[NetId] {
        &self.output_nets
    }

    /// The gates in topological order (every gate's inputs are driven by earlier gates,
    /// primary inputs or constants).
    pub fn gates(&self) -> &[Gate] {
        &self.gates
    }

    /// The number of nets (constants included).
    pub fn net_count(&self) -> usize {
        self.nets.len()
    }

    /// What drives `net`.
    pub fn driver(&self, net: NetId) -> Driver {
        self.nets[net.index()].driver
    }

    /// The human name of `net`, such as `y[3]`, `carry[5]` or `co`.
    pub fn net_name(&self, net: NetId) -> String {
        let name = self.nets[net.index()].name;
        let base = &self.names[name.slot as usize];
        match name.index {
            Some(i) => format!("{base}[{i}]"),
            None => base.clone(),
        }
    }

    /// The index of the input port called `name`.
    pub fn input_port(&self, name: &str) -> Option<usize> {
        self.inputs.iter().position(|p| p.name == name)
    }

    /// The index of the output port called `name`.
    pub fn output_port(&self, name: &str) -> Option<usize> {
        self.outputs.iter().position(|p| p.name == name)
    }

    /// Renames ports (`(old, new)` pairs), so a built-in unit or a synthesized netlist can use
    /// a spec's port names. Nets named after a port follow it (`y[3]` becomes `sum[3]`). All
    /// renames happen at once, so swapping two names works. Unknown old names, duplicate new
    /// names and names already used by another net are errors; on error nothing changes.
    pub fn rename_ports(&mut self, renames: &[(&str, &str)]) -> Result<()> {
        let mut problems = Vec::new();
        let file = self.source.clone();
        let mut plan: Vec<(bool, usize, String)> = Vec::new();
        for (old, new) in renames {
            let field = format!("port {old}");
            let port = match (self.input_port(old), self.output_port(old)) {
                (Some(i), _) => (true, i),
                (None, Some(o)) => (false, o),
                (None, None) => {
                    problems.push(
                        Problem::new(
                            &file,
                            format!("no port named `{old}` in module `{}`", self.module),
                        )
                        .field(field),
                    );
                    continue;
                }
            };
            if new.is_empty() {
                problems.push(Problem::new(&file, "the new port name is empty").field(field));
                continue;
            }
            plan.push((port.0, port.1, new.to_string()));
        }
        // The final set of port names must be unique, and must not collide with names of
        // internal nets, which would make fault reports ambiguous.
        let renamed: HashMap<(bool, usize), &str> = plan
            .iter()
            .map(|(i, p, n)| ((*i, *p), n.as_str()))
            .collect();
        let mut final_names: BTreeMap<String, usize> = BTreeMap::new();
        let mut port_slots = Vec::new();
        for (is_input, ports) in [(true, &self.inputs), (false, &self.outputs)] {
            for (i, port) in ports.iter().enumerate() {
                let name = renamed.get(&(is_input, i)).copied().unwrap_or(&port.name);
                *final_names.entry(name.to_string()).or_default() += 1;
                port_slots.extend(port.name_slot);
            }
        }
        for (name, count) in &final_names {
            if *count > 1 {
                problems.push(
                    Problem::new(&file, format!("two ports would both be called `{name}`"))
                        .field(format!("port {name}")),
                );
            }
        }
        for (_, _, new) in &plan {
            if let Some(slot) = self.names.iter().position(|n| n == new) {
                if !port_slots.contains(&(slot as u32)) {
                    problems.push(
                        Problem::new(
                            &file,
                            format!(
                                "`{new}` already names an internal net of module `{}`",
                                self.module
                            ),
                        )
                        .field(format!("port {new}")),
                    );
                }
            }
        }
        if !problems.is_empty() {
            return Err(Error::input(problems));
        }
        let mut slot_names: Vec<(u32, String)> = Vec::new();
        for (is_input, index, new) in plan {
            let port = if is_input {
                &mut self.inputs[index]
            } else {
                &mut self.outputs[index]
            };
            port.name = new.clone();
            if let Some(slot) = port.name_slot {
                slot_names.push((slot, new));
            }
        }
        for (slot, new) in slot_names {
            self.names[slot as usize] = new;
        }
        Ok(())
    }

    /// A copy that keeps only the output ports whose indices are in `ports` and drops every
    /// gate that then reaches no output. The nets those gates drove stay in the net table,
    /// unread and tied to 0, so net ids and names do not change; inputs all stay. Used to
    /// grade only the outputs a spec checks: logic seen only by other outputs cannot show a
    /// fault to a test that never compares those outputs.
    pub fn restricted_to_outputs(&self, ports: &[usize]) -> Netlist {
        let outputs: Vec<Port> = self
            .outputs
            .iter()
            .enumerate()
            .filter(|(i, _)| ports.contains(i))
            .map(|(_, p)| p.clone())
            .collect();
        let mut live = vec![false; self.nets.len()];
        for p in &outputs {
            for n in &p.nets {
                live[n.index()] = true;
            }
        }
        // Gates are in topological order, so walking backwards visits every reader of a
        // net before the gate driving it.
        let mut kept = vec![false; self.gates.len()];
        for (g, gate) in self.gates.iter().enumerate().rev() {
            if live[gate.output.index()] {
                kept[g] = true;
                for n in gate.inputs() {
                    live[n.index()] = true;
                }
            }
        }
        let mut new_index = vec![usize::MAX; self.gates.len()];
        let mut gates = Vec::new();
        for (g, gate) in self.gates.iter().enumerate() {
            if kept[g] {
                new_index[g] = gates.len();
                gates.push(gate.clone());
            }
        }
        let nets = self
            .nets
            .iter()
            .map(|n| NetInfo {
                name: n.name,
                driver: match n.driver {
                    Driver::Gate(g) if kept[g] => Driver::Gate(new_index[g]),
                    Driver::Gate(_) => Driver::Constant(false),
                    d => d,
                },
            })
            .collect();
        let output_nets = outputs
            .iter()
            .flat_map(|p| p.nets.iter().copied())
            .collect();
        Netlist {
            source: self.source.clone(),
            module: self.module.clone(),
            names: self.names.clone(),
            nets,
            inputs: self.inputs.clone(),
            outputs,
            gates,
            input_nets: self.input_nets.clone(),
            output_nets,
        }
    }

    /// Evaluates the netlist on 64 patterns at once. `inputs` holds one word per primary
    /// input bit in [`Netlist::input_nets`] order (bit `k` of each word is pattern `k`);
    /// `outputs` receives one word per primary output bit in [`Netlist::output_nets`] order.
    pub fn eval_parallel(&self, inputs: &[u64], outputs: &mut [u64]) -> Result<()> {
        if inputs.len() != self.input_nets.len() || outputs.len() != self.output_nets.len() {
            return Err(Error::problem(Problem::new(
                &self.source,
                format!(
                    "module `{}` has {} input bits and {} output bits, but {} input and {} output words were given",
                    self.module,
                    self.input_nets.len(),
                    self.output_nets.len(),
                    inputs.len(),
                    outputs.len()
                ),
            )));
        }
        let mut values = self.initial_values();
        for (net, &v) in self.input_nets.iter().zip(inputs) {
            values[net.index()] = v;
        }
        self.eval_gates(&mut values);
        for (out, net) in outputs.iter_mut().zip(&self.output_nets) {
            *out = values[net.index()];
        }
        Ok(())
    }

    /// Evaluates one input vector given as one [`Word`] per input port (in port order) and
    /// returns one word per output port. Bits above a port's width must be zero.
    pub fn eval(&self, inputs: &[Word]) -> Result<Vec<Word>> {
        let mut words = Vec::with_capacity(self.input_nets.len());
        let mut problems = Vec::new();
        if inputs.len() != self.inputs.len() {
            problems.push(Problem::new(
                &self.source,
                format!(
                    "module `{}` has {} input ports but {} values were given",
                    self.module,
                    self.inputs.len(),
                    inputs.len()
                ),
            ));
        }
        for (port, value) in self.inputs.iter().zip(inputs) {
            if value.significant_bits() > port.width() {
                problems.push(
                    Problem::new(
                        &self.source,
                        format!("value has bits above the port's {}-bit width", port.width()),
                    )
                    .field(format!("port {}", port.name)),
                );
            }
            for bit in 0..port.width() {
                words.push(value.bit(bit) as u64);
            }
        }
        if !problems.is_empty() {
            return Err(Error::input(problems));
        }
        let mut out = vec![0u64; self.output_nets.len()];
        self.eval_parallel(&words, &mut out)?;
        let mut result = Vec::with_capacity(self.outputs.len());
        let mut flat = out.iter();
        for port in &self.outputs {
            let mut w = Word::ZERO;
            for bit in 0..port.width() {
                let v = flat.next().copied().unwrap_or(0);
                w.set_bit(bit, v & 1 == 1);
            }
            result.push(w);
        }
        Ok(result)
    }

    /// A net-indexed value table with constants filled in and everything else zero.
    pub(crate) fn initial_values(&self) -> Vec<u64> {
        self.nets
            .iter()
            .map(|n| match n.driver {
                Driver::Constant(true) => !0,
                _ => 0,
            })
            .collect()
    }

    /// Evaluates every gate in topological order over a net-indexed value table whose
    /// primary inputs and constants are already set.
    #[inline]
    pub(crate) fn eval_gates(&self, values: &mut [u64]) {
        for gate in &self.gates {
            values[gate.output.index()] = gate_value(gate, values);
        }
    }

    /// A new builder; `source` labels error messages (a file name or a description).
    pub fn builder(source: &str, module: &str) -> NetlistBuilder {
        NetlistBuilder::new(source, module)
    }
}

/// The value of `gate` over a net-indexed value table.
#[inline]
pub(crate) fn gate_value(gate: &Gate, values: &[u64]) -> u64 {
    let i = &gate.inputs;
    gate.kind.eval([
        values[i[0].index()],
        values[i[1].index()],
        values[i[2].index()],
        values[i[3].index()],
    ])
}

/// Builds a [`Netlist`] from nets, ports and gates given in any order; [`NetlistBuilder::build`]
/// checks drivers, sorts the gates topologically and reports combinational loops.
#[derive(Debug, Clone)]
pub struct NetlistBuilder {
    source: String,
    module: String,
    names: Vec<String>,
    slots: HashMap<String, u32>,
    nets: Vec<(NetName, Option<Driver>)>,
    inputs: Vec<Port>,
    outputs: Vec<Port>,
    gates: Vec<Gate>,
    constants: [Option<NetId>; 2],
    problems: Vec<Problem>,
}

impl NetlistBuilder {
    /// A new, empty builder; `source` labels error messages.
    pub fn new(source: &str, module: &str) -> NetlistBuilder {
        NetlistBuilder {
            source: source.to_string(),
            module: module.to_string(),
            names: Vec::new(),
            slots: HashMap::new(),
            nets: Vec::new(),
            inputs: Vec::new(),
            outputs: Vec::new(),
            gates: Vec::new(),
            constants: [None, None],
            problems: Vec::new(),
        }
    }

    fn slot(&mut self, name: &str) -> u32 {
        if let Some(&s) = self.slots.get(name) {
            return s;
        }
        let s = self.names.len() as u32;
        self.names.push(name.to_string());
        self.slots.insert(name.to_string(), s);
        s
    }

    /// A new undriven net named `name` or `name[index]`.
    pub fn net(&mut self, name: &str, index: Option<i64>) -> NetId {
        let slot = self.slot(name);
        let id = NetId(self.nets.len() as u32);
        self.nets.push((NetName { slot, index }, None));
        id
    }

    /// The constant-0 or constant-1 net (one of each, shared).
    pub fn constant(&mut self, value: bool) -> NetId {
        if let Some(id) = self.constants[value as usize] {
            return id;
        }
        let id = self.net(if value { "1'b1" } else { "1'b0" }, None);
        self.nets[id.index()].1 = Some(Driver::Constant(value));
        self.constants[value as usize] = Some(id);
        id
    }

    /// Declares an input port of `width` new nets named `name[i]` (or `name` when one bit
    /// wide) and returns them, LSB first.
    pub fn input(&mut self, name: &str, width: u32) -> Vec<NetId> {
        let nets: Vec<NetId> = (0..width)
            .map(|i| self.net(name, if width == 1 { None } else { Some(i as i64) }))
            .collect();
        let slot = self.slot(name);
        self.input_port(name, &nets, Some(slot), 0, false);
        nets
    }

    /// Declares an input port driving existing nets (LSB first).
    fn input_port(
        &mut self,
        name: &str,
        nets: &[NetId],
        name_slot: Option<u32>,
        offset: i64,
        upto: bool,
    ) {
        let port = self.inputs.len();
        for (bit, &net) in nets.iter().enumerate() {
            self.drive(
                net,
                Driver::Input {
                    port,
                    bit: bit as u32,
                },
                &format!("port {name}"),
            );
        }
        self.inputs.push(Port {
            name: name.to_string(),
            name_slot,
            nets: nets.to_vec(),
            offset,
            upto,
        });
    }

    /// Declares an output port observing `nets` (LSB first).
    pub fn output(&mut self, name: &str, nets: &[NetId]) {
        let slot = self.slots.get(name).copied();
        self.output_port(name, nets, slot, 0, false);
    }

    fn output_port(
        &mut self,
        name: &str,
        nets: &[NetId],
        name_slot: Option<u32>,
        offset: i64,
        upto: bool,
    ) {
        self.check_nets(nets, &format!("port {name}"));
        self.outputs.push(Port {
            name: name.to_string(),
            name_slot,
            nets: nets.to_vec(),
            offset,
            upto,
        });
    }

    fn check_nets(&mut self, nets: &[NetId], field: &str) -> bool {
        let ok = nets.iter().all(|n| n.index() < self.nets.len());
        if !ok {
            self.problems.push(
                Problem::new(&self.source, "refers to a net this builder did not create")
                    .field(field),
            );
        }
        ok
    }

    fn drive(&mut self, net: NetId, driver: Driver, field: &str) {
        if !self.check_nets(&[net], field) {
            return;
        }
        let slot = &mut self.nets[net.index()].1;
        if slot.is_some() {
            let name = self.net_label(net);
            self.problems.push(
                Problem::new(
                    &self.source,
                    format!("net `{name}` has more than one driver"),
                )
                .field(field),
            );
        } else {
            *slot = Some(driver);
        }
    }

    fn net_label(&self, net: NetId) -> String {
        let name = self.nets[net.index()].0;
        let base = &self.names[name.slot as usize];
        match name.index {
            Some(i) => format!("{base}[{i}]"),
            None => base.clone(),
        }
    }

    /// Adds a gate of `kind` named `cell_name` reading `inputs` (pin order of
    /// [`GateKind::input_pins`]) and driving the existing net `output`.
    pub fn gate(&mut self, kind: GateKind, cell_name: &str, inputs: &[NetId], output: NetId) {
        let field = format!("cell {cell_name}");
        if inputs.len() != kind.arity() {
            self.problems.push(
                Problem::new(
                    &self.source,
                    format!(
                        "a {} gate takes {} inputs, {} were given",
                        kind.yosys_type(),
                        kind.arity(),
                        inputs.len()
                    ),
                )
                .field(field),
            );
            return;
        }
        if !self.check_nets(inputs, &field) {
            return;
        }
        let gate = self.gates.len();
        self.drive(output, Driver::Gate(gate), &field);
        let mut pins = [inputs[0]; 4];
        pins[..inputs.len()].copy_from_slice(inputs);
        self.gates.push(Gate {
            kind,
            inputs: pins,
            output,
            name: cell_name.to_string(),
        });
    }

    /// Adds a gate driving a new net named `name[index]` (or `name`) and returns that net.
    pub fn gate_net(
        &mut self,
        kind: GateKind,
        cell_name: &str,
        inputs: &[NetId],
        name: &str,
        index: Option<i64>,
    ) -> NetId {
        let out = self.net(name, index);
        self.gate(kind, cell_name, inputs, out);
        out
    }

    /// Checks the netlist and sorts its gates topologically. Errors: nets used but not
    /// driven, nets with two drivers, duplicate port names, combinational loops.
    pub fn build(mut self) -> Result<Netlist> {
        let mut port_names: HashMap<&str, usize> = HashMap::new();
        for p in self.inputs.iter().chain(&self.outputs) {
            *port_names.entry(p.name.as_str()).or_default() += 1;
        }
        let mut dups: Vec<&str> = port_names
            .iter()
            .filter(|(_, &c)| c > 1)
            .map(|(n, _)| *n)
            .collect();
        dups.sort_unstable();
        for d in dups {
            self.problems.push(
                Problem::new(&self.source, format!("more than one port is called `{d}`"))
                    .field(format!("port {d}")),
            );
        }
        // Every net something reads must have a driver.
        let mut reported = vec![false; self.nets.len()];
        let mut undriven = Vec::new();
        for g in &self.gates {
            for &n in g.inputs() {
                if self.nets[n.index()].1.is_none() && !reported[n.index()] {
                    reported[n.index()] = true;
                    undriven.push((
                        n,
                        format!("cell {}", g.name),
                        format!("read by cell `{}`", g.name),
                    ));
                }
            }
        }
        for p in &self.outputs {
            for &n in &p.nets {
                if self.nets[n.index()].1.is_none() && !reported[n.index()] {
                    reported[n.index()] = true;
                    undriven.push((
                        n,
                        format!("port {}", p.name),
                        format!("observed by output port `{}`", p.name),
                    ));
                }
            }
        }
        for (n, field, what) in undriven {
            let name = self.net_label(n);
            self.problems.push(
                Problem::new(
                    &self.source,
                    format!("net `{name}` is {what} but nothing drives it"),
                )
                .field(field),
            );
        }
        if !self.problems.is_empty() {
            return Err(Error::input(self.problems));
        }
        let order = self.topological_order()?;
        let mut new_index = vec![0usize; self.gates.len()];
        for (new, &old) in order.iter().enumerate() {
            new_index[old] = new;
        }
        let mut gates: Vec<Option<Gate>> = self.gates.into_iter().map(Some).collect();
        let gates: Vec<Gate> = order
            .iter()
            .map(|&old| gates[old].take().expect("each gate once"))
            .collect();
        let nets: Vec<NetInfo> = self
            .nets
            .into_iter()
            .map(|(name, driver)| NetInfo {
                name,
                // Undriven nets that nothing reads are legal leftovers; they read as 0.
                driver: match driver {
                    Some(Driver::Gate(g)) => Driver::Gate(new_index[g]),
                    Some(d) => d,
                    None => Driver::Constant(false),
                },
            })
            .collect();
        let input_nets = self
            .inputs
            .iter()
            .flat_map(|p| p.nets.iter().copied())
            .collect();
        let output_nets = self
            .outputs
            .iter()
            .flat_map(|p| p.nets.iter().copied())
            .collect();
        Ok(Netlist {
            source: self.source,
            module: self.module,
            names: self.names,
            nets,
            inputs: self.inputs,
            outputs: self.outputs,
            gates,
            input_nets,
            output_nets,
        })
    }

    /// Kahn's algorithm, always taking the lowest-numbered ready gate so that a netlist
    /// already in order keeps its order. A leftover gate lies on or after a loop.
    fn topological_order(&self) -> Result<Vec<usize>> {
        let n = self.gates.len();
        let mut indegree = vec![0usize; n];
        let mut successors: Vec<Vec<usize>> = vec![Vec::new(); n];
        for (g, gate) in self.gates.iter().enumerate() {
            for &input in gate.inputs() {
                if let Some(Driver::Gate(d)) = self.nets[input.index()].1 {
                    indegree[g] += 1;
                    successors[d].push(g);
                }
            }
        }
        let mut ready: BinaryHeap<Reverse<usize>> =
            (0..n).filter(|&g| indegree[g] == 0).map(Reverse).collect();
        let mut order = Vec::with_capacity(n);
        while let Some(Reverse(g)) = ready.pop() {
            order.push(g);
            for &s in &successors[g] {
                indegree[s] -= 1;
                if indegree[s] == 0 {
                    ready.push(Reverse(s));
                }
            }
        }
        if order.len() == n {
            return Ok(order);
        }
        // Walk backwards from a leftover gate through leftover drivers until a gate repeats:
        // every leftover gate has a leftover driver, so the walk must close a loop.
        let start = (0..n).find(|&g| indegree[g] > 0).unwrap_or(0);
        let mut seen_at = vec![usize::MAX; n];
        let mut path = Vec::new();
        let mut g = start;
        while seen_at[g] == usize::MAX {
            seen_at[g] = path.len();
            path.push(g);
            let next = self.gates[g]
                .inputs()
                .iter()
                .find_map(|i| match self.nets[i.index()].1 {
                    Some(Driver::Gate(d)) if indegree[d] > 0 => Some(d),
                    _ => None,
                });
            match next {
                Some(d) => g = d,
                None => break,
            }
        }
        let cycle: Vec<usize> = path[seen_at[g].min(path.len() - 1)..]
            .iter()
            .rev()
            .copied()
            .collect();
        let steps: Vec<String> = cycle
            .iter()
            .map(|&c| {
                format!(
                    "cell `{}` drives `{}`",
                    self.gates[c].name,
                    self.net_label(self.gates[c].output)
                )
            })
            .collect();
        Err(Error::problem(
            Problem::new(
                &self.source,
                format!(
                    "combinational loop: {}, which feeds back into cell `{}`; only loop-free combinational logic can be graded",
                    steps.join(", which feeds "),
                    self.gates[cycle[0]].name
                ),
            )
            .field(format!("cell {}", self.gates[cycle[0]].name)),
        ))
    }
}

#[cfg(test)]
mod tests;
