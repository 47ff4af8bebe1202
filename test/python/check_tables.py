"""Interoperability check: the tables written by `singleshot run` read with pyarrow.

Usage: python3 test/python/check_tables.py RUN_DIR EXPECTED_SHOTS
Asserts row counts, column names, units in field metadata and the embedded scenario.
"""
import json
import sys

import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.ipc as ipc


def read(path):
    with pa.memory_map(path, "r") as source:
        return ipc.open_file(source).read_all()


run_dir, expected_shots = sys.argv[1], int(sys.argv[2])
shots = read(f"{run_dir}/shots.arrow")
summary = read(f"{run_dir}/summary.arrow")
budget = read(f"{run_dir}/budget.arrow")

assert shots.num_rows == expected_shots, (shots.num_rows, expected_shots)
for name in ["point", "shot", "prepared", "at_window_start", "at_window_end", "first_jump_s",
             "in_phase", "quadrature", "value", "outcome", "correct", "cause"]:
    assert name in shots.column_names, name
assert shots.schema.field("value").metadata[b"unit"] == b"A"
assert shots.schema.field("first_jump_s").metadata[b"unit"] == b"s"
assert summary.num_rows == 1
assert "mean_error" in summary.column_names and "snr" in summary.column_names
assert set(budget.column("cause").to_pylist()) >= {"noise", "relaxation", "preparation", "mapping", "total"}
for table in (shots, summary, budget):
    meta = table.schema.metadata
    scenario = json.loads(meta[b"singleshot.scenario"])
    assert scenario["name"], scenario
    assert meta[b"singleshot.seed"] == str(scenario["seed"]).encode()
    assert meta[b"singleshot.version"]
wrong = shots.filter(pc.invert(shots.column("correct")))
assert all(c != "none" for c in wrong.column("cause").to_pylist())
print(f"pyarrow {pa.__version__}: {shots.num_rows} shots, {summary.num_rows} summary row(s), "
      f"{budget.num_rows} budget rows read; units and scenario metadata present")
