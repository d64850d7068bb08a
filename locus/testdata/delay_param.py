"""50-digit references for DelayedParametric (delay_param.json): the
crossing values of a parameter entering a loop with dead time affinely,
and the rightmost closed-loop roots at a few values.

Run: python3 delay_param.py > delay_param.json

The characteristic function is
    P(s; p) = A0(s) + A1(s) e^(-s tau) + p (B0(s) + B1(s) e^(-s tau)),
coefficients highest power first. Crossings: roots w > 0 of
g(w) = Im(a(jw) conj b(jw)), a = A0 + A1 E, b = B0 + B1 E, E = e^(-jw tau),
found here independently of the Go code: sign changes of g/(|a||b|) on a
fine grid over (0, W] (W chosen well above every crossing of the stated
range: |D_p(jw)| > |N_p(jw)| there for every p in the range, checked
below), each refined by mpmath.findroot at 50 digits; p = -Re(a/b). The
rightmost roots come from findroot started on a grid of points covering
Re s > -6, |Im s| < 60, de-duplicated.

Cases (scenarios of this project's own):
  pi_lag:    PI integral gain Ki on 1/(s+1) e^(-0.5 s), Kp = 0.5:
             s(s+1) + (0.5 s + Ki) e^(-0.5 s)
  lead_zero: lead zero a in 2(1 + a s)/((s+1)(0.5 s+1)) e^(-0.3 s)
  sensor_lag: sensor time constant T in 5 e^(-0.4 s)/((s+1)(T s+1))
  mass:      mass m in 4 e^(-0.4 s)/(m s^2 + s + 1) (g has a triple root
             at w = 0: b = s^2)
"""
import json
import mpmath as mp

mp.mp.dps = 50

cases = [
    {"name": "pi_lag", "A0": [1, 1, 0], "A1": [0.5, 0], "B0": [0], "B1": [1], "tau": 0.5,
     "range": [-1, 5], "W": 60, "values": [0.2, 1.0, 3.0]},
    {"name": "lead_zero", "A0": [0.5, 1.5, 1], "A1": [2], "B0": [0], "B1": [2, 0], "tau": 0.3,
     "range": [0, 2], "W": 80, "values": [0.1, 0.5, 1.5]},
    {"name": "sensor_lag", "A0": [1, 1], "A1": [5], "B0": [1, 1, 0], "B1": [0], "tau": 0.4,
     "range": [0.05, 2], "W": 400, "values": [0.1, 0.5, 1.5]},
    {"name": "mass", "A0": [1, 1], "A1": [4], "B0": [1, 0, 0], "B1": [0], "tau": 0.4,
     "range": [0.05, 2], "W": 60, "values": [0.1, 0.5, 1.5]},
]


def pv(c, s):
    v = mp.mpc(0)
    for a in c:
        v = v * s + a
    return v


def parts(cs, s):
    E = mp.exp(-s * cs["tau"])
    return pv(cs["A0"], s) + pv(cs["A1"], s) * E, pv(cs["B0"], s) + pv(cs["B1"], s) * E


def P(cs, p, s):
    a, b = parts(cs, s)
    return a + p * b


out = []
for cs in cases:
    lo, hi = cs["range"]
    W = cs["W"]
    # |D_p(jW')| > |N_p(jW')| for W' >= W and p in the range (checked on
    # a grid of p and W' up to 100 W; both sides are polynomials whose
    # leading term is in D_p).
    for p in [lo + (hi - lo) * i / 20 for i in range(21)]:
        for w in [W * (1 + 0.5 * i) for i in range(200)]:
            s = mp.mpc(0, w)
            D = pv(cs["A0"], s) + p * pv(cs["B0"], s)
            N = pv(cs["A1"], s) + p * pv(cs["B1"], s)
            assert abs(D) > abs(N), (cs["name"], p, w)

    def g(w):
        a, b = parts(cs, mp.mpc(0, w))
        return mp.im(a * mp.conj(b))

    def gn(w):
        a, b = parts(cs, mp.mpc(0, w))
        return mp.im(a * mp.conj(b)) / (abs(a) * abs(b) + mp.mpf(10) ** -40)

    mp.mp.dps = 20
    n = 60000
    grid = [W * (i + 0.5) / n for i in range(n)]
    vals = [gn(w) for w in grid]
    mp.mp.dps = 50
    crossings = []
    for i in range(n - 1):
        if vals[i] == 0 or (vals[i] > 0) != (vals[i + 1] > 0):
            w = mp.findroot(g, (mp.mpf(grid[i]), mp.mpf(grid[i + 1])), solver="anderson")
            a, b = parts(cs, mp.mpc(0, w))
            p = -mp.re(a / b)
            assert abs(mp.im(a / b)) < mp.mpf(10) ** -40
            if lo < p < hi:
                crossings.append({"omega": mp.nstr(w, 30), "value": mp.nstr(p, 30)})
    a0, b0 = parts(cs, mp.mpf(0))
    zero = None
    if b0 != 0:
        p0 = -mp.re(a0) / mp.re(b0)
        if lo < p0 < hi:
            zero = mp.nstr(p0, 30)
    roots = []
    for p in cs["values"]:
        found = []
        for x in [-5.5 + 0.5 * i for i in range(14)]:
            for y in [0.25 + 1.0 * j for j in range(60)]:
                try:
                    r = mp.findroot(lambda s: P(cs, p, s), mp.mpc(x, y))
                except (ZeroDivisionError, ValueError):
                    continue
                if abs(P(cs, p, r)) > mp.mpf(10) ** -35 or mp.im(r) < -1e-30:
                    continue
                if abs(mp.im(r)) < mp.mpf(10) ** -30:
                    r = mp.mpc(mp.re(r), 0)
                if all(abs(r - f) > 1e-20 for f in found):
                    found.append(r)
        found.sort(key=lambda r: -mp.re(r))
        roots.append({"value": p, "rightmost": [[mp.nstr(mp.re(r), 30), mp.nstr(mp.im(r), 30)] for r in found[:3]]})
    out.append({"name": cs["name"], "A0": cs["A0"], "A1": cs["A1"], "B0": cs["B0"], "B1": cs["B1"],
                "tau": cs["tau"], "range": cs["range"], "crossings": crossings, "zeroCrossing": zero,
                "roots": roots})

print(json.dumps(out, indent=1))
