#!/usr/bin/python3
"""Check a wallcross dataset's clocks.npy against its clocks.csv with numpy.

usage: npy_vs_csv.py DATASET_DIR
Prints "ok EPOCHS CLOCKS GAPS" and exits 0 when numpy loads clocks.npy as a
float64 [epochs x clocks] array whose values equal clocks.csv bit for bit
(empty CSV cell = NaN); exits 1 with a message otherwise; exits 3 when numpy
is missing.
"""
import csv
import json
import os
import sys

try:
    import numpy as np
except ImportError:
    print("numpy missing")
    sys.exit(3)

d = sys.argv[1]
a = np.load(os.path.join(d, "clocks.npy"))
with open(os.path.join(d, "manifest.json")) as f:
    man = json.load(f)
ids = [c["id"] for c in man["clocks"]]
with open(os.path.join(d, "clocks.csv"), newline="") as f:
    rows = list(csv.reader(f))
if rows[0] != ["t_s"] + ids:
    print("header mismatch", rows[0][:5])
    sys.exit(1)
b = np.array([[float(x) if x != "" else np.nan for x in r[1:]] for r in rows[1:]], dtype=np.float64)
if a.dtype != np.float64 or a.shape != b.shape or a.shape != (man["epochs"], len(ids)):
    print("shape/dtype mismatch", a.dtype, a.shape, b.shape)
    sys.exit(1)
if not np.array_equal(np.isnan(a), np.isnan(b)):
    print("gap pattern differs")
    sys.exit(1)
m = ~np.isnan(a)
if not np.array_equal(a[m].view(np.uint64), b[m].view(np.uint64)):
    print("values differ; max abs diff", np.max(np.abs(a[m] - b[m])))
    sys.exit(1)
t = np.array([float(r[0]) for r in rows[1:]])
if not np.array_equal(t, np.arange(man["epochs"]) * man["interval_s"]):
    print("t_s column differs from k * interval")
    sys.exit(1)
print("ok", a.shape[0], a.shape[1], int(np.sum(~m)))
