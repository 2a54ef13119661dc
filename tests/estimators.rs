//! Rate estimators: window sums against a naive model, the smoothed rate
//! against an f64 recursion and the published ratemeter formulas, the
//! adaptive average's bookkeeping and step response, and the statistics of
//! time-to-count (unbiased, documented spread, interval coverage).

mod common;

use countward::Ticks;
use countward::fixed::FixedAlpha;
use countward::rate::{
    AdaptiveConfig, AdaptiveRate, BinWindow, SmoothedRate, StepSeen, TimeToCount,
};
use proptest::prelude::*;
use std::collections::BTreeMap;

const N: usize = 16;

/// Naive model of a sliding window: every tick's counts in a map; late
/// counts go to the newest tick; the sum covers (newest − N, newest].
fn naive_sum(calls: &[(i64, u32)]) -> u64 {
    let mut bins: BTreeMap<i64, u64> = BTreeMap::new();
    let mut newest = i64::MIN;
    for &(t, c) in calls {
        newest = newest.max(t);
        *bins.entry(newest).or_default() += u64::from(c);
    }
    bins.range(newest - N as i64 + 1..=newest)
        .map(|(_, v)| v)
        .sum()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    // Window sums equal the naive sum, across wrap-around, gaps and late calls.
    #[test]
    fn window_sum_matches_naive(start in any::<u32>(), steps in prop::collection::vec((-3i64..40, 0u32..1000), 1..120)) {
        let mut w = BinWindow::<N>::new();
        let mut calls = Vec::new();
        let mut t: i64 = 0;
        for (dt, c) in steps {
            t += dt.max(0) - if dt < 0 { 1 } else { 0 };
            let now = Ticks(start.wrapping_add(t as u32));
            w.add(now, c);
            calls.push((t, c));
            prop_assert_eq!(w.sum(), naive_sum(&calls));
            let by_bins: u64 = (0..N).map(|a| u64::from(w.bin_ago(a))).sum();
            prop_assert_eq!(by_bins, w.sum());
        }
    }

    // The adaptive average always holds the counts of its last `len` bins.
    #[test]
    fn adaptive_segment_is_the_sum_of_its_bins(steps in prop::collection::vec((0u32..4, 0u32..60), 1..300)) {
        let config = AdaptiveConfig::new(200, 8, 2).unwrap();
        let mut r = AdaptiveRate::<64>::new(config);
        let alpha = FixedAlpha::one_in(1000).unwrap();
        let mut history: Vec<u32> = Vec::new(); // counts per tick, oldest first
        let mut t = 0u32;
        for (dt, c) in steps {
            history.extend(std::iter::repeat_n(0, dt.max(1) as usize - 1));
            if dt == 0 && !history.is_empty() { *history.last_mut().unwrap() += c; } else { history.push(c); }
            t += dt;
            let seen = r.add(Ticks(t), c);
            if r.needs_refresh() { r.refresh(alpha).unwrap(); }
            let len = r.averaging_ticks() as usize;
            prop_assert!((1..=64).contains(&len) && len <= history.len());
            let naive: u64 = history[history.len() - len..].iter().map(|&v| u64::from(v)).sum();
            prop_assert_eq!(r.averaging_counts(), naive);
            if seen != StepSeen::None { prop_assert_eq!(len, 2.min(history.len())); }
        }
    }

    // The integer EWMA follows the exact f64 recursion with the same weights.
    #[test]
    fn smoothed_rate_follows_f64_recursion(shift in 0u8..12, counts in prop::collection::vec(0u32..100_000, 1..400)) {
        let mut r = SmoothedRate::new(shift).unwrap();
        let mut y = 0.0_f64;
        for (i, &c) in counts.iter().enumerate() {
            r.update(c);
            let n = (i + 1) as u32;
            let s = shift.min(n.ilog2() as u8);
            y += (f64::from(c) - y) / f64::from(1u32 << s);
            let got = r.mean_per_tick_q32() as f64 / 4_294_967_296.0;
            prop_assert!((got - y).abs() <= 1e-6 * (1.0 + y), "tick {i}: {got} vs {y}");
        }
    }
}

#[test]
fn smoothed_rate_spread_matches_the_ratemeter_formulas() {
    // Schiff & Evans 1936: an RC ratemeter fluctuates like a count over 2RC,
    // i.e. relative SD 1/sqrt(2 n RC). As a -> 0 the digital form reaches it:
    // check the documented exact form against that limit at shift 12.
    let mut r = SmoothedRate::settled_at(12, 100u64 << 32).unwrap();
    r.update(100);
    let reading = r.reading(1.0_f64).unwrap().unwrap();
    let tau = r.time_constant_ticks::<f64>();
    let analog = 1.0 / (2.0 * 100.0 * tau).sqrt();
    assert!((reading.relative_uncertainty().unwrap() / analog - 1.0).abs() < 1e-4);
    // Schiff & Evans (1936), equivalent counting interval 2RC: a ratemeter
    // at n = 100 cps with RC = 1 s reads with 1/√(2nRC) = 7.071 % relative
    // SD. The digital one with a time constant of 1024 ticks of 1/1024 s:
    // √(a/((2 − a)μ)) with a = 2^-10, μ = 100/1024 per tick = 7.073 %.
    let mut rc = SmoothedRate::settled_at(10, (100u64 << 32) / 1024).unwrap();
    rc.update(0);
    let rel = rc
        .reading(1.0_f64 / 1024.0)
        .unwrap()
        .unwrap()
        .relative_uncertainty()
        .unwrap();
    assert!((rel / 0.070711 - 1.0).abs() < 1e-3, "{rel}");

    // Monte Carlo: the empirical spread of the integer EWMA at steady state
    // matches sqrt(a/((2-a) mu)).
    let seed = common::seed(0x5eed_0001);
    let mut rng = common::rng(seed);
    let mu = 20.0;
    let mut r = SmoothedRate::settled_at(5, 20u64 << 32).unwrap();
    let (mut s1, mut s2, mut n) = (0.0, 0.0, 0.0);
    for i in 0..200_000 {
        r.update(common::poisson(&mut rng, mu));
        if i > 1000 && i % 16 == 0 {
            let y = r.mean_per_tick_q32() as f64 / 4_294_967_296.0;
            s1 += y;
            s2 += y * y;
            n += 1.0;
        }
    }
    let mean = s1 / n;
    let sd = (s2 / n - mean * mean).sqrt();
    let a = 1.0 / 32.0;
    let expected = (a * mu / (2.0 - a)).sqrt();
    common::assert_close(
        "EWMA mean",
        seed,
        mean,
        mu,
        expected / (n / 4.0).sqrt(),
        5.0,
    );
    common::assert_close("EWMA spread", seed, sd / expected, 1.0, 0.03, 1.0);
}

#[test]
fn adaptive_rate_is_smooth_at_background_and_follows_a_step() {
    let seed = common::seed(0x5eed_0002);
    let mut rng = common::rng(seed);
    let config = AdaptiveConfig::new(400, 8, 2).unwrap();
    let mut r = AdaptiveRate::<1200>::new(config);
    let alpha = FixedAlpha::one_in(1_000_000).unwrap();
    let mut t = 0;
    // An hour at 2 cps: the average holds ~400 counts (5%).
    for _ in 0..3600 {
        r.add(Ticks(t), common::poisson(&mut rng, 2.0));
        if r.needs_refresh() {
            r.refresh(alpha).unwrap();
        }
        t += 1;
    }
    let before = r.reading(1.0_f64).unwrap().unwrap();
    assert!(
        before.relative_uncertainty().unwrap() < 0.06,
        "seed {seed}: {before:?}"
    );
    common::assert_close(
        "background rate",
        seed,
        before.rate_cps,
        2.0,
        2.0 * 0.05,
        4.0,
    );
    // A step to 40 cps is followed within a few seconds.
    let mut followed_after = None;
    for i in 0..30 {
        r.add(Ticks(t), common::poisson(&mut rng, 40.0));
        if r.needs_refresh() {
            r.refresh(alpha).unwrap();
        }
        t += 1;
        let now = r.reading(1.0_f64).unwrap().unwrap().rate_cps;
        if followed_after.is_none() && (now - 40.0).abs() < 12.0 {
            followed_after = Some(i + 1);
        }
    }
    let after = followed_after.unwrap_or(99);
    assert!(
        after <= 4,
        "seed {seed}: the reading took {after} s to follow a 20-fold step"
    );
}

#[test]
fn time_to_count_is_unbiased_with_the_documented_spread_and_coverage() {
    // Computed (inverse-gamma moments): N = 100 gaps give a
    // relative SD of 1/sqrt(98) = 0.10102; N = 10 give 0.35355.
    let mut t = TimeToCount::<101>::new();
    for i in 0..101 {
        t.record(Ticks(i * 1000));
    }
    let r = t.reading(1e-3_f64).unwrap().unwrap();
    assert!((r.relative_uncertainty().unwrap() - 0.10102).abs() < 1e-5);

    let seed = common::seed(0x5eed_0003);
    let mut rng = common::rng(seed);
    let rate = 0.2; // events per second, 1 ms ticks
    let runs = if common::long_runs() { 100_000 } else { 4_000 };
    let (mut s1, mut s2, mut covered) = (0.0, 0.0, 0);
    for _ in 0..runs {
        let mut ttc = TimeToCount::<11>::new();
        let mut time_s = 0.0;
        for _ in 0..11 {
            time_s += common::exponential(&mut rng, rate);
            ttc.record(Ticks((time_s * 1000.0) as u32));
        }
        let reading = ttc.reading(1e-3_f64).unwrap().unwrap();
        s1 += reading.rate_cps;
        s2 += reading.rate_cps * reading.rate_cps;
        let (lo, hi) = ttc.interval_cps(1e-3_f64, 0.9).unwrap().unwrap();
        covered += usize::from(lo <= rate && rate <= hi);
    }
    let n = runs as f64;
    let mean = s1 / n;
    let sd = (s2 / n - mean * mean).sqrt();
    let expected_sd = rate / 8.0_f64.sqrt(); // 10 gaps: λ/√(n − 2)
    common::assert_close(
        "time-to-count mean",
        seed,
        mean,
        rate,
        expected_sd / n.sqrt(),
        4.5,
    );
    common::assert_close(
        "time-to-count SD",
        seed,
        sd,
        expected_sd,
        expected_sd * 0.15,
        1.0,
    );
    let p = covered as f64 / n;
    common::assert_close(
        "90% interval coverage",
        seed,
        p,
        0.9,
        (0.09 / n).sqrt(),
        4.5,
    );
}

#[test]
fn garwood_interval_of_a_window_reading() {
    // (computed: Garwood limits; a public calculator states
    // "approximately 4.80 to 18.39"): 10 counts, 95% two-sided.
    let mut w = BinWindow::<5>::new();
    for t in 0..5 {
        w.add(Ticks(t), 2);
    }
    let (lo, hi) = w
        .reading(2.0_f64)
        .unwrap()
        .unwrap()
        .interval_cps(0.95)
        .unwrap();
    assert!((lo * 10.0 - 4.795389).abs() < 1e-5 && (hi * 10.0 - 18.39036).abs() < 1e-4);
}

#[test]
fn readings_need_data_and_reject_bad_tick_periods() {
    let w = BinWindow::<4>::new();
    assert_eq!(w.reading(1.0_f64).unwrap(), None);
    assert!(w.reading(f64::NAN).is_err());
    assert!(w.reading(-1.0_f64).is_err());
    let mut t = TimeToCount::<8>::new();
    t.record(Ticks(1));
    t.record(Ticks(5));
    t.record(Ticks(9));
    assert_eq!(t.reading(1.0_f32).unwrap(), None); // two gaps are not enough
    assert!(SmoothedRate::new(25).is_err());
    assert!(AdaptiveConfig::new(100, 7, 2).is_err());
    assert!(AdaptiveConfig::new(0, 8, 2).is_err());
}

#[test]
fn counters_saturate_instead_of_wrapping() {
    let mut w = BinWindow::<3>::new();
    w.add(Ticks(0), u32::MAX);
    w.add(Ticks(0), 10);
    assert_eq!(w.bin_ago(0), u32::MAX);
    w.add(Ticks(1), u32::MAX);
    assert_eq!(w.sum(), 2 * u64::from(u32::MAX));
    assert_eq!(w.sum_u32(), u32::MAX);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    // No input makes an estimator or detector call panic.
    #[test]
    fn chain_calls_never_panic(steps in prop::collection::vec((any::<u32>(), any::<u32>()), 1..80), tick_s in proptest::num::f64::ANY) {
        use countward::detect::{LevelThresholds, WindowDetector, SilenceFleet, SilencePlan};
        use countward::fixed::FixedMean;
        let mut w = BinWindow::<8>::new();
        let mut s = SmoothedRate::new(3).unwrap();
        let mut a = AdaptiveRate::<32>::new(AdaptiveConfig::new(50, 8, 2).unwrap());
        let mut t = TimeToCount::<8>::new();
        let mut d = WindowDetector::<8>::new(FixedMean::from_counts(3).unwrap(), FixedMean::from_counts(1).unwrap(), 6).unwrap();
        d.set_thresholds(LevelThresholds::new(40, 30, 60, 40, Some((5, 10))).unwrap(), FixedMean::from_counts(24).unwrap());
        let mut fleet = SilenceFleet::<4, 8>::new(SilencePlan::<8>::new(1e-3_f64, 2, 100).unwrap());
        let alpha = FixedAlpha::one_in(1000).unwrap();
        for (now, c) in steps {
            w.add(Ticks(now), c);
            s.update(c);
            a.add(Ticks(now), c);
            if a.needs_refresh() { let _ = a.refresh(alpha); }
            t.record(Ticks(now));
            d.tick(Ticks(now), c);
            let _ = fleet.event(c as usize % 6, Ticks(now));
            let _ = fleet.next_silent(Ticks(now));
        }
        // Every reading that comes back is a number with a sane uncertainty;
        // ticks outside 1 ns..1e9 s are refused, never turned into ∞ or 0.
        let valid_tick = (1e-9..=1e9).contains(&tick_s);
        for r in [w.reading(tick_s), s.reading(tick_s), a.reading(tick_s), t.reading(tick_s)] {
            match r {
                Ok(Some(r)) => {
                    prop_assert!(valid_tick);
                    prop_assert!(r.rate_cps.is_finite() && r.rate_cps >= 0.0, "{:?}", r);
                    prop_assert!(r.std_uncertainty_cps.is_finite() && r.std_uncertainty_cps >= 0.0, "{:?}", r);
                    prop_assert!(r.seconds.is_finite() && r.seconds > 0.0, "{:?}", r);
                }
                Ok(None) => prop_assert!(valid_tick),
                Err(e) => prop_assert!(!valid_tick, "{:?}", e),
            }
        }
        if let Ok(Some((lo, hi))) = t.interval_cps(tick_s, 0.9) {
            prop_assert!(lo.is_finite() && hi.is_finite() && lo <= hi && lo >= 0.0);
        }
        // The window holds what it was given, and the learned background
        // never sits below its floor.
        // (An error only where the learned mean per window leaves the plannable range.)
        match d.background_per_window() {
            Ok(b) => prop_assert!(b >= FixedMean::from_counts(8).unwrap()),
            Err(e) => prop_assert_eq!(e, countward::Error::OutOfRange(countward::Param::Mean)),
        }
    }
}
