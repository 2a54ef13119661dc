//! The alarm state machine: levels with hysteresis and persistence,
//! latching until acknowledged, fault states, and a fixed event queue.
//!
//! Inputs arrive once per tick as a [`Classification`] of the window (from
//! [`crate::detect::WindowDetector`], or any detector mapped onto levels) and
//! a set of [`Faults`]; outputs are the active and latched states and a queue
//! of [`Event`]s. Nothing is lost: a level that is raised and cleared between
//! two polls leaves its `Raised` event in the queue (or, if the queue was
//! full, a count in [`AlarmMachine::dropped_events`]) and stays latched until
//! [`AlarmMachine::acknowledge`] is called after it cleared.

mod events;
mod faults;
mod machine;

pub use crate::detect::{Classification, Level};
pub use events::{Event, EventKind, EventQueue};
pub use faults::{Fault, Faults};
pub use machine::{AlarmConfig, AlarmMachine};
