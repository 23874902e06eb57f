#!/usr/bin/python3
"""Golden values for samples.Resonator (Klatt 1980 two-pole resonator).

For each (F, BW, fs) the coefficients follow Klatt, J. Acoust. Soc. Am.
67(3), 1980: C = -exp(-2*pi*BW/fs), B = 2*exp(-pi*BW/fs)*cos(2*pi*F/fs),
A = 1 - B - C. scipy.signal.lfilter gives the impulse response of
y[n] = A x[n] + B y[n-1] + C y[n-2] and scipy.signal.freqz its frequency
response. Run with Debian's /usr/bin/python3 (python3-scipy 1.10.1):
    /usr/bin/python3 resonator_golden.py > resonator_golden.json
"""
import json
import numpy as np
import scipy
from scipy import signal

cases = [(500.0, 60.0, 8000.0), (1500.0, 100.0, 8000.0), (2500.0, 250.0, 16000.0), (300.0, 70.0, 48000.0)]
out = {"scipy_version": scipy.__version__, "cases": []}
for F, BW, fs in cases:
    C = -np.exp(-2 * np.pi * BW / fs)
    B = 2 * np.exp(-np.pi * BW / fs) * np.cos(2 * np.pi * F / fs)
    A = 1 - B - C
    x = np.zeros(64)
    x[0] = 1
    h = signal.lfilter([A], [1, -B, -C], x)
    freqs = [0.0, F / 2, F, 1.5 * F, fs / 4]
    _, H = signal.freqz([A], [1, -B, -C], worN=np.array(freqs), fs=fs)
    out["cases"].append({
        "freq": F, "bw": BW, "rate": fs,
        "impulse": h.tolist(),
        "response_freqs": freqs,
        "response_re": H.real.tolist(),
        "response_im": H.imag.tolist(),
    })
print(json.dumps(out, indent=1))
