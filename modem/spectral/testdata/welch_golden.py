#!/usr/bin/python3
"""Golden values for TestWelchScipyGolden.

Run with Debian's /usr/bin/python3 and python3-scipy (written with scipy
1.10.1):  /usr/bin/python3 welch_golden.py
Writes welch_input.cf32 (interleaved float32 I/Q, little-endian) and
welch_golden.txt (header lines starting with '#', then one density per
line in FFT order, as scipy returns it).
"""
import numpy as np
import scipy
import scipy.signal

rate = 48000.0
n = 4000
rng = np.random.default_rng(20261201)
t = np.arange(n) / rate
x = (0.3 * np.exp(2j * np.pi * 1234.5 * t)
     + 0.05 * np.exp(-2j * np.pi * 7000.25 * t)
     + 0.01 * (rng.standard_normal(n) + 1j * rng.standard_normal(n)))
x = x.astype(np.complex64)
x.view(np.float32).astype('<f4').tofile('welch_input.cf32')

nperseg, noverlap = 256, 192
f, p = scipy.signal.welch(x.astype(np.complex128), fs=rate, window='hann',
                          nperseg=nperseg, noverlap=noverlap, detrend=False,
                          return_onesided=False, scaling='density',
                          average='mean')
with open('welch_golden.txt', 'w') as out:
    out.write('# scipy.signal.welch golden values, scipy %s\n' % scipy.__version__)
    out.write('# rate=%g nperseg=%d noverlap=%d window=hann (periodic) detrend=False\n'
              % (rate, nperseg, noverlap))
    out.write('# return_onesided=False scaling=density average=mean; FFT order\n')
    for v in p:
        out.write('%.17g\n' % v)
