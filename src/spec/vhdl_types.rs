//! `[dut] vhdl_types`: the VHDL type of the DUT's vector ports, so a VHDL testbench can drive
//! an entity whose ports are numeric_std `unsigned` or `signed` without a wrapper. The value
//! is one type for every vector port (`vhdl_types = "unsigned"`) or a table by DUT port name
//! (`vhdl_types = { y = "unsigned", a = "signed" }`; unlisted ports stay std_logic_vector).
//! Vector ports are the operands, a shift's amount, result, quotient, remainder, select code
//! and bundled ports; one-bit flags stay std_logic. Verilog testbenches ignore the key. Part of stage 1.

use std::collections::BTreeMap;

use serde::Serialize;
use toml::de::DeValue;

use super::{Reader, Signal, Spec, Table};

/// A VHDL vector type a DUT port can have.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum VhdlType {
    /// ieee.std_logic_1164 `std_logic_vector` (the default).
    #[default]
    StdLogicVector,
    /// ieee.numeric_std `unsigned`.
    Unsigned,
    /// ieee.numeric_std `signed`.
    Signed,
}

impl VhdlType {
    /// Every type, in keyword order.
    pub const ALL: [VhdlType; 3] = [
        VhdlType::StdLogicVector,
        VhdlType::Unsigned,
        VhdlType::Signed,
    ];

    /// The spec keyword, which is also the VHDL type name.
    pub fn name(self) -> &'static str {
        match self {
            VhdlType::StdLogicVector => "std_logic_vector",
            VhdlType::Unsigned => "unsigned",
            VhdlType::Signed => "signed",
        }
    }

    fn parse(text: &str) -> Option<VhdlType> {
        VhdlType::ALL.into_iter().find(|t| t.name() == text)
    }
}

/// The `[dut] vhdl_types` value: one type for all vector ports, or a type per port name.
#[derive(Debug, Clone, PartialEq, Eq, Default, Serialize)]
pub struct VhdlTypes {
    /// The type of every vector port not listed in `ports`.
    pub all: VhdlType,
    /// Types by DUT port name (the table form).
    #[serde(skip_serializing_if = "BTreeMap::is_empty")]
    pub ports: BTreeMap<String, VhdlType>,
}

impl VhdlTypes {
    /// The VHDL type of the DUT's vector port `port`.
    pub fn of(&self, port: &str) -> VhdlType {
        self.ports.get(port).copied().unwrap_or(self.all)
    }

    /// True when every port is std_logic_vector and nothing needs saying.
    pub fn is_default(&self) -> bool {
        *self == VhdlTypes::default()
    }

    /// The key as normalised TOML (`vhdl_types = ...` and a newline), or "" for the default.
    pub fn to_toml(&self) -> String {
        if self.is_default() {
            return String::new();
        }
        if self.ports.is_empty() {
            return format!("vhdl_types = \"{}\"\n", self.all.name());
        }
        let list: Vec<String> = self
            .ports
            .iter()
            .map(|(k, v)| format!("{k} = \"{}\"", v.name()))
            .collect();
        format!("vhdl_types = {{ {} }}\n", list.join(", "))
    }
}

/// True for the roles a VHDL DUT declares as vectors (at every width).
pub fn is_vector_signal(signal: Signal) -> bool {
    matches!(
        signal,
        Signal::A
            | Signal::B
            | Signal::Amount
            | Signal::Result
            | Signal::Quotient
            | Signal::Remainder
            | Signal::Select
    )
}

/// The spec's vector port names: the vector roles' ports and every bundled port.
fn vector_ports(spec: &Spec) -> Vec<String> {
    let mut names: Vec<String> = spec
        .inputs()
        .into_iter()
        .chain(spec.outputs())
        .filter(|(s, _)| is_vector_signal(*s) && spec.ports.range(*s).is_none())
        .map(|(_, p)| p.to_string())
        .collect();
    names.extend(spec.ports.bundles().into_iter().map(|b| b.port));
    names
}

impl Reader<'_> {
    /// Reads `vhdl_types` from the `[dut]` table `t`; problems are reported at their line.
    pub(super) fn read_vhdl_types(&mut self, t: &Table<'_>, spec: &Spec) -> VhdlTypes {
        let mut types = VhdlTypes::default();
        let Some((_, v)) = Self::get(t, "vhdl_types") else {
            return types;
        };
        let expected = VhdlType::ALL
            .map(|t| format!("\"{}\"", t.name()))
            .join(", ");
        match v.get_ref() {
            DeValue::String(s) => match VhdlType::parse(s) {
                Some(ty) => types.all = ty,
                None => self.problem(
                    v.span(),
                    "dut.vhdl_types",
                    format!("unknown VHDL port type \"{s}\"; expected one of: {expected}, or a table of them by port name"),
                ),
            },
            DeValue::Table(table) => {
                let ports = vector_ports(spec);
                for (k, pv) in table.iter() {
                    let key = format!("dut.vhdl_types.{}", k.get_ref());
                    if !ports.iter().any(|p| p == k.get_ref().as_ref()) {
                        self.problem(
                            k.span(),
                            &key,
                            format!(
                                "\"{}\" is not a vector port of this unit; expected one of: {}",
                                k.get_ref(),
                                ports.join(", ")
                            ),
                        );
                        continue;
                    }
                    match pv.get_ref() {
                        DeValue::String(s) => match VhdlType::parse(s) {
                            Some(ty) => {
                                types.ports.insert(k.get_ref().to_string(), ty);
                            }
                            None => self.problem(
                                pv.span(),
                                &key,
                                format!("unknown VHDL port type \"{s}\"; expected one of: {expected}"),
                            ),
                        },
                        _ => self.problem(pv.span(), &key, format!("expected one of: {expected}")),
                    }
                }
            }
            _ => self.problem(
                v.span(),
                "dut.vhdl_types",
                format!("expected one of: {expected}, or a table of them by port name"),
            ),
        }
        types
    }
}
