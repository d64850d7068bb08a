"""Reference dominant sets for spec/dominant_test.go (mpmath, 50 digits).

Run: python3 dominant_lambertw.py > dominant_lambertw.json

The loop L = a·e^(−sτ)/s closes to s + a·e^(−sτ) = 0, whose roots are
s = W_k(−aτ)/τ over every branch k of the Lambert W function (Asl & Ulsoy
2003, "Analysis of a system of linear delay differential equations",
J. Dyn. Sys. Meas. Control 125(2), 215–223). |L(jω)| = a/ω, so the one gain
crossover is ω_c = a. The dominant set of package spec is every root with
Re s > σ_d = min(F·Re s₁, −M·ω_c) (F·Re s₁ only when Re s₁ < 0), s₁ the
rightmost root. Branches |k| ≤ 400 are evaluated; beyond them
Re W_k(x) ≈ ln|x| − ln(2π|k|) lies far below every σ_d here (checked below).
For each case: the number of roots in the set, the smallest damping ratio
−Re s/|s| over it and the root (upper member of a pair) that has it.
"""
import json
from mpmath import mp, mpf, lambertw, fabs, sqrt

mp.dps = 50
K = 400
cases = [
    # a, tau, F, M
    ("1", "0.5", "5", "3"),    # aτ = 0.5: a well-damped rightmost pair
    ("1", "1", "5", "3"),      # aτ = 1 (reference case C04, e^(−s)/s)
    ("1", "1.5", "5", "3"),    # aτ = 1.5 just below π/2 (Hayes 1950): lightly damped
    ("0.2", "1", "5", "3"),    # −aτ > −1/e: real rightmost roots
    ("2", "1", "5", "3"),      # aτ = 2 > π/2: unstable pair
    ("1", "0.5", "10", "1"),   # other settings: a wider factor, a smaller multiple
    ("1", "0.5", "2", "1"),    # a narrow set
]
out = []
for a, tau, f, m in cases:
    A, T, F, M = mpf(a), mpf(tau), mpf(f), mpf(m)
    roots = [lambertw(-A * T, k) / T for k in range(-K, K + 1)]
    roots.sort(key=lambda r: (-r.real, -r.imag))
    alpha = roots[0].real
    sigma = -M * A
    if alpha < 0:
        sigma = min(sigma, F * alpha)
    # the farthest branches evaluated lie well left of sigma
    assert max(lambertw(-A * T, K).real, lambertw(-A * T, -K).real) / T < sigma - 1
    dom = [r for r in roots if r.real > sigma]
    zeta, worst = None, None
    for r in dom:
        z = -r.real / sqrt(r.real**2 + r.imag**2)
        if zeta is None or z < zeta - mpf(10)**-30:
            zeta, worst = z, r
    out.append({
        "a": float(A), "tau": float(T), "factor": float(F), "multiple": float(M),
        "abscissa": mp.nstr(sigma, 25),
        "count": len(dom),
        "zeta_min": mp.nstr(zeta, 25),
        "worst": [mp.nstr(worst.real, 25), mp.nstr(fabs(worst.imag), 25)],
    })
print(json.dumps(out, indent=1))
