#!/usr/bin/python3
"""Fuzz seeds for modem.OpenAudio (txaudio_test.go): a 16-bit mono and a
24-bit stereo PCM WAV, 200 samples at 8 kHz, written by hand (RIFF/WAVE,
fmt chunk with format tag 1). Run: /usr/bin/python3 gen_wav.py"""
import struct
import numpy as np


def w(name, ch, bits, rate, data):
    if bits == 16:
        raw = np.clip(np.round(data * 32767), -32768, 32767).astype("<i2").tobytes()
    else:
        v = np.round(data * 8388607).astype("<i4")
        raw = b"".join(struct.pack("<i", int(x))[:3] for x in v.ravel())
    hdr = (b"RIFF" + struct.pack("<I", 36 + len(raw)) + b"WAVEfmt "
           + struct.pack("<IHHIIHH", 16, 1, ch, rate, rate * ch * bits // 8, ch * bits // 8, bits)
           + b"data" + struct.pack("<I", len(raw)))
    with open(name, "wb") as f:
        f.write(hdr + raw)


t = np.arange(200) / 8000
w("tone16.wav", 1, 16, 8000, 0.5 * np.cos(2 * np.pi * 1000 * t))
w("stereo24.wav", 2, 24, 8000, np.stack([0.5 * np.cos(2 * np.pi * 1000 * t), 0.3 * np.sin(2 * np.pi * 300 * t)], axis=1))
