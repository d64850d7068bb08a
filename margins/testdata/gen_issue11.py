#!/usr/bin/env python3
"""Reference values for the issue-11 regression tests of margins
(margins/issue11_test.go), computed with mpmath at 50 significant digits
from the closed forms written beside each case. Deterministic:

    cd margins/testdata && python3 gen_issue11.py > issue11.json
"""
import json
import mpmath as mp

mp.mp.dps = 50


def s(x):
    return mp.nstr(x, 40, strip_zeros=False) if mp.isfinite(x) else ("inf" if x > 0 else "-inf")


out = {}

# 10·s·e^(−0.1 s)/((s+1)(s+2)): |L|² = 100ω²/((ω²+1)(ω²+4)) = 1 gives
# ω⁴ − 95ω² + 4 = 0; phase ψ(ω) = π/2 − atan ω − atan(ω/2) − 0.1ω.
tau = mp.mpf("0.1")
L = lambda w: 10 * 1j * w * mp.exp(-1j * w * tau) / ((1j * w + 1) * (1j * w + 2))
psi = lambda w: mp.pi / 2 - mp.atan(w) - mp.atan(w / 2) - tau * w
gains = sorted(mp.sqrt((95 + sg * mp.sqrt(95**2 - 16)) / 2) for sg in (-1, 1))
gx = []
for w in gains:
    pm = 180 + psi(w) * 180 / mp.pi
    pm = pm - 360 * mp.floor((pm + 180) / 360)  # to [−180, 180)
    if pm == -180:
        pm = mp.mpf(180)
    gx.append({"w": s(w), "pm_deg": s(pm)})
# Phase crossovers: ψ(ω) = −π + 2πk, ψ strictly decreasing for ω > 0
# (each term decreases), up to 100 rad/s.
px = []
k = 0
while True:
    level = -mp.pi + 2 * mp.pi * k
    if psi(mp.mpf(100)) > level:
        break
    lo, hi = mp.mpf("1e-9"), mp.mpf(100)
    w = mp.findroot(lambda x: psi(x) - level, (lo, hi), solver="anderson")
    px.append({"w": s(w), "gain_factor": s(1 / abs(L(w)))})
    k -= 1
# Delay margin: min over gain crossovers of φ/ω, φ = 180° + ψ wrapped to [0, 2π).
dm = min(((mp.pi + psi(w)) % (2 * mp.pi)) / w for w in gains)
out["axis_zero_delay"] = {
    "loop": "10s/((s+1)(s+2)) with dead time 0.1 s",
    "gain_crossovers": gx,
    "phase_crossovers": px,
    "delay_margin_sec": s(dm),
}

# 1/s³ sampled by the matched pole–zero map with T = 0.1 s:
# L(z) = c·(z+1)³/(z−1)³, c = T³/8 (the gain matched at... the map gives
# (z+1)³ for the three zeros at infinity); on the unit circle
# (z+1)/(z−1) = −j·cot(θ/2), so L = j·c·cot³(θ/2): purely imaginary, no
# phase crossover, gain crossover where c·cot³(θ/2) = 1.
T = mp.mpf("0.1")
c = T**3 / 8
theta = 2 * mp.acot(1 / mp.cbrt(c))
out["matched_triple_integrator"] = {
    "loop": "1/s^3, matched pole-zero, T = 0.1 s",
    "gain_crossover_w": s(theta / T),
    "phase_margin_deg": s(mp.mpf(-90)),
}

# 1e300/(s+1): |L| = 1 at ω = √(1e600 − 1); phase −atan ω → PM = 180 − atan(ω)·180/π.
w = mp.sqrt(mp.mpf(10) ** 600 - 1)
out["huge_gain"] = {
    "loop": "1e300/(s+1)",
    "gain_crossover_w": s(w),
    "phase_margin_deg": s(180 - mp.atan(w) * 180 / mp.pi),
    "delay_margin_sec": s((mp.pi - mp.atan(w)) / w),
    "bandwidth": s(mp.mpf(10) ** 300 + 1),
}

# 1e20/(s+1e10)²: |L| < 1 for ω > 0 (|L(0)| = 1): no gain crossover.
# Ms at ω = 2e10 (d/dω of (1+w²)²/(w⁴+4) = 0 at w = 2, w = ω/1e10):
# Ms = 5/√20; T = 1e20/(s² + 2e10 s + 2e20), ζ = 1/√2: Mt = T(0) = 1/2,
# bandwidth ωn = √2·1e10.
out["time_scale_1e10"] = {
    "loop": "1e20/((s+1e10)^2)",
    "ms": s(5 / mp.sqrt(20)),
    "ms_w": s(mp.mpf("2e10")),
    "mt": s(mp.mpf(1) / 2),
    "bandwidth": s(mp.sqrt(2) * mp.mpf(10) ** 10),
}

# 1/(1e308 s + 1): T = 1/(1e308 s + 2): bandwidth 2e-308.
out["slow_pole_1e308"] = {
    "loop": "1/(1e308s+1)",
    "bandwidth": s(2 / mp.mpf("1e308")),
}
print(json.dumps(out, indent=1, sort_keys=True))
