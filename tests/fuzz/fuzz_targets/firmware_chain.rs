//! The firmware chain driven by arbitrary tick jumps, counts, overload flags
//! and acknowledgements: window detector, saturation guard, CUSUM, adaptive
//! rate and alarm machine. No panic; the latched level never sits below the
//! active one; every event is delivered, queued or counted as dropped.
#![no_main]

use countward::Ticks;
use countward::alarm::{AlarmConfig, AlarmMachine, Fault, Faults};
use countward::detect::{
    CusumConfig, CusumDirection, PoissonCusum, SaturationGuard, ThresholdPlan, WindowDetector,
};
use countward::fixed::{FixedAlpha, FixedMean};
use countward::rate::{AdaptiveConfig, AdaptiveRate};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|d: &[u8]| {
    let plan = ThresholdPlan::new(
        FixedAlpha::one_in(10_000).unwrap(),
        FixedAlpha::one_in(1_000_000).unwrap(),
        FixedAlpha::one_in(100).unwrap(),
        FixedAlpha::one_in(1_000_000).unwrap(),
    )
    .unwrap();
    let mut window = WindowDetector::<10>::new(
        FixedMean::from_counts(2).unwrap(),
        FixedMean::from_ratio(1, 10).unwrap(),
        6,
    )
    .unwrap();
    let mut guard = SaturationGuard::with_enter_counts(1000).unwrap();
    let mut cusum =
        PoissonCusum::new(CusumConfig::new(16, 48, 128, 64, CusumDirection::Increase).unwrap());
    let mut display = AdaptiveRate::<64>::new(AdaptiveConfig::new(200, 16, 4).unwrap());
    let mut machine = AlarmMachine::<4>::new(AlarmConfig::new(2, 3, 2, 3).unwrap());
    let mut now = 0u32;
    let mut events = 0u64;
    for chunk in d.chunks_exact(6) {
        let op = chunk[0];
        let counts = u32::from_le_bytes(chunk[1..5].try_into().unwrap()) >> (chunk[5] % 32);
        now = now.wrapping_add(u32::from(op & 3));
        let t = Ticks(now);
        let c = window.tick(t, counts);
        if window.needs_refresh() {
            let _ = window.refresh(&plan);
        }
        let saturated = guard.update(
            window.window().sum_u32(),
            (op & 4 != 0).then_some(op & 8 != 0),
        );
        let _ = cusum.update(counts);
        let _ = display.add(t, counts);
        if display.needs_refresh() {
            let _ = display.refresh(FixedAlpha::one_in(1000).unwrap());
        }
        let faults = Faults::NONE.with(Fault::Saturated, saturated);
        machine.update(t, c, faults);
        if op & 16 != 0 {
            machine.acknowledge(t);
        }
        if op & 32 != 0 {
            while machine.poll_event().is_some() {
                events += 1;
            }
        }
        if op & 64 != 0 && guard.release(window.window().sum_u32()) {
            // released by a person
        }
        assert!(machine.latched() >= machine.active());
        let _ = display.reading(1.0_f64);
    }
    while machine.poll_event().is_some() {
        events += 1;
    }
    let _ = (events, machine.dropped_events());
});
