//! Spec keys of a select unit: several operations behind one select port.
//!
//! `operation = "select"` with a `[select]` table: `width` (bits of the select port) and one
//! key per carried operation whose value is the code driven on `ports.select` for it. Each
//! operation at most once (TOML refuses a key twice), each code once and inside the width, and
//! every operation must be defined for the spec's encoding; a port must belong to at least one
//! carried operation. `[conventions] undefined_outputs` says what the unit drives on an
//! output the selected operation does not define. Every problem is reported at its line.
//! Part of stage 1: no arithmetic here; `arith` and `corners` dispatch on the part specs
//! [`Spec::select_parts`] builds.

use serde::Serialize;

use super::{signal_allowed, Encoding, Operation, Ports, Reader, Signal, Spec, Table};
use crate::error::Problem;

/// Widest select port, in bits.
pub const MAX_SELECT_WIDTH: u32 = 16;

/// The `[conventions]` key this file reads.
pub(super) const CONVENTION_KEY: &str = "undefined_outputs";

/// What a select unit drives on an output the selected operation does not define (the
/// comparison flags during an add, carry_out during a compare).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum UndefinedOutputs {
    /// Anything: such outputs are not compared (the default).
    Unchecked,
    /// 0: the checker requires 0 on them.
    Zero,
}

/// The `[select]` table, validated.
#[derive(Debug, Clone, PartialEq, Eq, Hash, Serialize)]
pub struct SelectSpec {
    /// Bits of the select port, 1..=16.
    pub width: u32,
    /// (operation, code) in the order the table lists them.
    pub codes: Vec<(Operation, u32)>,
    /// See [`UndefinedOutputs`]; left out of the JSON when it is the default.
    #[serde(skip_serializing_if = "UndefinedOutputs::is_unchecked")]
    pub undefined_outputs: UndefinedOutputs,
}

impl UndefinedOutputs {
    fn is_unchecked(&self) -> bool {
        *self == UndefinedOutputs::Unchecked
    }
}

impl SelectSpec {
    /// The carried operations, in table order.
    pub fn operations(&self) -> impl Iterator<Item = Operation> + '_ {
        self.codes.iter().map(|&(op, _)| op)
    }

    /// The operation behind `code`, if the table lists it.
    pub fn operation_of(&self, code: u32) -> Option<Operation> {
        self.codes
            .iter()
            .find(|&&(_, c)| c == code)
            .map(|&(op, _)| op)
    }
}

/// Why `op` cannot be carried by a select unit under `encoding`, if it cannot.
fn refuses_in_select(op: Operation, encoding: Encoding, width: u32) -> Option<String> {
    match op {
        Operation::Select => Some("a select unit cannot carry another select unit".into()),
        Operation::AddSub => {
            Some("addsub has its own mode port; give add and sub codes of their own instead".into())
        }
        _ => {
            if let Some(why) = op.refuses(encoding) {
                return Some(format!("does not fit the encoding: {why}"));
            }
            if Spec::default_options(op, encoding, width).is_some() {
                return Some(format!(
                    "{} has options of its own (amount or product width) and cannot be \
                     carried by a select unit yet; describe it as a unit of its own",
                    op.name()
                ));
            }
            None
        }
    }
}

impl Spec {
    /// For a select unit: one spec per carried operation, with its code. Each part has the
    /// unit's width, encoding and conventions and exactly the ports its operation defines,
    /// so the golden model and the corner classes of that operation apply unchanged.
    pub fn select_parts(&self) -> Vec<(u32, Spec)> {
        let Some(select) = &self.select else {
            return Vec::new();
        };
        select
            .codes
            .iter()
            .map(|&(op, code)| {
                let mut ports = Ports::default();
                for &s in op.signals() {
                    if signal_allowed(s, op, self.encoding).is_ok() {
                        if let Some(name) = self.ports.get(s) {
                            ports.set(s, name);
                        }
                    }
                }
                let spec = Spec {
                    name: format!("{}.{}", self.name, op.name()),
                    operation: op,
                    width: self.width,
                    encoding: self.encoding,
                    ports,
                    conventions: self.conventions,
                    random: self.random,
                    dut: None,
                    options: None,
                    select: None,
                    timing: None,
                };
                (code, spec)
            })
            .collect()
    }

    /// True when the selected operation `op` defines output `signal` (an output of the unit
    /// that `op` does not define is compared only with `undefined_outputs = "zero"`).
    pub fn defines(op: Operation, signal: Signal, encoding: Encoding) -> bool {
        op.signals().contains(&signal) && signal_allowed(signal, op, encoding).is_ok()
    }

    /// The `[select]` table as TOML (empty for other units).
    pub(super) fn select_toml(&self) -> String {
        let Some(s) = &self.select else {
            return String::new();
        };
        let mut t = format!("\n[select]\nwidth = {}\n", s.width);
        for &(op, code) in &s.codes {
            t.push_str(&format!("{} = 0x{code:x}\n", op.name()));
        }
        t
    }

    /// The select unit's `[conventions]` lines.
    pub(super) fn select_conventions_toml(&self) -> String {
        match &self.select {
            Some(s) if s.undefined_outputs == UndefinedOutputs::Zero => {
                format!("{CONVENTION_KEY} = \"zero\"\n")
            }
            _ => String::new(),
        }
    }
}

impl Reader<'_> {
    /// Reads the `[select]` table into `spec.select` and checks the ports against the
    /// carried operations.
    pub(super) fn read_select(
        &mut self,
        root: &Table<'_>,
        ports_table: Option<&Table<'_>>,
        spec: &mut Spec,
    ) {
        let table = self.table(root, "select");
        if spec.operation != Operation::Select {
            if let Some((k, _)) = Self::get(root, "select") {
                self.problem(
                    k.span(),
                    "select",
                    "has no effect: only operation = \"select\" has a [select] table; remove it",
                );
            }
            return;
        }
        let Some(table) = table else {
            if Self::get(root, "select").is_none() {
                self.problems.push(
                    Problem::new(
                        self.file,
                        "a select unit needs a [select] table: width = bits of the select \
                         port, then one code per operation (for example add = 0x0)",
                    )
                    .at_line(1)
                    .field("select"),
                );
            }
            return;
        };
        let width = match self.integer(table, "select.", "width") {
            Some((w, at)) => {
                if (1..=MAX_SELECT_WIDTH as i128).contains(&w) {
                    Some(w as u32)
                } else {
                    self.problem(
                        at..at,
                        "select.width",
                        format!("must be 1..={MAX_SELECT_WIDTH}, got {w}"),
                    );
                    None
                }
            }
            None => {
                if Self::get(table, "width").is_none() {
                    let at = Self::get(root, "select").map_or(0..0, |(k, _)| k.span());
                    self.problem(
                        at,
                        "select.width",
                        "required key is missing (bits of the select port)",
                    );
                }
                None
            }
        };
        let names: Vec<(&str, Operation)> = Operation::ALL
            .into_iter()
            .chain(Operation::EXTENDED)
            .chain([Operation::Select])
            .map(|o| (o.name(), o))
            .collect();
        let mut codes: Vec<(Operation, u32)> = Vec::new();
        let mut ok = width.is_some();
        for (k, _) in table.iter() {
            let key = k.get_ref().as_ref();
            if key == "width" {
                continue;
            }
            let field = format!("select.{key}");
            let Some(&(_, op)) = names.iter().find(|(n, _)| *n == key) else {
                let known: Vec<&str> = names.iter().map(|(n, _)| *n).collect();
                self.problem(
                    k.span(),
                    &field,
                    format!(
                        "unknown key; expected width or an operation: {}",
                        known.join(", ")
                    ),
                );
                ok = false;
                continue;
            };
            if let Some(why) = refuses_in_select(op, spec.encoding, spec.width) {
                self.problem(k.span(), &field, why);
                ok = false;
                continue;
            }
            let Some((code, at)) = self.integer(table, "select.", key) else {
                ok = false;
                continue;
            };
            if code < 0 {
                self.problem(at..at, &field, "a select code is a non-negative integer");
                ok = false;
                continue;
            }
            if let Some(w) = width {
                if code >> w != 0 {
                    self.problem(
                        at..at,
                        &field,
                        format!("code 0x{code:x} does not fit in the select width of {w} bits"),
                    );
                    ok = false;
                    continue;
                }
            }
            let code = code as u32;
            if let Some(&(other, _)) = codes.iter().find(|&&(_, c)| c == code) {
                self.problem(
                    at..at,
                    &field,
                    format!("code 0x{code:x} is already used by select.{}", other.name()),
                );
                ok = false;
                continue;
            }
            codes.push((op, code));
        }
        if codes.is_empty() && ok {
            let at = Self::get(root, "select").map_or(0..0, |(k, _)| k.span());
            self.problem(at, "select", "lists no operation; give at least one code");
            ok = false;
        }
        // Ports: the select port is required; every port must belong to a carried operation.
        let port_line = |key: &str| {
            ports_table
                .and_then(|t| Self::get(t, key))
                .map_or(0..0, |(k, _)| k.span())
        };
        if !spec.has(Signal::Select) && ports_table.is_some() {
            self.problems.push(
                Problem::new(
                    self.file,
                    "a select unit needs a `select` port (the code input)",
                )
                .at_line(1)
                .field("ports.select"),
            );
        }
        if ok {
            for signal in Signal::ALL {
                if signal == Signal::Select || !spec.has(signal) {
                    continue;
                }
                if !codes
                    .iter()
                    .any(|&(op, _)| Spec::defines(op, signal, spec.encoding))
                {
                    let key = format!("ports.{}", signal.key());
                    self.problem(
                        port_line(signal.key()),
                        &key,
                        format!(
                            "no operation in [select] has the {} port; remove it",
                            signal.key()
                        ),
                    );
                }
            }
            if codes.iter().any(|&(op, _)| op.is_binary()) && !spec.has(Signal::B) {
                self.problems.push(
                    Problem::new(self.file, "a carried operation needs a `b` port")
                        .at_line(1)
                        .field("ports.b"),
                );
            }
        }
        if let Some(width) = width {
            spec.select = Some(SelectSpec {
                width,
                codes,
                undefined_outputs: UndefinedOutputs::Unchecked,
            });
        }
    }

    /// Reads `undefined_outputs` from `[conventions]`.
    pub(super) fn read_select_conventions(&mut self, t: &Table<'_>, spec: &mut Spec) {
        let Some((v, at)) = self.choice(
            t,
            "conventions.",
            CONVENTION_KEY,
            &[
                ("unchecked", UndefinedOutputs::Unchecked),
                ("zero", UndefinedOutputs::Zero),
            ],
        ) else {
            return;
        };
        let field = format!("conventions.{CONVENTION_KEY}");
        match &mut spec.select {
            Some(s) => s.undefined_outputs = v,
            None if spec.operation == Operation::Select => {}
            None => self.problem(
                at..at,
                &field,
                "has no effect: only a select unit has outputs an operation does not define; \
                 remove it",
            ),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn select_spec_with_active_low_reads_back_equal() {
        let text = "name = \"x\"\noperation = \"select\"\nwidth = 8\nencoding = \"twos\"\n\
                    [select]\nwidth = 3\nsub = 0x1\nadd = 0x4\ncompare = 2\n\
                    [ports]\na = \"a\"\nb = \"b\"\nselect = \"op\"\nresult = \"y\"\n\
                    carry_out = \"co\"\nzero = \"z\"\nless = \"lt\"\n\
                    [conventions]\ncarry_out = \"carry\"\nundefined_outputs = \"zero\"\n\
                    active_low = [\"zero\", \"less\"]\n";
        let spec = Spec::parse(text, "x.toml").unwrap();
        let select = spec.select.as_ref().unwrap();
        assert_eq!(select.operation_of(4), Some(Operation::Add));
        assert_eq!(select.undefined_outputs, UndefinedOutputs::Zero);
        assert!(spec.conventions.active_low.contains(Signal::Less));
        assert_eq!(spec.signal_width(Signal::Select), 3);
        let again = Spec::parse(&spec.to_toml(), "again.toml").unwrap();
        assert_eq!(again, spec, "{}", spec.to_toml());
    }
}
