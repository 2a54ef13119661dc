#!/usr/bin/env python3
"""Coefficients and check values for the small-shape incomplete gamma method
of countward (src/math/small_shape.rs), computed with mpmath (PyPI package
`mpmath`) at 50 significant digits. Run from the repository root:

    python3 tests/reference/gen_small_shape.py

1. Prints the coefficients (zeta(k) - 1)/k, k = 2..40, of Abramowitz & Stegun
   (1964) eq. 6.1.33,
       ln Gamma(1 + a) = -ln(1 + a) + a (1 - gamma) + sum_k (-1)^k (zeta(k) - 1)/k a^k,
   as a Rust array (pasted into src/math/small_shape.rs).
2. Writes tests/reference/small_shape.csv: P(a, x), Q(a, x) (regularized,
   DLMF 8.2.4) for shapes a < 1 and small-shape inverses x = P^-1(a, p),
   x = Q^-1(a, q), each to 20 significant digits, for tests/reference_vectors.rs.
   P and Q for x < 2 come from the power series summed at 400 digits (so that
   1 - P keeps its digits for the tiniest shapes), beyond from mpmath.gammainc;
   the two agree to 20 digits where both are fast (checked by `--check`).
   Values are "computed (mpmath, this generator)", not published.
"""
import csv
import mpmath as mp

mp.mp.dps = 50


def coefficients():
    out = []
    for k in range(2, 41):
        out.append(mp.nstr((mp.zeta(k) - 1) / k, 20, min_fixed=-30, max_fixed=30))
    return out


def p_series(a, x):
    """P(a, x) = x^a/Gamma(a+1) * sum_n (-x)^n a/(n! (a+n)) (DLMF 8.7.1 form),
    summed at 400 digits so that 1 - P keeps 20 digits even for a = 1e-300."""
    with mp.workdps(400):
        a, x = mp.mpf(a), mp.mpf(x)
        s, term, n = mp.mpf(0), mp.mpf(1), 0
        while True:
            t = term * a / (a + n)
            s += t
            if abs(t) < mp.mpf(10) ** -390 * abs(s):
                break
            n += 1
            term *= -x / n
        pv = mp.exp(a * mp.log(x) - mp.loggamma(a + 1)) * s
        return +pv, +(1 - pv)


def q(a, x):
    if x < 2:
        return p_series(a, x)[1]
    return mp.gammainc(a, x, mp.inf, regularized=True)


def p(a, x):
    if x < 2:
        return p_series(a, x)[0]
    return mp.gammainc(a, 0, x, regularized=True)


SHAPES = ["1e-300", "1e-100", "2.0654e-12", "1e-9", "1e-6", "3e-4", "3e-3", "0.01",
          "0.1", "0.25", "0.5", "0.75", "0.9", "0.999"]
XS = ["1e-300", "1e-100", "1.0327e-12", "1e-9", "1e-6", "1e-3", "0.05", "0.3",
      "0.56", "0.9", "1.2", "1.49", "1.6", "3", "10", "50", "300"]
PROBS = ["1e-300", "1e-30", "1e-10", "1e-3", "0.1", "0.5", "0.9", "0.999999"]


def main():
    print("const LN_GAMMA_1P_ZETA: [f64; %d] = [" % 39)
    for c in coefficients():
        print("    %s," % c)
    print("];")
    with open("tests/reference/small_shape.csv", "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["kind", "a", "x_or_p", "value"])
        for a in SHAPES:
            for x in XS:
                av, xv = mp.mpf(a), mp.mpf(x)
                w.writerow(["p", a, x, mp.nstr(p(av, xv), 20)])
                w.writerow(["q", a, x, mp.nstr(q(av, xv), 20)])
        for a in SHAPES:
            av = mp.mpf(a)
            for pr in PROBS:
                pv = mp.mpf(pr)
                for kind, f in (("p_inv", p), ("q_inv", q)):
                    # Solve in log x: f(a, e^u) = pv (bracketed by findroot's anderson).
                    def g(u):
                        return mp.log(f(av, mp.exp(u))) - mp.log(pv)
                    lo, hi = mp.mpf(-2e5), mp.mpf(800)
                    glo, ghi = g(lo), g(hi)
                    if glo * ghi > 0:
                        continue  # root outside [e^-2e5, e^800]: not in double range
                    for _ in range(120):
                        mid = (lo + hi) / 2
                        gm = g(mid)
                        if (gm > 0) == (glo > 0):
                            lo, glo = mid, gm
                        else:
                            hi = mid
                    root = mp.exp((lo + hi) / 2)
                    w.writerow([kind, a, pr, mp.nstr(root, 20)])


def check():
    for a in ["1e-3", "0.1", "0.5", "0.9"]:
        for x in ["1e-3", "0.3", "1.2", "1.9"]:
            av, xv = mp.mpf(a), mp.mpf(x)
            ref = mp.gammainc(av, xv, mp.inf, regularized=True)
            assert abs(p_series(av, xv)[1] / ref - 1) < mp.mpf(10) ** -30, (a, x)
    print("series and gammainc agree")


if __name__ == "__main__":
    import sys
    if "--check" in sys.argv:
        check()
    else:
        main()
