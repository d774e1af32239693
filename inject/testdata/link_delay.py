#!/usr/bin/python3
"""Reference values for inject.IndexWall.Link (TestLinkDelayPython).

Independent computation in Python/numpy of the excess delay
(1/c) * integral of (n - 1) dl along a straight line of sight through a moving
planar wall, n - 1 = eta * s(-x/d), x = N.r - v (t - T0):
  * closed form with math.erf / math.tanh / numpy.logaddexp (physics.md sec. 6), and
  * composite Simpson quadrature of n - 1 evaluated at 2e6+1 points of the
    space-time path (numpy), which must agree with it to 1e-9.
Run: /usr/bin/python3 link_delay.py > link_delay.csv
"""
import math
import numpy as np

C = 299792458.0
SQRT_PI = math.sqrt(math.pi)


def shape(p, u):
    if p == "gaussian":
        return np.exp(-u * u)
    if p == "kink":
        return -1.0 / np.cosh(u) ** 2
    if p == "tophat":
        return np.where(np.abs(u) < 0.5, 1.0, np.where(np.abs(u) == 0.5, 0.5, 0.0))
    if p == "kink-linear":
        return 1.0 + np.tanh(u)
    raise ValueError(p)


def antider(p, u):
    if p == "gaussian":
        return 0.5 * SQRT_PI * math.erf(u)
    if p == "kink":
        return -math.tanh(u)
    if p == "tophat":
        return min(max(u + 0.5, 0.0), 1.0)
    if p == "kink-linear":
        return float(np.logaddexp(0.0, 2.0 * u))
    raise ValueError(p)


def cases():
    sat = np.array([15.3e6, -3.1e6, 21.2e6])
    sta = np.array([4.33e6, 0.57e6, 4.63e6])
    tr = 1000.0
    te = tr - np.linalg.norm(sat - sta) / C
    n = np.array([0.3, 0.5, 0.81])
    n /= np.linalg.norm(n)
    mid = 0.5 * (sat + sta)
    tm = 0.5 * (te + tr)
    for p in ("gaussian", "kink", "tophat", "kink-linear"):
        for name, d, v, q in (("between", 3e6, 3e5, mid), ("emitter", 3e6, 3e5, sat),
                              ("receiver", 3e6, 3e5, sta), ("wide", 4e7, 4e5, mid)):
            t0 = tm - n.dot(q) / v
            yield p, name, sat, te, sta, tr, n, v, d, t0, 2e-17


def main():
    print("profile,case,ex,ey,ez,te,rx,ry,rz,tr,nx,ny,nz,v,d,t0,eta,delay_s")
    for p, name, re, te, rr, tr, n, v, d, t0, eta in cases():
        L = np.linalg.norm(rr - re)
        xe = n.dot(re) - v * (te - t0)
        xr = n.dot(rr) - v * (tr - t0)
        ue, ur = -xe / d, -xr / d
        closed = L / C * eta * (antider(p, ur) - antider(p, ue)) / (ur - ue)
        # Simpson on the space-time path
        m = 2_000_000
        lam = np.linspace(0.0, 1.0, m + 1)
        r = re[None, :] + lam[:, None] * (rr - re)[None, :]
        t = te + lam * (tr - te)
        x = r.dot(n) - v * (t - t0)
        f = eta * shape(p, -x / d)
        w = np.ones(m + 1)
        w[1:-1:2] = 4.0
        w[2:-1:2] = 2.0
        quad = L / C * (w * f).sum() / (3.0 * m)
        tol = 1e-9 if p != "tophat" else 1e-5  # Simpson converges slowly across the top-hat edges
        assert abs(quad / closed - 1) < tol, (p, name, quad, closed)
        vals = [*re, te, *rr, tr, *n, v, d, t0, eta, closed]
        print(p + "," + name + "," + ",".join(repr(float(x)) for x in vals))


main()
