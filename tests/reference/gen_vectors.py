#!/usr/bin/env python3
"""High-precision reference vectors for countward's Poisson tails and count
thresholds, computed with mpmath (PyPI package `mpmath`) at 40 significant
digits. Run from the repository root:

    python3 tests/reference/gen_vectors.py

Writes tests/reference/poisson_tails.csv and tests/reference/thresholds.csv.
Tails are positive-term sums started at the pmf, which mpmath's loggamma gives
to 40 digits (mpmath.gammainc gives up on arguments this large):
P(N >= k) = p(k) * sum_j prod_{i=1..j} mu/(k+i) for k > mu and
P(N <= k) = p(k) * sum_j prod_{i=0..j-1} (k-i)/mu for k < mu, each side's
complement by subtraction at 40 digits. Spot-checked against
mpmath.gammainc (regularized, DLMF 8.4.10) where that converges. Thresholds are found by integer
search on those tails; `margin` is the relative distance of alpha from the
nearest tail value at the answer, so tests can treat near ties as such.
"""
import csv
import math
import mpmath as mp

mp.mp.dps = 40

MEANS = ["1e-9", "1e-6", "1e-3", "0.1", "0.5", "1", "3", "10", "24.5", "30",
         "100", "1000", "1e4", "1e5", "1e6", "1e7", "1e8"]
ZS = [-40, -20, -10, -7, -5, -3, -1, -0.3, 0, 0.3, 1, 3, 5, 7, 10, 20, 40, 80]


def pmf(k, mu):
    return mp.exp(k * mp.log(mu) - mu - mp.loggamma(k + 1))


EPS = mp.mpf(10) ** -44


def upper_direct(k, mu):  # P(N >= k) for k > mu
    term = mp.mpf(1)
    total = mp.mpf(1)
    j = 0
    while term > EPS * total:
        j += 1
        term = term * mu / (k + j)
        total += term
    return pmf(k, mu) * total


def lower_direct(k, mu):  # P(N <= k) for k < mu
    term = mp.mpf(1)
    total = mp.mpf(1)
    for j in range(k):
        term = term * (k - j) / mu
        total += term
        if term < EPS * total:
            break
    return pmf(k, mu) * total


def upper(k, mu):  # P(N >= k)
    if k == 0:
        return mp.mpf(1)
    if k > mu:
        return upper_direct(k, mu)
    return 1 - lower_direct(k - 1, mu)


def lower(k, mu):  # P(N <= k)
    if k < mu:
        return lower_direct(k, mu)
    return 1 - upper_direct(k + 1, mu)


def spot_check():
    for k, mu in [(5, "1"), (30, "10"), (150, "100"), (3, "7.5"), (1200, "1000")]:
        mu = mp.mpf(mu)
        ref = mp.gammainc(k, 0, mu, regularized=True)
        assert abs(upper(k, mu) / ref - 1) < mp.mpf(10) ** -30, (k, mu)
        ref = mp.gammainc(k + 1, mu, mp.inf, regularized=True)
        assert abs(lower(k, mu) / ref - 1) < mp.mpf(10) ** -30, (k, mu)


def fmt(x):
    return mp.nstr(x, 20, min_fixed=1, max_fixed=0) if x != 0 else "0"


def tails():
    rows = []
    for m in MEANS:
        mu = mp.mpf(m)
        s = mp.sqrt(mu)
        ks = {0, 1, 2, 3, 5, 10, 30, 100, 300}
        for z in ZS:
            k = int(mp.floor(mu + z * s))
            if 0 <= k < 2**32:
                ks.add(k)
        for k in sorted(ks):
            if k > 20 * float(mu) + 2000:
                continue
            g = upper(k, mu)
            f = lower(k, mu)
            rows.append([m, k, "at_least", fmt(g), fmt(mp.log(g)) if g > 0 else "-inf"])
            rows.append([m, k, "at_most", fmt(f), fmt(mp.log(f)) if f > 0 else "-inf"])
    with open("tests/reference/poisson_tails.csv", "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["mean", "k", "side", "p", "ln_p"])
        w.writerows(rows)


def first_true(lo, hi, pred):
    # smallest n in (lo, hi] with pred(n); pred(hi) must hold
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if pred(mid):
            hi = mid
        else:
            lo = mid
    return hi


ALPHAS = ["0.5", "0.05", "1e-3", "1e-6", "1e-9", "1e-12", "1e-20", "1e-100", "1e-300"]


def thresholds():
    rows = []
    for m in MEANS:
        mu = mp.mpf(m)
        s = float(mp.sqrt(mu))
        for a in ALPHAS:
            alpha = mp.mpf(a)
            # alarm: smallest n >= 1 with P(N >= n) <= alpha
            hi = int(float(mu) + 10 + 5 * s)
            while upper(hi, mu) > alpha:
                hi = 2 * hi
            n = first_true(0, hi, lambda n: n >= 1 and upper(n, mu) <= alpha)
            g_at, g_before = upper(n, mu), upper(n - 1, mu)
            margin = min(abs(g_at / alpha - 1), abs(g_before / alpha - 1))
            rows.append([m, a, "alarm", n, mp.nstr(margin, 3)])
            # fault: largest n with P(N <= n) <= alpha, or none
            if lower(0, mu) > alpha:
                rows.append([m, a, "fault", "none", mp.nstr(abs(lower(0, mu) / alpha - 1), 3)])
                continue
            hi = int(float(mu) + 10 + 5 * s)
            first_over = first_true(-1, hi, lambda n: lower(n, mu) > alpha)
            n = first_over - 1
            margin = min(abs(lower(n, mu) / alpha - 1), abs(lower(n + 1, mu) / alpha - 1))
            rows.append([m, a, "fault", n, mp.nstr(margin, 3)])
    with open("tests/reference/thresholds.csv", "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["mean", "alpha", "kind", "counts", "margin"])
        w.writerows(rows)


if __name__ == "__main__":
    spot_check()
    tails()
    thresholds()
