"""numpy baseline of the exact-statistic engine on the benchmark workload (bench/workload.ts).

2 states 50/50, levels 0 and 1, T1 = 200 us, record 20 us at 100 MS/s, sine carrier 1 MHz,
white noise sigma = 5 per sample, demodulation and boxcar over the record, midpoint threshold.

The same statistic the exact engine samples, written the way a numpy user would, fully
vectorised over a chunk of shots: draw the states and the decay times, look the noise-free
integrated I and Q up in prefix sums of kernel x waveform at the decay sample, add the
correlated I/Q white noise as one 2-D Gaussian (Cholesky factor of its covariance), project on
the separation axis, threshold at the midpoint and count the errors per state. The chunk size is
the fastest of a few tried on this kind of machine. Prints one JSON line.
"""
import json
import sys
import time

import numpy as np

fs, record, fc, t1, sigma = 100e6, 20e-6, 1e6, 200e-6, 5.0
n = int(round(record * fs))
chunk = 1 << 18
seconds = float(sys.argv[1]) if len(sys.argv) > 1 else 3.0

k = np.arange(n)
theta = 2 * np.pi * fc * k / fs
excited_wave = np.cos(theta)  # level 1 on a sine carrier; the ground state is level 0
kernel_i = 2 * np.cos(theta) / n  # demodulation reference x boxcar weight
kernel_q = -2 * np.sin(theta) / n
prefix_i = np.concatenate([[0.0], np.cumsum(kernel_i * excited_wave)])
prefix_q = np.concatenate([[0.0], np.cumsum(kernel_q * excited_wave)])
cov = sigma**2 * np.array([[kernel_i @ kernel_i, kernel_i @ kernel_q], [kernel_q @ kernel_i, kernel_q @ kernel_q]])
chol = np.linalg.cholesky(cov)
mean1 = np.array([prefix_i[-1], prefix_q[-1]])
axis = mean1 / np.hypot(*mean1)
threshold = 0.5 * (mean1 @ axis)
rng = np.random.default_rng(12345)


def run_chunk():
    excited = rng.random(chunk) < 0.5
    decay = rng.exponential(t1, chunk)
    # the excited state holds until the first sample at or after the decay (ceil), ground never radiates
    j = np.where(excited, np.minimum(np.ceil(decay * fs), n).astype(np.intp), 0)
    z = rng.standard_normal((2, chunk))
    i_value = prefix_i[j] + chol[0, 0] * z[0]
    q_value = prefix_q[j] + chol[1, 0] * z[0] + chol[1, 1] * z[1]
    outcome = i_value * axis[0] + q_value * axis[1] > threshold
    wrong1 = np.count_nonzero(excited & ~outcome)
    wrong0 = np.count_nonzero(outcome & ~excited)
    return wrong0, wrong1


run_chunk()  # warm-up
shots = 0
start = time.perf_counter()
while time.perf_counter() - start < seconds:
    run_chunk()
    shots += chunk
elapsed = time.perf_counter() - start
print(json.dumps({"name": "numpy-exact", "shots_per_s": shots / elapsed, "chunk": chunk, "numpy": np.__version__}))
