"""Reference roots for internal/quasipoly/quasipoly_test.go (mpmath, 50 digits).

Run: python3 lambertw_refs.py > lambertw_refs.json

The roots of s + a·e^(−sτ) = 0 are s = W_k(−aτ)/τ over every branch k of
the Lambert W function (Asl & Ulsoy 2003, "Analysis of a system of linear
delay differential equations", J. Dyn. Sys. Meas. Control 125(2), 215–223);
the rightmost one is the principal branch W_0 (and W_{−1} when −aτ lies in
(−1/e, 0), both real). For each case: the rightmost roots sorted by
decreasing real part (upper member of a pair first), and the number of roots
with Re s > sigma0 (every branch |k| ≤ 200 evaluated; branches beyond have
Re s far below sigma0, since Re W_k(x) ≈ ln|x| − ln(2π|k|)).
"""
import json
from mpmath import mp, mpf, lambertw

mp.dps = 50
cases = [
    # a, tau, sigma0
    ("0.2", "1", "-3"),     # -aτ = -0.2 > -1/e: two real rightmost roots
    ("1", "0.5", "-6"),     # aτ = 0.5: a stable complex pair (Hayes: aτ < π/2)
    ("2", "1", "-2.5"),     # aτ = 2 > π/2: an unstable pair
    ("10", "0.02", "-300"), # a fast loop, short delay
]
out = []
for a, tau, sigma0 in cases:
    A, T, S = mpf(a), mpf(tau), mpf(sigma0)
    roots = []
    for k in range(-200, 201):
        r = lambertw(-A * T, k) / T
        roots.append(r)
    roots.sort(key=lambda r: (-r.real, -r.imag))
    # keep distinct (W_0 and W_-1 coincide only at -1/e)
    above = [r for r in roots if r.real > S]
    out.append({
        "a": float(A), "tau": float(T), "sigma0": float(S),
        "count_above": len(above),
        "rightmost": [[mp.nstr(r.real, 25), mp.nstr(r.imag, 25)] for r in roots[:8]],
    })
print(json.dumps(out, indent=1))
