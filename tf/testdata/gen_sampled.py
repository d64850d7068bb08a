#!/usr/bin/env python3
"""Golden values for the discretization tests of package tf.

Run from this directory:  python3 gen_sampled.py > sampled_golden.json
(python3 + mpmath 1.3; 50 significant digits, stored with 17).

Everything here is computed without state space or matrix exponentials, by
residues (partial fractions) of the Laplace transforms, so it is an
independent route to what tf.Discretize computes:

* step / ramp samples: y(t) = sum over the poles of H(s) = G(s)/s^k of
  Res[H(s) e^{st}], k = 1 (step) or 2 (ramp), evaluated at t = kT - delay
  (0 for t < 0). The residue at a pole of order m is
  (1/(m-1)!) d^{m-1}/ds^{m-1} [(s-p)^m H(s) e^{st}] at p; the only multiple
  pole used is s = 0, where mpmath.diff takes the derivative at high
  precision. The zero-order-hold equivalent reproduces the step samples
  exactly (step invariance) and the triangle-hold (first-order-hold)
  equivalent the ramp samples (ramp invariance), dead time included.
* ZOH coefficients for distinct non-zero poles p_i:
  G_d(z) = G(0) + sum_i r_i (z-1)/(z - e^{p_i T}), r_i = N(p_i)/(D'(p_i) p_i),
  the z-transform of the sampled step response times (1 - z^-1); combined
  over the monic denominator prod (z - e^{p_i T}).
"""
import json
from mpmath import mp, mpf, mpc, polyroots, exp, diff, factorial, nstr

mp.dps = 50


def pval(c, x):
    v = 0
    for a in c:
        v = v * x + a
    return v


def pder(c):
    n = len(c) - 1
    return [a * (n - i) for i, a in enumerate(c[:-1])]


def mp_list(c):
    return [mpf(str(a)) for a in c]


def strip_zero_roots(den):
    l = 0
    while den[-1 - l] == 0:
        l += 1
    return l, den[: len(den) - l]


def response(num, den, k, t):
    """Response of N/D to 1/s^k input (k=1 step, k=2 ramp) at time t >= 0."""
    num, den = mp_list(num), mp_list(den)
    l, den1 = strip_zero_roots(den)
    m = k + l
    f0 = lambda s: pval(num, s) * exp(s * t) / pval(den1, s)
    y = diff(f0, 0, m - 1) / factorial(m - 1)
    poles = polyroots(den1, maxsteps=500, extraprec=200) if len(den1) > 1 else []
    d1 = pder(den1)
    for p in poles:
        # D = s^l·D1, so D'(p) = p^l·D1'(p) at a root p of D1.
        y += pval(num, p) / (pval(d1, p) * p ** (k + l)) * exp(p * t)
    return y.real if isinstance(y, mpc) else y


def samples(num, den, delay, T, k, count):
    out = []
    for i in range(count):
        t = i * mpf(str(T)) - mpf(str(delay))
        out.append(response(num, den, k, t) if t >= 0 else mpf(0))
    return out


def polymul(a, b):
    out = [mpc(0)] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        for j, y in enumerate(b):
            out[i + j] += x * y
    return out


def zoh_coeffs(num, den, T):
    num, den = mp_list(num), mp_list(den)
    T = mpf(str(T))
    poles = polyroots(den, maxsteps=500, extraprec=200)
    lead = den[0]
    d1 = pder(den)
    g0 = pval(num, 0) / pval(den, 0)
    zp = [exp(p * T) for p in poles]
    dz = [mpc(1)]
    for q in zp:
        dz = polymul(dz, [1, -q])
    nz = [g0 * c for c in dz]
    for i, p in enumerate(poles):
        r = pval(num, p) / (pval(d1, p) * p)
        term = [mpc(r), -r]  # r (z - 1)
        for j, q in enumerate(zp):
            if j != i:
                term = polymul(term, [1, -q])
        # align: term has degree n (same as dz)
        for idx in range(len(term)):
            nz[idx] += term[idx]
    nz = [c.real for c in nz]
    # drop the (exactly zero) z^n coefficient of a strictly proper G
    if len(num) < len(den):
        nz = nz[1:]
    return nz, [c.real for c in dz]


def f17(x):
    return float(nstr(x, 17, strip_zeros=False))


cases = {"step_samples": [], "ramp_samples": [], "zoh_coeffs": []}

step_cases = [
    ("third order, no dead time", [1, 3], [1, 1.4, 4.4, 4], 0, 0.1, 40),
    ("third order, fractional dead time 2.5 periods", [1, 3], [1, 1.4, 4.4, 4], 0.25, 0.1, 40),
    ("integrator, dead time 2.6 periods", [2], [1, 7, 10, 0], 0.13, 0.05, 40),
    ("biproper lead, dead time 0.3 periods", [1, 0.5], [1, 2], 0.03, 0.1, 20),
]
for name, num, den, delay, T, count in step_cases:
    cases["step_samples"].append({
        "name": name, "num": num, "den": den, "delay": delay, "T": T,
        "y": [f17(v) for v in samples(num, den, delay, T, 1, count)],
    })

ramp_cases = [
    ("third order", [1, 3], [1, 1.4, 4.4, 4], 0, 0.1, 40),
    ("biproper lead", [1, 0.5], [1, 2], 0, 0.1, 20),
    ("integrator", [2], [1, 7, 10, 0], 0, 0.05, 40),
    ("third order, fractional dead time 2.5 periods", [1, 3], [1, 1.4, 4.4, 4], 0.25, 0.1, 40),
    ("biproper lead, dead time 0.3 periods", [1, 0.5], [1, 2], 0.03, 0.1, 20),
    ("integrator, dead time 2.6 periods", [2], [1, 7, 10, 0], 0.13, 0.05, 40),
]
for name, num, den, delay, T, count in ramp_cases:
    cases["ramp_samples"].append({
        "name": name, "num": num, "den": den, "delay": delay, "T": T,
        "y": [f17(v) for v in samples(num, den, delay, T, 2, count)],
    })

zoh_cases = [
    ("fourth order, T = 0.1", [24], [1, 10, 35, 50, 24], 0.1),
    ("fourth order, T = 0.001 (fast sampling)", [24], [1, 10, 35, 50, 24], 0.001),
    ("third order with zero", [1, 3], [1, 1.4, 4.4, 4], 0.1),
    ("biproper", [2, 1, 3], [1, 3, 5], 0.2),
    ("sixth order, wide pole spread", [1e4], [1, 111.3, 1131.6, 1372.5, 267.6, 15.6, 0.3], 0.05),
]
for name, num, den, T in zoh_cases:
    nz, dz = zoh_coeffs(num, den, T)
    cases["zoh_coeffs"].append({
        "name": name, "num": num, "den": den, "T": T,
        "num_z": [f17(v) for v in nz], "den_z": [f17(v) for v in dz],
    })

print(json.dumps(cases, indent=1))
