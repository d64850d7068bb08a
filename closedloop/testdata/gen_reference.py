"""mpmath references (50 digits) for closedloop's higher-order test.

Loop (a scenario of this project's own): plant G = 2/((s+1)(s+2)(s+4)),
controller in time-constant form C = K·(1 + 1/(Ti·s) + Td·s/(1 + Td·s/N)),
K = 3, Ti = 1.2, Td = 0.25, N = 10, sensor H = 1/(0.05·s + 1).
The closed-loop functions are formed from the same polynomial formulas as
closedloop.Of, in exact rationals; responses come from partial fractions
(simple poles, residues at 50 digits), peaks and crossings from findroot on
the exact derivative, IAE and ITAE from mpmath.quad between zero crossings,
ISE and H2 from quad over [0, ∞).
Run: python3 gen_reference.py > reference.json
"""
import json
from fractions import Fraction as Fr
import mpmath as mp

mp.mp.dps = 50

def pmul(a, b):
    r = [Fr(0)] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        for j, y in enumerate(b):
            r[i + j] += x * y
    return r

def padd(a, b):
    n = max(len(a), len(b))
    a = [Fr(0)] * (n - len(a)) + a
    b = [Fr(0)] * (n - len(b)) + b
    return [x + y for x, y in zip(a, b)]

def pscale(a, k):
    return [k * x for x in a]

K, Ti, Td, N = Fr(3), Fr(6, 5), Fr(1, 4), Fr(10)
# C = K·(Ti s (1 + Td s/N) + (1 + Td s/N) + Ti Td s²)/(Ti s (1 + Td s/N))
f = [Td / N, Fr(1)]
nc = pscale(padd(padd(pmul([Ti, Fr(0)], f), f), [Ti * Td, Fr(0), Fr(0)]), K)
dc = pmul([Ti, Fr(0)], f)
ng, dg = [Fr(2)], pmul(pmul([Fr(1), Fr(1)], [Fr(1), Fr(2)]), [Fr(1), Fr(4)])
nh, dh = [Fr(1)], [Fr(1, 20), Fr(1)]
P = padd(pmul(pmul(dc, dg), dh), pmul(pmul(nc, ng), nh))

def strip(p):
    while len(p) > 1 and p[0] == 0:
        p = p[1:]
    return p

funcs = {
    "load_to_output": (pmul(pmul(ng, dc), dh), P),
    "reference_to_control": (pmul(pmul(nc, dg), dh), P),
    "reference_to_error": (padd(P, pscale(pmul(pmul(nc, ng), dh), -1)), P),
    "noise_to_output": (pscale(pmul(pmul(nc, ng), dh), -1), P),
    "noise_to_control": (pscale(pmul(pmul(nc, dg), dh), -1), P),
}

def mpoly(p):
    return [mp.mpf(x.numerator) / x.denominator for x in p]

def peval(p, s):
    v = 0
    for c in p:
        v = v * s + c
    return v

def step(num, den):
    """y(t) = G(0) + Σ res(G/s, p)·e^{pt}; also y'(t)."""
    num, den = mpoly(strip(num)), mpoly(strip(den))
    roots = mp.polyroots(den, maxsteps=500, extraprec=500)
    dden = [c * (len(den) - 1 - i) for i, c in enumerate(den[:-1])]
    res = [peval(num, p) / (peval(dden, p) * p) for p in roots]
    g0 = peval(num, 0) / peval(den, 0)
    y = lambda t: mp.re(g0 + sum(r * mp.exp(p * t) for r, p in zip(res, roots)))
    dy = lambda t: mp.re(sum(r * p * mp.exp(p * t) for r, p in zip(res, roots)))
    return y, dy, g0, roots

def impulse(num, den):
    num, den = mpoly(strip(num)), mpoly(strip(den))
    roots = mp.polyroots(den, maxsteps=500, extraprec=500)
    dden = [c * (len(den) - 1 - i) for i, c in enumerate(den[:-1])]
    res = [peval(num, p) / peval(dden, p) for p in roots]
    return lambda t: mp.re(sum(r * mp.exp(p * t) for r, p in zip(res, roots)))

def events(f, T, n=6000):
    """Sign changes of f on a fine grid over [0, T], refined by findroot."""
    out = []
    ts = [T * i / n for i in range(n + 1)]
    fv = [f(t) for t in ts]
    for i in range(n):
        if fv[i] * fv[i + 1] < 0:
            out.append(mp.findroot(f, (ts[i], ts[i + 1]), solver="anderson"))
    return out

def s(x):
    return mp.nstr(x, 30)

T = mp.mpf(60)
ref = {}
# Load disturbance → output.
y, dy, g0, roots = step(*funcs["load_to_output"])
ext = events(dy, 20)
cands = [(abs(y(t)), t) for t in ext]
pk, tp = max(cands)
yp = y(tp)
level = mp.mpf("0.02") * abs(yp)
last = max(events(lambda t: abs(y(t)) - level, 40))
cross = [mp.mpf(0)] + events(y, T) + [T]
iae = sum(abs(mp.quad(y, [a, b])) for a, b in zip(cross, cross[1:]))
itae = sum(abs(mp.quad(lambda t: t * y(t), [a, b])) for a, b in zip(cross, cross[1:]))
ise = mp.quad(lambda t: y(t) ** 2, [0, 5, 20, mp.inf])
ref["load"] = dict(peak=s(yp), peak_time=s(tp), recovery=s(last), final=s(g0), iae=s(iae), itae=s(itae), ise=s(ise))
# Reference → control.
u, du, u0, _ = step(*funcs["reference_to_control"])
ext = events(du, 20)
cands = [(abs(u(t)), t) for t in ext] + [(abs(u(mp.mpf(0))), mp.mpf(0))]
pk, tp = max(cands)
ref["reference_control"] = dict(initial=s(u(mp.mpf(0))), peak=s(u(tp)), peak_time=s(tp), final=s(u0))
# Reference → error.
e, de, e0, _ = step(*funcs["reference_to_error"])
cross = [mp.mpf(0)] + events(e, T) + [T]
ref["reference_error"] = dict(
    iae=s(sum(abs(mp.quad(e, [a, b])) for a, b in zip(cross, cross[1:]))),
    itae=s(sum(abs(mp.quad(lambda t: t * e(t), [a, b])) for a, b in zip(cross, cross[1:]))),
    ise=s(mp.quad(lambda t: e(t) ** 2, [0, 5, 20, mp.inf])))
# Noise → output H2 (strictly proper).
g = impulse(*funcs["noise_to_output"])
ref["noise_to_output_h2"] = s(mp.sqrt(mp.quad(lambda t: g(t) ** 2, [0, 1, 5, 20, mp.inf])))
# Noise → control high-frequency gain: ratio of leading coefficients.
num, den = strip(funcs["noise_to_control"][0]), strip(funcs["noise_to_control"][1])
ref["noise_to_control_hf"] = s(abs(mp.mpf(num[0].numerator) / num[0].denominator / (mp.mpf(den[0].numerator) / den[0].denominator)) if len(num) == len(den) else 0)
# Peak of |load → output(jω)|: maximum of the exact magnitude.
ln, ld = mpoly(strip(funcs["load_to_output"][0])), mpoly(strip(funcs["load_to_output"][1]))
mag = lambda w: abs(peval(ln, 1j * w) / peval(ld, 1j * w))
ws = [mp.mpf(10) ** (mp.mpf(i) / 200 - 3) for i in range(1401)]
wb = max(ws, key=mag)
wpk = mp.findroot(lambda w: mp.diff(mag, w), wb)
ref["load_peak"] = dict(value=s(mag(wpk)), freq=s(wpk))
print(json.dumps(ref, indent=1))
