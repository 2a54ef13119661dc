#![doc = include_str!("../README.md")]
#![no_std]
#![forbid(unsafe_code)]
#![deny(missing_docs)]

#[cfg(feature = "std")]
extern crate std;

pub mod error;
pub mod fixed;
pub mod gap;
pub mod math;
pub mod poisson;
mod search;

pub use error::{Error, Param};
pub use math::Real;
