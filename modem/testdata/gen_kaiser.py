#!/usr/bin/python3
"""Golden values for modem's Kaiser design (design_test.go).

Run with Debian's interpreter: /usr/bin/python3 gen_kaiser.py > kaiser_golden.json
scipy.signal.kaiserord / kaiser_beta give the order and beta; scipy.signal.firwin
with window ('kaiser', beta) and scale=True gives the taps for the odd length
that modem.KaiserOrder chooses (scipy's numtaps, plus one when it is even).
"""
import json
import numpy as np
import scipy
from scipy import signal

cases = [
    # cutoff, transition, rate, atten
    (1000.0, 400.0, 8000.0, 60.0),
    (3000.0, 1000.0, 48000.0, 80.0),
    (12000.0, 2000.0, 48000.0, 100.0),
    (1500.0, 1000.0, 8000.0, 40.0),
    (200.0, 300.0, 8000.0, 25.0),
]
out = {"scipy_version": scipy.__version__, "cases": []}
for cutoff, tw, rate, atten in cases:
    numtaps, beta = signal.kaiserord(atten, tw / (rate / 2))
    n = numtaps if numtaps % 2 == 1 else numtaps + 1
    taps = signal.firwin(n, cutoff, window=("kaiser", beta), fs=rate)
    out["cases"].append({
        "cutoff": cutoff, "transition": tw, "rate": rate, "atten_db": atten,
        "scipy_numtaps": int(numtaps), "beta": float(beta),
        "taps": [float(v) for v in taps],
    })
print(json.dumps(out, indent=1))
