//! Operation specs for the end-to-end runs, rendered as TOML text the way a user writes them
//! (README "The spec"), for invented units. Port sets match the reference hardware's port
//! names (see each file's header in `tests/hdl/`).

use std::fmt::Write as _;

/// The ports of a two-operand adder or subtractor with carry-in and every flag
/// (ripple_add, ripple_sub, behav_add, behav_sub).
pub const WITH_CARRY_IN: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("carry_in", "cin"),
    ("result", "y"),
    ("carry_out", "co"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of a mode-controlled add/subtract unit without a separate carry-in
/// (addsub_unit).
pub const MODE_ONLY: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("mode", "mode"),
    ("result", "y"),
    ("carry_out", "co"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of an add/subtract unit with both a carry-in and a mode (behav_addsub).
pub const MODE_AND_CARRY_IN: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("carry_in", "cin"),
    ("mode", "mode"),
    ("result", "y"),
    ("carry_out", "co"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of a two-operand adder without carry-in (ones_add).
pub const NO_CARRY_IN: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("result", "y"),
    ("carry_out", "co"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of a sign-magnitude adder, which has no carry at all (signmag_add).
pub const NO_CARRY: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("result", "y"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of a one-operand unit (behav_negate, behav_increment, behav_decrement).
pub const UNARY: &[(&str, &str)] = &[
    ("a", "a"),
    ("result", "y"),
    ("carry_out", "co"),
    ("overflow", "ovf"),
    ("zero", "zero"),
    ("negative", "neg"),
];

/// The ports of a comparator (comparator, behav_compare).
pub const COMPARE: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("less", "lt"),
    ("equal", "eq"),
    ("greater", "gt"),
];

/// One unit's spec. `parameters` always gets `W = width` first, so the DUT's width and the
/// spec's width cannot drift apart.
#[derive(Debug, Clone)]
pub struct UnitSpec {
    /// Unit name, also the testbench's name (`tb_<name>`).
    pub name: String,
    /// Operation keyword (add, sub, addsub, negate, increment, decrement, compare).
    pub operation: &'static str,
    /// Encoding keyword (unsigned, twos, ones, signmag, offset).
    pub encoding: &'static str,
    /// Operand width in bits.
    pub width: u32,
    /// (signal, DUT port name) pairs.
    pub ports: &'static [(&'static str, &'static str)],
    /// `[conventions]` keys, only those that have an effect for the unit.
    pub conventions: Vec<(&'static str, &'static str)>,
    /// Random vector count.
    pub count: u64,
    /// Random seed.
    pub seed: u64,
    /// DUT module or entity name.
    pub module: String,
    /// DUT parameters besides W.
    pub extra_parameters: Vec<(&'static str, i64)>,
    /// More tables, written as given after `[ports]` (a select unit's `[select]`).
    pub tables: String,
    /// More `[dut]` keys (TOML lines), written after `parameters`.
    pub dut_keys: String,
}

impl UnitSpec {
    /// A spec for `module` at `width` with 300 random vectors (seed 7) and no conventions.
    pub fn new(
        base_name: &str,
        operation: &'static str,
        encoding: &'static str,
        width: u32,
        ports: &'static [(&'static str, &'static str)],
        module: &str,
    ) -> UnitSpec {
        UnitSpec {
            name: format!("{base_name}_w{width}"),
            operation,
            encoding,
            width,
            ports,
            conventions: Vec::new(),
            count: 300,
            seed: 7,
            module: module.to_string(),
            extra_parameters: Vec::new(),
            tables: String::new(),
            dut_keys: String::new(),
        }
    }

    /// The same spec with more tables (TOML text) after `[ports]`.
    pub fn tables(mut self, text: &str) -> UnitSpec {
        self.tables.push_str(text);
        self
    }

    /// The same spec with one more `[conventions]` key.
    pub fn convention(mut self, key: &'static str, value: &'static str) -> UnitSpec {
        self.conventions.push((key, value));
        self
    }

    /// The same spec with another random count.
    pub fn count(mut self, count: u64) -> UnitSpec {
        self.count = count;
        self
    }

    /// The same spec with one more `[dut]` key; `value` is TOML text.
    pub fn dut_key(mut self, key: &str, value: &str) -> UnitSpec {
        let _ = writeln!(self.dut_keys, "{key} = {value}");
        self
    }

    /// The same spec with one more DUT parameter.
    pub fn parameter(mut self, name: &'static str, value: i64) -> UnitSpec {
        self.extra_parameters.push((name, value));
        self
    }

    /// The spec as TOML text.
    pub fn to_toml(&self) -> String {
        let mut text = String::new();
        let _ = writeln!(text, "name = \"{}\"", self.name);
        let _ = writeln!(text, "operation = \"{}\"", self.operation);
        let _ = writeln!(text, "width = {}", self.width);
        let _ = writeln!(text, "encoding = \"{}\"", self.encoding);
        text.push_str("\n[ports]\n");
        for (signal, port) in self.ports {
            let _ = writeln!(text, "{signal} = \"{port}\"");
        }
        text.push_str(&self.tables);
        if !self.conventions.is_empty() {
            text.push_str("\n[conventions]\n");
            for (key, value) in &self.conventions {
                let _ = writeln!(text, "{key} = \"{value}\"");
            }
        }
        text.push_str("\n[random]\n");
        let _ = writeln!(text, "count = {}", self.count);
        let _ = writeln!(text, "seed = {}", self.seed);
        // Stated rather than left to the default: the bug tests reason about uniform vectors.
        text.push_str("mix = \"uniform\"\n");
        text.push_str("\n[dut]\n");
        let _ = writeln!(text, "module = \"{}\"", self.module);
        let mut parameters = vec![format!("W = {}", self.width)];
        parameters.extend(
            self.extra_parameters
                .iter()
                .map(|(name, value)| format!("{name} = {value}")),
        );
        let _ = writeln!(text, "parameters = {{ {} }}", parameters.join(", "));
        text.push_str(&self.dut_keys);
        text
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn renders_every_table() {
        let text = UnitSpec::new(
            "quarry_trim",
            "addsub",
            "twos",
            12,
            MODE_ONLY,
            "addsub_unit",
        )
        .convention("carry_out", "carry")
        .parameter("SIGNED", 1)
        .to_toml();
        assert_eq!(
            text,
            "name = \"quarry_trim_w12\"\noperation = \"addsub\"\nwidth = 12\nencoding = \"twos\"\n\
             \n[ports]\na = \"a\"\nb = \"b\"\nmode = \"mode\"\nresult = \"y\"\ncarry_out = \"co\"\n\
             overflow = \"ovf\"\nzero = \"zero\"\nnegative = \"neg\"\n\
             \n[conventions]\ncarry_out = \"carry\"\n\
             \n[random]\ncount = 300\nseed = 7\nmix = \"uniform\"\n\
             \n[dut]\nmodule = \"addsub_unit\"\nparameters = { W = 12, SIGNED = 1 }\n"
        );
    }
}
