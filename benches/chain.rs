//! Hot-path speed of the firmware chain on the host, and the integer
//! dead-time table against the float correction. Run:
//! `cargo bench --bench chain`; the table printed at the end comes from this
//! run's Criterion estimates (quote ratios: the machines are noisy).
//!
//! * `tick`: one tick of a 60-bin window detector plus the alarm state
//!   machine (integer only).
//! * `fleet_event`: one event in a 1024-device silence fleet (O(1)), and a
//!   deadline query over the table (O(N)).
//! * `dead_time`: the UQ8.24 table against `DeadTime::correct` in f64
//!   (Lambert W) for a paralyzable counter.

use countward::Ticks;
use countward::alarm::{AlarmConfig, AlarmMachine, Faults};
use countward::deadtime::{CorrectionTable, DeadTime};
use countward::detect::{LevelThresholds, SilenceFleet, SilencePlan, WindowDetector};
use countward::fixed::FixedMean;
use countward::ticks::NextDeadline;
use criterion::Criterion;
use std::hint::black_box;
use std::time::Duration;

const PATTERN: [u32; 10] = [2, 1, 3, 2, 2, 1, 4, 2, 1, 2];

fn benches(c: &mut Criterion) {
    let mut g = c.benchmark_group("chain");
    g.warm_up_time(Duration::from_millis(300))
        .measurement_time(Duration::from_secs(1))
        .sample_size(20);

    let mut window = WindowDetector::<60>::new(
        FixedMean::from_counts(2).unwrap(),
        FixedMean::from_counts(1).unwrap(),
        10,
    )
    .unwrap();
    window.set_thresholds(
        LevelThresholds::new(170, 150, 200, 170, Some((60, 80))).unwrap(),
        FixedMean::from_counts(120).unwrap(),
    );
    let mut machine = AlarmMachine::<16>::new(AlarmConfig::new(2, 5, 5, 5).unwrap());
    let mut t = 0u32;
    g.bench_function("tick", |b| {
        b.iter(|| {
            t = t.wrapping_add(1);
            let c = window.tick(Ticks(t), black_box(PATTERN[t as usize % 10]));
            machine.update(Ticks(t), c, Faults::NONE);
            black_box(machine.active())
        })
    });
    let plan = SilencePlan::<32>::new(1e-6_f64, 6, 3600).unwrap();
    let mut fleet = SilenceFleet::<1024, 32>::new(plan);
    for d in 0..1024 {
        fleet.event(d, Ticks(0)).unwrap();
    }
    let mut n = 0u32;
    g.bench_function("fleet_event", |b| {
        b.iter(|| {
            n = n.wrapping_add(7);
            fleet
                .event(black_box(n as usize % 1024), Ticks(n / 64 + 1))
                .unwrap()
        })
    });
    g.bench_function("fleet_next_deadline_1024", |b| {
        b.iter(|| black_box(fleet.next_deadline()))
    });

    let model = DeadTime::paralyzable(1e-4_f64).unwrap();
    let table = CorrectionTable::<64>::new(&model, 1.0, 0.9).unwrap();
    let mut m = 0u32;
    g.bench_function("dead_time_table", |b| {
        b.iter(|| {
            m = (m + 37) % 3300;
            table.correct(black_box(m))
        })
    });
    let mut m2 = 0u32;
    g.bench_function("dead_time_f64_lambert", |b| {
        b.iter(|| {
            m2 = (m2 + 37) % 3300;
            model.correct(black_box(f64::from(m2))).unwrap().true_cps
        })
    });
    g.finish();
}

mod support;

/// Mean time of one benchmark of this group, in ns.
fn estimate_ns(bench: &str) -> Option<f64> {
    support::estimate_ns(&format!("chain/{bench}"))
}

fn main() {
    let mut c = Criterion::default().configure_from_args();
    benches(&mut c);
    c.final_summary();
    let get = |b| estimate_ns(b).unwrap_or(f64::NAN);
    println!("\nfirmware chain on this host (one run): mean time per call");
    println!(
        "  tick (60-bin window + alarm machine): {:.1} ns",
        get("tick")
    );
    println!(
        "  fleet event (1024 devices): {:.1} ns; next deadline over 1024: {:.0} ns",
        get("fleet_event"),
        get("fleet_next_deadline_1024")
    );
    println!(
        "  dead-time correction: table {:.1} ns, f64 Lambert W {:.1} ns ({:.1}x)",
        get("dead_time_table"),
        get("dead_time_f64_lambert"),
        get("dead_time_f64_lambert") / get("dead_time_table")
    );
}
