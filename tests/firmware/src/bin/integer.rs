//! Runs countward's integer-only thresholds on a Cortex-M0 (no FPU) under
//! QEMU, checks them against mpmath reference values
//! (`tests/reference/thresholds.csv`), prints each with its instruction
//! count, and exits through semihosting with status 0 only if all agree.
//!
//! This binary must link no soft-float routine (`__aeabi_f*`, `__aeabi_d*`);
//! `.ci/run` checks its symbols with `llvm-nm`.

#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use cortex_m_semihosting::hprintln;
use countward::fixed::{FixedAlpha, FixedMean, alarm_threshold, fault_threshold};
use countward_firmware_checks::{exit, instructions, start_counter, ticks};

/// (mean in counts, α = 1/n, alarm threshold, fault threshold) from
/// tests/reference/thresholds.csv (mpmath, 40 digits); none of these is
/// within 1e-4 of a tie.
const CASES: [(u32, u64, u32, Option<u32>); 9] = [
    (1, 1_000, 6, None),
    (1, 1_000_000, 10, None),
    (10, 1_000, 22, Some(1)),
    (10, 1_000_000_000, 35, None),
    (1000, 1_000_000, 1155, Some(852)),
    (1000, 1_000_000_000_000, 1231, Some(785)),
    (100_000, 1_000, 100_980, Some(99_023)),
    (100_000, 1_000_000_000_000, 102_234, Some(97_783)),
    (10_000_000, 1_000_000, 10_015_036, Some(9_984_971)),
];

#[entry]
fn main() -> ! {
    start_counter();

    let mut failures = 0u32;
    for &(mean, one_in, alarm, fault) in CASES.iter() {
        let m = FixedMean::from_counts(black_box(mean)).unwrap();
        let a = FixedAlpha::one_in(black_box(one_in)).unwrap();
        let t0 = ticks();
        let got_alarm = alarm_threshold(m, a).map(|t| t.counts);
        let t1 = ticks();
        let got_fault = fault_threshold(m, a).map(|t| t.map(|t| t.counts));
        let t2 = ticks();
        // SysTick counts down.
        let i_alarm = instructions(t0, t1);
        let i_fault = instructions(t1, t2);
        let ok = got_alarm == Ok(alarm) && got_fault == Ok(fault);
        if !ok {
            failures += 1;
        }
        hprintln!(
            "mean {} alpha 1/{}: alarm {:?} (want {}) ~{} instructions; fault {:?} (want {:?}) ~{} instructions {}",
            mean,
            one_in,
            got_alarm,
            alarm,
            i_alarm,
            got_fault,
            fault,
            i_fault,
            if ok { "ok" } else { "MISMATCH" }
        );
    }
    if failures == 0 {
        hprintln!(
            "integer tier on Cortex-M0: all {} cases agree with mpmath",
            CASES.len()
        );
    } else {
        hprintln!("integer tier on Cortex-M0: {} cases disagree", failures);
    }
    exit(failures == 0)
}
