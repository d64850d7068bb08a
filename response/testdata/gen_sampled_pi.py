#!/usr/bin/env python3
"""Exact step-response settling of the sampled PI loop of
golden_test.go's "PI loop, late grazing exit" case, for the closed-loop
coefficients in z that Tustin conversion at T = 2 ms and tf.ClosedLoop give
in double precision (copied to 17 digits from the Go values), written to
sampled_pi.json:

    python3 gen_sampled_pi.py > sampled_pi.json     (about 30 s)

The coefficients are read as exact rationals (mpmath at 60 digits: the sums at z = 1 cancel 13 of them) and the
difference equation den(q)·y = num(q)·u, u = 1 from k = 0, is iterated
exactly; the final value is num(1)/den(1) of these coefficients. The point
of the case: the exact Tustin equivalent of a type-1 loop has T(1) = 1, but
these rounded coefficients have T(1) = 1.00148 (den(1) ≈ 1.3e-13 is a sum
of terms of size 1 and 3), so the late dip at 543.6 s that grazes the 2 %
band in continuous time (−2.00028 %) stays inside it (−1.983 %) and the
last exit is the one near 464 s.
"""
import json
import mpmath as mp

mp.mp.dps = 60
T = 0.002
numf = [6.6665444475184263e-10, 6.6668777664078297e-10, -6.6658778097396185e-10, -6.6662111286290219e-10]
denf = [1.0000000006666545, -2.9999133350887921, 2.999826672177647, -0.99991333775537627]
num = [mp.mpf(x) for x in numf]
den = [mp.mpf(x) for x in denf]
fv = sum(num) / sum(den)
K = 600000
out = []
partial = [sum(num[: i + 1]) for i in range(4)]
last = -1
for k in range(K):
    s = partial[min(k, 3)]
    for i in range(1, 4):
        if k - i >= 0:
            s -= den[i] * out[k - i]
    v = s / den[0]
    out.append(v)
    if abs(v / fv - 1) > mp.mpf("0.02"):
        last = k
assert last < K // 2
dip = min(range(250000, 300000), key=lambda j: out[j])
print(json.dumps({
    "generator": "gen_sampled_pi.py (mpmath %s, %d digits)" % (mp.__version__, mp.mp.dps),
    "sample_time_sec": T, "num": numf, "den": denf,
    "final_value": float(fv),
    "last_outside_sample": last,
    "settling_time_sec": (last + 1) * T,
    "dip_time_sec": dip * T,
    "dip_relative": float(out[dip] / fv - 1),
}, indent=1))
