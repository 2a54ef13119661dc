#![doc = include_str!("../README.md")]
#![no_std]
#![forbid(unsafe_code)]
#![deny(missing_docs)]

#[cfg(feature = "std")]
extern crate std;

pub mod alarm;
pub mod deadtime;
pub mod detect;
pub mod error;
pub mod fixed;
pub mod gap;
#[cfg(feature = "embedded-hal")]
pub mod hal;
pub mod math;
pub mod plan;
pub mod poisson;
pub mod rate;
mod search;
pub mod ticks;

pub use error::{Error, Param};
pub use math::Real;
pub use ticks::Ticks;
