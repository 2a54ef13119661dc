//! Demo: one day of a radiation gate monitor, run through countward's
//! no_std firmware chain exactly as the counter's firmware would run it.
//!
//! Invented scenario: the weighbridge gate of the Marrowfield scrap yard has
//! one Geiger-Mueller tube (background about 0.8 counts per second, dead
//! time 100 µs, paralyzable) and a small MCU that ticks once per second.
//! During the day:
//! * 09:41 a lorry passes with a lost industrial source in its load
//!   (about 40 s past the tube, up to +60 cps);
//! * 13:20 the tube's high-voltage lead works loose: no more pulses until a
//!   technician refits it at 13:52;
//! * 16:30 during a planned test the tube is put in a very high field
//!   (a true rate rising to 30 000 cps): a paralyzable counter then reads
//!   *low*, and the chain must report saturation instead of a low reading;
//!   the field is removed at 16:42 and the operator releases the fault
//!   after checking with a second instrument at 16:50.
//!
//! The pulse counts are simulated (seeded Poisson counts with the
//! paralyzable loss `m = n e^{−nτ}`); the chain is the library's:
//! `WindowDetector` (10 s window for excess, 2 min window for low counts),
//! `SaturationGuard`, `AlarmMachine`, `AdaptiveRate` for the displayed
//! reading, with thresholds re-planned by the integer tier when the learned
//! background moves.
//!
//! Run: `cargo run --example gate_monitor_day`
//!
//! This is a demonstration, not a certified design: settings must be
//! validated for the instrument, and local regulations and licensed
//! radiation-protection practice take precedence.

use countward::Ticks;
use countward::alarm::{AlarmConfig, AlarmMachine, EventKind, Fault, Faults, Level};
use countward::detect::{Classification, SaturationGuard, ThresholdPlan, WindowDetector};
use countward::fixed::{FixedAlpha, FixedMean};
use countward::plan::sliding_upcrossings_per_tick;
use countward::rate::{AdaptiveConfig, AdaptiveRate};
use rand::SeedableRng;
use rand::rngs::SmallRng;
use rand_distr::{Distribution, Poisson};

const BACKGROUND_CPS: f64 = 0.8;
const DEAD_TIME_S: f64 = 100e-6;
const FAST: usize = 10; // ticks (seconds) in the excess window
const SLOW: usize = 120; // ticks in the low-count window

fn hms(t: u32) -> String {
    format!("{:02}:{:02}:{:02}", t / 3600, t / 60 % 60, t % 60)
}

/// The true count rate at the tube at second `t` of the day.
fn true_rate_cps(t: u32) -> f64 {
    let t = f64::from(t);
    let mut n = BACKGROUND_CPS;
    // The lorry: a bell-shaped pass centred on 09:41:20, ±15 s.
    let pass = t - (9.0 * 3600.0 + 41.0 * 60.0 + 20.0);
    n += 60.0 * (-(pass / 15.0).powi(2)).exp();
    // The high-field test: ramps from 16:30 to 16:34 up to 30 000 cps, held
    // until 16:42.
    let test_start = 16.0 * 3600.0 + 30.0 * 60.0;
    let test_end = 16.0 * 3600.0 + 42.0 * 60.0;
    if t >= test_start && t < test_end {
        n += 30_000.0 * ((t - test_start) / 240.0).min(1.0);
    }
    n
}

fn main() -> Result<(), countward::Error> {
    let mut rng = SmallRng::seed_from_u64(20261202);
    let one_in = |n| FixedAlpha::one_in(n);
    // Per-check probabilities: warning 1e-6, alarm 1e-9, hysteresis 1e-3, low counts 1e-7.
    let plan = ThresholdPlan::new(
        one_in(1_000_000)?,
        one_in(1_000_000_000)?,
        one_in(1_000)?,
        one_in(10_000_000)?,
    )?;
    let calibrated = FixedMean::from_ratio(8, 10)?; // 0.8 counts per tick from the last calibration
    let floor = FixedMean::from_ratio(3, 10)?;
    let mut fast = WindowDetector::<FAST>::new(calibrated, floor, 12)?;
    let mut slow = WindowDetector::<SLOW>::new(calibrated, floor, 12)?;
    let mut guard = SaturationGuard::for_dead_time(DEAD_TIME_S, FAST as f64, 0.8)?;
    let mut machine = AlarmMachine::<32>::new(AlarmConfig::new(2, 10, 5, 30)?);
    let mut display = AdaptiveRate::<900>::new(AdaptiveConfig::new(400, 8, 2)?);
    let step_alpha = one_in(1_000_000)?;

    println!("Marrowfield gate monitor, simulated day (1 s ticks, GM tube, τ = 100 µs)");
    println!(
        "Safety: demonstration settings only; validate them for the instrument, and follow local"
    );
    println!("regulations and licensed radiation-protection practice, which take precedence.\n");

    let test_release = 16 * 3600 + 50 * 60;
    let acknowledgements = [9 * 3600 + 50 * 60, 14 * 3600, test_release + 60];
    for t in 0..86_400u32 {
        let now = Ticks(t);
        // The tube: pulses of the true rate, lost to the paralyzable dead time;
        // none at all while the high-voltage lead is loose.
        let n = true_rate_cps(t);
        let hv_loose = (13 * 3600 + 20 * 60..13 * 3600 + 52 * 60).contains(&t);
        let m = if hv_loose {
            0.0
        } else {
            n * (-n * DEAD_TIME_S).exp()
        };
        let counts = Poisson::new(m.max(1e-12))
            .map(|p| p.sample(&mut rng) as u32)
            .unwrap_or(0);

        // The firmware's hot path, once per tick (integers only):
        let excess = fast.tick(now, counts);
        let low = slow.tick(now, counts);
        let saturated = guard.update(fast.window().sum_u32(), None);
        let c = Classification {
            low_raise: low.low_raise,
            low_hold: low.low_hold,
            ..excess
        };
        machine.update(now, c, Faults::NONE.with(Fault::Saturated, saturated));
        let quiet = machine.active() == Level::Normal && machine.active_faults().is_empty();
        fast.set_learning(quiet);
        slow.set_learning(quiet);
        display.add(now, counts);

        // The cold path, when a detector asks (integer tier, no float):
        for d in [&mut fast as &mut dyn Refresh, &mut slow] {
            d.refresh_if_needed(&plan)?;
        }
        if display.needs_refresh() {
            display.refresh(step_alpha)?;
        }
        if t == 600 {
            let t_fast = fast.thresholds().expect("planned at start");
            let bg = fast.background_per_window()?.raw() as f64 / 4_294_967_296.0 / FAST as f64;
            let per_day =
                |k| sliding_upcrossings_per_tick(bg, FAST as u32, k).map(|r| r * 86_400.0);
            println!(
                "{}  thresholds for {:.2} cps: warning at {} counts/10 s ({:.1e} starts/day), alarm at {} ({:.1e}/day); low counts at ≤ {} per 2 min",
                hms(t),
                bg,
                t_fast.warn_set(),
                per_day(t_fast.warn_set())?,
                t_fast.alarm_set(),
                per_day(t_fast.alarm_set())?,
                slow.thresholds()
                    .and_then(|s| s.low())
                    .map_or("none".to_string(), |l| l.0.to_string())
            );
        }
        // The operator's actions.
        if t == test_release && guard.release(fast.window().sum_u32()) {
            println!(
                "{}  operator: field checked with a second instrument, saturation released",
                hms(t)
            );
        }
        if acknowledgements.contains(&t) {
            machine.acknowledge(now);
        }
        // The display and the event log.
        while let Some(e) = machine.poll_event() {
            println!(
                "{}  event: {}  [window {} counts/10 s]",
                hms(e.at.0),
                describe(e.kind),
                fast.window().sum()
            );
        }
        if t % 7200 == 0 || (t % 240 == 0 && !quiet) {
            let reading = display.reading(1.0_f64)?.expect("a tick has passed");
            let shown = if machine.active_faults().contains(Fault::Saturated) {
                "OVER RANGE (saturation fault: the reading is not valid)".to_string()
            } else if machine.active_faults().contains(Fault::LowCounts) {
                "NO VALID READING (low-count fault)".to_string()
            } else {
                format!(
                    "{:.2} cps ± {:.0}% over {} s",
                    reading.rate_cps,
                    100.0 * reading.relative_uncertainty().unwrap_or(1.0),
                    reading.seconds
                )
            };
            // A fault shows on every line a person reads while it lasts.
            let faults: Vec<String> = Fault::ALL
                .iter()
                .filter(|f| machine.active_faults().contains(**f))
                .map(|f| f.to_string())
                .collect();
            let fault_note = if faults.is_empty() {
                String::new()
            } else {
                format!("; FAULT: {}", faults.join(", "))
            };
            println!(
                "{}  reading {:<58} level {}, latched {}{fault_note}",
                hms(t),
                shown,
                machine.active(),
                machine.latched()
            );
        }
    }
    println!(
        "\nend of day: {} events dropped from the queue, latched level {}",
        machine.dropped_events(),
        machine.latched()
    );
    Ok(())
}

/// The two windows refresh the same way; a small trait keeps the loop short.
trait Refresh {
    fn refresh_if_needed(&mut self, plan: &ThresholdPlan) -> Result<(), countward::Error>;
}

impl<const N: usize> Refresh for WindowDetector<N> {
    fn refresh_if_needed(&mut self, plan: &ThresholdPlan) -> Result<(), countward::Error> {
        if self.needs_refresh() {
            self.refresh(plan)?;
        }
        Ok(())
    }
}

fn describe(kind: EventKind) -> String {
    match kind {
        EventKind::Raised(l) => format!("level raised to {l}"),
        EventKind::Lowered { from, to } => format!("level lowered from {from} to {to}"),
        EventKind::FaultSet(f) => format!("FAULT: {f}"),
        EventKind::FaultCleared(f) => format!("fault cleared: {f}"),
        EventKind::Acknowledged => "acknowledged by the operator".to_string(),
    }
}
