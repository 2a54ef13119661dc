//! The f32 tier on a Cortex-M0, where every float operation is a soft-float
//! call: same cases as `integer`, for comparing cost. `.ci/run` also checks
//! that this binary *does* contain `__aeabi_f*` symbols, which shows the
//! symbol check on `integer` can see soft-float code when it is there.

#![no_std]
#![no_main]

use core::hint::black_box;
use core::panic::PanicInfo;
use cortex_m::peripheral::syst::SystClkSource;
use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hprintln};
use countward::poisson::{alarm_threshold, fault_threshold};

/// (mean, α, alarm, fault) from tests/reference/thresholds.csv (mpmath).
const CASES: [(f32, f32, u32, Option<u32>); 5] = [
    (1.0, 1e-3, 6, None),
    (10.0, 1e-3, 22, Some(1)),
    (1000.0, 1e-6, 1155, Some(852)),
    (100_000.0, 1e-12, 102_234, Some(97_783)),
    (10_000_000.0, 1e-6, 10_015_036, Some(9_984_971)),
];

const MILLITICKS_PER_INSTRUCTION: u64 = 64;

fn ticks() -> u32 {
    cortex_m::peripheral::SYST::get_current() & 0x00FF_FFFF
}

#[entry]
fn main() -> ! {
    let mut p = cortex_m::Peripherals::take().unwrap();
    p.SYST.set_clock_source(SystClkSource::Core);
    p.SYST.set_reload(0x00FF_FFFF);
    p.SYST.clear_current();
    p.SYST.enable_counter();
    let mut failures = 0u32;
    for &(mean, alpha, alarm, fault) in CASES.iter() {
        let t0 = ticks();
        let got_alarm = alarm_threshold(black_box(mean), black_box(alpha)).map(|t| t.counts);
        let t1 = ticks();
        let got_fault =
            fault_threshold(black_box(mean), black_box(alpha)).map(|t| t.map(|t| t.counts));
        let t2 = ticks();
        let i_alarm =
            u64::from(t0.wrapping_sub(t1) & 0x00FF_FFFF) * 1000 / MILLITICKS_PER_INSTRUCTION;
        let i_fault =
            u64::from(t1.wrapping_sub(t2) & 0x00FF_FFFF) * 1000 / MILLITICKS_PER_INSTRUCTION;
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
    debug::exit(if failures == 0 {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    loop {
        cortex_m::asm::wfi();
    }
}

#[panic_handler]
fn panic(_: &PanicInfo) -> ! {
    debug::exit(debug::EXIT_FAILURE);
    loop {
        cortex_m::asm::wfi();
    }
}
