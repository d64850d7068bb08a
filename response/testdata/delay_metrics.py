"""50-digit step metrics of delayed first-order loops for
response.ClosedLoopStepMetrics (delay_metrics.json).

Run: python3 delay_metrics.py > delay_metrics.json

Closed loop of L = K exp(-s tau)/(T s + 1), unit reference step. The
response is the method-of-steps closed form (Bellman & Cooke 1963)
    y(t) = sum_{m >= 1, m tau <= t} (-1)^(m+1) K^m P(m, (t - m tau)/T),
    y'(t) = sum (-1)^(m+1) K^m u^(m-1) e^(-u) / (T (m-1)!),  u = (t - m tau)/T.
Metrics (common-practice levels: 10-90 % rise, 2 % band, last exit) are
located by scanning a grid (step 0.01 s) and polishing with findroot at 50
digits.
"""
import json
import mpmath as mp


def y(K, T, tau, t):
    s = mp.mpf(0)
    m = 1
    while m * tau <= t:
        s += (-1) ** (m + 1) * K ** m * mp.gammainc(m, 0, (t - m * tau) / T, regularized=True)
        m += 1
    return s


def dy(K, T, tau, t):
    s = mp.mpf(0)
    m = 1
    while m * tau < t:
        u = (t - m * tau) / T
        s += (-1) ** (m + 1) * K ** m * u ** (m - 1) * mp.exp(-u) / (T * mp.factorial(m - 1))
        m += 1
    return s


def refine(f, a, b):
    mp.mp.dps = 50
    return mp.findroot(f, (mp.mpf(a), mp.mpf(b)), solver='anderson')


cases = []
for K, T, tau, H in [(1.5, 2, 0.8, 40), (3, 1, 0.5, 40)]:
    mp.mp.dps = 20
    Km, Tm, taum = mp.mpf(K), mp.mpf(T), mp.mpf(tau)
    final = Km / (1 + Km)
    h = mp.mpf('0.01')
    grid = [h * i for i in range(int(H / 0.01) + 1)]
    vals = [y(Km, Tm, taum, t) / final for t in grid]
    ders = [dy(Km, Tm, taum, t) for t in grid]

    def first(level):
        for i in range(1, len(vals)):
            if vals[i] >= level:
                return refine(lambda t: y(Km, Tm, taum, t) / final - level, grid[i - 1], grid[i])
    rise_lo, rise_hi = first(mp.mpf('0.1')), first(mp.mpf('0.9'))
    last = max(i for i in range(len(vals)) if abs(vals[i] - 1) > mp.mpf('0.02'))
    level = 1 + mp.mpf('0.02') if vals[last] > 1 else 1 - mp.mpf('0.02')
    settle = refine(lambda t: y(Km, Tm, taum, t) / final - level, grid[last], grid[last + 1])
    imax = max(range(len(vals)), key=lambda i: vals[i])
    tpk = refine(lambda t: dy(Km, Tm, taum, t), grid[imax - 1], grid[imax + 1])
    mp.mp.dps = 50
    pk = y(Km, Tm, taum, tpk)
    cases.append({"K": K, "T": T, "tau": tau,
                  "finalValue": mp.nstr(final, 30),
                  "riseStartSec": mp.nstr(rise_lo, 30), "riseEndSec": mp.nstr(rise_hi, 30),
                  "settlingTimeSec": mp.nstr(settle, 30),
                  "peakTimeSec": mp.nstr(tpk, 30), "peakValue": mp.nstr(pk, 30),
                  "overshootPct": mp.nstr(100 * (pk / final - 1), 30)})
print(json.dumps({"cases": cases}, indent=1))
