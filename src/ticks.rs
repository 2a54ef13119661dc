//! Time as the caller's tick count. The library never reads a clock.
//!
//! A [`Ticks`] value is a free-running `u32` counter (a timer tick, a
//! second counter, a millisecond counter...). It wraps around; two instants
//! are compared by their wrapping difference, which is correct as long as
//! they are less than 2^31 ticks apart (24.8 days at 1 kHz, 68 years at 1 Hz).
//!
//! ```
//! use countward::Ticks;
//! let before = Ticks(u32::MAX - 1);
//! let after = before.plus(5); // wrapped past zero
//! assert_eq!(after, Ticks(3));
//! assert_eq!(after.since(before), 5);
//! assert!(after.is_after(before));
//! ```

/// An instant on the caller's free-running tick counter.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Ticks(pub u32);

impl Ticks {
    /// Ticks elapsed from `earlier` to `self` (wrapping). Meaningful when
    /// `self` is not before `earlier`.
    pub const fn since(self, earlier: Ticks) -> u32 {
        self.0.wrapping_sub(earlier.0)
    }

    /// Signed difference `self - other`, valid within ±2^31 ticks.
    pub const fn offset_from(self, other: Ticks) -> i32 {
        self.0.wrapping_sub(other.0) as i32
    }

    /// Whether `self` is strictly later than `other` (within 2^31 ticks).
    pub const fn is_after(self, other: Ticks) -> bool {
        self.offset_from(other) > 0
    }

    /// `self + d` ticks (wrapping).
    pub const fn plus(self, d: u32) -> Ticks {
        Ticks(self.0.wrapping_add(d))
    }
}

/// Anything that waits: says when it next needs to be called, so a
/// low-power caller can sleep until then.
pub trait NextDeadline {
    /// The next instant at which a call can change something, or `None` when
    /// nothing is pending until new input (an event or a count) arrives.
    fn next_deadline(&self) -> Option<Ticks>;
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wrap_around_keeps_order() {
        let a = Ticks(u32::MAX - 10);
        let b = a.plus(20);
        assert_eq!(b.0, 9);
        assert_eq!(b.since(a), 20);
        assert_eq!(a.offset_from(b), -20);
        assert!(b.is_after(a) && !a.is_after(b) && !a.is_after(a));
    }
}
