"""Interoperability check of the record readers and the Parquet tables (CI, needs numpy, h5py,
pyarrow, duckdb and polars).

1. The same records and labels, made by numpy, written as .npy, .npz, HDF5 (h5py), Parquet and
   Arrow (pyarrow), go through `singleshot analyze`: every format gives identical tables
   (shots.arrow and summary.arrow, column by column; only the metadata naming the input differs).
2. A run and an analysis with --parquet: DuckDB's read_parquet and polars read the Parquet tables,
   with the same rows as the Arrow tables and the units intact (pyarrow's field metadata, and the
   singleshot.units key-value metadata that DuckDB and polars expose).

Usage: python3 test/python/check_formats.py WORK_DIR
"""
import json
import os
import subprocess
import sys

import duckdb
import h5py
import numpy as np
import polars as pl
import pyarrow as pa
import pyarrow.ipc as ipc
import pyarrow.parquet as pq

work = sys.argv[1]
os.makedirs(work, exist_ok=True)
CLI = ["node", "bin/singleshot.js"]


def singleshot(*args):
    r = subprocess.run([*CLI, *args], capture_output=True, text=True)
    assert r.returncode == 0, (args, r.stdout, r.stderr)
    return r.stdout


def read_arrow(path):
    with pa.memory_map(path, "r") as source:
        return ipc.open_file(source).read_all()


# --- 1. one set of records in five formats --------------------------------------------------
rng = np.random.default_rng(20261202)
rows, samples, rate = 600, 64, 10e6
labels = (rng.random(rows) < 0.5).astype(np.uint8)
levels = np.where(labels[:, None] == 1, 1.2e-10, 0.0)
records = (levels + 3e-10 * rng.standard_normal((rows, samples))).astype(np.float32)

files = {
    "npy": (f"{work}/records.npy", f"{work}/labels.npy"),
    "npz": (f"{work}/records.npz:records", "labels"),
    "hdf5": (f"{work}/records.h5:/readout/records", "/readout/labels"),
    "parquet": (f"{work}/records.parquet", "label"),
    "arrow": (f"{work}/records.arrow", "label"),
}
np.save(files["npy"][0], records)
np.save(files["npy"][1], labels)
np.savez(f"{work}/records.npz", records=records, labels=labels)
with h5py.File(f"{work}/records.h5", "w") as f:
    g = f.create_group("readout")
    g.create_dataset("records", data=records)
    g.create_dataset("labels", data=labels)
table = pa.table({"record": pa.array(list(records), type=pa.list_(pa.float32())), "label": pa.array(labels)})
pq.write_table(table, f"{work}/records.parquet")
with ipc.new_file(f"{work}/records.arrow", table.schema) as w:
    w.write_table(table)

tables = {}
for name, (recs, labs) in files.items():
    out = f"{work}/analyzed-{name}"
    singleshot("analyze", recs, "--labels", labs, "--sample-rate", "10 MHz", "--unit", "A", "--out", out, "--force")
    tables[name] = {t: read_arrow(f"{out}/{t}.arrow") for t in ("shots", "summary")}

reference = tables["npy"]
for name, t in tables.items():
    for which in ("shots", "summary"):
        a, b = reference[which], t[which]
        assert a.column_names == b.column_names, (name, which, a.column_names, b.column_names)
        for column in a.column_names:
            assert a.column(column).equals(b.column(column)), (name, which, column)
        # the units travel with the fields
        assert [f.metadata for f in a.schema] == [f.metadata for f in b.schema], (name, which)
summary = reference["summary"].to_pylist()[0]
assert summary["shots"] == rows - int(np.ceil(0.2 * rows)), summary["shots"]
assert 0 < summary["mean_error"] < 0.5, summary["mean_error"]  # errors to compare, not a trivial separation
assert reference["summary"].schema.field("sigma").metadata[b"unit"] == b"A"
print(f"five formats, identical tables: {rows} records, mean error {summary['mean_error']:.4g}, SNR {summary['snr']:.3g}")

# --- 2. Parquet tables for DuckDB and polars -------------------------------------------------
run = f"{work}/run-parquet"
singleshot("run", "test/fixtures/scenarios/small.yaml", "--out", run, "--quiet", "--no-report", "--parquet", "--force")
analysis = f"{work}/analyzed-parquet"
singleshot("analyze", files["npy"][0], "--labels", files["npy"][1], "--sample-rate", "10 MHz", "--unit", "A", "--out", analysis, "--parquet", "--force")
for folder, names in ((run, ("shots", "summary", "budget")), (analysis, ("shots", "summary", "noise", "traces"))):
    listed = json.load(open(f"{folder}/run.json"))["files"]
    for name in names:
        arrow, parquet = f"{folder}/{name}.arrow", f"{folder}/{name}.parquet"
        assert f"{name}.parquet" in listed, (folder, name, listed)
        expected = read_arrow(arrow)
        # pyarrow: the same table, field units included
        back = pq.read_table(parquet)
        assert back.num_rows == expected.num_rows
        for field in expected.schema:
            assert back.schema.field(field.name).metadata == field.metadata, (parquet, field.name)
        # DuckDB: the rows, and the metadata as Parquet key-value pairs
        count = duckdb.sql(f"select count(*) from read_parquet('{parquet}')").fetchone()[0]
        assert count == expected.num_rows, (parquet, count)
        kv = dict(duckdb.sql(f"select decode(key), decode(value) from parquet_kv_metadata('{parquet}')").fetchall())
        units = json.loads(kv["singleshot.units"])
        for field in expected.schema:
            if field.metadata and b"unit" in field.metadata:
                assert units[field.name] == field.metadata[b"unit"].decode(), (parquet, field.name)
        assert kv["singleshot.table"] == expected.schema.metadata[b"singleshot.table"].decode()
        # polars: the frame and the same key-value metadata
        frame = pl.read_parquet(parquet)
        assert frame.height == expected.num_rows and frame.columns == expected.column_names, (parquet, frame.columns)
        assert json.loads(pl.read_parquet_metadata(parquet)["singleshot.units"]) == units
summary = duckdb.sql(f"select mean_error, snr from read_parquet('{run}/summary.parquet')").fetchall()
print(f"Parquet tables read by DuckDB and polars with their units: run mean error {summary[0][0]:.4g}, SNR {summary[0][1]:.3g}")
