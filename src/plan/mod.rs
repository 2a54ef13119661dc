//! Planning alarm settings on the cold path (or on a host): what a check
//! repeated every tick implies per hour, and the threshold that meets a
//! false-alarm rate one can defend (one per day, one per year).
//!
//! A per-check probability α is not an alarm rate: a sliding window checked
//! every tick sees overlapping windows, whose alarms cluster. The functions
//! here count **upcrossings** (ticks at which the window count reaches the
//! threshold after being below it), the events that start an alarm.

mod sliding;

pub use sliding::{sliding_threshold, sliding_upcrossings_per_tick};
