"""numpy baseline of the trace engine's benchmark workload (see bench/workload.ts).

2 states 50/50, levels 0 and 1, T1 = 200 us, record 20 us at 100 MS/s, sine carrier 1 MHz,
white noise sigma = 5 per sample, demodulation and boxcar over the record, midpoint threshold.
Written the way a numpy user would: fully vectorised per batch of shots. Prints one JSON line.
"""
import json
import sys
import time

import numpy as np

fs, record, fc, t1, sigma = 100e6, 20e-6, 1e6, 200e-6, 5.0
n = int(round(record * fs))
batch = 1000
seconds = float(sys.argv[1]) if len(sys.argv) > 1 else 3.0

t = np.arange(n) / fs
carrier = np.cos(2 * np.pi * fc * t)
ref = 2 * carrier / n
rng = np.random.default_rng(12345)


def run_batch():
    excited = rng.random(batch) < 0.5
    decay = rng.exponential(t1, batch)
    level = (excited[:, None] & (t[None, :] < decay[:, None])).astype(np.float64)
    x = level * carrier + sigma * rng.standard_normal((batch, n))
    value = x @ ref
    outcome = value > 0.5
    return int(np.count_nonzero(outcome != excited))


run_batch()  # warm-up
shots = 0
start = time.perf_counter()
while time.perf_counter() - start < seconds:
    run_batch()
    shots += batch
elapsed = time.perf_counter() - start
print(json.dumps({"name": "numpy-trace", "samples_per_s": shots * n / elapsed, "shots_per_s": shots / elapsed,
                  "numpy": np.__version__}))
