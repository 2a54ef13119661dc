//! Deterministic tests that pin down what the docs promise at each boundary,
//! written so that the small, plausible slips of a later edit fail here (an
//! outside audit changed `>=` to `>`, dropped the hysteresis, the head start,
//! the background floor or a reset, swapped α and β, and widened the shared
//! part of the sliding plan; each change passed the earlier suite). Every
//! expected value comes from the documented rule or from independent code in
//! this file (statrs, direct sums), never from the function under test.

use countward::Ticks;
use countward::deadtime::two_source;
use countward::detect::{
    CusumConfig, CusumDirection, Level, LevelThresholds, PoissonCusum, Sprt, SprtConfig,
    SprtDecision, ThresholdPlan, WindowDetector,
};
use countward::fixed::{FixedAlpha, FixedMean};
use countward::plan::sliding_upcrossings_per_tick;
use countward::poisson::{alarm_threshold, fault_threshold};
use statrs::distribution::{Discrete, DiscreteCDF, Poisson};

mod common;

// ---- Level thresholds: every comparison at its boundary.

#[test]
fn classification_boundaries_are_inclusive_as_documented() {
    // warn set 10, warn clear 8, alarm set 20, alarm clear 15, low (2, 4).
    let t = LevelThresholds::new(10, 8, 20, 15, Some((2, 4))).unwrap();
    let raise = |n| t.classify(n).raise;
    let hold = |n| t.classify(n).hold;
    // "raises Alarm at n ≥ alarm_set", "Warning at n ≥ warn_set".
    assert_eq!(raise(20), Level::Alarm);
    assert_eq!(raise(19), Level::Warning);
    assert_eq!(raise(10), Level::Warning);
    assert_eq!(raise(9), Level::Normal);
    // "holds it while n ≥ clear".
    assert_eq!(hold(15), Level::Alarm);
    assert_eq!(hold(14), Level::Warning);
    assert_eq!(hold(8), Level::Warning);
    assert_eq!(hold(7), Level::Normal);
    // "Low counts raise at n ≤ low_set and hold while n ≤ low_clear".
    assert!(t.classify(2).low_raise && t.classify(2).low_hold);
    assert!(!t.classify(3).low_raise && t.classify(3).low_hold);
    assert!(t.classify(4).low_hold && !t.classify(5).low_hold);
    assert!(t.classify(0).low_raise);
}

#[test]
fn the_plan_has_the_documented_hysteresis() {
    // Each threshold from the f64 tier at the documented α (an independent
    // tier: the plan itself uses the integer one).
    let plan = common::plan_one_in(100_000, 10_000_000, 100, 100_000);
    for mean in [5u32, 20, 100, 1000] {
        let t = plan
            .thresholds(FixedMean::from_counts(mean).unwrap())
            .unwrap();
        let m = f64::from(mean);
        let warn_set = alarm_threshold(m, 1e-5).unwrap().counts;
        let warn_clear = alarm_threshold(m, 1e-2).unwrap().counts;
        assert_eq!(t.warn_set(), warn_set, "mean {mean}");
        assert_eq!(
            t.alarm_set(),
            alarm_threshold(m, 1e-7).unwrap().counts,
            "mean {mean}"
        );
        assert_eq!(t.warn_clear(), warn_clear, "mean {mean}");
        // "an alarm clears down to a warning below the warning set threshold".
        assert_eq!(t.alarm_clear(), warn_set, "mean {mean}");
        assert!(
            t.warn_clear() < t.warn_set(),
            "mean {mean}: no hysteresis band"
        );
        let low = match (
            fault_threshold(m, 1e-5).unwrap(),
            fault_threshold(m, 1e-2).unwrap(),
        ) {
            (Some(s), Some(c)) => Some((s.counts, c.counts.min(warn_clear - 1))),
            _ => None,
        };
        assert_eq!(t.low(), low, "mean {mean}");
    }
}

// ---- CUSUM: restart at the head start.

#[test]
fn cusum_restarts_at_its_head_start() {
    // k = 2, h = 6, head start 3 (fast initial response, Lucas & Crosier 1982).
    let mut c = PoissonCusum::new(CusumConfig::new(1, 2, 6, 3, CusumDirection::Increase).unwrap());
    assert_eq!(c.statistic(), 3);
    assert!(!c.update(4)); // 3 + 4 − 2 = 5
    assert_eq!(c.statistic(), 5);
    assert!(c.update(3)); // 6 ≥ h
    assert_eq!(
        c.statistic(),
        3,
        "after a signal the statistic restarts at the head start"
    );
    assert!(!c.update(0)); // max(0, 3 − 2) = 1
    assert_eq!(c.statistic(), 1);
    assert!(!c.update(0));
    assert_eq!(c.statistic(), 0);
    // A decrease scheme: S ← max(0, S + k − x).
    let mut d = PoissonCusum::new(CusumConfig::new(1, 5, 6, 2, CusumDirection::Decrease).unwrap());
    assert!(!d.update(4)); // 2 + 5 − 4 = 3
    assert!(d.update(1)); // 3 + 4 = 7 ≥ 6
    assert_eq!(d.statistic(), 2);
}

// ---- Window detector: the background floor.

#[test]
fn window_background_never_falls_below_its_floor() {
    // Calibrated at 5 per tick, floor 2 per tick, fast learning; never armed,
    // so every tick teaches the background, and the counts are all zero.
    let mut d = WindowDetector::<10>::new(
        FixedMean::from_counts(5).unwrap(),
        FixedMean::from_counts(2).unwrap(),
        2,
    )
    .unwrap();
    for t in 0..200 {
        d.tick(Ticks(t), 0);
    }
    // The learner itself has gone to (rounding distance of) zero...
    assert!(d.background().mean_per_tick_q32() < 1 << 16);
    // ...but the background in use stays at the floor: 2 per tick, 20 per window.
    assert_eq!(
        d.background_per_window().unwrap(),
        FixedMean::from_counts(20).unwrap()
    );
}

// ---- SPRT: the reset after a decision, and α, β in their places.

#[test]
fn sprt_restarts_from_zero_after_each_decision() {
    // λ0 = 1, λ1 = 2 per tick, α = β = 0.05: per count +ln 2, per tick −1.
    let c = SprtConfig::for_means(1.0_f64, 2.0, 0.05, 0.05, 1 << 16, 0).unwrap();
    let mut s = Sprt::new(c);
    // Zero counts lose 1 nat a tick: the lower boundary −ln 19 = −2.944 is
    // reached at the 3rd tick.
    assert_eq!(s.update(Ticks(0), 0), SprtDecision::Continue);
    assert_eq!(s.update(Ticks(1), 0), SprtDecision::Continue);
    assert_eq!(s.update(Ticks(2), 0), SprtDecision::Background);
    assert_eq!(s.llr_nats::<f64>(), 0.0);
    assert_eq!(s.ticks(), 0);
    // From zero again: 6 counts gain 6 ln 2 − 1 = 3.159 ≥ ln 19 at once.
    // (Without the reset the ratio would still be at −3 and continue.)
    assert_eq!(s.update(Ticks(3), 6), SprtDecision::RateIncrease);
    assert_eq!(s.llr_nats::<f64>(), 0.0);
}

#[test]
fn sprt_boundaries_put_alpha_and_beta_in_their_places() {
    // Wald (1945): upper ln((1 − β)/α), lower ln(β/(1 − α)); α = 0.01, β = 0.2.
    let c = SprtConfig::for_means(1.0_f64, 2.0, 0.01, 0.2, 1 << 16, 0).unwrap();
    assert!((c.upper_nats::<f64>() - (0.8_f64 / 0.01).ln()).abs() < 1e-4);
    assert!((c.lower_nats::<f64>() - (0.2_f64 / 0.99).ln()).abs() < 1e-4);
}

// ---- The sliding-window plan against a direct sum.

/// P(upcrossing of k) = Σ_a P(A = a) P(X_out < k − a) P(X_in ≥ k − a), with
/// A ~ Poisson((bins − 1)μ) the shared bins, written out with statrs.
fn upcrossings_by_statrs(mu: f64, bins: u32, k: u32) -> f64 {
    let one = Poisson::new(mu).unwrap();
    let shared = (bins > 1).then(|| Poisson::new(mu * f64::from(bins - 1)).unwrap());
    (0..k)
        .map(|a| {
            let pa = match &shared {
                Some(p) => p.pmf(u64::from(a)),
                None => f64::from(u8::from(a == 0)),
            };
            let need = u64::from(k - a);
            pa * one.cdf(need - 1) * one.sf(need - 1)
        })
        .sum()
}

#[test]
fn sliding_upcrossings_match_a_direct_sum() {
    for &(mu, bins) in &[
        (0.5, 1u32),
        (0.5, 10),
        (2.0, 10),
        (2.0, 60),
        (0.05, 120),
        (8.0, 3),
    ] {
        let mean = mu * f64::from(bins);
        for k in [
            (mean + 1.0) as u32,
            (mean + 3.0 * mean.sqrt() + 2.0) as u32,
            (mean + 6.0 * mean.sqrt() + 4.0) as u32,
        ] {
            let want = upcrossings_by_statrs(mu, bins, k);
            let got = sliding_upcrossings_per_tick(mu, bins, k).unwrap();
            assert!(
                (got / want - 1.0).abs() < 1e-9,
                "mu {mu} bins {bins} k {k}: {got:e} vs statrs sum {want:e}"
            );
        }
    }
}

// ---- Two-source uncertainty against an independent propagation.

/// The exact two-source solution (Knoll 2010, ch. 4), written out here.
fn tau_exact(m1: f64, m2: f64, m12: f64, mb: f64) -> f64 {
    let x = m1 * m2 - mb * m12;
    let y = m1 * m2 * (m12 + mb) - mb * m12 * (m1 + m2);
    let z = y * (m1 + m2 - m12 - mb) / (x * x);
    x * (1.0 - (1.0 - z).sqrt()) / y
}

#[test]
fn two_source_uncertainty_is_the_delta_method_value() {
    // Rates recorded behind τ = 200 µs, 60 s each. Variance of each rate
    // behind a non-paralyzable dead time: m (1 − mτ)²/t (Müller 1973);
    // propagated by central differences of the formula above.
    let (m1, m2, m12, mb, t) = (1431.12, 1876.95, 2501.25, 5.0, 60.0);
    let r = two_source(m1, m2, m12, mb, Some(t)).unwrap();
    let tau = tau_exact(m1, m2, m12, mb);
    assert!((r.dead_time_s / tau - 1.0).abs() < 1e-12);
    let rates = [m1, m2, m12, mb];
    let mut var = 0.0;
    for i in 0..4 {
        let h = rates[i] * 1e-6;
        let (mut up, mut down) = (rates, rates);
        up[i] += h;
        down[i] -= h;
        let d = (tau_exact(up[0], up[1], up[2], up[3])
            - tau_exact(down[0], down[1], down[2], down[3]))
            / (2.0 * h);
        let live = 1.0 - rates[i] * tau;
        var += d * d * rates[i] * live * live / t;
    }
    let sd = var.sqrt();
    let stated = r.std_uncertainty_s.unwrap();
    assert!(
        (stated / sd - 1.0).abs() < 1e-4,
        "stated {stated:e}, delta method {sd:e}"
    );
}

// ---- Lucas's CUSUM design: every branch against values computed here.

#[test]
fn cusum_design_from_means() {
    // k = (μ1 − μ0)/ln(μ1/μ0) (Lucas 1985), on a lattice of 1/scale.
    let lattice =
        |m0: f64, m1: f64, scale: f64| ((m1 - m0) / (m1 / m0).ln() * scale).round() as u32;
    // Far apart (relative step above 1): 4 → 8, k = 4/ln 2 = 5.770780.
    let c = CusumConfig::for_means(4.0_f64, 8.0, 8.0, 1000, false).unwrap();
    assert_eq!(c.reference(), lattice(4.0, 8.0, 1000.0));
    assert_eq!(c.reference(), 5771);
    assert_eq!((c.scale(), c.decision(), c.head_start()), (1000, 8000, 0));
    assert_eq!(c.direction(), CusumDirection::Increase);
    // The decrease design uses the same k.
    let d = CusumConfig::for_means(8.0_f64, 4.0, 8.0, 1000, true).unwrap();
    assert_eq!((d.reference(), d.head_start()), (5771, 4000));
    assert_eq!(d.direction(), CusumDirection::Decrease);
    // Close (relative step 1/2): 1 → 1.5, k = 0.5/ln 1.5 = 1.2331517.
    let e = CusumConfig::for_means(1.0_f64, 1.5, 5.0, 1000, false).unwrap();
    assert_eq!(e.reference(), lattice(1.0, 1.5, 1000.0));
    assert_eq!(e.reference(), 1233);
    // 2 → 6 on quarter counts: k = 4/ln 3 = 3.641 → 15, h = 4 → 16, fast start 8.
    let f = CusumConfig::for_means(2.0_f64, 6.0, 4.0, 4, true).unwrap();
    assert_eq!((f.reference(), f.decision(), f.head_start()), (15, 16, 8));
    // Means 0.1 count apart near 1e6: k = m0 + Δ/2 − Δ²/(12 m0) + … =
    // 999 999.95 (series of the logarithmic mean), 999 999 950 on a 1/1000
    // lattice. The difference of logarithms gives 999 999 953 here; the
    // ln_1p form is exact to the unit.
    let g = CusumConfig::for_means(999_999.9_f64, 1e6, 8.0, 1000, false).unwrap();
    assert_eq!(g.reference(), 999_999_950);
    // Limits of the lattice.
    assert_eq!(
        CusumConfig::for_means(2.0_f64, 6.0, 4.0, 0, false),
        Err(countward::Error::OutOfRange(countward::Param::Scale))
    );
    assert!(CusumConfig::for_means(2.0_f64, 6.0, 4.0, 1 << 16, false).is_ok());
    assert_eq!(
        CusumConfig::for_means(2.0_f64, 6.0, 4.0, (1 << 16) + 1, false),
        Err(countward::Error::OutOfRange(countward::Param::Scale))
    );
    // h·scale must fit below u32::MAX: 65 536 × 65 536 = 2^32 does not.
    assert_eq!(
        CusumConfig::for_means(2.0_f64, 6.0, 65_536.0, 1 << 16, false),
        Err(countward::Error::OutOfRange(countward::Param::Threshold))
    );
    // k·scale·4 must fit too: k ≈ 1e6 − ½ at scale 2^16 gives 2.6e11.
    assert_eq!(
        CusumConfig::for_means(999_999.0_f64, 1e6, 4.0, 1 << 16, false),
        Err(countward::Error::OutOfRange(countward::Param::Threshold))
    );
    // ... and so must it where only the 4k guard trips: k = 30 497.9 at
    // scale 2^16 is 2.0e9 (fits), 4k = 8.0e9 (does not).
    assert_eq!(
        CusumConfig::for_means(30_000.0_f64, 31_000.0, 1.0, 1 << 16, false),
        Err(countward::Error::OutOfRange(countward::Param::Threshold))
    );
    // A reference of exactly one lattice unit is a design; below it is not.
    assert_eq!(
        CusumConfig::for_means(0.9_f64, 1.1, 4.0, 1, false)
            .unwrap()
            .reference(),
        1
    );
}

// ---- Names as a person reads them (the demo and the tool print these).

#[test]
fn names_print_as_words() {
    use countward::alarm::Fault;
    use countward::deadtime::ModelKind;
    let levels: Vec<String> = [Level::Normal, Level::Warning, Level::Alarm]
        .iter()
        .map(|l| l.to_string())
        .collect();
    assert_eq!(levels, ["normal", "warning", "alarm"]);
    let faults: Vec<String> = Fault::ALL.iter().map(|f| f.to_string()).collect();
    assert_eq!(
        faults,
        ["low counts", "saturated", "silent", "external fault"]
    );
    let models: Vec<String> = [
        ModelKind::NonParalyzable,
        ModelKind::Paralyzable,
        ModelKind::Hybrid,
    ]
    .iter()
    .map(|m| m.to_string())
    .collect();
    assert_eq!(models, ["non-paralyzable", "paralyzable", "hybrid"]);
}

// ---- Smaller promises the mutation run found unpinned.

#[test]
fn cusum_reset_returns_to_the_head_start() {
    let mut c = PoissonCusum::new(CusumConfig::new(1, 2, 10, 4, CusumDirection::Increase).unwrap());
    c.update(7); // 4 + 7 − 2 = 9
    assert_eq!(c.statistic(), 9);
    c.reset();
    assert_eq!(c.statistic(), 4);
}

#[test]
fn quiet_means_nothing_held_and_no_low_count_held() {
    use countward::detect::Classification;
    assert!(Classification::QUIET.is_quiet());
    let held = Classification {
        hold: Level::Warning,
        ..Classification::QUIET
    };
    assert!(!held.is_quiet());
    let low = Classification {
        low_hold: true,
        ..Classification::QUIET
    };
    assert!(!low.is_quiet());
}

#[test]
fn low_count_clearing_stays_below_the_warning_clear() {
    // With a clearing probability above 1/2 the fault-clear count would reach
    // past the warning-clear count; the plan caps it at warning clear − 1.
    let plan = ThresholdPlan::new(
        FixedAlpha::one_in(100_000).unwrap(),
        FixedAlpha::one_in(10_000_000).unwrap(),
        FixedAlpha::from_ratio(3, 4).unwrap(),
        FixedAlpha::one_in(100_000).unwrap(),
    )
    .unwrap();
    let t = plan
        .thresholds(FixedMean::from_counts(100).unwrap())
        .unwrap();
    let warn_clear = alarm_threshold(100.0_f64, 0.75).unwrap().counts;
    let fault_clear = fault_threshold(100.0_f64, 0.75).unwrap().unwrap().counts;
    assert!(fault_clear >= warn_clear, "the cap must bind in this case");
    assert_eq!(t.warn_clear(), warn_clear);
    let low_set = fault_threshold(100.0_f64, 1e-5).unwrap().unwrap().counts;
    assert_eq!(t.low(), Some((low_set, warn_clear - 1)));
}

fn detector_at_two_per_tick() -> WindowDetector<10> {
    WindowDetector::<10>::new(
        FixedMean::from_counts(2).unwrap(),
        FixedMean::from_ratio(1, 2).unwrap(),
        4,
    )
    .unwrap()
}

#[test]
fn window_detector_is_quiet_until_its_window_is_full() {
    let mut d = detector_at_two_per_tick();
    d.set_thresholds(
        LevelThresholds::new(30, 25, 40, 30, Some((2, 5))).unwrap(),
        FixedMean::from_counts(20).unwrap(),
    );
    // 9 ticks of 50 counts: the count is far above every threshold, but the
    // window is not full, so nothing is classified.
    for t in 0..9 {
        assert_eq!(
            d.tick(Ticks(t), 50),
            countward::detect::Classification::QUIET,
            "tick {t}"
        );
        assert!(!d.is_armed());
    }
    assert_eq!(d.tick(Ticks(9), 50).raise, Level::Alarm);
    assert!(d.is_armed());
}

#[test]
fn window_detector_learning_can_be_paused() {
    let mut d = detector_at_two_per_tick();
    let before = d.background().mean_per_tick_q32();
    d.set_learning(false);
    for t in 0..50 {
        d.tick(Ticks(t), 9);
    }
    assert_eq!(d.background().mean_per_tick_q32(), before);
    d.set_learning(true);
    d.tick(Ticks(50), 9);
    assert!(d.background().mean_per_tick_q32() > before);
}

#[test]
fn window_detector_asks_for_a_refresh_exactly_when_documented() {
    // "none yet, or the background per window moved by more than 1/16 plus
    // half a count since they were planned".
    let plan = common::plan_one_in(100_000, 10_000_000, 100, 100_000);
    let mut d = detector_at_two_per_tick();
    assert!(d.needs_refresh());
    d.refresh(&plan).unwrap();
    assert!(!d.needs_refresh());
    // The background is 20 per window; planned for a basis b, the band is
    // b/16 + 1/2 counts around b.
    let thresholds = d.thresholds().unwrap();
    let with_basis = |d: &mut WindowDetector<10>, b: FixedMean| {
        d.set_thresholds(thresholds, b);
        d.needs_refresh()
    };
    assert!(!with_basis(
        &mut d,
        FixedMean::from_ratio(2175, 100).unwrap()
    )); // 1.75 < 1.859
    assert!(with_basis(&mut d, FixedMean::from_counts(22).unwrap())); // 2 > 1.875
    assert!(with_basis(&mut d, FixedMean::from_counts(18).unwrap())); // 2 > 1.625
    assert!(!with_basis(
        &mut d,
        FixedMean::from_ratio(1840, 100).unwrap()
    )); // 1.6 < 1.65
    // Exactly on the edge in UQ32.32 (b = 16q + 13 with 15q + 13 = 20·2^32 + 2^31):
    // |b − now| equals b/16 + 2^31 to the last bit, which is not "more than".
    assert!(!with_basis(
        &mut d,
        FixedMean::from_raw(16 * 5_869_788_637 + 13).unwrap()
    ));
    assert!(with_basis(
        &mut d,
        FixedMean::from_raw(16 * 5_869_788_637 + 14).unwrap()
    ));
}
