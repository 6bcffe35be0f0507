#!/usr/bin/python3
"""Reference SLR designs for nutate/physics/slr tests, generated with Debian's scipy.

Run from this directory: /usr/bin/python3 gen_slr.py > slr_reference.json

The published design (Pauly, Le Roux, Nishimura & Macovski, IEEE Trans. Med. Imaging
10:53, 1991), written here independently of the Go code:

- profile ripples -> beta-filter ripples d1, d2 by the paper's table (small tip,
  90 deg excitation, inversion, refocusing, saturation);
- D_inf(d1, d2) of Herrmann, Rabiner & Chan (Bell Syst. Tech. J. 52:769, 1973);
- linear phase: an N-tap equiripple lowpass (scipy.signal.remez) with pass and stop
  edges (1 -/+ W)*TBW/(2N) cycles/sample, W = D_inf/TBW, weights 1 and d1/d2;
- minimum phase: a (2N-1)-tap linear-phase prototype with ripples 2*d1 and d2^2/2 on
  the same centre, raised by its stop ripple so it is non-negative, and its
  minimum-phase square root by the real cepstrum (numpy FFT);
- amendment for 90 deg excitation (as in the Go design): the transition width is
  fitted so that the levelled passband error the exchange reaches is 0.85 to 1 times
  d1, by steps on the D_inf estimate's own slope (see fitted_remez): with the
  published D_inf alone it reaches up to 1.9 x d1 at 256 samples, which the 90 deg
  relation (profile ripple 2*d1^2) squares into up to 3.7 x the asked ripple;
- beta = sin(theta/2) * filter (kept below 1 in magnitude), alpha the minimum-phase
  sequence with |alpha|^2 = 1 - |beta|^2 (cepstrum), the RF by the inverse SLR
  recursion (peeling one hard pulse per sample);
- profiles by a Cayley-Klein (SU(2)) simulation of the RF as piecewise-constant
  samples, exact rotation about (w1x, w1y, dw) in every sample.

For every role x TBW 4/8/12 x linear/minimum phase (8 ms, 256 samples, 1 %/1 %), it
writes the published edges (Hz), the half-way offset of the role's own profile (Mz = 0
for inversion, Mz = 1/2 for saturation, |Mxy| = sin(theta)/2 for excitation,
|beta|^2 = 1/2 for refocusing), the pass and stop ripples inside the published edges in
the profile's units (Mz for inversion and saturation, |Mxy|/sin(theta) for excitation,
|beta|^2 for refocusing), the measured transition (from the last offset within twice the
asked pass ripple to the first beyond which the profile stays within twice the asked
stop ripple)
and the peak B1 for 1H.
"""
import json
import math

import numpy as np
import scipy
import scipy.signal as sig

GAMMA_BAR = 42.577478518e6  # Hz/T, 1H, CODATA 2018
DURATION = 8e-3
SAMPLES = 256
RIPPLE = 0.01


def dinf(d1, d2):
    a = [5.309e-3, 7.114e-2, -4.761e-1, -2.66e-3, -5.941e-1, -4.278e-1]
    l1, l2 = math.log10(d1), math.log10(d2)
    return (a[0] * l1 * l1 + a[1] * l1 + a[2]) * l2 + (a[3] * l1 * l1 + a[4] * l1 + a[5])


def filter_ripples(role, flip, e1, e2):
    if role == "invert":
        return e1 / 8, math.sqrt(e2 / 2)
    if role == "refocus":
        return e1 / 4, math.sqrt(e2)
    if role == "saturate":
        return e1 / 2, math.sqrt(e2)
    if abs(flip - math.pi / 2) < 1e-9:
        return math.sqrt(e1 / 2), e2 / math.sqrt(2)
    return e1, e2


def min_phase(mag, n):
    """First n taps of the real minimum-phase sequence with |H| = mag on a full FFT grid."""
    logm = np.log(np.maximum(mag, 1e-8))  # zeros on the unit circle: a floor keeps the cepstrum finite
    c = np.fft.ifft(logm).real
    m = len(c)
    fold = np.zeros(m)
    fold[0] = c[0]
    fold[1:m // 2] = 2 * c[1:m // 2]
    fold[m // 2] = c[m // 2]
    return np.fft.ifft(np.exp(np.fft.fft(fold))).real[:n]


def fitted_remez(taps, centre, p1, p2, fit):
    """Equiripple lowpass with the transition D_inf(p1, p2)/taps centred on centre.

    With fit (the amendment for 90 deg excitation): D_inf is an estimate, and the
    levelled error reached with it can be well above p1, which the 90 deg profile
    turns into a ripple 2*p1^2 times the square of that excess; the half-width is
    moved by (D_inf(0.93*p1, ...) - D_inf(reached, ...))/(2*taps) until the
    passband error reached is within 0.85 to 1 times p1 (at most 10 designs).
    """
    half = dinf(p1, p2) / (2 * taps)
    r = p2 / p1
    m = 1 << 16
    f = np.arange(m // 2 + 1) / m
    for _ in range(10 if fit else 1):
        fp, fs = centre - half, centre + half
        h = sig.remez(taps, [0, fp, fs, 0.5], [1, 0], weight=[1, p1 / p2], fs=1, maxiter=200)
        if not fit:
            break
        reached = float(np.abs(np.abs(np.fft.rfft(h, m))[f <= fp] - 1).max())
        if 0.85 * p1 <= reached <= p1:
            break
        half += (dinf(0.93 * p1, 0.93 * p1 * r) - dinf(reached, reached * r)) / (2 * taps)
    return h, fp, fs


def beta_filter(n, tbw, d1, d2, phase, fit):
    centre = tbw / (2 * n)
    if phase == "linear":
        return fitted_remez(n, centre, d1, d2, fit)
    taps = 2 * n - 1
    p1, p2 = 2 * d1, d2 * d2 / 2
    h2, fp, fs = fitted_remez(taps, centre, p1, p2, fit)
    m = 1 << 16
    amp = np.real(np.fft.fft(h2, m) * np.exp(2j * np.pi * np.arange(m) / m * (n - 1)))
    lift = -amp.min()  # the stop ripple as designed (about d2^2/2): raise to non-negative
    amp = np.sqrt(np.maximum(amp + lift, 0) / (1 + lift))
    return min_phase(amp, n), fp, fs


def inverse_slr(a, b):
    """Peel hard pulses off A(z), B(z): A_j = C A - S* z^-1 B, B_j = S A + C z^-1 B."""
    a = a.astype(complex).copy()
    b = b.astype(complex).copy()
    n = len(a)
    rf = np.zeros(n, complex)
    for j in range(n - 1, -1, -1):
        r = b[0] / a[0]
        phi = 2 * math.atan(abs(r))
        u = r / abs(r) if abs(r) > 0 else 1
        C, S = math.cos(phi / 2), u * math.sin(phi / 2)
        rf[j] = phi * u
        na = C * a + np.conj(S) * b
        nb = -S * a + C * b
        a = na[:j]
        b = nb[1:j + 1]
    return rf


def design(role, flip, tbw, phase):
    n = SAMPLES
    d1, d2 = filter_ripples(role, flip, RIPPLE, RIPPLE)
    h, fp, fs = beta_filter(n, tbw, d1, d2, phase, role == "excite" and abs(flip - math.pi / 2) < 1e-9)
    m = 1 << 16
    H = np.fft.fft(h, m)
    s = math.sin(flip / 2)
    peak = np.abs(H).max()
    if s * peak > 1 - 1e-6:
        s = (1 - 1e-6) / peak
    B = s * H
    b = s * h
    amag = np.sqrt(np.maximum(1 - np.abs(B) ** 2, 0))
    a = min_phase(amag, n)
    rf = inverse_slr(a, b)  # rad per sample, hard-pulse angles
    return rf, fp * n / DURATION, fs * n / DURATION


def simulate(rf, offsets):
    """Cayley-Klein parameters after the piecewise-constant pulse at each offset (Hz)."""
    dt = DURATION / len(rf)
    w1 = rf / dt
    dw = 2 * np.pi * offsets
    al = np.ones_like(dw, dtype=complex)
    be = np.zeros_like(dw, dtype=complex)
    for w in w1:
        wx, wy = w.real, w.imag
        mag = np.sqrt(wx * wx + wy * wy + dw * dw)
        ang = mag * dt
        with np.errstate(invalid="ignore", divide="ignore"):
            nx, ny, nz = wx / mag, wy / mag, dw / mag
        nx = np.where(mag > 0, nx, 0)
        ny = np.where(mag > 0, ny, 0)
        nz = np.where(mag > 0, nz, 0)
        c, sn = np.cos(ang / 2), np.sin(ang / 2)
        ra = c - 1j * nz * sn
        rb = -1j * (nx + 1j * ny) * sn
        al, be = ra * al - np.conj(rb) * be, rb * al + np.conj(ra) * be
    return al, be


def profile(role, flip, al, be):
    """The role's profile, its pass and stop values."""
    if role == "excite":
        return 2 * np.abs(al) * np.abs(be) / math.sin(flip), 1.0, 0.0
    if role == "refocus":
        return np.abs(be) ** 2, 1.0, 0.0
    mz = np.abs(al) ** 2 - np.abs(be) ** 2
    if role == "invert":
        return mz, -1.0, 1.0
    return mz, 0.0, 1.0


def measure(role, flip, rf, fp, fs, tbw):
    bw = tbw / DURATION
    f = np.linspace(0, 2.5 * bw, 20001)
    al, be = simulate(rf, f)
    p, pv, sv = profile(role, flip, al, be)
    mid = (pv + sv) / 2
    dev = (p - mid) * (1 if pv > sv else -1)  # > 0 in the passband
    k = int(np.argmax(dev < 0))
    x0, x1 = f[k - 1], f[k]
    half = x0 + (x1 - x0) * dev[k - 1] / (dev[k - 1] - dev[k])
    passr = float(np.abs(p[f <= fp] - pv).max())
    stopr = float(np.abs(p[f >= fs] - sv).max())
    inpass = np.abs(p - pv) <= 2 * RIPPLE
    instop = np.abs(p - sv) <= 2 * RIPPLE
    first_out = int(np.argmax(~inpass))
    pe = f[first_out - 1] if first_out > 0 else 0.0
    bad = np.nonzero(~instop)[0]
    se = f[bad[-1] + 1]
    return {
        "half_hz": float(half),
        "pass_ripple": passr,
        "stop_ripple": stopr,
        "transition_hz": float(se - pe),
        "peak_ut": float(np.abs(rf).max() / (2 * math.pi * GAMMA_BAR * DURATION / len(rf)) * 1e6),
    }


def main():
    roles = [("excite", 30), ("excite", 90), ("invert", 180), ("refocus", 180), ("saturate", 90)]
    out = {
        "generator": "testdata/slr/gen_slr.py",
        "scipy": scipy.__version__,
        "duration_s": DURATION,
        "samples": SAMPLES,
        "ripple": RIPPLE,
        "cases": [],
    }
    for role, deg in roles:
        flip = math.radians(deg)
        for tbw in (4, 8, 12):
            for phase in ("linear", "minimum"):
                rf, fp, fs = design(role, flip, tbw, phase)
                row = {"role": role, "flip_deg": deg, "tbw": tbw, "phase": phase,
                       "pass_edge_hz": fp, "stop_edge_hz": fs}
                row.update(measure(role, flip, rf, fp, fs, tbw))
                out["cases"].append(row)
    json.dump(out, __import__("sys").stdout, indent=1)
    print()


if __name__ == "__main__":
    main()
