#!/usr/bin/python3
"""Reference values for the averaged spreads of package physics (SimulateAveraged,
GaussLegendre).

Run from this directory: /usr/bin/python3 gen_average.py  (writes average_reference.json)

Independent of the Go code:
- Gauss-Legendre nodes and weights from numpy.polynomial.legendre.leggauss.
- Averages of the magnetization after a constant (rectangular) RF field, integrated
  over a uniform spread with scipy.integrate.quad (adaptive, epsabs 1e-12), the
  magnetization at each point being the matrix exponential (scipy.linalg.expm) of
  the augmented 4x4 Bloch generator (CHECKS.md conventions, B1 along +x, gamma=1 so
  fields are in rad/s):
      dMx/dt = wz*My - R2*Mx
      dMy/dt = wx*Mz - wz*Mx - R2*My
      dMz/dt = -wx*My - R1*(Mz - 1)
- The hard 90 degree pulse averaged over B1 scale 0.5..1.5 has the closed form
  My = mean of sin(pi*s/2) = 2*sqrt(2)/pi, printed beside the quad value.
"""
import json
import math

import numpy as np
from scipy.integrate import quad
from scipy.linalg import expm


def after(w1, dw, t, r1, r2):
    a = np.array([
        [-r2, dw, 0.0, 0.0],
        [-dw, -r2, w1, 0.0],
        [0.0, -w1, -r1, r1],
        [0.0, 0.0, 0.0, 0.0],
    ])
    return (expm(a * t) @ np.array([0.0, 0.0, 1.0, 1.0]))[:3]


def mean(f, lo, hi, points=None):
    out = []
    for k in range(3):
        v, _ = quad(lambda s: f(s)[k], lo, hi, epsabs=1e-12, epsrel=1e-12, limit=2000, points=points)
        out.append(v / (hi - lo))
    return out


cases = []
# Hard 90 degrees: 1 kHz of B1 for 250 us, on resonance, B1 scale 0.5..1.5.
w1 = 2 * math.pi * 1000.0
cases.append({
    "name": "hard 90 over b1 50-150 %",
    "w1": w1, "duration": 250e-6, "offset": 0.0, "t1": "inf", "t2": "inf",
    "setting": "b1", "lo": 0.5, "hi": 1.5,
    "want": mean(lambda s: after(w1 * s, 0.0, 250e-6, 0.0, 0.0), 0.5, 1.5),
    "closed_form_my": 2 * math.sqrt(2) / math.pi,
})
# Presaturation: 2 s of 25.3 Hz B1 on resonance (50.6 turns: one isochromat
# without relaxation ends at Mz = cos(0.6 turn) = -0.81).
w1 = 2 * math.pi * 25.3
for name, setting, lo, hi, t1, t2 in [
    ("presat 2 s over offset -5..5 Hz", "offset", -5.0, 5.0, math.inf, math.inf),
    ("presat 2 s over b1 80-120 %", "b1", 0.8, 1.2, math.inf, math.inf),
    ("presat 2 s relaxing over offset -5..5 Hz", "offset", -5.0, 5.0, 1.5, 0.08),
    ("presat 2 s over t2 50-150 ms", "t2", 0.05, 0.15, 1.5, None),
]:
    r1 = 0.0 if math.isinf(t1) else 1 / t1
    r2 = 0.0 if t2 is None or math.isinf(t2) else 1 / t2
    if setting == "t2":
        f = lambda s: after(w1, 0.0, 2.0, r1, 1 / s)
    elif setting == "offset":
        f = lambda s: after(w1, 2 * math.pi * s, 2.0, r1, r2)
    else:
        f = lambda s: after(w1 * s, 0.0, 2.0, r1, r2)
    cases.append({
        "name": name, "w1": w1, "duration": 2.0, "offset": 0.0,
        "t1": "inf" if math.isinf(t1) else t1, "t2": "inf" if t2 is None or math.isinf(t2) else t2,
        "setting": setting, "lo": lo, "hi": hi,
        "want": mean(f, lo, hi),
        "single": list(after(w1, 0.0, 2.0, r1, r2)),  # without the spread (t2 spread: no T2)
    })

gl = []
for n in (1, 2, 3, 5, 16, 64, 200):
    x, w = np.polynomial.legendre.leggauss(n)
    gl.append({"n": n, "x": list(x), "w": list(w / 2)})

with open("average_reference.json", "w") as fh:
    json.dump({
        "generator": "testdata/reference/gen_average.py",
        "provenance": "numpy leggauss; scipy quad over scipy.linalg.expm of the Bloch generator",
        "cases": cases,
        "gauss_legendre": gl,
    }, fh, indent=1)
    fh.write("\n")
for c in cases:
    print(c["name"], c["want"], c.get("single"), c.get("closed_form_my"))
