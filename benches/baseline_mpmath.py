"""The straightforward per-row baseline the table benchmark is compared with (not part of the
test suite): for each k, the running product of the rule at 50 digits with mpmath, plus the
closed form through log-Gamma at every row. Run: python3 benches/baseline_mpmath.py"""
import time
from mpmath import mp, mpf, loggamma, exp, nstr

mp.dps = 60
rho = mpf(3) / 10
alpha = 1 / (1 - rho)

start = time.perf_counter()
value = mpf(1)
rows = []
for k in range(1, 100001):
    if k > 1:
        value *= (k - 1) / (k + alpha)
    closed = exp(loggamma(k) + loggamma(2 + alpha) - loggamma(1) - loggamma(k + 1 + alpha))
    rows.append((k, nstr(value, 50), nstr(closed, 50)))
print(f"{len(rows)} rows in {time.perf_counter() - start:.2f} s")
