//! Fault conditions as a small bit set.

/// One fault condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Fault {
    /// Too few counts: a dead or disconnected detector.
    LowCounts,
    /// Fold-back of a paralyzable counter in a very high field.
    Saturated,
    /// No events for longer than the learned rate allows.
    Silent,
    /// A condition reported by the application (power, high voltage...).
    External,
}

impl Fault {
    /// Every fault, in bit order.
    pub const ALL: [Fault; 4] = [
        Fault::LowCounts,
        Fault::Saturated,
        Fault::Silent,
        Fault::External,
    ];

    /// The bit of this fault in [`Faults`].
    pub const fn bit(self) -> u8 {
        1 << (self as u8)
    }
}

/// The fault as a person reads it: `low counts`, `saturated`, `silent`,
/// `external fault`.
impl core::fmt::Display for Fault {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        f.write_str(match self {
            Fault::LowCounts => "low counts",
            Fault::Saturated => "saturated",
            Fault::Silent => "silent",
            Fault::External => "external fault",
        })
    }
}

/// A set of [`Fault`]s.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Faults(u8);

impl Faults {
    /// No fault.
    pub const NONE: Faults = Faults(0);

    /// The set holding only `f`.
    pub const fn of(f: Fault) -> Faults {
        Faults(f.bit())
    }

    /// This set with `f` added when `on`.
    pub const fn with(self, f: Fault, on: bool) -> Faults {
        if on { Faults(self.0 | f.bit()) } else { self }
    }

    /// This set without `f`.
    pub const fn without(self, f: Fault) -> Faults {
        Faults(self.0 & !f.bit())
    }

    /// Whether `f` is in the set.
    pub const fn contains(self, f: Fault) -> bool {
        self.0 & f.bit() != 0
    }

    /// Whether the set is empty.
    pub const fn is_empty(self) -> bool {
        self.0 == 0
    }

    /// The union.
    pub const fn union(self, other: Faults) -> Faults {
        Faults(self.0 | other.0)
    }

    /// The raw bits (bit `i` is `Fault::ALL[i]`).
    pub const fn bits(self) -> u8 {
        self.0
    }
}
