#!/usr/bin/env python3
"""Compares every numeric dataset of two boreflux result files (HDF5).

Prints, per dataset, the largest relative change max|a - b| / max|a| and the whole file's
largest, and whether the files are bit-identical. Used to state how far a change that
should keep results within a tolerance moved them (numpy and h5py on the written files).

    python3 scripts/compare-series.py old.h5 new.h5 [--verbose]
"""
import sys

import h5py
import numpy as np


def datasets(f):
    out = {}

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset) and obj.dtype.kind in "fiu":
            out[name] = np.asarray(obj[()], dtype=float)

    f.visititems(visit)
    return out


def main():
    a_path, b_path = sys.argv[1], sys.argv[2]
    verbose = "--verbose" in sys.argv
    with h5py.File(a_path, "r") as fa, h5py.File(b_path, "r") as fb:
        a, b = datasets(fa), datasets(fb)
    worst, worst_name, identical = 0.0, None, True
    for name in sorted(set(a) | set(b)):
        if name not in a or name not in b:
            print(f"{name}: only in {'first' if name in a else 'second'} file")
            identical = False
            continue
        x, y = a[name], b[name]
        if x.shape != y.shape:
            print(f"{name}: shape {x.shape} vs {y.shape}")
            identical = False
            continue
        if not np.array_equal(x, y, equal_nan=True):
            identical = False
        scale = np.max(np.abs(x)) if x.size else 0.0
        diff = np.max(np.abs(x - y)) if x.size else 0.0
        rel = diff / scale if scale > 0 else diff
        if verbose or rel > 0:
            print(f"{name}: max |diff| {diff:.3e}, relative {rel:.3e}")
        if rel > worst:
            worst, worst_name = rel, name
    print(f"identical: {identical}; largest relative change {worst:.3e} ({worst_name})")


if __name__ == "__main__":
    main()
