//! Alarm events and their fixed-capacity queue.

use super::faults::Fault;
use crate::detect::Level;
use crate::ticks::Ticks;

/// What happened.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum EventKind {
    /// The active level rose to this level.
    Raised(Level),
    /// The active level fell from `from` to `to`.
    Lowered {
        /// The level before.
        from: Level,
        /// The level after.
        to: Level,
    },
    /// A fault became active.
    FaultSet(Fault),
    /// A fault cleared.
    FaultCleared(Fault),
    /// The latched state was acknowledged.
    Acknowledged,
}

/// An event with the tick at which it happened.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Event {
    /// When.
    pub at: Ticks,
    /// What.
    pub kind: EventKind,
}

/// A first-in first-out queue of at most `Q` events. When full, a new event
/// is not stored and [`EventQueue::dropped`] counts it (saturating): the
/// loss is never silent. (The latched state keeps what matters even then.)
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EventQueue<const Q: usize> {
    buf: [Option<Event>; Q],
    head: usize,
    len: usize,
    dropped: u32,
}

impl<const Q: usize> Default for EventQueue<Q> {
    fn default() -> Self {
        Self::new()
    }
}

impl<const Q: usize> EventQueue<Q> {
    const CAPACITY_OK: () = assert!(Q >= 1, "EventQueue needs room for one event");

    /// An empty queue.
    pub const fn new() -> Self {
        let () = Self::CAPACITY_OK;
        EventQueue {
            buf: [None; Q],
            head: 0,
            len: 0,
            dropped: 0,
        }
    }

    /// Appends an event; returns `false` (and counts it) when full.
    pub fn push(&mut self, e: Event) -> bool {
        if self.len == Q {
            self.dropped = self.dropped.saturating_add(1);
            return false;
        }
        let i = (self.head + self.len) % Q;
        self.buf[i] = Some(e);
        self.len += 1;
        true
    }

    /// Removes and returns the oldest event.
    pub fn pop(&mut self) -> Option<Event> {
        if self.len == 0 {
            return None;
        }
        let e = self.buf[self.head].take();
        self.head = (self.head + 1) % Q;
        self.len -= 1;
        e
    }

    /// Events waiting.
    pub const fn len(&self) -> usize {
        self.len
    }

    /// Whether no event waits.
    pub const fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Events that did not fit (saturating).
    pub const fn dropped(&self) -> u32 {
        self.dropped
    }
}
