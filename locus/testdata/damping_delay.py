#!/usr/bin/env python3
"""Exact constant-damping crossings of loops with dead time, for
TestDampingCrossingsDeadTime: the point s = r*d, d = -zeta + j*sqrt(1-zeta^2),
and gain K with a(s) + K*b(s)*exp(-s*T) = 0 (no Padé approximation), by
mpmath findroot at 40 digits from the given starting values.
Run: python3 damping_delay.py"""
import mpmath as mp
mp.mp.dps = 40
zeta = mp.mpf("0.5")
d = mp.mpc(-zeta, mp.sqrt(1 - zeta**2))
T = mp.mpf("0.02")
cases = [
    ("1/(s(s+10))", lambda s: s*(s+10), lambda s: 1, (8.43, 72.2)),
    ("1/(s(s+10))", lambda s: s*(s+10), lambda s: 1, (304.1, 4347.6)),
]
for name, a, b, (r0, k0) in cases:
    def eqs(r, k):
        s = r*d
        v = a(s) + k*b(s)*mp.exp(-s*T)
        return [mp.re(v), mp.im(v)]
    r, k = mp.findroot(eqs, (mp.mpf(r0), mp.mpf(k0)))
    print(name, mp.nstr(r, 20), mp.nstr(k, 20))
