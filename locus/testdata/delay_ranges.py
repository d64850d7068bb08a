"""50-digit references for DelayedStableGains and DelayedStableDelays
(delay_ranges.json), from the exact crossing conditions.

Run: python3 delay_ranges.py > delay_ranges.json

1. First-order lag under proportional control K*exp(-s*tau)/(T*s + 1)
   (a textbook result, from memory): stable for -1 < K < K*, where
   K* = sqrt(1 + (w*T)^2) and w in (pi/(2 tau), pi/tau) solves
   w*T = -tan(w*tau).
2. Third-order loop k*exp(-s*tau)/(s+1)^3: positive crossing gains solve
   phi(w) = w*tau + 3*atan(w) = q*pi, k = +-|(jw+1)^3|.
3. Delay switches of s^2 + 0.1 s + 1 + 0.5 exp(-s tau) (Cooke & van den
   Driessche 1986): w_i^2 roots of (1 - w^2)^2 + 0.01 w^2 - 0.25, delays
   tau = (theta_i + 2 pi m)/w_i with theta_i = arg(-k N(jw)/D(jw)).
"""
import json
import mpmath as mp

mp.mp.dps = 50
out = {}

lag = []
for T, tau in [(1, 0.5), (2, 0.1), (0.3, 1.0)]:
    T, tau = mp.mpf(T), mp.mpf(tau)
    f = lambda w: w * T + mp.tan(w * tau)
    w = mp.findroot(f, (mp.pi / (2 * tau) * (1 + mp.mpf(10) ** -30), mp.pi / tau * (1 - mp.mpf(10) ** -30)), solver='bisect' if False else 'anderson')
    assert mp.pi / (2 * tau) < w < mp.pi / tau
    lag.append({"T": float(T), "tau": float(tau), "omega": mp.nstr(w, 30), "Kstar": mp.nstr(mp.sqrt(1 + (w * T) ** 2), 30)})
out["firstOrderLag"] = lag

# Third-order: crossings with positive k have phi = (2q+1) pi (k = |D/N| > 0
# needs -D e^{jw tau}/N > 0: arg D + w tau = pi mod 2 pi).
tau = mp.mpf('0.4')
third = []
for q in range(0, 3):
    g = lambda w: w * tau + 3 * mp.atan(w) - (2 * q + 1) * mp.pi
    w = mp.findroot(g, mp.mpf(1 + 3 * q))
    third.append({"omega": mp.nstr(w, 30), "gain": mp.nstr(abs((1j * w + 1) ** 3), 30)})
out["thirdOrder"] = {"tau": float(tau), "positiveCrossings": third}

# Delay switches.
k = mp.mpf('0.5')
ws = []
for u in [(mp.mpf('1.99') + mp.sqrt(mp.mpf('1.99') ** 2 - 3)) / 2, (mp.mpf('1.99') - mp.sqrt(mp.mpf('1.99') ** 2 - 3)) / 2]:
    w = mp.sqrt(u)
    D = (1j * w) ** 2 + mp.mpf('0.1') * 1j * w + 1
    v = -k / D
    th = mp.arg(v) % (2 * mp.pi)
    Fp = 4 * w ** 3 - 2 * mp.mpf('1.99') * w  # d/dw of w^4 - 1.99 w^2 + 0.75
    ws.append((w, th, 1 if Fp > 0 else -1))
ev = []
for w, th, d in ws:
    for m in range(0, 8):
        ev.append(((th + 2 * mp.pi * m) / w, w, d))
ev.sort(key=lambda e: e[0])
out["switches"] = {"den": [1, 0.1, 1], "num": [1], "gain": 0.5,
                   "events": [{"delaySec": mp.nstr(t, 30), "omega": mp.nstr(w, 30), "direction": d} for t, w, d in ev[:10]]}
print(json.dumps(out, indent=1))
