#!/usr/bin/env python3
"""Reference values and constants for the core trig kernel (packages/core/src/kernels/trig.ts).

1. Reference values: numpy.sin and numpy.cos (NumPy 2.4 on glibc, the outside reference) at a few
   thousand arguments: uniform in [-10, 10]; log-spread magnitudes from 1e-8 to 1e6 and beyond the
   kernel's reduction limit 2^19·π/2 (up to 1e300); the doubles nearest to multiples k·π/2 and their
   neighbours (k up to 5e5); tiny values down to subnormals; ±0. Written to
   packages/core/fixtures/trig.json.
2. The kernel's constants, for the record (the test does not read them; trig.ts has them as
   literals): π/2 split into P1 + P2 + P3 (33 + 33 + 53 significant bits) from 80 digits of π by
   Machin's formula (exact rational arithmetic with fractions.Fraction); and the polynomial
   coefficients, Chebyshev interpolants (mpmath.chebyfit, 50 digits) of
   (sin √z − √z)/z^{3/2} and (cos √z − 1 + z/2)/z² on z ∈ [0, (π/4)²], 6 coefficients each,
   rounded to double.
Run: python3 scripts/reference/core_trig.py
"""
import json
import math
import os
import platform
from fractions import Fraction

import numpy as np

# ---------------------------------------------------------------- reference values
rng = np.random.default_rng(20261202)
LIMIT = 2.0**19 * (math.pi / 2)

uniform = rng.uniform(-10.0, 10.0, size=2000)
sign = rng.choice([-1.0, 1.0], size=600)
log_spread = sign * 10.0 ** rng.uniform(-8.0, 6.0, size=600)
beyond = rng.choice([-1.0, 1.0], size=120) * 10.0 ** rng.uniform(math.log10(LIMIT), 9.0, size=120)
huge = np.array([1e10, -3.5e12, 1e15, 2.0**60, -1e22, 1e100, 1.7e300])
ks = np.concatenate([np.arange(-40, 41), rng.integers(-500_000, 500_001, size=300)])
near = []
for k in ks:
    c = float(k) * (math.pi / 2)  # a double within a few ulps of k·π/2
    near.extend([c, np.nextafter(c, np.inf), np.nextafter(c, -np.inf)])
near = np.array([v for v in near if abs(v) < LIMIT])
tiny = np.concatenate(
    [
        rng.choice([-1.0, 1.0], size=100) * 2.0 ** rng.uniform(-1074.0, -20.0, size=100),
        [2.0**-27, -(2.0**-27), np.nextafter(2.0**-27, 0.0), 5e-324, -5e-324, 2.2250738585072014e-308],
    ]
)
boundary = np.array([LIMIT, -LIMIT, np.nextafter(LIMIT, 0.0), np.nextafter(-LIMIT, 0.0)])
zeros = np.array([0.0, -0.0])

groups = {
    "uniform": uniform,
    "logSpread": log_spread,
    "beyondLimit": np.concatenate([beyond, huge, boundary]),
    "nearMultiplesOfHalfPi": near,
    "tiny": tiny,
    "zeros": zeros,
}


def entry(x):
    return {"x": x.tolist(), "sin": np.sin(x).tolist(), "cos": np.cos(x).tolist()}


# ---------------------------------------------------------------- constants (for the record)
def atan_inv(n, terms):
    s, p = Fraction(0), Fraction(1, n)
    for j in range(terms):
        s += (-1) ** j * p / (2 * j + 1)
        p /= n * n
    return s


pi = 16 * atan_inv(5, 70) - 4 * atan_inv(239, 30)  # Machin; error < 10^-90


def round_bits(fr, bits):
    e = math.floor(math.log2(abs(fr)))
    while Fraction(2) ** e > abs(fr):
        e -= 1
    while Fraction(2) ** (e + 1) <= abs(fr):
        e += 1
    scale = Fraction(2) ** (bits - 1 - e)
    return Fraction(round(fr * scale)) / scale


half = pi / 2
p1 = round_bits(half, 33)
p2 = round_bits(half - p1, 33)
p3 = round_bits(half - p1 - p2, 53)
constants = {
    "P1": float(p1),
    "P2": float(p2),
    "P3": float(p3),
    "piOver2Residual": float(half - p1 - p2 - p3),
    "twoOverPi": float(Fraction(2) / pi),
}
try:
    import mpmath as mp

    mp.mp.dps = 50
    Z = (mp.pi / 4) ** 2

    def fs(z):
        if z == 0:
            return mp.mpf(-1) / 6
        r = mp.sqrt(z)
        return (mp.sin(r) - r) / (z * r)

    def fc(z):
        if z == 0:
            return mp.mpf(1) / 24
        r = mp.sqrt(z)
        return (mp.cos(r) - 1 + z / 2) / (z * z)

    cs, es = mp.chebyfit(fs, [0, Z], 6, error=True)
    cc, ec = mp.chebyfit(fc, [0, Z], 6, error=True)
    constants["sinCoefficients"] = [float(c) for c in cs[::-1]]  # S1 … S6
    constants["cosCoefficients"] = [float(c) for c in cc[::-1]]  # C2 … C7
    constants["sinTruncationRelative"] = float(Z * es / (mp.sin(mp.pi / 4) / (mp.pi / 4)))
    constants["cosTruncationRelative"] = float(Z * Z * ec / mp.cos(mp.pi / 4))
    constants["mpmath"] = mp.__version__
except ImportError:  # the constants are for the record only
    constants["mpmath"] = None

out = {
    "source": "NumPy 2.4 numpy.sin/numpy.cos (C library), 2026; scripts/reference/core_trig.py",
    "numpy": np.__version__,
    "libc": " ".join(platform.libc_ver()),
    "reductionLimit": LIMIT,
    "groups": {name: entry(np.asarray(v, dtype=np.float64)) for name, v in groups.items()},
    "constants": constants,
}
path = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "core", "fixtures", "trig.json")
with open(path, "w") as f:
    json.dump(out, f, indent=0)
print("wrote", os.path.normpath(path), {k: len(v) for k, v in groups.items()})
print(json.dumps(constants, indent=1))
