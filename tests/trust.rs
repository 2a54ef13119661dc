//! Regression tests for the silent wrong answers and the panic an outside
//! review found (each failed before its fix), and the invariants that cover
//! their whole class: thresholds above the mean and meeting their target,
//! f32 within its documented rule against f64 across the band that broke,
//! designs that cannot work refused, no NaN or infinity inside an `Ok`.
//!
//! References: the f64 tier is itself checked against mpmath in
//! `tests/reference_vectors.rs`; where a test compares f32 with f64 it relies
//! on that. Values marked "computed (mpmath)" were computed with mpmath for
//! this project (`tests/reference/gen_small_shape.py` and the one-liners
//! quoted beside them); none is a published value.

use countward::deadtime::{CorrectionTable, DeadTime, two_source};
use countward::detect::{CusumConfig, CusumDirection, SprtConfig, WindowDetector};
use countward::fixed::FixedMean;
use countward::math::{gamma_p, gamma_p_inv, gamma_q, gamma_q_inv};
use countward::plan::{sliding_threshold, sliding_upcrossings_per_tick};
use countward::poisson::{at_most, exact_upper_limit, fault_threshold, pmf};
use countward::rate::SmoothedRate;
use countward::{Error, Param, Ticks};
use proptest::prelude::*;

mod common;

// ---- 1. Sliding-window thresholds lie above the mean and meet their target.

/// Every count from just above the window mean to `k − 1` misses the target
/// (a plain scan, independent of the bisection in the library).
fn assert_minimal_above_mean(mu: f64, bins: u32, target: f64, k: u32) {
    let mean = mu * f64::from(bins);
    assert!(
        f64::from(k) > mean,
        "mu {mu} bins {bins}: threshold {k} not above the mean {mean}"
    );
    let r = sliding_upcrossings_per_tick(mu, bins, k).unwrap();
    assert!(
        r <= target,
        "mu {mu} bins {bins}: rate {r:e} at {k} above target {target:e}"
    );
    let first = mean.floor() as u32 + 1;
    for j in first..k {
        let rj = sliding_upcrossings_per_tick(mu, bins, j).unwrap();
        assert!(
            rj > target,
            "mu {mu} bins {bins}: {j} < {k} meets the target already ({rj:e})"
        );
    }
}

#[test]
fn sliding_threshold_is_above_the_window_mean() {
    // The review's case: window mean 1000, one alarm start per day at 1 s ticks.
    // Before the fix: Ok(1).
    let k = sliding_threshold(100.0_f64, 10, 1.0 / 86_400.0).unwrap();
    assert!(k > 1000 && k < 1200, "{k}");
    assert_minimal_above_mean(100.0, 10, 1.0 / 86_400.0, k);
}

#[test]
fn sliding_threshold_grid_is_minimal_above_the_mean() {
    // A grid from window means far below 1 to ~3000 (half of it was wrong
    // from a window mean of ~70 up).
    for &mu in &[0.02, 0.3, 1.0, 7.0, 12.0, 50.0] {
        for &bins in &[1u32, 3, 10, 60] {
            for &target in &[1e-2, 1.0 / 3600.0, 1.0 / 86_400.0, 1e-9] {
                let k = sliding_threshold(mu, bins, target).unwrap();
                assert_minimal_above_mean(mu, bins, target, k);
            }
        }
    }
}

// ---- 2. The f32 lower tail in the band where it collapsed to 0.

#[test]
fn f32_lower_tail_in_the_band_that_collapsed() {
    // at_most(273.49567, 109): 8.118920979730492e-30 (f64, itself within
    // 1e-12 of mpmath; before the fix f32 gave 0).
    let t = at_most(273.495_67_f32, 109).unwrap();
    assert!(
        (f64::from(t.p) / 8.118_920_979_730_492e-30 - 1.0).abs() < 1e-5,
        "{t:?}"
    );
    // The whole band: means 197–305 (step 0.25), k 60–128, against f64 at the
    // same (f32-rounded) mean, where the f64 value is at least 1e-30.
    let mut checked = 0;
    let mut mean = 197.0_f32;
    while mean <= 305.0 {
        for k in 60..=128 {
            let want = at_most(f64::from(mean), k).unwrap().p;
            if want < 1e-30 {
                continue;
            }
            let got = f64::from(at_most(mean, k).unwrap().p);
            assert!(
                (got / want - 1.0).abs() <= 1e-5,
                "mean {mean} k {k}: {got:e} vs {want:e}"
            );
            checked += 1;
        }
        mean += 0.25;
    }
    assert!(checked > 10_000, "{checked}");
}

#[test]
fn f32_fault_thresholds_in_that_band_match_f64() {
    // fault_threshold(250, 1e-28): 96 in f64 and the integer tier (105 in f32 before the fix).
    assert_eq!(
        fault_threshold(250.0_f32, 1e-28).unwrap().unwrap().counts,
        96
    );
    let mut mean = 197.0_f32;
    while mean <= 305.0 {
        for &alpha in &[1e-29_f32, 1e-28, 1e-26, 1e-24, 1e-20] {
            let a = fault_threshold(mean, alpha).unwrap().map(|t| t.counts);
            let b = fault_threshold(f64::from(mean), f64::from(alpha)).unwrap();
            let b_counts = b.map(|t| t.counts);
            if a != b_counts {
                // Only at a near tie (the documented f32 rule: exact except
                // within 1e-3 of α), and then by one count.
                let t = b.unwrap();
                let next = at_most(f64::from(mean), t.counts + 1).unwrap().p;
                let tie = (t.tail.p / f64::from(alpha) - 1.0).abs() < 1e-3
                    || (next / f64::from(alpha) - 1.0).abs() < 1e-3;
                assert!(
                    tie,
                    "mean {mean} alpha {alpha}: f32 {a:?}, f64 {b_counts:?}"
                );
            }
        }
        mean += 0.5;
    }
}

// ---- 3. CUSUM designs with close means.

#[test]
fn cusum_reference_for_close_means() {
    // Means a few ulps apart: the logarithmic mean is the mean itself,
    // 0.4061007390855173 × 150 = 60.9 → 61 (75 before the fix).
    let c = CusumConfig::for_means(
        0.406_100_739_085_517_36_f64,
        0.406_100_739_085_517_3,
        17.5,
        150,
        false,
    )
    .unwrap();
    assert_eq!(c.reference(), 61);
    // A decrease scheme at 1e6 counts per tick: reference 1e9 on the lattice
    // (0 before the fix: a CUSUM that never signals).
    let c = CusumConfig::for_means(1e6_f64, 999_999.999_999_999_9, 8.0, 1000, false).unwrap();
    assert_eq!(c.direction(), CusumDirection::Decrease);
    assert_eq!(c.reference(), 1_000_000_000);
    // A reference that rounds to 0 is no design.
    assert_eq!(
        CusumConfig::for_means(1e-6_f64, 2e-6, 5.0, 1000, false),
        Err(Error::OutOfRange(Param::Scale))
    );
}

proptest! {
    /// Lucas's reference value (the logarithmic mean) lies between the two
    /// means, within half a lattice unit, for any pair, close ones included.
    #[test]
    fn cusum_reference_lies_between_the_means(
        m0 in 1e-3f64..1e5,
        rel in prop_oneof![1e-15f64..1e-9, 1e-9f64..1.0, 1.0f64..100.0],
        up in any::<bool>(),
        scale in 1u32..4096,
    ) {
        let m1 = if up { m0 * (1.0 + rel) } else { m0 / (1.0 + rel) };
        prop_assume!(m1 != m0);
        match CusumConfig::for_means(m0, m1, 5.0, scale, false) {
            Ok(c) => {
                let k = c.reference_counts::<f64>();
                let half = 0.5 / f64::from(scale);
                let (lo, hi) = if m0 < m1 { (m0, m1) } else { (m1, m0) };
                prop_assert!(k >= lo - half - lo * 1e-15 && k <= hi + half + hi * 1e-15,
                    "k {} outside [{}, {}]", k, lo, hi);
                prop_assert!(c.reference() > 0);
            }
            // Refused only for the documented reasons: a mean beyond 1e6,
            // a lattice too coarse, a decision interval beyond u32.
            Err(e) => prop_assert!(
                matches!(e, Error::OutOfRange(Param::Scale | Param::Threshold))
                    || (e == Error::OutOfRange(Param::Mean) && m1 > 1e6),
                "{:?}", e
            ),
        }
    }

    /// Every SPRT design that builds can decide: positive gain and loss,
    /// boundaries on either side of 0, each within 1 % of its exact value.
    #[test]
    fn sprt_designs_that_build_can_decide(
        m0 in 1e-3f64..1e3,
        ratio in 1.0f64..20.0,
        alpha in 1e-6f64..0.5,
        beta in 1e-6f64..0.5,
        scale_bits in 0u32..21,
    ) {
        let m1 = m0 * ratio;
        prop_assume!(m1 > m0);
        let scale = 1u32 << scale_bits;
        if let Ok(c) = SprtConfig::for_means(m0, m1, alpha, beta, scale, 0) {
            let (per_count, per_tick, upper, lower, _, s) = c.scaled();
            prop_assert!(per_count > 0 && per_tick > 0 && upper > 0 && lower < 0);
            let exact = (m1 / m0).ln() * f64::from(s);
            prop_assert!((per_count as f64 - exact).abs() <= 0.01 * exact + 1e-9);
        }
    }
}

// ---- 4. SPRT designs that round to nothing.

#[test]
fn sprt_refuses_designs_that_cannot_decide() {
    // Gain ln 1.4 and loss 0.4 both round to 0 at scale 1 (before the fix: a
    // test that never decided).
    assert_eq!(
        SprtConfig::for_means(1.0_f64, 1.4, 0.05, 0.05, 1, 0),
        Err(Error::OutOfRange(Param::Scale))
    );
    // Boundaries ±2e-7 nats round to 0 at 2^16 per nat (upper = lower = 0 before).
    assert_eq!(
        SprtConfig::for_means(1.0_f64, 2.0, 0.5, 0.499_999_9, 1 << 16, 0),
        Err(Error::OutOfRange(Param::Scale))
    );
}

// ---- 5. A window detector that cannot arm says so.

#[test]
fn window_detector_that_cannot_arm_says_so() {
    let plan = common::plan_one_in(10_000, 1_000_000, 100, 1_000_000);
    let mut d = WindowDetector::<60>::new(
        FixedMean::from_counts(2).unwrap(),
        FixedMean::from_counts(1).unwrap(),
        2,
    )
    .unwrap();
    for t in 0..30 {
        d.tick(Ticks(t), 300_000_000);
    }
    // 3e8 per tick × 60 bins: beyond any plannable mean.
    assert!(
        d.needs_refresh(),
        "needs_refresh must stay true without thresholds"
    );
    assert_eq!(d.refresh(&plan), Err(Error::OutOfRange(Param::Mean)));
    assert!(!d.is_armed());
}

// ---- 6. The correction table's error bound, against an independent sweep.

/// The largest relative error of `correct` (beyond its half-count rounding)
/// over a dense sweep of counts, against the f64 model inverse.
fn measured_table_error<const N: usize>(
    model: &DeadTime<f64>,
    window_s: f64,
    coverage: f64,
) -> (f64, u32) {
    let t = CorrectionTable::<N>::new(model, window_s, coverage).unwrap();
    let top = coverage * model.measured_limit_cps() * window_s;
    let mut worst = 0.0f64;
    let steps = 100_000u32;
    for i in 1..=steps {
        let counts = (top * f64::from(i) / f64::from(steps)) as u32;
        if counts == 0 {
            continue;
        }
        if let Some(n) = t.correct(counts) {
            let exact = model
                .correct(f64::from(counts) / window_s)
                .unwrap()
                .true_cps
                * window_s;
            let rel = ((f64::from(n) - exact).abs() - 0.5).max(0.0) / exact;
            worst = worst.max(rel);
        }
    }
    (worst * 1e6, t.error_bound_ppm())
}

#[test]
fn correction_table_bound_holds_and_is_tight() {
    // The review's case: the bound said 4465 ppm, correct(802085142) was 8523 ppm off.
    let np = DeadTime::non_paralyzable(1e-8_f64).unwrap();
    let t = CorrectionTable::<64>::new(&np, 10.0, 0.9).unwrap();
    let n = t.correct(802_085_142).unwrap();
    let exact = np.correct(80_208_514.2).unwrap().true_cps * 10.0;
    let err_ppm = ((f64::from(n) - exact) / exact).abs() * 1e6;
    assert!(
        err_ppm <= f64::from(t.error_bound_ppm()),
        "{err_ppm} > {}",
        t.error_bound_ppm()
    );
    // Over several settings: the bound holds, and it is not loose (a bound
    // twice the real error is a wrong number too). The sweep reaches the
    // worst point to within the grid spacing, hence the slack of 10 % + 2 ppm.
    let cases: [(DeadTime<f64>, f64, f64); 4] = [
        (np, 10.0, 0.9),
        (DeadTime::paralyzable(1e-6).unwrap(), 1.0, 0.5),
        (DeadTime::non_paralyzable(2e-7).unwrap(), 0.1, 0.99),
        (DeadTime::hybrid(1e-6, 0.3).unwrap(), 1.0, 0.8),
    ];
    for (model, w, c) in cases {
        let (measured, bound) = measured_table_error::<64>(&model, w, c);
        assert!(
            measured <= f64::from(bound),
            "{model:?}: measured {measured} ppm > bound {bound}"
        );
        assert!(
            f64::from(bound) <= 1.1 * measured + 2.0,
            "{model:?}: bound {bound} ppm loose against measured {measured}"
        );
    }
}

// ---- 7. No NaN from the two-source uncertainty.

#[test]
fn two_source_with_a_vanishing_background_has_a_finite_uncertainty() {
    // Rates of the published-style example with τ = 200 µs and a subnormal
    // background (NaN uncertainty before the fix).
    let r = two_source(1431.12_f64, 1876.95, 2501.25, 1e-320, Some(60.0)).unwrap();
    let sd = r.std_uncertainty_s.unwrap();
    assert!(sd.is_finite() && sd > 0.0, "{sd}");
    // The same data with a zero background give the same answer.
    let zero = two_source(1431.12_f64, 1876.95, 2501.25, 0.0, Some(60.0)).unwrap();
    assert!((sd / zero.std_uncertainty_s.unwrap() - 1.0).abs() < 1e-6);
}

// ---- 8. NoConvergence inside the documented domain.

#[test]
fn hybrid_models_with_tiny_paralyzable_fractions_converge() {
    for f in [1e-120_f64, 1e-200, 1e-300] {
        let h = DeadTime::hybrid(1e-3, f).unwrap();
        // f → 0 is the non-paralyzable model: 500 cps → 1000 cps.
        let c = h.correct(500.0).unwrap();
        assert!((c.true_cps / 1000.0 - 1.0).abs() < 1e-12, "f {f}: {c:?}");
        assert!(CorrectionTable::<32>::new(&h, 1.0, 0.5).is_ok(), "f {f}");
    }
}

#[test]
fn inverse_gamma_reaches_tiny_roots_and_answers_zero_below_the_float_range() {
    // P(a, x) ≈ x^a/Γ(1 + a) near 0: x = (p Γ(1 + a))^(1/a).
    // a = 1e-3, p = 1/2: 5.244206408278…e-302 (computed: mpmath,
    // `(0.5*gamma(1.001))**1000` at 50 digits).
    let x = gamma_p_inv(1e-3_f64, 0.5).unwrap();
    assert!((x / 5.244_206_408_278e-302 - 1.0).abs() < 1e-9, "{x:e}");
    // Below the smallest subnormal: 0, not an error.
    assert_eq!(gamma_p_inv(1e-3_f64, 0.1).unwrap(), 0.0);
    assert_eq!(gamma_q_inv(1e-3_f64, 0.9999).unwrap(), 0.0);
    // At the top of the range.
    assert!((gamma_p(f64::MAX, f64::MAX).unwrap() - 0.5).abs() < 1e-12);
}

// ---- 9. Small shapes: Q keeps its relative accuracy.

#[test]
fn gamma_q_small_shape_keeps_relative_accuracy() {
    // Q(2.0654e-12, 1.0327e-12) = 5.581047195535612631e-11 (computed: mpmath
    // gammainc at 40 digits with the f64 inputs; the review measured 5.8e-5
    // relative error before the fix, f32 gave 0 near 5e-11).
    let want = 5.581_047_195_535_612_6e-11;
    let q = gamma_q(2.0654e-12_f64, 1.0327e-12).unwrap();
    assert!((q / want - 1.0).abs() < 1e-12, "{q:e}");
    let q32 = gamma_q(2.0654e-12_f32, 1.0327e-12).unwrap();
    assert!((f64::from(q32) / want - 1.0).abs() < 1e-5, "{q32:e}");
}

// ---- 10. The smaller ones.

#[test]
fn smaller_defects() {
    // pmf far out in f32: 0, not NaN.
    let p = pmf(1_206_844_900_f32, 4_294_967_294).unwrap();
    assert_eq!(p.p, 0.0);
    // The peak of a paralyzable counter is 1/τ for any τ (26 % low below 1.5e-154).
    let (n, _) = DeadTime::paralyzable(1e-160_f64).unwrap().peak().unwrap();
    assert!((n / 1e160 - 1.0).abs() < 1e-14, "{n:e}");
    // One-sided upper limits at any level in (0, 1): tiny levels were refused.
    // For 3 counts at level 1e-17, P(4, u) = 1e-17: u ≈ (24e-17)^(1/4) (leading term).
    let u = exact_upper_limit(3, 1e-17_f64).unwrap();
    assert!((u / (24e-17_f64).powf(0.25) - 1.0).abs() < 1e-3, "{u:e}");
    // Readings refuse ticks that make a rate overflow or underflow.
    let r = SmoothedRate::settled_at(0, 1).unwrap();
    assert_eq!(
        r.reading(f64::MIN_POSITIVE),
        Err(Error::OutOfRange(Param::Seconds))
    );
    assert_eq!(r.reading(f64::MAX), Err(Error::OutOfRange(Param::Seconds)));
    // The integer tier refuses a mean it cannot represent (it was 0).
    assert_eq!(
        FixedMean::from_ratio(1, 1_000_000_000_000),
        Err(Error::OutOfRange(Param::Mean))
    );
}

#[test]
fn hybrid_fold_back_branch_next_to_the_peak() {
    // Within 1e-15 of the peak both branches stay within the conditioning of
    // the problem (√(2·1e-15) relative around the peak), and each maps back.
    let h = DeadTime::hybrid(1e-4_f64, 0.5).unwrap();
    let (n_peak, m_peak) = h.peak().unwrap();
    for rel in [1e-15, 1e-12, 1e-9, 1e-6] {
        let c = h.correct(m_peak * (1.0 - rel)).unwrap();
        let high = c.true_cps_high.unwrap();
        let spread = 4.0 * (2.0 * rel).sqrt() + 1e-7;
        assert!(
            c.true_cps <= n_peak && (1.0 - c.true_cps / n_peak) < spread,
            "{rel}: {c:?}"
        );
        assert!(
            high >= n_peak && (high / n_peak - 1.0) < spread,
            "{rel}: {high}"
        );
    }
}

// ---- The panic.

#[test]
fn smoothed_rate_never_overflows() {
    // settled_at(4, u64::MAX) then update(0) overflowed (panic with overflow checks).
    let mut r = SmoothedRate::settled_at(4, u64::MAX).unwrap();
    r.update(0);
    assert_eq!(r.mean_per_tick_q32(), u64::MAX - (u64::MAX >> 4) - 1);
}

proptest! {
    /// Any start, any counts: the mean moves toward the input and never past it.
    #[test]
    fn smoothed_rate_moves_toward_each_input(start in any::<u64>(), shift in 0u8..=24, counts in proptest::collection::vec(any::<u32>(), 1..50)) {
        let mut r = SmoothedRate::settled_at(shift, start).unwrap();
        for c in counts {
            let before = r.mean_per_tick_q32();
            r.update(c);
            let x = u64::from(c) << 32;
            let after = r.mean_per_tick_q32();
            prop_assert!(after >= before.min(x) && after <= before.max(x));
        }
    }
}
