#!/usr/bin/python3
"""Golden files for package hilbert, made with Debian's python3-scipy.

Run from this folder:  /usr/bin/python3 golden.py
Writes remez_golden.json, ellip_golden.json and kaiser_golden.json. go test
never runs this.
"""
import json

import numpy as np
import scipy
from scipy import signal

VERSION = scipy.__version__
# A dense grid so that scipy's discrete optimum is close to the continuous
# one (the default 16 leaves differences of about 1e-5 in the taps).
GRID = 512


def suppression_min_db(h, fs, low, high, points=200001):
    """Minimum over [low, high] of 20 log10(|H(f)|/|H(-f)|), H the analytic
    filter delay + j*q with our sign q = -h (scipy's Hilbert taps are +90
    degrees at positive frequencies), evaluated with numpy on a uniform
    grid of the given number of points."""
    n = len(h)
    m = (n - 1) // 2
    taps = np.zeros(n, dtype=complex)
    taps[m] = 1
    taps -= 1j * np.asarray(h)
    f = np.linspace(low, high, points)
    k = np.arange(n)
    pos = np.exp(-2j * np.pi * np.outer(f, k) / fs) @ taps
    neg = np.exp(2j * np.pi * np.outer(f, k) / fs) @ taps
    return float(np.min(20 * np.log10(np.abs(pos) / np.abs(neg))))


def remez_cases():
    # (taps, rate Hz, band edge fe): the band is [fe, rate/2 - fe].
    cases = [(63, 8000.0, 300.0), (31, 8000.0, 500.0), (15, 8000.0, 600.0), (101, 48000.0, 1500.0)]
    out = []
    for n, fs, fe in cases:
        h = signal.remez(n, [fe, fs / 2 - fe], [1], type='hilbert', fs=fs, grid_density=GRID)
        out.append({"taps": n, "rate": fs, "low": fe, "high": fs / 2 - fe,
                    "h": [float(v) for v in h],
                    "suppression_min_db": suppression_min_db(h, fs, fe, fs / 2 - fe)})
    return out


def remez63_default_grid():
    """The issue's reference figure: scipy's 63-tap design over 300-3700 Hz
    at 8 kHz with its default grid density (16), its minimum suppression
    over 300-2700 Hz."""
    h = signal.remez(63, [300.0, 3700.0], [1], type='hilbert', fs=8000.0)
    return suppression_min_db(h, 8000.0, 300.0, 2700.0)


def halfband_ellip(order, fe, fs):
    """Odd-order half-band elliptic low-pass from scipy.signal.ellip whose
    pass edge is fs/4 - fe and stop edge fs/4 + fe; returns the all-pass
    coefficients a_i = |pole|^2 of the imaginary-axis pole pairs."""
    wp = (fs / 4 - fe) / (fs / 2)          # normalised to Nyquist
    ws_target = np.pi * (fs / 4 + fe) / (fs / 2)

    def design(rs):
        # Half-band (power complementary): stop ripple ds, pass ripple dp with
        # ds^2 + (1-dp)^2 = 1 -> rp = -10 log10(1 - 10^(-rs/10)).
        rp = -10 * np.log10(1 - 10 ** (-rs / 10))
        return signal.ellip(order, rp, rs, wp, output='zpk'), rs

    def stop_edge(rs):
        (z, p, k), _ = design(rs)
        w, h = signal.freqz_zpk(z, p, k, worN=np.linspace(np.pi / 2, np.pi, 20001))
        lim = 10 ** (-rs / 20) * (1 + 1e-9)
        idx = np.argmax(np.abs(h) <= lim)
        return w[idx]

    lo, hi = 10.0, 200.0  # rs bounds in dB; stop edge falls as rs falls
    for _ in range(80):
        mid = (lo + hi) / 2
        if stop_edge(mid) > ws_target:
            hi = mid
        else:
            lo = mid
    (z, p, k), rs = design((lo + hi) / 2)
    a = sorted(float(abs(x) ** 2) for x in p if abs(x) > 1e-6 and x.imag > 0)
    maxre = max(abs(x.real) for x in p)
    return a, rs, maxre


def ellip_cases():
    out = []
    for order in (7, 9, 11):
        a, rs, maxre = halfband_ellip(order, 300.0, 8000.0)
        out.append({"order": order, "rate": 8000.0, "low": 300.0, "high": 3700.0,
                    "stop_db": rs, "max_pole_real": maxre, "a": a})
    return out


def kaiser_cases():
    """Kaiser's beta for a stop-band attenuation (scipy.signal.kaiser_beta)
    and Kaiser windows (scipy.signal.windows.kaiser, symmetric)."""
    betas = [{"atten_db": a, "beta": float(signal.kaiser_beta(a))}
             for a in (10.0, 21.0, 30.0, 40.0, 50.0, 50.5, 60.0, 80.0, 120.0)]
    windows = [{"n": n, "beta": b, "w": [float(v) for v in signal.windows.kaiser(n, b, sym=True)]}
               for n, b in ((7, 2.0), (31, 5.65326), (64, 8.6), (101, 14.0))]
    return betas, windows


if __name__ == '__main__':
    with open('remez_golden.json', 'w') as f:
        json.dump({"source": "scipy.signal.remez(taps, [low, high], [1], type='hilbert', fs=rate, grid_density=%d)" % GRID,
                   "scipy_version": VERSION, "cases": remez_cases(),
                   "remez63_default_grid_suppression_min_db": remez63_default_grid()}, f, indent=1)
    betas, windows = kaiser_cases()
    with open('kaiser_golden.json', 'w') as f:
        json.dump({"source": "scipy.signal.kaiser_beta(atten_db); scipy.signal.windows.kaiser(n, beta, sym=True)",
                   "scipy_version": VERSION, "betas": betas, "windows": windows}, f, indent=1)
    with open('ellip_golden.json', 'w') as f:
        json.dump({"source": "scipy.signal.ellip half-band low-pass, stop edge fitted to rate/4+fe; a = |pole|^2",
                   "scipy_version": VERSION, "cases": ellip_cases()}, f, indent=1)
