//! Seeded Monte-Carlo runs of the real chain on simulated Poisson streams:
//! false-alarm rates at background against their plans, and detection
//! delays for a step increase, for each detector. Seeds are printed on
//! failure (rerun with `COUNTWARD_SEED=…`); `COUNTWARD_LONG=1` runs each
//! simulation 25 to 50 times longer. Figures are printed with `--nocapture`.

mod common;

use countward::Ticks;
use countward::alarm::{AlarmConfig, AlarmMachine, EventKind, Faults, Level};
use countward::detect::{
    CusumConfig, LevelThresholds, PoissonCusum, SilenceFleet, SilencePlan, Sprt, SprtConfig,
    SprtDecision, WindowDetector,
};
use countward::fixed::FixedMean;
use countward::plan::{sliding_threshold, sliding_upcrossings_per_tick};
use countward::poisson::at_least;

const BACKGROUND_CPS: f64 = 2.0;
const WINDOW: usize = 10;

fn hours(short: f64) -> f64 {
    if common::long_runs() {
        short * 50.0
    } else {
        short
    }
}

#[test]
fn sliding_window_alarm_starts_match_the_exact_upcrossing_plan() {
    let seed = common::seed(0x5eed_0201);
    let mut rng = common::rng(seed);
    // Plan 40 alarm starts per hour so that a short run measures them well.
    let target = 40.0 / 3600.0;
    let k = sliding_threshold(BACKGROUND_CPS, WINDOW as u32, target).unwrap();
    let planned = sliding_upcrossings_per_tick(BACKGROUND_CPS, WINDOW as u32, k).unwrap();
    let mut d = WindowDetector::<WINDOW>::new(
        FixedMean::from_counts(2).unwrap(),
        FixedMean::from_counts(1).unwrap(),
        12,
    )
    .unwrap();
    d.set_thresholds(
        LevelThresholds::new(k, k, u32::MAX, u32::MAX, None).unwrap(),
        FixedMean::from_counts(20).unwrap(),
    );
    let mut m = AlarmMachine::<8>::new(AlarmConfig::new(1, 1, 1, 1).unwrap());
    let ticks = (hours(20.0) * 3600.0) as u32;
    let mut starts = 0u64;
    for t in 0..ticks {
        let c = d.tick(Ticks(t), common::poisson(&mut rng, BACKGROUND_CPS));
        m.update(Ticks(t), c, Faults::NONE);
        while let Some(e) = m.poll_event() {
            starts += u64::from(e.kind == EventKind::Raised(Level::Warning));
        }
    }
    let expected = planned * f64::from(ticks);
    let per_hour = starts as f64 / (f64::from(ticks) / 3600.0);
    eprintln!(
        "window k={k}: {per_hour:.2} alarm starts/h, planned {:.2}/h (per-check α {:.2e})",
        planned * 3600.0,
        at_least(BACKGROUND_CPS * WINDOW as f64, k).unwrap().p
    );
    // Starts are close to Poisson; allow for mild clustering (variance ×2).
    common::assert_close(
        "alarm starts",
        seed,
        starts as f64,
        expected,
        (2.0 * expected).sqrt(),
        4.5,
    );
}

#[test]
fn the_learning_chain_keeps_its_false_alarm_plan_and_detects_a_source() {
    let seed = common::seed(0x5eed_0202);
    let mut rng = common::rng(seed);
    let plan = common::plan_one_in(2_000, 1_000_000, 20, 1_000_000);
    // Calibration says 1.8 cps; the true background is 2 cps: the chain learns it.
    let start = FixedMean::from_ratio(18, 10).unwrap();
    let mut d =
        WindowDetector::<WINDOW>::new(start, FixedMean::from_ratio(1, 2).unwrap(), 10).unwrap();
    let mut m = AlarmMachine::<16>::new(AlarmConfig::new(2, 3, 5, 5).unwrap());
    let ticks = (hours(20.0) * 3600.0) as u32;
    let (mut warnings, mut alarms) = (0u64, 0u64);
    for t in 0..ticks {
        let c = d.tick(Ticks(t), common::poisson(&mut rng, BACKGROUND_CPS));
        if d.needs_refresh() {
            d.refresh(&plan).unwrap();
        }
        m.update(Ticks(t), c, Faults::NONE);
        d.set_learning(m.active() == Level::Normal && m.active_faults().is_empty());
        while let Some(e) = m.poll_event() {
            match e.kind {
                EventKind::Raised(Level::Warning) => warnings += 1,
                EventKind::Raised(Level::Alarm) => alarms += 1,
                _ => {}
            }
        }
    }
    let learned = d.background_per_window().unwrap().raw() as f64 / 4_294_967_296.0;
    let h = f64::from(ticks) / 3600.0;
    // Plan bound: the raw upcrossing rate of the warning threshold at the true
    // background (persistence and hysteresis can only merge or drop starts).
    let warn_set = d.thresholds().unwrap().warn_set();
    let bound = sliding_upcrossings_per_tick(BACKGROUND_CPS, WINDOW as u32, warn_set).unwrap()
        * f64::from(ticks);
    eprintln!(
        "learning chain: background learned {learned:.2}/window (true 20); warnings {:.2}/h (upcrossing bound {:.2}/h), alarms {:.3}/h",
        warnings as f64 / h,
        bound / h,
        alarms as f64 / h
    );
    // One reading of an EWMA with weight a = 2^-10 at μ = 2 per tick: relative
    // SD √(a/((2 − a)μ)) = 1.56 % (Var = aμ/(2 − a) for a first-order filter).
    let a = 1.0 / 1024.0;
    let sd = 20.0 * (a / ((2.0 - a) * BACKGROUND_CPS)).sqrt();
    common::assert_close(
        "learned background per window",
        seed,
        learned,
        20.0,
        sd,
        4.5,
    );
    assert!(
        warnings as f64 <= bound + 4.5 * (2.0 * bound).sqrt(),
        "seed {seed}: {warnings} warnings, bound {bound}"
    );
    let alarm_bound = sliding_upcrossings_per_tick(
        BACKGROUND_CPS,
        WINDOW as u32,
        d.thresholds().unwrap().alarm_set(),
    )
    .unwrap()
        * f64::from(ticks);
    assert!(
        (alarms as f64) <= alarm_bound + 4.5 * alarm_bound.sqrt() + 3.0,
        "seed {seed}: {alarms} alarms, bound {alarm_bound}"
    );

    // Detection delay of a 10 cps source stepping in, over repeated passes.
    let alarm_set = d.thresholds().unwrap().alarm_set();
    let source_cps = 10.0;
    let passes = if common::long_runs() { 20_000 } else { 600 };
    let mut delays = Vec::with_capacity(passes);
    let mut t = ticks;
    for _ in 0..passes {
        let mut m = AlarmMachine::<16>::new(AlarmConfig::new(2, 3, 5, 5).unwrap());
        let mut probe = d.clone();
        probe.set_learning(false);
        for _ in 0..WINDOW {
            let c = probe.tick(Ticks(t), common::poisson(&mut rng, BACKGROUND_CPS));
            m.update(Ticks(t), c, Faults::NONE);
            t += 1;
        }
        let step = t;
        loop {
            let c = probe.tick(
                Ticks(t),
                common::poisson(&mut rng, BACKGROUND_CPS + source_cps),
            );
            m.update(Ticks(t), c, Faults::NONE);
            t += 1;
            if m.active() == Level::Alarm || t - step > 200 {
                break;
            }
        }
        delays.push(t - step);
    }
    delays.sort_unstable();
    let median = delays[passes / 2];
    let mean = delays.iter().map(|&x| f64::from(x)).sum::<f64>() / passes as f64;
    // Bound: the first passage is no later than the first tick at which the
    // window count itself reaches the threshold with probability ≥ 1/2, plus
    // one tick of persistence.
    let half_by = (1..=WINDOW as u32)
        .chain(std::iter::repeat_n(WINDOW as u32, 50))
        .enumerate()
        .find(|&(_, d)| {
            let mean = BACKGROUND_CPS * WINDOW as f64 + source_cps * f64::from(d);
            at_least(mean, alarm_set).unwrap().p >= 0.5
        })
        .map(|(i, _)| i as u32 + 1)
        .unwrap();
    eprintln!(
        "window detector: 10 cps step on 2 cps, alarm at {alarm_set} counts/10 s: median delay {median} s, mean {mean:.2} s (bound {} s)",
        half_by + 1
    );
    assert!(
        median <= half_by + 1,
        "seed {seed}: median delay {median} s"
    );
}

#[test]
fn cusum_false_alarms_per_hour_and_delay_match_brook_evans() {
    let seed = common::seed(0x5eed_0203);
    let mut rng = common::rng(seed);
    // 1 s ticks, background 2 counts per tick, designed for 6 per tick; h = 4.
    let config = CusumConfig::for_means(2.0_f64, 6.0, 4.0, 4, false).unwrap();
    // Lucas (1985): k = (μ1 − μ0)/ln(μ1/μ0) = 4/ln 3 = 3.641, on a lattice of
    // 1/4 count: 15; h = 4 → 16. Computed here, not read from the design.
    let (k4, h4) = ((4.0 / 3f64.ln() * 4.0).round() as u32, 16);
    assert_eq!(
        (config.scale(), config.reference(), config.decision()),
        (4, k4, h4)
    );
    let arl0 = common::brook_evans_arl(2.0, 4, k4, h4)[0];
    let arl1_all = common::brook_evans_arl(6.0, 4, k4, h4);
    let arl1 = arl1_all[0];
    let arl1_best = arl1_all.iter().copied().fold(f64::INFINITY, f64::min);
    let ticks = (hours(20.0) * 3600.0) as u32;
    let mut c = PoissonCusum::new(config);
    let mut signals = 0u64;
    for _ in 0..ticks {
        signals += u64::from(c.update(common::poisson(&mut rng, 2.0)));
    }
    let expected = f64::from(ticks) / arl0;
    let h = f64::from(ticks) / 3600.0;
    // Delay after a step, from the state the background left.
    let runs = if common::long_runs() { 50_000 } else { 2_000 };
    let mut total = 0u64;
    for _ in 0..runs {
        let mut n = 0u64;
        loop {
            n += 1;
            if c.update(common::poisson(&mut rng, 6.0)) {
                break;
            }
        }
        total += n;
        for _ in 0..20 {
            if c.update(common::poisson(&mut rng, 2.0)) {
                c.reset();
            }
        }
    }
    let mean_delay = total as f64 / runs as f64;
    eprintln!(
        "CUSUM (k={:.2}, h=4): {:.1} false alarms/h (Brook–Evans {:.1}/h, ARL0 {arl0:.1} ticks); mean delay {mean_delay:.2} ticks (ARL1 from zero {arl1:.2})",
        config.reference_counts::<f64>(),
        signals as f64 / h,
        3600.0 / arl0
    );
    // Signals of a restarted CUSUM form a renewal process: variance ≈ count.
    common::assert_close(
        "CUSUM false alarms",
        seed,
        signals as f64,
        expected,
        (1.2 * expected).sqrt(),
        4.5,
    );
    // The state at the step lies on the lattice below h: the delay lies
    // between ARL1 from the most advanced state and ARL1 from zero.
    let slack = 4.5 / (runs as f64).sqrt();
    assert!(
        mean_delay <= arl1 * (1.0 + slack) && mean_delay >= arl1_best * (1.0 - slack),
        "seed {seed}: {mean_delay} outside [{arl1_best}, {arl1}]"
    );
}

#[test]
fn sprt_surveillance_matches_its_markov_chain() {
    let seed = common::seed(0x5eed_0204);
    let mut rng = common::rng(seed);
    // 100 ms ticks: background 2 cps (0.2 per tick) against 6 cps; α = 1e-3,
    // β = 0.05; 256 lattice units per nat (each term within 1 % of exact).
    let (m0, m1, alpha, beta) = (0.2_f64, 0.6, 1e-3, 0.05);
    let config = SprtConfig::for_means(m0, m1, alpha, beta, 256, 0).unwrap();
    // The lattice terms, computed here (Wald 1945: gain ln(μ1/μ0) per count,
    // loss μ1 − μ0 per tick, boundaries ln((1−β)/α) and ln(β/(1−α))).
    let lattice = |v: f64| (v * 256.0).round() as i64;
    let (pc, pt) = (lattice((m1 / m0).ln()), lattice(m1 - m0));
    let (up, lo) = (
        lattice(((1.0 - beta) / alpha).ln()),
        lattice((beta / (1.0 - alpha)).ln()),
    );
    assert_eq!(config.scaled(), (pc, pt, up, lo, 0, 256));
    // Exact operating characteristic of the lattice test (overshoot included).
    let (p0_up, e0) = common::sprt_chain(m0, pc, pt, up, lo);
    let (p1_up, e1) = common::sprt_chain(m1, pc, pt, up, lo);
    let ticks = (hours(20.0) * 36_000.0) as u32;
    let mut t = Sprt::new(config);
    let mut alarms = 0u64;
    for n in 0..ticks {
        alarms += u64::from(
            t.update(Ticks(n), common::poisson(&mut rng, m0)) == SprtDecision::RateIncrease,
        );
    }
    let h = f64::from(ticks) / 36_000.0;
    // Restarted tests form a renewal process: alarms per tick = P0(upper)/E0[T].
    let expected = f64::from(ticks) * p0_up / e0;
    // Time to the first alarm after a step (restarting after each "background"
    // decision): E1[T]/P1(upper) by the renewal argument.
    let runs = if common::long_runs() { 50_000 } else { 2_000 };
    let (mut total, mut total2, mut detected) = (0.0f64, 0.0f64, 0u64);
    for r in 0..runs {
        let mut t = Sprt::new(config);
        let mut n = 0u32;
        loop {
            n += 1;
            if t.update(Ticks(r + n), common::poisson(&mut rng, m1)) == SprtDecision::RateIncrease {
                detected += 1;
                break;
            }
            if n > 10_000 {
                break;
            }
        }
        total += f64::from(n);
        total2 += f64::from(n) * f64::from(n);
    }
    let mean_delay = total / f64::from(runs);
    let sd_delay = (total2 / f64::from(runs) - mean_delay * mean_delay).sqrt();
    let want_delay = e1 / p1_up;
    eprintln!(
        "SPRT (2→6 cps, 100 ms ticks, α=1e-3, β=0.05): {:.3} false alarms/h (Markov chain {:.3}/h; P0(upper) {p0_up:.2e}, E0[T] {e0:.2} ticks); mean delay {:.3} s (chain {:.3} s), {detected}/{runs} detected",
        alarms as f64 / h,
        expected / h,
        mean_delay / 10.0,
        want_delay / 10.0
    );
    // Two-sided: a test that never fires fails as surely as one that fires too often.
    common::assert_close(
        "SPRT false alarms",
        seed,
        alarms as f64,
        expected,
        (1.2 * expected).sqrt(),
        4.5,
    );
    assert_eq!(
        detected,
        u64::from(runs),
        "seed {seed}: a 3-fold step must always be found"
    );
    common::assert_close(
        "SPRT delay",
        seed,
        mean_delay,
        want_delay,
        sd_delay / f64::from(runs).sqrt(),
        4.5,
    );
}

#[test]
fn fleet_false_silences_stay_within_plan() {
    let seed = common::seed(0x5eed_0205);
    let mut rng = common::rng(seed);
    let alpha = 1e-2;
    let plan = SilencePlan::<16>::new(alpha, 8, 60_000).unwrap();
    const DEVICES: usize = 40;
    let mut fleet = SilenceFleet::<DEVICES, 16>::new(plan);
    // Millisecond ticks; each device has its own rate (0.05 to 2 events/s).
    let rates: Vec<f64> = (0..DEVICES)
        .map(|i| 0.05 * (1.0 + i as f64 * 39.0 / (DEVICES as f64 - 1.0)))
        .collect();
    let horizon_ms = hours(3.0) * 3.6e6;
    let mut events: Vec<(f64, usize)> = Vec::new();
    for (i, &r) in rates.iter().enumerate() {
        let mut t = 0.0;
        loop {
            t += common::exponential(&mut rng, r) * 1000.0;
            if t > horizon_ms {
                break;
            }
            events.push((t, i));
        }
    }
    events.sort_by(|a, b| a.0.total_cmp(&b.0));
    let (mut silences, mut watched_gaps) = (0u64, 0u64);
    let mut gaps_seen = [0u32; DEVICES];
    for &(t, i) in &events {
        let now = Ticks(t as u32);
        while let Some(_silent) = fleet.next_silent(now) {
            silences += 1;
        }
        fleet.event(i, now).unwrap();
        gaps_seen[i] += 1;
        if gaps_seen[i] > 8 {
            watched_gaps += 1;
        }
    }
    let planned = alpha * watched_gaps as f64;
    eprintln!(
        "fleet: {silences} false silences in {watched_gaps} watched gaps ({:.4} per gap; plan α = {alpha}, at most α after the first halving)",
        silences as f64 / watched_gaps as f64
    );
    assert!(
        silences as f64 <= planned + 4.5 * planned.sqrt(),
        "seed {seed}"
    );
    assert!(
        silences as f64 >= 0.5 * planned - 4.5 * planned.sqrt(),
        "seed {seed}: far fewer than planned ({silences} vs {planned})"
    );
}
