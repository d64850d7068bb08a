"""Reference step metrics for spec/dominant_test.go (mpmath, 50 digits).

Run: python3 delayed_step.py > delayed_step.json

The closed loop of L = a·e^(−sτ)/s under unity negative feedback has the
unit step response y with y′(t) = a·(1 − y(t − τ)), y = 0 for t ≤ τ. The
method of steps (Bellman & Cooke 1963, "Differential-Difference
Equations") gives it in closed form:

    y(t) = Σ_{k ≥ 1} (−1)^(k+1) · a^k · (t − kτ)^k / k!   (terms with t > kτ).

Overshoot: the largest y − 1 (the first peak, y′ = 0 at t = t_p + τ where
y(t_p) = 1, found by findroot); rise time from 10 % to 90 % (common
practice); settling time: the last time |y − 1| = 2 % (common practice),
found by scanning the extrema of y after the peak.
"""
import json
from mpmath import mp, mpf, factorial, findroot

mp.dps = 50


def y(t, a, tau):
    s, k = mpf(0), 1
    while t > k * tau:
        s += (-1) ** (k + 1) * a**k * (t - k * tau) ** k / factorial(k)
        k += 1
    return s


def cross(level, a, tau, lo, hi):
    """First t in [lo, hi] with y(t) = level (y increasing through it)."""
    n = 4000
    prev = lo
    for i in range(1, n + 1):
        t = lo + (hi - lo) * i / n
        if (y(prev, a, tau) - level) * (y(t, a, tau) - level) <= 0:
            return findroot(lambda u: y(u, a, tau) - level, (prev, t), solver="anderson")
        prev = t
    raise ValueError("no crossing")


out = []
for a, tau in [("1", "0.5"), ("1", "1")]:
    A, T = mpf(a), mpf(tau)
    t10 = cross(mpf("0.1"), A, T, T, 40 * T)
    t90 = cross(mpf("0.9"), A, T, T, 40 * T)
    t1 = cross(mpf(1), A, T, T, 40 * T)
    # y′(t) = a(1 − y(t − τ)) = 0 first at t = t1 + τ: the first peak.
    peak = y(t1 + T, A, T)
    # extrema of y are at t_i + τ where y(t_i) = 1; the response settles
    # when the extrema stay inside the 2 % band: the last extremum outside
    # it bounds the settling time, found between it and the next level 1.
    ts, tcur = None, t1
    for _ in range(60):
        ext = y(tcur + T, A, T)
        if abs(ext - 1) <= mpf("0.02"):
            break
        level = 1 + mpf("0.02") * (1 if ext > 1 else -1)
        ts = cross(level, A, T, tcur + T, tcur + 8 * T)
        tcur = cross(mpf(1), A, T, tcur + T, tcur + 8 * T)
    out.append({"a": float(A), "tau": float(T),
                "overshoot_pct": mp.nstr(100 * (peak - 1), 25),
                "rise_time_sec": mp.nstr(t90 - t10, 25),
                "settling_time_sec": mp.nstr(ts, 25)})
print(json.dumps(out, indent=1))
