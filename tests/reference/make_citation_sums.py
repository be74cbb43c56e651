"""Reference sums for examples/citation_growth.rule at 1000 digits (tests/solve_digits.rs).

Source: mpmath (https://mpmath.org), hyp2f1 at z = 1 (Gauss's theorem inside mpmath), computed
here at 1100 significant digits independently of telescope's own code.

Derivation (by hand, from the rule n(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k), k >= 2, n(1) = 1):
with b = (2-rho)/(1-rho) the rule is n(k+1)/n(k) = k/(k+b), so t_m = n(m+1) = (1)_m/(b+1)_m and
  total  = sum t_m            = 2F1(1, 1; b+1; 1)
  S1     = sum (m+1) t_m      = 2F1(2, 1; b+1; 1)           ((m+1) = (2)_m/(1)_m)
  S2     = sum (m+1)^2 t_m    = 2*2F1(3, 1; b+1; 1) - S1    ((m+1)(m+2) = 2 (3)_m/(1)_m)
  mean = S1/total, variance = S2/total - mean^2.
Run: python3 make_citation_sums.py > citation_sums.json
"""
import json

import mpmath
from mpmath import mp, mpf, hyp2f1

mp.dps = 1100
OUT_DIGITS = 1000


def sums(rho):
    b = (2 - rho) / (1 - rho)
    total = hyp2f1(1, 1, b + 1, 1)
    s1 = hyp2f1(2, 1, b + 1, 1)
    mean = s1 / total
    out = {"total": total, "mean": mean}
    if b > 3:  # sum k^2 n(k) converges when n(k) ~ k^(-b) with b > 3
        s2 = 2 * hyp2f1(3, 1, b + 1, 1) - s1
        out["variance"] = s2 / total - mean**2
    return out


result = {
    "source": "mpmath %s hyp2f1 at z=1, mp.dps=%d (make_citation_sums.py)" % (mpmath.__version__, mp.dps),
    "digits": OUT_DIGITS,
    "values": {},
}
for name, rho in (("3/10", mpf(3) / 10), ("7/10", mpf(7) / 10)):
    result["values"][name] = {
        k: mpmath.nstr(v, OUT_DIGITS, min_fixed=-1, max_fixed=10) for k, v in sums(rho).items()
    }
print(json.dumps(result, indent=1))
