"""50-digit references for locus.DelayedRoots (delay_roots.json).

Run: python3 delay_roots.py > delay_roots.json

Each case is the characteristic quasi-polynomial D(s) + k*N(s)*exp(-s*tau)
(coefficients highest power first). Roots are found by mpmath.findroot
from a grid of starting points, deduplicated, and the number of roots with
Re s > sigma0 is checked by the argument principle (numerical contour
integral of f'/f around [sigma0, R] x [-R, R], R a proved modulus bound).
For s + a*exp(-s*tau) the roots are also the Lambert-W closed form
s = W_k(-a*tau)/tau (Asl & Ulsoy 2003).
"""
import json
import mpmath as mp

mp.mp.dps = 50


def horner(c, s):
    v = mp.mpf(0)
    for a in c:
        v = v * s + a
    return v


def deriv(c):
    n = len(c) - 1
    return [c[i] * (n - i) for i in range(n)]


def make(D, N, k, tau):
    D = [mp.mpf(x) for x in D]
    N = [mp.mpf(x) for x in N]
    k, tau = mp.mpf(k), mp.mpf(tau)
    Dp, Np = deriv(D), deriv(N)

    def f(s):
        return horner(D, s) + k * horner(N, s) * mp.exp(-s * tau)

    def df(s):
        return horner(Dp, s) + k * (horner(Np, s) - tau * horner(N, s)) * mp.exp(-s * tau)
    return f, df


def radius(D, N, k, tau, sigma0):
    n = len(D) - 1
    c = abs(mp.mpf(k)) * mp.exp(-mp.mpf(sigma0) * mp.mpf(tau))

    def g(r):
        return abs(mp.mpf(D[0])) * r ** n - sum(abs(mp.mpf(D[i])) * r ** (n - i) for i in range(1, n + 1)) \
            - c * sum(abs(mp.mpf(N[i])) * r ** (len(N) - 1 - i) for i in range(len(N)))
    hi = mp.mpf(1)
    while g(hi) <= 0:
        hi *= 2
    return mp.findroot(g, (hi / 2, hi), solver='anderson') * mp.mpf('1.01') if g(hi / 2) < 0 else hi


def count(f, df, sigma0, R):
    pts = [mp.mpc(sigma0, -R), mp.mpc(R, -R), mp.mpc(R, R), mp.mpc(sigma0, R)]
    tot = mp.mpc(0)
    for i in range(4):
        a, b = pts[i], pts[(i + 1) % 4]
        m = 64
        for j in range(m):
            s0 = a + (b - a) * j / m
            s1 = a + (b - a) * (j + 1) / m
            tot += mp.quad(lambda s: df(s) / f(s), [s0, s1])
    return int(mp.nint((tot / (2j * mp.pi)).real))


def roots_above(D, N, k, tau, sigma0, grid):
    f, df = make(D, N, k, tau)
    R = radius(D, N, k, tau, sigma0)
    found = []
    xs = [sigma0 + (R - sigma0) * i / grid for i in range(grid + 1)]
    ys = [R * i / grid for i in range(grid + 1)]
    for x in xs:
        for y in ys:
            try:
                r = mp.findroot(f, mp.mpc(x, y), df=df, tol=mp.mpf(10) ** -40, maxsteps=100)
            except (ValueError, ZeroDivisionError):
                continue
            if abs(f(r)) > mp.mpf(10) ** -30:
                continue
            if r.real <= sigma0:
                continue
            if r.imag < 0:
                r = mp.conj(r)
            if abs(r.imag) < mp.mpf(10) ** -30:
                r = mp.mpc(r.real, 0)
            if all(abs(r - o) > mp.mpf(10) ** -20 for o in found):
                found.append(r)
    full = []
    for r in found:
        full.append(r)
        if r.imag != 0:
            full.append(mp.conj(r))
    full.sort(key=lambda r: (-r.real, -r.imag))
    c = count(f, df, sigma0, R)
    assert c == len(full), (c, len(full))
    return full, c


cases = []


def add(name, D, N, k, tau, sigma0, grid, source):
    rs, c = roots_above(D, N, k, tau, sigma0, grid)
    cases.append({
        "name": name, "den": D, "num": N, "gain": k, "delaySec": tau,
        "abscissa": sigma0, "count": c, "source": source,
        "roots": [[mp.nstr(r.real, 30), mp.nstr(r.imag, 30)] for r in rs],
    })


add("first-order lag with delay", [1.0, 1.0], [1.0], 3.0, 0.5, -4.0, 24, "findroot grid + argument principle")
add("order six with zero", [1, 9.3, 37.2, 80.8, 95.3, 54.8, 12],
    [2.0, 3.0], 1.3, 0.7, -3.0, 30, "findroot grid + argument principle")
add("second-order lag unstable", [1.0, 0.6, 1.0], [1.0], 2.5, 1.2, -1.0, 30, "findroot grid + argument principle")

# Lambert-W closed form (Asl & Ulsoy 2003): s + a e^{-s tau} = 0 -> s = W_k(-a tau)/tau.
a, tau = mp.mpf(1), mp.mpf(1)
lw = []
for kk in range(0, 8):
    r = mp.lambertw(-a * tau, kk) / tau
    lw.append(r)
lw_full = []
for r in lw:
    if r.imag < 0:
        r = mp.conj(r)
    lw_full.append(r)
    if abs(r.imag) > 0:
        lw_full.append(mp.conj(r))
lw_full.sort(key=lambda r: (-r.real, -r.imag))
cases.append({
    "name": "Lambert W, s + e^{-s}", "den": [1.0, 0.0], "num": [1.0], "gain": 1.0, "delaySec": 1.0,
    "abscissa": None, "count": len(lw_full), "source": "Asl & Ulsoy 2003, s = W_k(-a tau)/tau, mpmath.lambertw",
    "roots": [[mp.nstr(r.real, 30), mp.nstr(r.imag, 30)] for r in lw_full],
})

print(json.dumps({"cases": cases}, indent=1))
