#!/usr/bin/env python3
"""Exact step and impulse references for package response, by partial
fractions in mpmath (50 significant digits), written to reference.json.

    python3 gen_reference.py > reference.json

Every system is T(s) = num/den with distinct poles (checked). The inputs are
the double-precision coefficients written to the JSON (Python floats are
converted to mpf exactly), so the references belong to exactly the data the
Go tests read.

Partial fractions (distinct poles p_i, residues r_i = num(p_i)/den'(p_i) of
the strictly proper part, direct term D):
    impulse  h(t) = D*delta(t) + sum r_i exp(p_i t)
    step     y(t) = T(0) + sum num(p_i)/(den'(p_i) p_i) exp(p_i t)
Step metrics (definitions of ../../shared/refcases/README.md, Conventions):
levels, extrema and band exits are bracketed on a dense grid and refined with
mpmath.findroot (Anderson–Björck bracketing) to 1e-30.
"""
import json
import math
import mpmath
from mpmath import mp, mpf, mpc, polyroots, exp, findroot, re, fabs

mp.dps = 50


def poly_eval(c, x):
    v = mpf(0)
    for a in c:
        v = v * x + a
    return v


def deriv(c):
    n = len(c) - 1
    return [c[i] * (n - i) for i in range(n)]


class System:
    def __init__(self, num, den):
        self.numf, self.denf = num, den
        self.num = [mpf(v) for v in num]
        self.den = [mpf(v) for v in den]
        n = len(den) - 1
        self.poles = polyroots(self.den, maxsteps=500, extraprec=400)
        for i in range(n):
            for j in range(i):
                assert abs(self.poles[i] - self.poles[j]) > mpf(10) ** -8, "repeated pole"
        dd = deriv(self.den)
        # Direct term and strictly proper numerator.
        lead = self.den[0]
        numpad = [mpf(0)] * (len(self.den) - len(self.num)) + self.num
        self.D = numpad[0] / lead
        self.res = [poly_eval(self.num, p) / poly_eval(dd, p) for p in self.poles]
        self.gain = poly_eval(self.num, mpf(0)) / poly_eval(self.den, mpf(0))

    def step(self, t):
        t = mpf(t)
        return re(self.gain + sum(r / p * exp(p * t) for r, p in zip(self.res, self.poles)))

    def dstep(self, t):
        t = mpf(t)
        return re(sum(r * exp(p * t) for r, p in zip(self.res, self.poles)))

    impulse = dstep

    def ddstep(self, t):
        t = mpf(t)
        return re(sum(r * p * exp(p * t) for r, p in zip(self.res, self.poles)))

    def metrics(self, horizon, samples):
        f = self.gain
        ts = [mpf(horizon) * k / samples for k in range(samples + 1)]
        ys = [self.step(t) / f for t in ts]
        ds = [self.dstep(t) for t in ts]
        pts = []
        for k in range(samples + 1):
            pts.append((ts[k], ys[k]))
            if k < samples and ds[k] * ds[k + 1] < 0:
                tc = findroot(self.dstep, (ts[k], ts[k + 1]), solver="anderson", tol=mpf(10) ** -40)
                pts.append((tc, self.step(tc) / f))
        pts.sort(key=lambda p: p[0])

        def level(lv):
            for i, (t, r) in enumerate(pts):
                if r >= lv:
                    if i == 0:
                        return t
                    return findroot(lambda x: self.step(x) / f - lv, (pts[i - 1][0], t), solver="anderson", tol=mpf(10) ** -40)
            return None

        t10, t90 = level(mpf("0.1")), level(mpf("0.9"))
        band = mpf("0.02")
        last = max(i for i, (t, r) in enumerate(pts) if fabs(r - 1) > band)
        assert pts[last][0] < mpf(horizon) / 2, "horizon too short"
        lv = 1 + band if pts[last][1] > 1 else 1 - band
        ts2 = findroot(lambda x: self.step(x) / f - lv, (pts[last][0], pts[last + 1][0]), solver="anderson", tol=mpf(10) ** -40)
        imax = max(range(len(pts)), key=lambda i: pts[i][1])
        imin = min(range(len(pts)), key=lambda i: pts[i][1])
        out = {
            "final_value": float(f),
            "t10": float(t10), "t90": float(t90), "rise_time": float(t90 - t10),
            "settling_time": float(ts2),
        }
        if pts[imax][1] - 1 > mpf(10) ** -10:  # existence threshold as in metrics.go
            out.update(peak_value=float(pts[imax][1] * f), peak_time=float(pts[imax][0]),
                       overshoot_pct=float(100 * (pts[imax][1] - 1)))
        else:
            out.update(peak_value=None, peak_time=None, overshoot_pct=0.0)
        if pts[imin][1] < -mpf(10) ** -10:
            out.update(undershoot_pct=float(-100 * pts[imin][1]), undershoot_time=float(pts[imin][0]))
        else:
            out.update(undershoot_pct=0.0, undershoot_time=None)
        return out


def polymul(a, b):
    out = [0.0] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        for j, y in enumerate(b):
            out[i + j] += x * y
    return out


def family(n):
    """Benchmark family of order n (even): n/2 lightly to moderately damped
    pairs with natural frequencies spread geometrically over [1, 9] (spectral
    radius 9), unit static gain."""
    m = n // 2
    den = [1.0]
    for i in range(m):
        w = 9.0 ** (i / (m - 1)) if m > 1 else 3.0
        z = 0.15 + 0.6 * (i / (m - 1)) if m > 1 else 0.4
        den = polymul(den, [1.0, 2 * z * w, w * w])
    return [den[-1]], den


cases = []

# Named systems with step metrics and samples.
named = [
    ("non-minimum phase: 6(1 - 0.5s)/((s+1)(s+2)(s+3))", [-3.0, 6.0], [1.0, 6.0, 11.0, 6.0], 12.0),
    ("non-minimum phase, two right-half-plane zeros: (s-1)(s-2)... 2(s^2-3s+2)/((s+1)(s+2)(s^2+2s+2))",
     [2.0, -6.0, 4.0], polymul([1.0, 3.0, 2.0], [1.0, 2.0, 2.0]), 16.0),
    ("fifth order with a zero: 40(s+3)/((s+2)(s^2+2s+5)(s^2+4s+12))",
     [40.0, 120.0], polymul([1.0, 2.0], polymul([1.0, 2.0, 5.0], [1.0, 4.0, 12.0])), 12.0),
    ("proper, direct term: (2s^2+3s+4)/(s^2+2s+4)", [2.0, 3.0, 4.0], [1.0, 2.0, 4.0], 12.0),
    ("stiff, negative gain: -1e6/((s+0.001)(s+1000))", [-1e6], [1.0, 1000.001, 1.0], 8000.0),
    # Closed loop of the PI controller 2(40s+1)/(40s) around the plant
    # 1/((100s+1)(30s+1)) (a scenario of this project): a late dip grazes
    # the 2 % band (its minimum is 0.9799972, 2.8e-6 outside) and sets the
    # settling time at 545.14 s; the previous exit is at 463.9 s.
    ("PI loop, late grazing exit: (80s+2)/(120000s^3+5200s^2+120s+2)",
     [80.0, 2.0], [120000.0, 5200.0, 120.0, 2.0], 1500.0),
]
for title, num, den, horizon in named:
    s = System(num, den)
    times = [0.05, 0.3, 1.0, 2.5, 4.0, 7.5]
    cases.append({
        "title": title, "num": num, "den": den,
        "times": times,
        "step": [float(s.step(t)) for t in times],
        "impulse": [float(s.impulse(t)) for t in times],
        "direct_term": float(s.D),
        "metrics": s.metrics(horizon, 4000) if s.gain != 0 else None,
    })

bench = []
for n in range(2, 25, 2):
    num, den = family(n)
    s = System(num, den)
    sigma = min(-float(re(p)) for p in s.poles)
    horizon = 10.0 / sigma
    step = 0.1 / max(abs(complex(p)) for p in s.poles)
    count = int(math.ceil(horizon / step - 1e-9))
    stride = max(1, count // 1000)
    idx = list(range(0, count + 1, stride))
    vals = [float(s.step(k * step)) for k in idx]
    entry = {"order": n, "num": num, "den": den, "horizon_sec": horizon, "step_sec": step,
             "count": count, "index": idx, "step": vals,
             "peak": max(abs(v) for v in vals)}
    if n in (4, 12, 24):
        entry["metrics"] = s.metrics(horizon * 2, 6000)
    bench.append(entry)

print(json.dumps({"generator": "gen_reference.py (mpmath %s, %d digits)" % (mpmath.__version__, mp.dps),
                  "cases": cases, "benchmark_family": bench}, indent=0))
