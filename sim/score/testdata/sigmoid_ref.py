#!/usr/bin/python3
"""Reference maximum-likelihood sigmoid fit for sim/score, independent of gonum.

Model: eff(s) = 1/(1+exp(-(log10 s - mu)/w)); binomial likelihood.
The MLE and the profile-likelihood intervals (2*dNLL = z^2 with
z = Phi^-1((1+cl)/2)) are found by nested golden-section searches
(Python standard library only).  Run: /usr/bin/python3 sigmoid_ref.py
"""
import math
from statistics import NormalDist

U = [-11.2, -11.0, -10.8, -10.6, -10.4, -10.2]   # log10 of the bias step (s)
N = [50] * 6
K = [2, 6, 17, 31, 44, 49]
CL = 0.6827
LN9 = math.log(9)


def softplus(x):
    return x + math.log1p(math.exp(-x)) if x > 0 else math.log1p(math.exp(x))


def nll(mu, w):
    f = 0.0
    for u, n, k in zip(U, N, K):
        z = (u - mu) / w
        f += k * softplus(-z) + (n - k) * softplus(z)
    return f


def golden(f, a, b, tol=1e-12):
    g = (math.sqrt(5) - 1) / 2
    c, d = b - g * (b - a), a + g * (b - a)
    fc, fd = f(c), f(d)
    while b - a > tol:
        if fc < fd:
            b, d, fd = d, c, fc
            c = b - g * (b - a)
            fc = f(c)
        else:
            a, c, fc = c, d, fd
            d = a + g * (b - a)
            fd = f(d)
    x = (a + b) / 2
    return x, f(x)


def profile(q, c):
    # min over ln w of NLL(q - c*w, w)
    lw, v = golden(lambda lw: nll(q - c * math.exp(lw), math.exp(lw)), math.log(1e-3), math.log(5))
    return v, math.exp(lw)


mu, fmin = golden(lambda m: profile(m, 0)[0], -12, -9)
_, w = profile(mu, 0)
z = NormalDist().inv_cdf((1 + CL) / 2)
delta = z * z / 2


def root(f, a, b):
    # f(a) < 0 < f(b) or reverse; bisection
    fa = f(a)
    for _ in range(200):
        m = (a + b) / 2
        if (f(m) < 0) == (fa < 0):
            a, fa = m, f(m)
        else:
            b = m
    return (a + b) / 2


out = {"mu": mu, "w": w}
for name, c in (("h50", 0.0), ("h90", LN9)):
    q0 = mu + c * w
    g = lambda q: profile(q, c)[0] - fmin - delta
    lo = root(g, q0 - 1, q0)
    hi = root(g, q0, q0 + 1)
    out[name] = 10 ** q0
    out[name + "_low"] = 10 ** lo
    out[name + "_high"] = 10 ** hi
for k, v in out.items():
    print(f"{k} {v:.12g}")
