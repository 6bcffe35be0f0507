#!/usr/bin/python3
"""Reference filters for nutate/physics/slr tests, generated with Debian's scipy:
scipy.signal.remez (Parks-McClellan) and scipy.signal.firls (least squares).
Run: /usr/bin/python3 gen_remez.py > remez.json
"""
import json
import numpy as np
import scipy
import scipy.signal as sig

cases = [
    # name, taps, edges (cycles/sample), gains, weights
    ("odd25", 25, [0, 0.1, 0.15, 0.5], [1, 0], [1, 10]),
    ("even24", 24, [0, 0.1, 0.15, 0.5], [1, 0], [1, 10]),
    ("odd61_bandpass", 61, [0, 0.1, 0.15, 0.3, 0.35, 0.5], [0, 1, 0], [5, 1, 5]),
    ("slr_inv64", 64, [0, 0.046875, 0.078125, 0.5], [1, 0], [1, 0.02]),
    ("slr_lin127", 127, [0, 0.02, 0.035, 0.5], [1, 0], [1, 0.5]),
    ("slr_proto511", 511, [0, 0.0121, 0.0175, 0.5], [1, 0], [1, 0.5]),
]
out = {"generator": "testdata/slr/gen_remez.py", "scipy": scipy.__version__, "remez": [], "firls": []}
for name, taps, edges, gains, weights in cases:
    h = sig.remez(taps, edges, gains, weight=weights, fs=1.0, maxiter=100)
    out["remez"].append({"name": name, "taps": taps, "edges": edges, "gains": gains,
                         "weights": weights, "h": [float(v) for v in h]})
    des = [g for g in gains for _ in (0, 1)]
    hl = sig.firls(taps if taps % 2 else taps, edges, des, weight=weights, fs=1.0) if taps % 2 else None
    if hl is not None:
        out["firls"].append({"name": name, "taps": taps, "edges": edges, "gains": gains,
                             "weights": weights, "h": [float(v) for v in hl]})
print(json.dumps(out, indent=1))
