//! The alarm state machine.

use super::events::{Event, EventKind, EventQueue};
use super::faults::{Fault, Faults};
use crate::detect::{Classification, Level};
use crate::error::{Error, Param};
use crate::ticks::{NextDeadline, Ticks};

/// Persistence settings of an [`AlarmMachine`], in consecutive ticks.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AlarmConfig {
    raise_ticks: u16,
    clear_ticks: u16,
    fault_set_ticks: u16,
    fault_clear_ticks: u16,
}

impl AlarmConfig {
    /// * `raise_ticks`: a level is raised after its set threshold held this
    ///   many consecutive ticks (1: at once);
    /// * `clear_ticks`: a level is lowered after the count stayed below its
    ///   clearing threshold this many consecutive ticks;
    /// * `fault_set_ticks`, `fault_clear_ticks`: the same for faults.
    ///
    /// All at least 1.
    pub const fn new(
        raise_ticks: u16,
        clear_ticks: u16,
        fault_set_ticks: u16,
        fault_clear_ticks: u16,
    ) -> Result<Self, Error> {
        if raise_ticks == 0 || clear_ticks == 0 || fault_set_ticks == 0 || fault_clear_ticks == 0 {
            return Err(Error::OutOfRange(Param::Ticks));
        }
        Ok(AlarmConfig {
            raise_ticks,
            clear_ticks,
            fault_set_ticks,
            fault_clear_ticks,
        })
    }
}

/// Levels and faults with persistence, hysteresis and latching, emitting
/// events into a queue of `Q` entries.
///
/// * **Active level**: rises to a level once the count has been at or above
///   that level's *set* threshold for `raise_ticks` consecutive ticks (the
///   highest such level); falls below a level once the count has been below
///   that level's *clearing* threshold for `clear_ticks` consecutive ticks.
///   Each change is one event.
/// * **Latched level**: the highest active level since the last
///   acknowledgement. [`AlarmMachine::acknowledge`] sets it back to the
///   active level, so an alarm that is still active stays latched, and one
///   that has cleared is released only by a person.
/// * **Faults**: low counts come from the classification (with its own
///   hysteresis), the others from the `faults` argument; each is set and
///   cleared with its own persistence and latched like the level.
/// * **Events**: a queue of `Q` entries; overflow is counted, never silent.
///
/// Per tick: a few compares per level and fault, O(1). Memory on 32-bit
/// targets: 44 bytes plus 8 per queue entry (asserted on the Cortex-M0 target).
///
/// ```
/// use countward::alarm::{AlarmConfig, AlarmMachine, EventKind, Faults, Level};
/// use countward::detect::LevelThresholds;
/// use countward::Ticks;
/// let thresholds = LevelThresholds::new(20, 15, 30, 20, Some((2, 4))).unwrap();
/// let mut m = AlarmMachine::<8>::new(AlarmConfig::new(2, 3, 5, 5).unwrap());
/// let counts = [10, 31, 35, 12, 11, 10, 10];
/// for (t, &n) in counts.iter().enumerate() {
///     m.update(Ticks(t as u32), thresholds.classify(n), Faults::NONE);
/// }
/// // Two ticks above 30 raised the alarm; three ticks below 15 cleared it.
/// assert_eq!(m.active(), Level::Normal);
/// assert_eq!(m.latched(), Level::Alarm); // still latched: nobody acknowledged
/// assert_eq!(m.poll_event().unwrap().kind, EventKind::Raised(Level::Alarm));
/// m.acknowledge(Ticks(7));
/// assert_eq!(m.latched(), Level::Normal);
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AlarmMachine<const Q: usize> {
    config: AlarmConfig,
    active: Level,
    latched: Level,
    up_runs: [u16; 2],
    down_runs: [u16; 2],
    faults_active: Faults,
    faults_latched: Faults,
    fault_runs: [u16; 4],
    last: Ticks,
    queue: EventQueue<Q>,
}

impl<const Q: usize> AlarmMachine<Q> {
    /// A machine at rest (normal, no fault, nothing latched).
    pub const fn new(config: AlarmConfig) -> Self {
        AlarmMachine {
            config,
            active: Level::Normal,
            latched: Level::Normal,
            up_runs: [0; 2],
            down_runs: [0; 2],
            faults_active: Faults::NONE,
            faults_latched: Faults::NONE,
            fault_runs: [0; 4],
            last: Ticks(0),
            queue: EventQueue::new(),
        }
    }

    /// One tick of input: the window's classification and the other faults
    /// present (saturation, silence, external; a low-count bit here is
    /// merged with the classification's).
    pub fn update(&mut self, now: Ticks, c: Classification, faults: Faults) {
        self.last = now;
        // The quiet tick at rest (the usual case): nothing active, no run of
        // ticks under way, and nothing in this tick's input. The full update
        // would only count clearing runs, which matter only while a level is
        // active (a raise resets them), so it changes nothing observable.
        if self.active == Level::Normal
            && self.faults_active.is_empty()
            && faults.is_empty()
            && c == Classification::QUIET
            && self.up_runs == [0; 2]
            && self.fault_runs == [0; 4]
        {
            return;
        }
        self.update_level(now, c);
        for f in Fault::ALL {
            let (set, hold) = match f {
                Fault::LowCounts => {
                    let external = faults.contains(f);
                    (c.low_raise || external, c.low_hold || external)
                }
                _ => (faults.contains(f), faults.contains(f)),
            };
            self.update_fault(now, f, set, hold);
        }
    }

    fn update_level(&mut self, now: Ticks, c: Classification) {
        let hold = c.hold.max(c.raise);
        // Consecutive ticks at or above each level's set threshold, and below
        // each level's clearing threshold (index 0: warning, 1: alarm).
        for (i, level) in [Level::Warning, Level::Alarm].into_iter().enumerate() {
            self.up_runs[i] = if c.raise >= level {
                self.up_runs[i].saturating_add(1)
            } else {
                0
            };
            self.down_runs[i] = if hold < level {
                self.down_runs[i].saturating_add(1)
            } else {
                0
            };
        }
        let from = self.active;
        let mut to = from;
        for (i, level) in [Level::Warning, Level::Alarm].into_iter().enumerate() {
            if to < level && self.up_runs[i] >= self.config.raise_ticks {
                to = level;
            }
        }
        if to == from {
            for (i, level) in [Level::Warning, Level::Alarm].into_iter().enumerate().rev() {
                if to >= level && self.down_runs[i] >= self.config.clear_ticks {
                    to = if i == 0 {
                        Level::Normal
                    } else {
                        Level::Warning
                    };
                }
            }
        }
        if to > from {
            self.active = to;
            self.latched = self.latched.max(to);
            self.emit(now, EventKind::Raised(to));
        } else if to < from {
            self.active = to;
            self.emit(now, EventKind::Lowered { from, to });
        }
    }

    fn update_fault(&mut self, now: Ticks, f: Fault, set: bool, hold: bool) {
        let i = f as usize;
        if !self.faults_active.contains(f) {
            self.fault_runs[i] = if set {
                self.fault_runs[i].saturating_add(1)
            } else {
                0
            };
            if self.fault_runs[i] >= self.config.fault_set_ticks {
                self.fault_runs[i] = 0;
                self.faults_active = self.faults_active.with(f, true);
                self.faults_latched = self.faults_latched.with(f, true);
                self.emit(now, EventKind::FaultSet(f));
            }
        } else {
            self.fault_runs[i] = if hold {
                0
            } else {
                self.fault_runs[i].saturating_add(1)
            };
            if self.fault_runs[i] >= self.config.fault_clear_ticks {
                self.fault_runs[i] = 0;
                self.faults_active = self.faults_active.without(f);
                self.emit(now, EventKind::FaultCleared(f));
            }
        }
    }

    fn emit(&mut self, at: Ticks, kind: EventKind) {
        self.queue.push(Event { at, kind });
    }

    /// Acknowledges: the latched level and faults fall back to the active ones.
    pub fn acknowledge(&mut self, now: Ticks) {
        self.latched = self.active;
        self.faults_latched = self.faults_active;
        self.emit(now, EventKind::Acknowledged);
    }

    /// The oldest queued event.
    pub fn poll_event(&mut self) -> Option<Event> {
        self.queue.pop()
    }

    /// The active level.
    pub const fn active(&self) -> Level {
        self.active
    }

    /// The latched level (highest since the last acknowledgement).
    pub const fn latched(&self) -> Level {
        self.latched
    }

    /// Active faults.
    pub const fn active_faults(&self) -> Faults {
        self.faults_active
    }

    /// Latched faults (active since the last acknowledgement).
    pub const fn latched_faults(&self) -> Faults {
        self.faults_latched
    }

    /// Events that did not fit in the queue.
    pub const fn dropped_events(&self) -> u32 {
        self.queue.dropped()
    }

    /// Events waiting in the queue.
    pub const fn queued_events(&self) -> usize {
        self.queue.len()
    }
}

impl<const Q: usize> NextDeadline for AlarmMachine<Q> {
    /// The next tick while a persistence count is running (a change may
    /// happen then); `None` when only new input can change the state.
    fn next_deadline(&self) -> Option<Ticks> {
        let levels = [Level::Warning, Level::Alarm];
        let pending_up = self
            .up_runs
            .iter()
            .zip(levels)
            .any(|(&r, l)| r > 0 && self.active < l);
        let pending_down = self
            .down_runs
            .iter()
            .zip(levels)
            .any(|(&r, l)| r > 0 && self.active >= l);
        let running = pending_up || pending_down || self.fault_runs.iter().any(|&r| r > 0);
        if running {
            Some(self.last.plus(1))
        } else {
            None
        }
    }
}
