"""50-digit references for response.ClosedLoopStep (delay_step.json).

Run: python3 delay_step.py > delay_step.json

The method of steps (Bellman & Cooke 1963, ch. 3) solves the closed loop
y = L/(1+L) r, L = G e^{-s tau}, interval by interval; summed up it is the
terminating Neumann series
    y(t) = sum_{m=1}^{floor(t/tau)} (-1)^(m+1) h_m(t - m tau),
h_m the step response of G^m. Closed forms of h_m:
  * G = K/(T s + 1):        h_m(t) = K^m P(m, t/T)  (regularised lower
                            incomplete gamma function)
  * G = K/((s+a)(s+b)):     h_m(t) = K^m L^{-1}[1/(s (s+a)^m (s+b)^m)](t),
                            by residues at s = 0, -a, -b (mpmath diff of
                            the analytic parts, 50 digits).
"""
import json
import mpmath as mp

mp.mp.dps = 50


def lag_hm(K, T):
    return lambda m, t: K ** m * mp.gammainc(m, 0, t / T, regularized=True)


def two_pole_hm(K, a, b):
    def h(m, t):
        # residue at 0
        r = 1 / (a ** m * b ** m)
        # residue at -a of e^{st}/(s (s+a)^m (s+b)^m): (1/(m-1)!) d^{m-1}/ds^{m-1} [e^{st}/(s (s+b)^m)] at -a
        fa = lambda s: mp.exp(s * t) / (s * (s + b) ** m)
        fb = lambda s: mp.exp(s * t) / (s * (s + a) ** m)
        r += mp.diff(fa, -a, m - 1) / mp.factorial(m - 1)
        r += mp.diff(fb, -b, m - 1) / mp.factorial(m - 1)
        return K ** m * r
    return h


def y(hm, tau, t):
    s = mp.mpf(0)
    m = 1
    while m * tau <= t:
        s += (-1) ** (m + 1) * hm(m, t - m * tau)
        m += 1
    return s


cases = []
for name, num, den, K, hm, tau, times in [
    ("lag K=3 T=1 tau=0.5", [3.0], [1.0, 1.0], 3, lag_hm(mp.mpf(3), mp.mpf(1)), mp.mpf('0.5'),
     [mp.mpf(i) / 4 for i in range(0, 61)]),
    ("lag K=1.5 T=2 tau=0.8", [1.5], [2.0, 1.0], 1.5, lag_hm(mp.mpf('1.5'), mp.mpf(2)), mp.mpf('0.8'),
     [mp.mpf(i) / 2 for i in range(0, 61)]),
    ("two poles K=2 a=1 b=3 tau=0.3", [2.0], [1.0, 4.0, 3.0], 2, two_pole_hm(mp.mpf(2), mp.mpf(1), mp.mpf(3)), mp.mpf('0.3'),
     [mp.mpf(i) / 5 for i in range(0, 51)]),
]:
    cases.append({"name": name, "num": num, "den": den, "delaySec": float(tau),
                  "timeSec": [float(t) for t in times],
                  "output": [mp.nstr(y(hm, tau, t), 30) for t in times]})
print(json.dumps({"cases": cases}, indent=1))
