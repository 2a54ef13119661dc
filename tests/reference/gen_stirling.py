#!/usr/bin/env python3
"""Loader's Stirling-series error stirlerr(a) = ln Gamma(a+1) - [(a+1/2) ln a - a + ln sqrt(2 pi)]
at a = 1/2, 1, 3/2, ..., 15, with mpmath at 40 digits (mpmath from PyPI).
Prints a Rust array; also Q32.32 fixed-point values for the integer tier.
Run: python3 tests/reference/gen_stirling.py"""
import mpmath as mp
mp.mp.dps = 40
def stirlerr(a):
    a = mp.mpf(a)
    return mp.loggamma(a + 1) - ((a + mp.mpf(1) / 2) * mp.log(a) - a + mp.log(mp.sqrt(2 * mp.pi)))
print("f64 (index i is a = i/2, i = 1..30):")
for i in range(1, 31):
    print(f"    {float(stirlerr(mp.mpf(i) / 2)):.17e},")
print("Q32.32 at integers a = 1..15:")
for n in range(1, 16):
    print(f"    {int(mp.nint(stirlerr(n) * 2**32))},")
