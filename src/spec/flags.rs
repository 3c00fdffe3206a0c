//! Active-low flags: `[conventions] active_low = ["zero", ...]` names the one-bit flag
//! outputs that are 1 when false. Each entry must be a flag output the unit has, once;
//! anything else is refused at its line. The golden model inverts exactly these outputs, so
//! expected files, testbenches and the checker all see the unit's own polarity. Part of
//! stage 1: no arithmetic here.

use serde::{Serialize, Serializer};
use toml::de::DeValue;

use super::{Reader, Signal, Spec, Table};

/// The `[conventions]` key this file reads.
pub(super) const CONVENTION_KEY: &str = "active_low";

/// The flags that are active low, as a set of signals (default: none).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub struct ActiveLow(u32);

impl ActiveLow {
    /// True when `signal` is active low.
    pub fn contains(self, signal: Signal) -> bool {
        self.0 >> signal as u32 & 1 == 1
    }

    /// Adds `signal`.
    pub fn insert(&mut self, signal: Signal) {
        self.0 |= 1 << signal as u32;
    }

    /// True when no flag is active low.
    pub fn is_empty(&self) -> bool {
        self.0 == 0
    }

    /// The active-low signals, in signal order.
    pub fn signals(self) -> impl Iterator<Item = Signal> {
        Signal::ALL.into_iter().filter(move |&s| self.contains(s))
    }
}

impl Serialize for ActiveLow {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(self.signals().map(|sig| sig.key()))
    }
}

/// True for the one-bit flag outputs.
fn is_flag(signal: Signal) -> bool {
    !signal.is_input() && signal.width(2) == 1
}

impl Spec {
    /// The `active_low` line of `[conventions]` (empty when no flag is active low).
    pub(super) fn active_low_toml(&self) -> String {
        let low = self.conventions.active_low;
        if low.is_empty() {
            return String::new();
        }
        let list: Vec<String> = low.signals().map(|s| format!("\"{}\"", s.key())).collect();
        format!("{CONVENTION_KEY} = [{}]\n", list.join(", "))
    }
}

impl Reader<'_> {
    /// Reads `active_low` from `[conventions]`.
    pub(super) fn read_active_low(&mut self, t: &Table<'_>, spec: &mut Spec) {
        let Some((_, v)) = Self::get(t, CONVENTION_KEY) else {
            return;
        };
        let field = format!("conventions.{CONVENTION_KEY}");
        let DeValue::Array(items) = v.get_ref() else {
            self.problem(
                v.span(),
                &field,
                "expected a list of flag names, for example [\"zero\"]",
            );
            return;
        };
        let mut low = ActiveLow::default();
        for item in items.iter() {
            let DeValue::String(name) = item.get_ref() else {
                self.problem(item.span(), &field, "expected a flag name (a string)");
                continue;
            };
            let name: &str = name.as_ref();
            let Some(signal) = Signal::from_key(name).filter(|&s| is_flag(s)) else {
                self.problem(
                    item.span(),
                    &field,
                    format!(
                        "\"{name}\" is not a flag; the flags are carry_out, overflow, zero, \
                         negative, less, equal and greater"
                    ),
                );
                continue;
            };
            if !spec.has(signal) {
                self.problem(
                    item.span(),
                    &field,
                    format!("the unit has no {name} port; name it in [ports] or remove it here"),
                );
                continue;
            }
            if low.contains(signal) {
                self.problem(item.span(), &field, format!("\"{name}\" is listed twice"));
                continue;
            }
            low.insert(signal);
        }
        spec.conventions.active_low = low;
    }
}
