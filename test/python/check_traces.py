"""Interoperability check: traces.arrow from `singleshot run --keep-traces raw|baseband` read with pyarrow
(raw traces of a baseband I and Q scenario hold its two channels, in_phase and quadrature).

Usage: python3 test/python/check_traces.py TRACES_ARROW EXPECTED_SHOTS EXPECTED_SAMPLES
Loads the record column(s) into a numpy (shots x samples) array, as the README shows, and checks
its shape, dtype, the truth columns and the metadata analyze needs.
"""
import json
import sys

import numpy as np
import pyarrow as pa
import pyarrow.ipc as ipc

path, expected_shots, expected_samples = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
with pa.memory_map(path, "r") as source:
    table = ipc.open_file(source).read_all()

meta = table.schema.metadata
kind = meta[b"singleshot.trace_kind"].decode()
# raw traces of one channel are `record`; of baseband I and Q, and baseband traces, `in_phase` and `quadrature`
columns = ["record"] if kind == "raw" and "record" in table.column_names else ["in_phase", "quadrature"]
for name in columns:
    # the README's three lines: read the table, flatten the fixed-size lists, reshape
    column = table.column(name).combine_chunks()
    samples = column.type.list_size
    traces = column.flatten().to_numpy().reshape(-1, samples)
    assert traces.shape == (expected_shots, expected_samples), (name, traces.shape)
    assert traces.dtype == np.float32, traces.dtype
    assert np.isfinite(traces).all(), name
    assert traces.std() > 0, name

for name in ["point", "shot", "prepared", "at_window_start", "at_window_end", "intended_outcome",
             "first_jump_s", "cause"]:
    assert name in table.column_names, name
assert table.schema.field("first_jump_s").metadata[b"unit"] == b"s"
assert set(table.column("cause").to_pylist()) <= {"none", "preparation", "mapping", "relaxation", "excitation", "leakage"}
assert float(meta[b"singleshot.sample_rate"]) > 0
outcomes = json.loads(meta[b"singleshot.outcomes"])
assert set(table.column("intended_outcome").to_pylist()) <= set(outcomes), outcomes
calibration = json.loads(meta[b"singleshot.calibration"])
assert calibration and calibration[0]["pipelines"], calibration
print(f"pyarrow {pa.__version__}: {kind} traces loaded as numpy {traces.shape} {traces.dtype}; truth columns and metadata present")
