//! Silence watching with a rate learned from the device itself.

use crate::error::{Error, Param, check_open_unit};
use crate::math::Real;
use crate::ticks::{NextDeadline, Ticks};

/// Longest silence budget: 2^31 − 1 ticks, so deadlines compare correctly
/// across wrap-around.
pub const MAX_DELAY_TICKS: u32 = i32::MAX as u32;

/// The shared, precomputed part of silence watching: for `k = 1..=K` learned
/// gaps, the factor `c_k = α^(−1/k) − 1` (UQ32.32) by which the sum `T` of
/// the last `k` gaps is multiplied to get the silence budget `c_k · T`.
///
/// Why this rule: a gap is Exp(λ) and the span `T` of the `k` gaps before it
/// is Gamma(k, λ), independent of it, so `P(gap > c T) = (1 + c)^(−k)` for
/// **every** λ. With `c = α^(−1/k) − 1` the false-silence probability per gap
/// is exactly α whatever the device's rate, where the plug-in budget
/// `−ln α · T/k` is not (it ignores the uncertainty of the learned rate and
/// raises false silences, e.g. 0.022 instead of 0.01 at k = 10; see the
/// tests). The same budget is the threshold of the posterior-predictive
/// (Lomax) distribution of the next gap with the prior `a0 = b0 = 0`
/// (gamma–Poisson conjugacy). A false silence costs α per gap, so the
/// false-silence rate is `λ α` per unit time for a device of rate λ.
///
/// Learning: until `min_gaps` gaps are known the budget is the fixed
/// `learning_ticks`. After `K` gaps the count and the sum are halved, so the
/// rate is learned over the last `K/2..K` gaps and follows slow drifts.
///
/// ```
/// use countward::detect::SilencePlan;
/// let plan = SilencePlan::<32>::new(1e-3_f64, 3, 3_600).unwrap();
/// // 10 gaps summing to 600 s: budget 600 (1000^(1/10) − 1) = 597.157 s
/// // (the Lomax predictive threshold with a0 = b0 = 0; computed).
/// assert_eq!(plan.budget_ticks(600, 10), 597);
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SilencePlan<const K: usize> {
    factors_q32: [u64; K],
    min_gaps: u16,
    learning_ticks: u32,
}

impl<const K: usize> SilencePlan<K> {
    const CAPACITY_OK: () = assert!(K >= 2 && K <= 32_768, "SilencePlan needs 2..=32768 gaps");

    /// Plans for false-silence probability `alpha` per gap, budgets from
    /// `min_gaps` (1..=K) learned gaps on, and `learning_ticks` before that.
    pub fn new<F: Real>(alpha: F, min_gaps: u16, learning_ticks: u32) -> Result<Self, Error> {
        let () = Self::CAPACITY_OK;
        let alpha = check_open_unit(alpha, Param::Alpha)?;
        if min_gaps == 0 || usize::from(min_gaps) > K {
            return Err(Error::OutOfRange(Param::Events));
        }
        if learning_ticks == 0 || learning_ticks > MAX_DELAY_TICKS {
            return Err(Error::OutOfRange(Param::Ticks));
        }
        let ln_alpha = alpha.ln();
        let mut factors_q32 = [0u64; K];
        let cap = F::of(MAX_DELAY_TICKS as f64 * 4_294_967_296.0);
        for (i, f) in factors_q32.iter_mut().enumerate() {
            let k = F::of_u32(i as u32 + 1);
            // α^(−1/k) − 1 = expm1(−ln α / k), formed without cancellation for large k.
            let e = -ln_alpha / k;
            let c = if e < F::of(1e-3) {
                e * (F::ONE + e * (F::HALF + e / F::of(6.0)))
            } else {
                e.exp() - F::ONE
            };
            let q = c * F::of(4_294_967_296.0);
            *f = if q >= cap || !q.is_finite() {
                u64::MAX
            } else {
                q.to_u64_saturating()
            };
        }
        Ok(SilencePlan {
            factors_q32,
            min_gaps,
            learning_ticks,
        })
    }

    /// A plan from stored factors (UQ32.32, `c_k` at index `k − 1`), e.g.
    /// computed on a host with [`SilencePlan::new`] and kept as a constant
    /// in firmware that must not link floating point.
    pub const fn from_factors(
        factors_q32: [u64; K],
        min_gaps: u16,
        learning_ticks: u32,
    ) -> Result<Self, Error> {
        if min_gaps == 0 || min_gaps as usize > K {
            return Err(Error::OutOfRange(Param::Events));
        }
        if learning_ticks == 0 || learning_ticks > MAX_DELAY_TICKS {
            return Err(Error::OutOfRange(Param::Ticks));
        }
        Ok(SilencePlan {
            factors_q32,
            min_gaps,
            learning_ticks,
        })
    }

    /// The stored factors `c_k` (UQ32.32).
    pub const fn factors_q32(&self) -> &[u64; K] {
        &self.factors_q32
    }

    /// The silence budget in ticks after `gaps` learned gaps (1..=K) summing
    /// to `gap_sum_ticks` (capped at [`MAX_DELAY_TICKS`]); the learning
    /// budget below `min_gaps`.
    pub fn budget_ticks(&self, gap_sum_ticks: u32, gaps: u16) -> u32 {
        if gaps < self.min_gaps || gaps == 0 {
            return self.learning_ticks;
        }
        let f = self.factors_q32[(usize::from(gaps) - 1).min(K - 1)];
        let d = (u128::from(gap_sum_ticks) * u128::from(f)) >> 32;
        d.min(u128::from(MAX_DELAY_TICKS)) as u32
    }
}

/// What a watcher knows about one device's silence.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SilenceState {
    /// No event seen yet.
    Unknown,
    /// Fewer gaps learned than the plan needs; the learning budget applies.
    Learning,
    /// The silence is within budget.
    Watching,
    /// The silence has outlasted its budget.
    Silent,
}

const ACTIVE: u16 = 1;
const REPORTED: u16 = 2;

/// The state of one watched device: 16 bytes (asserted in the tests).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DeviceSlot {
    last: Ticks,
    deadline: Ticks,
    gap_sum: u32,
    gaps: u16,
    flags: u16,
}

impl DeviceSlot {
    /// An unused slot.
    pub const EMPTY: DeviceSlot = DeviceSlot {
        last: Ticks(0),
        deadline: Ticks(0),
        gap_sum: 0,
        gaps: 0,
        flags: 0,
    };

    /// Records an event at `now`: O(1) integer work (one 128-bit multiply).
    /// Returns whether the device had been reported silent (it has resumed).
    pub fn event<const K: usize>(&mut self, now: Ticks, plan: &SilencePlan<K>) -> bool {
        let resumed = self.flags & REPORTED != 0;
        if self.flags & ACTIVE == 0 {
            *self = DeviceSlot {
                last: now,
                deadline: now.plus(plan.learning_ticks),
                gap_sum: 0,
                gaps: 0,
                flags: ACTIVE,
            };
            return false;
        }
        let gap = now.offset_from(self.last).max(0) as u32;
        self.gap_sum = self.gap_sum.saturating_add(gap);
        self.gaps = self.gaps.saturating_add(1);
        if usize::from(self.gaps) > K || self.gap_sum == u32::MAX {
            self.gaps = self.gaps.div_ceil(2);
            self.gap_sum /= 2;
        }
        self.last = now;
        self.deadline = now.plus(plan.budget_ticks(self.gap_sum, self.gaps));
        self.flags = ACTIVE;
        resumed
    }

    /// The state at `now` (no change to the slot).
    pub fn state<const K: usize>(&self, now: Ticks, plan: &SilencePlan<K>) -> SilenceState {
        if self.flags & ACTIVE == 0 {
            SilenceState::Unknown
        } else if !now.is_after(self.deadline) && self.flags & REPORTED == 0 {
            if self.gaps < plan.min_gaps {
                SilenceState::Learning
            } else {
                SilenceState::Watching
            }
        } else {
            SilenceState::Silent
        }
    }

    /// The deadline, if the device is watched and not yet reported silent.
    pub const fn deadline(&self) -> Option<Ticks> {
        if self.flags & ACTIVE != 0 && self.flags & REPORTED == 0 {
            Some(self.deadline)
        } else {
            None
        }
    }

    /// The last event.
    pub const fn last_event(&self) -> Option<Ticks> {
        if self.flags & ACTIVE != 0 {
            Some(self.last)
        } else {
            None
        }
    }

    /// The learned gaps and their sum in ticks.
    pub const fn learned(&self) -> (u16, u32) {
        (self.gaps, self.gap_sum)
    }

    fn mark_reported(&mut self) {
        self.flags |= REPORTED;
    }
}

/// One device watched for silence: a [`DeviceSlot`] with its own plan.
///
/// ```
/// use countward::detect::{SilencePlan, SilenceState, SilenceWatcher};
/// use countward::Ticks;
/// use countward::ticks::NextDeadline;
/// let plan = SilencePlan::<16>::new(1e-4_f64, 4, 600).unwrap();
/// let mut w = SilenceWatcher::new(plan);
/// for i in 0..=8 {
///     w.event(Ticks(i * 30)); // a device that reports every 30 s or so
/// }
/// // 8 gaps of 30 s: budget 240 (10^(4/8) − 1) = 518 s after the last event.
/// assert_eq!(w.next_deadline(), Some(Ticks(240 + 518 + 1)));
/// assert_eq!(w.poll(Ticks(700)), SilenceState::Watching);
/// assert_eq!(w.poll(Ticks(759)), SilenceState::Silent);
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SilenceWatcher<const K: usize> {
    plan: SilencePlan<K>,
    slot: DeviceSlot,
}

impl<const K: usize> SilenceWatcher<K> {
    /// A watcher that has seen nothing yet.
    pub const fn new(plan: SilencePlan<K>) -> Self {
        SilenceWatcher {
            plan,
            slot: DeviceSlot::EMPTY,
        }
    }

    /// Records an event; returns whether the device had been reported silent.
    pub fn event(&mut self, now: Ticks) -> bool {
        self.slot.event(now, &self.plan)
    }

    /// The state at `now`; reports [`SilenceState::Silent`] from the deadline
    /// on, until the next event.
    pub fn poll(&mut self, now: Ticks) -> SilenceState {
        let s = self.slot.state(now, &self.plan);
        if s == SilenceState::Silent {
            self.slot.mark_reported();
        }
        s
    }

    /// The device's slot.
    pub const fn slot(&self) -> &DeviceSlot {
        &self.slot
    }
}

impl<const K: usize> NextDeadline for SilenceWatcher<K> {
    fn next_deadline(&self) -> Option<Ticks> {
        self.slot.deadline().map(|d| d.plus(1))
    }
}

/// A fixed table of `N` devices watched for silence with one shared plan
/// (16 bytes per device), for a gateway.
///
/// * [`SilenceFleet::event`]: O(1) per event.
/// * [`SilenceFleet::next_silent`]: the next device whose silence has
///   outlasted its budget, reported once per silence (until its next event).
/// * [`NextDeadline::next_deadline`]: the earliest instant at which a device
///   can become silent, so the gateway sleeps until then (or the next event).
///   Both queries scan the table: O(N) compares.
///
/// ```
/// use countward::detect::{SilenceFleet, SilencePlan};
/// use countward::Ticks;
/// use countward::ticks::NextDeadline;
/// let plan = SilencePlan::<16>::new(1e-6_f64, 3, 3_600).unwrap();
/// let mut fleet = SilenceFleet::<64, 16>::new(plan);
/// for i in 0..6 {
///     fleet.event(7, Ticks(i * 100)).unwrap(); // device 7 reports every 100 s
///     fleet.event(9, Ticks(i * 10)).unwrap(); // device 9 every 10 s
/// }
/// // Device 9's budget ends first: 50 (10^(6/5) − 1) = 742 s after its last event.
/// assert_eq!(fleet.next_deadline(), Some(Ticks(50 + 742 + 1)));
/// assert_eq!(fleet.next_silent(Ticks(793)), Some(9));
/// assert_eq!(fleet.next_silent(Ticks(793)), None); // reported once
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SilenceFleet<const N: usize, const K: usize> {
    plan: SilencePlan<K>,
    slots: [DeviceSlot; N],
}

impl<const N: usize, const K: usize> SilenceFleet<N, K> {
    /// An empty table.
    pub const fn new(plan: SilencePlan<K>) -> Self {
        SilenceFleet {
            plan,
            slots: [DeviceSlot::EMPTY; N],
        }
    }

    /// Records an event of device `index` at `now`; returns whether it had
    /// been reported silent. An index outside the table is an error.
    pub fn event(&mut self, index: usize, now: Ticks) -> Result<bool, Error> {
        let slot = self
            .slots
            .get_mut(index)
            .ok_or(Error::OutOfRange(Param::Events))?;
        Ok(slot.event(now, &self.plan))
    }

    /// Stops watching device `index`.
    pub fn remove(&mut self, index: usize) -> Result<(), Error> {
        let slot = self
            .slots
            .get_mut(index)
            .ok_or(Error::OutOfRange(Param::Events))?;
        *slot = DeviceSlot::EMPTY;
        Ok(())
    }

    /// The next device silent at `now` that was not reported yet; marks it reported.
    pub fn next_silent(&mut self, now: Ticks) -> Option<usize> {
        let i = self
            .slots
            .iter()
            .position(|s| s.deadline().is_some_and(|d| now.is_after(d)))?;
        self.slots[i].mark_reported();
        Some(i)
    }

    /// Device `index`'s slot.
    pub fn slot(&self, index: usize) -> Option<&DeviceSlot> {
        self.slots.get(index)
    }

    /// The state of device `index` at `now`.
    pub fn state(&self, index: usize, now: Ticks) -> Option<SilenceState> {
        self.slots.get(index).map(|s| s.state(now, &self.plan))
    }
}

impl<const N: usize, const K: usize> NextDeadline for SilenceFleet<N, K> {
    /// One tick after the earliest deadline (the first instant a device is
    /// silent); `None` when no device is watched.
    fn next_deadline(&self) -> Option<Ticks> {
        let mut earliest: Option<Ticks> = None;
        for d in self.slots.iter().filter_map(DeviceSlot::deadline) {
            earliest = match earliest {
                Some(e) if !e.is_after(d) => Some(e),
                _ => Some(d),
            };
        }
        earliest.map(|d| d.plus(1))
    }
}
