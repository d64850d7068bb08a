#!/usr/bin/env python3
"""Generate roots_golden.json: reference roots for the poly package tests.

Run from this directory:  python3 gen_roots.py > roots_golden.json
Needs python3 and mpmath 1.3. Deterministic (fixed seeds).

Every case stores the polynomial exactly as the Go test reads it: its
coefficients highest power first, each already a double (written with
repr, which round-trips). The reference roots belong to THESE double
coefficients (the best a double-precision program can do), computed with
mpmath at 100 significant digits (polyroots with extra precision, then
checked by Newton's method at 120 digits), except where the polynomial is
an exact product of known factors in binary, in which case the roots come
from the factorisation ("exact") and are checked by exact rational
evaluation of p and its derivatives (fractions.Fraction).

Case "triple_inexact" is the exception on purpose: its coefficients are the
decimal coefficients of (x+0.1)^3 (x-2) rounded to double, so the double
polynomial has no exact triple root; its reference is the triple root -0.1
of the exact decimal polynomial, which a method that recognises the cluster
recovers (plain root finders scatter it by about eps^(1/3) = 5e-6).

Output numbers have 17 significant digits.
"""
import json
import random
from fractions import Fraction

import mpmath as mp

mp.mp.dps = 100


def as_double_coeffs(exact):
    """Round exact (int/Fraction/str decimal) coefficients to doubles."""
    out = []
    for c in exact:
        if isinstance(c, str):
            out.append(float(Fraction(c)))
        else:
            out.append(float(c))
    return out


def poly_from_roots_int(roots):
    c = [1]
    for r in roots:
        n = [0] * (len(c) + 1)
        for i, a in enumerate(c):
            n[i] += a
            n[i + 1] -= a * r
        c = n
    return c  # highest power first


def mp_roots(coeffs):
    """Roots of the polynomial with these double coefficients, 100 digits."""
    cs = [mp.mpf(c) for c in coeffs]  # exact conversion of doubles
    rs = mp.polyroots(cs, maxsteps=4000, extraprec=2000)
    # Newton check at higher precision.
    with mp.workdps(120):
        out = []
        for r in rs:
            z = mp.mpc(r)
            for _ in range(20):
                f = mp.polyval(cs, z)
                d = mp.polyval([c * (len(cs) - 1 - i) for i, c in enumerate(cs[:-1])], z)
                step = f / d
                z -= step
                if abs(step) <= mp.mpf(10) ** -110 * max(1, abs(z)):
                    break
            assert abs(z - r) <= mp.mpf(10) ** -40 * max(1, abs(z)), (z, r)
            out.append(z)
    return out


def check_exact(coeffs, roots_mult):
    """Exact check that each root (a rational or Gaussian rational given as
    (re, im) Fractions) is a root of the given multiplicity."""
    cs = [Fraction(c) for c in coeffs]
    for (re, im), m in roots_mult:
        z = complex_frac(re, im)
        d = cs[:]
        for j in range(m):
            v = peval(d, z)
            assert v == (0, 0), ("not a root of derivative", j, re, im, v)
            d = [c * (len(d) - 1 - i) for i, c in enumerate(d[:-1])]
        assert peval(d, z) != (0, 0), ("multiplicity too low", re, im, m)


def complex_frac(re, im):
    return (Fraction(re), Fraction(im))


def peval(cs, z):
    zr, zi = z
    sr, si = Fraction(0), Fraction(0)
    for c in cs:
        sr, si = sr * zr - si * zi + c, sr * zi + si * zr
    return (sr, si)


def fmt(z):
    z = mp.mpc(z)
    re, im = mp.re(z), mp.im(z)
    # Exact zeros computed as cos(pi/2) come out as 1e-102; store 0.
    if abs(re) < mp.mpf(10) ** -90:
        re = 0
    if abs(im) < mp.mpf(10) ** -90:
        im = 0
    return [float(re), float(im)]


def sort_key(z):
    return (float(mp.re(z)), float(mp.im(z)))


cases = []


def add(name, source, coeffs, roots, mult, reference, tol_rel, settings=None):
    rs = sorted([mp.mpc(r) for r in roots], key=sort_key)
    case = {
        "name": name,
        "source": source,
        "coeffs": [float(c) for c in coeffs],
        "reference": reference,
        "roots": [fmt(r) for r in rs],
        "multiplicities": mult,
        "tol_rel": tol_rel,
    }
    if settings is not None:
        case["cluster_tolerance"] = settings
    cases.append(case)


# Wilkinson's polynomial prod_{k=1}^{20} (x - k); its integer coefficients
# exceed 2^53 and are rounded to double. Wilkinson (1963, Rounding Errors in
# Algebraic Processes; 1984, "The perfidious polynomial").
w20 = as_double_coeffs(poly_from_roots_int(range(1, 21)))
add("wilkinson20", "Wilkinson (1963), Rounding Errors in Algebraic Processes, roots 1..20",
    w20, mp_roots(w20), [1] * 20, "mpmath roots of the double coefficients", 1e-12)

# Degree 22: so ill-conditioned that the compensated residual is not enough
# for some roots (math/big fallback), tested with cluster recognition off.
w22 = as_double_coeffs(poly_from_roots_int(range(1, 23)))
add("wilkinson22_no_clusters", "Wilkinson-type product of (x-k), k = 1..22; constructed",
    w22, mp_roots(w22), [1] * 22, "mpmath roots of the double coefficients", 1e-12, settings=-1)

# (x+1)^3 (x+2): exact integer coefficients, exact triple root.
c = [1, 5, 9, 7, 2]
check_exact(c, [((-1, 0), 3), ((-2, 0), 1)])
add("triple_root", "constructed: (x+1)^3 (x+2) (reference case E02)", c,
    [-1, -1, -1, -2], [1, 3], "exact factorisation", 1e-12)

# Roots -1e-6, -1e-3, -1, -1e3, -1e6 (reference case E04): decimal
# coefficients, rounded to double.
c = as_double_coeffs(["1", "1001001.001001", "1001002002.002001", "1001002002.002001", "1001001.001001", "1"])
add("spread_1e-6_to_1e6", "constructed: roots -1e-6, -1e-3, -1, -1e3, -1e6 (reference case E04)",
    c, mp_roots(c), [1] * 5, "mpmath roots of the double coefficients", 1e-13)

# Roots spanning 1e-6..1e6 with both signs and a complex pair; coefficients
# exact products computed in rationals, then rounded.
ex = [Fraction(1)]
for r in [Fraction(-1, 10**6), Fraction(1, 10**3), Fraction(-7, 10), Fraction(-3000), Fraction(10**6)]:
    n = [Fraction(0)] * (len(ex) + 1)
    for i, a in enumerate(ex):
        n[i] += a
        n[i + 1] -= a * r
    ex = n
# times x^2 + 2x + 5 (roots -1 +- 2i)
q = [Fraction(1), Fraction(2), Fraction(5)]
prod = [Fraction(0)] * (len(ex) + 2)
for i, a in enumerate(ex):
    for j, b in enumerate(q):
        prod[i + j] += a * b
c = [float(v) for v in prod]
add("spread_mixed_signs", "constructed: roots -1e-6, 1e-3, -0.7, -3e3, 1e6, -1 +- 2i", c, mp_roots(c),
    [1] * 7, "mpmath roots of the double coefficients", 1e-13)

# (x^2+2x+2)^2 (x+3): exact, double complex pair (reference case E06).
c = [1, 7, 20, 32, 28, 12]
check_exact(c, [((-1, 1), 2), ((-1, -1), 2), ((-3, 0), 1)])
add("double_complex_pair", "constructed: (x^2+2x+2)^2 (x+3) (reference case E06)", c,
    [mp.mpc(-3), mp.mpc(-1, -1), mp.mpc(-1, -1), mp.mpc(-1, 1), mp.mpc(-1, 1)], [1, 2, 2],
    "exact factorisation", 1e-12)

# (x-1)(x-1-2^-20)(x+3): close but distinct roots, exact in binary; must
# not be merged.
h = Fraction(1, 2**20)
ex = [Fraction(1), 1 - h, -5 - 2 * h, 3 * (1 + h)]
c = [float(v) for v in ex]
assert all(Fraction(a) == b for a, b in zip(c, ex))
check_exact(c, [((1, 0), 1), ((1 + h, 0), 1), ((-3, 0), 1)])
add("close_distinct", "constructed: (x-1)(x-1-2^-20)(x+3), exact in binary", c,
    [mp.mpf(1), mp.mpf(1) + mp.mpf(2) ** -20, mp.mpf(-3)], [1, 1, 1], "exact factorisation", 1e-13)

# (x+0.1)^3 (x-2) with decimal coefficients rounded to double; reference is
# the exact decimal polynomial's factorisation (see the module comment).
c = as_double_coeffs(["1", "-1.7", "-0.57", "-0.059", "-0.002"])
add("triple_inexact", "constructed: (x+0.1)^3 (x-2), decimal coefficients rounded to double", c,
    [mp.mpf("-0.1")] * 3 + [mp.mpf(2)], [1, 3],
    "exact decimal factorisation (not the double coefficients)", 1e-12)

# A nearly double complex pair far from the other roots: the leading part
# 1e-8 x^2 + x + 2.5e7 has discriminant 1 - 4*1e-8*2.5e7 = 0 up to
# rounding, so the eigenvalues can come out as two real numbers although
# the roots are -5e7 +- 0.85i (found by go test -fuzz FuzzRoots). A change
# of about 1.3u in a4 makes the pair an exact double root, so by default
# the package reports a double root at -5e7 (tested in Go); the reference
# here is for cluster recognition off.
c = [1e-08, 1.0, 25000000.0, -0.3333333333333333, 74.08333333333333, 2.0, 109.99988888888889]
add("near_double_complex_pair", "constructed (fuzzing find): 1e-8 x^6 + x^5 + 2.5e7 x^4 + ...", c, mp_roots(c),
    [1] * 6, "mpmath roots of the double coefficients", 1e-12, settings=-1)

# Chebyshev polynomial T_15: integer coefficients (exact), roots
# cos((2k-1) pi / 30) (closed form).
def cheb(n):
    t0, t1 = [1], [1, 0]
    for _ in range(n - 1):
        t2 = [2 * a for a in t1] + [0]
        pad = [0] * (len(t2) - len(t0)) + t0
        t0, t1 = t1, [a - b for a, b in zip(t2, pad)]
    return t1


c = cheb(15)
add("chebyshev15", "closed form: T_15(x) = cos(15 arccos x), roots cos((2k-1)pi/30)", [float(v) for v in c],
    [mp.cos((2 * k - 1) * mp.pi / 30) for k in range(1, 16)], [1] * 15, "closed form", 1e-13)

# Seeded random polynomials with double coefficients (uniform in [-1, 1]).
rng = random.Random(20261202)
for deg in (8, 12, 20):
    c = [rng.uniform(-1, 1) for _ in range(deg + 1)]
    add("random_degree%d" % deg, "constructed: seeded random coefficients (Python random, seed 20261202)",
        c, mp_roots(c), [1] * deg, "mpmath roots of the double coefficients", 1e-12)

print(json.dumps({
    "generator": "gen_roots.py (python3, mpmath %s, 100 digits)" % mp.__version__,
    "cases": cases}, indent=1))
