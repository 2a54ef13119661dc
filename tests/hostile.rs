//! Hostile inputs across the public API, with overflow checks on (the test
//! profile): NaN, ±∞, subnormals, the extremes of every type. No call may
//! panic, and no call that returns `Ok` may carry a NaN or an infinity (or a
//! probability outside [0, 1]): a result is either meaningful or an error.
//!
//! Run more cases with `PROPTEST_CASES=100000 cargo test --test hostile`.

use countward::deadtime::{
    CorrectionTable, DeadTime, DecayPoint, ModelKind, fit_decay, two_source,
};
use countward::detect::{CusumConfig, SaturationGuard, SilencePlan, SprtConfig};
use countward::gap::{silence_probability, silence_threshold_s};
use countward::math::{
    gamma_p, gamma_p_inv, gamma_q, gamma_q_inv, lambert_w0, lambert_wm1, ln_gamma,
};
use countward::plan::sliding_upcrossings_per_tick;
use countward::poisson::{
    alarm_threshold, at_least, at_most, exact_limits, exact_upper_limit, fault_threshold, pmf,
};
use countward::rate::{BinWindow, SmoothedRate, TimeToCount};
use countward::{Real, Ticks};
use proptest::prelude::*;

mod common;
use common::hostile_f64 as hostile;

fn hostile_u32() -> impl Strategy<Value = u32> {
    prop_oneof![
        Just(0u32),
        Just(1),
        Just(u32::MAX),
        Just(u32::MAX - 1),
        any::<u32>(),
        0u32..1000
    ]
}

fn finite<F: Real>(v: F) -> bool {
    v.is_finite()
}

fn prob<F: Real>(p: F) -> bool {
    p >= F::ZERO && p <= F::ONE
}

/// 2000 cases per property by default; `PROPTEST_CASES` overrides it.
fn config() -> ProptestConfig {
    let mut c = ProptestConfig::default();
    if std::env::var("PROPTEST_CASES").is_err() {
        c.cases = 2000;
    }
    c
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn poisson_tails(m in hostile(), k in hostile_u32()) {
        for t in [at_least(m, k), at_most(m, k), pmf(m, k)].into_iter().flatten() {
            prop_assert!(prob(t.p) && !t.ln_p.is_nan() && t.ln_p <= 0.0, "m {m} k {k}: {t:?}");
        }
        let m32 = m as f32;
        for t in [at_least(m32, k), at_most(m32, k), pmf(m32, k)].into_iter().flatten() {
            prop_assert!(prob(t.p) && !t.ln_p.is_nan() && t.ln_p <= 0.0, "m {m32} k {k}: {t:?}");
        }
    }

    #[test]
    fn thresholds_and_limits(m in hostile(), a in hostile(), n in hostile_u32()) {
        if let Ok(t) = alarm_threshold(m, a) {
            // The achieved tail is at most α, to the documented 1e-12 relative accuracy.
            prop_assert!(t.tail.p <= a * (1.0 + 1e-12) && t.counts >= 1, "m {m} a {a}: {t:?}");
        }
        if let Ok(Some(t)) = fault_threshold(m, a) {
            prop_assert!(t.tail.p <= a * (1.0 + 1e-12), "m {m} a {a}: {t:?}");
        }
        if let Ok(t) = alarm_threshold(m as f32, a as f32) {
            prop_assert!(t.tail.p <= a as f32 * (1.0 + 1e-5));
        }
        if let Ok(l) = exact_limits(n, a) {
            prop_assert!(finite(l.lower) && finite(l.upper) && l.lower <= l.upper && l.lower >= 0.0, "{l:?}");
        }
        if let Ok(u) = exact_upper_limit(n, a) {
            prop_assert!(finite(u) && u >= 0.0);
        }
    }

    #[test]
    fn special_functions(a in hostile(), x in hostile()) {
        for v in [gamma_p(a, x), gamma_q(a, x)].into_iter().flatten() {
            prop_assert!(prob(v), "a {a} x {x}: {v}");
        }
        for v in [gamma_p(a as f32, x as f32), gamma_q(a as f32, x as f32)].into_iter().flatten() {
            prop_assert!(prob(v));
        }
        for v in [gamma_p_inv(a, x), gamma_q_inv(a, x)].into_iter().flatten() {
            prop_assert!(finite(v) && v >= 0.0, "a {a} p {x}: {v}");
        }
        for v in [lambert_w0(x), lambert_wm1(x), ln_gamma(x)].into_iter().flatten() {
            prop_assert!(finite(v));
        }
    }

    #[test]
    fn gaps_and_planning(rate in hostile(), a in hostile(), t in hostile(), k in 0u32..50, bins in 0u32..100) {
        if let Ok(s) = silence_threshold_s(rate, a, k) {
            prop_assert!(finite(s) && s >= 0.0);
        }
        if let Ok(p) = silence_probability(rate, t, k) {
            prop_assert!(prob(p.p));
        }
        if let Ok(r) = sliding_upcrossings_per_tick(rate.min(1e3), bins, k) {
            prop_assert!(finite(r) && (0.0..=1.0).contains(&r));
        }
    }

    #[test]
    fn dead_time_models(tau in hostile(), f in hostile(), m in hostile(), t in hostile(), sd in hostile()) {
        for kind in [ModelKind::NonParalyzable, ModelKind::Paralyzable, ModelKind::Hybrid] {
            let Ok(model) = DeadTime::of_kind(kind, tau, f) else { continue };
            if let Ok(c) = model.correct(m) {
                prop_assert!(finite(c.true_cps) && c.true_cps >= 0.0 && !c.gain.is_nan(), "{model:?} m {m}: {c:?}");
                if let Some(h) = c.true_cps_high {
                    prop_assert!(finite(h) && h >= c.true_cps);
                }
            }
            if let Ok(v) = model.measured_cps(m) {
                prop_assert!(finite(v) && v >= 0.0);
            }
            if let Some((n, v)) = model.peak() {
                prop_assert!(finite(n) && finite(v));
            }
            if let Ok(u) = model.correct_with_uncertainty(m, t, sd) {
                prop_assert!(finite(u.true_cps) && !u.std_uncertainty_cps.is_nan(), "{model:?} m {m}: {u:?}");
            }
        }
    }

    #[test]
    fn bench_methods(a in hostile(), b in hostile(), ab in hostile(), bg in hostile(), t in hostile()) {
        if let Ok(r) = two_source(a, b, ab, bg, Some(t)) {
            prop_assert!(finite(r.dead_time_s) && r.std_uncertainty_s.is_none_or(finite), "{r:?}");
        }
        let points: Vec<DecayPoint<f64>> = (0..6)
            .map(|i| DecayPoint { time_s: f64::from(i) * 600.0, measured_cps: a / (1.0 + f64::from(i)), counting_s: Some(60.0) })
            .collect();
        if let Ok(fit) = fit_decay(&points, t, ModelKind::NonParalyzable, 0.0) {
            prop_assert!(finite(fit.dead_time_s) && !fit.dead_time_sd_s.is_nan() && !fit.chi2.is_nan());
        }
    }

    #[test]
    fn firmware_designs(m0 in hostile(), m1 in hostile(), a in hostile(), b in hostile(), scale in hostile_u32(), counts in proptest::collection::vec(hostile_u32(), 1..40)) {
        if let Ok(c) = CusumConfig::for_means(m0, m1, a, scale, true) {
            prop_assert!(c.reference() > 0 && c.decision() > 0);
        }
        if let Ok(s) = SprtConfig::for_means(m0, m1, a, b, scale, 0) {
            let (pc, pt, up, lo, _, _) = s.scaled();
            prop_assert!(pc > 0 && pt > 0 && up > 0 && lo < 0);
        }
        if let Ok(plan) = SilencePlan::<8>::new(a, 2, 100) {
            for g in 1..8u16 {
                let _ = plan.budget_ticks(u32::MAX, g);
            }
        }
        if let Ok(g) = SaturationGuard::for_dead_time(m0, m1, a) {
            prop_assert!(g.enter_counts() > 0);
        }
        if let Ok(model) = DeadTime::non_paralyzable(m0)
            && let Ok(table) = CorrectionTable::<16>::new(&model, m1, a)
        {
            for &c in &counts {
                let _ = table.correct(c);
            }
        }
        // Accumulators fed extreme counts and tick jumps: saturate, never panic.
        let mut w = BinWindow::<8>::new();
        let mut r = SmoothedRate::new(3).unwrap();
        let mut ttc = TimeToCount::<4>::new();
        let mut now = 0u32;
        for &c in &counts {
            now = now.wrapping_add(c % 7);
            w.add(Ticks(now), c);
            r.update(c);
            ttc.record(Ticks(now));
        }
        for tick in [1e-9, 1.0, 1e9, m0] {
            for reading in [w.reading(tick), r.reading(tick), ttc.reading(tick)].into_iter().flatten().flatten() {
                prop_assert!(finite(reading.rate_cps) && finite(reading.std_uncertainty_cps) && finite(reading.seconds), "{reading:?}");
            }
        }
    }
}
