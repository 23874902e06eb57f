#!/usr/bin/python3
"""Opposite-sideband suppression of an upper-sideband cf32 file, for bench/tx.sh.

  tx_sideband.py FILE.cf32 RATE [SECONDS [OFFSET]]

Welch power spectrum (scipy.signal.welch, Hann, 2^16 points, two-sided) of
the first SECONDS (default 10) of the file; prints the power in
OFFSET+300..OFFSET+2700 Hz (wanted) and in OFFSET-2700..OFFSET-300 Hz
(unwanted), OFFSET the carrier (default 0), and their ratio in dB.
Independent of ssbkit's own measurement code.
"""
import sys
import numpy as np
from scipy import signal

path, rate = sys.argv[1], float(sys.argv[2])
secs = float(sys.argv[3]) if len(sys.argv) > 3 else 10.0
off = float(sys.argv[4]) if len(sys.argv) > 4 else 0.0
x = np.fromfile(path, np.complex64, count=int(secs * rate))
f, p = signal.welch(x, fs=rate, nperseg=1 << 16, return_onesided=False, detrend=False)
f = f - off
want = p[(f >= 300) & (f <= 2700)].sum()
unw = p[(f >= -2700) & (f <= -300)].sum()
print(f"wanted {10*np.log10(want):.2f} dB, unwanted {10*np.log10(unw):.2f} dB, suppression {10*np.log10(want/unw):.1f} dB")
