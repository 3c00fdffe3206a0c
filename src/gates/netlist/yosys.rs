//! The Yosys JSON reader: modules, ports, cells and net names read in file order, with every
//! problem reported by module, cell and port.

use super::*;

/// A JSON object read with its keys in file order (serde_json's own map sorts them unless a
/// crate-wide feature is switched on, and port order matters here).
#[derive(Debug)]
pub(super) struct OrderedMap<T>(Vec<(String, T)>);

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
pub(super) struct YosysFile {
    pub(super) modules: Option<OrderedMap<YosysModule>>,
}

#[derive(Deserialize)]
pub(super) struct YosysModule {
    #[serde(default)]
    pub(super) ports: OrderedMap<YosysPort>,
    #[serde(default)]
    pub(super) cells: OrderedMap<YosysCell>,
    #[serde(default)]
    pub(super) netnames: OrderedMap<YosysNetname>,
}

#[derive(Deserialize)]
pub(super) struct YosysPort {
    pub(super) direction: String,
    pub(super) bits: Vec<YosysBit>,
    #[serde(default)]
    pub(super) offset: i64,
    #[serde(default)]
    pub(super) upto: u8,
}

#[derive(Deserialize)]
pub(super) struct YosysCell {
    #[serde(rename = "type")]
    pub(super) cell_type: String,
    #[serde(default)]
    pub(super) connections: OrderedMap<Vec<YosysBit>>,
}

#[derive(Deserialize)]
pub(super) struct YosysNetname {
    pub(super) bits: Vec<YosysBit>,
    #[serde(default)]
    pub(super) hide_name: u8,
    #[serde(default)]
    pub(super) offset: i64,
    #[serde(default)]
    pub(super) upto: u8,
}

/// A bit in Yosys JSON: a net number, or one of the constant strings "0", "1", "x", "z".
#[derive(Deserialize, Clone, PartialEq, Eq)]
#[serde(untagged)]
pub(super) enum YosysBit {
    Net(u64),
    Constant(String),
}

/// Finds where keys sit in the JSON text, so semantic errors can carry a line number.
pub(super) struct Locator<'a> {
    pub(super) text: &'a str,
}

impl Locator<'_> {
    /// The byte offset of the first `"key":` at or after `from`.
    pub(super) fn key(&self, from: usize, key: &str) -> Option<usize> {
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

    pub(super) fn line(&self, pos: usize) -> usize {
        self.text[..pos].bytes().filter(|&b| b == b'\n').count() + 1
    }
}

/// Why a cell type is not accepted, and which synthesis step would remove it.
pub(super) fn unsupported_cell_hint(cell_type: &str) -> String {
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
