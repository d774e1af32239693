#!/usr/bin/python3
"""Reference binomial intervals for sim/score tests, independent of gonum.

Clopper-Pearson bounds are found by bisection on exact binomial tail sums
(math.comb, Python standard library): the lower bound p_L solves
P(X >= k | n, p_L) = alpha/2, the upper bound p_U solves
P(X <= k | n, p_U) = alpha/2.  Wilson uses the closed form with z from
statistics.NormalDist.  Run: /usr/bin/python3 intervals.py > intervals.csv
"""
import math
from statistics import NormalDist

CASES = [(0, 10), (5, 10), (10, 10), (95, 100), (81, 263), (15, 148),
         (0, 20), (1, 29), (1, 10), (3, 50), (49, 50)]
CLS = [0.95, 0.9, 0.6827]


def tail_ge(k, n, p):
    return sum(math.comb(n, j) * p**j * (1 - p)**(n - j) for j in range(k, n + 1))


def tail_le(k, n, p):
    return sum(math.comb(n, j) * p**j * (1 - p)**(n - j) for j in range(0, k + 1))


def bisect(f, lo, hi):
    # f(lo) < 0 < f(hi)
    for _ in range(200):
        mid = (lo + hi) / 2
        if f(mid) < 0:
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2


def cp(k, n, cl):
    a = 1 - cl
    lo = 0.0 if k == 0 else bisect(lambda p: tail_ge(k, n, p) - a / 2, 0.0, 1.0)
    hi = 1.0 if k == n else bisect(lambda p: a / 2 - tail_le(k, n, p), 0.0, 1.0)
    return lo, hi


def wilson(k, n, cl):
    z = NormalDist().inv_cdf(1 - (1 - cl) / 2)
    p = k / n
    c = (p + z * z / (2 * n)) / (1 + z * z / n)
    h = z / (1 + z * z / n) * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    return max(0.0, c - h), min(1.0, c + h)


print("k,n,cl,wilson_low,wilson_high,cp_low,cp_high")
for CL in CLS:
    for k, n in CASES:
        wl, wh = wilson(k, n, CL)
        cl_, ch = cp(k, n, CL)
        print(f"{k},{n},{CL},{wl:.12f},{wh:.12f},{cl_:.12f},{ch:.12f}")
