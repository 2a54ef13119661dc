//! A sliding window of per-tick count bins.

use super::{RateReading, check_tick_s};
use crate::error::Error;
use crate::math::Real;
use crate::ticks::Ticks;

/// The counts of the last `N` ticks, in a ring of `N` bins, with their sum
/// kept incrementally (exact: integers, no drift).
///
/// * Counts given for tick `now` go into `now`'s bin. When `now` moves on by
///   `d` ticks, the `min(d, N)` oldest bins are cleared: ticks that passed
///   without a call hold zero counts. The window spans the current (newest)
///   tick and the `N - 1` before it.
/// * Counts given for an earlier tick than the newest (a late report) are
///   added to the newest bin, so nothing is lost.
/// * Bins saturate at `u32::MAX`; the sum is a `u64` and cannot overflow.
/// * Ticks wrap around (see [`Ticks`]).
///
/// Cost: O(1) per elapsed tick (a skipped stretch costs at most `N` bin
/// clears). Memory: `4 N + 24` bytes on 32-bit targets.
///
/// ```
/// use countward::rate::BinWindow;
/// use countward::Ticks;
/// let mut w = BinWindow::<4>::new();
/// w.add(Ticks(0), 3);
/// w.add(Ticks(1), 5);
/// w.add(Ticks(2), 1);
/// assert_eq!(w.sum(), 9);
/// w.add(Ticks(5), 2); // ticks 3 and 4 passed without counts; ticks 0 and 1 drop out
/// assert_eq!(w.sum(), 3);
/// assert_eq!(w.filled_ticks(), 4);
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BinWindow<const N: usize> {
    bins: [u32; N],
    head: usize,
    newest: Ticks,
    filled: u32,
    sum: u64,
}

impl<const N: usize> Default for BinWindow<N> {
    fn default() -> Self {
        Self::new()
    }
}

impl<const N: usize> BinWindow<N> {
    const CAPACITY_OK: () = assert!(N >= 1 && N <= (1 << 24), "BinWindow needs 1..=2^24 bins");

    /// An empty window (no tick seen yet). `const`, so it can live in a `static`.
    pub const fn new() -> Self {
        let () = Self::CAPACITY_OK;
        BinWindow {
            bins: [0; N],
            head: 0,
            newest: Ticks(0),
            filled: 0,
            sum: 0,
        }
    }

    /// Adds `counts` to the bin of tick `now`, first moving the window on to
    /// `now` if it is later than the newest tick.
    pub fn add(&mut self, now: Ticks, counts: u32) {
        // The common case: exactly one tick after the newest. One bin leaves,
        // one enters (the new bin starts empty, so all of `counts` lands).
        if self.filled != 0 && now.0 == self.newest.0.wrapping_add(1) {
            let head = if self.head + 1 >= N { 0 } else { self.head + 1 };
            if let Some(bin) = self.bins.get_mut(head) {
                self.sum = self.sum - u64::from(*bin) + u64::from(counts);
                *bin = counts;
                self.head = head;
                self.newest = now;
                if (self.filled as usize) < N {
                    self.filled += 1;
                }
                return;
            }
        }
        self.advance_to(now);
        let bin = &mut self.bins[self.head];
        let added = counts.min(u32::MAX - *bin);
        *bin += added;
        self.sum += u64::from(added);
    }

    /// Moves the window on to tick `now` (clearing the bins of the ticks that
    /// passed) without adding counts. An earlier `now` changes nothing.
    pub fn advance_to(&mut self, now: Ticks) {
        if self.filled == 0 {
            self.newest = now;
            self.filled = 1;
            return;
        }
        let d = now.offset_from(self.newest);
        if d <= 0 {
            return;
        }
        let steps = (d as u32).min(N as u32);
        for _ in 0..steps {
            self.head = if self.head + 1 == N { 0 } else { self.head + 1 };
            self.sum -= u64::from(self.bins[self.head]);
            self.bins[self.head] = 0;
        }
        self.filled = self.filled.saturating_add(d as u32).min(N as u32);
        self.newest = now;
    }

    /// Counts in the window (the last [`BinWindow::filled_ticks`] ticks).
    pub const fn sum(&self) -> u64 {
        self.sum
    }

    /// Counts in the window, saturated to `u32` (what thresholds compare with).
    pub const fn sum_u32(&self) -> u32 {
        if self.sum > u32::MAX as u64 {
            u32::MAX
        } else {
            self.sum as u32
        }
    }

    /// The counts of the tick `age` ticks before the newest (0: the newest);
    /// 0 beyond the window.
    pub const fn bin_ago(&self, age: usize) -> u32 {
        if age >= N || age >= self.filled as usize {
            return 0;
        }
        let i = if age <= self.head {
            self.head - age
        } else {
            self.head + N - age
        };
        self.bins[i]
    }

    /// Ticks the window covers so far: 0 before the first call, then up to `N`.
    pub const fn filled_ticks(&self) -> u32 {
        self.filled
    }

    /// Whether the window covers all `N` ticks.
    pub const fn is_full(&self) -> bool {
        self.filled as usize == N
    }

    /// The newest tick seen (`None` before the first call).
    pub const fn newest(&self) -> Option<Ticks> {
        if self.filled == 0 {
            None
        } else {
            Some(self.newest)
        }
    }

    /// Empties the window.
    pub fn clear(&mut self) {
        *self = Self::new();
    }

    /// The rate over the covered ticks, with its Poisson uncertainty, for a
    /// tick of `tick_s` seconds; `None` before the first tick.
    pub fn reading<F: Real>(&self, tick_s: F) -> Result<Option<RateReading<F>>, Error> {
        let tick_s = check_tick_s(tick_s)?;
        if self.filled == 0 {
            return Ok(None);
        }
        let seconds = F::of_u32(self.filled) * tick_s;
        Ok(Some(RateReading::of_counts(self.sum, seconds)))
    }
}
