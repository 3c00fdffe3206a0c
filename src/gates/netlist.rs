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

// ---------------------------------------------------------------------------------------------
// Built-in structural units.

impl Netlist {
    fn check_width(width: u32, unit: &str) -> Result<()> {
        if width == 0 || width > MAX_WIDTH {
            return Err(Error::problem(
                Problem::new(
                    format!("<built-in {unit}>"),
                    format!("width must be 1 to {MAX_WIDTH}, not {width}"),
                )
                .field("width"),
            ));
        }
        Ok(())
    }

    /// A `width`-bit ripple-carry adder built from full-adder cells (s = a ^ b ^ c,
    /// co = (a & b) | (c & (a ^ b)), DOMAIN "One-bit cells"). Ports: inputs `a`, `b` and, when
    /// `carry_in`, `cin`; outputs `y`, `co` (carry out) and `ovf` (two's-complement overflow,
    /// carry into the MSB XOR carry out). Without a carry-in, bit 0 is a half adder.
    /// Per-bit nets are `p[i]` (a ^ b), `g[i]` (a & b), `t[i]` (c & p), `carry[i]` (carry
    /// into bit i); cells are `fa[i].xor_ab`, `fa[i].xor_sum`, `fa[i].and_ab`, `fa[i].and_cp`,
    /// `fa[i].or_carry` and `ovf_xor`.
    pub fn ripple_adder(width: u32, carry_in: bool) -> Result<Netlist> {
        Netlist::check_width(width, "ripple adder")?;
        let mut b = NetlistBuilder::new("<built-in ripple adder>", "ripple_adder");
        let a = b.input("a", width);
        let bb = b.input("b", width);
        let cin = carry_in.then(|| b.input("cin", 1)[0]);
        let (y, carries) = ripple_chain(&mut b, &a, &bb, cin, Cell::Add);
        finish_flags(&mut b, &y, &carries);
        b.build()
    }

    /// A `width`-bit ripple-borrow subtractor (a - b - bin) built from full-subtractor cells
    /// (d = a ^ b ^ bin, bout = (~a & b) | (~(a ^ b) & bin), DOMAIN "One-bit cells"). Ports:
    /// inputs `a`, `b` and, when `borrow_in`, `cin` (a borrow: 1 subtracts one more); outputs
    /// `y`, `co` (the borrow out: 1 = a borrow was needed) and `ovf` (two's-complement
    /// overflow, borrow into the MSB XOR borrow out). Without a borrow-in, bit 0 is a half
    /// subtractor. Per-bit nets: `x[i]` (a ^ b), `g[i]` (~a & b), `t[i]` (bin & ~x),
    /// `carry[i]` (borrow into bit i); cells `fs[i].xor_ab`, `fs[i].xor_diff`,
    /// `fs[i].andnot_ba`, `fs[i].andnot_bx`, `fs[i].or_borrow`, `ovf_xor`.
    pub fn ripple_subtractor(width: u32, borrow_in: bool) -> Result<Netlist> {
        Netlist::check_width(width, "ripple subtractor")?;
        let mut b = NetlistBuilder::new("<built-in ripple subtractor>", "ripple_subtractor");
        let a = b.input("a", width);
        let bb = b.input("b", width);
        let bin = borrow_in.then(|| b.input("cin", 1)[0]);
        let (y, carries) = ripple_chain(&mut b, &a, &bb, bin, Cell::Subtract);
        finish_flags(&mut b, &y, &carries);
        b.build()
    }

    /// A `width`-bit add/subtract unit: every b bit is XORed with `mode` (nets `bm[i]`,
    /// cells `bx[i]`) and `mode` is the ripple adder's carry-in, so mode 0 gives a + b and
    /// mode 1 gives a + ~b + 1 = a - b (DOMAIN "Subtraction and its flags"). Ports: inputs
    /// `a`, `b`, `mode`; outputs `y`, `co` (the raw adder carry: NOT borrow when
    /// subtracting) and `ovf` (carry into the MSB XOR carry out).
    pub fn addsub_unit(width: u32) -> Result<Netlist> {
        Netlist::check_width(width, "add/sub unit")?;
        let mut b = NetlistBuilder::new("<built-in add/sub unit>", "addsub_unit");
        let a = b.input("a", width);
        let bb = b.input("b", width);
        let mode = b.input("mode", 1)[0];
        let bm: Vec<NetId> = (0..width as usize)
            .map(|i| {
                b.gate_net(
                    GateKind::Xor,
                    &format!("bx[{i}]"),
                    &[bb[i], mode],
                    "bm",
                    Some(i as i64),
                )
            })
            .collect();
        let (y, carries) = ripple_chain(&mut b, &a, &bm, Some(mode), Cell::Add);
        finish_flags(&mut b, &y, &carries);
        b.build()
    }
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum Cell {
    Add,
    Subtract,
}

/// Builds the ripple chain; returns the result nets and the carries (borrows) into each bit
/// plus the final carry out (so `width + 1` entries; entry 0 is the carry-in, if any).
fn ripple_chain(
    b: &mut NetlistBuilder,
    a: &[NetId],
    bb: &[NetId],
    carry_in: Option<NetId>,
    cell: Cell,
) -> (Vec<NetId>, Vec<Option<NetId>>) {
    let width = a.len();
    let mut carries = vec![carry_in];
    let mut y = Vec::with_capacity(width);
    let prefix = if cell == Cell::Add { "fa" } else { "fs" };
    for i in 0..width {
        let idx = Some(i as i64);
        let name = |part: &str| format!("{prefix}[{i}].{part}");
        // The last carry out is the `co` port's own net, so reports name it `co`.
        let (carry_name, carry_index) = if i + 1 == width {
            ("co", None)
        } else {
            ("carry", Some(i as i64 + 1))
        };
        let out_name = if width == 1 { None } else { idx };
        let next = match (cell, carries[i]) {
            (Cell::Add, Some(c)) => {
                let p = b.gate_net(GateKind::Xor, &name("xor_ab"), &[a[i], bb[i]], "p", idx);
                let g = b.gate_net(GateKind::And, &name("and_ab"), &[a[i], bb[i]], "g", idx);
                y.push(b.gate_net(GateKind::Xor, &name("xor_sum"), &[p, c], "y", out_name));
                let t = b.gate_net(GateKind::And, &name("and_cp"), &[c, p], "t", idx);
                b.gate_net(
                    GateKind::Or,
                    &name("or_carry"),
                    &[g, t],
                    carry_name,
                    carry_index,
                )
            }
            (Cell::Add, None) => {
                // Half adder: the sum is a ^ b and the carry a & b.
                y.push(b.gate_net(
                    GateKind::Xor,
                    &name("xor_ab"),
                    &[a[i], bb[i]],
                    "y",
                    out_name,
                ));
                b.gate_net(
                    GateKind::And,
                    &name("and_ab"),
                    &[a[i], bb[i]],
                    carry_name,
                    carry_index,
                )
            }
            (Cell::Subtract, Some(c)) => {
                let x = b.gate_net(GateKind::Xor, &name("xor_ab"), &[a[i], bb[i]], "x", idx);
                let g = b.gate_net(
                    GateKind::AndNot,
                    &name("andnot_ba"),
                    &[bb[i], a[i]],
                    "g",
                    idx,
                );
                y.push(b.gate_net(GateKind::Xor, &name("xor_diff"), &[x, c], "y", out_name));
                let t = b.gate_net(GateKind::AndNot, &name("andnot_bx"), &[c, x], "t", idx);
                b.gate_net(
                    GateKind::Or,
                    &name("or_borrow"),
                    &[g, t],
                    carry_name,
                    carry_index,
                )
            }
            (Cell::Subtract, None) => {
                // Half subtractor: the difference is a ^ b and the borrow ~a & b.
                y.push(b.gate_net(
                    GateKind::Xor,
                    &name("xor_ab"),
                    &[a[i], bb[i]],
                    "y",
                    out_name,
                ));
                b.gate_net(
                    GateKind::AndNot,
                    &name("andnot_ba"),
                    &[bb[i], a[i]],
                    carry_name,
                    carry_index,
                )
            }
        };
        carries.push(Some(next));
    }
    (y, carries)
}

/// Adds the `y`, `co` and `ovf` output ports.
fn finish_flags(b: &mut NetlistBuilder, y: &[NetId], carries: &[Option<NetId>]) {
    let width = y.len();
    let co = carries[width].expect("a ripple chain always produces a carry out");
    b.output("y", y);
    b.output("co", &[co]);
    // Overflow is the carry into the MSB XOR the carry out; with no carry-in at width 1 the
    // carry into the MSB is constant 0 and overflow is the carry out itself.
    let ovf = match carries[width - 1] {
        Some(c) => b.gate_net(GateKind::Xor, "ovf_xor", &[c, co], "ovf", None),
        None => co,
    };
    b.output("ovf", &[ovf]);
}

// ---------------------------------------------------------------------------------------------
// Yosys JSON reader.

/// A JSON object read with its keys in file order (serde_json's own map sorts them unless a
/// crate-wide feature is switched on, and port order matters here).
#[derive(Debug)]
struct OrderedMap<T>(Vec<(String, T)>);

impl<T> Default for OrderedMap<T> {
    fn default() -> Self {
        OrderedMap(Vec::new())
    }
}

impl<'de, T: Deserialize<'de>> Deserialize<'de> for OrderedMap<T> {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> std::result::Result<Self, D::Error> {
        struct V<T>(std::marker::PhantomData<T>);
        impl<'de, T: Deserialize<'de>> Visitor<'de> for V<T> {
            type Value = OrderedMap<T>;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a JSON object")
            }
            fn visit_map<A: MapAccess<'de>>(
                self,
                mut map: A,
            ) -> std::result::Result<Self::Value, A::Error> {
                let mut entries = Vec::new();
                while let Some((k, v)) = map.next_entry::<String, T>()? {
                    entries.push((k, v));
                }
                Ok(OrderedMap(entries))
            }
        }
        deserializer.deserialize_map(V(std::marker::PhantomData))
    }
}

#[derive(Deserialize)]
struct YosysFile {
    modules: Option<OrderedMap<YosysModule>>,
}

#[derive(Deserialize)]
struct YosysModule {
    #[serde(default)]
    ports: OrderedMap<YosysPort>,
    #[serde(default)]
    cells: OrderedMap<YosysCell>,
    #[serde(default)]
    netnames: OrderedMap<YosysNetname>,
}

#[derive(Deserialize)]
struct YosysPort {
    direction: String,
    bits: Vec<YosysBit>,
    #[serde(default)]
    offset: i64,
    #[serde(default)]
    upto: u8,
}

#[derive(Deserialize)]
struct YosysCell {
    #[serde(rename = "type")]
    cell_type: String,
    #[serde(default)]
    connections: OrderedMap<Vec<YosysBit>>,
}

#[derive(Deserialize)]
struct YosysNetname {
    bits: Vec<YosysBit>,
    #[serde(default)]
    hide_name: u8,
    #[serde(default)]
    offset: i64,
    #[serde(default)]
    upto: u8,
}

/// A bit in Yosys JSON: a net number, or one of the constant strings "0", "1", "x", "z".
#[derive(Deserialize, Clone, PartialEq, Eq)]
#[serde(untagged)]
enum YosysBit {
    Net(u64),
    Constant(String),
}

/// Finds where keys sit in the JSON text, so semantic errors can carry a line number.
struct Locator<'a> {
    text: &'a str,
}

impl Locator<'_> {
    /// The byte offset of the first `"key":` at or after `from`.
    fn key(&self, from: usize, key: &str) -> Option<usize> {
        let quoted = serde_json::to_string(key).ok()?;
        let mut at = from;
        while let Some(found) = self.text.get(at..)?.find(&quoted) {
            let pos = at + found;
            let after = self.text[pos + quoted.len()..].trim_start();
            if after.starts_with(':') {
                return Some(pos);
            }
            at = pos + quoted.len();
        }
        None
    }

    fn line(&self, pos: usize) -> usize {
        self.text[..pos].bytes().filter(|&b| b == b'\n').count() + 1
    }
}

/// Why a cell type is not accepted, and which synthesis step would remove it.
fn unsupported_cell_hint(cell_type: &str) -> String {
    let lower = cell_type.to_ascii_lowercase();
    let storage = ["dff", "latch", "_sr_", "$sr", "$ff", "$_ff_", "mem"];
    if cell_type.starts_with("$paramod") || !cell_type.starts_with('$') {
        format!(
            "it is an instance of module `{cell_type}`, so the design is not flattened; run `synth -flatten` (or `flatten`) before `write_json`"
        )
    } else if storage.iter().any(|s| lower.contains(s)) {
        "it is a storage element; only combinational logic can be graded, so grade the combinational module on its own".to_string()
    } else if cell_type.starts_with("$_") {
        "map it to simple gates first, e.g. `techmap; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean`".to_string()
    } else {
        "it is a word-level cell; run `synth -flatten` then `abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX` and `opt_clean` before `write_json`".to_string()
    }
}

impl Netlist {
    /// Reads module `module` of a Yosys `write_json` file. `file` labels error messages.
    ///
    /// Accepted cells: the [`GateKind`] types (`$_BUF_` .. `$_MUX_` plus `$_NMUX_`,
    /// `$_AOI3_`, `$_OAI3_`, `$_AOI4_`, `$_OAI4_`). Constant bits "0" and "1" become constant
    /// nets; "x" and "z" are errors (a two-valued fault simulation cannot give them a
    /// meaning, and treating them as 0 could hide a real defect), with the hint to run
    /// `setundef -zero` in Yosys or drive the bit in the source. Any other cell type is an
    /// error naming the cell, its type and the synthesis step that removes it. Net names come
    /// from `netnames`, preferring names without `$` and not hidden, then port names, then
    /// the shallowest hierarchy and the shortest name.
    pub fn from_yosys_json(text: &str, file: &str, module: &str) -> Result<Netlist> {
        let parsed: YosysFile = serde_json::from_str(text).map_err(|e| {
            let mut p = Problem::new(file, format!("not valid Yosys JSON: {e}"));
            if e.line() > 0 {
                p = p.at_line(e.line()).field(format!("column {}", e.column()));
            }
            Error::problem(p)
        })?;
        let Some(modules) = parsed.modules else {
            return Err(Error::problem(
                Problem::new(
                    file,
                    "no `modules` object; is this the output of Yosys `write_json`?",
                )
                .field("modules"),
            ));
        };
        let Some((_, m)) = modules.0.iter().find(|(name, _)| name == module) else {
            let present: Vec<String> = modules.0.iter().map(|(n, _)| format!("`{n}`")).collect();
            let list = if present.is_empty() {
                "none".to_string()
            } else {
                present.join(", ")
            };
            return Err(Error::problem(
                Problem::new(
                    file,
                    format!("no module `{module}` in the netlist; modules present: {list}"),
                )
                .field("modules"),
            ));
        };
        let loc = Locator { text };
        let module_at = loc.key(0, module).unwrap_or(0);
        let cells_at = loc.key(module_at, "cells").unwrap_or(module_at);
        let ports_at = loc.key(module_at, "ports").unwrap_or(module_at);
        let at_key = |from: usize, key: &str, p: Problem| match loc.key(from, key) {
            Some(pos) => p.at_line(loc.line(pos)),
            None => p,
        };
        let mut problems = Vec::new();

        // Pick the best name for every net bit.
        let port_names: std::collections::HashSet<&str> =
            m.ports.0.iter().map(|(n, _)| n.as_str()).collect();
        type Rank = (bool, bool, usize, usize, String);
        let mut best: HashMap<u64, (Rank, String, Option<i64>)> = HashMap::new();
        for (name, nn) in &m.netnames.0 {
            let rank: Rank = (
                nn.hide_name != 0 || name.contains('$'),
                !port_names.contains(name.as_str()),
                name.matches('.').count(),
                name.len(),
                name.clone(),
            );
            let width = nn.bits.len();
            for (i, bit) in nn.bits.iter().enumerate() {
                if let YosysBit::Net(id) = bit {
                    let index =
                        (width > 1).then(|| declared_index(nn.offset, nn.upto != 0, width, i));
                    let better = match best.get(id) {
                        Some((r, _, _)) => rank < *r,
                        None => true,
                    };
                    if better {
                        best.insert(*id, (rank.clone(), name.clone(), index));
                    }
                }
            }
        }

        let mut b = NetlistBuilder::new(file, module);
        let mut nets: HashMap<u64, NetId> = HashMap::new();
        let mut net_for = |b: &mut NetlistBuilder, id: u64| -> NetId {
            *nets.entry(id).or_insert_with(|| match best.get(&id) {
                Some((_, name, index)) => b.net(name, *index),
                None => b.net(&format!("$bit{id}"), None),
            })
        };
        let constant_problem = |what: &str, c: &str| {
            format!(
                "{what} is the undefined constant \"{c}\"; fault grading needs 0 or 1 (run `setundef -zero` in Yosys before `write_json`, or drive the bit in the source)"
            )
        };

        for (name, port) in &m.ports.0 {
            let field = format!("ports.{name}");
            let located = |p: Problem| at_key(ports_at, name, p);
            let mut bits = Vec::with_capacity(port.bits.len());
            for (i, bit) in port.bits.iter().enumerate() {
                match bit {
                    YosysBit::Net(id) => bits.push(net_for(&mut b, *id)),
                    YosysBit::Constant(c)
                        if port.direction == "output" && (c == "0" || c == "1") =>
                    {
                        bits.push(b.constant(c == "1"))
                    }
                    YosysBit::Constant(c) if c == "0" || c == "1" => problems.push(located(
                        Problem::new(
                            file,
                            format!("input port bit {i} is tied to the constant {c}"),
                        )
                        .field(field.clone()),
                    )),
                    YosysBit::Constant(c) => problems.push(located(
                        Problem::new(file, constant_problem(&format!("bit {i}"), c))
                            .field(field.clone()),
                    )),
                }
            }
            let slot = b.slots.get(name.as_str()).copied();
            match port.direction.as_str() {
                "input" => b.input_port(name, &bits, slot, port.offset, port.upto != 0),
                "output" => b.output_port(name, &bits, slot, port.offset, port.upto != 0),
                other => problems.push(located(
                    Problem::new(
                        file,
                        format!("port direction `{other}` is not supported; only input and output ports can be graded"),
                    )
                    .field(format!("{field}.direction")),
                )),
            }
        }

        // A netlist that skipped synthesis has one unsupported cell per operator, often
        // thousands; the first few are listed and the rest summed up by type.
        const LISTED_UNSUPPORTED: usize = 10;
        let mut unsupported = 0usize;
        let mut unlisted: BTreeMap<&str, usize> = BTreeMap::new();
        for (name, cell) in &m.cells.0 {
            let field = format!("cells.{name}");
            let located = |p: Problem| at_key(cells_at, name, p);
            let Some(kind) = GateKind::from_yosys_type(&cell.cell_type) else {
                unsupported += 1;
                if unsupported > LISTED_UNSUPPORTED {
                    *unlisted.entry(cell.cell_type.as_str()).or_default() += 1;
                    continue;
                }
                problems.push(located(
                    Problem::new(
                        file,
                        format!(
                            "cell `{name}` has type `{}`, which cannot be graded: {}",
                            cell.cell_type,
                            unsupported_cell_hint(&cell.cell_type)
                        ),
                    )
                    .field(format!("{field}.type")),
                ));
                continue;
            };
            let mut ok = true;
            for (pin, _) in &cell.connections.0 {
                if pin != "Y" && !kind.input_pins().contains(&pin.as_str()) {
                    ok = false;
                    problems.push(located(
                        Problem::new(
                            file,
                            format!("cell `{name}` ({kind}) has an unexpected pin `{pin}`"),
                        )
                        .field(format!("{field}.connections.{pin}")),
                    ));
                }
            }
            let pin_bit = |pin: &str, problems: &mut Vec<Problem>| -> Option<YosysBit> {
                match cell.connections.0.iter().find(|(p, _)| p == pin) {
                    Some((_, bits)) if bits.len() == 1 => Some(bits[0].clone()),
                    Some((_, bits)) => {
                        problems.push(located(
                            Problem::new(
                                file,
                                format!("pin `{pin}` of cell `{name}` ({kind}) has {} bits; it must have one", bits.len()),
                            )
                            .field(format!("{field}.connections.{pin}")),
                        ));
                        None
                    }
                    None => {
                        problems.push(located(
                            Problem::new(
                                file,
                                format!("cell `{name}` ({kind}) has no connection for pin `{pin}`"),
                            )
                            .field(format!("{field}.connections")),
                        ));
                        None
                    }
                }
            };
            let mut inputs = Vec::with_capacity(4);
            for pin in kind.input_pins() {
                match pin_bit(pin, &mut problems) {
                    Some(YosysBit::Net(id)) => inputs.push(net_for(&mut b, id)),
                    Some(YosysBit::Constant(c)) if c == "0" || c == "1" => {
                        inputs.push(b.constant(c == "1"))
                    }
                    Some(YosysBit::Constant(c)) => {
                        ok = false;
                        problems.push(located(
                            Problem::new(
                                file,
                                constant_problem(&format!("pin `{pin}` of cell `{name}`"), &c),
                            )
                            .field(format!("{field}.connections.{pin}")),
                        ));
                    }
                    None => ok = false,
                }
            }
            let output = match pin_bit("Y", &mut problems) {
                Some(YosysBit::Net(id)) => Some(net_for(&mut b, id)),
                Some(YosysBit::Constant(c)) => {
                    problems.push(located(
                        Problem::new(file, format!("output pin `Y` of cell `{name}` is connected to the constant \"{c}\""))
                            .field(format!("{field}.connections.Y")),
                    ));
                    None
                }
                None => None,
            };
            if let (true, Some(output)) = (ok, output) {
                b.gate(kind, name, &inputs, output);
            }
        }
        if !unlisted.is_empty() {
            let types: Vec<String> = unlisted
                .iter()
                .map(|(t, n)| format!("`{t}` x {n}"))
                .collect();
            problems.push(
                Problem::new(
                    file,
                    format!(
                        "{} more cells cannot be graded ({}); the same synthesis steps fix them",
                        unsupported - LISTED_UNSUPPORTED,
                        types.join(", ")
                    ),
                )
                .field("cells"),
            );
        }
        if !problems.is_empty() {
            problems.append(&mut b.problems);
            return Err(Error::input(problems));
        }
        b.build()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Finds a net by its human name (linear; tests only).
    fn net_named(nl: &Netlist, name: &str) -> Option<NetId> {
        (0..nl.net_count())
            .map(NetId::from_index)
            .find(|&n| nl.net_name(n) == name)
    }

    /// Exhaustive check of the built-in units against integer arithmetic at small widths.
    #[test]
    fn builtin_units_compute_their_arithmetic() {
        for width in 1..=4u32 {
            let mask = (1u64 << width) - 1;
            let adder = Netlist::ripple_adder(width, true).unwrap();
            let sub = Netlist::ripple_subtractor(width, true).unwrap();
            let addsub = Netlist::addsub_unit(width).unwrap();
            let plain_adder = Netlist::ripple_adder(width, false).unwrap();
            let plain_sub = Netlist::ripple_subtractor(width, false).unwrap();
            let signed = |v: u64| -> i64 {
                if v >> (width - 1) & 1 == 1 {
                    v as i64 - (1i64 << width)
                } else {
                    v as i64
                }
            };
            for a in 0..=mask {
                for b in 0..=mask {
                    for c in 0..=1u64 {
                        let w = |v: u64| Word::from_u64(v);
                        // Addition: y = (a + b + c) mod 2^N, co = bit N, ovf when the signed
                        // sum does not fit.
                        let sum = a + b + c;
                        let ovf = {
                            let s = signed(a) + signed(b) + c as i64;
                            s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1)
                        };
                        let expect_add = vec![w(sum & mask), w(sum >> width), w(ovf as u64)];
                        assert_eq!(
                            adder.eval(&[w(a), w(b), w(c)]).unwrap(),
                            expect_add,
                            "add {a} {b} {c}"
                        );
                        if c == 0 {
                            assert_eq!(
                                plain_adder.eval(&[w(a), w(b)]).unwrap(),
                                expect_add,
                                "add {a} {b}"
                            );
                        }
                        // Subtraction with borrow-in: co = borrow, ovf when the signed
                        // difference does not fit.
                        let diff = a as i64 - b as i64 - c as i64;
                        let sovf = {
                            let s = signed(a) - signed(b) - c as i64;
                            s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1)
                        };
                        let expect_sub =
                            vec![w(diff as u64 & mask), w((diff < 0) as u64), w(sovf as u64)];
                        assert_eq!(
                            sub.eval(&[w(a), w(b), w(c)]).unwrap(),
                            expect_sub,
                            "sub {a} {b} {c}"
                        );
                        if c == 0 {
                            assert_eq!(
                                plain_sub.eval(&[w(a), w(b)]).unwrap(),
                                expect_sub,
                                "sub {a} {b}"
                            );
                            assert_eq!(
                                addsub.eval(&[w(a), w(b), w(0)]).unwrap(),
                                expect_add,
                                "addsub + {a} {b}"
                            );
                        } else {
                            // Mode 1: a + ~b + 1; the raw carry is NOT borrow.
                            let got = addsub.eval(&[w(a), w(b), w(1)]).unwrap();
                            let borrow = a < b;
                            let s = signed(a) - signed(b);
                            let ovf = s < -(1i64 << (width - 1)) || s >= 1i64 << (width - 1);
                            let expect = vec![
                                w(a.wrapping_sub(b) & mask),
                                w(!borrow as u64),
                                w(ovf as u64),
                            ];
                            assert_eq!(got, expect, "addsub - {a} {b}");
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn builtin_names_follow_their_ports() {
        let mut nl = Netlist::ripple_adder(4, true).unwrap();
        let y2 = nl.outputs()[0].nets()[2];
        assert_eq!(nl.net_name(y2), "y[2]");
        let co = nl.outputs()[1].nets()[0];
        assert_eq!(nl.net_name(co), "co");
        let Driver::Gate(g) = nl.driver(net_named(&nl, "carry[2]").unwrap()) else {
            panic!("carry[2] should be driven by a gate");
        };
        assert_eq!(nl.gates()[g].cell_name(), "fa[1].or_carry");
        nl.rename_ports(&[("y", "sum"), ("cin", "c0")]).unwrap();
        assert_eq!(nl.net_name(y2), "sum[2]");
        assert_eq!(nl.outputs()[0].name(), "sum");
        assert_eq!(nl.input_port("c0"), Some(2));
        // Renaming onto an internal net's name or an existing port is refused, atomically.
        let err = nl.rename_ports(&[("a", "carry")]).unwrap_err();
        assert!(err.to_string().contains("internal net"), "{err}");
        let err = nl.rename_ports(&[("a", "b")]).unwrap_err();
        assert!(err.to_string().contains("two ports"), "{err}");
        let err = nl.rename_ports(&[("zz", "q")]).unwrap_err();
        assert!(err.to_string().contains("no port named `zz`"), "{err}");
        assert_eq!(nl.inputs()[0].name(), "a");
        // Swapping two names at once works.
        nl.rename_ports(&[("a", "b"), ("b", "a")]).unwrap();
        assert_eq!(nl.inputs()[0].name(), "b");
    }

    #[test]
    fn builder_sorts_gates_and_reports_loops() {
        let mut b = NetlistBuilder::new("t", "m");
        let i = b.input("i", 1)[0];
        let late = b.net("late", None);
        let early = b.net("early", None);
        // Added in reverse order: `late` reads `early`, which is added second.
        b.gate(GateKind::Not, "n2", &[early], late);
        b.gate(GateKind::Not, "n1", &[i], early);
        b.output("o", &[late]);
        let nl = b.build().unwrap();
        assert_eq!(nl.gates()[0].cell_name(), "n1");
        assert_eq!(
            nl.eval(&[Word::from_u64(1)]).unwrap(),
            vec![Word::from_u64(1)]
        );

        let mut b = NetlistBuilder::new("loop.json", "m");
        let i = b.input("i", 1)[0];
        let x = b.net("x", None);
        let y = b.net("y", None);
        b.gate(GateKind::And, "g1", &[i, y], x);
        b.gate(GateKind::Not, "g2", &[x], y);
        b.output("o", &[x]);
        let err = b.build().unwrap_err();
        let text = err.to_string();
        assert!(text.starts_with("loop.json"), "{text}");
        assert!(
            text.contains("combinational loop") && text.contains("g1") && text.contains("g2"),
            "{text}"
        );

        let mut b = NetlistBuilder::new("t", "m");
        let floating = b.net("floating", None);
        b.output("o", &[floating]);
        let text = b.build().unwrap_err().to_string();
        assert!(
            text.contains("`floating`") && text.contains("nothing drives it"),
            "{text}"
        );
    }

    #[test]
    fn eval_parallel_checks_lengths() {
        let nl = Netlist::ripple_adder(2, false).unwrap();
        let mut out = vec![0; 4];
        assert!(nl.eval_parallel(&[0; 3], &mut out).is_err());
        // Pattern k: a = k & 3, b = k >> 2 & 3 over 16 lanes.
        let mut inputs = [0u64; 4];
        for k in 0..16u64 {
            for (bit, word) in inputs.iter_mut().enumerate() {
                *word |= (k >> bit & 1) << k;
            }
        }
        nl.eval_parallel(&inputs, &mut out).unwrap();
        for k in 0..16u64 {
            let sum = (k & 3) + (k >> 2 & 3);
            let got = (out[0] >> k & 1) | (out[1] >> k & 1) << 1 | (out[2] >> k & 1) << 2;
            assert_eq!(got, sum, "lane {k}");
        }
    }

    #[test]
    fn widths_out_of_range_are_errors() {
        assert!(Netlist::ripple_adder(0, true).is_err());
        assert!(Netlist::ripple_subtractor(MAX_WIDTH + 1, true).is_err());
        assert!(Netlist::addsub_unit(MAX_WIDTH).is_ok());
    }

    const SMALL: &str = r#"{
  "modules": {
    "other": { "ports": {}, "cells": {}, "netnames": {} },
    "m": {
      "ports": {
        "a": { "direction": "input", "bits": [ 2, 3 ] },
        "y": { "direction": "output", "bits": [ 4, "1" ] }
      },
      "cells": {
        "$abc$1$x": {
          "hide_name": 1,
          "type": "$_XOR_",
          "port_directions": { "A": "input", "B": "input", "Y": "output" },
          "connections": { "A": [ 2 ], "B": [ 3 ], "Y": [ 4 ] }
        }
      },
      "netnames": {
        "$abc$1$n4": { "hide_name": 1, "bits": [ 4 ] },
        "y": { "hide_name": 0, "bits": [ 4, "1" ] },
        "a": { "hide_name": 0, "bits": [ 2, 3 ], "offset": 4 }
      }
    }
  }
}"#;

    #[test]
    fn reads_a_small_yosys_module() {
        let nl = Netlist::from_yosys_json(SMALL, "small.json", "m").unwrap();
        assert_eq!(nl.inputs()[0].name(), "a");
        assert_eq!(nl.net_name(nl.inputs()[0].nets()[1]), "a[5]");
        assert_eq!(nl.net_name(nl.outputs()[0].nets()[0]), "y[0]");
        assert_eq!(nl.gates()[0].cell_name(), "$abc$1$x");
        assert_eq!(nl.gates()[0].cell_type(), "$_XOR_");
        for a in 0..4u64 {
            let y = nl.eval(&[Word::from_u64(a)]).unwrap();
            assert_eq!(y, vec![Word::from_u64(((a & 1) ^ (a >> 1)) | 2)]);
        }
    }

    #[test]
    fn yosys_errors_name_file_line_and_field() {
        let bad = SMALL.replace("$_XOR_", "$_DFF_P_");
        let err = Netlist::from_yosys_json(&bad, "small.json", "m").unwrap_err();
        let p = &err.problems()[0];
        assert_eq!(p.file, "small.json");
        assert_eq!(p.line, Some(10), "{p}");
        assert!(p.message.contains("storage element"), "{p}");
        let x = SMALL.replace(r#""B": [ 3 ]"#, r#""B": [ "x" ]"#);
        let err = Netlist::from_yosys_json(&x, "small.json", "m").unwrap_err();
        assert!(err.to_string().contains("setundef -zero"), "{err}");
        let err = Netlist::from_yosys_json("{}", "e.json", "m").unwrap_err();
        assert!(err.to_string().contains("no `modules`"), "{err}");
        let hier = SMALL.replace("$_XOR_", "full_adder");
        let err = Netlist::from_yosys_json(&hier, "small.json", "m").unwrap_err();
        assert!(err.to_string().contains("not flattened"), "{err}");
        let missing = SMALL.replace(r#""B": [ 3 ], "#, "");
        let err = Netlist::from_yosys_json(&missing, "small.json", "m").unwrap_err();
        assert!(
            err.to_string().contains("no connection for pin `B`"),
            "{err}"
        );
    }
}
