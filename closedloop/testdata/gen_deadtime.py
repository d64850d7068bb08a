"""Method-of-steps closed forms (50 digits) for closedloop's dead-time tests.

Two loops of this project's own, each a first-order process with dead time
under proportional control (unity feedback, no sensor dynamics):

1. Lag plus dead time, G = e^(−sτ)/(s + 1), C = K, K = 2, τ = 0.5.
   Expanding 1/(1 + L) = Σ (−L)^m, each term is one interval of the method
   of steps (Bellman & Cooke 1963, ch. 3):
     load → output   y_d(t) = Σ_{m≥1} (−1)^(m+1)·K^(m−1)·P(m, t − mτ)
     reference → y   y_r(t) = K·y_d(t)
   with P(m, x) the regularised lower incomplete gamma function (0 for
   x ≤ 0): the step response of 1/(s + 1)^m. Derivative: P'(m, x) =
   x^(m−1)·e^(−x)/(m − 1)!.  The control signals are u = −K·y_d (load) and
   u = K·(1 − y_r) (reference).
2. Integrator plus dead time, G = e^(−sτ)/s, C = K, K = 0.8, τ = 1:
     reference → y   y_r(t) = Σ_{m≥1} (−1)^(m+1)·K^m·(t − mτ)^m/m!
   (polynomial on each interval), error e = 1 − y_r → 0; IAE, ISE, ITAE of
   e by mpmath.quad between the break points mτ and the zero crossings.

Peaks and crossings by mpmath.findroot on the exact expressions.
Run: python3 gen_deadtime.py > deadtime.json
"""
import json
import mpmath as mp

mp.mp.dps = 60


def lag_loop():
    K, tau = mp.mpf(2), mp.mpf("0.5")
    final = 1 / (1 + K)

    def terms(t):
        return int(mp.floor(t / tau))

    def yd(t):
        s = mp.mpf(0)
        for m in range(1, terms(t) + 1):
            s += (-1) ** (m + 1) * K ** (m - 1) * mp.gammainc(m, 0, t - m * tau, regularized=True)
        return s

    def dyd(t):
        s = mp.mpf(0)
        for m in range(1, terms(t) + 1):
            x = t - m * tau
            s += (-1) ** (m + 1) * K ** (m - 1) * x ** (m - 1) * mp.exp(-x) / mp.factorial(m - 1)
        return s

    # Extrema of y_d: sign changes of y_d' on a grid avoiding break points.
    ext = []
    grid = [tau + (k + mp.mpf("0.5")) * tau / 40 for k in range(0, 40 * 40)]
    prev = None
    for t in grid:
        d = dyd(t)
        if prev is not None and prev[1] * d < 0:
            ext.append(mp.findroot(dyd, (prev[0], t), solver="anderson"))
        prev = (t, d)
    tp = max(ext, key=lambda t: abs(yd(t)))
    peak = yd(tp)
    level = mp.mpf("0.02") * abs(peak)
    # Recovery: the last time |y_d − final| = level.
    last = None
    for t in grid:
        if abs(yd(t) - final) > level:
            last = t
    nxt = last + tau / 40
    sgn = 1 if yd(last) > final else -1
    rec = mp.findroot(lambda t: yd(t) - final - sgn * level, (last, nxt), solver="anderson")
    # Reference → control: u = K·(1 − K·y_d); its largest |u| is u(0+) = K
    # or an extremum of y_d.
    cands = [(mp.mpf(0), K)] + [(t, K * (1 - K * yd(t))) for t in ext]
    ut, upeak = max(cands, key=lambda c: abs(c[1]))
    return {
        "load_peak": mp.nstr(peak, 30), "load_peak_time": mp.nstr(tp, 30),
        "load_recovery_time": mp.nstr(rec, 30), "load_final": mp.nstr(final, 30),
        "reference_control_peak": mp.nstr(upeak, 30), "reference_control_peak_time": mp.nstr(ut, 30),
        "extrema_checked": len(ext),
    }


def integrator_loop():
    K, tau = mp.mpf("0.8"), mp.mpf(1)

    def yr(t):
        s = mp.mpf(0)
        m = 1
        while m * tau < t:
            s += (-1) ** (m + 1) * K ** m * (t - m * tau) ** m / mp.factorial(m)
            m += 1
        return s

    def e(t):
        return 1 - yr(t)

    T = mp.mpf(110)  # |e| ≈ 1e-20 there (decay rate ≈ 0.43)
    # Break points and zero crossings.
    pts = [mp.mpf(0)]
    k = 1
    while k * tau < T:
        pts.append(k * tau)
        k += 1
    pts.append(T)
    cuts = []
    for a, b in zip(pts, pts[1:]):
        n = 20
        xs = [a + (b - a) * i / n for i in range(n + 1)]
        cuts.append(a)
        for x0, x1 in zip(xs, xs[1:]):
            if e(x0) * e(x1) < 0:
                cuts.append(mp.findroot(e, (x0, x1), solver="anderson"))
    cuts.append(T)
    iae = ise = itae = mp.mpf(0)
    for a, b in zip(cuts, cuts[1:]):
        iae += abs(mp.quad(e, [a, b]))
        itae += abs(mp.quad(lambda t: t * e(t), [a, b]))
        ise += mp.quad(lambda t: e(t) ** 2, [a, b])
    return {"iae": mp.nstr(iae, 30), "ise": mp.nstr(ise, 30), "itae": mp.nstr(itae, 30),
            "e_at_horizon": mp.nstr(e(T), 5)}


print(json.dumps({"lag_K2_tau0.5": lag_loop(), "integrator_K0.8_tau1": integrator_loop()}, indent=1))
