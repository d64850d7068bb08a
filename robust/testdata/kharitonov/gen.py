"""Reference values for TestKharitonovDegreeSeven (robust/published_test.go).

Interval families of degree 7 around the centre polynomial
(s+2)(s+3)(s+5)(s^2+0.5s+1)(s^2+s+4), each coefficient a_k in
[a_k(1-w_k), a_k(1+w_k)] (the leading one fixed at 1), a scenario of this
project. For each family the four Kharitonov polynomials (Kharitonov 1978)
are formed exactly as the Go test forms them (the same float64 products)
and their roots are computed with mpmath.polyroots at 40 digits; the
largest real part decides Hurwitz stability independently of the Go code.

Run: python3 gen.py > golden.json
"""
import json
import mpmath as mp

mp.mp.dps = 40


def mul(a, b):
    """Product of two polynomials, ascending coefficients (exact here)."""
    return [sum(a[i] * b[k - i] for i in range(len(a)) if 0 <= k - i < len(b))
            for k in range(len(a) + len(b) - 1)]


centre = [1.0]
for f in ([2.0, 1.0], [3.0, 1.0], [5.0, 1.0], [1.0, 0.5, 1.0], [4.0, 1.0, 1.0]):
    centre = mul(centre, f)

# Power k takes the upper bound in Kharitonov polynomial q when
# PATTERN[q][k % 4] is 1 (ascending powers).
PATTERN = [[0, 0, 1, 1], [1, 1, 0, 0], [0, 1, 1, 0], [1, 0, 0, 1]]

families = {
    "stable, ±5 %": [0.05] * 7 + [0.0],
    "only the third Kharitonov polynomial unstable": [0.15, 0.05, 0.05, 0.05, 0.05, 0.1, 0.1, 0.0],
    "all four unstable, ±10 %": [0.1] * 7 + [0.0],
}

out = {"centre": centre, "families": []}
for name, w in families.items():
    lo = [c * (1 - wk) for c, wk in zip(centre, w)]
    hi = [c * (1 + wk) for c, wk in zip(centre, w)]
    ks = []
    for q in range(4):
        a = [hi[k] if PATTERN[q][k % 4] else lo[k] for k in range(len(lo))]
        roots = mp.polyroots([mp.mpf(x) for x in reversed(a)], maxsteps=400, extraprec=400)
        m = max(mp.re(r) for r in roots)
        ks.append({"ascending": a, "max_real_part": float(m), "hurwitz": bool(m < 0)})
    out["families"].append({"name": name, "lo": lo, "hi": hi, "kharitonov": ks})
print(json.dumps(out, indent=1))
