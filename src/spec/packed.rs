//! Packed flags: `[ports] flags = "nzcv"` names one output vector holding several one-bit
//! flags, and the `[flags]` table gives each flag's bit position in it (`zero = 2`), plus an
//! optional `width` (the port's declared width; default the highest bit used plus one).
//!
//! The implementation underneath is the port bit ranges of `spec::ports`: each packed flag
//! becomes the role `nzcv[BIT]` through [`Ports::set`], so the vector files, the result log
//! (one column per flag, named `nzcv[2]`), the testbench emitters (a bundle port) and the
//! checker treat it exactly as a range written by hand; `active_low` applies to it as to a
//! separate flag port. The normalised TOML writes the packed form back. Rules, each refused
//! at its line: a bit position used twice, a position outside a declared width, a flag the
//! operation (or no carried operation of a select unit) defines, a flag also named in
//! `[ports]`, `[flags]` without `ports.flags` and `ports.flags` without `[flags]`. Part of
//! stage 1: no arithmetic here.

use serde::Serialize;

use super::{Operation, Ports, Reader, Signal, Spec, Table};

/// The `[ports]` key of the packed flags vector (and the name of its table).
pub(super) const KEY: &str = "flags";

/// The packed flags port of a spec.
#[derive(Debug, Clone, PartialEq, Eq, Hash, Serialize)]
pub struct PackedFlags {
    /// The DUT's port name.
    pub port: String,
    /// The width declared with `[flags] width`, if any (else the highest bit plus one).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub width: Option<u32>,
}

impl Ports {
    /// The packed flags port, when the spec has `ports.flags`.
    pub fn packed_flags(&self) -> Option<&PackedFlags> {
        self.packed.as_ref()
    }

    /// The flags packed in `ports.flags`, lowest bit first: (flag, bit).
    pub fn packed_members(&self) -> Vec<(Signal, u32)> {
        let Some(p) = &self.packed else {
            return Vec::new();
        };
        let mut list: Vec<(Signal, u32)> = self
            .names
            .keys()
            .filter_map(|&s| {
                let r = self.range(s)?;
                (r.port == p.port && r.msb == r.lsb).then_some((s, r.lsb))
            })
            .collect();
        list.sort_by_key(|m| m.1);
        list
    }
}

/// True for the one-bit flag outputs.
fn is_flag(signal: Signal) -> bool {
    !signal.is_input() && signal.width(2) == 1
}

impl Spec {
    /// True when the unit's operation (or, for a select unit, some carried operation)
    /// defines output `signal`.
    fn unit_defines(&self, signal: Signal) -> bool {
        match &self.select {
            Some(s) => s
                .operations()
                .any(|op| Spec::defines(op, signal, self.encoding)),
            None => {
                self.operation != Operation::Select
                    && Spec::defines(self.operation, signal, self.encoding)
            }
        }
    }

    /// The `[flags]` table as TOML (empty without packed flags).
    pub(super) fn packed_flags_toml(&self) -> String {
        let Some(p) = self.ports.packed_flags() else {
            return String::new();
        };
        let mut t = format!("\n[{KEY}]\n");
        if let Some(w) = p.width {
            t.push_str(&format!("width = {w}\n"));
        }
        for (signal, bit) in self.ports.packed_members() {
            t.push_str(&format!("{} = {bit}\n", signal.key()));
        }
        t
    }

    /// True when `signal`'s port text is written by the `[flags]` table, not in `[ports]`.
    pub(super) fn is_packed_member(&self, signal: Signal) -> bool {
        self.ports
            .packed_members()
            .iter()
            .any(|&(s, _)| s == signal)
    }
}

impl Reader<'_> {
    /// Reads `ports.flags` and the `[flags]` table into `spec.ports`.
    pub(super) fn read_packed_flags(
        &mut self,
        root: &Table<'_>,
        ports_table: Option<&Table<'_>>,
        spec: &mut Spec,
    ) {
        let port = ports_table.and_then(|t| {
            Self::get(t, KEY)?;
            self.string(t, "ports.", KEY)
        });
        let table = self.table(root, KEY);
        let field = format!("ports.{KEY}");
        let Some((port, at)) = port else {
            if let Some((k, _)) = Self::get(root, KEY) {
                self.problem(
                    k.span(),
                    KEY,
                    "a [flags] table gives bit positions inside ports.flags, but [ports] has \
                     no flags port; add flags = \"<port name>\" to [ports] or remove the table",
                );
            }
            return;
        };
        let Some(table) = table else {
            if Self::get(root, KEY).is_none() {
                self.problem(
                    at..at,
                    &field,
                    "a packed flags port needs a [flags] table giving each flag's bit position \
                     in it (for example zero = 2)",
                );
            }
            return;
        };
        match super::parse_port_text(&port) {
            Ok((_, None)) if super::is_identifier(&port) => {}
            _ => {
                self.problem(
                    at..at,
                    &field,
                    format!(
                        "\"{port}\" is not a usable port name (the whole vector is named here; \
                         the bit positions go in [flags])"
                    ),
                );
                return;
            }
        }
        if let Some(&other) = Signal::ALL
            .iter()
            .find(|&&s| spec.ports.hdl_port(s) == Some(port.as_str()))
        {
            self.problem(
                at..at,
                &field,
                format!(
                    "duplicate port name: \"{port}\" is already used by ports.{}",
                    other.key()
                ),
            );
            return;
        }
        let mut width = None;
        if let Some((w, wat)) = self.integer(table, &format!("{KEY}."), "width") {
            if (1..=1024).contains(&w) {
                width = Some(w as u32);
            } else {
                self.problem(
                    wat..wat,
                    &format!("{KEY}.width"),
                    format!("must be 1..=1024, got {w}"),
                );
                return;
            }
        }
        let mut taken: Vec<(u32, Signal)> = Vec::new();
        for (k, _) in table.iter() {
            let key = k.get_ref().as_ref();
            if key == "width" {
                continue;
            }
            let f = format!("{KEY}.{key}");
            let Some(signal) = Signal::from_key(key).filter(|&s| is_flag(s)) else {
                self.problem(
                    k.span(),
                    &f,
                    "not a flag; [flags] takes width and the one-bit outputs carry_out, \
                     overflow, zero, negative, less, equal, greater and div_by_zero",
                );
                continue;
            };
            if !spec.unit_defines(signal) {
                let why = match &spec.select {
                    Some(_) => format!("no operation in [select] has the {key} flag; remove it"),
                    None => format!(
                        "operation \"{}\" has no {key} flag; remove it",
                        spec.operation.name()
                    ),
                };
                self.problem(k.span(), &f, why);
                continue;
            }
            if spec.has(signal) {
                self.problem(
                    k.span(),
                    &f,
                    format!("{key} is also named in [ports]; give it one place"),
                );
                continue;
            }
            let Some((bit, bat)) = self.integer(table, &format!("{KEY}."), key) else {
                continue;
            };
            let limit = width.map_or(1024, |w| w as i128);
            if !(0..limit).contains(&bit) {
                let why = match width {
                    Some(w) => format!(
                        "bit {bit} is outside the flags port {port} ({w} bit{}: 0..{})",
                        if w == 1 { "" } else { "s" },
                        w - 1
                    ),
                    None => format!("bit {bit} is not a bit position (0..1023)"),
                };
                self.problem(bat..bat, &f, why);
                continue;
            }
            let bit = bit as u32;
            if let Some(&(_, other)) = taken.iter().find(|&&(b, _)| b == bit) {
                self.problem(
                    bat..bat,
                    &f,
                    format!(
                        "bit {bit} of {port} is already used by {KEY}.{}",
                        other.key()
                    ),
                );
                continue;
            }
            taken.push((bit, signal));
        }
        if taken.is_empty() {
            if !self.problems.iter().any(|p| {
                p.field
                    .as_deref()
                    .is_some_and(|f| f.starts_with(&format!("{KEY}.")))
            }) {
                let at = Self::get(root, KEY).map_or(0..0, |(k, _)| k.span());
                self.problem(at, KEY, "lists no flag; give at least one bit position");
            }
            return;
        }
        for (bit, signal) in taken {
            spec.ports.set(signal, format!("{port}[{bit}]"));
        }
        spec.ports.packed = Some(PackedFlags { port, width });
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const ALU: &str = "name = \"x\"\noperation = \"select\"\nwidth = 8\nencoding = \"twos\"\n\
                       [select]\nwidth = 4\nadd = 0\nsub = 1\ncompare = 5\n\
                       [ports]\na = \"a\"\nb = \"b\"\nselect = \"op\"\nresult = \"rd\"\n\
                       flags = \"nzcv\"\nless = \"lt\"\n";

    #[test]
    fn packed_flags_are_ranges_of_one_port_and_read_back_equal() {
        let text = format!(
            "{ALU}[flags]\nwidth = 6\noverflow = 0\ncarry_out = 1\nzero = 2\nnegative = 3\n\
             [conventions]\nactive_low = [\"zero\"]\n"
        );
        let spec = Spec::parse(&text, "x.toml").unwrap();
        assert_eq!(spec.ports.get(Signal::Zero), Some("nzcv[2]"));
        assert_eq!(spec.ports.get(Signal::Less), Some("lt"));
        assert!(spec.conventions.active_low.contains(Signal::Zero));
        let bundles = spec.ports.bundles();
        assert_eq!(bundles.len(), 1);
        assert_eq!((bundles[0].port.as_str(), bundles[0].width), ("nzcv", 6));
        let toml = spec.to_toml();
        assert!(toml.contains("flags = \"nzcv\"\n"), "{toml}");
        assert!(
            toml.contains("\n[flags]\nwidth = 6\noverflow = 0\n"),
            "{toml}"
        );
        assert!(!toml.contains("nzcv["), "{toml}");
        assert_eq!(Spec::parse(&toml, "again.toml").unwrap(), spec, "{toml}");
        // The same flags written as ranges by hand are the same unit, but not packed.
        let by_hand = ALU.replace("flags = \"nzcv\"\n", "zero = \"nzcv[2]\"\n");
        let hand = Spec::parse(&by_hand, "h.toml").unwrap();
        assert_eq!(hand.ports.get(Signal::Zero), Some("nzcv[2]"));
        assert!(hand.ports.packed_flags().is_none());
    }
}
