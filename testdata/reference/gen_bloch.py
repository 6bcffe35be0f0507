#!/usr/bin/python3
"""Reference magnetization tables for the Bloch engine of package physics.

Run from this directory: /usr/bin/python3 gen_bloch.py  (writes bloch_reference.json)

Independent of the Go code: every piecewise-constant step is the matrix exponential
(scipy.linalg.expm) of the augmented 4x4 generator of the Bloch equations

    dMx/dt = wz*My - wy*Mz - R2*Mx
    dMy/dt = wx*Mz - wz*Mx - R2*My
    dMz/dt = wy*Mx - wx*My - R1*(Mz - 1)

(CHECKS.md conventions; gamma = 1, so B1 and the gradient are in rad/s and
rad/s/m), and every case is cross-checked against scipy.integrate.solve_ivp (DOP853,
rtol 1e-12) step by step before it is written; the script stops if they differ by
more than 1e-8. Random cases use a fixed seed, so the output is reproducible.
"""
import json
import math

import numpy as np
import scipy
from scipy.integrate import solve_ivp
from scipy.linalg import expm


def generator(wx, wy, wz, r1, r2):
    return np.array([
        [-r2, wz, -wy, 0.0],
        [-wz, -r2, wx, 0.0],
        [wy, -wx, -r1, r1],
        [0.0, 0.0, 0.0, 0.0],
    ])


def rates(t1, t2):
    r1 = 0.0 if (t1 == 0 or math.isinf(t1)) else 1.0 / t1
    r2 = 0.0 if (t2 == 0 or math.isinf(t2)) else 1.0 / t2
    return r1, r2


def step_terms(case, spin, j):
    s = spin["scale"]
    wx = s * case["b1x"][j]
    wy = s * case["b1y"][j]
    wz = 2 * math.pi * spin["offset"]
    if case.get("gradient"):
        wz += case["gradient"][j] * spin["position"]
    return wx, wy, wz


def propagate_expm(case, spin):
    r1, r2 = rates(spin["t1"], spin["t2"])
    v = np.array(list(spin["start"]) + [1.0])
    for j, dt in enumerate(case["dwell"]):
        wx, wy, wz = step_terms(case, spin, j)
        v = expm(generator(wx, wy, wz, r1, r2) * dt) @ v
    return v[:3]


def propagate_ivp(case, spin):
    r1, r2 = rates(spin["t1"], spin["t2"])
    m = np.array(spin["start"], dtype=float)
    for j, dt in enumerate(case["dwell"]):
        wx, wy, wz = step_terms(case, spin, j)
        a = generator(wx, wy, wz, r1, r2)

        def f(_t, y, a=a):
            return a[:3, :3] @ y + a[:3, 3]

        sol = solve_ivp(f, (0.0, dt), m, method="DOP853", rtol=1e-12, atol=1e-14)
        m = sol.y[:, -1]
    return m


def finite(x):
    return x if math.isfinite(x) else "inf"


def spins_grid(offsets, scales, t1=math.inf, t2=math.inf, start=(0.0, 0.0, 1.0), positions=(0.0,)):
    out = []
    for o in offsets:
        for s in scales:
            for p in positions:
                out.append({"offset": o, "scale": s, "position": p, "t1": t1, "t2": t2, "start": list(start)})
    return out


def main():
    rng = np.random.default_rng(20261201)
    cases = []

    # Random piecewise-constant waveform; some steps turn by more than 0.25 rad so
    # that both the series and the library sine paths of the engine are exercised.
    n = 40
    rnd = {
        "dwell": list(rng.uniform(5e-6, 60e-6, n)),
        "b1x": list(rng.uniform(-1, 1, n) * 2 * math.pi * 2000),
        "b1y": list(rng.uniform(-1, 1, n) * 2 * math.pi * 2000),
    }
    starts = [(0, 0, 1), (0, 0, -1), (1, 0, 0), (0, 1, 0), (0.6, -0.48, 0.64)]
    spins = []
    for k in range(15):
        spins.append({
            "offset": float(rng.uniform(-3000, 3000)),
            "scale": float(rng.uniform(0.5, 1.5)),
            "position": 0.0,
            "t1": math.inf, "t2": math.inf,
            "start": list(map(float, starts[k % len(starts)])),
        })
    cases.append(dict(name="random rotation", spins=spins, **rnd))

    spins = []
    relax_times = [(0.5, 0.05), (0.01, 0.002), (2.0, 2.0), (1e-3, 1e-3), (math.inf, 0.004),
                   (0.003, math.inf), (0.02, 0.035), (5e-4, 1e-4)]
    for k, (t1, t2) in enumerate(relax_times):
        spins.append({
            "offset": float(rng.uniform(-3000, 3000)),
            "scale": float(rng.uniform(0.5, 1.5)),
            "position": 0.0,
            "t1": t1, "t2": t2,
            "start": list(map(float, starts[k % len(starts)])),
        })
    cases.append(dict(name="random relaxation", spins=spins, **rnd))

    # Long steps with relaxation (the engine combines many substeps by squaring).
    n = 6
    longs = {
        "dwell": list(rng.uniform(1e-3, 20e-3, n)),
        "b1x": list(rng.uniform(-1, 1, n) * 2 * math.pi * 500),
        "b1y": list(rng.uniform(-1, 1, n) * 2 * math.pi * 500),
    }
    spins = []
    for k, (t1, t2) in enumerate([(0.5, 0.05), (0.01, 0.002), (math.inf, 0.004), (0.003, math.inf), (1.0, 1.0)]):
        spins.append({
            "offset": float(rng.uniform(-800, 800)),
            "scale": float(rng.uniform(0.5, 1.5)),
            "position": 0.0,
            "t1": t1, "t2": t2,
            "start": list(map(float, starts[k % len(starts)])),
        })
    cases.append(dict(name="long steps relaxation", spins=spins, **longs))

    # Slice selection: a random RF with a random gradient, spins along x.
    n = 30
    grad = {
        "dwell": [20e-6] * n,
        "b1x": list(rng.uniform(-1, 1, n) * 2 * math.pi * 1500),
        "b1y": list(rng.uniform(-1, 1, n) * 2 * math.pi * 1500),
        "gradient": list(rng.uniform(-1, 1, n) * 2 * math.pi * 42.577e6 * 10e-3),
    }
    cases.append(dict(name="gradient", spins=spins_grid([0.0, 250.0], [1.0], positions=[-4e-3, -1e-3, 0.0, 2.5e-3, 5e-3]), **grad))
    cases.append(dict(name="gradient relaxation", spins=spins_grid([100.0], [0.9], t1=0.05, t2=0.01, positions=[-3e-3, 3e-3]), **grad))

    # Hyperbolic secant (Silver, Joseph & Hoult 1985) as sampled in bench_test.go:
    # 10 ms, 2048 samples, bandwidth 4 kHz, truncation 5.3, peak 800 Hz; the phase is
    # -mu*ln cosh(beta*t) at each sample's midpoint.
    n, dur = 2048, 10e-3
    beta = 2 * 5.3 / dur
    mu = math.pi * 4000 / beta
    dt = dur / n
    t = (np.arange(n) + 0.5) * dt - dur / 2
    amp = 2 * math.pi * 800 / np.cosh(beta * t)
    ph = -mu * np.log(np.cosh(beta * t))
    hs = {"dwell": [dt] * n, "b1x": list(amp * np.cos(ph)), "b1y": list(amp * np.sin(ph))}
    cases.append(dict(name="hyperbolic secant", spins=spins_grid([-6000.0, -2100.0, -500.0, 0.0, 1300.0, 4000.0], [0.5, 1.0, 1.5]), **hs))
    cases.append(dict(name="hyperbolic secant relaxation", spins=spins_grid([0.0, 1700.0], [1.0], t1=1.0, t2=0.1) + spins_grid([300.0], [1.2], t1=0.02, t2=0.005), **hs))

    ivp_checked = 0
    for case in cases:
        for spin in case["spins"]:
            m = propagate_expm(case, spin)
            spin["want"] = [float(v) for v in m]
        # Cross-check a subset with the ODE integrator (all spins of the short cases).
        subset = case["spins"] if len(case["dwell"]) < 100 else case["spins"][:3]
        for spin in subset:
            m2 = propagate_ivp(case, spin)
            err = float(np.max(np.abs(m2 - np.array(spin["want"]))))
            if err > 1e-8:
                raise SystemExit(f"{case['name']}: expm and solve_ivp differ by {err}")
            ivp_checked += 1
        for spin in case["spins"]:
            spin["t1"], spin["t2"] = finite(spin["t1"]), finite(spin["t2"])
        for k in ("dwell", "b1x", "b1y", "gradient"):
            if k in case:
                case[k] = [float(v) for v in case[k]]

    out = {
        "generator": "testdata/reference/gen_bloch.py",
        "provenance": (f"scipy {scipy.__version__} scipy.linalg.expm of the augmented Bloch generator per step, "
                       f"cross-checked with solve_ivp DOP853 (rtol 1e-12) on {ivp_checked} spins to 1e-8; "
                       f"numpy {np.__version__}; gamma = 1 (B1 in rad/s, gradient in rad/s/m, offset in Hz, "
                       "times in s, 'inf' = no relaxation)"),
        "cases": cases,
    }
    with open("bloch_reference.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
