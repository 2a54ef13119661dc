//! Shared pieces of the on-target check binaries: an instruction counter
//! from SysTick under QEMU's `-icount`, the exit, and the panic handler.

#![no_std]

use core::panic::PanicInfo;
use cortex_m::peripheral::syst::SystClkSource;
use cortex_m_semihosting::debug;

/// SysTick ticks per instruction × 1000 at `-icount shift=2` on the 16 MHz micro:bit model
/// (4 ns of virtual time per instruction × 16 MHz = 0.064).
const MILLITICKS_PER_INSTRUCTION: u64 = 64;

/// Starts SysTick from the core clock, counting down over 24 bits.
pub fn start_counter() {
    let mut p = cortex_m::Peripherals::take().unwrap();
    p.SYST.set_clock_source(SystClkSource::Core);
    p.SYST.set_reload(0x00FF_FFFF);
    p.SYST.clear_current();
    p.SYST.enable_counter();
}

/// The current SysTick value.
pub fn ticks() -> u32 {
    cortex_m::peripheral::SYST::get_current() & 0x00FF_FFFF
}

/// Instructions between two `ticks()` readings (SysTick counts down; spans
/// under 2^24 ticks, i.e. about 2.6e8 instructions).
pub fn instructions(start: u32, end: u32) -> u64 {
    u64::from(start.wrapping_sub(end) & 0x00FF_FFFF) * 1000 / MILLITICKS_PER_INSTRUCTION
}

/// Ends the QEMU run with success or failure.
pub fn exit(ok: bool) -> ! {
    debug::exit(if ok {
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
    exit(false)
}
