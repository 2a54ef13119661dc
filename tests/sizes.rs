//! State sizes are part of the API. These are the sizes on this host; the
//! 32-bit sizes documented in the module docs are asserted at compile time
//! by the Cortex-M0 check binary (`tests/firmware/src/bin/chain.rs`).

use core::mem::size_of;
use countward::alarm::{AlarmMachine, Event};
use countward::deadtime::CorrectionTable;
use countward::detect::{DeviceSlot, LevelThresholds, PoissonCusum, SaturationGuard, SilencePlan};
use countward::rate::{BinWindow, SmoothedRate};

#[test]
fn sizes_that_do_not_depend_on_the_pointer_width() {
    assert_eq!(size_of::<DeviceSlot>(), 16, "the fleet's per-device goal");
    assert_eq!(size_of::<SmoothedRate>(), 16);
    assert_eq!(size_of::<PoissonCusum>(), 24);
    assert_eq!(size_of::<SaturationGuard>(), 8);
    assert_eq!(size_of::<LevelThresholds>(), 28);
    assert_eq!(size_of::<Event>(), 8);
    assert_eq!(size_of::<SilencePlan<16>>(), 8 * 16 + 8);
    assert_eq!(size_of::<CorrectionTable<64>>(), 4 * 64 + 16);
}

#[cfg(target_pointer_width = "64")]
#[test]
fn sizes_on_64_bit_hosts() {
    // One usize more than on 32-bit targets, padded to 8.
    assert_eq!(size_of::<BinWindow<100>>(), 4 * 100 + 24);
    assert_eq!(size_of::<AlarmMachine<8>>(), 56 + 8 * 8);
}
