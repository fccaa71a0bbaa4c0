#!/usr/bin/python3
"""Writes the measured table of the belt-conveyor example (data/examples/belt-conveyor.lwd
holds it as its <measured> element; the same table is data/examples/belt-conveyor-sweep.csv):
an invented machine, every number made up for the demo. The 'true' axis is the model's rigid
body 2400/(s(s+15)) with a belt mode (antiresonance then resonance), a sensor filter and
0.4 ms of sensor delay that the model lacks; the sweep adds seeded noise of 1 % and 0.6 deg
scaled by a coherence that dips at the antiresonance and at the top of the sweep.

Usage: /usr/bin/python3 belt-conveyor-sweep.py > belt-conveyor-sweep.csv   (Debian's scipy)
SPDX-License-Identifier: GPL-3.0-or-later
"""
import math
import numpy as np
from scipy import signal

w = 10 ** np.arange(math.log10(5.0), math.log10(1500.0) + 1e-9, 1 / 60)
wz, zz, wp, zp = 330.0, 0.03, 470.0, 0.012
num = np.polymul([2400.0], np.array([1, 2 * zz * wz, wz * wz]) * (wp * wp / (wz * wz)))
den = np.polymul(np.polymul([1, 15, 0], [1, 2 * zp * wp, wp * wp]), [1 / 3000.0, 1])
_, h = signal.freqs(num, den, worN=w)
h = h * np.exp(-1j * w * 0.0004)
rng = np.random.default_rng(20261204)
coh = 0.97 - 0.35 * np.exp(-np.log(w / wz) ** 2 / 0.004) - 0.25 * (w / 1500.0) ** 2
noise = 1.0 + (0.01 * rng.standard_normal(len(w)) + 0.0105j * rng.standard_normal(len(w))) \
    * np.sqrt((1 - coh) / 0.03)
h = h * noise
print('# belt axis, swept sine 0.8 ... 240 Hz through the current loop (invented data)')
print('frequency_hz,magnitude_db,phase_deg,coherence')
ph = np.unwrap(np.angle(h)) * 180 / math.pi
for wi, hi, p, c in zip(w, h, ph, coh):
    print('%.5g,%.4f,%.3f,%.3f' % (wi / (2 * math.pi), 20 * math.log10(abs(hi)), p, c))
