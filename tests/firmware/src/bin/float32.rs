//! The f32 tier on a Cortex-M0, where every float operation is a soft-float
//! call: same cases as `integer`, for comparing cost. `.ci/run` also checks
//! that this binary *does* contain `__aeabi_f*` symbols, which shows the
//! symbol check on `integer` can see soft-float code when it is there.

#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use cortex_m_semihosting::hprintln;
use countward::poisson::{alarm_threshold, fault_threshold};
use countward_firmware_checks::{exit, instructions, start_counter, ticks};

/// (mean, α, alarm, fault) from tests/reference/thresholds.csv (mpmath).
const CASES: [(f32, f32, u32, Option<u32>); 5] = [
    (1.0, 1e-3, 6, None),
    (10.0, 1e-3, 22, Some(1)),
    (1000.0, 1e-6, 1155, Some(852)),
    (100_000.0, 1e-12, 102_234, Some(97_783)),
    (10_000_000.0, 1e-6, 10_015_036, Some(9_984_971)),
];

#[entry]
fn main() -> ! {
    start_counter();
    let mut failures = 0u32;
    for &(mean, alpha, alarm, fault) in CASES.iter() {
        let t0 = ticks();
        let got_alarm = alarm_threshold(black_box(mean), black_box(alpha)).map(|t| t.counts);
        let t1 = ticks();
        let got_fault =
            fault_threshold(black_box(mean), black_box(alpha)).map(|t| t.map(|t| t.counts));
        let t2 = ticks();
        let i_alarm = instructions(t0, t1);
        let i_fault = instructions(t1, t2);
        let ok = got_alarm == Ok(alarm) && got_fault == Ok(fault);
        failures += u32::from(!ok);
        hprintln!(
            "f32 mean {} alpha {}: alarm {:?} ~{} instructions; fault {:?} ~{} instructions {}",
            mean,
            alpha,
            got_alarm,
            i_alarm,
            got_fault,
            i_fault,
            if ok { "ok" } else { "MISMATCH" }
        );
    }
    exit(failures == 0)
}
