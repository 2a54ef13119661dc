//! Detectors against published values and an independent reference:
//! the Poisson CUSUM against the Brook–Evans Markov chain (written here in
//! plain f64 with statrs' Poisson pmf) and the published ARL table of the
//! IAcsSPCR documentation; Wald's SPRT against his boundaries and a
//! Monte-Carlo figure computed outside the project (its error in the
//! tolerance); the silence budget against its exact law; the saturation
//! level against 1/(eτ).

mod common;

use countward::Ticks;
use countward::detect::{
    CusumConfig, CusumDirection, Level, LevelThresholds, PoissonCusum, SaturationGuard,
    SilencePlan, Sprt, SprtConfig, SprtDecision, WindowDetector,
};
use countward::fixed::FixedMean;

#[test]
fn brook_evans_reference_reproduces_the_published_arl() {
    // IAcsSPCR R package documentation (J. Lawson), Lucas's scheme:
    // arl(h = 6, k = 2, lambda = 1.88) -> "ARL= 37.2", "ARL(FIR)= 29.19";
    // shift 0.9627 sigma (mean 3.20) -> 5.49 and 3.33.
    let l = common::brook_evans_arl(1.88, 1, 2, 6);
    assert!(
        (l[0] - 37.2).abs() < 0.05 && (l[3] - 29.19).abs() < 0.005,
        "{l:?}"
    );
    let shifted = 1.88 + 0.9627 * 1.88_f64.sqrt();
    let l = common::brook_evans_arl(shifted, 1, 2, 6);
    assert!(
        (l[0] - 5.49).abs() < 0.005 && (l[3] - 3.33).abs() < 0.005,
        "{l:?}"
    );
    // A design computed with the Brook & Evans (1972) chain: k = 6, h = 8.
    assert!((common::brook_evans_arl(4.0, 1, 6, 8)[0] - 1736.05).abs() < 0.01);
    assert!((common::brook_evans_arl(8.0, 1, 6, 8)[0] - 4.576).abs() < 0.001);
    // Lattice 1/2: k = 1.5, h = 5 for means 1 and 2: 273.65 / 9.438, FIR 6.217.
    assert!((common::brook_evans_arl(1.0, 2, 3, 10)[0] - 273.65).abs() < 0.01);
    let l = common::brook_evans_arl(2.0, 2, 3, 10);
    assert!((l[0] - 9.438).abs() < 0.001 && (l[5] - 6.217).abs() < 0.001);
}

/// Mean run length of the library's CUSUM by simulation.
fn simulated_arl(config: CusumConfig, mean: f64, runs: usize, seed: u64) -> (f64, f64) {
    let mut rng = common::rng(seed);
    let (mut s1, mut s2) = (0.0, 0.0);
    for _ in 0..runs {
        let mut c = PoissonCusum::new(config);
        let mut n = 0u64;
        loop {
            n += 1;
            if c.update(common::poisson(&mut rng, mean)) {
                break;
            }
        }
        s1 += n as f64;
        s2 += (n * n) as f64;
    }
    let m = s1 / runs as f64;
    (m, ((s2 / runs as f64 - m * m) / runs as f64).sqrt())
}

#[test]
fn cusum_run_lengths_match_brook_evans() {
    let seed = common::seed(0x5eed_0101);
    let runs = if common::long_runs() { 200_000 } else { 6_000 };
    // k = 2, h = 6, zero start and fast initial response (head start 3).
    for (head, want) in [(0, 37.203), (3, 29.188)] {
        let config = CusumConfig::new(1, 2, 6, head, CusumDirection::Increase).unwrap();
        let (m, se) = simulated_arl(config, 1.88, runs, seed + u64::from(head));
        common::assert_close("CUSUM ARL", seed, m, want, se, 4.5);
    }
    // The designed scheme on a lattice of 1/2 count: means 1 -> 2, h = 5.
    let config = CusumConfig::for_means(1.0_f64, 2.0, 5.0, 2, false).unwrap();
    assert_eq!((config.reference(), config.decision()), (3, 10));
    let (m, se) = simulated_arl(config, 2.0, runs, seed + 7);
    common::assert_close("CUSUM ARL1", seed, m, 9.438, se, 4.5);
}

#[test]
fn decreasing_cusum_signals_a_dying_detector() {
    // Mean 8 per tick falling to 2: k = 6/ln 4 = 4.328.
    let config = CusumConfig::for_means(8.0_f64, 2.0, 6.0, 1000, false).unwrap();
    assert_eq!(config.direction(), CusumDirection::Decrease);
    let mut c = PoissonCusum::new(config);
    let mut ticks = 0;
    while !c.update(2) {
        ticks += 1;
    }
    // Each tick of 2 counts adds 2.328: 6 / 2.328 -> signal on the third tick.
    assert_eq!(ticks, 2);
}

#[test]
fn sprt_matches_wald_and_the_published_simulation() {
    // (computed from Wald 1945/1947): λ0 = 1, λ1 = 2 s^-1,
    // α = β = 0.05: boundaries ±ln 19. A Monte Carlo run outside this
    // project (20,000 runs, continuous time; computed, not a published
    // number): P(decide H1 | H0) = 0.039, E0[T] = 8.82 s. Its own sampling
    // error is part of the tolerance below.
    // Here: 10 ms ticks (means 0.01 and 0.02 per tick).
    let config = SprtConfig::for_means(0.01_f64, 0.02, 0.05, 0.05, 1 << 20, 0).unwrap();
    assert!((config.upper_nats::<f64>() - 19.0_f64.ln()).abs() < 1e-5);
    let seed = common::seed(0x5eed_0102);
    let mut rng = common::rng(seed);
    let runs = if common::long_runs() { 100_000 } else { 4_000 };
    let (mut alarms, mut ticks) = (0usize, 0u64);
    for _ in 0..runs {
        let mut t = Sprt::new(config);
        let mut n = 0u32;
        loop {
            let d = t.update(Ticks(n), common::poisson(&mut rng, 0.01));
            n += 1;
            match d {
                SprtDecision::Continue => continue,
                SprtDecision::RateIncrease => alarms += 1,
                _ => {}
            }
            break;
        }
        ticks += u64::from(n);
    }
    let p = alarms as f64 / runs as f64;
    common::assert_close(
        "SPRT false-alarm probability",
        seed,
        p,
        0.039,
        (0.039 * 0.961 * (1.0 / runs as f64 + 1.0 / 20_000.0)).sqrt(),
        4.5,
    );
    assert!(
        p < 0.05,
        "the overshoot makes the real α smaller than nominal"
    );
    let mean_s = ticks as f64 / runs as f64 * 0.01;
    // E0[T] sd ≈ 8 s per run.
    common::assert_close(
        "SPRT E0[T] (s)",
        seed,
        mean_s,
        8.82,
        8.0 * (1.0 / runs as f64 + 1.0 / 20_000.0).sqrt(),
        4.5,
    );
}

#[test]
fn sprt_truncation_has_a_deadline() {
    use countward::ticks::NextDeadline;
    let config = SprtConfig::for_means(1.0_f64, 1.5, 1e-3, 1e-3, 1 << 16, 5).unwrap();
    let mut t = Sprt::new(config);
    assert_eq!(t.next_deadline(), None);
    assert_eq!(t.update(Ticks(10), 1), SprtDecision::Continue);
    assert_eq!(t.next_deadline(), Some(Ticks(14)));
    for n in 11..14 {
        assert_eq!(t.update(Ticks(n), 1), SprtDecision::Continue);
    }
    assert_eq!(t.update(Ticks(14), 1), SprtDecision::Truncated);
}

#[test]
fn silence_budgets_match_the_reference_values() {
    // Computed (Lomax predictive with a0 = b0 = 0):
    // k = 10 in T = 600 s: 597.157 s at α = 1e-3, 1788.643 s at 1e-6;
    // k = 3 in T = 180 s, α = 1e-3: 1620.0 s. Millisecond ticks.
    let ms = |alpha: f64, k: u16, t_s: u32| {
        let plan = SilencePlan::<32>::new(alpha, 1, 1000).unwrap();
        f64::from(plan.budget_ticks(t_s * 1000, k)) / 1000.0
    };
    assert!((ms(1e-3, 10, 600) - 597.157).abs() < 2e-3);
    assert!((ms(1e-6, 10, 600) - 1788.643).abs() < 2e-3);
    assert!((ms(1e-3, 3, 180) - 1620.0).abs() < 2e-3);
}

#[test]
fn silence_budget_holds_its_false_silence_probability_whatever_the_rate() {
    // The pivot: P(next gap > c_k T_k) = (1 + c_k)^-k = α for every λ.
    // Computed (400,000 gaps, k = 10, α = 0.01): 0.00997 for
    // this rule, 0.0224 for the plug-in rule −ln α T/k.
    let seed = common::seed(0x5eed_0103);
    let mut rng = common::rng(seed);
    let plan = SilencePlan::<10>::new(0.01_f64, 10, 1).unwrap();
    let trials = if common::long_runs() { 400_000 } else { 40_000 };
    let (mut silent, mut plug_in_silent) = (0usize, 0usize);
    for i in 0..trials {
        let rate = [0.02, 0.3, 5.0][i % 3]; // per second; 1 ms ticks
        let gaps: Vec<f64> = (0..11)
            .map(|_| common::exponential(&mut rng, rate))
            .collect();
        let t_ms: f64 = gaps[..10].iter().sum::<f64>() * 1000.0;
        let budget = plan.budget_ticks(t_ms as u32, 10);
        let next_ms = gaps[10] * 1000.0;
        silent += usize::from(next_ms > f64::from(budget) + 1.0);
        plug_in_silent += usize::from(next_ms > -(0.01_f64.ln()) * t_ms / 10.0);
    }
    let p = silent as f64 / trials as f64;
    common::assert_close(
        "false silences per gap",
        seed,
        p,
        0.01,
        (0.0099 / trials as f64).sqrt(),
        4.5,
    );
    let q = plug_in_silent as f64 / trials as f64;
    common::assert_close(
        "plug-in false silences",
        seed,
        q,
        0.0224,
        (0.022 / trials as f64).sqrt(),
        4.5,
    );
}

#[test]
fn saturation_level_is_the_paralyzable_maximum() {
    // Computed (Knoll 2010 model m = n e^{−nτ}): the
    // maximum measured rate for τ = 100 µs is 1/(eτ) = 3678.7944 s^-1.
    let g = SaturationGuard::for_dead_time(1e-4_f64, 1.0, 1.0).unwrap();
    assert_eq!(g.enter_counts(), 3679);
    let g = SaturationGuard::for_dead_time(1e-4_f64, 10.0, 1.0).unwrap();
    assert_eq!(g.enter_counts(), 36788);
    assert!(SaturationGuard::for_dead_time(0.0_f64, 1.0, 0.5).is_err());
    assert!(SaturationGuard::for_dead_time(1e-4_f64, 1.0, 1.5).is_err());
    let mut g = SaturationGuard::with_enter_counts(100).unwrap();
    assert!(g.update(5, Some(true))); // the auxiliary signal alone
    assert!(!g.release(150) && g.is_saturated()); // refused while the counts are high
    assert!(g.release(5) && !g.is_saturated());
}

#[test]
fn window_background_is_frozen_during_an_excess_and_a_low_count_fault() {
    let five = FixedMean::from_counts(5).unwrap();
    let floor = FixedMean::from_counts(1).unwrap();
    let mut d = WindowDetector::<4>::new(five, floor, 2).unwrap();
    // Thresholds for a window mean of 20: warn 30/clear 26, alarm 40, low 8/10.
    d.set_thresholds(
        LevelThresholds::new(30, 26, 40, 30, Some((8, 10))).unwrap(),
        FixedMean::from_counts(20).unwrap(),
    );
    for t in 0..4 {
        d.tick(Ticks(t), 5);
    }
    let learned = d.background().mean_per_tick_q32();
    for t in 4..20 {
        assert_eq!(d.tick(Ticks(t), 50).raise, Level::Alarm);
    }
    assert_eq!(
        d.background().mean_per_tick_q32(),
        learned,
        "learned from a source"
    );
    for t in 20..40 {
        d.tick(Ticks(t), 0);
    }
    assert_eq!(
        d.background().mean_per_tick_q32(),
        learned,
        "learned from a dead tube"
    );
    // Back to normal: learning resumes.
    for t in 40..50 {
        d.tick(Ticks(t), 6);
    }
    assert!(d.background().mean_per_tick_q32() > learned);
    assert!(
        WindowDetector::<4>::new(floor, five, 2).is_err(),
        "floor above background"
    );
}

mod properties {
    use countward::Ticks;
    use countward::detect::{CusumConfig, CusumDirection, PoissonCusum, SilenceFleet, SilencePlan};
    use countward::ticks::NextDeadline;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]

        // The scaled-integer CUSUM equals Page's recursion in f64 on the same lattice.
        #[test]
        fn cusum_equals_the_f64_recursion(scale in 1u32..64, k in 1u32..400, h in 1u32..2000,
                                          up in any::<bool>(), xs in prop::collection::vec(0u32..50, 1..300)) {
            let dir = if up { CusumDirection::Increase } else { CusumDirection::Decrease };
            let mut c = PoissonCusum::new(CusumConfig::new(scale, k, h, 0, dir).unwrap());
            let (kf, hf, sf) = (f64::from(k) / f64::from(scale), f64::from(h) / f64::from(scale), f64::from(scale));
            let mut s = 0.0_f64;
            for x in xs {
                let step = if up { f64::from(x) - kf } else { kf - f64::from(x) };
                s = (s + step).max(0.0);
                let signal = s >= hf - 0.5 / sf / 1e6;
                if signal { s = 0.0; }
                prop_assert_eq!(c.update(x), signal);
                prop_assert!((f64::from(c.statistic()) / sf - s).abs() < 1e-9);
            }
        }

        // The fleet's next deadline is one tick after the earliest unreported deadline.
        #[test]
        fn fleet_deadline_is_the_naive_minimum(events in prop::collection::vec((0usize..8, 1u32..500), 1..200)) {
            let plan = SilencePlan::<8>::new(1e-3_f64, 2, 10_000).unwrap();
            let mut fleet = SilenceFleet::<8, 8>::new(plan);
            let mut now = 1_000u32;
            for (device, dt) in events {
                now += dt;
                fleet.event(device, Ticks(now)).unwrap();
                let naive = (0..8)
                    .filter_map(|i| fleet.slot(i).and_then(|s| s.deadline()))
                    .map(|d| d.0)
                    .min()
                    .map(|d| Ticks(d + 1));
                prop_assert_eq!(fleet.next_deadline(), naive);
            }
        }
    }
}

#[test]
fn stored_designs_rebuild_the_same_detectors() {
    let plan = SilencePlan::<16>::new(1e-4_f64, 4, 600).unwrap();
    let again = SilencePlan::<16>::from_factors(*plan.factors_q32(), 4, 600).unwrap();
    assert_eq!(plan, again);
    assert!(SilencePlan::<16>::from_factors([0; 16], 0, 600).is_err());
    let c = SprtConfig::for_means(1.0_f64, 2.0, 0.05, 0.05, 1 << 16, 0).unwrap();
    let (a, b, u, l, m, s) = c.scaled();
    assert_eq!(SprtConfig::from_scaled(a, b, u, l, m, s).unwrap(), c);
    assert!(SprtConfig::from_scaled(a, b, -u, l, m, s).is_err());
}
