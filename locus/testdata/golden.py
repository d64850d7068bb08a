#!/usr/bin/env python3
"""Reference values for locus tests that the shared reference cases do not
cover: a conditionally stable loop (two stable gain intervals) and a
discrete-time loop (unit-circle crossings). Exact rational polynomial
arithmetic (fractions) with mpmath roots at 60 digits; stability of each
gain interval by an exact Routh array at a rational sample gain (Routh
1877; Hurwitz 1895), the discrete case through the bilinear map
z = (1 + w)/(1 - w). Run: python3 golden.py > golden.json
(python3 + mpmath 1.3)."""
import json
from fractions import Fraction as F
import mpmath as mp

mp.mp.dps = 60


def trim(p):
    i = 0
    while i < len(p) - 1 and p[i] == 0:
        i += 1
    return p[i:]


def add(p, q):
    n = max(len(p), len(q))
    p = [F(0)] * (n - len(p)) + list(p)
    q = [F(0)] * (n - len(q)) + list(q)
    return trim([a + b for a, b in zip(p, q)])


def mul(p, q):
    r = [F(0)] * (len(p) + len(q) - 1)
    for i, a in enumerate(p):
        for j, b in enumerate(q):
            r[i + j] += a * b
    return trim(r)


def scale(p, c):
    return trim([a * c for a in p])


def der(p):
    n = len(p) - 1
    return trim([a * (n - i) for i, a in enumerate(p[:-1])]) or [F(0)]


def ev(p, x):
    r = mp.mpc(0)
    for a in p:
        r = r * x + mp.mpf(a.numerator) / a.denominator
    return r


def roots(p):
    p = trim(p)
    if len(p) <= 1:
        return []
    c = [mp.mpf(a.numerator) / a.denominator for a in p]
    rs = mp.polyroots(c, maxsteps=2000, extraprec=400)
    out = []
    for z in rs:
        z = mp.mpc(z)
        if abs(z.imag) < mp.mpf(10) ** -40:
            z = mp.mpc(z.real, 0)
        out.append(z)
    return sorted(out, key=lambda z: (float(z.real), float(z.imag)))


def axis_parts(p):
    d = len(p) - 1
    re, im = [F(0)] * (d + 1), [F(0)] * (d + 1)
    for i, a in enumerate(p):
        k = d - i
        if k % 4 == 0:
            re[i] += a
        elif k % 4 == 1:
            im[i] += a
        elif k % 4 == 2:
            re[i] -= a
        else:
            im[i] -= a
    return trim(re), trim(im)


def bilinear(p, n):
    d = len(p) - 1
    out = [F(0)]
    for i, a in enumerate(p):
        k = d - i
        t = [F(1)]
        for _ in range(k):
            t = mul(t, [F(1), F(1)])
        for _ in range(n - k):
            t = mul(t, [F(-1), F(1)])
        out = add(out, scale(t, a))
    return out


def hurwitz(p):
    """Exact Routh test: every root has negative real part."""
    p = trim(p)
    if p[0] < 0:
        p = [-a for a in p]
    n = len(p) - 1
    r0, r1 = list(p[0::2]), list(p[1::2])
    w = len(r0)
    r1 += [F(0)] * (w - len(r1))
    for _ in range(n):
        if r1[0] <= 0:
            return False
        nxt = [(r1[0] * r0[j + 1] - r0[0] * r1[j + 1]) / r1[0] for j in range(w - 1)] + [F(0)]
        r0, r1 = r1, nxt
    return all(a >= 0 for a in r0[:1])


def crossings(N, D):
    """(w, K) with D(jw) + K N(jw) = 0, K > 0, w > 0, plus w = 0."""
    out = []
    if N[-1] != 0 and D[-1] != 0 and -D[-1] / N[-1] > 0:
        out.append((mp.mpf(0), mp.mpf(-D[-1]) / N[-1]))
    Nr, Ni = axis_parts(N)
    Dr, Di = axis_parts(D)
    im = add(mul(Di, Nr), scale(mul(Dr, Ni), -1))  # odd in w
    asc = list(reversed(im))
    x = trim(list(reversed(asc[1::2])))
    for r in roots(x):
        if r.imag == 0 and r.real > 0:
            w = mp.sqrt(r.real)
            s = mp.mpc(0, w)
            K = -ev(D, s) / ev(N, s)
            if abs(K.imag) < mp.mpf(10) ** -30 and K.real > 0:
                out.append((w, K.real))
    return sorted(out)


def intervals(N, D, Ks, test):
    pts = [mp.mpf(0)] + sorted(Ks)
    out = []
    for i, lo in enumerate(pts):
        hi = pts[i + 1] if i + 1 < len(pts) else None
        t = F(mp.nstr(lo + 1 if hi is None else (lo + hi) / 2, 40))
        if test(add(D, scale(N, t))):
            out.append([lo, hi])
    return out


def breaks(N, D):
    B = add(mul(N, der(D)), scale(mul(der(N), D), -1))
    out = []
    for z in roots(B):
        K = -ev(D, z) / ev(N, z)
        if abs(K.imag) < mp.mpf(10) ** -30 and K.real > 0:
            out.append((z, K.real))
    return out


def s(x):
    if x is None:
        return "inf"
    return float(mp.nstr(x, 17))


def continuous(N, D):
    cr = crossings(N, D)
    return {
        "crossings": [{"omega": s(w), "K": s(K)} for w, K in cr],
        "stable": [[s(lo), s(hi)] for lo, hi in intervals(N, D, [K for _, K in cr], hurwitz)],
        "break_points": [{"s": [s(z.real), s(z.imag)], "K": s(K)} for z, K in breaks(N, D)],
    }


def discrete(N, D, T):
    n = max(len(N), len(D)) - 1
    Nw, Dw = bilinear(N, n), bilinear(D, n)
    cr = crossings(Nw, Dw)
    out = [{"theta": s(2 * mp.atan(v)), "omega": s(2 * mp.atan(v) / T), "K": s(K)} for v, K in cr]
    Nm1 = ev(N, -1).real
    Dm1 = ev(D, -1).real
    if Nm1 != 0 and -Dm1 / Nm1 > 0:
        out.append({"theta": s(mp.pi), "omega": s(mp.pi / T), "K": s(-Dm1 / Nm1)})
    Ks = [K for _, K in cr] + ([-Dm1 / Nm1] if Nm1 != 0 and -Dm1 / Nm1 > 0 else [])
    schur = lambda p: hurwitz(bilinear(p, len(p) - 1))
    return {
        "circle_crossings": sorted(out, key=lambda d: d["theta"]),
        "stable": [[s(lo), s(hi)] for lo, hi in intervals(N, D, Ks, schur)],
        "break_points": [{"s": [s(z.real), s(z.imag)], "K": s(K)} for z, K in breaks(N, D)],
    }


Fs = lambda *a: [F(str(x)) for x in a]
# Conditionally stable drive loop (this project's own scenario): a lightly
# damped mechanical resonance s^2 + 0.2 s + 1, a compensator zero pair
# s^2 + 0.4 s + 4 and a zero at -2.
N1 = mul(Fs(1, 2), Fs(1, 0.4, 4))
D1 = mul(mul(Fs(1, 0), Fs(1, 1)), mul(Fs(1, 5), Fs(1, 0.2, 1)))
# Discrete position loop (this project's own scenario), T = 0.05 s:
# K (z + 0.8) / ((z - 1)(z - 0.6)(z - 0.3)).
N2 = Fs(1, 0.8)
D2 = mul(mul(Fs(1, -1), Fs(1, -0.6)), Fs(1, -0.3))
out = {
    "conditionally_stable": {"num": [float(a) for a in N1], "den": [float(a) for a in D1], **continuous(N1, D1)},
    "discrete": {"num": [float(a) for a in N2], "den": [float(a) for a in D2], "sample_time": 0.05,
                 **discrete(N2, D2, mp.mpf("0.05"))},
}
print(json.dumps(out, indent=1))
