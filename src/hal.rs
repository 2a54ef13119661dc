//! Adapters to `embedded-hal` 1.0 pins and an interrupt-safe count
//! accumulator (feature `embedded-hal`).
//!
//! * [`EdgeCounter`]: counts rising edges of a polled [`InputPin`] (for
//!   slow pulse trains; fast ones belong on a timer's counter input).
//! * [`AlarmIndicator`]: drives an [`OutputPin`] from the latched level and
//!   faults: steady on for an alarm, slow blink for a warning, short flash
//!   for a fault.
//! * [`SharedCounts`]: a count that an interrupt handler adds to and the main
//!   loop takes, on any target (including `thumbv6m`, which has no atomic
//!   read-modify-write), through [`critical_section`]. The final binary
//!   provides the critical-section implementation (e.g.
//!   `cortex-m/critical-section-single-core`); the library never picks one.

use core::cell::Cell;

use critical_section::Mutex;
use embedded_hal::digital::{InputPin, OutputPin};

use crate::alarm::{Faults, Level};
use crate::error::{Error, Param};
use crate::ticks::Ticks;

/// Counts rising edges of a pin polled by the caller.
///
/// ```
/// use countward::hal::EdgeCounter;
/// use embedded_hal_mock::eh1::digital::{Mock, State, Transaction};
/// let pin = Mock::new(&[
///     Transaction::get(State::Low),
///     Transaction::get(State::High),
///     Transaction::get(State::High),
///     Transaction::get(State::Low),
///     Transaction::get(State::High),
/// ]);
/// let mut c = EdgeCounter::new(pin);
/// for _ in 0..5 {
///     c.poll().unwrap();
/// }
/// assert_eq!(c.take(), 2);
/// c.release().done();
/// ```
#[derive(Debug)]
pub struct EdgeCounter<P> {
    pin: P,
    was_high: bool,
    counts: u32,
}

impl<P: InputPin> EdgeCounter<P> {
    /// Starts counting; the pin is assumed low before the first poll.
    pub const fn new(pin: P) -> Self {
        EdgeCounter {
            pin,
            was_high: false,
            counts: 0,
        }
    }

    /// Reads the pin once; returns whether a rising edge was seen.
    pub fn poll(&mut self) -> Result<bool, P::Error> {
        let high = self.pin.is_high()?;
        let edge = high && !self.was_high;
        self.was_high = high;
        if edge {
            self.counts = self.counts.saturating_add(1);
        }
        Ok(edge)
    }

    /// The edges counted since the last `take` (saturating), and resets them.
    pub fn take(&mut self) -> u32 {
        core::mem::take(&mut self.counts)
    }

    /// Gives the pin back.
    pub fn release(self) -> P {
        self.pin
    }
}

/// Drives an indicator output from the alarm state.
///
/// ```
/// use countward::alarm::{Faults, Level};
/// use countward::hal::AlarmIndicator;
/// use countward::Ticks;
/// use embedded_hal_mock::eh1::digital::{Mock, State, Transaction};
/// let pin = Mock::new(&[Transaction::set(State::High), Transaction::set(State::Low)]);
/// let mut led = AlarmIndicator::new(pin, 4).unwrap();
/// led.show(Ticks(0), Level::Alarm, Faults::NONE).unwrap(); // steady on
/// led.show(Ticks(1), Level::Normal, Faults::NONE).unwrap(); // off
/// led.release().done();
/// ```
#[derive(Debug)]
pub struct AlarmIndicator<P> {
    pin: P,
    period_ticks: u32,
}

impl<P: OutputPin> AlarmIndicator<P> {
    /// An indicator whose blink period is `period_ticks` (at least 2).
    pub fn new(pin: P, period_ticks: u32) -> Result<Self, Error> {
        if period_ticks < 2 {
            return Err(Error::OutOfRange(Param::Ticks));
        }
        Ok(AlarmIndicator { pin, period_ticks })
    }

    /// Whether the output is on at `now` for this state: on for an alarm;
    /// on during the first half of each period for a warning; on during the
    /// first tick of each period for a fault (without alarm or warning).
    pub const fn is_on(&self, now: Ticks, latched: Level, faults: Faults) -> bool {
        let phase = now.0 % self.period_ticks;
        match latched {
            Level::Alarm => true,
            Level::Warning => phase < self.period_ticks / 2,
            Level::Normal => !faults.is_empty() && phase == 0,
        }
    }

    /// Sets the output for the state at `now`.
    pub fn show(&mut self, now: Ticks, latched: Level, faults: Faults) -> Result<(), P::Error> {
        if self.is_on(now, latched, faults) {
            self.pin.set_high()
        } else {
            self.pin.set_low()
        }
    }

    /// Gives the pin back.
    pub fn release(self) -> P {
        self.pin
    }
}

/// A count shared between an interrupt handler and the main loop.
///
/// ```
/// use countward::hal::SharedCounts;
/// static PULSES: SharedCounts = SharedCounts::new();
/// // In the pulse interrupt:
/// PULSES.add(1);
/// PULSES.add(1);
/// // Once per tick in the main loop:
/// assert_eq!(PULSES.take(), 2);
/// assert_eq!(PULSES.take(), 0);
/// ```
#[derive(Debug)]
pub struct SharedCounts {
    counts: Mutex<Cell<u32>>,
}

impl Default for SharedCounts {
    fn default() -> Self {
        Self::new()
    }
}

impl SharedCounts {
    /// Zero counts; `const`, for a `static`.
    pub const fn new() -> Self {
        SharedCounts {
            counts: Mutex::new(Cell::new(0)),
        }
    }

    /// Adds `n` counts (saturating at `u32::MAX`).
    pub fn add(&self, n: u32) {
        critical_section::with(|cs| {
            let c = self.counts.borrow(cs);
            c.set(c.get().saturating_add(n));
        });
    }

    /// Takes the counts accumulated so far, leaving zero.
    pub fn take(&self) -> u32 {
        critical_section::with(|cs| self.counts.borrow(cs).replace(0))
    }
}
