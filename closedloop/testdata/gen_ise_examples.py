"""Confirms the ISE values of closedloop's TestISEPublishedExamples at 50 digits.

ISE of the error after a unit reference step = ∫₀^∞ e(t)² dt
= (1/π)∫₀^∞ |B(jω)/A(jω)|² dω (Parseval), with e the impulse response of
B/A = E(s)/s.  Computed by mpmath.quad in frequency, independently of the
integral tables and of the package's Lyapunov solve.
Run: python3 gen_ise_examples.py > ise_examples.txt
"""
import mpmath as mp

mp.mp.dps = 50

def ise(b, a):
    def h2(w):
        s = mp.mpc(0, w)
        return abs(mp.polyval(b, s) / mp.polyval(a, s)) ** 2
    return mp.quad(h2, [0, 1, 10, mp.inf]) / mp.pi

cases = [
    # name, B, A: standard second-order loop, E/s = (s + 2ζωn)/(s² + 2ζωn s + ωn²)
    ("zeta=0.5 wn=1", [1, 1], [1, 1, 1], "1"),
    ("zeta=1 wn=1", [1, 2], [1, 2, 1], "5/4"),
    ("zeta=0.25 wn=1", [1, 0.5], [1, 0.5, 1], "5/4"),
    ("zeta=0.5 wn=4", [1, 4], [1, 4, 16], "1/4"),
    # L = 1/(s(s+1)(s+2)): E/s = (s² + 3s + 2)/(s³ + 3s² + 2s + 1)
    ("K/(s(s+1)(s+2)) K=1", [1, 3, 2], [1, 3, 2, 1], "19/10"),
]
for name, b, a, table in cases:
    print(f"{name}: ISE = {mp.nstr(ise(b, a), 40)} (table value {table})")
