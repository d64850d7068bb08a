"""50-digit references for the margin boundaries of package design.

For each case: a loop k*L with L = num/den (coefficients highest power
first, continuous time unless T > 0), a requirement and its limit, and the
gain at which the margin equals the limit, found independently of the Go
code: the frequency condition is solved with mpmath.findroot from a starting
point located by a dense scan, then the gain follows from |k L| conditions.
Run: python3 gen_refs.py > refs.json (mpmath 1.3, deterministic).
"""
import json
from mpmath import mp, mpf, mpc, polyval, findroot, arg, pi, exp, sqrt, fabs, diff, log10

mp.dps = 50


def L(num, den, T, w):
    x = exp(mpc(0, w * T)) if T > 0 else mpc(0, w)
    return polyval(num, x) / polyval(den, x)


def scan_roots(f, lo, hi, n=4000, log=True):
    """Roots of f in (lo, hi) bracketed on a scan and refined by findroot."""
    out = []
    xs = [lo * (hi / lo) ** (mpf(i) / n) if log else lo + (hi - lo) * mpf(i) / n for i in range(n + 1)]
    prev = f(xs[0])
    for a, b in zip(xs, xs[1:]):
        fb = f(b)
        if prev * fb < 0:
            try:
                r = findroot(f, (a, b), solver='illinois')
            except ValueError:
                r = None  # a jump of f (the phase wraps), not a root
            if r is not None and fabs(f(r)) < mpf('1e-30'):
                out.append(r)
        prev = fb
    return out


def unwrapped_phase(num, den, T, w):
    return arg(L(num, den, T, w))


def pm_gain(num, den, T, deg, wmax):
    # angle of L = deg - 180 (mod 360): Im(L * e^{-j(deg-180)}) = 0 with Re > 0
    c = exp(mpc(0, -(mpf(deg) - 180) * pi / 180))
    f = lambda w: (L(num, den, T, w) * c).imag
    ks = []
    for w in scan_roots(f, mpf('1e-4'), wmax):
        v = L(num, den, T, w) * c
        if v.real > 0:
            ks.append((1 / abs(L(num, den, T, w)), w))
    return ks


def gm_gain(num, den, T, db, wmax):
    f = lambda w: L(num, den, T, w).imag
    ks = []
    for w in scan_roots(f, mpf('1e-4'), wmax):
        v = L(num, den, T, w)
        if v.real < 0:
            ks.append((1 / (abs(v) * 10 ** (mpf(db) / 20)), w))
    return ks


def dm_gain(num, den, T, tau, wmax):
    # At a crossover w (k = 1/|L|): (pi + arg L) / w = tau, arg L in (-pi, pi].
    f = lambda w: (pi + arg(L(num, den, T, w))) / w - tau
    return [(1 / abs(L(num, den, T, w)), w) for w in scan_roots(f, mpf('1e-3'), wmax)]


def ms_gain(num, den, T, ms, k0, k1):
    # Ms(k) = max_w |1/(1 + k L)|; the boundary is Ms(k) = ms.
    def Ms(k):
        g = lambda w: abs(1 + k * L(num, den, T, w)) ** 2
        ws = [mpf('1e-3') * mpf(10) ** (mpf(i) / 200) for i in range(1000)]
        vals = [g(w) for w in ws]
        i = min(range(len(vals)), key=lambda j: vals[j])
        w = findroot(lambda w: diff(g, w), ws[i])
        return 1 / sqrt(g(w))
    k = findroot(lambda k: Ms(k) - ms, (mpf(k0), mpf(k1)), solver='anderson')
    return [(k, None)]


cases = []
third = ([1], [1, 3, 2, 0])  # 1/(s(s+1)(s+2))
fourth = ([1, 3], [1, 16, 65, 50, 0])  # (s+3)/(s(s+1)(s+5)(s+10))
disc = ([0.1, 0.09], [1, -1.7, 0.7])  # 0.1(z+0.9)/((z-1)(z-0.7)), T = 0.1
for name, (num, den), T, key, lim, fn in [
    ("third order PM 45", third, 0, "min_phase_margin_deg", 45, lambda: pm_gain(*third, 0, 45, mpf(100))),
    ("fourth order PM 50", fourth, 0, "min_phase_margin_deg", 50, lambda: pm_gain(*fourth, 0, 50, mpf(100))),
    ("third order DM 0.5", third, 0, "min_delay_margin_sec", 0.5, lambda: dm_gain(*third, 0, mpf('0.5'), 4 * pi)),
    ("third order Ms 1.6", third, 0, "max_peak_sensitivity", 1.6, lambda: ms_gain(*third, 0, mpf('1.6'), 0.9, 1.2)),
    ("fourth order Ms 1.4", fourth, 0, "max_peak_sensitivity", 1.4, lambda: ms_gain(*fourth, 0, mpf('1.4'), 10, 40)),
    ("discrete GM 6 dB", disc, 0.1, "min_gain_margin_db", 6, lambda: gm_gain(*disc, mpf('0.1'), 6, pi / mpf('0.1') * (1 - mpf('1e-30')))),
    ("discrete PM 45", disc, 0.1, "min_phase_margin_deg", 45, lambda: pm_gain(*disc, mpf('0.1'), 45, pi / mpf('0.1') * (1 - mpf('1e-30')))),
]:
    sols = fn()
    cases.append({"name": name, "num": num, "den": den, "sample_time_sec": T, "key": key, "limit": lim,
                  "gains": [mp.nstr(k, 30) for k, _ in sols]})
print(json.dumps(cases, indent=1))
