#!/usr/bin/python3
"""Reference adiabatic thresholds for shape.Measure (package physics/shape).

Run from this directory: /usr/bin/python3 gen_threshold.py  (writes threshold_reference.json)

Independent of the Go code: the waveforms are built here from their published
formulas (HS1: B1 = peak*sech(beta*tau), f = -(BW/2)*tanh(beta*tau), tau = 2t/T,
Silver, Joseph & Hoult, Phys. Rev. A 31:2753, 1985; WURST-n: B1 = peak*(1 -
|sin(pi*t/T)|^n), f = BW*t/T, Kupce & Freeman, J. Magn. Reson. A 115:273, 1995),
sampled at the midpoints of N equal samples, the phase being the closed-form
integral of the frequency. Each sample is the exact rotation of the Bloch
equations without relaxation (CHECKS.md conventions: dM/dt = A M with
A = [[0, wz, -wy], [-wz, 0, wx], [wy, -wx, 0]]), by Rodrigues' formula, checked
against scipy.linalg.expm on every sample of one case before anything is written.

The threshold is defined as in Properties.Threshold: the lowest peak B1 at which
Mz <= -0.9 holds at 11 evenly spaced offsets over +-BW/4 and keeps holding up to
sqrt(2) times that B1 (half an octave). It is searched here on a grid of 0.5 %
steps from 1 uT (every grid point up to sqrt(2) above must meet the target), then
bisected to 1e-6 relative; the upper limit is the first failing B1 above it, also
bisected. Nothing here depends on the Go search grid.
"""
import json
import math

import numpy as np
from scipy.linalg import expm

GAMMA_BAR = 42.577478518e6  # Hz/T, 1H, CODATA 2018
GAMMA = 2 * math.pi * GAMMA_BAR


def hsec(T, bw, n, beta=5.3):
    dt = T / n
    t = (np.arange(n) + 0.5) * dt - T / 2
    tau = 2 * t / T
    amp = 1 / np.cosh(beta * tau)
    # phi = -2*pi*int f dt, f = -(bw/2)*tanh(2*beta*t/T)
    phi = 2 * math.pi * (bw / 2) * (T / (2 * beta)) * np.log(np.cosh(beta * tau))
    return amp * np.exp(1j * phi), np.full(n, dt)


def wurst(T, bw, n, order=20):
    dt = T / n
    t = (np.arange(n) + 0.5) * dt - T / 2
    amp = 1 - np.abs(np.sin(math.pi * t / T)) ** order
    phi = -2 * math.pi * bw * t * t / (2 * T)
    return amp * np.exp(1j * phi), np.full(n, dt)


def rotations(shape, dwell, peak, offset):
    """3x3 rotation of every sample for spins at the given offsets (Hz)."""
    wx = GAMMA * peak * shape.real
    wy = GAMMA * peak * shape.imag
    out = []
    for f in offset:
        wz = np.full_like(wx, 2 * math.pi * f)
        w = np.sqrt(wx * wx + wy * wy + wz * wz)
        th = w * dwell
        k = np.zeros((len(wx), 3, 3))
        safe = np.where(w > 0, w, 1)
        k[:, 0, 1], k[:, 0, 2] = wz / safe, -wy / safe
        k[:, 1, 0], k[:, 1, 2] = -wz / safe, wx / safe
        k[:, 2, 0], k[:, 2, 1] = wy / safe, -wx / safe
        eye = np.broadcast_to(np.eye(3), k.shape)
        r = eye + np.sin(th)[:, None, None] * k + (1 - np.cos(th))[:, None, None] * (k @ k)
        out.append(r)
    return out


def mz(shape, dwell, peak, offsets):
    res = []
    for r in rotations(shape, dwell, peak, offsets):
        m = np.array([0.0, 0.0, 1.0])
        for j in range(r.shape[0]):
            m = r[j] @ m
        res.append(m[2])
    return np.array(res)


def check_rodrigues(shape, dwell, peak, f):
    r = rotations(shape, dwell, peak, [f])[0]
    for j in range(len(dwell)):
        wx, wy = GAMMA * peak * shape[j].real, GAMMA * peak * shape[j].imag
        wz = 2 * math.pi * f
        a = np.array([[0, wz, -wy], [-wz, 0, wx], [wy, -wx, 0]])
        e = expm(a * dwell[j])
        if np.max(np.abs(e - r[j])) > 1e-10:
            raise SystemExit("Rodrigues rotation differs from expm at sample %d" % j)


def met(shape, dwell, peak, offsets):
    return bool(np.all(mz(shape, dwell, peak, offsets) <= -0.9))


def threshold(shape, dwell, bw):
    offsets = [bw / 4 * (2 * i / 10 - 1) for i in range(11)]
    grid = [1e-6 * 1.005 ** k for k in range(int(math.log(300) / math.log(1.005)))]
    ok = [met(shape, dwell, b, offsets) for b in grid]
    hold = int(math.ceil(math.log(math.sqrt(2)) / math.log(1.005)))
    lo = None
    for i in range(1, len(grid) - hold):
        if all(ok[i:i + hold + 1]):
            lo = i
            break
    if lo is None:
        raise SystemExit("no threshold")

    def edge(fail, good):
        while abs(good - fail) > 1e-6 * good:
            mid = (fail + good) / 2
            if met(shape, dwell, mid, offsets):
                good = mid
            else:
                fail = mid
        return good

    th = edge(grid[lo - 1], grid[lo])
    upper = None
    for j in range(lo + hold + 1, len(grid)):
        if not ok[j]:
            upper = edge(grid[j], grid[j - 1])
            break
    return th, upper


def main():
    cases = []
    for name, T, bw, build in [
        ("hsec", 10e-3, 5000.0, lambda: hsec(10e-3, 5000.0, 1000)),
        ("wurst", 5e-3, 5000.0, lambda: wurst(5e-3, 5000.0, 1000)),
    ]:
        shape, dwell = build()
        check_rodrigues(shape, dwell, 20e-6, bw / 4)
        th, upper = threshold(shape, dwell, bw)
        cases.append({"shape": name, "duration": T, "bandwidth": bw, "samples": len(dwell),
                      "threshold": th, "upper": upper})
    with open("threshold_reference.json", "w") as f:
        json.dump({"generator": "gen_threshold.py", "gamma_bar": GAMMA_BAR, "cases": cases}, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
