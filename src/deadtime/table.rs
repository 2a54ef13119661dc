//! Integer-only dead-time correction for firmware: a precomputed table.

use super::model::DeadTime;
use crate::error::{Error, Param, check_range};
use crate::math::Real;

/// Dead-time correction of a window count in integer arithmetic.
///
/// The table holds the correction factor `g(x) = n/m` (true over measured
/// rate, on the physical branch) at `N` evenly spaced values of `x = mτ`
/// from 0 to `coverage` times the model's limit, in UQ8.24. A window count
/// `M` is placed on the grid by one multiplication with a precomputed
/// Q32 factor (no division), `g` is interpolated linearly, and the corrected
/// count is `M · g`, rounded. Counts beyond the table return `None`: the
/// reading is over range (treat it as saturation, never as a number).
///
/// Error bound: the constructor measures the largest relative error of the
/// factor *as `correct` reads it* (at the grid position given by the rounded
/// Q32 factor, whose rounding stretches every position by up to `2^-33/p`
/// relative, `p` the factor) against the model's inverse, at 32 points in
/// every interval and where the stretched reading crosses a node, adds the
/// UQ8.24 rounding, and keeps the result in parts per million
/// ([`CorrectionTable::error_bound_ppm`]); positions whose corrected count
/// would not fit a `u32` (answered `None`) are not counted. The corrected count is
/// within that relative error plus half a count of the float correction.
/// Non-paralyzable `g` is convex with `g'' = 2/(1 − x)³`, so the error
/// grows as `h²/(1 − x)³`: keep `coverage` where losses are moderate.
///
/// Cost per call: two 64-bit multiplies, a 64×32 multiply, shifts.
/// Memory: `4 N + 16` bytes. A table built on a host can be stored as a
/// constant and rebuilt with [`CorrectionTable::from_parts`].
///
/// ```
/// use countward::deadtime::{CorrectionTable, DeadTime};
/// // Paralyzable, τ = 100 µs, counts over 1 s, covering up to 90% of 1/(eτ).
/// let p = DeadTime::paralyzable(100e-6_f64).unwrap();
/// let table = CorrectionTable::<64>::new(&p, 1.0, 0.9).unwrap();
/// assert!(table.error_bound_ppm() < 2_000);
/// // 3000 counts in 1 s: the W₀ correction is 4894.02 cps.
/// let n = table.correct(3000).unwrap();
/// assert!((f64::from(n) - 4894.02).abs() <= 4894.02 * table.error_bound_ppm() as f64 * 1e-6 + 0.5);
/// assert_eq!(table.correct(3500), None); // beyond 90% of the maximum: over range
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CorrectionTable<const N: usize> {
    gain_q24: [u32; N],
    position_per_count_q32: u64,
    error_bound_ppm: u32,
}

impl<const N: usize> CorrectionTable<N> {
    const SIZE_OK: () = assert!(N >= 2 && N <= 4096, "CorrectionTable needs 2..=4096 points");

    /// Builds the table for `model`, counts taken over `window_s` seconds,
    /// covering measured rates up to `coverage` (in (0, 0.99]) of the
    /// model's limit (the peak, or 1/τ for non-paralyzable).
    pub fn new<F: Real>(model: &DeadTime<F>, window_s: F, coverage: F) -> Result<Self, Error> {
        let () = Self::SIZE_OK;
        let window_s = check_range(window_s, F::MIN_POSITIVE, F::MAX, Param::Seconds)?;
        let coverage = check_range(coverage, F::MIN_POSITIVE, F::of(0.99), Param::Fraction)?;
        let tau = model.tau_s();
        let x_max = coverage * model.measured_limit_cps() * tau;
        let step = x_max / F::of_u32(N as u32 - 1);
        let scale = F::of(16_777_216.0);
        let exact = |x: F| -> Result<F, Error> {
            if x <= F::ZERO {
                return Ok(F::ONE);
            }
            let m = x / tau;
            Ok(model.correct(m)?.true_cps / m)
        };
        let mut gain_q24 = [0u32; N];
        for (j, g) in gain_q24.iter_mut().enumerate() {
            let v = exact(step * F::of_u32(j as u32))? * scale + F::HALF;
            if !(v < F::of(4_294_967_295.0)) {
                return Err(Error::OutOfRange(Param::Fraction));
            }
            *g = v.to_u32_saturating();
        }
        let per_count = F::of_u32(N as u32 - 1) / x_max * tau / window_s;
        let p = per_count * F::of(4_294_967_296.0);
        if !(p < F::of(1.8e19)) || p < F::ONE {
            return Err(Error::OutOfRange(Param::Seconds));
        }
        // Rounded to nearest; the table is then read at `x · stretch`
        // instead of `x`, which the error bound below accounts for.
        let position_per_count_q32 = (p + F::HALF).floor().to_u64_saturating();
        let stretch = F::of_u64(position_per_count_q32) / p;
        // The factor the table gives for a count at true position `x` (grid
        // units of `step`), as `correct` computes it (to the UQ8.24 ulp).
        let read = |pos: F| -> Option<F> {
            let i = pos.floor();
            let j = i.to_u32_saturating() as usize;
            if j >= N - 1 {
                return (j == N - 1 && pos == i).then(|| F::of_u32(gain_q24[N - 1]) / scale);
            }
            let frac = pos - i;
            let lo = F::of_u32(gain_q24[j]) / scale;
            let hi = F::of_u32(gain_q24[j + 1]) / scale;
            Some(lo + (hi - lo) * frac)
        };
        // Measured error bound of the factor as read: 32 points in every
        // interval, plus the points where the stretched reading crosses a
        // node (where the error has its kinks).
        let mut worst = F::ZERO;
        // Positions whose corrected count overflows a u32 return `None` and
        // do not count.
        let max_out = F::of(4_294_967_295.0);
        let mut check = |pos: F| -> Result<(), Error> {
            if let Some(g) = read(pos * stretch) {
                let e = exact(step * pos)?;
                if pos / per_count * e > max_out {
                    return Ok(());
                }
                let rel = ((g - e) / e).abs();
                if rel > worst {
                    worst = rel;
                }
            }
            Ok(())
        };
        for j in 0..N - 1 {
            for s in 0..32u32 {
                check(F::of_u32(j as u32) + F::of_u32(s) / F::of(32.0))?;
            }
            let node = F::of_u32(j as u32 + 1) / stretch;
            check(node)?;
            check(node * (F::ONE - F::EPSILON * F::of(4.0)))?;
        }
        check(F::of_u32(N as u32 - 1))?;
        // Plus the integer steps of `correct`: the interpolation truncated
        // to the UQ8.24 ulp and the position fraction to 2^-32 grid units
        // (together at most 2 ulp of a factor ≥ 1: 0.12 ppm), and one ppm
        // for the sampling between the measured points.
        let ppm = (worst * F::of(1e6) + F::of(0.12))
            .floor()
            .to_u32_saturating()
            .saturating_add(1);
        Ok(CorrectionTable {
            gain_q24,
            position_per_count_q32,
            error_bound_ppm: ppm,
        })
    }

    /// A table from stored parts (as returned by [`CorrectionTable::parts`]).
    pub const fn from_parts(
        gain_q24: [u32; N],
        position_per_count_q32: u64,
        error_bound_ppm: u32,
    ) -> Self {
        CorrectionTable {
            gain_q24,
            position_per_count_q32,
            error_bound_ppm,
        }
    }

    /// The stored parts: factors (UQ8.24), the grid position per count
    /// (Q32), and the error bound in ppm.
    pub const fn parts(&self) -> (&[u32; N], u64, u32) {
        (
            &self.gain_q24,
            self.position_per_count_q32,
            self.error_bound_ppm,
        )
    }

    /// The measured relative error bound of the factor, parts per million.
    pub const fn error_bound_ppm(&self) -> u32 {
        self.error_bound_ppm
    }

    /// The corrected window count, or `None` when `counts` lies beyond the
    /// table (over range) or the result does not fit a `u32`.
    pub fn correct(&self, counts: u32) -> Option<u32> {
        let pos = u64::from(counts).checked_mul(self.position_per_count_q32)?;
        let i = (pos >> 32) as usize;
        let frac = pos & 0xFFFF_FFFF;
        if i >= N - 1 {
            if i == N - 1 && frac == 0 {
                return Self::scaled(counts, self.gain_q24[N - 1]);
            }
            return None;
        }
        let (lo, hi) = (u64::from(self.gain_q24[i]), u64::from(self.gain_q24[i + 1]));
        let g = if hi >= lo {
            lo + (((hi - lo) * frac) >> 32)
        } else {
            lo - (((lo - hi) * frac) >> 32)
        };
        Self::scaled(counts, g as u32)
    }

    fn scaled(counts: u32, g_q24: u32) -> Option<u32> {
        let v = (u64::from(counts) * u64::from(g_q24) + (1 << 23)) >> 24;
        u32::try_from(v).ok()
    }
}
