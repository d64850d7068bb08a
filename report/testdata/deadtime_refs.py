"""References for report/deadtime_test.go (mpmath, 50 digits).

Run: python3 deadtime_refs.py   (prints the values pasted in the test)

1. K·e^(−sτ)/(Ts + 1) under proportional control: the closed loop is stable
   for 0 ≤ K < K* = sqrt(1 + (ωT)²), ω the root of ωT = −tan(ωτ) in
   (π/(2τ), π/τ) (textbook result, from memory). T = 1, τ = 0.5.
2. ẋ = −a·x(t − τ), the loop a·e^(−sτ)/s: stable iff aτ < π/2 (Hayes 1950);
   rightmost roots s = W_k(−aτ)/τ (Asl & Ulsoy 2003); delay margin
   π/(2a) − τ. a = 1, τ = 0.5.
3. The step response of the same loop by the method of steps (Bellman &
   Cooke 1963): y = 0 on [0, τ]; y = a(t − τ) on [τ, 2τ];
   y = aτ + a·u − a²u²/2, u = t − 2τ on [2τ, 3τ];
   y = y(3τ) + ∫ a(1 − y(t' − τ)) dt' on [3τ, 4τ]. 10 % and 90 % times.
"""
from mpmath import mp, mpf, tan, sqrt, pi, findroot, lambertw

mp.dps = 50
T, tau = mpf(1), mpf("0.5")
w = findroot(lambda w: w * T + tan(w * tau), (pi / (2 * tau) + mpf("0.01"), pi / tau - mpf("0.01")), solver="anderson")
print("lag: crossing w =", mp.nstr(w, 20), " K* =", mp.nstr(sqrt(1 + (w * T) ** 2), 20))

a = mpf(1)
for k in (0, 1, 2):
    s = lambertw(-a * tau, k) / tau
    print("integrator: root W_%d =" % k, mp.nstr(s.real, 20), mp.nstr(s.imag, 20))
print("integrator: delay margin =", mp.nstr(pi / (2 * a) - tau, 20), " max delay =", mp.nstr(pi / (2 * a), 20))

# Method of steps, a = 1, tau = 0.5: t10 on [τ, 2τ]; t90 on [3τ, 4τ].
t10 = tau + mpf("0.1") / a
y3 = a * tau + a * tau - a**2 * tau**2 / 2  # y(3τ)
# on [3τ, 4τ], v = t − 3τ: y' = a(1 − y(t − τ)), y(t − τ) = aτ + a·v − a²v²/2
yv = lambda v: y3 + a * (1 - a * tau) * v - a**2 * v**2 / 2 + a**3 * v**3 / 6
v90 = findroot(lambda v: yv(v) - mpf("0.9"), mpf("0.05"))
t90 = 3 * tau + v90
print("step: t10 =", mp.nstr(t10, 20), " t90 =", mp.nstr(t90, 20), " rise =", mp.nstr(t90 - t10, 20))
