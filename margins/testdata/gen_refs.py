#!/usr/bin/env python3
"""Reference values for the margins tests and benchmarks (python3 + mpmath).

    python3 gen_refs.py > refs.json

Writes, for each loop, closed-loop stability (roots of D + N), every gain crossover (omega, phase margin), every
phase crossover (omega, gain factor k = 1/|L|), the gain and phase margins,
and for the loops marked "peaks" also Ms and Mt with their frequencies.

The input coefficients are float64 numbers written with repr (17 significant
digits at most, parsed back to the same double by Go); this script reads
each as the exact binary value of that double (Fraction(float)), so the
references belong to exactly the loop the Go code sees.

Method (independent of the Go code, which uses eigenvalues of companion
matrices in double precision): exact rational arithmetic for the polynomials
in x = w^2, |N(jw)|^2 - |D(jw)|^2 for gain crossovers and Im(N conj D)/w for
phase crossovers, their roots by mpmath's Durand-Kerner solver (polyroots)
at 120 digits, real positive roots polished by Newton's method, values
evaluated at 50 digits. Ms/Mt are maxima over x = 0, the positive roots of
P'Q - PQ' (|S|^2 = P/Q) and x = infinity.
"""
import json
from fractions import Fraction

import mpmath as mp

mp.mp.dps = 50
WORK = 120


def ptrim(p):
    i = 0
    while i < len(p) - 1 and p[i] == 0:
        i += 1
    return p[i:]


def padd(p, q):
    n = max(len(p), len(q))
    p = [Fraction(0)] * (n - len(p)) + p
    q = [Fraction(0)] * (n - len(q)) + q
    return ptrim([a + b for a, b in zip(p, q)])


def pneg(p):
    return [-a for a in p]


def pmul(p, q):
    r = [Fraction(0)] * (len(p) + len(q) - 1)
    for i, a in enumerate(p):
        for j, b in enumerate(q):
            r[i + j] += a * b
    return ptrim(r)


def pder(p):
    n = len(p) - 1
    return ptrim([a * (n - i) for i, a in enumerate(p[:-1])]) or [Fraction(0)]


def axis_parts(p):
    """p(jw) = re(x) + j w im(x), x = w^2; highest power first."""
    asc = list(reversed(p))
    re = [Fraction(0)] * (len(asc) // 2 + 1)
    im = [Fraction(0)] * (len(asc) // 2 + 1)
    for k, a in enumerate(asc):
        m = k // 2
        s = -1 if m % 2 else 1
        if k % 2 == 0:
            re[m] += s * a
        else:
            im[m] += s * a
    return ptrim(list(reversed(re))), ptrim(list(reversed(im)))


X = [Fraction(1), Fraction(0)]


def sqmod(re, im):
    return padd(pmul(re, re), pmul(X, pmul(im, im)))


def positive_roots(p):
    p = ptrim(p)
    while len(p) > 1 and p[-1] == 0:
        p = p[:-1]
    if len(p) < 2:
        return []
    with mp.workdps(WORK):
        c = [mp.mpf(a.numerator) / a.denominator for a in p]
        if len(c) == 2:
            rs = [-c[1] / c[0]]
        else:
            rs = mp.polyroots(c, maxsteps=5000, extraprec=4 * WORK)
        dc = [mp.mpf(a.numerator) / a.denominator for a in pder(p)]
        out = []
        for r in rs:
            r = mp.mpc(r)
            if abs(r.imag) > mp.mpf(10) ** -40 * max(1, abs(r)) or r.real <= 0:
                continue
            x = r.real
            for _ in range(10):
                x = x - mp.polyval(c, x) / mp.polyval(dc, x)
            out.append(x)
    return sorted(out)


def analyse(num, den, peaks):
    N = [Fraction(a) for a in num]
    D = [Fraction(a) for a in den]
    nr, ni = axis_parts(N)
    dr, di = axis_parts(D)
    Nm = [mp.mpf(a.numerator) / a.denominator for a in N]
    Dm = [mp.mpf(a.numerator) / a.denominator for a in D]

    def L(w):
        s = mp.mpc(0, w)
        return mp.polyval(Nm, s) / mp.polyval(Dm, s)
    res = {"num": num, "den": den}
    gcs = []
    for x in positive_roots(padd(sqmod(nr, ni), pneg(sqmod(dr, di)))):
        w = mp.sqrt(x)
        pm = 180 + mp.degrees(mp.arg(L(w)))
        if pm > 180:
            pm -= 360
        gcs.append({"omega": w, "pm_deg": pm})
    res["gain_crossovers"] = gcs
    J = padd(pmul(ni, dr), pneg(pmul(nr, di)))
    pcs = []
    if D[-1] != 0 and N[-1] / D[-1] < 0:
        pcs.append({"omega": mp.mpf(0), "gain_factor": -mp.mpf(D[-1]) / N[-1]})
    for x in positive_roots(J):
        w = mp.sqrt(x)
        v = L(w)
        if v.real < 0:
            pcs.append({"omega": w, "gain_factor": 1 / abs(v)})
    res["phase_crossovers"] = pcs
    up = [p for p in pcs if p["gain_factor"] > 1]
    if up:
        g = min(up, key=lambda p: p["gain_factor"])
        res["gm"], res["gm_omega"] = g["gain_factor"], g["omega"]
    else:
        res["gm"], res["gm_omega"] = "inf", None
    if gcs:
        g = min(gcs, key=lambda p: p["pm_deg"])
        res["pm_deg"], res["pm_omega"] = g["pm_deg"], g["omega"]
    else:
        res["pm_deg"], res["pm_omega"] = None, None
    C = padd(D, [Fraction(0)] * (len(D) - len(N)) + N)
    with mp.workdps(WORK):
        cc = [mp.mpf(a.numerator) / a.denominator for a in C]
        res["closed_loop_stable"] = bool(all(mp.mpc(z).real < 0 for z in mp.polyroots(cc, maxsteps=5000, extraprec=4 * WORK)))
    if peaks:
        C = padd(D, [Fraction(0)] * (len(D) - len(N)) + N)
        cr, ci = axis_parts(C)
        Q = sqmod(cr, ci)
        for name, P in (("ms", sqmod(dr, di)), ("mt", sqmod(nr, ni))):
            dd = padd(pmul(pder(P), Q), pneg(pmul(P, pder(Q))))
            best = None
            cands = [mp.mpf(0)] if Q[-1] != 0 else []
            cands += positive_roots(dd)
            for x in cands:
                qv = mp.polyval([mp.mpf(a.numerator) / a.denominator for a in Q], x)
                pv = mp.polyval([mp.mpf(a.numerator) / a.denominator for a in P], x)
                v = mp.sqrt(pv / qv)
                if best is None or v > best[0]:
                    best = (v, mp.sqrt(x))
            if len(P) == len(Q):
                lim = mp.sqrt((mp.mpf(P[0].numerator) / P[0].denominator) / (mp.mpf(Q[0].numerator) / Q[0].denominator))
                if lim > best[0] * (1 + mp.mpf(10) ** -40):
                    best = (lim, "inf")
            res[name], res[name + "_omega"] = best
    return res


def fam_den(n):
    """s * prod_{i<n} (s/p_i + 1), p_i log-spaced from 2 to 2000, in float64
    arithmetic (the coefficients are then fixed doubles)."""
    if n == 2:
        poles = [2.0]
    else:
        poles = [2.0 * 1000.0 ** (i / (n - 2)) for i in range(n - 1)]
    c = [1.0, 0.0]  # s
    for p in poles:
        f = [1.0 / p, 1.0]
        r = [0.0] * (len(c) + 1)
        for i, a in enumerate(c):
            r[i] += a * f[0]
            r[i + 1] += a * f[1]
        c = r
    return c


def tojson(v):
    if isinstance(v, dict):
        return {k: tojson(x) for k, x in v.items()}
    if isinstance(v, list):
        return [tojson(x) for x in v]
    if isinstance(v, (mp.mpf,)):
        return float(v)
    return v


def main():
    loops = []
    # Motion loop with a collocated flexible mode (this project's own
    # scenario): 5(s+1)/(s(s+10)) * (1.5625 s^2 + s + 400)/(s^2 + 0.8 s + 400):
    # three gain crossovers, one of them with a negative phase margin while
    # the closed loop is stable.
    r = analyse([7.8125, 12.8125, 2005.0, 2000.0], [1.0, 10.8, 408.0, 4000.0, 0.0], True)
    r["name"] = "resonance"
    loops.append(r)
    for n in list(range(2, 13)) + [14, 16, 18, 20, 22, 24]:
        r = analyse([0.5], fam_den(n), False)
        r["name"] = "family%d" % n
        r["order"] = n
        loops.append(r)
    out = []
    for r in loops:
        out.append(tojson(r))
    # 17 significant digits: float() of an mpf rounds to nearest double, and
    # json writes the shortest repr of that double.
    print(json.dumps({"generator": "gen_refs.py (mpmath %s, %d digits)" % (mp.__version__, mp.mp.dps),
                      "loops": out}, indent=1))


if __name__ == "__main__":
    main()
