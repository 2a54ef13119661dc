//! Integer-only tier (in progress).
